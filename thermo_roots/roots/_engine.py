"""The shared loop: keep the still-active problems packed, ask a method for the next
points, evaluate f once per iteration for all of them, and retire the finished ones.

Every method, scalar or vectorized, runs through :func:`drive`. State lives in a dict
of 1-D arrays (one entry per active problem); retiring finished problems compresses
all of them at once, so the cost of an iteration follows the number still active.
Arrays in the state are replaced, never changed in place, so the trace can keep
references to them instead of copies.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from thermo_roots.errors import InputError
from thermo_roots.roots._result import CODE, Status

ACTIVE = 0
CONVERGED = CODE[Status.CONVERGED]
ITERATION_LIMIT = CODE[Status.ITERATION_LIMIT]
DIVERGED = CODE[Status.DIVERGED]
LEFT_DOMAIN = CODE[Status.LEFT_DOMAIN]
NO_SIGN_CHANGE = CODE[Status.NO_SIGN_CHANGE]
POLE = CODE[Status.POLE]
CYCLING = CODE[Status.CYCLING]
NOT_FINITE = CODE[Status.NOT_FINITE]


@dataclass(frozen=True)
class Options:
    """Stopping rules shared by all methods (see :func:`find_root`)."""

    xtol: float
    rtol: float
    ftol: float
    maxiter: int

    def tol(self, x: np.ndarray) -> np.ndarray:
        """Allowed error |x - x*| at x [unit of x]."""
        return self.xtol + self.rtol * np.abs(x)

    def small_f(self, fx: np.ndarray) -> np.ndarray:
        """Where f is zero, or within ftol of it when ftol is on [unit of f]."""
        if self.ftol > 0:
            return np.abs(fx) <= self.ftol
        return fx == 0


class Outputs:
    """Per-problem results, filled in as problems retire."""

    def __init__(self, n: int):
        self.root = np.full(n, np.nan)
        self.code = np.zeros(n, dtype=np.int8)
        self.iterations = np.zeros(n, dtype=np.int64)
        self.evaluations = np.zeros(n, dtype=np.int64)


class Work:
    """The packed state of the problems still being solved.

    Every active problem takes part in every call of f, so one counter of calls
    gives each problem's evaluation count when it retires.
    """

    def __init__(self, f, fprime, state: dict, args: list, packed: list, scalar: bool):
        self.f, self.fprime = f, fprime
        self.v = state
        self.idx = np.arange(len(next(iter(state.values()))))
        self.args, self.packed, self.scalar = args, packed, scalar
        self.calls = 0
        self.iteration = 0  # the iteration in progress, shared by every active problem

    @property
    def size(self) -> int:
        return self.idx.size

    def call(self, func, x: np.ndarray, one_per_x: bool = False) -> np.ndarray:
        """func at x with the matching args; a scalar problem passes a float.

        ``one_per_x`` (used for f) requires one value per element of x: a single
        value for many x is refused instead of broadcast. A derivative may return one
        value for all (a constant slope).
        """
        value = real_values(func(x[0] if self.scalar else x, *self.args), func, x)
        if value.shape == x.shape:
            return value
        if value.size == x.size:
            return value.reshape(x.shape)
        name = _name(func)
        if one_per_x or value.size != 1:
            raise InputError(
                f"{name} returned {value.size} value(s), shape {value.shape}, for {x.size} x value(s); "
                f"{name} must return one value per x: work elementwise on the array it is given "
                "(numpy functions do), not return a single number for all of them."
            )
        return np.broadcast_to(value, x.shape)

    def evaluate(self, x: np.ndarray) -> np.ndarray:
        """f at x for every active problem."""
        self.calls += 1
        return self.call(self.f, x, one_per_x=True)

    def retire(self, codes, roots, iterations: int, out: Outputs) -> None:
        """Move the problems whose code is not ACTIVE into ``out``; pack the rest.

        ``roots(done)`` gives the roots of the retiring problems (a boolean mask in),
        so the best point is only worked out for them; an array or a number also do.
        """
        if codes is None:
            return
        done = codes != ACTIVE
        if not done.any():
            return
        where = self.idx[done]
        out.root[where] = roots(done) if callable(roots) else np.broadcast_to(roots, done.shape)[done]
        out.code[where] = codes[done]
        out.iterations[where] = iterations
        out.evaluations[where] = self.calls
        self._pack(np.flatnonzero(~done))

    def _pack(self, keep: np.ndarray) -> None:
        self.idx = self.idx.take(keep)
        self.v = {name: values.take(keep) for name, values in self.v.items()}
        self.args = [a.take(keep) if p else a for a, p in zip(self.args, self.packed)]


def _name(func) -> str:
    name = getattr(func, "__name__", None)
    return name if isinstance(name, str) and name.isidentifier() else "f"  # "<lambda>" reads as f


def real_values(value, func, x) -> np.ndarray:
    """``value`` as a float array, or a TypeError naming what ``func`` returned.

    Refused: None, complex numbers (even with a zero imaginary part), booleans and
    strings. Anything else numpy reads as real numbers (ints, floats, Fractions) is
    accepted.
    """
    name = _name(func)
    arr = np.asarray(value)
    kind = arr.dtype.kind
    if kind in "fiu":
        return arr.astype(float, copy=False)
    if kind == "O":
        refused = (complex, np.complexfloating, str, bytes, bool, np.bool_)
        bad = [v for v in arr.ravel() if v is None or isinstance(v, refused)][:1]
        if bad:
            return _refuse(name, bad[0], x)
        try:
            return arr.astype(float)
        except (TypeError, ValueError):
            return _refuse(name, value, x)
    return _refuse(name, value, x)


def _refuse(name, value, x):
    if value is None:
        what, hint = "None", " Check that it ends with a return statement."
    else:
        text = repr(value)
        what = (text if len(text) <= 100 else text[:97] + "...") + f" ({type(value).__name__}"
        what += f" of {np.asarray(value).dtype})" if isinstance(value, np.ndarray) else ")"
        hint = ""
        if np.iscomplexobj(value) or isinstance(value, complex):
            what = "complex numbers: " + what
            hint = " If the imaginary part is meant to be zero, return the real part (.real)."
    raise TypeError(
        f"{name} must return real numbers (float or int, one per x); at x = {_show(x)} it returned {what}.{hint}"
    )


def _show(x) -> str:
    x = np.asarray(x)
    return repr(float(x.flat[0])) if x.size == 1 else f"an array of {x.size} values"


def between(x: np.ndarray, t: np.ndarray, y: np.ndarray, bisect_wide: bool = False) -> np.ndarray:
    """x + t (y - x), without overflow where y - x exceeds the largest float.

    Where y - x is finite this is exactly the usual formula (so iterates, and
    evaluation counts, are unchanged); elsewhere (1 - t) x + t y, whose terms stay
    within the range of x and y, with t = 1/2 there when ``bisect_wide`` (an
    interpolation across such a span is not to be trusted). x and y are finite.
    """
    d = y - x
    if d.size == 0 or (np.isfinite(d.max()) and np.isfinite(d.min())):  # two reductions, no temporaries
        return x + t * d
    wide = ~np.isfinite(d)
    t = np.where(wide, 0.5, t) if bisect_wide else t
    return np.where(wide, (1.0 - t) * x + t * y, x + t * d)


def mark_poles(codes: np.ndarray, f_final: np.ndarray, f_other: np.ndarray, f_start: np.ndarray) -> np.ndarray:
    """Turn CONVERGED into POLE where the shrunken bracket looks like a pole; the mask.

    Near a simple root |f| at the bracket ends falls like the width; near a pole
    it grows like 1/width. Taken as a pole: the smaller |f| at the final bracket
    (``f_final``, ``f_other``) exceeds the larger |f| at the starting ends
    (``f_start``). Only the problems converging now are looked at.
    """
    pole = np.zeros(codes.shape, dtype=bool)
    done = np.flatnonzero(codes == CONVERGED)
    if done.size:
        smaller = np.minimum(np.abs(f_final[done]), np.abs(f_other[done]))
        pole[done] = smaller > f_start[done]
        codes[pole] = POLE
    return pole


def as_codes(done: np.ndarray) -> np.ndarray:
    """CONVERGED where done, else ACTIVE, without a copy (a bool is one byte, 0 or 1)."""
    return done.view(np.int8)


assert (ACTIVE, CONVERGED) == (0, 1)  # as_codes relies on this


class Tracer:
    """Collects (iteration, indices, x, fx, a, b) records, or nothing when off."""

    def __init__(self, enabled: bool):
        self.records = [] if enabled else None

    def record(self, iteration: int, work: Work, method) -> None:
        if self.records is not None:
            self.records.append((iteration, work.idx, *method.snapshot(work.v)))


_QUIET = dict(divide="ignore", invalid="ignore", over="ignore")


def drive(method, work: Work, opts: Options, out: Outputs, tracer: Tracer) -> None:
    """Run ``method`` until every problem has retired or maxiter is reached.

    A method provides ``start(work, opts) -> (codes, roots)`` (evaluates the
    starting points), ``propose(work, opts) -> codes or None`` (stores the next
    points in ``v["xn"]``; non-ACTIVE codes stop a problem before f is called
    there), ``accept(work, fx, opts) -> (codes, roots)``, ``best(v)`` and
    ``snapshot(v) -> (x, fx, a, b)``; ``roots`` may be a callable of the mask of
    retiring problems (see :meth:`Work.retire`). Arithmetic warnings inside the methods are
    silenced: IEEE results (inf, NaN) are checked explicitly; f's own warnings are not.
    """
    if not work.size:  # every problem retired before the start (non-finite inputs)
        return
    with np.errstate(**_QUIET):
        codes, roots = method.start(work, opts)
    tracer.record(0, work, method)
    work.retire(codes, roots, 0, out)
    iteration = 0
    while work.size and iteration < opts.maxiter:
        iteration += 1
        work.iteration = iteration
        with np.errstate(**_QUIET):
            work.retire(method.propose(work, opts), np.nan, iteration - 1, out)
        if not work.size:
            break
        fx = work.evaluate(work.v["xn"])
        with np.errstate(**_QUIET):
            codes, roots = method.accept(work, fx, opts)
        tracer.record(iteration, work, method)
        work.retire(codes, roots, iteration, out)
    if work.size:
        limit = np.full(work.size, ITERATION_LIMIT, dtype=np.int8)
        work.retire(limit, lambda done: method.best(work.v)[done], iteration, out)
