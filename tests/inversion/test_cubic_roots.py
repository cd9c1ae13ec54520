"""The cubic's real roots (inversion/cubic.py) against other methods, and the phase codes.

References: numpy.roots (eigenvalues of the companion matrix, a method unlike the closed
form with polish and deflation used here); scipy.optimize.brentq (bracketed root finding,
Brent 1973) on the same polynomial; Peng & Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59
for the critical compressibility 0.30740 (common practice to quote it to 5 digits). A
triple root is only fixed to about eps^(1/3) ~ 6e-6 relative and a double root to about
eps^(1/2) ~ 1.5e-8 (common practice of root conditioning); no test compares two methods
for exact equality.
"""

import numpy as np
import pytest
from scipy.optimize import brentq

import thermo_roots as tr
from thermo_roots.inversion import cubic
from thermo_roots.inversion.phases import LIQUID, SUPERCRITICAL, VAPOR, phase_codes


def _coefficients(r1, r2, r3):
    """Z^3 + c2 Z^2 + c1 Z + c0 with the roots r1, r2, r3."""
    return -(r1 + r2 + r3), r1 * r2 + r1 * r3 + r2 * r3, -r1 * r2 * r3


def _numpy_real_roots(c2, c1, c0, imag_tol):
    r = np.roots([1.0, c2, c1, c0])
    return np.sort(r[np.abs(r.imag) <= imag_tol].real)


def test_three_real_roots_agree_with_numpy_roots_over_chunk_boundaries():
    rng = np.random.default_rng(7)
    n = cubic.CHUNK + 300   # the subsets of three-root states cross a chunk's end
    r = np.sort(rng.uniform(-2.0, 3.0, (n, 3)), axis=1)
    r[:, 1] += 0.01      # well separated roots
    r[:, 2] += 0.02
    c2, c1, c0 = _coefficients(r[:, 0], r[:, 1], r[:, 2])
    got = cubic.cubic_real_roots(c2, c1, c0)
    for i in range(0, n, 97):
        ref = _numpy_real_roots(c2[i], c1[i], c0[i], 1e-9)
        assert ref.size == 3
        np.testing.assert_allclose(got[i], ref, rtol=0, atol=1e-10 * max(1.0, np.abs(ref).max()))


def test_one_real_root_agrees_with_numpy_roots():
    rng = np.random.default_rng(8)
    n = 2000
    real = rng.uniform(-5.0, 5.0, n)
    re, im = rng.uniform(-5.0, 5.0, n), rng.uniform(0.1, 5.0, n)   # a complex pair re +- i im
    c2 = -(real + 2.0 * re)
    c1 = 2.0 * real * re + re * re + im * im
    c0 = -real * (re * re + im * im)
    got = cubic.cubic_real_roots(c2, c1, c0)
    assert np.all(np.isnan(got[:, 1:]))
    for i in range(0, n, 41):
        ref = _numpy_real_roots(c2[i], c1[i], c0[i], 1e-9)
        assert ref.size == 1
        assert got[i, 0] == pytest.approx(ref[0], rel=1e-12, abs=1e-12)


@pytest.mark.parametrize("r", [0.30740, 1.0, -2.5, 1e-3])
def test_triple_root(r):
    # (Z - r)^3, e.g. the Peng-Robinson cubic at its critical point (Zc = 0.30740)
    c2, c1, c0 = -3.0 * r, 3.0 * r * r, -r ** 3
    got = cubic.cubic_real_roots(c2, c1, c0)
    found = got[np.isfinite(got)]
    assert found.size in (1, 3)
    np.testing.assert_allclose(found, r, rtol=2e-5)
    ref = np.roots([1.0, c2, c1, c0])          # numpy's roots land as close, and no closer
    np.testing.assert_allclose(ref.real, r, rtol=2e-5)


