"""Result values of the root finders: status, trace records and the result itself."""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum
from typing import Any

import numpy as np

from thermo_roots.errors import ConvergenceError


class Status(str, Enum):
    """Why a root finder stopped, per problem.

    A ``str`` enum: each member compares equal to its readable text, so
    ``result.status == "converged"`` works for scalars and, element by element,
    for the string arrays returned by vectorized solves.

    * "converged": a root within the tolerance (or f exactly 0, or ``|f| <= ftol``).
    * "iteration limit": maxiter reached; ``root`` is the best point so far.
    * "diverged": an open method escaped, or f was NaN at an iterate (or infinite,
      without a bracket).
    * "left the domain": an open method's next point lay outside ``domain``.
    * "no sign change": f(a) and f(b) are not of opposite signs (NaN included).
    * "pole, no root": the bracket shrank onto a point where f changes sign
      but ``|f|`` grows (at the final bracket it exceeds ``|f|`` at both starting
      ends), or f is infinite at a point inside a bracket with a sign change: a pole
      (or a jump of f), not a root. ``root`` is NaN; the trace shows where.
    * "cycling": an open method came back to a point it had already visited (within
      the tolerance) without converging, e.g. Newton's 0, 1, 0, 1, ... on
      x**3 - 2x + 2; more iterations would not help.
    * "no finite start": in an array problem, this element's bracket end or x0 was
      NaN or infinite (f is not called for it; a scalar problem raises InputError).

    Every text is at most 15 characters, so a status array is ``<U15`` (60 bytes a
    problem), as callers that build status arrays of their own assume.
    """

    CONVERGED = "converged"
    ITERATION_LIMIT = "iteration limit"
    DIVERGED = "diverged"
    LEFT_DOMAIN = "left the domain"
    NO_SIGN_CHANGE = "no sign change"
    # Added later; appended so the integer codes of the older statuses stay the same.
    POLE = "pole, no root"
    CYCLING = "cycling"
    NOT_FINITE = "no finite start"

    def __str__(self) -> str:
        return self.value


# The engine works with small integer codes; 0 means "still active".
STATUS_BY_CODE = (None, *Status)
CODE = {status: code for code, status in enumerate(STATUS_BY_CODE) if status is not None}
_STATUS_TEXT = np.array([""] + [s.value for s in Status])


def status_text(codes: np.ndarray) -> np.ndarray:
    """Readable status strings for an array of integer codes."""
    return _STATUS_TEXT[codes]


@dataclass(frozen=True)
class TraceStep:
    """One iterate of a scalar solve.

    Attributes
    ----------
    iteration : int
        0 for the starting point(s), then 1, 2, ...
    x : float
        The newest point where f was evaluated.
    fx : float
        f(x).
    a, b : float
        The bracket after this iterate (a <= b); NaN for an open method without one.
    """

    iteration: int
    x: float
    fx: float
    a: float
    b: float


def _count(n: int, word: str) -> str:
    """'1 iteration', '2 iterations'."""
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def _float(values, i):
    return float("nan") if values is None else float(values[i])


@dataclass(frozen=True)
class ScalarTrace:
    """The iterates of a scalar solve, in order: iterable, indexable, sized."""

    steps: tuple[TraceStep, ...]

    @classmethod
    def from_records(cls, records) -> "ScalarTrace":
        steps = tuple(
            TraceStep(it, float(x[0]), float(fx[0]), _float(a, 0), _float(b, 0))
            for it, idx, x, fx, a, b in records
            if idx.size
        )
        return cls(steps)

    def __iter__(self):
        return iter(self.steps)

    def __len__(self) -> int:
        return len(self.steps)

    def __getitem__(self, i):
        return self.steps[i]

    def to_frame(self):
        """The steps as a pandas DataFrame, one row an iterate."""
        import pandas as pd  # lazily: pandas is only needed for display

        return pd.DataFrame([s.__dict__ for s in self.steps], columns=["iteration", "x", "fx", "a", "b"])


