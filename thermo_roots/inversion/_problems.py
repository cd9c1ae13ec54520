"""Per-element bookkeeping of array solves: which elements cannot be solved, and why.

An engineer's sweep of 10^5 states must not be lost to one bad element. Each element that
cannot be solved (bad input, outside the model's range, no convergence) gets a reason
sentence and NaN values; the rest are solved. With ``errors="raise"``, and always for a
scalar solve, the first such element raises instead, naming its index and value.
"""

from __future__ import annotations

import numpy as np

from ..errors import ConvergenceError, DomainError, InputError

#: The values of the ``errors=`` option of solve and saturation.
ERRORS = ("nan", "raise")


def check_errors_option(errors) -> None:
    if not (isinstance(errors, str) and errors in ERRORS):
        raise InputError(f"errors={errors!r} is not one of {', '.join(map(repr, ERRORS))}: 'nan' (the default) "
                         "gives NaN and a reason at elements that cannot be solved and solves the rest; "
                         "'raise' raises at the first of them.")


def si_array(to_si, value, quantity, **options):
    """:func:`to_si` for one known, letting NaN, inf and masked elements of an array through.

    Those elements come back as NaN and are then reported one by one instead of failing the
    whole array. A scalar (or text) goes through ``to_si`` strictly, which refuses a
    non-finite value with its own message.
    """
    array_like = not isinstance(value, str) and np.ndim(value) > 0
    return to_si(value, quantity, nonfinite="nan" if array_like else "raise", **options)


class Problems:
    """Reasons, element by element, why a flat array of states cannot be solved.

    strict : raise at the first problem flagged (a scalar solve, or ``errors="raise"``).
    shape : the caller's broadcast shape, for the index in messages.
    """

    _KINDS = (InputError, DomainError, ConvergenceError)

    def __init__(self, size: int, shape: tuple, strict: bool):
        self._bad = np.zeros(size, dtype=bool)
        self._reason = None   # an object array, made when the first problem is flagged
        self._kind = None
        self.shape, self.strict, self.size = shape, strict, size

    @property
    def ok(self) -> np.ndarray:
        return ~self._bad

    @property
    def any(self) -> bool:
        return self._reason is not None

    @property
    def reason(self) -> np.ndarray:
        """The reason of every element, "" where there is none (a read-only view if none at all)."""
        if self._reason is None:
            return np.broadcast_to(np.array("", dtype=object), (self.size,))
        return self._reason

    def _store(self, idx, reasons, kind):
        if self._reason is None:
            self._reason = np.full(self.size, "", dtype=object)
            self._kind = np.zeros(self.size, dtype=np.int8)
        self._reason[idx] = reasons
        self._kind[idx] = self._KINDS.index(kind)
        self._bad[idx] = True

    def flag(self, mask, message, kind=DomainError, result=None):
        """Give every element of ``mask`` not flagged yet the reason ``message(i)``.

        message : a function of the flat index returning the sentence (called only for
        the flagged elements, usually few).
        """
        idx = np.flatnonzero(np.asarray(mask) & ~self._bad)
        if idx.size == 0:
            return
        if self.strict:
            self._raise(idx[0], message(idx[0]), kind, result)
        self._store(idx, [message(i) for i in idx], kind)

    def flag_at(self, idx, reasons, kind=ConvergenceError, result=None):
        """Flag the flat indices ``idx`` with the given reason sentences."""
        idx = np.asarray(idx, dtype=int)
        if idx.size == 0:
            return
        if self.strict:
            self._raise(idx[0], reasons[0], kind, result)
        self._store(idx, list(reasons), kind)

    def index(self, i) -> tuple:
        """The flat index i in the caller's shape."""
        return tuple(int(k) for k in np.unravel_index(i, self.shape))

    def _raise(self, i, message, kind, result):
        if self.shape != ():
            message = (f"At index {self.index(i)}: {message} (errors='nan' gives NaN there, with this "
                       "reason in State.reason, and solves the rest.)")
        if kind is ConvergenceError:
            raise ConvergenceError(message, result)
        raise kind(message)

    def summary(self) -> tuple[str, ...]:
        """One sentence per distinct reason (at most five) with its count, for warnings."""
        if self._reason is None:
            return ()
        bad = np.flatnonzero(self._bad)
        texts, first, counts = np.unique(self.reason[bad].astype(str), return_index=True, return_counts=True)
        order = np.argsort(first)
        out = [f"{counts[k]} of {self.size} states not solved (first at index {self.index(bad[first[k]])}): "
               f"{texts[k]}" for k in order[:5]]
        if order.size > 5:
            out.append(f"... and {order.size - 5} other reasons; see State.reason.")
        return tuple(out)
