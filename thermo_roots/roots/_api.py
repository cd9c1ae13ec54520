"""The public entry point :func:`find_root` and the table of methods."""

from __future__ import annotations

import numpy as np

from thermo_roots.errors import InputError
from thermo_roots.roots._bracketed import Bisection, Chandrupatla, Illinois
from thermo_roots.roots._engine import CONVERGED, Options, Outputs, Tracer, Work, drive
from thermo_roots.roots._open import Newton, Secant
from thermo_roots.roots._result import STATUS_BY_CODE, ArrayTrace, RootResult, ScalarTrace, status_text

METHODS = {m.name: m for m in (Chandrupatla(), Bisection(), Illinois(), Secant(), Newton())}
DEFAULT_METHOD = "chandrupatla"
_EPS = np.finfo(float).eps


def find_root(f, bracket=None, method=DEFAULT_METHOD, x0=None, fprime=None, args=(),
              xtol=2e-12, rtol=4 * _EPS, ftol=0.0, maxiter=100, domain=None, trace=True):
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
    trace : bool
        Keep every iterate. Off saves memory and time for large batches (an array trace
        costs about 40 bytes per active problem and iteration).

    Returns
    -------
    RootResult
        Scalars for a scalar problem (``status`` a :class:`Status`); arrays of the
        broadcast shape otherwise (``status`` an array of the status texts).

    Notes
    -----
    Statuses: "converged"; "iteration limit" (``root`` is the best point so far);
    "diverged" (an open method escaped, see :mod:`thermo_roots.roots._open`, or f was
    not finite at an iterate); "left the domain"; "no sign change" (a bracketed method
    whose f(a), f(b) are not of opposite signs, NaN included). An exact zero of f at a
    bracket end is a converged root. Only wrong arguments raise :class:`InputError`.

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
    spec = _method(method)
    opts = _options(xtol, rtol, ftol, maxiter)
    _check_needs(spec, bracket, x0, fprime)
    shape, state, packed_args, packed = _problems(bracket, x0, domain, args)
    work = Work(f, fprime, state, packed_args, packed, scalar=shape == ())
    out, tracer = Outputs(work.size), Tracer(trace)
    drive(spec, work, opts, out, tracer)
    return _result(spec.name, shape, out, tracer)


def _method(name):
    try:
        return METHODS[name]
    except (KeyError, TypeError):
        allowed = "; ".join(f"{k!r} ({m.summary})" for k, m in METHODS.items())
        raise InputError(f"unknown method {name!r}; allowed: {allowed}.") from None


def _options(xtol, rtol, ftol, maxiter) -> Options:
    for label, value in (("xtol", xtol), ("rtol", rtol), ("ftol", ftol)):
        if not (np.isscalar(value) and np.isfinite(value) and value >= 0):
            raise InputError(f"{label} must be a finite number >= 0; got {value!r}.")
    if xtol == 0 and rtol == 0:
        raise InputError("xtol and rtol are both 0; give at least one of them a positive value.")
    if int(maxiter) != maxiter or maxiter < 1:
        raise InputError(f"maxiter must be a whole number >= 1; got {maxiter!r}.")
    # Below 2 eps the width test could never be met: adjacent floats differ by up to eps |x|.
    return Options(float(xtol), max(float(rtol), 2 * _EPS), float(ftol), int(maxiter))


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
        raise InputError(f"{label} must be a pair (lo, hi); got {pair!r}.") from None
    return np.asarray(lo, dtype=float), np.asarray(hi, dtype=float)


def _problems(bracket, x0, domain, args):
    """Broadcast everything to one shape and flatten it into the starting state."""
    parts = {}
    if bracket is not None:
        a, b = _pair(bracket, "bracket")
        if not (np.all(np.isfinite(a)) and np.all(np.isfinite(b))):
            raise InputError(f"bracket ends must be finite numbers; got {bracket!r}.")
        parts["a"], parts["b"] = a, b
    if x0 is not None:
        parts["x0"] = np.asarray(x0, dtype=float)
        if not np.all(np.isfinite(parts["x0"])):
            raise InputError(f"x0 must be finite; got {x0!r}.")
    if domain is not None:
        parts["lo"], parts["hi"] = _domain(domain)
        if "x0" in parts and not np.all((parts["x0"] >= parts["lo"]) & (parts["x0"] <= parts["hi"])):
            raise InputError(f"x0 lies outside the domain {domain!r}; start inside it.")
    packed = [isinstance(v, np.ndarray) and v.ndim > 0 for v in args]
    shapes = [p.shape for p in parts.values()] + [v.shape for v, p in zip(args, packed) if p]
    try:
        shape = np.broadcast_shapes(*shapes)
    except ValueError:
        raise InputError(f"bracket, x0, domain and array args do not broadcast together: {shapes}.") from None
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
