"""Units as engineers type them, the atmosphere as its own checked argument, and values no
quantity can take.

Conversion factors from NIST Special Publication 811 (2008 ed.), Thompson & Taylor, Guide
for the Use of the International System of Units, Appendix B.8 and B.9:
psi = 6.894 757 E+03 Pa, kgf/cm² = technical atmosphere = 9.806 65 E+04 Pa (exact),
standard atmosphere = 1.013 25 E+05 Pa (exact), bar = 1 E+05 Pa (exact), millibar = 1 E+02 Pa,
torr = 1.333 224 E+02 Pa; T/K = t/°C + 273.15, T/K = (t/°F + 459.67)/1.8, T/K = (T/°R)/1.8.
"""

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.units import WrongTypeError, check_atmosphere, read_unit, split_value, to_si

PSI = 6.894757e3        # NIST SP 811 (2008), B.8; given there to 7 digits
KGF_CM2 = 9.80665e4     # NIST SP 811 (2008), B.8, exact
ATM = 1.01325e5         # NIST SP 811 (2008), B.8, exact (standard atmosphere)
TORR = 1.333224e2       # NIST SP 811 (2008), B.8
BAR = 1.0e5             # NIST SP 811 (2008), B.8, exact


@pytest.mark.parametrize("text, expected", [
    ("14.7 psia", 14.7 * PSI), ("14.7 PSIA", 14.7 * PSI), ("1 bara", BAR), ("1 BARA", BAR),
    ("1 PSIG", PSI + ATM), ("1 PSI", PSI), ("1 Psi", PSI), ("10 KPa", 1e4), ("10 kpa", 1e4),
    ("10 Mpa", 1e7), ("10 MPA", 1e7), ("3 Bar", 3 * BAR), ("1 kgf/cm2g", KGF_CM2 + ATM),
    ("1 kgf/cm2", KGF_CM2), ("1 kgf/cm²", KGF_CM2), ("2 kgf/cm^2 (g)", 2 * KGF_CM2 + ATM),
    ("1 ata", KGF_CM2), ("1 atg", KGF_CM2 + ATM), ("1 atm", ATM), ("750 torr", 750 * TORR),
    ("5 bar(a)", 5 * BAR), ("5 bar abs", 5 * BAR), ("5 bar gauge", 5 * BAR + ATM), ("5 BARG", 5 * BAR + ATM),
    ("500 kPa(g)", 5e5 + ATM), ("1.2 MPag", 1.2e6 + ATM), ("20 mbarg", 20 * 1e2 + ATM),
    ("−0.5 barg", -0.5 * BAR + ATM),          # a Unicode minus, as pasted from a document
    ("-5 psig", -5 * PSI + ATM),               # a vacuum reading above absolute zero pressure
])
def test_pressures_as_engineers_type_them(text, expected):
    assert to_si(text, "P") == pytest.approx(expected, rel=1e-6)   # the factors are given to 7 digits


@pytest.mark.parametrize("text, expected", [
    ("25 deg C", 298.15), ("25 °C", 298.15), ("25 ° C", 298.15), ("25 degC", 298.15), ("25 C", 298.15),
    ("25 ºC", 298.15), ("25 Celsius", 298.15), ("25 DEG C", 298.15), ("77 °F", (77 + 459.67) / 1.8),
    ("77 deg F", (77 + 459.67) / 1.8), ("536.67 R", 536.67 / 1.8), ("298.15 k", 298.15),
    ("298.15 °K", 298.15), ("25degC", 298.15),
])
def test_temperatures_as_engineers_type_them(text, expected):
    assert to_si(text, "T") == pytest.approx(expected, rel=1e-12)   # NIST SP 811 (2008), B.9


