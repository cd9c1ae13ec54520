"""The table of quantities, and energy quantities read at the boundary.

Conversion factors from NIST Special Publication 811 (2008 ed.), Thompson & Taylor, Guide for
the Use of the International System of Units, Appendix B.8 (factors in alphabetical order):
British thermal unit_IT per pound (Btu_IT/lb) = 2.326 E+03 J/kg (exact); Btu_IT per pound
degree Fahrenheit [Btu_IT/(lb·°F)] = 4.1868 E+03 J/(kg·K) (exact), the same for Btu_IT/(lb·°R);
foot per second = 3.048 E-01 m/s (exact); pound-force per square inch = 6.894 757 E+03 Pa;
bar = 1 E+05 Pa (exact). Appendix B.9: a temperature interval of 1 °C is 1 K, of 1 °F is 5/9 K.
"""

import math

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.quantities import QUANTITIES, Quantity, convert, display, quantity, registry, to_other_basis
from thermo_roots.units import split_value, to_si

BTU_PER_LB = 2326.0               # J/kg, NIST SP 811 (2008) B.8, exact
BTU_PER_LB_F = 4186.8             # J/(kg K), NIST SP 811 (2008) B.8, exact
FOOT = 0.3048                     # m, NIST SP 811 (2008) B.8, exact
PSI = 6.894757e3                  # Pa, NIST SP 811 (2008) B.8, given to 7 digits
M = 0.04409562                    # kg/mol, propane (the shipped fluid's value is checked in test_fluids)

CALORIC = ("h", "s", "u", "g", "h_mass", "s_mass", "u_mass", "cp", "cv", "cp_mass", "cv_mass", "w", "mu_jt",
           "kappa_T")


# --------------------------------------------------------------------------- the table

def test_the_table_holds_every_quantity_the_project_reads_or_shows():
    for name in ("T", "P", "v", "rho", "rho_mass", "Z", "quality", *CALORIC):
        row = quantity(name)
        assert isinstance(row, Quantity) and row.name == name
    with pytest.raises(AttributeError):
        QUANTITIES["h"].si_unit = "kJ/kg"          # frozen rows
    with pytest.raises(TypeError):
        QUANTITIES["x"] = QUANTITIES["h"]          # a read-only mapping


def test_unknown_names_are_refused_with_the_allowed_ones_and_a_close_match():
    with pytest.raises(tr.InputError, match=r"Unknown quantity 'hmass'.*h_mass") as info:
        quantity("hmass")
    assert "Did you mean" in str(info.value) and "kappa_T" in str(info.value)
    with pytest.raises(tr.InputError, match="Unknown quantity"):
        to_si("1 kJ/kg", "enthalpy")


@pytest.mark.parametrize("name", list(QUANTITIES))
def test_each_row_agrees_with_pint_and_with_itself(name):
    q = quantity(name)
    ureg = registry()
    if q.dimensionless:
        assert q.si_label == q.display_label == "-" and q.dimension == "dimensionless"
        assert q.si_unit == q.display_unit == ""
    else:
        assert ureg.Quantity(1.0, q.si_unit).check(q.dimension)
        assert ureg.Quantity(1.0, q.display_unit).check(q.dimension)   # the Unicode labels read back as the units they label
        assert to_si(f"1 {q.si_label}", name) == pytest.approx(1.0, rel=1e-12)
        assert to_si(f"1 {q.display_label}", name) == pytest.approx(to_si(f"1 {q.display_unit}", name), rel=1e-12)
        assert "^" not in q.si_label + q.display_label and "*" not in q.si_label + q.display_label
    if q.twin is not None:   # twins point at each other, one per mole and one per kilogram
        twin = quantity(q.twin)
        assert twin.twin == name and {q.basis, twin.basis} == {"molar", "mass"}
        assert twin.reference_power == q.reference_power
    assert q.example and to_si(q.example, name, molar_mass=M) == pytest.approx(
        to_si(q.example, name, molar_mass=M))            # readable and finite
    assert "vapour" not in (q.label + q.description).lower()   # the project's spelling


