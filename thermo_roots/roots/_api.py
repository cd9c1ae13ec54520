"""The public entry point :func:`find_root` and the table of methods."""

from __future__ import annotations

import difflib
import numbers

import numpy as np

from thermo_roots.errors import InputError
from thermo_roots.roots._bracketed import Bisection, Chandrupatla, Illinois
from thermo_roots.roots._engine import CONVERGED, NOT_FINITE, Options, Outputs, Tracer, Work, drive
from thermo_roots.roots._open import Newton, Secant
from thermo_roots.roots._result import STATUS_BY_CODE, ArrayTrace, RootResult, ScalarTrace, status_text

METHODS = {m.name: m for m in (Chandrupatla(), Bisection(), Illinois(), Secant(), Newton())}
DEFAULT_METHOD = "chandrupatla"
_EPS = np.finfo(float).eps


def find_root(f, bracket=None, method=DEFAULT_METHOD, x0=None, fprime=None, args=(),
              xtol=2e-12, rtol=4 * _EPS, ftol=0.0, maxiter=100, domain=None, trace=None):
    """Find a root of f, for one problem or for many at once.

    Parameters
    ----------
    f : callable
        ``f(x, *args)``, elementwise. A scalar problem passes a float; an array problem
        passes a 1-D array of the problems still being solved, with every array in
        ``args`` cut to the same elements [unit of f].
    bracket : (a, b), optional
        Interval ends, floats or arrays broadcasting together [unit of x]. Required by
        the bracketed methods ("chandrupatla", "bisect", "illinois"); for "secant" and
        "newton" it gives starting points and, where f changes sign over it, the
        fallback described below. The order of a and b does not matter.
    method : str
        A key of :data:`METHODS`; default "chandrupatla".
    x0 : float or array, optional
        Starting point of "secant" and "newton" [unit of x]; needed when there is no
        bracket. Ignored by the bracketed methods.
    fprime : callable, optional
        ``fprime(x, *args)``, the derivative of f; required by "newton" [unit of f / unit of x].
    args : tuple
        Extra arguments of f and fprime. Numpy arrays with ``ndim >= 1`` broadcast with
        the bracket (and x0) and are cut together with x; anything else is passed unchanged.
    xtol, rtol : float
        Absolute [unit of x] and relative [-] tolerance. A problem converges when the
        bracket width (bracketed methods, and open methods with a bracket) or the last
        step (open methods) is at most ``xtol + rtol * |x|``, x being the best point
        (for a bracket the end nearer zero, the stricter choice; for a step the new iterate), so that
        ``|x - x*| <= xtol + rtol * |x*|`` up to rounding; f exactly 0 is converged
        too. An rtol below 2 eps (the float spacing) acts as 2 eps.
    ftol : float
        Also converged when ``|f(x)| <= ftol``; 0 (the default) turns this test off
        [unit of f].
    maxiter : int
        Most iterations per problem (the starting evaluations not counted).
    domain : (lo, hi), optional
        Closed interval where f may be evaluated, floats or arrays [unit of x]. An open
        method whose next point leaves it stops with "left the domain" (or bisects,
        when it has a bracket); f is not called there. The bracketed methods only
        evaluate inside their bracket and do not use it.
    trace : bool or None
        Keep every iterate. None (the default) keeps them for a scalar problem and not
        for an array problem; True keeps them for arrays too (about 40 bytes per
        active problem and iteration: some 1.5 GB for 10**6 bisections), False never.

    Returns
    -------
    RootResult
        Scalars for a scalar problem (``status`` a :class:`Status`); arrays of the
        broadcast shape otherwise (``status`` an array of the status texts).

    Notes
    -----
    Statuses (see :class:`Status`): "converged"; "iteration limit" (``root`` is the
    best point so far); "diverged" (an open method escaped, see
    :mod:`thermo_roots.roots._open`, or f was NaN at an iterate); "left the
    domain"; "no sign change" (a bracketed method whose f(a), f(b) are not of opposite
    signs, NaN included); "pole, no root" (the bracket shrank onto a point where
    |f| grows instead of falling: the smaller |f| at the final bracket exceeds the larger
    |f| at the starting ends, or f is infinite inside the bracket); "cycling" (an open
    method revisited a point without converging); "no finite start" (an element of an array problem with a NaN or
    infinite bracket end or x0; f is not called for it). An exact zero of f at a
    bracket end is a converged root. ``root`` is NaN for every status except
    "converged" and "iteration limit".

    Wrong arguments raise :class:`InputError` (a ValueError) or TypeError, naming the
    argument; so does f returning something other than real numbers, one per x (None,
    complex values, one number for a whole array). An exception raised by f itself
    propagates unchanged.

    Open methods without a usable bracket stop on an escape ("diverged" / "left the
    domain"). With a bracket over which f changes sign, any step that would leave the
    bracket or the domain, or cannot be formed, is replaced by bisection and the
    bracket is updated every iteration, so they do not stop early.

    Every problem runs through the same vectorized loop; finished problems are packed
    away, so f only sees the ones still active.

    References
    ----------
    .. [1] Chandrupatla, T. R., Advances in Engineering Software 28(3):145-149, 1997 (default method).
    .. [2] Dowell, M., Jarratt, P., BIT 11(2):168-174, 1971 (Illinois).
    .. [3] Burden, R. L., Faires, J. D., *Numerical Analysis*, 9th ed., 2011, ch. 2
       (bisection, secant, Newton-Raphson).
    .. [4] Alefeld, G. E., Potra, F. A., Shi, Y., "Algorithm 748: Enclosing zeros of
       continuous functions", ACM TOMS 21(3):327-344, 1995 (the test set used to check
       the default method).

    Examples
    --------
    >>> r = find_root(lambda x: x**3 - 2*x - 5, bracket=(2, 3))
    >>> round(r.root, 10), r.status
    (2.0945514815, <Status.CONVERGED: 'converged'>)
    """
    if not callable(f):
        raise TypeError(f"f must be a function f(x, *args) returning real numbers; got {_short(f)}.")
    spec = _method(method)
    opts = _options(xtol, rtol, ftol, maxiter)
    _check_needs(spec, bracket, x0, fprime)
    shape, state, packed_args, packed = _problems(bracket, x0, domain, args)
    work = Work(f, fprime, state, packed_args, packed, scalar=shape == ())
    out, tracer = Outputs(work.size), Tracer(_trace_on(trace, shape))
    _retire_non_finite(work, out)
    drive(spec, work, opts, out, tracer)
    return _result(spec.name, shape, out, tracer)


