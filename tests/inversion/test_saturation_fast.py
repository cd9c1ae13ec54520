"""The fast saturation path (bracketed Newton in ln P) gives the proven solver's answers.

The proven solver is the spinodal-window solve of thermo_roots.inversion.saturation.window
(Chandrupatla's method on a bracket guaranteed by the physics, tests/inversion/
test_saturation.py). The fast path must agree with it to 1e-12 relative in P, satisfy
equal fugacity by the model's own ln_phi to 1e-10, and hand every temperature it does not
finish, and every Tr >= 0.99, to the proven solver. Equal fugacity as the saturation
condition: Michelsen & Mollerup (2007), Thermodynamic Models, 2nd ed., ch. 11.
"""

import importlib
import zlib

import numpy as np
import pytest

import thermo_roots as tr

# the pieces of the saturation package: the proven window solver, the fast path and its table
sat_window = importlib.import_module("thermo_roots.inversion.saturation.window")
sat_fast = importlib.import_module("thermo_roots.inversion.saturation.fast")
sat_table = importlib.import_module("thermo_roots.inversion.saturation.table")
sat_api = importlib.import_module("thermo_roots.inversion.saturation.api")

CUBICS = [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong, tr.PengRobinson, tr.PengRobinson78]


def _fluids(every=3):
    """A spread of the library: every third fluid, which includes omega from about -0.38
    (helium) to above 0.9 (heavy alkanes)."""
    names = tr.fluid_names()
    return [tr.get_fluid(n) for n in names[::every]] + [tr.get_fluid("helium"), tr.get_fluid("n-Dodecane")]


def _random_Tr(name, n, low=0.35, high=0.99):
    rng = np.random.default_rng(zlib.crc32(name.encode()))
    return rng.uniform(low, high, n)


def _numpy_fast(model, T):
    """The numpy loop's per-temperature outputs (without T's range)."""
    return sat_fast._newton_saturation_numpy(model, T, sat_table._TABLE_START,
                                        *sat_table._start_tables(model.delta1, model.delta2), sat_fast._SETTINGS)[:8]


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_fast_path_agrees_with_the_window_solver_to_1e_12(cls):
    for fluid in _fluids():
        m = cls(fluid)
        T = _random_Tr(fluid.name + cls.short_name, 40) * fluid.Tc
        lnP, P, v_l, v_v, ok, iterations, evaluations, started = _numpy_fast(m, T)
        assert ok.all(), fluid.name   # the fast path covers Tr 0.35-0.99 for every library fluid
        assert started.all(), fluid.name   # and its roots start from the table and pass the check
        assert evaluations.max() <= 3, fluid.name   # the corresponding-states start is that good
        P_ref, vl_ref, vv_ref, result = sat_window._window_saturation(m, T)
        assert np.all(result.converged)
        np.testing.assert_allclose(P, P_ref, rtol=1e-12, atol=0, err_msg=fluid.name)
        assert np.all(np.abs(lnP - np.log(P)) <= 4 * np.finfo(float).eps * np.maximum(1, np.abs(lnP))), fluid.name
        # volumes: the liquid root's sensitivity to P is small, the vapour's about 1 (ideal-gas-like)
        np.testing.assert_allclose(v_l, vl_ref, rtol=1e-11, err_msg=fluid.name)
        np.testing.assert_allclose(v_v, vv_ref, rtol=1e-11, err_msg=fluid.name)


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_fast_path_satisfies_equal_fugacity_and_the_equation_of_state(cls):
    for fluid in _fluids(every=5):
        m = cls(fluid)
        T = _random_Tr(fluid.name, 30) * fluid.Tc
        _, P, v_l, v_v, ok, _, _, _ = _numpy_fast(m, T)
        assert ok.all(), fluid.name
        gap = m.ln_phi(T, v_l, P) - m.ln_phi(T, v_v, P)
        assert np.max(np.abs(gap)) < 1e-10, fluid.name
        for v in (v_l, v_v):
            rounding = 1e-14 * tr.R * T / (v - m.b)   # P(v) of a dense liquid: a difference of large terms
            assert np.all(np.abs(m.pressure(T, v) - P) <= 1e-10 * P + rounding), fluid.name
        assert np.all(v_l < m.v_c) and np.all(v_v > m.v_c)


