"""The energy pairs (T, s), (T, h), (h, s), (u, rho), (u_mass, v): round trips through the
project's own (T, P) and (T, quality) solves, thermodynamic identities by finite differences,
the (T, h) two-solution case against a brute-force scan, arrays and refusals.

Identities used (textbook relations; e.g. Callen, Thermodynamics and an Introduction to
Thermostatistics, 2nd ed., 1985, sections 7.2-7.3): the Maxwell relation
(ds/dv)_T = (dP/dT)_v; dh = T ds + v dP, so (dh/dP)_s = v and (dh/dP)_T = v - T (dv/dT)_P.
"""

import numpy as np
import pytest

import thermo_roots as tr

CUBICS = [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong, tr.PengRobinson, tr.PengRobinson78]
MODELS = CUBICS + [tr.IdealGas]


def _cases(fluid):
    """(T, P) of a liquid, a vapor, a supercritical state and four next to the critical point."""
    Tc, Pc = fluid.Tc, fluid.Pc
    return [(0.75 * Tc, 0.5 * Pc), (0.8 * Tc, 0.02 * Pc), (1.3 * Tc, 2.0 * Pc),
            (0.999 * Tc, 0.995 * Pc), (1.001 * Tc, 1.002 * Pc),
            (0.99999 * Tc, 0.99998 * Pc), (1.00001 * Tc, 1.00002 * Pc)]


def _states(model):
    """Single-phase states from (T, P) and two-phase ones from (T, quality), the saturated ends included."""
    out = [tr.solve(model, T=T, P=P) for T, P in _cases(model.fluid)]
    if model.has_saturation:
        Tc = model.fluid.Tc
        out += [tr.solve(model, T=T, quality=q) for T, q in
                [(0.7 * Tc, 0.3), (0.9 * Tc, 0.0), (0.9 * Tc, 1.0), (0.998 * Tc, 0.5), (0.9999 * Tc, 0.5)]]
    return out


def _same_state(back, st, tol=1e-9, ends_single=False):
    """back is st. ends_single: a saturated end (quality 0 or 1) may come back as that one
    phase, since its volume is the saturated volume itself (the (T, v) solve's dome is open)."""
    if ends_single and st.phase == "two-phase" and st.quality in (0.0, 1.0):
        assert back.phase == ("liquid" if st.quality == 0.0 else "vapor") or back.phase == "two-phase"
        assert back.T == pytest.approx(st.T, rel=tol) and back.P == pytest.approx(st.P, rel=tol)
        return
    assert back.phase == st.phase
    assert back.T == pytest.approx(st.T, rel=tol)
    assert back.P == pytest.approx(st.P, rel=tol)
    if st.phase == "two-phase":
        assert back.quality == pytest.approx(st.quality, abs=1e-7)
    else:
        assert back.v == pytest.approx(st.v, rel=1e-8)


@pytest.mark.parametrize("cls", MODELS, ids=lambda c: c.short_name)
def test_T_s_round_trips_in_every_region(cls, propane):
    model = cls(propane)
    for st in _states(model):
        back = tr.solve(model, T=st.T, s=st.s, errors="raise")
        _same_state(back, st)
        assert back.s == pytest.approx(st.s, rel=1e-12, abs=1e-9)


@pytest.mark.parametrize("cls", MODELS, ids=lambda c: c.short_name)
def test_h_s_round_trips_in_every_region(cls, propane):
    model = cls(propane)
    for st in _states(model):
        back = tr.solve(model, h=st.h, s=st.s, errors="raise")
        _same_state(back, st)
        assert back.h == pytest.approx(st.h, rel=1e-12, abs=1e-8)


