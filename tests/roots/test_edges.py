"""Edges of find_root: poles, cycles, overflow, what f returns, bad arguments, NaN elements, threads."""

from __future__ import annotations

import warnings
from concurrent.futures import ThreadPoolExecutor

import numpy as np
import pytest

from thermo_roots.errors import InputError
from thermo_roots.roots import METHODS, Status, find_root

ALL = list(METHODS)
BRACKETED = [name for name, m in METHODS.items() if m.bracketed]
EPS = np.finfo(float).eps
BIG = np.finfo(float).max


def tol(x, xtol=2e-12, rtol=4 * EPS):
    return xtol + rtol * abs(x)


def inverse(x):
    return 1.0 / (x - 0.3)  # a pole at 0.3, no root (common practice)


def inverse_prime(x):
    return -1.0 / (x - 0.3) ** 2


# --- a sign change across a pole is not a root ------------------------------------------

@pytest.mark.parametrize("method", ALL)
def test_a_pole_inside_the_bracket_is_not_reported_as_a_root(method):
    with np.errstate(divide="ignore"):  # an iterate may land on 0.3 exactly
        r = find_root(inverse, (0.0, 1.0), method=method, fprime=inverse_prime)
    assert r.status is Status.POLE and not r.converged
    assert np.isnan(r.root)


def test_tangent_over_its_pole_and_over_its_root():
    # tan has a pole at pi/2 and a root at pi (common practice)
    pole = find_root(np.tan, (1.0, 2.0))
    root = find_root(np.tan, (2.0, 4.0))
    assert pole.status is Status.POLE
    assert root.converged and abs(root.root - np.pi) <= tol(np.pi)


def test_f_infinite_at_an_iterate_inside_the_bracket_is_a_pole():
    # bisection's first point is 0.5, exactly the pole of 1/(x - 0.5): f = inf there
    with np.errstate(divide="ignore"):
        r = find_root(lambda x: 1.0 / (x - 0.5), (0.0, 1.0), method="bisect")
    assert r.status is Status.POLE and r.iterations == 1


@pytest.mark.parametrize("method", BRACKETED)
def test_steep_but_continuous_root_is_still_a_root(method):
    # |f| at the final bracket falls like the width at a root, however steep (common practice)
    r = find_root(lambda x: np.tanh(1e6 * (x - 0.3)), (0.0, 1.0), method=method, maxiter=300)
    assert r.converged and abs(r.root - 0.3) <= tol(0.3)


@pytest.mark.parametrize("method", BRACKETED)
def test_poles_and_roots_in_one_array(method):
    c = np.array([0.3, 0.6, 0.25, 0.8])
    is_pole = np.array([True, False, True, False])

    def f(x, c, is_pole):
        with np.errstate(divide="ignore"):
            return np.where(is_pole, 1.0 / (x - c), x - c)

    r = find_root(f, (0.0, 1.0), args=(c, is_pole), method=method)
    assert list(r.status) == ["pole, no root", "converged"] * 2
    assert np.isnan(r.root[is_pole]).all()
    np.testing.assert_allclose(r.root[~is_pole], c[~is_pole], rtol=0, atol=1e-11)


# --- what f returns ------------------------------------------------------------------------

@pytest.mark.parametrize("shape", [(), (3,)])
@pytest.mark.parametrize("method", ["chandrupatla", "newton"])
def test_complex_values_from_f_are_a_type_error_not_a_warning(shape, method):
    a = np.zeros(shape)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # numpy's ComplexWarning would turn into an error here
        with pytest.raises(TypeError, match="complex"):
            find_root(lambda x: (x - 0.5) + 0j, (a, a + 1.0), method=method, fprime=lambda x: 1.0)


@pytest.mark.parametrize("shape", [(), (3,)])
@pytest.mark.parametrize("method", ["chandrupatla", "secant"])
def test_f_returning_none_says_so(shape, method):
    def forgot_return(x):
        x - 0.5

    a = np.zeros(shape)
    with pytest.raises(TypeError, match="forgot_return .*returned None"):
        find_root(forgot_return, (a, a + 1.0), method=method)


@pytest.mark.parametrize("value", ["0.5", True, b"1"])
def test_f_returning_text_or_a_bool_is_a_type_error(value):
    with pytest.raises(TypeError, match="real numbers"):
        find_root(lambda x: value, (0.0, 1.0))


def test_one_value_for_a_whole_array_is_refused():
    with pytest.raises(InputError, match="one value per x"):
        find_root(lambda x: 1.0, (np.zeros(4), np.ones(4)))
    with pytest.raises(InputError, match="one value per x"):
        find_root(lambda x: float(np.sum(x) - 2.0), (np.zeros(4), np.ones(4)))


def test_a_constant_derivative_may_be_one_number():
    r = find_root(lambda x, c: x - c, x0=np.zeros(3), args=(np.array([1.0, 2.0, 3.0]),),
                  method="newton", fprime=lambda x, c: 1.0)
    assert r.converged.all()
    np.testing.assert_allclose(r.root, [1.0, 2.0, 3.0], rtol=1e-15)


