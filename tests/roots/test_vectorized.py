"""Many problems at once: the same answers as one at a time, statuses per element."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import optimize

from thermo_roots.roots import METHODS, Status, find_root

ALL = list(METHODS)
EPS = np.finfo(float).eps


def kepler(x, m, e):
    """Kepler's equation E - e sin E - M = 0 for the eccentric anomaly (common practice)."""
    return x - e * np.sin(x) - m


def kepler_prime(x, m, e):
    return 1 - e * np.cos(x)


@pytest.fixture(scope="module")
def orbits():
    rng = np.random.default_rng(20240601)
    return rng.uniform(0.0, 2 * np.pi, 150), rng.uniform(0.0, 0.95, 150)


@pytest.mark.parametrize("method", ALL)
def test_vectorized_matches_scalar_solves(method, orbits):
    m, e = orbits
    bracket = (m - 1.0, m + 1.0)  # |E - M| <= e < 1
    kw = dict(method=method, fprime=kepler_prime, trace=False)
    together = find_root(kepler, bracket, args=(m, e), **kw)
    singles = [find_root(kepler, (mi - 1.0, mi + 1.0), args=(mi, ei), **kw) for mi, ei in zip(m, e)]
    # np.sin vectorized may differ from the scalar np.sin in the last bit (SIMD code paths
    # differ between CPUs), so roots agree within the solver's tolerance and counts within
    # a small slack; test_exact_... below checks exact agreement on arithmetic alone.
    roots = np.array([r.root for r in singles])
    assert np.all(np.abs(together.root - roots) <= 2 * (2e-12 + 4 * EPS * np.abs(roots)))
    assert list(together.status) == [str(r.status) for r in singles]
    for counts in ("evaluations", "iterations"):
        mine, theirs = getattr(together, counts), np.array([getattr(r, counts) for r in singles])
        assert np.all(np.abs(mine - theirs) <= 3), counts
        assert abs(int(mine.sum()) - int(theirs.sum())) <= 0.02 * theirs.sum(), counts


def horner_cubic(x, c0, c1, c2):
    """x**3 + c2 x**2 + c1 x + c0 with + and * only (correctly rounded on every IEEE 754 machine)."""
    return ((x + c2) * x + c1) * x + c0


def horner_cubic_prime(x, c0, c1, c2):
    return (3.0 * x + 2.0 * c2) * x + c1


@pytest.mark.parametrize("method", ALL)
def test_exact_agreement_when_f_is_plain_arithmetic(method):
    """With f built from + and * only, the array path must match the scalar path exactly.

    IEEE 754 rounds +, -, * and / correctly, so scalar and SIMD code give the same bits on
    any CPU (common practice); the loop itself uses only such operations. Any difference
    here is a fault of the array path, not of rounding.
    """
    rng = np.random.default_rng(7)
    roots = rng.uniform(-3.0, 3.0, 60)
    c1, c2 = rng.uniform(1.0, 4.0, 60), rng.uniform(-1.0, 1.0, 60)  # 4 c2**2 < 12 c1: increasing, one root
    c0 = -horner_cubic(roots, 0.0, c1, c2)  # the root sits at `roots` up to rounding
    kw = dict(method=method, fprime=horner_cubic_prime, trace=False)
    together = find_root(horner_cubic, (roots - 2.0, roots + 1.5), args=(c0, c1, c2), **kw)
    singles = [find_root(horner_cubic, (r - 2.0, r + 1.5), args=(a, b, c), **kw)
               for r, a, b, c in zip(roots, c0, c1, c2)]
    assert list(together.status) == [str(r.status) for r in singles]
    assert list(together.root) == [r.root for r in singles]
    assert list(together.evaluations) == [r.evaluations for r in singles]
    assert list(together.iterations) == [r.iterations for r in singles]
    assert together.converged.all()


def test_vectorized_roots_agree_with_brentq(orbits):
    m, e = orbits
    r = find_root(kepler, (m - 1.0, m + 1.0), args=(m, e))
    ref = [optimize.brentq(kepler, mi - 1.0, mi + 1.0, args=(mi, ei), xtol=1e-14) for mi, ei in zip(m, e)]
    np.testing.assert_allclose(r.root, ref, rtol=0, atol=2e-12 + 8 * np.finfo(float).eps * 2 * np.pi)
    assert r.converged.all()


def test_mixed_statuses_in_one_array():
    c = np.array([4.0, -1.0, 2.0, 0.0, -3.0, 9.0])  # x**2 = c: no root in (0.5, 5) for c <= 0.25
    r = find_root(lambda x, c: x**2 - c, (0.5, 5.0), args=(c,))
    expect = np.where(c > 0.25, "converged", "no sign change")
    assert list(r.status) == list(expect)
    assert np.array_equal(r.converged, c > 0.25)
    np.testing.assert_allclose(r.root[c > 0.25], np.sqrt(c[c > 0.25]), rtol=1e-12)
    assert np.isnan(r.root[c <= 0.25]).all()
    assert (r.status == Status.CONVERGED).sum() == 3  # str enum compares with the text array


def test_mixed_open_statuses():
    x0 = np.array([0.5, 2.0, -0.3, 3.0])  # Newton on arctan converges only for |x0| < 1.39 (common practice)
    r = find_root(np.arctan, x0=x0, method="newton", fprime=lambda x: 1 / (1 + x * x))
    assert list(r.status) == ["converged", "diverged", "converged", "diverged"]


def test_f_only_sees_active_elements_with_matching_args():
    calls = []

    def f(x, c):
        assert x.shape == c.shape  # args are cut together with x
        calls.append(x.size)
        return x - c

    c = np.array([0.25, 0.5, 0.75])
    r = find_root(f, (0.0, 1.0), args=(c,), method="bisect", xtol=1e-3, rtol=0)
    np.testing.assert_allclose(r.root, c, atol=1e-3)
    assert calls[0] == 3 and min(calls) >= 1
    assert sum(calls) == r.evaluations.sum()


def test_shapes_broadcast_and_scalar_args_pass_through():
    a = np.zeros((2, 1))
    b = np.array([[1.0, 2.0, 3.0]])
    r = find_root(lambda x, k: x - k * 0.5, (a, b), args=(1.0,), trace=True)
    assert r.root.shape == (2, 3) and r.status.shape == (2, 3)
    np.testing.assert_allclose(r.root, 0.5)
    assert r.trace.x.shape[1:] == (2, 3)
