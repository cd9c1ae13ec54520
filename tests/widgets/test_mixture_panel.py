"""The mixture state panel driven from Python, as a notebook would: fill the fields, press
Solve, read ``.result`` and the rendered HTML.

What it shows must be the library's own answer: ``thermo_roots.solve`` on the same model, T
and P; the reference mixture model's own call at the same T and P. Each phase's h and s,
which the panel computes per phase, must add up by the lever rule to the state's h and s
(an energy balance over the phases, common practice). The gauge reading uses the standard
atmosphere, 101325 Pa (ISO 2533:1975). Compositions are the invented site's (demo.py).
"""

import re

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.demo import MIXTURE_EQUIPMENT
from thermo_roots.widgets.mixture_panel import MixturePanel

V640 = MIXTURE_EQUIPMENT["V-640"]          # LPG flash drum, two-phase at 22 °C and 6.5 bar (invented)
PCV610 = MIXTURE_EQUIPMENT["PCV-610"]      # fuel-gas letdown inlet, 8 °C and 62 barg (invented)


def _text(html):
    return re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html)).replace("&#x27;", "'")


def test_two_phase_state_is_the_librarys_flash_and_is_shown():
    panel = MixturePanel(V640.mixture(), "PR", T="22 degC", P="6.5 bar", tag="V-640")
    state = panel.solve()
    direct = tr.solve(tr.PengRobinson(V640.mixture(), kij="fitted"), T=295.15, P=6.5e5)
    assert panel.error is None and state is panel.result and state.phase == direct.phase == "two-phase"
    np.testing.assert_allclose(state.vapor_fraction, direct.vapor_fraction, rtol=1e-12)
    np.testing.assert_allclose(state.x, direct.x, rtol=1e-12)
    np.testing.assert_allclose(state.y, direct.y, rtol=1e-12)
    np.testing.assert_allclose(state.v, direct.v, rtol=1e-12)
    shown = _text(panel.output.value)
    assert "V-640" in shown and f"{direct.vapor_fraction:.6g}" in shown
    for name, x, y in zip(direct.model.components.names, direct.x, direct.y):
        assert f"{name} " in shown and f"{x:.6g}" in shown and f"{y:.6g}" in shown
    assert "Caution." in shown and "licensed engineer" in shown
    assert "kᵢⱼ fitted to the reference mixture model" in shown
    from thermo_roots.widgets.mixture_panel import kij_note    # a pair the fitted table lacks is said
    odd = tr.PengRobinson(tr.Mixture({"methane": 0.9, "n-decane": 0.1}), kij="fitted")
    assert "lacks methane–n-decane" in kij_note(tr.PengRobinson(tr.Mixture({"methane": 0.9, "CO2": 0.05,
                                                                             "n-decane": 0.05}), kij="fitted"))
    assert "every kᵢⱼ = 0 (the fitted table has none" in kij_note(odd)


def test_each_phases_h_and_s_add_up_to_the_states_by_the_lever_rule():
    panel = MixturePanel(V640.mixture(), T="22 degC", P="6.5 bar")
    state = panel.solve()
    rows = re.findall(r"<tr><td[^>]*>(liquid|vapor)</td>(.*?)</tr>", panel.output.value)
    assert [r[0] for r in rows] == ["liquid", "vapor"]
    cells = [[float(c) for c in re.findall(r">([-+\d.e]+)</td>", r[1])] for r in rows]
    masses = state.model.components.molar_masses
    M = [float(state.x @ masses), float(state.y @ masses)]
    beta = state.vapor_fraction
    # columns: amount, Z, v [L/mol], rho [kg/m³], h [kJ/kg], s [kJ/(kg K)]
    assert cells[0][0] == pytest.approx(1 - beta, rel=1e-4) and cells[1][0] == pytest.approx(beta, rel=1e-4)
    h = (1 - beta) * cells[0][4] * M[0] + beta * cells[1][4] * M[1]
    s = (1 - beta) * cells[0][5] * M[0] + beta * cells[1][5] * M[1]
    assert h * 1e3 == pytest.approx(state.h, rel=1e-4)           # 5 digits shown
    assert s * 1e3 == pytest.approx(state.s, rel=1e-4)
    assert cells[0][3] == pytest.approx(M[0] / state.v_liquid, rel=1e-4)


