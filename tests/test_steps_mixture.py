"""Process steps on a mixture: a valve and a compressor with the reference mixture model's own
(P, h) and (P, s) solves beside them (CoolProp HEOS, GERG-2008 type)."""

from __future__ import annotations

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import steps
from thermo_roots.demo import MIXTURE_EQUIPMENT

LPG = tr.Mixture({"ethane": 0.05, "propane": 0.62, "isobutane": 0.09, "n-butane": 0.24})


def test_a_fuel_gas_letdown_beside_the_reference_mixture_models_own_step():
    """PCV-610 (invented duty): the outlet is the model's own (P, h) state; the reference's
    outlet is its own (P, h) solve from its own inlet at the same T and P. Measured: PR with the
    fitted kᵢⱼ -32.3 °C, the reference -29.4 °C (the cubic overstates the Joule-Thomson cooling)."""
    duty = MIXTURE_EQUIPMENT["PCV-610"]
    model = tr.PengRobinson(duty.mixture(), kij="fitted")
    inlet = tr.solve(model, **duty.duty)
    valve = steps.throttle(model, inlet, duty.outlet_pressure)
    direct = tr.solve(model, P=duty.outlet_pressure, h=inlet.h)
    assert valve.outlet.T == pytest.approx(direct.T, abs=1e-9)
    assert valve.reference.available
    assert valve.reference.outlet.h == pytest.approx(valve.reference.inlet.h, rel=1e-9)   # isenthalpic
    assert valve.deviation_T_K == pytest.approx(valve.outlet.T - valve.reference.outlet.T)
    assert -5.0 < valve.deviation_T_K < 0.0
    text = repr(valve)
    assert "Vapor fraction (molar)" in text and "Beyond the screening thresholds" in text
    assert "reference mixture model" in valve._repr_html_()


def test_a_compressor_on_a_mixture_applies_the_efficiency_the_right_way_round():
    """h_out = h_in + (h_s - h_in)/eta (Moran & Shapiro, 5th ed., sec. 6.12) on the model's own
    isentropic (P, s) outlet; the work within 3 % of the reference mixture model's (measured -0.6 %)."""
    model = tr.PengRobinson(LPG, kij="fitted")
    inlet = tr.solve(model, T="40 degC", P="3 bar")
    stage = steps.compress(model, inlet, "12 bar", efficiency=0.75)
    assert stage.isentropic_outlet.s == pytest.approx(inlet.s, abs=1e-9)
    assert stage.outlet.h == pytest.approx(inlet.h + (stage.isentropic_outlet.h - inlet.h) / 0.75, rel=1e-12)
    assert stage.work_mass == pytest.approx((stage.outlet.h - inlet.h) / model.molar_mass, rel=1e-9)
    assert stage.work_mass > 0
    assert abs(stage.deviation_work_percent) < 3.0
    assert abs(stage.deviation_T_K) < 2.0


def test_a_wet_compressor_inlet_and_a_frozen_component_are_warned_of():
    model = tr.PengRobinson(LPG, kij="fitted")
    wet = tr.solve(model, T="22 degC", P="6.5 bar")
    assert wet.phase == "two-phase"
    assert any("compressor inlet is two-phase" in w for w in steps.compress(model, wet, "12 bar", 0.75).warnings)
    # CO2-rich liquid let down to near atmospheric pressure ends below CO2's triple point (216.6 K)
    co2 = tr.PengRobinson(tr.Mixture({"CO2": 0.95, "methane": 0.05}), kij="fitted")
    liquid = tr.solve(co2, T="-20 degC", P="60 bar")
    vent = steps.throttle(co2, liquid, "1.2 bar")
    assert vent.outlet.T < 216.6
    assert any(w.startswith("Solid may form") and "carbon dioxide" in w for w in vent.warnings)


def test_a_closed_vessel_of_a_mixture_is_refused_with_what_works():
    model = tr.PengRobinson(LPG)
    state = tr.solve(model, T=295.0, P=6.5e5)
    with pytest.raises(tr.InputError, match="pure fluid today"):
        steps.heat_at_constant_volume(model, state, mass=1.0, P=2e6)
