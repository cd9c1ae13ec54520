"""The Alefeld-Potra-Shi test set: 15 functions, 154 problems.

Source: Alefeld, G. E., Potra, F. A., Shi, Y., "Algorithm 748: Enclosing zeros of
continuous functions", ACM Transactions on Mathematical Software 21(3):327-344, 1995,
section 5 (test problems). Written here from memory of the paper, not copied from a file.
The functions are vectorized (numpy) so a whole parameter family can be solved at once.

Checked against scipy's own copy of the set (``scipy.optimize._tstutils``, see
test_alefeld.py): that check corrected one slip of memory, the parameter list of
problem 12 (n = 2..6 and the odd n from 7 to 33, not every n from 2 to 33).

Uncertain from memory: the left end of the brackets of problems 14 and 15. The paper
(as remembered) uses -1e4; scipy's copy of the set (``scipy.optimize._tstutils``) uses
-1e3. Every comparison in the tests runs all solvers on the same brackets, so either
choice is fair; -1e4 is kept.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np

PI = np.pi


def f01(x):
    return np.sin(x) - x / 2


def f02(x):
    i = np.arange(1, 21)
    x = np.asarray(x, dtype=float)
    return -2.0 * np.sum((2 * i - 5) ** 2 / (x[..., None] - i**2) ** 3, axis=-1)


def f03(x, a, b):
    return a * x * np.exp(b * x)


def f04(x, n, a):
    return x**n - a


def f05(x):
    return np.sin(x) - 0.5


def f06(x, n):
    return 2 * x * np.exp(-n) - 2 * np.exp(-n * x) + 1


def f07(x, n):
    return (1 + (1 - n) ** 2) * x - (1 - n * x) ** 2


def f08(x, n):
    return x**2 - (1 - x) ** n


def f09(x, n):
    return (1 + (1 - n) ** 4) * x - (1 - n * x) ** 4


def f10(x, n):
    return np.exp(-n * x) * (x - 1) + x**n


def f11(x, n):
    return (n * x - 1) / ((n - 1) * x)


def f12(x, n):
    return x ** (1.0 / n) - n ** (1.0 / n)


def f13(x):
    x = np.asarray(x, dtype=float)
    safe = np.where(x == 0, 1.0, x)
    return np.where(x == 0, 0.0, x * np.exp(-1.0 / safe**2))


def f14(x, n):
    return np.where(x >= 0, n / 20 * (x / 1.5 + np.sin(x) - 1), -n / 20)


def f15(x, n):
    x = np.asarray(x, dtype=float)
    edge = 2e-3 / (1 + n)
    ramp = np.exp(np.minimum(x, edge) * (n + 1) / 2 * 1000) - 1.859  # min(): no overflow
    return np.where(x > edge, np.e - 1.859, np.where(x >= 0, ramp, -0.859))


@dataclass(frozen=True)
class Problem:
    """One test problem: f(x, *args) on the bracket (a, b)."""

    name: str
    f: Callable
    a: float
    b: float
    args: tuple = ()


def _on(bracket, params):
    """(args, bracket) pairs: every parameter set on the same bracket."""
    return [(tuple(p), bracket) for p in params]


def _problems():
    # Problem 2: the bracket lies between the poles at n**2 and (n+1)**2; f02 has no parameter.
    poles = [((), (n**2 + 1e-9, (n + 1) ** 2 - 1e-9)) for n in range(1, 11)]
    families = [
        (1, f01, _on((PI / 2, PI), [()])),
        (2, f02, poles),
        (3, f03, _on((-9.0, 31.0), [(-40, -1), (-100, -2), (-200, -3)])),
        (4, f04, _on((0.0, 5.0), [(n, a) for a in (0.2, 1.0) for n in (4, 6, 8, 10, 12)])
         + _on((-0.95, 4.05), [(n, 1.0) for n in (8, 10, 12, 14)])),
        (5, f05, _on((0.0, 1.5), [()])),
        (6, f06, _on((0.0, 1.0), [(n,) for n in (1, 2, 3, 4, 5, 20, 40, 60, 80, 100)])),
        (7, f07, _on((0.0, 1.0), [(n,) for n in (5, 10, 20)])),
        (8, f08, _on((0.0, 1.0), [(n,) for n in (2, 5, 10, 15, 20)])),
        (9, f09, _on((0.0, 1.0), [(n,) for n in (1, 2, 4, 5, 8, 15, 20)])),
        (10, f10, _on((0.0, 1.0), [(n,) for n in (1, 5, 10, 15, 20)])),
        (11, f11, _on((0.01, 1.0), [(n,) for n in (2, 5, 15, 20)])),
        (12, f12, _on((1.0, 100.0), [(n,) for n in [2, 3, 4, 5, 6] + list(range(7, 34, 2))])),
        (13, f13, _on((-1.0, 4.0), [()])),
        (14, f14, _on((-1e4, PI / 2), [(n,) for n in range(1, 41)])),
        (15, f15, _on((-1e4, 1e-4), [(n,) for n in list(range(20, 41)) + list(range(100, 1001, 100))])),
    ]
    return tuple(
        Problem(f"{number:02d}.{k:02d}", f, a, b, args)
        for number, f, cases in families
        for k, (args, (a, b)) in enumerate(cases)
    )


PROBLEMS = _problems()
FUNCTION_COUNT = len({p.f for p in PROBLEMS})
