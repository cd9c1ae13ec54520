"""StatePanel with the energy pairs: every pair solve() takes is offered, each gives the
library's state for the same SI knowns in either basis, the (T, h) case with two pressures
shows both, and refused input stays in its box with the message beside it."""

import itertools
import re

import CoolProp.CoolProp as CP
import pytest

import thermo_roots as tr
from thermo_roots.widgets import StatePanel
from thermo_roots.widgets._inputs import FIELDS, model_label
from thermo_roots.widgets.state_panel import PAIRS

PROPANE = tr.get_fluid("propane")
M = PROPANE.molar_mass
PR = tr.PengRobinson(PROPANE)


def _text(html_text):
    return re.sub(r"\s+", " ", re.sub("<[^>]+>", " ", html_text))


def test_every_pair_that_solve_takes_is_offered():
    # ask solve itself, with the knowns of one propane state (vapor at 20 °C and 5 bar),
    # which pairs of the panel's quantities it takes; the panel must offer each of them
    st = tr.solve(PR, T=293.15, P=5e5)
    value = {"T": st.T, "P": st.P, "v": st.v, "rho": st.rho, "quality": 1.0, "h": st.h, "s": st.s, "u": st.u}
    taken = set()
    for a, b in itertools.combinations(FIELDS, 2):
        try:
            tr.solve(PR, **{a: value[a], b: value[b]})
        except tr.InputError:
            continue                 # not a pair solve understands
        except tr.ThermoRootsError:
            pass                     # a pair, refused for these values (quality 1 is not this state)
        taken.add(frozenset((a, b)))
    offered = {frozenset(pair) for _, pair in PAIRS}
    assert taken == offered
    assert len(offered) == len(PAIRS)                          # no pair twice
    assert {frozenset(("T", "h")), frozenset(("h", "s")), frozenset(("u", "rho"))} <= offered


@pytest.mark.parametrize("pair", [p for _, p in PAIRS], ids=lambda p: "-".join(p))
def test_the_default_text_of_every_pair_is_a_state_of_the_default_fluid(pair):
    panel = StatePanel()                      # propane, Peng-Robinson
    panel.pair.value = pair
    state = panel.solve()
    assert panel.error is None, panel.error
    assert state.reason == "" and state.T > 0 and state.P > 0


# (pair, text typed per field, the same knowns in SI, molar) -- the energies in either basis
_CASES = [
    (("T", "h"), {"T": "20 degC", "h": "610 kJ/kg"}, {"T": 293.15, "h": 610e3 * M}),
    (("T", "h"), {"T": "20 degC", "h": "26.9 kJ/mol"}, {"T": 293.15, "h": 26.9e3}),
    (("T", "s"), {"T": "20 degC", "s": "2.4 kJ/(kg K)"}, {"T": 293.15, "s": 2.4e3 * M}),
    (("T", "s"), {"T": "-10 degC", "s": "60 J/(mol K)"}, {"T": 263.15, "s": 60.0}),
    (("h", "s"), {"h": "610 kJ/kg", "s": "2.4 kJ/(kg K)"}, {"h": 610e3 * M, "s": 2.4e3 * M}),
    (("h", "s"), {"h": "27 kJ/mol", "s": "106 J/(mol K)"}, {"h": 27e3, "s": 106.0}),
    (("u", "v"), {"u": "300 kJ/kg", "v": "0.5 L/mol"}, {"u": 300e3 * M, "v": 0.5e-3}),
    (("u", "v"), {"u": "13 kJ/mol", "v": "0.5 L/mol"}, {"u": 13e3, "v": 0.5e-3}),
    (("u", "rho"), {"u": "300 kJ/kg", "rho": "500 kg/m^3"}, {"u": 300e3 * M, "v": M / 500.0}),
    (("u", "rho"), {"u": "250 kJ/kg", "rho": "10 mol/L"}, {"u": 250e3 * M, "v": 1e-4}),
    (("P", "h"), {"P": "8 bar", "h": "300 kJ/kg"}, {"P": 8e5, "h": 300e3 * M}),
]


@pytest.mark.parametrize("pair, typed, si", _CASES, ids=[f"{'-'.join(c[0])}-{i}" for i, c in enumerate(_CASES)])
def test_each_energy_pair_gives_the_state_solve_gives_for_the_same_SI_knowns(pair, typed, si):
    panel = StatePanel()
    panel.pair.value = pair
    for name, text in typed.items():
        panel.fields[name].text.value = text           # as a person types it, unit and all
    state = panel.solve()
    assert panel.error is None, panel.error
    direct = tr.solve(PR, **si)
    for name in ("T", "P", "v", "quality", "h", "s", "u", "P_other"):
        assert getattr(state, name) == pytest.approx(getattr(direct, name), rel=1e-9, abs=1e-12, nan_ok=True), name
    assert state.phase == direct.phase
    # a unit typed in the box moves to the menu: the number stays, the menu shows the basis
    unit = typed[pair[1]].split(" ", 1)[1]
    assert panel.fields[pair[1]].unit.value == unit
    assert panel.fields[pair[1]].text.value == typed[pair[1]].split(" ", 1)[0]


