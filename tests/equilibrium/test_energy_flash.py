"""The (P, h) and (P, s) flashes of mixtures: round trips through the (T, P) flash, the lever
rule on the phases' own energies, out-of-range values, bad elements, and a fuel-gas letdown
against the reference mixture model's own (P, h) solve."""

from __future__ import annotations

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium.energy_flash import energy_flash
from thermo_roots.equilibrium.phase_caloric import split_caloric
from thermo_roots.equilibrium.flash import flash_tp
from thermo_roots.properties import caloric

GAS = tr.Mixture({"methane": 0.882, "ethane": 0.061, "propane": 0.023, "n-butane": 0.009, "isobutane": 0.005,
                  "nitrogen": 0.012, "CO2": 0.008})
LPG = tr.Mixture({"ethane": 0.05, "propane": 0.62, "isobutane": 0.09, "n-butane": 0.24})


@pytest.fixture(scope="module")
def lpg():
    return tr.PengRobinson(LPG)


def test_round_trip_through_liquid_two_phase_and_vapor(lpg):
    """T -> h, s by the (T, P) flash -> T again, on an isobar crossing the LPG's envelope
    (a consistency check of the inversion, common practice)."""
    T = np.linspace(230.0, 360.0, 14)
    P = np.full(T.shape, 6e5)
    flash = flash_tp(lpg, T, P)
    assert set(np.unique(flash.n_phases)) == {1, 2}          # the isobar crosses the envelope
    whole = split_caloric(lpg, flash)
    for name in ("h", "s"):
        back, record, reasons = energy_flash(lpg, P, getattr(whole, name), name)
        assert np.all(reasons == ""), reasons
        np.testing.assert_allclose(back, T, rtol=0, atol=1e-6)


def test_energies_rise_with_temperature_across_the_envelope(lpg):
    """(dh/dT)_P > 0 and (ds/dT)_P > 0 also in two phases: the premise of the bracket
    (Michelsen & Mollerup 2007, ch. 10)."""
    T = np.linspace(230.0, 360.0, 300)
    whole = split_caloric(lpg, flash_tp(lpg, T, np.full(T.shape, 6e5)))
    assert np.all(np.diff(whole.h) > 0) and np.all(np.diff(whole.s) > 0)


def test_two_phase_energy_is_the_lever_rule_on_each_phase_alone(lpg):
    """h of a split = (1 - beta) h(liquid at x) + beta h(vapor at y), each phase computed
    with the model moved to its own composition (an independent route through at_composition)."""
    flash = flash_tp(lpg, 295.0, 6e5)
    assert int(flash.n_phases) == 2
    liquid = caloric(lpg.at_composition(flash.x), 295.0, float(flash.v_liquid), 6e5)
    vapor = caloric(lpg.at_composition(flash.y), 295.0, float(flash.v_vapor), 6e5)
    whole = split_caloric(lpg, flash)
    beta = float(flash.beta)
    for name in ("h", "s", "u", "g"):
        expected = (1 - beta) * float(getattr(liquid, name)) + beta * float(getattr(vapor, name))
        assert float(getattr(whole, name)) == pytest.approx(expected, rel=1e-12, abs=1e-9)
    assert np.isnan(whole.cp) and np.isnan(whole.w)      # no single value in two phases


def test_a_fuel_gas_letdown_against_the_reference_mixture_model():
    """62 barg, 8 °C -> 4.5 barg at constant h: the reference mixture model's own (P, h) solve
    (CoolProp HEOS, GERG-2008 type) gives -29.4 °C; Peng-Robinson without kᵢⱼ -32.7 °C
    (measured here). The test holds the Joule-Thomson cooling to within 5 K of it."""
    import CoolProp.CoolProp as CP

    model = tr.PengRobinson(GAS)
    T_in, P_in, P_out = 281.15, 63.01325e5, 5.51325e5
    h_in = split_caloric(model, flash_tp(model, T_in, P_in)).h
    T_out, _, reasons = energy_flash(model, P_out, h_in, "h")
    state = CP.AbstractState("HEOS", "&".join(f.library_name for f in GAS.fluids))
    state.set_mole_fractions(list(GAS.z))
    state.update(CP.PT_INPUTS, P_in, T_in)
    state.update(CP.HmolarP_INPUTS, state.hmolar(), P_out)
    assert reasons[0] == ""
    assert T_out[0] < T_in - 25.0                       # tens of kelvin of cooling, as the reference says
    assert abs(T_out[0] - state.T()) < 5.0


def test_values_outside_the_model_and_bad_elements_keep_the_others(lpg):
    """An enthalpy above what the model reaches at 3 Tc, and a NaN, each carry a reason; the
    other elements are solved as if alone."""
    T = np.array([250.0, 300.0, 330.0])
    P = np.full(3, 6e5)
    h = split_caloric(lpg, flash_tp(lpg, T, P)).h.copy()
    h_bad = np.array([h[0], 1e9, np.nan, h[2]])
    T_back, _, reasons = energy_flash(lpg, np.full(4, 6e5), h_bad, "h")
    assert reasons[0] == "" and reasons[3] == ""
    assert "above" in reasons[1] and reasons[2] != ""
    assert np.isnan(T_back[1]) and np.isnan(T_back[2])
    np.testing.assert_allclose(T_back[[0, 3]], T[[0, 2]], atol=1e-6)
    with pytest.raises(tr.InputError):
        energy_flash(lpg, 6e5, 1.0, "u")


def test_solve_takes_pressure_with_enthalpy_or_entropy_on_a_mixture_on_either_basis(lpg):
    """solve(model, P=, h=) and (P=, s=) on a mixture: the state of the (T, P) solve it came from,
    with h or s per mole or per kg, as numbers or text (a round trip, common practice)."""
    start = tr.solve(lpg, T="22 degC", P="6.5 bar")
    assert start.phase == "two-phase"
    for knowns in (dict(h=start.h), dict(h_mass=f"{start.h_mass / 1e3!r} kJ/kg"), dict(s=start.s),
                   dict(s_mass=start.s_mass)):
        again = tr.solve(lpg, P="6.5 bar", **knowns)
        assert again.T == pytest.approx(295.15, abs=1e-6)
        assert again.vapor_fraction == pytest.approx(start.vapor_fraction, abs=1e-8)
        np.testing.assert_allclose(again.x, start.x, atol=1e-8)
    valve = tr.solve(lpg, P="2 bar", h=start.h)                # a throttle: colder, more vapour
    assert valve.T < start.T and valve.vapor_fraction > start.vapor_fraction
    many = tr.solve(lpg, P=[6.5e5, 6.5e5], h=[start.h, np.nan])
    assert many.reason[0] == "" and many.reason[1] != "" and np.isnan(many.T[1])
    with pytest.raises(tr.InputError, match=r"\(P, h\)"):
        tr.solve(lpg, T=300.0, v=1e-3)