@pytest.mark.parametrize("cls", MODELS, ids=lambda c: c.short_name)
def test_P_h_and_P_s_round_trip_in_every_region(cls, propane):
    # the same states, through the valve's and the compressor's pair (issue 9 §4: to 1e-9 in
    # every region, next to the critical point and on the saturated ends)
    model = cls(propane)
    for st in _states(model):
        for name in ("h", "s"):
            back = tr.solve(model, P=st.P, errors="raise", **{name: getattr(st, name)})
            _same_state(back, st)


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_T_h_round_trips_give_the_state_as_P_or_P_other(cls, propane):
    model = cls(propane)
    for st in _states(model):
        back = tr.solve(model, T=st.T, h=st.h, errors="raise")
        assert back.h == pytest.approx(st.h, rel=1e-12, abs=1e-8)
        found = [P for P in (back.P, back.P_other) if np.isfinite(P)]
        assert any(abs(P / st.P - 1) < 1e-9 for P in found), (st, back)
        if np.isfinite(back.P_other):
            assert back.P_other > back.P
            assert any("P_other" in w for w in back.warnings)
            other = tr.solve(model, T=st.T, P=back.P_other)
            assert other.h == pytest.approx(st.h, rel=1e-9, abs=1e-6)


def _scan_solutions(model, T, target):
    """Every pressure with h(T, P) = target, by a scan of (T, P) solves and scipy's brentq.

    A different method from solve's: the stable state at each of 4000 pressures, a sign
    change between neighbours refined by brentq on h(T, P), and the jump of h across the
    saturation pressure (where the two-phase states at P_sat fill [h_liquid, h_vapor]).
    """
    from scipy.optimize import brentq

    P = np.logspace(0.0, 9.0, 4000)
    h = np.asarray(tr.solve(model, T=np.full(P.shape, T), P=P).h) - target
    out = []
    for k in np.flatnonzero(np.sign(h[:-1]) != np.sign(h[1:])):
        crossing = brentq(lambda p: tr.solve(model, T=T, P=p).h - target, P[k], P[k + 1], xtol=1e-12, rtol=1e-14)
        out.append(crossing)
    if T < model.fluid.Tc:
        sat = tr.saturation(model, T=T)
        liquid, vapor = tr.solve(model, T=T, quality=0.0), tr.solve(model, T=T, quality=1.0)
        if liquid.h <= target <= vapor.h:
            out = [P_k for P_k in out if abs(P_k / sat.P - 1) > 1e-6] + [float(sat.P)]
    return sorted(out)


@pytest.mark.parametrize("fluid, T, known", [
    ("propane", 300.0, dict(P=1e5)),          # a vapor: the other h is a liquid at some 3000 bar
    ("propane", 300.0, dict(quality=0.5)),    # two-phase at P_sat, and a compressed liquid
    ("nitrogen", 200.0, dict(P=5e6)),         # above Tc: a gas on each side of the inversion pressure
])
def test_T_h_two_solutions_against_a_brute_force_scan(fluid, T, known):
    model = tr.PengRobinson(tr.get_fluid(fluid))
    target = tr.solve(model, T=T, **known).h
    scanned = _scan_solutions(model, T, target)
    assert len(scanned) == 2, scanned
    got = tr.solve(model, T=T, h=target)
    assert got.P == pytest.approx(scanned[0], rel=1e-7)        # the lower pressure is the state
    assert got.P_other == pytest.approx(scanned[1], rel=1e-7)  # the higher one is P_other
    assert "lower pressure" in " ".join(got.warnings)
    assert "Second pressure with this T and h" in str(got)   # the printed state shows it too


def test_T_h_below_the_isotherms_minimum_is_refused_with_it(propane):
    model = tr.PengRobinson(propane)
    liquid = tr.solve(model, T=300.0, quality=0.0)
    with pytest.raises(tr.DomainError, match="at least"):
        tr.solve(model, T=300.0, h=liquid.h - 2000.0)
    # an array keeps its good elements: NaN and the reason at the bad one only
    h = np.array([liquid.h - 2000.0, liquid.h + 3000.0])
    st = tr.solve(model, T=300.0, h=h)
    assert np.isnan(st.P[0]) and st.phase[0] == "not solved" and "at least" in st.reason[0]
    assert st.phase[1] == "two-phase" and st.reason[1] == ""
    with pytest.raises(tr.DomainError, match=r"At index \(0,\)"):
        tr.solve(model, T=300.0, h=h, errors="raise")


