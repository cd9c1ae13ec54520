"""The value-with-unit fields of the panels: a typed unit wins visibly, a decimal comma is
read, a gauge reading below vacuum is explained in the user's units, the number box asks for
a number when the unit comes from the menu, and the atmosphere is checked as itself.

Factors from NIST Special Publication 811 (2008 ed.), Appendix B.8: bar = 1 E+05 Pa,
kgf/cm² = 9.806 65 E+04 Pa, psi = 6.894 757 E+03 Pa, standard atmosphere 1.013 25 E+05 Pa.
"""

import html
from types import SimpleNamespace

import numpy as np
import pytest

from thermo_roots.widgets import StatePanel
from thermo_roots.widgets._inputs import QuantityField
from thermo_roots.widgets._render import convergence_text

ATM = 1.01325e5        # NIST SP 811 (2008), B.8, exact
KGF_CM2 = 9.80665e4    # NIST SP 811 (2008), B.8, exact
PSI = 6.894757e3       # NIST SP 811 (2008), B.8, to 7 digits


def panel_at(P="8 barg", **kwargs):
    return StatePanel(fluid="propane", model="PR", T="20 degC", P=P, **kwargs)


def test_a_typed_unit_from_the_menu_moves_to_the_menu():
    panel = panel_at()
    field = panel.fields["P"]
    assert field.unit.value == "barg"
    field.text.value = "80 bar"                  # typed while the menu says barg
    assert (field.text.value, field.unit.value) == ("80", "bar")
    assert panel.solve().P == pytest.approx(80e5)
    for typed, number, code in (("14.7 psia", "14.7", "psi"), ("500 KPag", "500", "kPag"),
                                ("2 bar(g)", "2", "barg"), ("1,5 bara", "1,5", "bar")):
        field.text.value = typed
        assert (field.text.value, field.unit.value) == (number, code), typed
    T = panel.fields["T"]
    T.text.value = "77 deg F"
    assert (T.text.value, T.unit.value) == ("77", "degF")


def test_a_typed_unit_not_in_the_menu_blanks_the_menu():
    panel = panel_at()
    field = panel.fields["P"]
    field.text.value = "1 kgf/cm2g"
    assert field.unit.value is None and field.text.value == "1 kgf/cm2g"
    assert panel.solve().P == pytest.approx(KGF_CM2 + ATM)
    field.text.value = "3"                       # a plain number, and no unit anywhere
    assert panel.solve() is None
    assert "Choose a unit in the menu" in field.message.value
    field.unit.value = "bar"
    assert panel.solve().P == pytest.approx(3e5)


def test_an_unreadable_typed_unit_leaves_the_menu_alone():
    panel = panel_at()
    field = panel.fields["P"]
    field.text.value = "8 metres"
    assert field.unit.value == "barg" and field.text.value == "8 metres"
    field.text.value = "10 mPa"                  # could be misread: refused, not moved
    assert field.unit.value == "barg"
    assert panel.solve() is None and "millipascal" in field.message.value


def test_a_decimal_comma_is_read():
    panel = panel_at(P="1,5")
    field = panel.fields["P"]
    field.unit.value = "bar"
    assert panel.solve().P == pytest.approx(1.5e5)
    field.unit.value = "barg"
    assert panel.solve().P == pytest.approx(1.5e5 + ATM)
    field.text.value = "1,500"                   # thousands or decimal: asked, not guessed
    assert panel.solve() is None
    assert "1.500" in field.message.value and "1500" in field.message.value


def test_below_vacuum_is_said_in_the_users_units():
    panel = panel_at(P="-2 barg")
    assert panel.solve() is None
    message = panel.fields["P"].message.value
    assert "-2 barg" in message and "below vacuum at the set atmosphere 1.01325 bar" in message
    assert "Pa" not in message.replace("(bar)", "")
    panel.atmosphere.text.value = "95"
    panel.atmosphere.unit.value = "kPa"
    assert panel.solve() is None
    assert "set atmosphere 0.95 bar" in panel.fields["P"].message.value
    panel.fields["P"].text.value = "-0.5"
    assert panel.solve().P == pytest.approx(0.45e5)


def test_an_absolute_value_below_zero_is_said_in_the_users_units():
    panel = panel_at(P="-2 bar")
    assert panel.solve() is None
    message = panel.fields["P"].message.value
    assert "Pressure -2 bar is not above zero" in message and "choose barg in the menu" in message
    assert "Pa" not in message
    panel = StatePanel(fluid="propane", model="PR", T="-300 degC", P="8 bar")
    assert panel.solve() is None
    assert "-300 °C is at or below absolute zero" in panel.fields["T"].message.value