def _short(value) -> str:
    text = repr(value)
    return text if len(text) <= 80 else text[:77] + "..."


def _method(name):
    if not isinstance(name, str):
        raise TypeError(f"method must be a string, one of {sorted(METHODS)}; got {_short(name)} "
                        f"({type(name).__name__}).")
    if name in METHODS:
        return METHODS[name]
    allowed = "; ".join(f"{k!r} ({m.summary})" for k, m in METHODS.items())
    folded = {k.lower(): k for k in METHODS}
    close = difflib.get_close_matches(name.strip().lower(), list(folded), n=2, cutoff=0.5)
    hint = f" Did you mean {' or '.join(repr(folded[c]) for c in close)}?" if close else ""
    raise InputError(f"unknown method {name!r}.{hint} Allowed: {allowed}.")


def _real(value) -> bool:
    return isinstance(value, numbers.Real) and not isinstance(value, (bool, np.bool_))


def _options(xtol, rtol, ftol, maxiter) -> Options:
    for label, value in (("xtol", xtol), ("rtol", rtol), ("ftol", ftol)):
        if not (_real(value) and np.isfinite(value) and value >= 0):
            raise InputError(f"{label} must be a finite number >= 0 (0 turns it off); got {_short(value)}. "
                             f"Defaults: xtol=2e-12, rtol=4 eps (about 8.9e-16), ftol=0.")
    if xtol == 0 and rtol == 0:
        raise InputError("xtol and rtol are both 0; give at least one of them a positive value.")
    if not (_real(maxiter) and _whole(maxiter) and maxiter >= 1):
        raise InputError(f"maxiter must be a whole number >= 1 (an int such as 100, or 1e4); got "
                         f"{_short(maxiter)} ({type(maxiter).__name__}). The default is 100.")
    # Below 2 eps the width test could never be met: adjacent floats differ by up to eps |x|.
    return Options(float(xtol), max(float(rtol), 2 * _EPS), float(ftol), int(maxiter))


def _whole(value) -> bool:
    try:
        return bool(np.isfinite(float(value))) and value == int(value)
    except (OverflowError, ValueError):
        return False


def _trace_on(trace, shape) -> bool:
    if trace is None:
        return shape == ()  # the default: a scalar problem keeps its iterates, an array problem does not
    if isinstance(trace, (bool, np.bool_)):
        return bool(trace)
    raise TypeError(f"trace must be True, False or None (None: trace a scalar problem only); got {_short(trace)}.")


