"""Rachford–Rice split against an independent solver and closed forms.

References: Rachford & Rice (1952), J. Pet. Technol. 4(10); Whitson & Michelsen (1989),
Fluid Phase Equilib. 53, 51 (the negative-flash window between the poles); Michelsen &
Mollerup, Thermodynamic Models, 2nd ed. (2007), ch. 10.
"""

import numpy as np
import pytest
from scipy.optimize import brentq

from thermo_roots.equilibrium import rachford_rice, rachford_rice_function
from thermo_roots.equilibrium.rachford_rice import (ABOVE_ONE, ALL_K_ABOVE, ALL_K_BELOW, ALL_K_ONE, BELOW_ZERO,
                                                    NOT_SOLVED, TWO_PHASE)
from thermo_roots.errors import InputError, WrongTypeError


def _g(beta, z, K):
    """The Rachford–Rice function written out again, term by term, for scipy (independent of the package)."""
    return sum(zi * (Ki - 1.0) / (1.0 + beta * (Ki - 1.0)) for zi, Ki in zip(z, K))


def _random_states(rng, n_states, n_c):
    z = rng.dirichlet(np.ones(n_c) * 0.7, size=n_states)
    K = np.exp(rng.normal(0.0, 2.5, size=(n_states, n_c)))
    return z, K


@pytest.mark.parametrize("n_c", [2, 3, 6, 10])
def test_beta_agrees_with_scipy_brentq_on_random_feeds(n_c):
    # Brent's method (scipy.optimize.brentq) on the same function, bracketed just inside the
    # poles 1/(1 - K_max), 1/(1 - K_min) (Whitson & Michelsen 1989): a different method and
    # a different bracket. Agreement to 1e-10 (relative to |beta| where |beta| > 1).
    rng = np.random.default_rng(20261202 + n_c)
    z, K = _random_states(rng, 1500, n_c)
    result = rachford_rice(z, K, negative_flash=True)
    checked = 0
    for i in range(len(z)):
        if not (K[i].max() > 1 > K[i].min()):
            assert result.status[i] in (ALL_K_ABOVE, ALL_K_BELOW)
            continue
        lo, hi = 1.0 / (1.0 - K[i].max()), 1.0 / (1.0 - K[i].min())
        eps = 1e-13 * (hi - lo)
        a, b = lo + eps, hi - eps
        if not (_g(a, z[i], K[i]) > 0 > _g(b, z[i], K[i])):
            continue   # the root is within 1e-13 of a pole: beyond what brentq's bracket can hold here
        expected = brentq(_g, a, b, args=(z[i], K[i]), xtol=1e-15, rtol=8.9e-16, maxiter=500)
        assert result.beta[i] == pytest.approx(expected, abs=1e-10, rel=1e-10), i
        assert result.status[i] == (BELOW_ZERO if expected <= 0 else ABOVE_ONE if expected >= 1 else TWO_PHASE)
        checked += 1
    assert checked > 0.9 * len(z) * (1 - 2 * 0.5 ** n_c)   # nearly every state with a root was compared


def test_material_balance_and_sums():
    rng = np.random.default_rng(7)
    z, K = _random_states(rng, 4000, 5)
    for negative in (False, True):
        r = rachford_rice(z, K, negative_flash=negative)
        solved = r.status != NOT_SOLVED
        assert solved.all()
        # (with the negative flash, beta is NaN where there is no root at all: all K >= 1 or <= 1)
        has_beta = np.isfinite(r.beta)
        assert np.all(has_beta == ((not negative) | np.isin(r.status, [TWO_PHASE, BELOW_ZERO, ABOVE_ONE])))
        beta = np.where(has_beta, r.beta, 0.0)[:, None]
        balance = (1 - beta) * r.x + beta * r.y - z
        # exact to rounding: a few ulp of the largest term (|beta| can exceed 1 in a negative flash)
        scale = np.maximum(1.0, np.abs(beta)) * np.maximum(np.abs(r.x), np.abs(r.y)) + np.abs(z)
        assert np.all(np.abs(balance) <= 8 * np.finfo(float).eps * scale)
        two = r.two_phase
        np.testing.assert_allclose(r.x[two].sum(axis=1), 1.0, atol=1e-10)
        np.testing.assert_allclose(r.y[two].sum(axis=1), 1.0, atol=1e-10)
        np.testing.assert_allclose(r.y[two], K[two] * r.x[two], rtol=1e-15)
        assert np.all((r.x[two] >= 0) & (r.y[two] >= 0))
        if not negative:
            single = ~two
            assert np.all((r.beta[single] == 0) | (r.beta[single] == 1))
            np.testing.assert_array_equal(r.x[single], z[single])
            np.testing.assert_array_equal(r.y[single], z[single])


