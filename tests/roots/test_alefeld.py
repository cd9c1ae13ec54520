"""The default method against scipy on the Alefeld-Potra-Shi test set.

Test set: Alefeld, Potra & Shi, ACM TOMS 21(3):327-344, 1995 (see alefeld_problems.py).
Bar: the default method converges on all 154 problems and, in total, uses no more
evaluations of f than scipy.optimize.brentq at the same tolerances, both run here.

Totals measured when this was written (xtol=2e-12, rtol=4 eps; brackets of problems
14 and 15 from -1e4): chandrupatla 2861, brentq 2931, toms748 2842 (scipy 1.17.1).
Run ``pytest -s`` to see the numbers of the current run.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import optimize

from tests.roots.alefeld_problems import FUNCTION_COUNT, PROBLEMS
from thermo_roots.roots import DEFAULT_METHOD, find_root

EPS = np.finfo(float).eps
XTOL, RTOL = 2e-12, 4 * EPS


def _scipy_calls(solver, p):
    f = lambda x, *args: float(p.f(x, *args))  # noqa: E731
    root, info = solver(f, p.a, p.b, args=p.args, xtol=XTOL, rtol=RTOL, full_output=True)
    return root, info.function_calls, info.converged


@pytest.fixture(scope="module")
def runs():
    """Ours, brentq and toms748 on every problem, in this run."""
    table = []
    for p in PROBLEMS:
        ours = find_root(p.f, (p.a, p.b), args=p.args, xtol=XTOL, rtol=RTOL)
        brent_root, brent_calls, brent_ok = _scipy_calls(optimize.brentq, p)
        _, toms_calls, _ = _scipy_calls(optimize.toms748, p)
        table.append((p, ours, brent_root, brent_calls, brent_ok, toms_calls))
    return table


def test_the_set_has_15_functions_and_154_problems():
    # Counts as stated in Alefeld, Potra & Shi (1995), section 5.
    assert FUNCTION_COUNT == 15
    assert len(PROBLEMS) == 154


def test_functions_match_scipys_copy_of_the_set():
    """Same values as scipy's private copy of the set, problem by problem in the same order."""
    tstutils = pytest.importorskip("scipy.optimize._tstutils")
    theirs = tstutils.get_tests("aps")
    assert len(theirs) == len(PROBLEMS)
    for p, d in zip(PROBLEMS, theirs):
        assert p.args == tuple(d["args"]), p.name
        lo, hi = d["bracket"]  # their copy starts problems 14 and 15 at -1e3 (ours at -1e4)
        for x in np.linspace(lo, hi, 9)[1:-1]:
            assert float(p.f(x, *p.args)) == pytest.approx(d["f"](x, *d["args"]), rel=1e-12, abs=0), p.name


def test_every_problem_brackets_a_sign_change():
    for p in PROBLEMS:
        fa, fb = float(p.f(p.a, *p.args)), float(p.f(p.b, *p.args))
        assert fa * fb < 0, p.name


def test_default_uses_no_more_evaluations_than_brentq(runs):
    ours = sum(r[1].evaluations for r in runs)
    brent = sum(r[3] for r in runs)
    toms = sum(r[5] for r in runs)
    print(f"\nAlefeld-Potra-Shi, 154 problems, total evaluations: "
          f"{DEFAULT_METHOD} {ours}, brentq {brent}, toms748 {toms}")
    assert all(r[4] for r in runs), "brentq itself must converge for the comparison to mean anything"
    assert ours <= brent


def test_default_converges_on_every_problem(runs):
    for p, ours, *_ in runs:
        assert ours.converged, (p.name, ours)
        last = ours.trace[-1]
        width_ok = last.b - last.a <= XTOL + RTOL * min(abs(last.a), abs(last.b))
        assert width_ok or p.f(ours.root, *p.args) == 0, p.name


def test_roots_agree_with_brentq(runs):
    for p, ours, brent_root, *_ in runs:
        tol = 2 * (XTOL + RTOL * abs(brent_root))
        if abs(ours.root - brent_root) <= tol:
            continue
        # Problem 13, x exp(-1/x**2), underflows to exactly 0 near x = 0: any such point is a root
        # in floating point, and the two solvers may stop at different ones.
        assert p.f(ours.root, *p.args) == 0 and p.f(brent_root, *p.args) == 0, p.name


def test_vectorized_families_match_scalar_solves(runs):
    """Each function's parameter sets solved as one array problem give the same answers.

    Roots agree within the solver's tolerance and the evaluation counts within a small
    slack, not exactly: numpy's vectorized transcendental functions (and ``**``) may
    differ from the scalar ones in the last bit on some CPUs (AVX-512: problem 12.04,
    ``x**(1/n)``, takes 11 evaluations vectorized and 12 scalar), which can move a
    bracket end by one float and the stop by one iteration. A broken array path
    (arguments cut out of step with x, a wrong count per problem) misses these bounds
    by far; tests/roots/test_vectorized.py checks exact agreement where only
    correctly rounded arithmetic is involved.
    """
    by_function = {}
    for p, ours, *_ in runs:
        by_function.setdefault(p.f, []).append((p, ours))
    total_together = total_singles = 0
    for f, group in by_function.items():
        a = np.array([p.a for p, _ in group])
        b = np.array([p.b for p, _ in group])
        arity = len(group[0][0].args)
        args = tuple(np.array([p.args[k] for p, _ in group], dtype=float) for k in range(arity))
        together = find_root(f, (a, b), args=args, xtol=XTOL, rtol=RTOL)
        for k, (p, single) in enumerate(group):
            assert together.status[k] == str(single.status), p.name
            tol = 2 * (XTOL + RTOL * abs(single.root))
            close = abs(together.root[k] - single.root) <= tol
            assert close or p.f(together.root[k], *p.args) == 0, (p.name, together.root[k], single.root)
            assert abs(int(together.evaluations[k]) - single.evaluations) <= SLACK, p.name
            assert abs(int(together.iterations[k]) - single.iterations) <= SLACK, p.name
        total_together += int(together.evaluations.sum())
        total_singles += sum(r.evaluations for _, r in group)
    assert abs(total_together - total_singles) <= 0.01 * total_singles


SLACK = 3  # evaluations or iterations one problem may differ by between the scalar and array paths