@pytest.mark.parametrize("gap", [1e-4, 1e-6])
def test_near_double_root_keeps_all_three(gap):
    r1, r2, r3 = 0.05, 0.6, 0.6 * (1.0 + gap)
    got = cubic.cubic_real_roots(*_coefficients(r1, r2, r3))
    ref = _numpy_real_roots(*_coefficients(r1, r2, r3), 1e-6)
    assert np.all(np.isfinite(got)) and ref.size == 3
    # a root pair gap apart is fixed to about eps / gap relative
    np.testing.assert_allclose(got, ref, rtol=1e-13 / gap)
    np.testing.assert_allclose(got, [r1, r2, r3], rtol=1e-13 / gap)


def test_exact_double_root():
    r1, r2 = 0.07, 0.5
    got = cubic.cubic_real_roots(*_coefficients(r1, r2, r2))
    found = got[np.isfinite(got)]
    assert found.min() == pytest.approx(r1, rel=1e-12)
    assert found.size in (1, 3)
    if found.size == 3:
        np.testing.assert_allclose(found[1:], r2, rtol=1e-7)


@pytest.mark.parametrize("c0", [1e30, 1e100, 1e150, 1e200, 1e300, -1e300, 1.7e308])
def test_huge_constant_term(c0):
    # |c0| beyond about 1e154 overflowed the closed form's discriminant: the root came out
    # -inf with two spurious zero roots before the cubic was rescaled
    got = cubic.cubic_real_roots(-1.0, 0.5, c0)
    ref = _numpy_real_roots(-1.0, 0.5, c0, 1e-6 * abs(c0) ** (1 / 3))
    assert ref.size == 1 and np.all(np.isnan(got[1:]))
    assert got[0] == pytest.approx(ref[0], rel=1e-12)


def test_huge_coefficients_of_three_roots_next_to_ordinary_ones():
    roots = (1.0, 1e100, 1e200)
    c = np.array([_coefficients(*roots), (-0.9, 0.2, -0.01)]).T
    got = cubic.cubic_real_roots(*c)
    np.testing.assert_allclose(got[0], roots, rtol=1e-12)
    np.testing.assert_allclose(got[1], _numpy_real_roots(-0.9, 0.2, -0.01, 1e-9), rtol=1e-12)


def test_nan_coefficients_give_nan_roots_and_spare_the_rest():
    got = cubic.cubic_real_roots([np.nan, -0.9, np.inf], [0.2, 0.2, 1.0], [-0.01, -0.01, 1.0])
    assert np.all(np.isnan(got[0])) and np.all(np.isnan(got[2]))
    np.testing.assert_allclose(got[1], _numpy_real_roots(-0.9, 0.2, -0.01, 1e-9), rtol=1e-12)


@pytest.mark.parametrize("T", [200.0, 250.0, 300.0])
def test_tiny_liquid_root_at_a_millipascal(T):
    # propane, Peng-Robinson, P = 1e-3 Pa: Z of the liquid is about 1e-11, next to a vapor
    # root at Z ~ 1; the liquid root must keep its relative accuracy (deflation from the
    # large root), checked against a bracketed solve on the polynomial
    model = tr.PengRobinson(tr.get_fluid("propane"))
    P = 1e-3
    c2, c1, c0, B = (np.asarray(x, dtype=float) for x in model.cubic_coefficients(np.array([T]), np.array([P])))
    got = cubic.cubic_real_roots(c2, c1, c0)[0]
    assert np.all(np.isfinite(got)) and got[0] > B[0]

    def f(z):
        return ((z + c2[0]) * z + c1[0]) * z + c0[0]

    # brackets from numpy.roots: the two small roots split at their geometric mean
    small = _numpy_real_roots(c2[0], c1[0], c0[0], 1e-20)[:2]
    split = np.sqrt(small[0] * small[1])
    liquid = brentq(f, B[0], split, xtol=1e-300, rtol=4 * np.finfo(float).eps)
    middle = brentq(f, split, 0.5, xtol=1e-300, rtol=4 * np.finfo(float).eps)
    vapor = brentq(f, 0.5, 1.5, xtol=1e-300, rtol=4 * np.finfo(float).eps)
    assert got[0] == pytest.approx(liquid, rel=1e-9)
    assert got[1] == pytest.approx(middle, rel=1e-9)
    assert got[2] == pytest.approx(vapor, rel=1e-12)
    roots = cubic.volume_roots(model, T, P)
    assert roots[0] == pytest.approx(liquid * tr.R * T / P, rel=1e-9)