def test_an_exception_in_f_propagates():
    class Broken(Exception):
        pass

    def f(x):
        raise Broken("inside f")

    for bracket in [(0.0, 1.0), (np.zeros(5), np.ones(5))]:
        with pytest.raises(Broken, match="inside f"):
            find_root(f, bracket)


# --- arguments ------------------------------------------------------------------------------

@pytest.mark.parametrize("maxiter", [None, np.inf, np.nan, -1, 0, 2.5, "10", True, 10**400])
def test_bad_maxiter_is_named(maxiter):
    with pytest.raises(InputError, match="maxiter must be a whole number >= 1.*got"):
        find_root(lambda x: x - 0.25, (0.0, 1.0), maxiter=maxiter)


@pytest.mark.parametrize("maxiter", [60, np.int64(60), 60.0, 1e6])
def test_whole_maxiter_of_any_number_type(maxiter):
    assert find_root(lambda x: x - 0.25, (0.0, 1.0), method="bisect", maxiter=maxiter).converged


@pytest.mark.parametrize("label", ["xtol", "rtol", "ftol"])
@pytest.mark.parametrize("value", [-1e-9, np.nan, np.inf, "1e-9", None, True])
def test_bad_tolerances_are_named(label, value):
    with pytest.raises(InputError, match=f"{label} must be a finite number >= 0"):
        find_root(lambda x: x - 0.25, (0.0, 1.0), **{label: value})


@pytest.mark.parametrize("name, suggestion", [("Newtn", "newton"), ("BISECT", "bisect"),
                                              ("chandrupatla ", "chandrupatla"), ("ilinois", "illinois")])
def test_unknown_method_suggests_the_close_one(name, suggestion):
    with pytest.raises(InputError, match=f"Did you mean '{suggestion}'"):
        find_root(lambda x: x - 0.25, (0.0, 1.0), method=name)


def test_method_must_be_a_name():
    with pytest.raises(TypeError, match="method must be a string"):
        find_root(lambda x: x - 0.25, (0.0, 1.0), method=METHODS["bisect"])


@pytest.mark.parametrize("kw, words", [
    (dict(trace="yes"), "trace must be"),
    (dict(bracket=(None, 1.0)), "bracket must be real numbers"),
    (dict(bracket=("0", 1.0)), "bracket must be real numbers"),
    (dict(bracket=(0j, 1.0)), "bracket must be real numbers"),
])
def test_wrong_types_are_type_errors(kw, words):
    kw.setdefault("bracket", (0.0, 1.0))
    with pytest.raises(TypeError, match=words):
        find_root(lambda x: x - 0.25, **kw)


def test_f_must_be_callable():
    with pytest.raises(TypeError, match="f must be a function"):
        find_root(0.25, (0.0, 1.0))


# --- overflow ------------------------------------------------------------------------------

@pytest.mark.parametrize("method", ["chandrupatla", "illinois", "secant", "newton"])
@pytest.mark.parametrize("end", [1e308, BIG])
def test_brackets_wider_than_the_largest_float(method, end):
    # b - a overflows to inf; the root of x - 1 is 1 (common practice)
    r = find_root(lambda x: x - 1.0, (-end, end), method=method, fprime=lambda x: 1.0)
    assert r.converged and abs(r.root - 1.0) <= tol(1.0)


def test_bisection_over_the_whole_float_range_needs_its_thousand_steps():
    # halving 2e308 down to 2e-12 takes log2(1e320) ~ 1064 steps (common practice)
    short = find_root(lambda x: x - 1.0, (-1e308, 1e308), method="bisect")
    assert short.status is Status.ITERATION_LIMIT and np.isfinite(short.root)
    r = find_root(lambda x: x - 1.0, (-1e308, 1e308), method="bisect", maxiter=1100)
    assert r.converged and abs(r.root - 1.0) <= tol(1.0)


def test_overflowing_bracket_in_an_array_with_ordinary_ones():
    a = np.array([-BIG, 0.0, -1e300])
    b = np.array([BIG, 2.0, 1e300])
    r = find_root(lambda x: x - 1.0, (a, b))
    assert r.converged.all()
    np.testing.assert_allclose(r.root, 1.0, rtol=0, atol=tol(1.0))


# --- cycles of open methods ---------------------------------------------------------------

def cycler(x):
    return x**3 - 2 * x + 2  # Newton from 0 gives 0, 1, 0, 1, ... exactly: f(0)/f'(0) = -1, f(1)/f'(1) = 1


def cycler_prime(x):
    return 3 * x**2 - 2


def test_newton_cycle_is_detected_early():
    # The textbook case of a Newton cycle (common practice; the iterates checked by hand above)
    r = find_root(cycler, x0=0.0, method="newton", fprime=cycler_prime, maxiter=10**6)
    assert r.status is Status.CYCLING and np.isnan(r.root)
    assert r.iterations <= 8
    assert sorted({s.x for s in r.trace}) == [0.0, 1.0]