def _retire_non_finite(work, out) -> None:
    """Array problems: elements with a NaN or infinite bracket end or x0 stop before f is called."""
    bad = np.zeros(work.size, dtype=bool)
    for key in ("a", "b", "x0"):
        if key in work.v:
            bad |= ~np.isfinite(work.v[key])
    if bad.any():
        work.retire(np.where(bad, NOT_FINITE, 0).astype(np.int8), np.nan, 0, out)


def _check_needs(spec, bracket, x0, fprime) -> None:
    if spec.bracketed and bracket is None:
        raise InputError(f"method {spec.name!r} needs bracket=(a, b); or use 'secant'/'newton' with x0.")
    if not spec.bracketed and bracket is None and x0 is None:
        raise InputError(f"method {spec.name!r} needs x0 or bracket=(a, b); got neither.")
    if spec.needs_fprime and not callable(fprime):
        raise InputError(f"method {spec.name!r} needs fprime, the derivative of f; got {fprime!r}.")


def _pair(pair, label):
    try:
        lo, hi = pair
    except (TypeError, ValueError):
        raise InputError(f"{label} must be a pair (lo, hi); got {_short(pair)}.") from None
    return _numbers(lo, label), _numbers(hi, label)


def _numbers(value, label) -> np.ndarray:
    """value as a float array; a TypeError naming ``label`` for None, text, complex."""
    arr = np.asarray(value)
    if arr.dtype.kind not in "fiu":
        try:
            if arr.dtype.kind in "bcSUV" or value is None:
                raise TypeError
            arr = arr.astype(float)
        except (TypeError, ValueError):
            raise TypeError(f"{label} must be real numbers (floats or arrays of floats); got "
                            f"{_short(value)} ({type(value).__name__}).") from None
    return arr.astype(float, copy=False)


def _problems(bracket, x0, domain, args):
    """Broadcast everything to one shape and flatten it into the starting state."""
    parts = {}
    if bracket is not None:
        parts["a"], parts["b"] = _pair(bracket, "bracket")
    if x0 is not None:
        parts["x0"] = _numbers(x0, "x0")
    if domain is not None:
        parts["lo"], parts["hi"] = _domain(domain)
        x0_ = parts.get("x0")
        if x0_ is not None and np.any((x0_ < parts["lo"]) | (x0_ > parts["hi"])):  # NaN: its own status
            raise InputError(f"x0 lies outside the domain {domain!r}; start inside it.")
    packed = [isinstance(v, np.ndarray) and v.ndim > 0 for v in args]
    shapes = [p.shape for p in parts.values()] + [v.shape for v, p in zip(args, packed) if p]
    try:
        shape = np.broadcast_shapes(*shapes)
    except ValueError:
        raise InputError(f"bracket, x0, domain and array args do not broadcast together: {shapes}.") from None
    if shape == ():  # one problem: a NaN or infinite start is a wrong argument, not a status
        for key, label in (("a", "bracket"), ("b", "bracket"), ("x0", "x0")):
            if key in parts and not np.isfinite(parts[key]):
                given = bracket if label == "bracket" else x0
                raise InputError(f"{label} must be finite numbers; got {_short(given)}. "
                                 "Give a finite interval (or start) where f can be evaluated.")
    flat = lambda v: np.broadcast_to(v, shape).ravel()  # noqa: E731
    state = {k: flat(v) for k, v in parts.items()}  # never changed in place, so no copy needed
    if "a" in state:  # either order is accepted
        state["a"], state["b"] = np.minimum(state["a"], state["b"]), np.maximum(state["a"], state["b"])
    packed_args = [flat(v) if p else v for v, p in zip(args, packed)]
    return shape, state, packed_args, packed


def _domain(domain):
    lo, hi = _pair(domain, "domain")
    if np.any(np.isnan(lo)) or np.any(np.isnan(hi)) or np.any(lo > hi):
        raise InputError(f"domain must be (lo, hi) with lo <= hi and no NaN; got {domain!r}.")
    return lo, hi


def _result(name, shape, out: Outputs, tracer: Tracer) -> RootResult:
    records = tracer.records
    if shape == ():
        status = STATUS_BY_CODE[int(out.code[0])]
        trace = None if records is None else ScalarTrace.from_records(records)
        return RootResult(float(out.root[0]), bool(out.code[0] == CONVERGED), status,
                          int(out.iterations[0]), int(out.evaluations[0]), trace, name)
    trace = None if records is None else ArrayTrace(tuple(records), shape)
    return RootResult(out.root.reshape(shape), (out.code == CONVERGED).reshape(shape),
                      status_text(out.code).reshape(shape), out.iterations.reshape(shape),
                      out.evaluations.reshape(shape), trace, name)
