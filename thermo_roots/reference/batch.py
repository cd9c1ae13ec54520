"""The batch runner: many reference states in chunks, with progress, interruption and workers.

A chunk is the unit of progress, interruption and parallel dispatch. Only a fluid name and
arrays go to a worker, and each worker thread or process has its own CoolProp state
objects (:mod:`.driver`), so any ``concurrent.futures.Executor`` -- threads, processes, a
cluster's -- gives the serial result. Also the checks of the run options, shared by the
sweeps and the accuracy map.
"""

from __future__ import annotations

import math
import sys

import numpy as np

from ..errors import InputError
from .driver import REFERENCE_PAIRS, _unavailable_values

#: States per chunk of reference work (a chunk is the unit of progress, interruption and
#: parallel dispatch).
DEFAULT_CHUNK = 1000
#: Above this many states ``progress="auto"`` shows a progress bar.
AUTO_PROGRESS_ABOVE = 5000
#: The reason given to states a run did not reach because it was interrupted.
INTERRUPTED = "not checked: the run was interrupted before this state"


def _resolve_progress(progress, n):
    if isinstance(progress, str) and progress == "auto":
        return n > AUTO_PROGRESS_ABOVE
    if isinstance(progress, (bool, np.bool_)):
        return bool(progress)
    if isinstance(progress, str):
        raise InputError(f"progress={progress!r} is not an option: give True, False or 'auto' (a bar above "
                         f"{AUTO_PROGRESS_ABOVE} states).")
    raise TypeError(f"progress must be True, False or 'auto'; got {_given(progress)}.")


def _given(value) -> str:
    """A value as a message shows it: its type and a short repr."""
    text = repr(value)
    if len(text) > 60:
        text = text[:57] + "..."
    return f"{type(value).__name__} {text}"


def whole_number(value, name: str, *, minimum: int = 1, example: str = "", allow_none: bool = False):
    """``value`` as an int, or a clear error naming the argument.

    Accepts Python and numpy integers and floats with a whole value (2.0); refuses True and
    False, NaN, fractions (2.5), text and anything below ``minimum``. TypeError for a wrong
    type, InputError for a number that is not allowed.
    """
    hint = f" Try {example}." if example else ""
    if value is None and allow_none:
        return None
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise TypeError(f"{name} must be a whole number of at least {minimum}; got {_given(value)}.{hint}")
    if not (math.isfinite(value) and float(value) == math.floor(value)) or value < minimum:
        raise InputError(f"{name}={value!r} is not allowed: it must be a whole number of at least {minimum}."
                         f"{hint}")
    return int(value)


def _check_run_options(*, progress=False, executor=None, chunk_size=None, on_interrupt="raise",
                       with_saturation=True):
    """Refuse bad run options up front, each error naming the argument and what is allowed."""
    _resolve_progress(progress, 0)
    if executor is not None and not callable(getattr(executor, "submit", None)):
        raise TypeError(f"executor must be a concurrent.futures.Executor (anything with submit(), such as "
                        f"ThreadPoolExecutor(4), ProcessPoolExecutor() or a Dask client's get_executor()) or "
                        f"None; got {_given(executor)}.")
    whole_number(chunk_size, "chunk_size", minimum=1, example=f"chunk_size={DEFAULT_CHUNK}", allow_none=True)
    if not (isinstance(on_interrupt, str) and on_interrupt in ("raise", "partial")):
        raise InputError(f"on_interrupt={on_interrupt!r} is not an option: give 'raise' (stop with the "
                         "KeyboardInterrupt) or 'partial' (keep the states checked so far).")
    if not isinstance(with_saturation, (bool, np.bool_)):
        raise TypeError(f"with_saturation must be True or False; got {_given(with_saturation)}.")


def _chunk_function():
    """The driver's chunk evaluator, looked up on the package at each run.

    ``thermo_roots.reference._reference_chunk`` is where the tests of interruption (and
    anyone wrapping the reference) replace it; reading it there keeps that one place
    working now that the runner lives in a module of its own.
    """
    return sys.modules[__package__]._reference_chunk


def evaluate_reference(library_name: str, pair: str, a, b, *, with_saturation: bool = True,
                       progress=False, executor=None, chunk_size: int | None = None,
                       on_interrupt: str = "raise"):
    """Reference values at many knowns, in chunks, with progress, interruption and workers.

    Parameters
    ----------
    library_name : str
        CoolProp's fluid name.
    pair : str, one of :data:`REFERENCE_PAIRS` ("T,P", "T,v", "P,v", "T,quality", "P,quality", "P,h", "P,s", "v,u")
        Which knowns ``a`` and ``b`` are (SI: T [K], P [Pa], v [m^3/mol], quality [-],
        h and u [J/mol], s [J/(mol K)]).
    a, b : array_like
        The knowns, broadcast together and flattened.
    with_saturation : bool
        Also evaluate saturation at each state's T and P (about twice the work).
    progress : bool or "auto"
        A tqdm progress bar; "auto" shows one above :data:`AUTO_PROGRESS_ABOVE` states.
    executor : concurrent.futures.Executor, optional
        Spread the chunks over its workers; only the fluid name and arrays are sent.
    chunk_size : int, optional
        States per chunk (default :data:`DEFAULT_CHUNK`).
    on_interrupt : {"raise", "partial"}
        On KeyboardInterrupt, re-raise, or return what the finished chunks computed
        (states not reached get the reason :data:`INTERRUPTED`).

    Returns
    -------
    (values, completed) : (dict of numpy.ndarray, int)
        The arrays of :func:`_reference_chunk` in input order, and how many leading states
        were evaluated (all of them unless interrupted).
    """
    if not (isinstance(pair, str) and pair in REFERENCE_PAIRS):
        raise InputError(f"pair={pair!r} is not one of {', '.join(REFERENCE_PAIRS)}.")
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt,
                       with_saturation=with_saturation)
    a, b = np.broadcast_arrays(np.asarray(a, dtype=float).ravel(), np.asarray(b, dtype=float).ravel())
    n = a.size
    size = whole_number(chunk_size, "chunk_size", allow_none=True) or DEFAULT_CHUNK
    starts = list(range(0, n, size)) or [0]
    show = _resolve_progress(progress, n)
    pieces, completed = [], 0
    from tqdm.auto import tqdm

    chunk = _chunk_function()
    bar = tqdm(total=n, disable=not show, desc=f"reference {library_name}", unit="state", leave=False)
    futures = []
    try:
        if executor is None:
            for s in starts:
                pieces.append(chunk(library_name, pair, a[s:s + size], b[s:s + size], with_saturation))
                completed = min(n, s + size)
                bar.update(completed - bar.n)
        else:
            futures = [executor.submit(chunk, library_name, pair, a[s:s + size], b[s:s + size],
                                       with_saturation) for s in starts]
            for s, fut in zip(starts, futures):
                pieces.append(fut.result())
                completed = min(n, s + size)
                bar.update(completed - bar.n)
    except KeyboardInterrupt:
        for fut in futures:
            fut.cancel()
        if on_interrupt == "raise":
            raise
    finally:
        bar.close()
    rest = _unavailable_values(n - completed, INTERRUPTED)
    values = {k: np.concatenate([p[k] for p in pieces] + [rest[k]]) for k in rest}
    return values, completed
