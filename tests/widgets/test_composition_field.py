"""The composition field driven from Python, as a panel or a notebook would: paste text, edit
the table, add and remove rows, Normalise, and watch ``value``.

The mixture's molar mass is checked against the components' molar masses from the IUPAC
standard atomic weights (CIAAW 2021; the values from memory); normalising against plain numpy
division. The test gas is a
pipeline-gas-like composition made up for the test.
"""

import html
import re

import numpy as np
import pytest

from thermo_roots.mixtures import Mixture
from thermo_roots.widgets.composition import CompositionField

PASTED = "methane 85\nethane 8\npropane 6.5"           # mol % that do not close: 99.5


def _watch(field):
    seen = []
    field.observe(lambda change: seen.append(change["new"]), "value")
    return seen


def test_pasted_percent_fills_the_table_and_says_how_it_was_read():
    field = CompositionField(PASTED)
    assert field.entries == [("methane", "0.85"), ("ethane", "0.08"), ("propane", "0.065")]
    assert "read as mole percent" in field.note
    assert field.value is None and field.last_valid is None       # 0.995 is not 1
    assert "0.995" in field.summary.value and "Normalise" in field.error


def test_normalise_scales_to_one_and_says_by_how_much():
    field = CompositionField(PASTED)
    seen = _watch(field)
    field.normalise_button.click()
    expected = np.array([0.85, 0.08, 0.065]) / 0.995
    assert isinstance(field.value, Mixture)
    np.testing.assert_allclose(field.value.z, expected, rtol=1e-14)
    assert sum(field.value.fractions) == pytest.approx(1.0, abs=1e-15)
    assert "summed to 0.995" in field.note and "multiplied by 1.00503" in field.note
    assert f"{expected[0] - 0.85:+.3g}" in field.note and "methane" in field.note
    assert field.entries[0] == ("methane", f"{expected[0]:.6g}")           # the table shows it
    assert field.text.value.splitlines()[0] == f"methane {expected[0]:.6g}"   # and the text box
    assert seen == [field.value]
    field.normalise()
    assert "Already normalised" in field.note and seen == [field.value]


def test_summary_line_shows_sum_and_molar_mass():
    field = CompositionField({"methane": 0.9, "ethane": 0.06, "nitrogen": 0.03, "CO2": 0.01})
    # molar masses [g/mol] from IUPAC atomic weights (from memory): CH4 16.043, C2H6 30.069,
    # N2 28.0134, CO2 44.0095
    expected = 0.9 * 16.043 + 0.06 * 30.069 + 0.03 * 28.0134 + 0.01 * 44.0095
    assert field.value.molar_mass * 1e3 == pytest.approx(expected, rel=1e-4)
    shown = float(re.search(r"molar mass <b>([\d.]+) g/mol", field.summary.value)[1])
    assert shown == pytest.approx(expected, rel=1e-4)
    assert "Sum of mole fractions <b>1</b>" in field.summary.value and "4 components" in field.summary.value


def test_editing_the_table_rewrites_the_text_and_the_value():
    field = CompositionField("methane 0.9, ethane 0.1")
    seen = _watch(field)
    field.rows[1].fraction.value = "0,05"
    field.add_row("propane", "5 %")
    assert field.value == Mixture({"methane": 0.9, "ethane": 0.05, "propane": 0.05})
    assert field.text.value == "methane 0.9\nethane 0.05\npropane 0.05"
    assert Mixture.from_text(field.text.value) == field.value           # the text reads back the same
    field.remove_row(2)
    assert field.value is None and field.last_valid.names == ("methane", "ethane", "propane")
    assert seen[-1] is None and len(field.rows) == 2


def test_an_unknown_name_is_explained_in_its_row_and_the_last_good_mixture_kept():
    field = CompositionField("methane 0.9, ethane 0.1")
    good = field.value
    field.rows[0].name.value = "metane"
    assert field.value is None and field.last_valid == good
    assert "did you mean methane" in field.rows[0].message.value
    assert field.error.startswith("Row 1:")
    field.rows[0].name.value = "C1"                      # shorthand from a gas analysis
    assert field.value == good and field.rows[0].message.value == "" and field.error is None


def test_unreadable_text_says_why_beside_the_box_and_keeps_the_table():
    field = CompositionField("methane 0.9, ethane 0.1")
    field.text.value = "methane 0.9\nethane"
    assert "line 2 'ethane'" in html.unescape(field.text_message.value)
    assert field.value is None and field.entries == [("methane", "0.9"), ("ethane", "0.1")]
    field.text.value = "methane 0.8; ethane 0.2"
    assert field.text_message.value == "" and field.value.fractions == (0.8, 0.2)


@pytest.mark.parametrize("fraction, words", [("x", "cannot read 'x'"), ("-0.1", "finite and >= 0"),
                                             ("nan", "cannot read 'nan'"), ("1e400", "finite and >= 0")])
def test_a_bad_fraction_in_a_row(fraction, words):
    field = CompositionField("methane 0.9, ethane 0.1")
    field.rows[1].fraction.value = fraction
    assert field.value is None and words in field.error


def test_rows_without_a_name_or_empty_and_a_field_with_nothing():
    field = CompositionField()
    assert field.value is None and "No components yet" in field.error
    field.add_row()                                      # an empty row is ignored
    assert "No components yet" in field.error
    field.rows[0].fraction.value = "1"
    assert "give the component's name" in html.unescape(field.rows[0].message.value)
    field.rows[0].name.value = "propane"
    assert field.value == Mixture({"propane": 1.0})


def test_normalise_refuses_what_it_cannot_scale():
    field = CompositionField("methane 0, ethane 0")
    field.normalise()
    assert "Nothing to normalise" in field.note and field.value is None
    field.rows[0].fraction.value = "abc"
    field.normalise()
    assert "cannot read 'abc'" in field.note


def test_the_same_fluid_twice_and_a_plus_fraction():
    field = CompositionField("methane 0.5\nCH4 0.5")
    assert field.value is None and "Row 2: the same fluid as row 1 (methane)" in field.error
    assert "same fluid as row 1" in field.rows[1].message.value
    field.set("methane 0.9, C7+ 0.1")
    assert "lumped plus fraction" in field.rows[1].message.value


def test_setting_the_same_text_again_reads_it_again():
    field = CompositionField("methane 0.9, ethane 0.1")
    field.rows[0].name.value = "argon"
    field.set("methane 0.9\nethane 0.1")              # what the box already holds, after the table edit
    assert field.value == Mixture({"methane": 0.9, "ethane": 0.1})


def test_wrong_type_is_refused():
    from thermo_roots.errors import WrongTypeError

    with pytest.raises(WrongTypeError):
        CompositionField(3.0)


def test_a_fluid_of_ones_own_keeps_its_name_in_the_table():
    from thermo_roots import Fluid

    solvent = Fluid("my solvent", Tc=600.0, Pc=3.0e6, omega=0.3, molar_mass=0.1)
    field = CompositionField([("methane", 0.4), (solvent, 0.6)])
    assert field.value.fluids[1] is solvent and field.entries[1] == ("my solvent", "0.6")
    field.rows[0].fraction.value = "0.5"
    field.rows[1].fraction.value = "0.5"
    assert field.value.fluids[1] is solvent and field.value.fractions == (0.5, 0.5)