def test_fast_path_with_a_volume_translation(propane):
    # Peneloux et al. (1982), Fluid Phase Equilib. 8, 7-23: translation leaves Psat unchanged
    plain, shifted = tr.PengRobinson(propane), tr.PengRobinson(propane, volume_shift="peneloux")
    T = _random_Tr("peneloux", 50) * propane.Tc
    a, b = _numpy_fast(plain, T), _numpy_fast(shifted, T)
    np.testing.assert_allclose(b[1], a[1], rtol=1e-12)
    np.testing.assert_allclose(b[2], a[2] - shifted.c, rtol=1e-11)
    gap = shifted.ln_phi(T, b[2], b[1]) - shifted.ln_phi(T, b[3], b[1])
    assert np.max(np.abs(gap)) < 1e-10


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_gap_in_z_is_the_difference_of_the_models_ln_phi(cls, co2):
    m = cls(co2)
    rng = np.random.default_rng(21)
    T = rng.uniform(0.35, 0.99, 2000) * co2.Tc
    P = sat_window._window_saturation(m, T)[0] * np.exp(rng.uniform(-0.5, 0.5, T.size))   # on and off saturation
    v = tr.volume_roots(m, T, P)
    three = np.isfinite(v[:, 2])
    T, P, v = T[three], P[three], v[three]
    a, _ = m.attraction(T)
    to_z = P / (tr.R * T)
    zl, zv = (v[:, 0] + m.c) * to_z, (v[:, 2] + m.c) * to_z
    ours = sat_fast.fugacity_gap_z(zl, zv, a / (m.b * tr.R * T), m.b * to_z, m.delta1, m.delta2)
    theirs = m.ln_phi(T, v[:, 0], P) - m.ln_phi(T, v[:, 2], P)
    # the terms of ln phi are of size ln(1/B) ~ 40 at the lowest pressures: rounding of those
    np.testing.assert_allclose(ours, theirs, rtol=0, atol=2e-13)


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_newton_error_constant_is_small_below_tr_0_99(cls):
    """The accepted last step of at most 1e-9 leaves an error |g''/(2g')| dx^2: this checks
    |g''/(2g')| < 50 below Tr = 0.99 (central differences on the gap), so that error is
    below 5e-17 (Newton's error formula, Press et al. 2007, Numerical Recipes, 3rd ed., 9.4)."""
    for fluid in _fluids(every=7):
        m = cls(fluid)
        T = np.concatenate([np.linspace(0.35, 0.99, 12), [0.99]]) * fluid.Tc
        x = np.log(sat_window._window_saturation(m, T)[0])
        h = 1e-4
        g = [sat_window._fugacity_gap(x + k * h, m, T) for k in (-1, 0, 1)]
        d1, d2 = (g[2] - g[0]) / (2 * h), (g[2] - 2 * g[1] + g[0]) / h**2
        assert np.max(np.abs(d2 / (2 * d1))) < 50.0, fluid.name
        assert sat_fast._ACCEPT_STEP**2 * 50.0 < 1e-16


def test_tr_from_0_99_goes_to_the_window_solver(co2):
    m = tr.PengRobinson(co2)
    T = np.array([0.5, 0.98, 0.99, 0.995, 0.999999, 1 - 1e-9]) * co2.Tc
    P, v_l, v_v, fast = sat_fast._newton_saturation(m, T)
    np.testing.assert_array_equal(fast.converged, [True, True, False, False, False, False])
    assert np.all(np.isnan(P[2:])) and np.all(fast.evaluations[2:] == 0)
    P_all, _, _, result = sat_api.saturation_pressure(m, T)
    assert result.method == "newton+chandrupatla" and np.all(result.converged)
    np.testing.assert_array_equal(P_all[2:], sat_window._window_saturation(m, T[2:])[0])
    np.testing.assert_allclose(P_all[:2], sat_window._window_saturation(m, T[:2])[0], rtol=1e-12)


def test_what_the_fast_path_does_not_finish_goes_to_the_window_solver(co2, monkeypatch):
    m = tr.SoaveRedlichKwong(co2)
    T = np.linspace(0.4, 0.98, 30) * co2.Tc
    reference = sat_window._window_saturation(m, T)
    # an iteration limit of zero: nothing finishes, everything is solved by the window
    settings = list(sat_fast._SETTINGS)
    settings[3] = 0.0
    monkeypatch.setattr(sat_fast, "_SETTINGS", tuple(settings))
    P, v_l, v_v, result = sat_api.saturation_pressure(m, T)
    assert result.method == "chandrupatla" and np.all(result.converged)
    np.testing.assert_array_equal(P, reference[0])
    np.testing.assert_array_equal(v_v, reference[2])


