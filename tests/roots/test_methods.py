"""Each method on textbook functions, the statuses, stopping rules and input checks."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import optimize

from thermo_roots.errors import InputError
from thermo_roots.roots import (
    CONVERGED, DEFAULT_METHOD, DIVERGED, GROWTH_LIMIT, ITERATION_LIMIT, LEFT_DOMAIN, METHODS,
    NO_SIGN_CHANGE, Status, find_root,
)

BRACKETED = [name for name, m in METHODS.items() if m.bracketed]
ALL = list(METHODS)

# Newton's own example x**3 - 2x - 5 = 0; root 2.0945514815423265 (from memory; common knowledge).
NEWTON_ROOT = 2.0945514815423265


def cubic(x):
    return x**3 - 2 * x - 5


def cubic_prime(x):
    return 3 * x**2 - 2


class Counted:
    """Wraps f and counts every element it is called with."""

    def __init__(self, f):
        self.f, self.count, self.seen = f, 0, []

    def __call__(self, x, *args):
        self.count += np.size(x)
        self.seen.append(np.array(x, copy=True))
        return self.f(x, *args)


def solve(method, f=cubic, **kw):
    kw.setdefault("bracket", (2.0, 3.0))
    if method == "newton":
        kw.setdefault("fprime", cubic_prime)
    return find_root(f, method=method, **kw)


@pytest.mark.parametrize("method", ALL)
def test_newtons_cubic_by_every_method(method):
    r = solve(method)
    assert r.status is CONVERGED and r.converged
    assert r.method == method
    assert abs(r.root - NEWTON_ROOT) <= 2e-12 + 4 * np.finfo(float).eps * NEWTON_ROOT


@pytest.mark.parametrize("method", ["secant", "newton"])
def test_open_methods_from_x0_without_bracket(method):
    r = solve(method, bracket=None, x0=2.0)
    assert r.converged
    assert r.root == pytest.approx(NEWTON_ROOT, abs=1e-12)


@pytest.mark.parametrize("method", ALL)
def test_agrees_with_scipy_brentq_on_cos_x_minus_x(method):
    # cos(x) = x, the Dottie number; reference value computed by scipy.optimize.brentq.
    ref = optimize.brentq(lambda x: math.cos(x) - x, 0.0, 1.0, xtol=1e-15)
    r = find_root(lambda x: np.cos(x) - x, (0.0, 1.0), method=method, fprime=lambda x: -np.sin(x) - 1)
    assert r.root == pytest.approx(ref, abs=1e-11)


@pytest.mark.parametrize("method", BRACKETED)
def test_no_sign_change_is_a_status_not_an_error(method):
    r = find_root(lambda x: x**2 + 1, (-1.0, 2.0), method=method)
    assert r.status is NO_SIGN_CHANGE and not r.converged
    assert math.isnan(r.root)
    assert r.evaluations == 2 and r.iterations == 0


@pytest.mark.parametrize("method", ALL)
@pytest.mark.parametrize("end", [0, 1])
def test_exact_zero_at_an_end_point_is_converged(method, end):
    bracket = (1.0, 3.0)  # x**2 - 1 is exactly 0 at x = 1; swap the order to try both ends
    bracket = bracket if end == 0 else bracket[::-1]
    r = find_root(lambda x: x**2 - 1, bracket, method=method, fprime=lambda x: 2 * x)
    assert r.status is CONVERGED and r.root == 1.0 and r.iterations == 0


@pytest.mark.parametrize("method", ALL)
def test_iteration_limit(method):
    r = solve(method, maxiter=2, xtol=1e-15)
    assert r.status is ITERATION_LIMIT and not r.converged
    assert r.iterations == 2
    assert 2.0 <= r.root <= 3.0  # the best point so far, inside the starting bracket


def test_newton_on_arctan_diverges_without_a_bracket():
    # Newton on arctan(x) from x0 = 2 overshoots further every step (common practice).
    r = find_root(np.arctan, x0=2.0, method="newton", fprime=lambda x: 1 / (1 + x * x))
    assert r.status is DIVERGED and not r.converged and math.isnan(r.root)
    steps = np.abs(np.diff([s.x for s in r.trace]))
    assert np.all(np.diff(steps) > 0) and len(steps) == GROWTH_LIMIT


@pytest.mark.parametrize("method", ["secant", "newton"])
def test_open_methods_fall_back_to_the_bracket(method):
    # Same start as above, but the bracket (-1, 3) holds the root 0: bisection steps take over.
    r = find_root(np.arctan, (-1.0, 3.0), x0=2.0, method=method, fprime=lambda x: 1 / (1 + x * x))
    assert r.converged and abs(r.root) <= 2e-12
    for step in r.trace:
        assert step.a <= step.b and np.arctan(step.a) <= 0 <= np.arctan(step.b)


def test_newton_leaving_the_domain_stops_before_calling_f_there():
    # Newton on ln(x) from x0 = 3 jumps to x = 3 - 3 ln 3 < 0 (common practice).
    f = Counted(np.log)
    r = find_root(f, x0=3.0, method="newton", fprime=lambda x: 1 / x, domain=(0.0, np.inf))
    assert r.status is LEFT_DOMAIN and math.isnan(r.root)
    assert all(np.all(x > 0) for x in f.seen)
    assert r.evaluations == f.count == 1


def test_newton_with_bracket_bisects_instead_of_leaving_the_domain():
    r = find_root(np.log, (0.5, 4.0), x0=3.0, method="newton", fprime=lambda x: 1 / x, domain=(1e-300, 10))
    assert r.converged and r.root == pytest.approx(1.0, abs=1e-12)


def test_secant_with_flat_start_diverges():
    # Equal f at both starting points: the secant line is horizontal, no next point.
    r = find_root(lambda x: np.cos(x), (-1.0, 1.0), method="secant")
    assert r.status is DIVERGED


@pytest.mark.parametrize("method", ALL)
def test_ftol_stops_early(method):
    loose = solve(method, ftol=1e-3)
    tight = solve(method)
    assert loose.converged and abs(cubic(loose.root)) <= 1e-3
    assert loose.iterations < tight.iterations


@pytest.mark.parametrize("method", ALL)
@pytest.mark.parametrize("shape", [(), (7,)])
def test_evaluations_count_every_call(method, shape):
    c = np.linspace(1.0, 30.0, 7) if shape else 5.0
    f = Counted(lambda x, c: x**3 - 2 * x - c)
    r = find_root(f, (0.0, 4.0), method=method, args=(c,), fprime=lambda x, c: 3 * x**2 - 2)
    assert np.sum(r.evaluations) == f.count
    assert np.all(r.converged)


def test_default_method_is_the_hybrid():
    assert DEFAULT_METHOD == "chandrupatla" and find_root(cubic, (2, 3)).method == DEFAULT_METHOD


def test_status_texts():
    # Readable values promised by the API.
    assert [s.value for s in Status] == [
        "converged", "iteration limit", "diverged", "left the domain", "no sign change",
        "pole, no root", "cycling", "no finite start"]
    # status arrays stay <U15 (inversion/saturation.py builds one of that width)
    assert max(len(s.value) for s in Status) <= 15
    assert Status.CONVERGED == "converged"


def test_scalar_in_gives_scalars_out():
    r = find_root(cubic, (2, 3))
    assert isinstance(r.root, float) and isinstance(r.iterations, int)
    assert isinstance(r.evaluations, int) and isinstance(r.converged, bool)
    assert isinstance(r.status, Status)
    assert "converged" in repr(r) and "<table>" in r._repr_html_()


def test_require_converged_raises_with_the_result():
    from thermo_roots.errors import ConvergenceError

    r = find_root(lambda x: x**2 + 1, (0, 1))
    with pytest.raises(ConvergenceError) as info:
        r.require_converged()
    assert info.value.result is r
    assert find_root(cubic, (2, 3)).require_converged().converged


@pytest.mark.parametrize("bracket", [(np.nan, 1.0), (0.0, np.inf), (-np.inf, 3.0)])
def test_non_finite_bracket_of_a_scalar_problem_is_an_input_error(bracket):
    with pytest.raises(InputError, match="bracket must be finite"):
        find_root(cubic, bracket)


def test_non_finite_x0_of_a_scalar_problem_is_an_input_error():
    with pytest.raises(InputError, match="x0 must be finite"):
        find_root(cubic, x0=np.nan, method="secant")


def test_unknown_method_lists_the_allowed_names():
    with pytest.raises(InputError) as info:
        find_root(cubic, (2, 3), method="regula")
    assert all(repr(name) in str(info.value) for name in METHODS)
    assert isinstance(info.value, ValueError)


@pytest.mark.parametrize("kw, words", [
    (dict(method="newton"), "fprime"),
    (dict(method="secant", bracket=None), "x0"),
    (dict(bracket=None), "bracket"),
    (dict(xtol=-1.0), "xtol"),
    (dict(xtol=0.0, rtol=0.0), "xtol and rtol"),
    (dict(maxiter=0), "maxiter"),
    (dict(bracket=(1.0, 2.0, 3.0)), "pair"),
    (dict(method="newton", fprime=cubic_prime, x0=5.0, domain=(0.0, 4.0)), "domain"),
    (dict(bracket=(np.zeros(3), np.ones(4))), "broadcast"),
])
def test_bad_arguments(kw, words):
    kw.setdefault("bracket", (2.0, 3.0))
    with pytest.raises(InputError, match=words):
        find_root(cubic, **kw)