def test_the_basis_is_the_menu_s_unit_for_a_plain_number():
    panel = StatePanel(T="20 degC", h="610")
    panel.fields["h"].unit.value = "kJ/kg"
    per_kg = panel.solve()
    panel.fields["h"].text.value = str(610 * M)              # the same enthalpy per mole, in kJ/mol
    panel.fields["h"].unit.value = "kJ/mol"
    per_mol = panel.solve()
    assert per_mol.P == pytest.approx(per_kg.P, rel=1e-9)
    assert per_kg.h_mass == pytest.approx(610e3, rel=1e-12)


def test_a_valve_outlet_from_the_panel_is_near_the_reference_equation():
    # propane vapor at 8 bar with h = 610 kJ/kg: CoolProp's (P, h) solve of the Lemmon et al. (2009)
    # equation gives 299.65 K; Peng-Robinson on the same reference state 297.89 K (measured here),
    # a cubic's usual few-kelvin vapor error (common practice)
    panel = StatePanel(P="8 bar", h="610 kJ/kg")
    state = panel.solve()
    T_ref = CP.PropsSI("T", "P", 8e5, "H", 610e3, "Propane")
    assert state.T == pytest.approx(T_ref, abs=3.0)
    assert state.phase == "vapor"


def test_T_h_with_two_pressures_shows_both_and_the_warning():
    panel = StatePanel(T="20 degC", h="610 kJ/kg")
    state = panel.solve()
    assert panel.error is None
    direct = tr.solve(PR, T=293.15, h=610e3 * M)
    assert state.P_other == pytest.approx(direct.P_other, rel=1e-9) and state.P_other > state.P
    # the second pressure really gives the same h at 20 °C: an independent (T, P) solve there
    other = tr.solve(PR, T=293.15, P=state.P_other)
    assert other.h == pytest.approx(state.h, rel=1e-8)
    shown = _text(panel.output.value)
    assert f"{state.P / 1e5:.6g} bar" in shown                 # the reported (lower) pressure
    assert f"Second pressure with this T and h {state.P_other / 1e5:.6g} bar" in shown
    assert "tr-warnings" in panel.output.value
    for sentence in state.warnings:
        assert _text(sentence) in shown.replace("&#x27;", "'")
    assert tr.CAUTION.split(";")[0] in panel.output.value


def test_refused_energy_input_stays_typed_with_the_message_beside_its_field():
    panel = StatePanel(T="20 degC", h="610 kJ/kg")
    good = panel.solve()
    before = panel.output.value
    # below the isotherm's minimum h: no pressure gives it (the library's own refusal)
    panel.fields["h"].text.value = "250 kJ/kg"
    assert panel.solve() is None and panel.result is good and panel.output.value == before
    assert "no pressure gives h" in panel.error
    assert "no pressure gives h" in panel.fields["h"].message.value       # beside the h field
    assert panel.fields["h"].text.value == "250" and panel.fields["h"].unit.value == "kJ/kg"
    # a unit of the wrong kind for an enthalpy
    panel.fields["h"].text.value = "610 kJ/(kg K)"
    assert panel.solve() is None and "wrong kind" in panel.fields["h"].message.value
    assert "610 kJ/(kg K)" in panel.fields["h"].text.value
    # (u, rho) below the co-volume: beside the density
    panel.pair.value = ("u", "rho")
    panel.fields["rho"].text.value = "2000 kg/m^3"
    assert panel.solve() is None and "co-volume" in panel.fields["rho"].message.value
    panel.fields["rho"].text.value = "500 kg/m^3"
    assert panel.solve() is not None and panel.error is None
    assert panel.fields["rho"].message.value == "" and panel.fields["h"].message.value == ""


def test_switching_pairs_keeps_what_was_typed_in_the_fields_that_stay():
    panel = StatePanel(T="35 degC", P="12 bar")
    panel.fields["T"].text.value = "-5"
    panel.fields["T"].unit.value = "degC"
    for pair in (("T", "h"), ("h", "s"), ("T", "s"), ("T", "P")):
        panel.pair.value = pair
        if pair == ("T", "h"):
            panel.fields["h"].text.value = "580 kJ/kg"
        shown = [box.children[1] for box in panel.inlet.known_box.children]
        assert shown == [panel.fields[q].text for q in pair]           # only the pair's fields, in order
        assert panel.fields["T"].text.value == "-5" and panel.fields["T"].unit.value == "degC"
        assert panel.fields["P"].text.value == "12"
    assert panel.fields["h"].text.value == "580" and panel.fields["h"].unit.value == "kJ/kg"
    assert panel.knowns == {"T": "-5 degC", "P": "12 bar"}


def test_model_menu_names_each_model_as_the_model_names_itself():
    for short, cls in tr.MODELS.items():
        label = model_label(short)
        assert label == f"{cls(PROPANE).name} ({short})"
    assert model_label("IG") == "ideal gas (IG)" and model_label("PR") == "Peng-Robinson (PR)"


def test_a_negative_enthalpy_is_a_state_not_an_error():
    # an energy's zero is a convention (common practice: IIR puts h = 200 kJ/kg on saturated
    # liquid at 0 °C, so cold liquid propane has h < 0); the panel must pass it to solve()
    panel = StatePanel(P="10 bar", h="-10 kJ/kg")
    state = panel.solve()
    assert panel.error is None
    direct = tr.solve(PR, P=1e6, h_mass=-1e4)
    assert state.T == pytest.approx(direct.T, rel=1e-12) and state.phase == "liquid"
    assert StatePanel(T="-90 degC", s="-0.05 kJ/(kg K)").solve().s_mass == pytest.approx(-50.0, rel=1e-12)