def test_T_h_of_the_ideal_gas_is_refused(propane):
    # common practice: the ideal gas's enthalpy depends on temperature alone
    with pytest.raises(tr.InputError, match="depends on T alone"):
        tr.solve(tr.IdealGas(propane), T=300.0, h=1e4)


def test_pairs_solve_does_not_understand_are_refused_with_the_list(propane):
    model = tr.PengRobinson(propane)
    with pytest.raises(tr.InputError, match=r"\(T, s\).*\(h, s\)"):
        tr.solve(model, v=1e-3, h=1e4)
    with pytest.raises(tr.InputError, match="u goes with a volume"):
        tr.solve(model, T=300.0, u=1e4)
    with pytest.raises(tr.InputError, match="not a pair"):
        tr.solve(model, h=1e4, h_mass=2e5)


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_mass_basis_and_unit_strings(cls, propane):
    model = cls(propane)
    st = tr.solve(model, T=320.0, P=2e5)
    M = propane.molar_mass
    by_mass = tr.solve(model, T=st.T, s_mass=st.s_mass)
    assert by_mass.P == pytest.approx(st.P, rel=1e-9)
    text = tr.solve(model, T=f"{st.T - 273.15!r} degC", s=f"{st.s_mass / 1e3!r} kJ/(kg K)")
    assert text.P == pytest.approx(st.P, rel=1e-9)
    both = tr.solve(model, h_mass=st.h_mass, s=f"{st.s!r} J/(mol K)")
    assert both.T == pytest.approx(st.T, rel=1e-9) and both.P == pytest.approx(st.P, rel=1e-9)
    kj_kg = tr.solve(model, h=f"{st.h / M / 1e3!r} kJ/kg", s=st.s)   # the dimension decides the basis
    assert kj_kg.P == pytest.approx(st.P, rel=1e-9)
    Th = tr.solve(model, T=st.T, h=f"{st.h / 1e3!r} kJ/mol")
    assert any(abs(P / st.P - 1) < 1e-9 for P in (Th.P, Th.P_other))


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_u_with_rho_and_u_mass_with_v(cls, propane):
    model = cls(propane)
    for st in _states(model):
        back = tr.solve(model, u=st.u, rho=st.rho, errors="raise")
        _same_state(back, st, tol=1e-9, ends_single=True)   # issue 9 §4: round trips to 1e-9
        mass = tr.solve(model, u_mass=st.u_mass, v=st.v, errors="raise")
        assert mass.T == pytest.approx(st.T, rel=1e-9)


def test_arrays_in_arrays_out(propane):
    model = tr.SoaveRedlichKwong(propane)
    T = np.array([[250.0, 300.0], [350.0, 420.0]])
    P = np.array([[1e5, 3e6], [1e6, 8e6]])
    st = tr.solve(model, T=T, P=P)
    for pair in (dict(T=T, s=st.s), dict(h=st.h, s=st.s)):
        back = tr.solve(model, **pair)
        assert np.shape(back.P) == (2, 2) and np.shape(back.phase) == (2, 2)
        np.testing.assert_allclose(back.P, P, rtol=1e-9)
        np.testing.assert_allclose(back.T, T, rtol=1e-9)
    scalar = tr.solve(model, T=300.0, s=st.s[0, 1])
    assert isinstance(scalar.P, float)


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_maxwell_relation_from_T_s_solves(cls, propane):
    # (dv/ds)_T = 1 / (dP/dT)_v, the derivative taken through two (T, s) solves
    model = cls(propane)
    for T, P in [(300.0, 1e5), (300.0, 5e6), (500.0, 1e7)]:
        st = tr.solve(model, T=T, P=P)
        ds = 1e-4
        plus, minus = tr.solve(model, T=T, s=st.s + ds), tr.solve(model, T=T, s=st.s - ds)
        dv_ds = (plus.v - minus.v) / (2 * ds)
        assert dv_ds == pytest.approx(1.0 / model.dP_dT(T, st.v), rel=1e-5)


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_dh_dP_along_the_isentrope_is_v_from_h_s_solves(cls, propane):
    # dh = T ds + v dP: at fixed s, (dh/dP)_s = v, taken through two (h, s) solves
    model = cls(propane)
    for T, P in [(300.0, 1e5), (300.0, 5e6), (500.0, 1e7)]:
        st = tr.solve(model, T=T, P=P)
        dh = 1e-5 * st.P * st.v
        plus, minus = tr.solve(model, h=st.h + dh, s=st.s), tr.solve(model, h=st.h - dh, s=st.s)
        assert 2 * dh / (plus.P - minus.P) == pytest.approx(st.v, rel=1e-5)