@pytest.mark.parametrize("name", list(QUANTITIES))
def test_round_trip_through_the_display_unit(name):
    """SI -> the display text engineers read -> to_si gives the SI value back."""
    si = {"T": 288.15, "P": 3.2e5, "quality": 0.35, "Z": 0.87}.get(name)
    if si is None:
        q = quantity(name)
        si = to_si(q.example, name, molar_mass=M)     # a value of the right size for every row
    text = display(si, name, digits=15)
    assert to_si(text, name, molar_mass=M) == pytest.approx(si, rel=1e-12, abs=1e-12)


@pytest.mark.parametrize("name", [n for n, q in QUANTITIES.items() if q.input_units])
def test_every_unit_a_field_offers_reads_as_its_label_says(name):
    for label, code in quantity(name).input_units:
        si = to_si(f"2 {code}", name, molar_mass=M)
        assert math.isfinite(si) and si != 0.0
        if label != "fraction":
            assert to_si(f"2 {label}", name, molar_mass=M) == pytest.approx(si, rel=1e-12)


def test_the_reference_keys_are_names_coolprop_knows_and_the_twins_match_its_values():
    CP = pytest.importorskip("CoolProp.CoolProp")
    T, P = 300.0, 1.0e5             # propane vapor; any single-phase state serves
    M_ref = CP.PropsSI("molar_mass", "T", T, "P", P, "Propane")

    def value(name):
        q = quantity(name)
        return CP.PropsSI(q.reference_key, "T", T, "P", P, "Propane") ** q.reference_power

    for name, q in QUANTITIES.items():
        if name == "quality":
            continue          # defined only in the two-phase region
        assert math.isfinite(value(name)), name
        if q.twin is not None:     # CoolProp's mass-basis value is its molar one over M (or times M)
            assert to_other_basis(value(name), name, M_ref) == pytest.approx(value(q.twin), rel=1e-9), name
    # the keys mean what the rows say: an ideal-gas limit (common practice): kappa_T -> 1/P,
    # and molar volume = 1/Dmolar -> RT/P
    low = 10.0
    kappa = CP.PropsSI(quantity("kappa_T").reference_key, "T", T, "P", low, "Propane")
    assert kappa == pytest.approx(1.0 / low, rel=1e-4)
    v = CP.PropsSI("Dmolar", "T", T, "P", low, "Propane") ** quantity("v").reference_power
    assert v == pytest.approx(8.314462618 * T / low, rel=1e-4)       # R: CODATA 2018


def test_basis_conversion_both_ways():
    assert to_other_basis(2.5e5, "h_mass", M) == pytest.approx(2.5e5 * M, rel=1e-15)
    assert to_other_basis(2.5e5 * M, "h", M) == pytest.approx(2.5e5, rel=1e-15)
    assert to_other_basis(500.0, "rho_mass", M) == pytest.approx(500.0 / M, rel=1e-15)   # densities go the other way
    assert to_other_basis(0.01, "v_mass", M) == pytest.approx(0.01 * M, rel=1e-15)
    with pytest.raises(tr.InputError, match="no mass-basis twin"):
        to_other_basis(1.0, "T", M)


def test_display_in_the_units_engineers_read():
    assert display(2.5e5, "h_mass") == "250 kJ/kg"
    assert display(1.2e3, "s_mass") == "1.2 kJ/(kg K)"
    assert display(298.15, "T") == "25 °C"
    assert display(8e5, "P") == "8 bar"
    assert display(2.5e-6, "mu_jt") == "0.25 K/bar"
    assert display(1e-5, "kappa_T") == "1 1/bar"
    assert display(0.9, "Z") == "0.9"
    assert display(float("nan"), "h") == "-" and display(None, "h") == "-"
    assert display(298.15, "T", "K") == "298.15 K"
    assert convert(np.array([273.15, 373.15]), "T") == pytest.approx([0.0, 100.0])
    assert tr.units.format_value(5e-4, "v") == "0.0005 m³/mol"


# --------------------------------------------------------------------------- energy quantities in to_si