def test_a_poor_start_still_converges_by_the_bracket(propane, monkeypatch):
    # a table off by a factor e^3 in P: the bracket and bisection still bring every
    # temperature home, only with more evaluations
    m = tr.PengRobinson(propane)
    T = np.linspace(0.35, 0.985, 40) * propane.Tc
    good = _numpy_fast(m, T)
    table, volumes = sat_table._start_tables(m.delta1, m.delta2)
    for shift in (3.0, -3.0):
        poor = sat_fast._newton_saturation_numpy(m, T, sat_table._TABLE_START, table + shift, volumes, sat_fast._SETTINGS)
        assert poor[4].all() and poor[6].min() > good[6].max()
        np.testing.assert_allclose(poor[1], good[1], rtol=1e-12)
    # and with two evaluations at most, the ones that did not finish go to the window solver
    settings = list(sat_fast._SETTINGS)
    settings[3] = 2.0
    monkeypatch.setattr(sat_fast, "_SETTINGS", tuple(settings))
    monkeypatch.setattr(sat_fast, "_start_tables", lambda d1, d2: (table + 3.0, volumes))
    P, _, _, result = sat_api.saturation_pressure(m, T)
    assert np.all(result.converged) and "chandrupatla" in result.method
    np.testing.assert_allclose(P, good[1], rtol=1e-12)


def test_outside_the_table_goes_to_the_window_solver():
    # s = Tr/alpha above the table's 0.995 below Tr = 0.99: a made-up fluid with omega = -0.7
    # has a PR kappa of about -0.84, so alpha < Tr and s = 0.9976 at Tr = 0.985
    odd = tr.Fluid("odd", 300.0, 5e6, -0.7, 0.03)
    m = tr.PengRobinson(odd)
    T = np.array([0.985, 0.5]) * odd.Tc
    _, _, _, fast = sat_fast._newton_saturation(m, T)
    np.testing.assert_array_equal(fast.converged, [False, True])
    assert fast.evaluations[0] == 0
    P, _, _, result = sat_api.saturation_pressure(m, T)
    assert np.all(result.converged) and result.method == "newton+chandrupatla"
    np.testing.assert_allclose(P, sat_window._window_saturation(m, T)[0], rtol=1e-12)


def test_public_saturation_uses_the_fast_path_and_counts_its_work(co2):
    m = tr.PengRobinson(co2)
    s = tr.saturation(m, T=np.linspace(0.6, 0.98, 1000) * co2.Tc)
    assert s.convergence.method == "newton" and np.all(s.convergence.converged)
    assert np.all(s.convergence.evaluations >= 1) and np.all(s.convergence.iterations >= 1)
    one = tr.saturation(m, T=250.0)
    assert isinstance(one.P, float) and one.convergence.method == "newton"


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_table_volumes_are_the_solved_saturated_volumes(cls):
    """The tables' v_L/b and Z_V, read at s = Tr/alpha of a real model, are that model's
    saturated roots (corresponding states of the two-parameter cubic, Michelsen &
    Mollerup 2007, ch. 3) to the interpolation's accuracy: close enough that a few
    Newton steps on the cubic finish them."""
    for fluid in _fluids(every=9):
        m = cls(fluid)
        T = _random_Tr(fluid.name + "volumes", 40, high=0.98) * fluid.Tc
        P, v_l, v_v, result = sat_window._window_saturation(m, T)
        assert np.all(result.converged)
        a, _ = m.attraction(T)
        ln_pr, rl, zv = sat_table._start_values(T / fluid.Tc, a / m.a_c, sat_table._TABLE_START, *sat_table._start_tables(m.delta1, m.delta2))
        to_z = P / (tr.R * T)
        np.testing.assert_allclose(ln_pr, np.log(P / fluid.Pc), rtol=0, atol=1e-7, err_msg=fluid.name)
        np.testing.assert_allclose(rl, (v_l + m.c) / m.b, rtol=1e-6, err_msg=fluid.name)
        np.testing.assert_allclose(zv, (v_v + m.c) * to_z, rtol=1e-6, err_msg=fluid.name)


def _three_root_state(m, Tr):
    """(T, P, c2, c1, c0, B) and the sorted Z roots at Tr and 0.9 Psat, where the cubic has three."""
    T = np.array([Tr * m.fluid.Tc])
    P = 0.9 * sat_window._window_saturation(m, T)[0]
    c2, c1, c0, B = m.cubic_coefficients(T, P)
    v = tr.volume_roots(m, T, P)[0]
    assert np.all(np.isfinite(v))
    return T, P, (c2, c1, c0, B), (v + m.c) * (P / (tr.R * T))