# --------------------------------------------------------------------------- phase codes

def _phase_rule(model, T, P, v):
    """The rule of phase_codes, one state at a time (common practice: supercritical at or
    above both Tc and Pc, vapor above Tc below Pc; below Tc the root's side of v_c)."""
    if T >= model.fluid.Tc and P >= model.fluid.Pc:
        return SUPERCRITICAL
    if T >= model.fluid.Tc and P < model.fluid.Pc:
        return VAPOR
    return LIQUID if v < model.v_c else VAPOR


def test_phase_codes_with_nan_temperature_pressure_and_volume(co2):
    model = tr.PengRobinson(co2)
    rng = np.random.default_rng(3)
    n = 5000
    T = rng.uniform(0.7, 1.3, n) * co2.Tc
    P = rng.uniform(0.5, 1.5, n) * co2.Pc
    v = rng.uniform(0.3, 3.0, n) * model.v_c
    for x in (T, P, v):
        x[rng.random(n) < 0.1] = np.nan
    T[:3], P[:3], v[:3] = co2.Tc, co2.Pc, model.v_c   # on the boundaries
    codes = phase_codes(model, T, P, v)
    assert codes.dtype == np.int8 and codes.shape == (n,)
    expected = [_phase_rule(model, *x) for x in zip(T, P, v)]
    np.testing.assert_array_equal(codes, expected)
    # the named cases: NaN v below Tc reads as vapor; NaN T reads from v; NaN P above Tc too
    one = phase_codes(model, np.array([0.9 * co2.Tc, np.nan, 1.1 * co2.Tc]),
                      np.array([co2.Pc, co2.Pc, np.nan]), np.array([np.nan, 0.5 * model.v_c, 0.5 * model.v_c]))
    np.testing.assert_array_equal(one, [VAPOR, LIQUID, LIQUID])


def test_phase_codes_of_a_scalar_state(co2):
    model = tr.PengRobinson(co2)
    code = phase_codes(model, 1.1 * co2.Tc, 2.0 * co2.Pc, 0.5 * model.v_c)
    assert np.ndim(code) == 0 and int(code) == SUPERCRITICAL


def test_numpy_path_with_nan_states_keeps_the_others(co2):
    # NaN temperatures and pressures give NaN roots and the phase code of a NaN volume
    # (vapor), and leave the neighbouring states as they are solved alone
    model = tr.PengRobinson(co2)
    rng = np.random.default_rng(5)
    n = cubic.CHUNK + 50
    T, P = rng.uniform(220.0, 500.0, n), rng.uniform(1e5, 2e7, n)
    T[::7], P[3::11] = np.nan, np.nan
    roots, stable, v, phase = cubic.stable_roots_numpy(model, T, P)
    bad = np.isnan(T) | np.isnan(P)
    assert np.all(np.isnan(roots[bad])) and np.all(np.isnan(v[bad]))
    np.testing.assert_array_equal(phase, [_phase_rule(model, *x) for x in zip(T, P, v)])
    good = np.flatnonzero(~bad)[::50]
    alone = cubic.stable_roots_numpy(model, T[good], P[good])
    np.testing.assert_allclose(alone[0], roots[good], rtol=1e-10)   # vector math may differ in the last bit
    np.testing.assert_array_equal(alone[3], phase[good])