def test_the_dimension_decides_the_basis():
    assert to_si("250 kJ/kg", "h", molar_mass=M) == pytest.approx(250e3 * M, rel=1e-12)
    assert to_si("18 kJ/mol", "h") == pytest.approx(18e3, rel=1e-12)
    assert to_si("18 kJ/mol", "h", molar_mass=M) == pytest.approx(18e3, rel=1e-12)
    assert to_si("250 kJ/kg", "h_mass") == pytest.approx(250e3, rel=1e-12)
    assert to_si("18 kJ/mol", "h_mass", molar_mass=M) == pytest.approx(18e3 / M, rel=1e-12)
    assert to_si("1.2 kJ/(kg K)", "s", molar_mass=M) == pytest.approx(1.2e3 * M, rel=1e-12)
    assert to_si("1.2 kJ/(kg K)", "s_mass") == pytest.approx(1.2e3, rel=1e-12)
    assert to_si("200 kJ/kg", "u_mass") == pytest.approx(200e3, rel=1e-12)
    assert to_si("75 J/(mol K)", "cp_mass", molar_mass=M) == pytest.approx(75 / M, rel=1e-12)
    ureg = registry()
    got = to_si(ureg.Quantity(np.array([250.0, 300.0]), "kJ/kg"), "h", molar_mass=M)
    assert got == pytest.approx(np.array([250e3, 300e3]) * M, rel=1e-12)


@pytest.mark.parametrize("text", [
    "1.2 kJ/(kg K)", "1.2 kJ/kg/K", "1.2 kJ/kgK", "1.2 kJ/kg K", "1.2 kJ/(kg·K)", "1.2 kJ/(kg⋅K)", "1.2 kJ/kg-K",
    "1.2 kJ/(kg.K)", "1.2 kJ/(kg*K)", "1.2 kJ/(kg °C)", "1.2 kJ/(kg degC)", "1.2 kJ/kg°C", "1.2 kJ/(kg C)",
    "1.2 kJ/(kg deg C)", "1.2 J/(g K)",
])
def test_entropy_units_as_engineers_type_them(text):
    # a temperature in an entropy unit is a difference: 1 °C the size of 1 K (NIST SP 811 B.9);
    # read as an offset, °C would give 1.2e3 / 274.15 instead
    assert to_si(text, "s_mass") == pytest.approx(1.2e3, rel=1e-12)
    assert to_si(text, "s", molar_mass=M) == pytest.approx(1.2e3 * M, rel=1e-12)


@pytest.mark.parametrize("text, name, expected", [
    ("1 Btu/lb", "h_mass", BTU_PER_LB), ("1 BTU/lb", "h_mass", BTU_PER_LB), ("1 Btu/lbm", "u_mass", BTU_PER_LB),
    ("10 Btu/lb", "h_mass", 10 * BTU_PER_LB),
    ("1 Btu/(lb °F)", "s_mass", BTU_PER_LB_F), ("1 Btu/(lb·°F)", "s_mass", BTU_PER_LB_F),
    ("1 Btu/lb°F", "cp_mass", BTU_PER_LB_F), ("1 Btu/(lbm degF)", "cv_mass", BTU_PER_LB_F),
    ("1 Btu/(lb °R)", "s_mass", BTU_PER_LB_F), ("1 Btu/(lb R)", "s_mass", BTU_PER_LB_F),
    ("1 kJ/kg", "h_mass", 1e3), ("1 kJ/(kg K)", "s_mass", 1e3), ("1 J/(mol·K)", "s", 1.0),
    ("1 J/mol K", "cp", 1.0), ("1 kJ/(kmol K)", "s", 1.0), ("1 kJ/kmol", "h", 1.0),
    ("1 ft/s", "w", FOOT), ("1 km/h", "w", 1 / 3.6),
    ("1 K/bar", "mu_jt", 1e-5), ("1 °C/bar", "mu_jt", 1e-5), ("1 °F/psi", "mu_jt", 5 / 9 / PSI),
    ("1 1/bar", "kappa_T", 1e-5), ("1 bar⁻¹", "kappa_T", 1e-5), ("1 1/psi", "kappa_T", 1 / PSI),
])
def test_energy_and_derived_units_against_nist_sp_811(text, name, expected):
    rel = 1e-6 if "psi" in text else 1e-12           # psi is given to 7 digits, the others are exact
    assert to_si(text, name) == pytest.approx(expected, rel=rel)


