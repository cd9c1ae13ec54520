"""Fluid lookup against CoolProp's fluid library."""

import CoolProp
import pytest

import thermo_roots as tr


@pytest.mark.parametrize("alias, library_name", [
    ("CO2", "CarbonDioxide"), ("carbon dioxide", "CarbonDioxide"), ("R744", "CarbonDioxide"),
    ("R-744", "CarbonDioxide"), ("n-butane", "n-Butane"), ("N-BUTANE", "n-Butane"), ("R600", "n-Butane"),
    ("R134a", "R134a"), ("r-134A", "R134a"), ("water", "Water"), ("H2O", "Water"), ("steam", "Water"),
    ("propane", "n-Propane"), ("R290", "n-Propane"), ("124-38-9", "CarbonDioxide"),  # CAS of CO2
])
def test_aliases_reach_the_library_fluid(alias, library_name):
    # aliases as listed by CoolProp's fluid library; everyday names are common practice
    assert tr.get_fluid(alias).library_name == library_name


def test_constants_are_those_of_the_reference_equation():
    # CoolProp's HEOS critical point of CO2 is Span & Wagner (1996): 304.1282 K, 7.3773 MPa (from memory)
    f = tr.get_fluid("CO2")
    assert f.Tc == pytest.approx(304.1282, abs=1e-3)
    assert f.Pc == pytest.approx(7.3773e6, rel=1e-5)
    state = CoolProp.AbstractState("HEOS", "CarbonDioxide")
    assert f.omega == state.acentric_factor()
    assert f.molar_mass == pytest.approx(0.0440098, rel=1e-6)  # IUPAC atomic weights, from memory


def test_every_library_fluid_has_usable_constants():
    names = tr.fluid_names()
    assert len(names) > 100
    for name in names:
        f = tr.get_fluid(name)
        assert f.Tc > 0 and f.Pc > 0 and f.molar_mass > 0


def test_unknown_fluid_offers_close_matches():
    with pytest.raises(tr.UnknownFluidError) as err:
        tr.get_fluid("propan")
    assert "n-Propane" in err.value.suggestions
    assert "propan" in str(err.value) and "n-Propane" in str(err.value)
    assert isinstance(err.value, ValueError)


def test_user_defined_fluid_and_its_validation():
    f = tr.Fluid("my blend", Tc=350.0, Pc=4.0e6, omega=0.2, molar_mass=0.05)
    assert (f.name, f.Tc, f.Pc, f.omega, f.molar_mass, f.library_name) == ("my blend", 350.0, 4.0e6, 0.2, 0.05, None)
    for bad in (dict(Tc=-1.0), dict(Pc=0.0), dict(molar_mass=float("nan")), dict(omega=float("inf"))):
        kwargs = dict(Tc=350.0, Pc=4.0e6, omega=0.2, molar_mass=0.05) | bad
        with pytest.raises(tr.InputError):
            tr.Fluid("bad", **kwargs)


def test_shipped_library_table_is_what_coolprop_reports():
    # the table lets get_fluid skip CoolProp's slow import; it must hold CoolProp's values exactly
    from thermo_roots.fluids import LIBRARY_TABLE, library_table_from_coolprop
    import json

    shipped = json.loads(LIBRARY_TABLE.read_text(encoding="utf-8"))
    live = library_table_from_coolprop()
    assert shipped["fluids"] == live["fluids"], "run `python -m thermo_roots.fluids` to refresh the table"