def _table_roots_both(m, T, P, zl, zv, coefficients):
    """The check on both sides: numpy's _table_roots and, if numba is there, its compiled twin."""
    zl, zv = np.ravel(zl), np.ravel(zv)
    out = [sat_fast._table_roots(m, T, P, zl / coefficients[3], zv, sat_fast._ROOT_STEPS, sat_fast._ROOT_TOL)]
    try:
        from thermo_roots import _accel_kernels as kernels
    except ImportError:
        return out
    c2, c1, c0, B = (float(np.ravel(x)[0]) for x in coefficients)
    zl_c, zv_c, good = kernels.table_roots(float(zl[0]), float(zv[0]), c2, c1, c0, B, sat_fast._ROOT_STEPS, sat_fast._ROOT_TOL)
    return out + [(np.array([zl_c]), np.array([zv_c]), np.array([good]))]


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_root_check_accepts_the_outer_roots_and_rejects_wrong_starts(cls, co2):
    m = cls(co2)
    T, P, coefficients, z = _three_root_state(m, 0.8)
    near = lambda k: z[k:k + 1] * (1.0 + 1e-7)   # noqa: E731  a start close to root k
    # close to the liquid and vapour roots: accepted, and refined to the closed form's roots
    for zl, zv, good in _table_roots_both(m, T, P, near(0), near(2), coefficients):
        assert good.all()
        np.testing.assert_allclose([zl[0], zv[0]], [z[0], z[2]], rtol=1e-14)
    # both starts at the vapour root, the liquid start at the middle root, the vapour start
    # at the middle root, swapped starts, a start that gets nowhere (NaN): all rejected
    for zl0, zv0 in ((near(2), near(2)), (near(1), near(2)), (near(0), near(1)), (near(2), near(0)),
                     (near(0), np.array([np.nan]))):
        for _, _, good in _table_roots_both(m, T, P, zl0, zv0, coefficients):
            assert not good.any(), (zl0, zv0)
    # where the cubic has one root only (well above the window), no start passes
    P_high = 3.0 * sat_window._window_saturation(m, T)[0]
    high = m.cubic_coefficients(T, P_high)
    z_one = (tr.volume_roots(m, T, P_high)[0, 0] + m.c) * P_high / (tr.R * T)
    assert not np.isfinite(tr.volume_roots(m, T, P_high)[0, 1])
    for _, _, good in _table_roots_both(m, T, P_high, np.array([z_one]), np.array([z_one * 1.01]), high):
        assert not good.any()


def test_a_wrong_table_start_falls_back_to_the_closed_form(propane):
    """Vapour starts of Z = 0 run to the liquid root: the check rejects every pair, the
    closed-form roots serve, and the answer is the same as from the right starts."""
    m = tr.PengRobinson(propane)
    T = np.linspace(0.35, 0.985, 60) * propane.Tc
    table, volumes = sat_table._start_tables(m.delta1, m.delta2)
    wrong = volumes.copy()
    wrong[:, 1] = 0.0
    good = sat_fast._newton_saturation_numpy(m, T, sat_table._TABLE_START, table, volumes, sat_fast._SETTINGS)
    poor = sat_fast._newton_saturation_numpy(m, T, sat_table._TABLE_START, table, wrong, sat_fast._SETTINGS)
    assert good[7].all() and not poor[7].any() and poor[4].all()
    for k in (1, 2, 3):
        np.testing.assert_allclose(poor[k], good[k], rtol=1e-12)
    np.testing.assert_array_equal(poor[6], good[6])   # the closed form costs no extra evaluation


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_root_rate_is_the_slope_of_the_closed_form_roots(cls, co2):
    """dZ/dln P of the liquid and vapour roots, which carries them to the last step's
    pressure, against central differences of cubic.py's roots (implicit differentiation,
    common practice)."""
    m = cls(co2)
    T = np.linspace(0.4, 0.98, 25) * co2.Tc
    P = sat_window._window_saturation(m, T)[0]
    c2, c1, _, B = m.cubic_coefficients(T, P)
    a, _ = m.attraction(T)
    A = a / (m.b * tr.R * T) * B
    h = 1e-6
    z = [(tr.volume_roots(m, T, P * np.exp(k * h)) + m.c) * (P * np.exp(k * h) / (tr.R * T))[:, None] for k in (-1, 0, 1)]
    for col in (0, 2):
        rate = sat_fast._root_rate(z[1][:, col], c2, c1, A, B, m.delta1 + m.delta2, m.delta1 * m.delta2)
        central = (z[2][:, col] - z[0][:, col]) / (2 * h)
        np.testing.assert_allclose(rate, central, rtol=1e-6, atol=1e-9)
