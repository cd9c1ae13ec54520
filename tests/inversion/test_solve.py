"""solve(): published worked examples, every pair of knowns, arrays and root labels."""

import numpy as np
import pytest

import thermo_roots as tr


def _svna_butane():
    # Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.,
    # Table B.1 constants for n-butane: Tc = 425.1 K, Pc = 37.96 bar, omega = 0.200 (from memory)
    return tr.Fluid("n-butane (SVNA)", 425.1, 37.96e5, 0.200, 0.058123)


@pytest.mark.parametrize("cls, v_vapor_cm3, v_liquid_cm3", [
    # Smith, Van Ness & Abbott, 7th ed., Example 3.9: n-butane at 350 K and its vapour pressure
    # 9.4573 bar; roots in cm3/mol (from memory): vdW 2667 / 191.0, RK 2555 / 133.3,
    # SRK 2520 / 127.8, PR 2486 / 112.6 (experiment: 2482 / 115.0)
    (tr.VanDerWaals, 2667.0, 191.0),
    (tr.RedlichKwong, 2555.0, 133.3),
    (tr.SoaveRedlichKwong, 2520.0, 127.8),
    (tr.PengRobinson, 2486.0, 112.6),
])
def test_smith_van_ness_abbott_example_3_9(cls, v_vapor_cm3, v_liquid_cm3):
    state = tr.solve(cls(_svna_butane()), T=350.0, P="9.4573 bar")
    volumes = [r.v * 1e6 for r in state.roots]
    assert len(volumes) == 3
    assert volumes[0] == pytest.approx(v_liquid_cm3, rel=2e-3)
    assert volumes[-1] == pytest.approx(v_vapor_cm3, rel=1e-3)
    assert [r.kind for r in state.roots] == ["liquid-like", "unstable", "vapor-like"]


def test_cengel_boles_nitrogen_van_der_waals():
    # Cengel & Boles, Thermodynamics: An Engineering Approach, Example 3-13 (7th ed. numbering,
    # from memory): N2 at 175 K and 0.00375 m3/kg; van der Waals gives 9471 kPa, ideal gas 13851 kPa
    # (book constants: Tcr = 126.2 K, Pcr = 3.39 MPa, R = 0.2968 kJ/kg K)
    n2 = tr.Fluid("nitrogen (Cengel)", 126.2, 3.39e6, 0.04, tr.R / 296.8)
    vdw = tr.solve(tr.VanDerWaals(n2), T=175.0, v="0.00375 m^3/kg")
    ideal = tr.solve(tr.IdealGas(n2), T=175.0, v="0.00375 m^3/kg")
    # the book rounds a to 0.175 m6 kPa/kg2 and b to 0.00138 m3/kg; unrounded, the same
    # formula gives 9511 kPa, so 0.5 % covers the rounding and nothing else
    assert vdw.P == pytest.approx(9471e3, rel=5e-3)
    assert ideal.P == pytest.approx(13851e3, rel=1e-3)


def test_ideal_gas_molar_volume_at_standard_conditions():
    # CODATA 2018: ideal-gas molar volume at 273.15 K and 101.325 kPa = 22.413 969 54 L/mol
    state = tr.solve(tr.IdealGas(tr.get_fluid("nitrogen")), T="0 degC", P="101.325 kPa")
    assert state.v * 1e3 == pytest.approx(22.41396954, rel=1e-9)
    assert state.Z == pytest.approx(1.0)


@pytest.mark.parametrize("cls", [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong,
                                 tr.PengRobinson, tr.PengRobinson78])
def test_critical_compressibility_at_the_critical_point(cls, co2):
    # vdW 3/8, RK and SRK 1/3, PR 0.30740 (Peng & Robinson 1976)
    state = tr.solve(cls(co2), T=co2.Tc, P=co2.Pc)
    # a triple root is fixed only to about eps**(1/3) ~ 6e-6 relative (common practice)
    assert state.Z == pytest.approx(cls.family.Zc, rel=5e-5)
    assert state.phase == "supercritical"


def test_stable_root_has_lowest_gibbs_energy_and_metastable_branch(propane):
    m = tr.PengRobinson(propane)
    sat = tr.saturation(m, T=300.0)
    liquid_side = tr.solve(m, T=300.0, P=sat.P * 1.05)     # above P_sat: liquid stable
    vapor_side = tr.solve(m, T=300.0, P=sat.P * 0.95)      # below: vapour stable
    assert liquid_side.phase == "liquid" and vapor_side.phase == "vapor"
    for s in (liquid_side, vapor_side):
        stable = [r for r in s.roots if r.stable]
        assert len(stable) == 1
        assert stable[0].ln_phi == min(r.ln_phi for r in s.roots if r.kind != "unstable")
        assert stable[0].v == s.v and not s.metastable
    superheated_liquid = tr.solve(m, T=300.0, P=sat.P * 0.95, branch="liquid")
    assert superheated_liquid.metastable and superheated_liquid.v == vapor_side.roots[0].v
    assert superheated_liquid.superheat > 0 and vapor_side.superheat > 0
    assert liquid_side.superheat < 0 and liquid_side.pressure_margin == pytest.approx(0.05, rel=1e-9)


