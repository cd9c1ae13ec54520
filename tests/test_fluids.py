"""Fluid lookup against CoolProp's fluid library."""

import CoolProp
import numpy as np
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


def test_shipped_library_table_agrees_with_the_installed_coolprop():
    # The table lets get_fluid skip CoolProp's slow import. It was generated from the CoolProp
    # release named in its "source" field; pyproject.toml allows that major series only. A
    # later release may add fluids or refine a constant in the last digits: every shipped
    # fluid must still exist and agree to 1e-9 (a larger change means: regenerate the table
    # with `python -m thermo_roots.fluids`).
    from thermo_roots.fluids import LIBRARY_TABLE, library_table_from_coolprop
    import json

    shipped = json.loads(LIBRARY_TABLE.read_text(encoding="utf-8"))
    live = library_table_from_coolprop()
    assert shipped["source"].startswith("CoolProp ")
    missing = sorted(set(shipped["fluids"]) - set(live["fluids"]))
    assert not missing, f"{live['source']} no longer has {missing}; regenerate the table"
    for name, entry in shipped["fluids"].items():
        now = live["fluids"][name]
        for key in ("Tc", "Pc", "omega", "molar_mass"):
            assert entry[key] == pytest.approx(now[key], rel=1e-9), (name, key, shipped["source"], live["source"])
        assert entry["CAS"] == now["CAS"], name
        # the ideal-gas terms of the reference equation (thermo_roots.ideal_gas): same kinds
        # and count of terms, every coefficient to 1e-9
        ideal, ideal_now = entry["ideal_gas"], now["ideal_gas"]
        assert sorted(ideal) == sorted(ideal_now), name
        for key, value in ideal.items():
            assert np.shape(value) == np.shape(ideal_now[key]), (name, key)
            np.testing.assert_allclose(value, ideal_now[key], rtol=1e-9, atol=1e-12, err_msg=f"{name} {key}")


def test_library_fluids_carry_the_names_engineers_write():
    # the reference library's identifiers stay in library_name; results show everyday names
    assert tr.get_fluid("CO2").name == "carbon dioxide"
    assert tr.get_fluid("propane").name == "propane"
    assert tr.get_fluid("R134a").name == "R134a"
    assert tr.get_fluid("isobutane").name == "isobutane"
    assert tr.get_fluid("CO2").library_name == "CarbonDioxide"


def test_numpy_scalars_are_accepted_as_constants_and_booleans_are_not():
    import numpy as np

    f = tr.Fluid("x", Tc=np.float32(350.0), Pc=np.int64(4_000_000), omega=np.float64(0.2), molar_mass=0.05)
    assert type(f.Tc) is float and f.Pc == 4.0e6 and f.Tc == pytest.approx(350.0)
    with pytest.raises(tr.InputError, match="Tc"):
        tr.Fluid("x", Tc=True, Pc=4e6, omega=0.2, molar_mass=0.05)
    with pytest.raises(tr.InputError, match="Tc"):
        tr.Fluid("x", Tc=np.array([350.0, 360.0]), Pc=4e6, omega=0.2, molar_mass=0.05)
