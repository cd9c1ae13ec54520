"""Unit conversion at the boundary; factors from NIST SP 811 (2008) unless marked."""

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.units import to_si


@pytest.mark.parametrize("text, quantity, expected", [
    ("35 degC", "T", 308.15), ("35 °C", "T", 308.15), ("95 degF", "T", 308.15), ("300 K", "T", 300.0),
    ("80 bar", "P", 8.0e6), ("1160 psi", "P", 1160 * 6894.757293168), ("2.5 MPa", "P", 2.5e6),
    ("0.5 L/mol", "v", 5e-4), ("500 cm^3/mol", "v", 5e-4), ("12 mol/L", "rho", 12000.0),
    ("850 kg/m^3", "rho_mass", 850.0), ("30 %", "quality", 0.3), ("0.3", "quality", 0.3),
    ("850 kg/m3", "rho_mass", 850.0), ("500 cm3/mol", "v", 5e-4), ("0.01 m3/kg", "rho_mass", None),
])
def test_text_with_units(text, quantity, expected):
    if expected is None:  # a specific volume is no density: refused, not misread
        with pytest.raises(tr.InputError):
            to_si(text, quantity)
        return
    assert to_si(text, quantity) == pytest.approx(expected, rel=1e-12)


def test_gauge_pressure_must_be_explicit_and_uses_the_stated_atmosphere():
    assert to_si("8 barg", "P") == pytest.approx(8e5 + 101325.0)  # standard atmosphere, ISO 2533
    assert to_si("120 psig", "P") == pytest.approx(120 * 6894.757293168 + 101325.0)
    assert to_si("2 bar(g)", "P", atmosphere="95 kPa") == pytest.approx(2e5 + 95e3)
    assert to_si("8 bar", "P") == pytest.approx(8e5)  # absolute unless marked gauge


def test_pint_quantities_and_arrays():
    ureg = tr.units.registry()
    assert to_si(ureg.Quantity(25.0, "degC"), "T") == pytest.approx(298.15)
    assert to_si(ureg.Quantity(np.array([1.0, 2.0]), "bar"), "P") == pytest.approx([1e5, 2e5])
    assert isinstance(to_si(300.0, "T"), float)
    np.testing.assert_array_equal(to_si([1.0, 2.0], "P"), [1.0, 2.0])


def test_specific_volume_is_converted_with_molar_mass():
    assert to_si("0.01 m^3/kg", "v", molar_mass=0.044) == pytest.approx(4.4e-4)


@pytest.mark.parametrize("value, quantity, fragment", [
    ("80 degC", "P", "wrong kind"), ("abc", "T", "write a number"), ("5 parsnips", "P", "unit"),
    (float("nan"), "T", "not finite"), (float("inf"), "P", "not finite"), ("12 kg", "quality", "fraction"),
])
def test_bad_values_raise_input_errors(value, quantity, fragment):
    with pytest.raises(tr.InputError, match=fragment):
        to_si(value, quantity)
