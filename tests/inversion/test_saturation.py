"""saturation(): equal fugacity everywhere below Tc, continuous to the critical point."""

import numpy as np
import pytest

import thermo_roots as tr

CUBICS = [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong, tr.PengRobinson, tr.PengRobinson78]


def _reduced_temperatures(fluid):
    low = max(0.35, fluid_triple_point(fluid) / fluid.Tc)
    return np.concatenate([np.linspace(low, 0.99, 12), 1 - np.geomspace(1e-3, 1e-9, 7)])


def fluid_triple_point(fluid):
    import CoolProp

    return CoolProp.AbstractState("HEOS", fluid.library_name).Ttriple()


@pytest.mark.parametrize("cls", CUBICS)
def test_every_library_fluid_converges_up_to_the_critical_point(cls):
    # requirement: every fluid, every cubic, Tr from 0.35 (or the triple point) to 1 - 1e-9
    for name in tr.fluid_names():
        fluid = tr.get_fluid(name)
        m = cls(fluid)
        T = _reduced_temperatures(fluid) * fluid.Tc
        sat = tr.saturation(m, T=T)
        assert np.all(sat.v_liquid < sat.v_vapor), name
        gap = m.ln_phi(T, sat.v_liquid, sat.P) - m.ln_phi(T, sat.v_vapor, sat.P)
        assert np.max(np.abs(gap)) < 1e-10, name
        for v in (sat.v_liquid, sat.v_vapor):
            # P(v) of a dense liquid is a difference of terms of size RT/(v-b): allow their rounding
            rounding = 1e-14 * tr.R * T / (v - m.b)
            assert np.all(np.abs(m.pressure(T, v) - sat.P) <= 1e-9 * sat.P + rounding), name
        assert np.all(np.diff(sat.P) > 0), name


def test_continuous_approach_to_the_critical_point(co2):
    # common practice: near Tc, v_vap - v_liq ~ (1 - Tr)^(1/2) and Pc - Psat ~ (1 - Tr)
    m = tr.PengRobinson(co2)
    eps = np.geomspace(1e-3, 1e-9, 13)
    sat = tr.saturation(m, T=(1 - eps) * co2.Tc)
    width = (sat.v_vapor - sat.v_liquid) / m.v_c
    slope = np.polyfit(np.log(eps), np.log(width), 1)[0]
    assert slope == pytest.approx(0.5, abs=0.02)
    assert np.all(np.abs(sat.P / co2.Pc - 1) < 20 * eps)
    assert tr.saturation(m, T=co2.Tc).P == co2.Pc


def test_temperature_from_pressure_inverts_pressure_from_temperature(propane):
    m = tr.PengRobinson(propane)
    T = np.linspace(0.4, 0.999, 25) * propane.Tc
    by_T = tr.saturation(m, T=T)
    by_P = tr.saturation(m, P=by_T.P)
    np.testing.assert_allclose(by_P.T, T, rtol=1e-9)
    np.testing.assert_allclose(by_P.v_liquid, by_T.v_liquid, rtol=1e-6)


def test_water_saturation_at_100_degc_is_near_one_atmosphere():
    # IAPWS-95: water boils at 373.124 K at 101.325 kPa; PR is known to be within a few percent
    # of vapour pressures of simple fluids, worse for water (common practice: allow 10 %)
    sat = tr.saturation(tr.PengRobinson(tr.get_fluid("water")), T=373.124)
    assert sat.P == pytest.approx(101325.0, rel=0.10)


def test_scalar_in_scalar_out(propane):
    sat = tr.saturation(tr.PengRobinson(propane), T="25 degC")
    assert isinstance(sat.P, float) and isinstance(sat.v_liquid, float)
    assert "Saturation" in sat._repr_html_()


def test_a_model_without_a_liquid_has_no_saturation(propane):
    # saturation() asks the model protocol (has_saturation), not which class the model is:
    # a model that declares no liquid is refused like the ideal gas
    class NoLiquid(tr.PengRobinson):
        has_saturation = False

    for model in (tr.IdealGas(propane), NoLiquid(propane)):
        with pytest.raises(tr.DomainError, match="no saturation"):
            tr.saturation(model, T=300.0)


def test_a_large_array_without_problems_has_empty_reasons(propane):
    # the compiled path (256 temperatures and more) reports no reason anywhere, as the
    # general path does, without filling an array of its own
    T = np.linspace(0.5, 0.95, 300) * propane.Tc
    sat = tr.saturation(tr.PengRobinson(propane), T=T)
    assert sat.reason.shape == T.shape and set(sat.reason.tolist()) == {""}
    assert tr.saturation(tr.PengRobinson(propane), T=T[:10]).reason.tolist() == [""] * 10


def test_every_public_name_keeps_its_import_path():
    # the split into api / window / fast / table keeps the old module's names importable
    import importlib

    old = importlib.import_module("thermo_roots.inversion.saturation")
    from thermo_roots.inversion.saturation import (SATURATION_FLOOR, Saturation,  # noqa: F401
                                                   lowest_saturation_temperature, saturation, saturation_pressure,
                                                   saturation_temperature, spinodal_volumes)
    from thermo_roots.inversion import Saturation as S2, saturation as s2, spinodal_volumes as sv2

    assert (S2, s2, sv2) == (old.Saturation, old.saturation, old.spinodal_volumes)
    for name in ("FAST_TR_MAX", "ACCEL_MIN_SIZE", "fugacity_gap_z", "_SETTINGS", "_TABLE_START", "_start_tables",
                 "_newton_saturation", "_newton_saturation_numpy", "_window_saturation"):
        assert hasattr(old, name), name
    assert tr.saturation is saturation


def test_anything_but_a_model_is_refused_with_an_example(propane):
    with pytest.raises(tr.InputError, match=r"model object, not the class PengRobinson"):
        tr.saturation(tr.PengRobinson, T=300.0)
    with pytest.raises(tr.InputError, match=r"model object as its first argument"):
        tr.saturation("PR", T=300.0)