@pytest.mark.parametrize("text, quantity, expected", [
    ("1,5 bar", "P", 1.5e5), ("0,500 bar", "P", 0.5e5), ("12,25 °C", "T", 285.4), ("0,3", "quality", 0.3),
    ("1,5 barg", "P", 1.5e5 + ATM), ("2,5e1 bar", "P", 25e5), ("850 kg/m³", "rho_mass", 850.0),
])
def test_a_decimal_comma_where_it_cannot_be_misread(text, quantity, expected):
    assert to_si(text, quantity) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("text, quantity, fragments", [
    ("10 mPa", "P", ("millipascal", "write MPa", "e.g. '10 MPa'")),
    ("10 mpa", "P", ("millipascal", "write MPa")),
    ("1 Mbar", "P", ("megabar", "mbar for millibar")),
    ("1 kg/cm2", "P", ("mass per area", "kgf/cm2")),
    ("25 deg", "T", ("which scale", "°C")),
    ("1,500 bar", "P", ("1.500", "1500", "thousands separator")),
    ("1.234,5 bar", "P", ("one decimal point", "thousands separators")),
    ("1 000 bar", "P", ("without spaces",)),
    ("5 parsnips", "P", ("pressure unit 'parsnips'", "barg", "psia", "e.g. '80 bar'")),
    ("80 degC", "P", ("wrong kind", "P is a pressure")),
])
def test_what_can_be_misread_is_refused_with_the_reason(text, quantity, fragments):
    with pytest.raises(tr.InputError) as info:
        to_si(text, quantity)
    for fragment in fragments:
        assert fragment in str(info.value)


def test_gauge_below_vacuum_is_refused_in_the_units_it_was_written_in():
    with pytest.raises(tr.InputError) as info:
        to_si("-2 barg", "P")
    text = str(info.value)
    assert "below vacuum at the set atmosphere 1.01325 bar" in text
    assert "-0.98675 bar absolute" in text and "Pa" not in text.replace("(bar)", "")
    with pytest.raises(tr.InputError, match="set atmosphere 0.95 bar"):
        to_si("-0.96 barg", "P", atmosphere="95 kPa")
    assert to_si("-0.94 barg", "P", atmosphere="95 kPa") == pytest.approx(0.01e5)
    with pytest.raises(tr.InputError, match=r"atmosphere 14\.6959 psi"):      # 101325 / 6894.757
        to_si("-15 psig", "P")
    with pytest.raises(tr.InputError, match="below vacuum"):                  # exactly vacuum: no fluid
        to_si("-1.01325 barg", "P")


@pytest.mark.parametrize("atmosphere, fragment", [
    ("abc", "Cannot read atmosphere"), (float("nan"), "atmosphere = nan is not finite"),
    (float("inf"), "atmosphere = inf"), (-5.0, "surrounding air"), ("-1 bar", "surrounding air"),
    ("8 barg", "is a gauge pressure"), (1.01325, "Numbers are read in Pa"), (14.7, "for psi '14.7 psia'"),
    ([1e5, 1e5], "one pressure"), ("80 degC", "wrong kind"),
])
def test_atmosphere_is_its_own_checked_argument(atmosphere, fragment):
    for call in (lambda: to_si("1 barg", "P", atmosphere=atmosphere),
                 lambda: to_si("1 bar", "P", atmosphere=atmosphere),   # refused even when unused
                 lambda: check_atmosphere(atmosphere)):
        with pytest.raises(tr.InputError) as info:
            call()
        assert fragment in str(info.value) and str(info.value).startswith(("atmosphere", "Cannot read atmosphere"))


def test_atmosphere_is_named_through_solve():
    pr = tr.PengRobinson(tr.get_fluid("propane"))
    for bad in ("abc", float("nan"), -101325.0, "8 barg", True):
        with pytest.raises(tr.InputError, match="atmosphere"):
            tr.solve(pr, T=300.0, P="1 barg", atmosphere=bad)


@pytest.mark.parametrize("atmosphere, expected", [
    ("0.95 bar", 0.95e5), ("14.7 psia", 14.7 * PSI), (np.float32(95000.0), 95000.0), (95000, 95000.0),
    (np.int64(95000), 95000.0), ("760 torr", 760 * TORR), ("1 atm", ATM),
])
def test_good_atmospheres(atmosphere, expected):
    assert check_atmosphere(atmosphere) == pytest.approx(expected, rel=1e-6)   # factors to 7 digits
    assert to_si("1 barg", "P", atmosphere=atmosphere) == pytest.approx(BAR + expected, rel=1e-6)
    ureg = tr.units.registry()
    assert check_atmosphere(ureg.Quantity(0.95, "bar")) == pytest.approx(0.95e5)