def test_btu_per_pound_on_the_molar_basis():
    assert to_si("1 Btu/lb", "h", molar_mass=M) == pytest.approx(BTU_PER_LB * M, rel=1e-12)
    assert to_si("1 Btu/(lb °F)", "s", molar_mass=M) == pytest.approx(BTU_PER_LB_F * M, rel=1e-12)


@pytest.mark.parametrize("text, name, fragments", [
    ("250 kJ/kg", "h", ("per kilogram", "molar_mass=", "'18 kJ/mol'")),
    ("1.2 kJ/(kg K)", "s", ("per kilogram", "molar_mass=")),
    ("18 kJ/mol", "h_mass", ("per mole", "molar_mass=", "'250 kJ/kg'")),
    ("250 bar", "h", ("wrong kind", "bar", "h is a molar enthalpy [J/mol]")),
    ("250 kJ/kg", "s_mass", ("wrong kind", "s_mass is a specific entropy [J/(kg K)]", "'1.2 kJ/(kg K)'")),
    ("3 m/s", "mu_jt", ("wrong kind", "Joule–Thomson")),
    ("0.5 kg", "Z", ("plain number",)),
    ("5 parsnips/kg", "h_mass", ("Cannot read the unit",)),
])
def test_energy_quantities_refuse_what_they_cannot_be(text, name, fragments):
    with pytest.raises(tr.InputError) as info:
        to_si(text, name)
    for fragment in fragments:
        assert fragment in str(info.value)


def test_a_wrong_kind_with_a_molar_mass_offers_both_bases():
    with pytest.raises(tr.InputError, match=r"e\.g\. '18 kJ/mol' or '250 kJ/kg'"):
        to_si("250 bar", "h", molar_mass=M)


def test_a_reciprocal_unit_is_not_a_digit_group():
    assert split_value("0.01 1/bar") == (0.01, "1/bar")
    with pytest.raises(tr.InputError, match="without spaces"):
        split_value("1 000 bar")


# --------------------------------------------------------------------------- readers of the table

def test_sweep_columns_take_their_units_from_the_table():
    from thermo_roots.sweeps import _unit_of

    expected = {"T": "K", "P": "Pa", "v": "m³/mol", "v_root_2": "m³/mol", "rho": "mol/m³",
                "rho_mass_liquid": "kg/m³", "Z": "-", "quality": "-", "P_sat": "Pa", "T_sat": "K",
                "T_other": "K", "reference_rho_mass": "kg/m³", "deviation_v_percent": "%", "deviation_T_K": "K",
                "phase": "", "n_roots": "", "reference_available": "", "h": "J/mol", "h_mass": "J/kg",
                "reference_s_mass": "J/(kg K)", "cp": "J/(mol K)", "w": "m/s", "mu_jt": "K/Pa", "kappa_T": "1/Pa"}
    assert {c: _unit_of(c) for c in expected} == expected


def test_panel_fields_take_units_and_labels_from_the_table():
    pytest.importorskip("ipywidgets")
    from thermo_roots.widgets._inputs import LABELS, UNITS, QuantityField

    assert list(UNITS) == ["T", "P", "v", "rho", "quality", "h", "s", "u"]   # the state panel's fields
    assert UNITS["P"] == QUANTITIES["P"].input_units and LABELS["v"] == "Volume"
    field = QuantityField("h_mass", "250")
    assert field.unit.value == "kJ/kg" and field.label.value == "<b>Enthalpy</b>"
    assert field.to_si() == pytest.approx(250e3)
    field = QuantityField("s", "1.2 kJ/(kg K)")
    assert field.to_si(molar_mass=M) == pytest.approx(1.2e3 * M, rel=1e-12)