def test_newton_cycle_in_an_array_with_converging_starts():
    x0 = np.array([0.0, -2.0, 1.0, -1.5])
    r = find_root(cycler, x0=x0, method="newton", fprime=cycler_prime, maxiter=10**6)
    assert list(r.status) == ["cycling", "converged", "cycling", "converged"]
    # the one real root, -1.76929235423863 (from memory; checked by the residual below)
    assert np.all(np.abs(cycler(r.root[r.converged])) <= 1e-12)
    assert r.iterations.max() <= 10


def test_slow_linear_convergence_is_not_a_cycle():
    # Newton on the double root of x**2 halves x every step (common practice): no revisits
    r = find_root(lambda x: x * x, x0=1.0, method="newton", fprime=lambda x: 2 * x, maxiter=200)
    assert r.converged and abs(r.root) <= 1e-11


# --- elements that cannot be started, degenerate brackets -------------------------------

@pytest.mark.parametrize("bad", [np.nan, np.inf, -np.inf])
def test_one_bad_element_of_a_large_array_gets_its_own_status(bad):
    n, k = 100_000, 54_321
    c = np.linspace(0.1, 0.9, n)
    a = np.zeros(n)
    a[k] = bad
    seen = []

    def f(x, c):
        seen.append(bool(np.isfinite(x).all()))
        return x - c

    r = find_root(f, (a, 1.0), args=(c,))
    assert r.status[k] == "no finite start" and np.isnan(r.root[k]) and r.evaluations[k] == 0
    others = np.arange(n) != k
    assert r.converged[others].all()
    assert np.all(np.abs(r.root[others] - c[others]) <= tol(c[others]))
    assert all(seen)  # f never saw the bad end


def test_non_finite_x0_elements_for_an_open_method():
    x0 = np.array([1.0, np.nan, 3.0])
    r = find_root(lambda x: x * x - 2.0, x0=x0, method="newton", fprime=lambda x: 2 * x)
    assert list(r.status) == ["converged", "no finite start", "converged"]


def test_every_element_bad_calls_f_never():
    def f(x):
        raise AssertionError("f called")

    r = find_root(f, (np.full(3, np.nan), 1.0))
    assert list(r.status) == ["no finite start"] * 3 and r.evaluations.sum() == 0


@pytest.mark.parametrize("method", BRACKETED)
def test_bracket_of_one_point(method):
    # (x, x): a root only where f(x) is exactly 0
    assert find_root(lambda x: x - 0.5, (0.7, 0.7), method=method).status is Status.NO_SIGN_CHANGE
    r = find_root(lambda x: x - 0.5, (0.5, 0.5), method=method)
    assert r.converged and r.root == 0.5
    arr = find_root(lambda x: x - 0.5, (np.array([0.5, 0.7]), np.array([0.5, 0.7])), method=method)
    assert list(arr.status) == ["converged", "no sign change"]


# --- threads ------------------------------------------------------------------------------

def horner(x, c0, c1):
    return (x * x + c1) * x + c0  # + and * only: the same bits in every thread and CPU


def test_concurrent_calls_from_threads_do_not_mix():
    rng = np.random.default_rng(11)
    jobs = [(ALL[k % len(ALL)], rng.uniform(-5, 5, 200), rng.uniform(1, 3, 200)) for k in range(24)]

    def run(job):
        method, roots, c1 = job
        c0 = -horner(roots, 0.0, c1)
        r = find_root(horner, (roots - 3.0, roots + 2.0), args=(c0, c1), method=method,
                      fprime=lambda x, c0, c1: 3 * x * x + c1)
        return r.root, list(r.status), r.evaluations

    serial = [run(job) for job in jobs]
    with ThreadPoolExecutor(4) as pool:
        threaded = list(pool.map(run, jobs * 2))
    for (root, status, evals), (root_t, status_t, evals_t) in zip(serial * 2, threaded):
        assert status_t == status and np.array_equal(evals_t, evals)
        np.testing.assert_array_equal(root_t, root)


# --- readable text --------------------------------------------------------------------------

def test_summary_counts_read_in_the_singular_for_one():
    one = find_root(lambda x: x - 0.5, (0.0, 1.0), method="bisect")  # 0.5 is the first midpoint
    assert one.iterations == 1
    assert "after 1 iteration (3 evaluations)" in one.summary()
    many = find_root(lambda x: x - 0.3, (0.0, 1.0), method="bisect")
    assert f"after {many.iterations} iterations" in many.summary()
    arr = find_root(lambda x, c: x - c, (0.0, 1.0), args=(np.array([0.5]),), method="bisect")
    assert arr.summary().startswith("bisect, 1 problem: 1 converged; at most 1 iteration, 3 evaluations")
