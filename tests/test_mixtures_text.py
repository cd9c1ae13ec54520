"""Reading a pasted composition (Mixture.from_text, read_composition_text): each form engineers
paste, and the errors that name the bad line.

The forms are common practice: gas analyses are reported in mol % (ISO 6976 and GPA 2172 give
compositions that way, from memory), spreadsheets put tab-separated columns on the clipboard,
and many locales write a decimal comma. The names resolve through the fluid library, whose
aliases are CoolProp's (Bell et al. 2014, Ind. Eng. Chem. Res. 53, 2498).
"""

import warnings

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.errors import InputError, UnknownFluidError, WrongTypeError
from thermo_roots.mixtures import (PERCENT_SUM_RANGE, Mixture, component_from_text, fraction_from_text,
                                   read_composition_text)

NAMES = ("methane", "ethane", "propane")
Z = [0.85, 0.08, 0.07]


def _quiet(text, **kwargs):
    """from_text where no guess is expected: any warning fails the test."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        return Mixture.from_text(text, **kwargs)


@pytest.mark.parametrize("text", [
    "methane 0.85, ethane 0.08, propane 0.07",                 # one line, commas
    "methane 0.85\nethane 0.08\npropane 0.07\n",               # one per line
    "methane\t0.85\r\nethane\t0.08\r\npropane\t0.07",          # two spreadsheet columns (Windows line ends)
    "methane,0.85\nethane,0.08\npropane,0.07",                 # two columns saved as CSV
    "methane: 85 %, ethane: 8 %, propane: 7 %",                # percent with a sign
    "methane = 85 mol %; ethane 8 mol-%\npropane 7%",          # mixed separators and spellings of %
    "methane 0,85; ethane 0,08; propane 0,07",                 # decimal comma, semicolons
    "methane\t0,85\nethane\t0,08\npropane\t0,07",              # decimal comma, spreadsheet columns
    "methane 0,85\nethane 0,08\npropane 0,07",                 # decimal comma, one per line
    "CH4 0.85, C2H6 0.08, C3H8 0.07",                          # formulas
    "C1 0.85, C2 0.08, C3 0.07",                               # gas-analysis shorthand
    "Methane 8.5e-1, ETHANE 0.08, n-propane .07",              # case, exponent, a CoolProp name
    "methane\u00a00.85, ethane 0.08, propane 0.07",            # a no-break space from a web page
])
def test_each_pasted_form_gives_the_same_mixture(text):
    mix = _quiet(text)
    assert mix.names == NAMES
    np.testing.assert_allclose(mix.z, Z, rtol=1e-14)


def test_numbers_summing_to_100_are_read_as_percent_and_it_says_so():
    with pytest.warns(UserWarning, match=r"sum to 100, so they were read as mole percent"):
        mix = Mixture.from_text("methane 85, ethane 8, propane 7")
    np.testing.assert_allclose(mix.z, Z, rtol=1e-14)
    # an analysis that does not quite close is still percent; the sum is then refused unless normalised
    reading = read_composition_text("C1 85.2, C2 8.1, C3 4.2, iC4 1, nC4 1.2")
    assert reading.notes and "99.7" in reading.notes[0]
    assert sum(f for _, f in reading.pairs) == pytest.approx(0.997, rel=1e-12)
    with pytest.warns(UserWarning), pytest.raises(InputError, match=r"sum to 0\.997"):
        Mixture.from_text("C1 85.2, C2 8.1, C3 4.2, iC4 1, nC4 1.2")
    # outside the range the numbers stay as written (and the sum is refused)
    low, high = PERCENT_SUM_RANGE
    assert read_composition_text(f"methane {low - 1}, ethane 0").notes == ()


def test_a_spreadsheet_header_is_skipped_and_its_percent_sign_taken():
    text = "Component\tmol %\nmethane\t85\nethane\t8\npropane\t7\n"
    reading = read_composition_text(text)
    assert reading.lines == (2, 3, 4)
    assert "header" in reading.notes[0]
    with pytest.warns(UserWarning, match="header"):
        mix = Mixture.from_text(text)
    np.testing.assert_allclose(mix.z, Z, rtol=1e-14)


def test_names_in_one_row_and_numbers_in_the_next():
    with pytest.warns(UserWarning, match="two rows"):
        mix = Mixture.from_text("methane\tethane\tpropane\n0.85\t0.08\t0.07")
    assert mix.names == NAMES
    np.testing.assert_allclose(mix.z, Z, rtol=1e-14)


def test_names_with_spaces_digits_and_brackets():
    mix = _quiet("carbon dioxide 0.1; R1234ze(E) 0.4; R32 0.5")
    assert mix.names == ("carbon dioxide", "R1234ze(E)", "R32")
    mix = _quiet("1-butene\t0.5\nisobutane\t0.5")
    assert [f.library_name for f in mix.fluids] == ["1-Butene", "IsoButane"]


def test_molar_mass_of_a_pasted_gas():
    # component molar masses [g/mol] from IUPAC atomic weights (from memory): CH4 16.043,
    # C2H6 30.069, N2 28.0134, CO2 44.0095; CoolProp's own check is in test_mixtures.py
    mix = _quiet("methane\t0,9\nethane\t0,06\nnitrogen\t0,03\ncarbon dioxide\t0,01")
    expected = 0.9 * 16.043 + 0.06 * 30.069 + 0.03 * 28.0134 + 0.01 * 44.0095
    assert mix.molar_mass * 1e3 == pytest.approx(expected, rel=1e-4)


@pytest.mark.parametrize("text, message", [
    ("methane 0.9\nethane\npropane x", r"line 2 'ethane': 'ethane' has no mole fraction; line 3 'propane x'"),
    ("methane 0.9, 0.1", r"line 1 'methane 0.9, 0.1': '0.1' has no component name"),
    ("methane 85 ethane 15", r"holds several entries: separate them with commas"),
    ("methane 0,85, ethane 0,15", r"decimal comma such as '0,85' is read only where no comma separates"),
    ("methane 90 %, ethane 0.1", r"% sign and line 1 'ethane 0.1' not"),
    ("", r"the text is empty"),
    ("\n \t\n", r"the text is empty"),
    ("methane nan, ethane 1", r"'methane nan' has no mole fraction"),
    ("methane 1,000.5\nethane 0", r"line 1"),
])
def test_unreadable_text_names_the_line(text, message):
    with pytest.raises(InputError, match=message) as err:
        Mixture.from_text(text)
    assert "name and a mole fraction" in str(err.value) or "%" in str(err.value)


def test_an_unknown_name_gets_its_line_and_close_matches():
    with pytest.raises(UnknownFluidError, match=r"line 2 \('metane'\): Unknown fluid 'metane'\. Did you mean "
                                                r"Methane") as err:
        Mixture.from_text("ethane 0.1\nmetane 0.9")
    assert "Methane" in err.value.suggestions


@pytest.mark.parametrize("text, message", [
    ("methane 1.1\nethane \u22120.1", r"line 2 \('ethane'\): the mole fraction is -0\.1"),   # typographic minus
    ("methane 1e400, ethane 0", r"line 1 \('methane'\): the mole fraction is inf"),
    ("methane 0.5\nethane 0.2\nCH4 0.3", r"'methane' and 'CH4' \(lines 1 and 3\) are the same fluid"),
    ("methane 0.9, C6+ 0.1", r"lumped plus fraction"),
])
def test_values_the_mixture_refuses_name_their_line(text, message):
    with pytest.raises(InputError, match=message):
        Mixture.from_text(text)


def test_tiny_fractions_survive():
    mix = _quiet("methane 1, ethane 1e-300")
    assert mix.z[1] == 1e-300


def test_wrong_types():
    with pytest.raises(WrongTypeError):
        Mixture.from_text(["methane 1"])
    with pytest.raises(WrongTypeError):
        fraction_from_text(0.5, "cell")


@pytest.mark.parametrize("text, value", [("0.85", 0.85), ("0,85", 0.85), (".07", 0.07), ("85 %", 0.85),
                                         ("8.5e-1", 0.85), ("  7 mol%", 0.07)])
def test_one_fraction_in_a_cell(text, value):
    assert fraction_from_text(text, "cell") == pytest.approx(value, rel=1e-15)


@pytest.mark.parametrize("text", ["", "x", "1,000.5", "0.5 0.5"])
def test_a_cell_that_is_no_fraction(text):
    with pytest.raises(InputError, match=r"cell: cannot read .* as a mole fraction"):
        fraction_from_text(text, "cell")


def test_shorthand_and_library_names_meet_in_one_fluid():
    assert component_from_text("iC4", "here") == tr.get_fluid("isobutane")
    assert component_from_text("n-C5", "here") == tr.get_fluid("n-pentane")
    assert component_from_text("R-744", "here") == tr.get_fluid("CO2")