def test_all_pairs_of_knowns_give_one_state(propane):
    m = tr.PengRobinson(propane)
    ref = tr.solve(m, T="20 degC", P="15 bar")
    M = propane.molar_mass
    pairs = [dict(T=ref.T, v=ref.v), dict(T=ref.T, rho=ref.rho), dict(T=ref.T, rho_mass=ref.rho_mass),
             dict(P=ref.P, v=ref.v), dict(P=ref.P, rho=ref.rho), dict(P=ref.P, rho_mass=ref.rho_mass),
             dict(T=ref.T, v=f"{ref.v / M} m^3/kg")]
    for knowns in pairs:
        s = tr.solve(m, **knowns)
        assert s.T == pytest.approx(ref.T, rel=1e-10) and s.P == pytest.approx(ref.P, rel=1e-9)
        assert s.v == pytest.approx(ref.v, rel=1e-10) and s.phase == ref.phase == "liquid"


def test_quality_and_two_phase_lever_rule(propane):
    m = tr.PengRobinson(propane)
    sat = tr.saturation(m, T=280.0)
    v = sat.v_liquid + 0.25 * (sat.v_vapor - sat.v_liquid)
    for s in (tr.solve(m, T=280.0, quality=0.25), tr.solve(m, P=sat.P, quality="25 %"),
              tr.solve(m, T=280.0, v=v), tr.solve(m, P=sat.P, v=v)):
        assert s.phase == "two-phase"
        assert s.quality == pytest.approx(0.25, rel=1e-8)
        assert s.P == pytest.approx(sat.P, rel=1e-9) and s.T == pytest.approx(280.0, rel=1e-10)
        assert s.v_liquid == pytest.approx(sat.v_liquid, rel=1e-8)


def test_arrays_broadcast_and_agree_with_scalar_solves(co2):
    m = tr.PengRobinson(co2)
    T = np.linspace(220.0, 500.0, 7)[:, None]
    P = np.geomspace(1e5, 2e7, 5)[None, :]
    states = tr.solve(m, T=T, P=P)
    assert states.v.shape == (7, 5) and states.roots.shape == (7, 5, 3)
    for i in range(7):
        for j in range(5):
            one = tr.solve(m, T=float(T[i, 0]), P=float(P[0, j]))
            assert states.v[i, j] == pytest.approx(one.v, rel=1e-12)
            assert states.phase[i, j] == one.phase
            np.testing.assert_allclose(states.roots[i, j][: len(one.roots)], [r.v for r in one.roots], rtol=1e-12)
            assert np.isnan(states.roots[i, j][len(one.roots):]).all()


def test_array_inversions_agree_with_scalar_solves(co2):
    m = tr.SoaveRedlichKwong(co2)
    T = np.array([230.0, 280.0, 290.0, 320.0, 450.0])
    v = np.array([4e-5, 1e-4, 2e-3, 1.5e-4, 1e-2])
    arr = tr.solve(m, T=T, v=v)
    back = tr.solve(m, P=arr.P, v=v)
    for k in range(T.size):
        one = tr.solve(m, T=T[k], v=v[k])
        assert arr.P[k] == pytest.approx(one.P, rel=1e-12) and arr.phase[k] == one.phase
        assert back.T[k] == pytest.approx(T[k], rel=1e-9)
    assert list(arr.phase) == ["liquid", "two-phase", "vapor", "supercritical", "vapor"]


def test_convergence_record_of_an_inversion(co2):
    s = tr.solve(tr.PengRobinson(co2), P="60 bar", v="0.4 L/mol")
    assert s.convergence.converged and s.convergence.evaluations >= s.convergence.iterations > 0
    assert tr.PengRobinson(co2).pressure(s.T, 4e-4) == pytest.approx(6e6, rel=1e-12)


def test_html_and_repr_show_the_state_and_the_caution(propane):
    s = tr.solve(tr.PengRobinson(propane), T="20 degC", P="8 bar")
    page = s._repr_html_()
    assert "Compressibility factor" in page and "licensed engineer" in page and "liquid-like" in page
    assert "phase='vapor'" in repr(s)  # PR saturation pressure at 20 degC is 8.36 bar