def test_the_function_falls_monotonically_between_the_poles_and_crosses_zero_at_beta():
    # g'(beta) = -sum z (K - 1)^2 / (1 + beta (K - 1))^2 < 0 between the poles (Rachford & Rice 1952;
    # Whitson & Michelsen 1989): sampled on 400 points per state, g must fall and change sign once,
    # at the beta returned.
    rng = np.random.default_rng(11)
    z, K = _random_states(rng, 300, 4)
    r = rachford_rice(z, K, negative_flash=True)
    for i in np.flatnonzero(np.isin(r.status, [TWO_PHASE, BELOW_ZERO, ABOVE_ONE])):
        lo, hi = 1.0 / (1.0 - K[i].max()), 1.0 / (1.0 - K[i].min())
        beta = lo + (hi - lo) * np.linspace(0.0, 1.0, 402)[1:-1]
        g = np.array([_g(b, z[i], K[i]) for b in beta])
        assert np.all(np.diff(g) < 0)
        tol = 1e-10 * max(1.0, abs(r.beta[i]))
        assert np.all(g[beta < r.beta[i] - tol] > 0) and np.all(g[beta > r.beta[i] + tol] < 0)


def test_binary_closed_form():
    # For two components g(beta) = 0 is linear after clearing denominators:
    # beta = -(z1 a1 + z2 a2) / (a1 a2), a = K - 1 (algebra; common practice).
    rng = np.random.default_rng(3)
    z1 = rng.uniform(0.01, 0.99, 2000)
    z = np.stack([z1, 1 - z1], axis=1)
    K = np.stack([np.exp(rng.uniform(0.01, 4, 2000)), np.exp(-rng.uniform(0.01, 4, 2000))], axis=1)
    a = K - 1
    expected = -(z[:, 0] * a[:, 0] + z[:, 1] * a[:, 1]) / (a[:, 0] * a[:, 1])
    r = rachford_rice(z, K, negative_flash=True)
    np.testing.assert_allclose(r.beta, expected, rtol=1e-10, atol=1e-12)


def test_a_component_that_does_not_vaporise():
    # K = 0 puts the high pole at beta = 1; binary closed form beta = -(z1 a1 + z2 a2)/(a1 a2) = 0.2.
    r = rachford_rice([0.6, 0.4], [2.0, 0.0])
    assert r.status == TWO_PHASE and r.beta == pytest.approx(0.2, rel=1e-14)
    np.testing.assert_allclose(r.x, [0.5, 0.5], rtol=1e-14)
    np.testing.assert_allclose(r.y, [1.0, 0.0], rtol=1e-14, atol=0)


def test_symmetric_feed():
    # z = (1/2, 1/2), K = (k, 1/k): g(1/2) = 0 for every k by symmetry (common practice).
    k = np.array([1.01, 2.0, 10.0, 1e3])
    r = rachford_rice([0.5, 0.5], np.stack([k, 1 / k], axis=1))
    np.testing.assert_allclose(r.beta, 0.5, atol=1e-14)
    assert r.beta.shape == (4,) and r.x.shape == (4, 2)


def test_single_phase_statuses():
    z = [0.2, 0.3, 0.5]
    vapor = rachford_rice(z, [1.5, 2.0, 1.0])
    assert vapor.status == ALL_K_ABOVE and vapor.beta == 1.0
    np.testing.assert_array_equal(vapor.x, z)
    liquid = rachford_rice(z, [0.5, 0.9, 1.0])
    assert liquid.status == ALL_K_BELOW and liquid.beta == 0.0
    # with the negative flash there is no root at all: beta NaN, said so by the status
    assert np.isnan(rachford_rice(z, [1.5, 2.0, 3.0], negative_flash=True).beta)
    trivial = rachford_rice(z, [1.0, 1.0, 1.0])
    assert trivial.status == ALL_K_ONE and np.isnan(trivial.beta)


def test_beyond_the_dew_and_bubble_points():
    # Feed on the vapor side: sum z/K < 1 (dew-point condition, common practice) -> beta >= 1.
    z, K = np.array([0.9, 0.1]), np.array([3.0, 0.5])
    assert np.sum(z / K) < 1
    r = rachford_rice(z, K)
    assert r.status == ABOVE_ONE and r.beta == 1.0
    neg = rachford_rice(z, K, negative_flash=True)
    assert neg.beta > 1 and neg.beta == pytest.approx(brentq(_g, 1.0, 1 / (1 - 0.5) - 1e-12, args=(z, K)), rel=1e-12)
    # Feed on the liquid side: sum z K < 1 (bubble-point condition) -> beta <= 0.
    z, K = np.array([0.1, 0.9]), np.array([3.0, 0.5])
    assert np.sum(z * K) < 1
    assert rachford_rice(z, K).status == BELOW_ZERO
    assert rachford_rice(z, K, negative_flash=True).beta < 0


