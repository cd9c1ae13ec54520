"""cross_check on a mixture state: the cubic beside the reference mixture model (CoolProp HEOS,
GERG-2008 type) at the same T, P and feed."""

from __future__ import annotations

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.reference import MixtureCrossCheck, reference_mixture_state

LPG = tr.Mixture({"ethane": 0.05, "propane": 0.62, "isobutane": 0.09, "n-butane": 0.24})


def test_a_mixture_state_is_checked_against_the_reference_mixture_model():
    """Liquid, two-phase and vapour states of an LPG at 6.5 bar: the deviations are the model's
    values over the reference mixture model's, evaluated independently here; the phases agree.
    Measured: liquid density +6 %, two-phase vapour fraction -0.004, vapour density +0.6 %."""
    model = tr.PengRobinson(LPG, kij="fitted")
    state = tr.solve(model, T=[250.0, 295.15, 350.0], P=6.5e5)
    check = tr.cross_check(state)
    assert isinstance(check, MixtureCrossCheck)
    ref = reference_mixture_state(LPG, [250.0, 295.15, 350.0], 6.5e5)
    np.testing.assert_allclose(check.deviation_rho_percent, 100 * (1 / state.v / ref.rho - 1), rtol=1e-12)
    assert list(check.phase_agrees) == [True, True, True]
    assert abs(check.deviation_vapor_fraction[1]) < 0.02
    assert abs(check.deviation_rho_percent[2]) < 2.0          # a vapour: a cubic within about 1-2 %
    assert 0 < check.deviation_rho_percent[0] < 12.0          # PR liquids run dense (common practice)
    assert np.isfinite(check.deviation_x[1]) and np.isnan(check.deviation_x[0])
    frame = check.to_frame()
    assert list(frame["reference_phase"]) == ["liquid", "two-phase", "vapor"]


def test_a_scalar_check_reads_at_a_glance_and_marks_large_deviations():
    model = tr.PengRobinson(LPG)                               # kᵢⱼ = 0
    check = tr.cross_check(tr.solve(model, T=250.0, P=6.5e5))
    text = repr(check)
    assert "density" in text and "Do not fill" in text
    marked = check.large_deviations()
    assert marked[1] == (abs(check.deviation_rho_percent) > 5.0)
    assert "<table>" in check._repr_html_()


def test_a_component_without_a_reference_equation_gives_a_reason():
    odd = tr.Fluid("odd gas", Tc=300.0, Pc=4e6, omega=0.1, molar_mass=0.04)
    model = tr.PengRobinson(tr.Mixture([("methane", 0.5), (odd, 0.5)]))
    check = tr.cross_check(tr.solve(model, T=350.0, P=1e6))
    assert not check.available and check.reason
    with pytest.raises(tr.WrongTypeError):
        tr.reference.cross_check_mixture(tr.solve(tr.PengRobinson("propane"), T=300.0, P=1e5))