def test_gauge_pressure_single_phase_and_the_kij_box():
    panel = MixturePanel(PCV610.mixture(), "SRK", T="8 degC", P="62 barg")
    fitted = panel.solve()
    assert fitted.P == pytest.approx(62e5 + 101325.0, rel=1e-12)
    assert fitted.phase == tr.solve(tr.SoaveRedlichKwong(PCV610.mixture(), kij="fitted"), T=281.15,
                                    P=62e5 + 101325.0).phase
    shown = _text(panel.output.value)
    assert "Soave" in shown and "liquid x" in shown and "–" in shown     # no liquid phase: its column blank
    panel.model_field.zero_kij.value = True
    zero = panel.solve()
    assert not np.any(zero.model.kij) and np.any(fitted.model.kij)
    direct = tr.solve(tr.SoaveRedlichKwong(PCV610.mixture()), T=281.15, P=62e5 + 101325.0)
    np.testing.assert_allclose(zero.v, direct.v, rtol=1e-12)
    assert "every kᵢⱼ = 0" in _text(panel.output.value)


def test_bad_input_keeps_the_previous_result_and_what_was_typed():
    panel = MixturePanel(V640.mixture())
    good = panel.solve()
    shown = panel.output.value
    panel.temperature.text.value = "twenty"
    assert panel.solve() is None
    assert "twenty" in panel.error and "twenty" in panel.temperature.message.value
    assert panel.temperature.text.value == "twenty"               # nothing typed is lost
    assert panel.result is good and panel.output.value == shown
    panel.temperature.text.value = "-300"
    panel.temperature.unit.value = "degC"
    assert panel.solve() is None and "absolute zero" in panel.temperature.message.value
    panel.temperature.text.value = "22"
    assert panel.solve() is not None and panel.error is None and panel.temperature.message.value == ""


def test_a_composition_edit_disables_then_re_enables_solving():
    panel = MixturePanel("propane 0.6, n-butane 0.4", T="25 degC", P="5 bar")
    first = panel.solve()
    panel.composition.rows[1].fraction.value = "0.3"            # sums to 0.9
    assert panel.composition.value is None and panel.solve_button.disabled
    assert panel.solve() is None and panel.error.startswith("Composition:") and "0.9" in panel.error
    assert panel.result is first
    panel.composition.normalise()
    assert not panel.solve_button.disabled
    assert "edited" in panel.status.value                          # the shown state is for the old feed
    second = panel.solve()
    np.testing.assert_allclose(second.z, [0.6 / 0.9, 0.3 / 0.9], rtol=1e-12)
    assert panel.status.value == ""


def test_reference_check_is_the_reference_call_at_the_same_state():
    from thermo_roots.reference.mixture import reference_mixture_state

    panel = MixturePanel("propane 0.6, n-butane 0.4", T="27 degC", P="6 bar")
    assert panel.reference_button.disabled                          # nothing to check yet
    state = panel.solve()
    check = panel.check_reference()
    direct = reference_mixture_state(state.model.components, state.T, state.P)
    assert check.available and check.phase == direct.phase == "two-phase"
    assert check.vapor_fraction == pytest.approx(direct.vapor_fraction, rel=1e-9)
    shown = _text(panel.reference_output.value)
    assert f"{direct.vapor_fraction:.5g}" in shown and "own binary parameters" in shown
    # the model and the reference agree on this LPG split to a few percent (the cubic's
    # stated accuracy, common practice): a sanity check of what is set side by side
    assert abs(state.vapor_fraction - direct.vapor_fraction) < 0.05
    panel.solve()
    assert panel.check is None and panel.reference_output.value == ""   # a new state clears the old check


def test_refused_models_and_kij_say_what_is_allowed():
    with pytest.raises(tr.InputError, match="PR, SRK, PR78"):
        MixturePanel(model="vdW")
    with pytest.raises(tr.InputError, match="fitted"):
        MixturePanel(kij=0.1)


def test_large_reference_deviations_are_shaded():
    from thermo_roots.reference import LARGE_DEVIATION_PERCENT

    panel = MixturePanel(V640.mixture(), T="22 degC", P="6.5 bar")
    state = panel.solve()
    check = panel.check_reference()
    shaded = re.findall(r"<td class='tr-large'[^>]*>([^<]*)</td>", panel.reference_output.value)
    rho_l = float(state.x @ state.model.components.molar_masses) / state.v_liquid
    ref_l = check.rho_liquid * float(check.x @ state.model.components.molar_masses)
    large = abs(rho_l - ref_l) / ref_l * 100 > LARGE_DEVIATION_PERCENT
    assert (f"{(rho_l - ref_l) / ref_l * 100:+.3g} %" in shaded) == large
    assert f"{(state.rho_mass - check.rho_mass) / check.rho_mass * 100:+.3g} %" not in shaded   # about 1 %