def test_components_absent_from_the_feed_do_not_count():
    # z = 0 components take no part: with them the split equals the split without them.
    r3 = rachford_rice([0.6, 0.0, 0.4], [2.0, 50.0, 0.3])
    r2 = rachford_rice([0.6, 0.4], [2.0, 0.3])
    assert r3.beta == pytest.approx(r2.beta, rel=1e-14)
    assert r3.x[1] == 0 and r3.y[1] == 0
    # present components all above 1: single phase even though an absent one is below 1
    assert rachford_rice([0.0, 1.0], [0.1, 2.0]).status == ALL_K_ABOVE


@pytest.mark.parametrize("minor", [1e-6, 1e-10, 1e-14, 1e-300])
def test_nearly_pure_feed(minor):
    # The root sits on the bound from y_i <= 1 when one component dominates; rounding must not
    # lose the bracket. Checked against the binary closed form above.
    z = np.array([1 - minor, minor])
    K = np.array([0.5, 4.0])
    r = rachford_rice(z, K, negative_flash=True)
    a = K - 1
    expected = -(z[0] * a[0] + z[1] * a[1]) / (a[0] * a[1])
    assert r.status in (BELOW_ZERO, TWO_PHASE) and r.beta == pytest.approx(expected, rel=1e-9, abs=1e-12)


def test_compositions_keep_their_digits_next_to_a_pole():
    # A nearly pure feed with trace components puts the root within rounding of a pole in beta;
    # sum x = sum y = 1 must still hold to rounding (Nielsen & Lia 2023 show the loss when beta
    # itself is the unknown). With beta as the unknown these sums were off by up to 0.99.
    rng = np.random.default_rng(17)
    minor = 10 ** rng.uniform(-17, -8, 20000)
    share = rng.uniform(0, 1, 20000)
    z = np.stack([1 - minor, minor * share, minor * (1 - share)], axis=1)
    K = np.exp(rng.normal(0, 2, (20000, 3)))
    r = rachford_rice(z, K, negative_flash=True)
    root = np.isin(r.status, [TWO_PHASE, BELOW_ZERO, ABOVE_ONE])
    assert root.sum() > 0.7 * len(z) and not np.any(r.status == NOT_SOLVED)
    np.testing.assert_allclose(r.x[root].sum(axis=1), 1.0, rtol=0, atol=1e-13)
    np.testing.assert_allclose(r.y[root].sum(axis=1), 1.0, rtol=0, atol=1e-13)


def test_shapes_broadcast_and_bad_rows_stay_local():
    z = np.array([0.5, 0.3, 0.2])
    K = np.array([[3.0, 1.0, 0.2], [np.nan, 1.0, 0.2], [4.0, 1.1, 0.1]])
    r = rachford_rice(z, K)
    assert r.beta.shape == (3,) and r.x.shape == (3, 3)
    assert list(r.status) == [TWO_PHASE, NOT_SOLVED, TWO_PHASE]
    assert np.isnan(r.beta[1]) and np.isnan(r.x[1]).all()
    single = rachford_rice(z, K[0])
    assert isinstance(single.beta, float) and single.beta == pytest.approx(r.beta[0], rel=1e-14)
    grid = rachford_rice(np.broadcast_to(z, (2, 4, 3)), np.broadcast_to(K[0], (2, 4, 3)))
    assert grid.beta.shape == (2, 4) and grid.status.shape == (2, 4) and grid.x.shape == (2, 4, 3)


def test_function_helper_matches_the_written_out_sum():
    rng = np.random.default_rng(5)
    z, K = _random_states(rng, 50, 4)
    beta = rng.uniform(0, 1, 50)
    np.testing.assert_allclose(rachford_rice_function(beta, z, K), [_g(b, zi, Ki) for b, zi, Ki in zip(beta, z, K)],
                               rtol=1e-12, atol=1e-14)


def test_bad_input():
    with pytest.raises(InputError, match=r"do not broadcast"):
        rachford_rice([0.5, 0.5], [1.0, 2.0, 3.0])
    with pytest.raises(InputError, match=r"K must be >= 0.*got -1\.0\."):
        rachford_rice([0.5, 0.5], [-1.0, 2.0])
    with pytest.raises(InputError, match=r"last axis"):
        rachford_rice(0.5, [1.0, 2.0])
    with pytest.raises(WrongTypeError):
        rachford_rice("0.5 0.5", [1.0, 2.0])
    with pytest.raises(WrongTypeError, match=r"negative_flash"):
        rachford_rice([0.5, 0.5], [2.0, 0.5], negative_flash="yes")