@pytest.mark.parametrize("value", [True, False, np.bool_(True), [300.0, True], np.array([True, False])])
@pytest.mark.parametrize("quantity", ["T", "P", "v", "rho", "rho_mass", "quality"])
def test_booleans_are_refused_for_every_quantity(value, quantity):
    with pytest.raises(WrongTypeError, match="yes/no") as info:
        to_si(value, quantity)
    assert isinstance(info.value, TypeError) and isinstance(info.value, tr.InputError)
    assert quantity in str(info.value)


def test_booleans_are_refused_through_solve():
    pr = tr.PengRobinson(tr.get_fluid("propane"))
    with pytest.raises(TypeError, match="T = True is a yes/no value"):
        tr.solve(pr, T=True, P=1e5)
    with pytest.raises(tr.InputError, match="quality = True"):
        tr.solve(pr, T=300.0, quality=True)


@pytest.mark.parametrize("value, expected", [
    (np.float32(300.5), 300.5), (np.int64(300), 300.0), (np.float16(300.0), 300.0), (np.uint16(300), 300.0),
    (np.float64(300.25), 300.25), (np.int32(300), 300.0),
])
def test_numpy_scalar_types_are_numbers(value, expected):
    si = to_si(value, "T")
    assert isinstance(si, float) and si == pytest.approx(expected, rel=1e-12)


def test_numpy_scalars_solve_like_python_numbers():
    pr = tr.PengRobinson(tr.get_fluid("propane"))
    # the same state with Python floats; the model is not in doubt, only the argument types
    direct = tr.solve(pr, T=300.0, P=1e5)
    assert tr.solve(pr, T=np.float32(300.0), P=np.int64(100000)).v == pytest.approx(direct.v, rel=1e-12)


def test_masked_arrays_are_refused_where_masked_or_give_nan_on_request():
    T = np.ma.masked_array([300.0, 1e20, 310.0, -1.0], mask=[False, True, False, True])
    with pytest.raises(tr.InputError) as info:
        to_si(T, "T")
    text = str(info.value)
    assert "masked at index 1 of 4 values" in text and "2 such values" in text
    assert "1e+20" not in text and "array(" not in text
    got = to_si(T, "T", nonfinite="nan")
    assert np.isnan(got[[1, 3]]).all() and got[[0, 2]] == pytest.approx([300.0, 310.0])
    plain = to_si(np.ma.masked_array([300.0, 310.0], mask=[False, False]), "T")
    assert plain == pytest.approx([300.0, 310.0]) and not np.ma.isMaskedArray(plain)


def test_non_finite_elements_are_named_by_index_without_internal_text():
    T = np.full(100_000, 300.0)
    T[54321] = np.nan
    with pytest.raises(tr.InputError) as info:
        to_si(T, "T")
    text = str(info.value)
    assert "index 54321 of 100000 values (nan)" in text and len(text) < 200
    with pytest.raises(tr.InputError) as info:
        to_si(np.array([np.nan]), "T")
    assert "array(" not in str(info.value) and "index 0 of 1 value " in str(info.value)
    assert np.isnan(to_si(T, "T", nonfinite="nan")[54321])
    with pytest.raises(tr.InputError, match="'1e400 bar' is not finite"):
        to_si("1e400 bar", "P")
    with pytest.raises(tr.InputError, match="nonfinite"):
        to_si(300.0, "T", nonfinite="ignore")


@pytest.mark.parametrize("value, fragment", [
    (None, "T = None is not a number"), (1 + 2j, "complex"), (["300 K", "310 K"], "list of texts"),
    ([[300.0, 310.0], [320.0]], "regular array"), ({"T": 300.0}, "not a number"),
])
def test_wrong_types_are_type_errors_naming_the_quantity(value, fragment):
    with pytest.raises(WrongTypeError, match=fragment):
        to_si(value, "T")


def test_the_reading_pieces_the_panels_use():
    assert split_value("1,5 barg") == (1.5, "barg")
    assert split_value("  −20 °C ") == (-20.0, "°C")
    assert read_unit("PSIG", "P") == ("psi", True)
    assert read_unit("psia", "P") == ("psi", False)
    assert read_unit("kgf/cm2 g", "P") == ("kgf/cm^2", True)
    assert read_unit("deg C", "T") == ("degC", False)
    assert read_unit("kg/m3", "rho_mass") == ("kg/m^3", False)