@pytest.mark.parametrize("cls", CUBICS, ids=lambda c: c.short_name)
def test_dh_dP_along_the_isotherm_from_T_h_solves(cls, propane):
    # (dh/dP)_T = v - T (dv/dT)_P with (dv/dT)_P = -(dP/dT)_v / (dP/dv)_T, through (T, h) solves
    model = cls(propane)
    T, P = 320.0, 1e5
    st = tr.solve(model, T=T, P=P)
    dh = 1e-2
    plus, minus = tr.solve(model, T=T, h=st.h + dh), tr.solve(model, T=T, h=st.h - dh)
    dv_dT = -model.dP_dT(T, st.v) / model.dP_dv(T, st.v)
    assert 2 * dh / (plus.P - minus.P) == pytest.approx(st.v - T * dv_dT, rel=1e-4)


@pytest.mark.parametrize("cls", [tr.VanDerWaals, tr.PengRobinson], ids=lambda c: c.short_name)
def test_h_s_on_a_steep_isentrope(cls):
    # a heavy molecule far above Tc: along the isentrope P grows like T^(cp/R), cp/R ~ 40,
    # so doubling T to bracket it steps past the model's densest states (found by hypothesis)
    model = cls(tr.get_fluid("n-hexane"))
    for Tr, Pr in [(3.0, 10.0), (2.5, 3.0)]:
        st = tr.solve(model, T=Tr * model.fluid.Tc, P=Pr * model.fluid.Pc)
        back = tr.solve(model, h=st.h, s=st.s)
        assert back.T == pytest.approx(st.T, rel=1e-9) and back.P == pytest.approx(st.P, rel=1e-9)


def test_h_s_arrays_keep_their_good_elements_and_the_finders_record(propane):
    model = tr.PengRobinson(propane)
    st = tr.solve(model, T=np.array([300.0, 350.0, 400.0]), P=np.array([1e5, 2e6, 5e6]))
    h = np.array(st.h)
    h[1] = -1e6   # far below anything the isentrope reaches in the model's range
    back = tr.solve(model, h=h, s=st.s)
    assert back.phase[1] == "not solved" and "isentrope" in back.reason[1] and np.isnan(back.T[1])
    np.testing.assert_allclose(back.T[[0, 2]], st.T[[0, 2]], rtol=1e-9)
    assert np.shape(back.convergence.root) == (3,) and back.convergence.converged[[0, 2]].all()
    assert any("1 of 3 states not solved" in w for w in back.warnings)
    with pytest.raises(tr.DomainError, match=r"At index \(1,\).*isentrope"):
        tr.solve(model, h=h, s=st.s, errors="raise")
    scalar = tr.solve(model, T=300.0, s=float(st.s[0]))
    assert scalar.convergence.is_scalar and scalar.convergence.converged


def test_the_second_pressure_is_said_in_bar_and_flagged_when_far_beyond_the_cubics_range(propane):
    # propane at 40 °C, h = 620 kJ/kg: a vapor near 13.5 bar and, on the far side of the
    # isotherm's lowest h, a second pressure thousands of bar up (measured with PR)
    state = tr.solve(tr.PengRobinson(propane), T="40 degC", h="620 kJ/kg")
    text = " ".join(state.warnings)
    assert f"{state.P_other / 1e5:.6g} bar" in text and f"{state.P / 1e5:.6g} bar" in text
    assert state.P_other > 10 * propane.Pc and "far outside the range" in text