@pytest.mark.parametrize("menu, fragment", [("bar", "write a number in bar"), ("barg", "write a number in barg")])
def test_the_number_box_asks_for_a_number_when_the_menu_gives_the_unit(menu, fragment):
    panel = panel_at(P="abc")
    panel.fields["P"].unit.value = menu
    assert panel.solve() is None
    message = panel.fields["P"].message.value
    assert fragment in message and "number and a unit" not in message and "e.g. 8" in message


def test_quality_box_asks_for_a_number():
    panel = StatePanel(fluid="propane", model="PR", T="20 degC", quality="half")
    assert panel.solve() is None
    assert "write a number, e.g. 0.3" in panel.fields["quality"].message.value


@pytest.mark.parametrize("typed, fragment", [
    ("8 barg", "is a gauge pressure"), ("abc", "Cannot read atmosphere = 'abc'"), ("1.01325", "write '1.01325 bar'"),
    ("-1 bar", "surrounding air"),
])
def test_the_atmosphere_is_checked_beside_its_own_field(typed, fragment):
    panel = panel_at()
    panel.atmosphere.text.value = typed
    if typed == "1.01325":
        panel.atmosphere.unit.value = "Pa"
    assert panel.solve() is None
    assert fragment in html.unescape(panel.atmosphere.message.value)
    assert panel.fields["P"].message.value == ""         # not blamed on the pressure


def test_numpy_scalars_fill_fields_in_si():
    # before: np.float32 and np.int64 were not taken as numbers, and 300 was read in °C, 8e5 in bar
    panel = StatePanel(fluid="propane", model="PR", T=np.float32(300.0), P=np.int64(800_000),
                       atmosphere=np.float64(95_000.0))
    assert (panel.fields["T"].unit.value, panel.fields["P"].unit.value) == ("K", "Pa")
    state = panel.solve()
    assert state.T == pytest.approx(300.0) and state.P == pytest.approx(8e5)
    rho = StatePanel(fluid="propane", model="PR", T="20 degC", rho_mass=np.float32(500.0))
    assert rho.fields["rho"].unit.value == "kg/m^3"


def test_a_number_whose_si_unit_is_not_offered_says_its_unit():
    field = QuantityField("P", units=[("bar", "bar"), ("psi", "psi")])
    field.set(2.5e5)
    assert field.to_si() == pytest.approx(2.5e5)
    assert field.unit.value is None and field.text.value == "250000 Pa"


def test_the_collected_table_scrolls_inside_the_output_area():
    panel = panel_at(tag="V-212")
    panel.solve()
    panel.add_to_table()
    shown = panel.table_html.value
    assert "overflow-x:auto" in shown and "max-width:100%" in shown
    assert "<th style='padding:2px 5px;border-bottom:1px solid #ddd;text-align:left;vertical-align:bottom'>" in shown
    assert panel.table_html.layout.overflow == "auto"       # the widget itself scrolls, inside the panel
    assert "T [°C]" in shown and "kg/m³" in shown and "degC" not in shown


def test_one_iteration_is_singular():
    record = SimpleNamespace(method="chandrupatla", iterations=np.array(1), evaluations=np.array(3),
                             status="converged")
    state = SimpleNamespace(convergence=record, knowns=("T", "quality"), phase="two-phase")
    text = convergence_text(state)
    assert "1 iteration," in text and "3 evaluations" in text


def test_custom_constants_take_a_decimal_comma():
    import thermo_roots as tr

    panel = StatePanel(fluid="custom", model="PR", T="20 degC", P="8 bar")
    ff = panel.fluid_field
    ff.Tc.set("369,89 K")
    ff.Pc.set("42,51 bar")
    ff.omega.value, ff.molar_mass.value = "0,1521", "44,1"
    fluid = ff.fluid()
    assert (fluid.Tc, fluid.Pc, fluid.omega, fluid.molar_mass) == pytest.approx((369.89, 42.51e5, 0.1521, 0.0441))
    ff.omega.value = "0.15 bar"
    with pytest.raises(tr.ThermoRootsError, match="acentric factor '0.15 bar' must be a plain number"):
        ff.fluid()
    ff.omega.value, ff.molar_mass.value = "0.152", "44,097"
    with pytest.raises(tr.ThermoRootsError, match="44.097 .decimal comma. or 44097"):
        ff.fluid()
    assert "44097" in ff.custom_message.value


def test_volume_translation_of_the_ideal_gas_is_refused_beside_the_model():
    # the ideal gas has no co-volume b (P v = R T), so there is nothing to translate (common practice)
    import thermo_roots as tr
    from thermo_roots.widgets._inputs import ModelField

    field = ModelField("IG", volume_shift="peneloux")
    with pytest.raises(tr.ThermoRootsError, match="no co-volume"):
        field.model(tr.get_fluid("propane"))
    assert "no co-volume" in field.message.value
    shifted = ModelField("PR", volume_shift="peneloux").model(tr.get_fluid("propane"))
    assert shifted.c != 0.0 and "translated" in shifted.name