@dataclass(frozen=True)
class ArrayTrace:
    """The iterates of a vectorized solve, stored compactly.

    Each record keeps only the elements active in that iteration. The properties
    ``x``, ``fx``, ``a`` and ``b`` expand them to arrays of shape
    ``(len(trace), *shape)`` with NaN where an element had already stopped.
    """

    records: tuple
    shape: tuple[int, ...]

    def __len__(self) -> int:
        return len(self.records)

    @property
    def iterations(self) -> np.ndarray:
        """Iteration number of each row."""
        return np.array([r[0] for r in self.records], dtype=int)

    def _expand(self, column: int) -> np.ndarray:
        size = int(np.prod(self.shape, dtype=np.int64))
        full = np.full((len(self.records), size), np.nan)
        for row, record in enumerate(self.records):
            if record[column] is not None:
                full[row, record[1]] = record[column]
        return full.reshape((len(self.records), *self.shape))

    x = property(lambda self: self._expand(2), doc="Newest iterate per row and element.")
    fx = property(lambda self: self._expand(3), doc="f at the newest iterate.")
    a = property(lambda self: self._expand(4), doc="Lower bracket end (NaN without a bracket).")
    b = property(lambda self: self._expand(5), doc="Upper bracket end (NaN without a bracket).")

    def to_frame(self):
        """Long table: one row per (iteration, element); ``element`` is the flat index."""
        import pandas as pd

        nan = np.nan
        frames = [
            pd.DataFrame({
                "iteration": it, "element": idx, "x": x, "fx": fx,
                "a": nan if a is None else a, "b": nan if b is None else b,
            })
            for it, idx, x, fx, a, b in self.records
        ]
        return pd.concat(frames, ignore_index=True)


@dataclass(frozen=True)
class RootResult:
    """Outcome of :func:`find_root`.

    For a scalar problem every field is a Python scalar (``status`` a
    :class:`Status`); for an array problem every field except ``method`` and
    ``trace`` is an array of the problem's shape, ``status`` holding the status
    texts (``str`` array; compare with ``Status`` members or plain strings).

    Attributes
    ----------
    root : float or ndarray
        The estimate of the root [unit of x]. NaN where no estimate can be
        trusted (no sign change, diverged, left the domain); the best point so far
        at the iteration limit.
    converged : bool or ndarray of bool
        True where ``status`` is "converged".
    status : Status or ndarray of str
        Why the solve stopped.
    iterations : int or ndarray of int
        Completed iterations (new iterates after the starting points).
    evaluations : int or ndarray of int
        Calls of f, counted per element (derivative calls not included).
    trace : ScalarTrace, ArrayTrace or None
        The iterates; None when solved with ``trace=False``.
    method : str
        Name of the method used.
    """

    root: Any
    converged: Any
    status: Any
    iterations: Any
    evaluations: Any
    trace: Any
    method: str

    @property
    def is_scalar(self) -> bool:
        return np.ndim(self.root) == 0

    def require_converged(self) -> "RootResult":
        """Return self if every element converged, else raise :class:`ConvergenceError`."""
        if np.all(self.converged):
            return self
        raise ConvergenceError(
            f"{self.method}: not every problem converged ({self._summary()}); "
            "look at .status and .trace, widen the bracket or raise maxiter.",
            result=self,
        )

    def summary(self) -> str:
        """One line for a person: method, status, iterations and evaluations, root.

        >>> from thermo_roots.roots import find_root
        >>> find_root(lambda x: x - 1.0, bracket=(1.0, 2.0)).summary()
        'chandrupatla: converged after 0 iterations (2 evaluations), root 1.0'
        """
        if self.is_scalar:
            return (f"{self.method}: {self.status} after {_count(self.iterations, 'iteration')} "
                    f"({_count(self.evaluations, 'evaluation')}), root {self.root!r}")
        size = int(np.size(self.root))
        most = int(np.max(self.iterations, initial=0))
        return (f"{self.method}, {_count(size, 'problem')}: {self._summary()}; "
                f"at most {_count(most, 'iteration')}, {_count(int(np.sum(self.evaluations)), 'evaluation')} in all")

    def _summary(self) -> str:
        if self.is_scalar:
            return str(self.status)
        names, counts = np.unique(np.asarray(self.status), return_counts=True)
        return ", ".join(f"{c} {n}" for n, c in zip(names, counts))

    def __repr__(self) -> str:
        if self.is_scalar:
            return (f"RootResult(method={self.method!r}, status='{self.status}', root={self.root!r}, "
                    f"iterations={self.iterations}, evaluations={self.evaluations})")
        total = int(np.sum(self.evaluations))
        return (f"RootResult(method={self.method!r}, shape={np.shape(self.root)}, "
                f"{self._summary()}, evaluations={total})")

    def _repr_html_(self) -> str:
        rows = [("method", self.method), ("status", self._summary())]
        if self.is_scalar:
            rows += [("root", repr(self.root)), ("iterations", self.iterations)]
        else:
            rows += [("shape", np.shape(self.root)), ("max iterations", int(np.max(self.iterations, initial=0)))]
        rows.append(("evaluations", int(np.sum(self.evaluations))))
        body = "".join(f"<tr><th style='text-align:left'>{k}</th><td>{v}</td></tr>" for k, v in rows)
        return f"<table>{body}</table>"
