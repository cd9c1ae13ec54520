"""The Mixture value and binary interaction parameters: construction, validation, views.

Constants are compared with CoolProp (Bell et al. 2014, Ind. Eng. Chem. Res. 53, 2498),
the reference library the fluid table was generated from.
"""

import dataclasses
import math

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.errors import InputError, UnknownFluidError, WrongTypeError
from thermo_roots.mixtures import BinaryParameters, Mixture

GAS = {"methane": 0.85, "ethane": 0.08, "propane": 0.05, "nitrogen": 0.02}


def test_mixture_exported_at_top_level():
    assert tr.Mixture is Mixture


def test_views_follow_the_order_given():
    gas = Mixture(GAS)
    assert gas.names == ("methane", "ethane", "propane", "nitrogen")
    assert len(gas) == 4
    assert gas.fluids == tuple(tr.get_fluid(n) for n in GAS)
    np.testing.assert_allclose(gas.z, list(GAS.values()), rtol=0, atol=0)
    np.testing.assert_allclose(gas.Tc, [tr.get_fluid(n).Tc for n in GAS], rtol=1e-15)
    with pytest.raises(ValueError):
        gas.z[0] = 0.5   # read-only view: the value cannot be changed through it


def test_molar_mass_against_coolprop_mixture():
    # The z-weighted molar mass against CoolProp's HEOS mixture of the same composition.
    import CoolProp

    gas = Mixture(GAS)
    state = CoolProp.AbstractState("HEOS", "&".join(f.library_name for f in gas.fluids))
    state.set_mole_fractions(list(gas.z))
    assert gas.molar_mass == pytest.approx(state.molar_mass(), rel=1e-12)


def test_list_of_pairs_fluid_objects_and_a_mixture_are_accepted():
    custom = tr.Fluid("my solvent", Tc=600.0, Pc=3.0e6, omega=0.3, molar_mass=0.1)
    mix = Mixture([("methane", 0.4), (custom, 0.6)])
    assert mix.names == ("methane", "my solvent")
    assert mix.molar_mass == pytest.approx(0.4 * tr.get_fluid("methane").molar_mass + 0.06, rel=1e-14)
    assert Mixture(mix) == mix


def test_frozen_hashable_value():
    a, b = Mixture(GAS), Mixture(list(GAS.items()))
    assert a == b and hash(a) == hash(b)
    assert len({a, b}) == 1
    assert Mixture({"methane": 0.5, "ethane": 0.5}) != Mixture({"ethane": 0.5, "methane": 0.5})  # order is part of it
    with pytest.raises(dataclasses.FrozenInstanceError):
        a.fractions = (1.0,)


def test_sum_away_from_one_is_refused_with_the_sum_and_a_hint():
    with pytest.raises(InputError, match=r"sum to 0\.99.*normalize=True"):
        Mixture({"methane": 0.9, "ethane": 0.09})
    with pytest.raises(InputError, match=r"sum to 100\b.*mol %"):
        Mixture({"methane": 90, "ethane": 10})
    Mixture({"methane": 0.9 + 5e-10, "ethane": 0.1})   # within 1e-9


def test_normalize_divides_by_the_sum():
    mix = Mixture({"methane": 90, "ethane": 10}, normalize=True)
    np.testing.assert_allclose(mix.z, [0.9, 0.1], rtol=1e-15)
    assert math.fsum(mix.fractions) == pytest.approx(1.0, abs=1e-15)


@pytest.mark.parametrize("fractions, pattern", [
    ({"methane": -0.1, "ethane": 1.1}, r"'methane' is -0\.1.*>= 0"),
    ({"methane": float("nan"), "ethane": 1.0}, r"'methane' is nan"),
    ({"methane": float("inf"), "ethane": 1.0}, r"'methane' is inf"),
    ({"methane": 0.0, "ethane": 0.0}, r"every mole fraction is 0"),
    ({}, r"no components"),
])
def test_bad_fractions_are_refused(fractions, pattern):
    with pytest.raises(InputError, match=pattern):
        Mixture(fractions, normalize=True)


def test_a_zero_fraction_is_a_component_in_trace():
    mix = Mixture({"methane": 1.0, "ethane": 0.0})
    assert len(mix) == 2 and mix.z[1] == 0


def test_the_same_fluid_under_two_names_is_refused():
    with pytest.raises(InputError, match=r"'carbon dioxide' and 'CO2' are the same fluid"):
        Mixture({"CO2": 0.5, "carbon dioxide": 0.5})
    with pytest.raises(InputError, match=r"same fluid"):
        Mixture([("R744", 0.5), (tr.get_fluid("CO2"), 0.5)])


def test_unknown_names_get_close_matches():
    with pytest.raises(UnknownFluidError, match=r"'metane'.*Did you mean Methane") as err:
        Mixture({"metane": 0.9, "ethane": 0.1})
    assert "Methane" in err.value.suggestions


@pytest.mark.parametrize("bad", ["methane 1.0", 3.0, [("methane",)], [("methane", "one")]])
def test_wrong_types_are_refused(bad):
    with pytest.raises(WrongTypeError):
        Mixture(bad)


@pytest.mark.parametrize("text", [
    "methane 0.85, ethane 0.08, propane 0.07",
    "methane: 85 %, ethane: 8 %, propane: 7 %",
    "methane = 85 mol %; ethane 8 mol%\npropane 7%",
    "Methane 8.5e-1, ETHANE 0.08, n-propane .07",
])
def test_from_text_reads_pasted_compositions(text):
    mix = Mixture.from_text(text)
    assert mix.names == ("methane", "ethane", "propane")
    np.testing.assert_allclose(mix.z, [0.85, 0.08, 0.07], rtol=1e-14)


def test_from_text_names_with_spaces_digits_and_brackets():
    mix = Mixture.from_text("carbon dioxide 0.1, R1234ze(E) 0.4, R32 0.5")
    assert mix.names == ("carbon dioxide", "R1234ze(E)", "R32")


def test_from_text_refuses_a_sum_away_from_1_unless_normalised():
    # the unreadable forms, each naming its line, are in tests/test_mixtures_text.py
    with pytest.raises(InputError, match=r"sum to 0\.95"):
        Mixture.from_text("methane 90 %, ethane 5 %")
    assert Mixture.from_text("methane 90 %, ethane 5 %", normalize=True).z[1] == pytest.approx(5 / 95, rel=1e-14)


def test_repr_and_html_show_the_composition():
    mix = Mixture(GAS)
    assert repr(mix) == "Mixture({'methane': 0.85, 'ethane': 0.08, 'propane': 0.05, 'nitrogen': 0.02})"
    page = mix._repr_html_()
    for needle in ("component", "mole fraction", "Tc [K]", "Pc [MPa]", "ω", "M [g/mol]", "nitrogen", "0.85",
                   f"{tr.get_fluid('ethane').Tc:.6g}", f"{mix.molar_mass * 1e3:.6g}"):
        assert needle in page


def test_with_fractions_keeps_the_components():
    gas = Mixture(GAS)
    liquid = gas.with_fractions([0.1, 0.2, 0.3, 0.4])
    assert liquid.fluids == gas.fluids
    np.testing.assert_array_equal(liquid.z, [0.1, 0.2, 0.3, 0.4])
    assert gas.with_fractions([1, 1, 1, 1], normalize=True).z[2] == pytest.approx(0.25, rel=1e-15)
    with pytest.raises(InputError, match=r"shape \(2,\); this mixture has 4 components"):
        gas.with_fractions([0.5, 0.5])
    with pytest.raises(InputError, match=r"sum to 1\.1"):
        gas.with_fractions([0.5, 0.2, 0.2, 0.2])


def test_index_finds_a_component_by_any_alias():
    mix = Mixture({"methane": 0.9, "CO2": 0.1})
    assert mix.index("carbon dioxide") == 1 and mix.index(tr.get_fluid("R744")) == 1
    with pytest.raises(InputError, match=r"'ethane' is not a component.*methane, carbon dioxide"):
        mix.index("ethane")


# --- binary interaction parameters ----------------------------------------------------

MIX = Mixture({"methane": 0.8, "ethane": 0.1, "carbon dioxide": 0.1})


def test_pairs_are_order_free_and_resolved_through_the_library():
    k = BinaryParameters({("methane", "CO2"): 0.10, ("carbon dioxide", "ethane"): 0.13})
    same = BinaryParameters({("R744", "ethane"): 0.13, ("carbon dioxide", "Methane"): 0.10})
    assert k == same and hash(k) == hash(same)
    matrix = k.matrix(MIX)
    np.testing.assert_array_equal(matrix, [[0, 0, 0.10], [0, 0, 0.13], [0.10, 0.13, 0]])


def test_zero_unless_given():
    np.testing.assert_array_equal(BinaryParameters().matrix(MIX), np.zeros((3, 3)))
    np.testing.assert_array_equal(BinaryParameters({("methane", "ethane"): 0.01}).matrix(MIX)[1:, 2], [0, 0])


def test_from_matrix_round_trip_in_another_order():
    k = BinaryParameters({("methane", "CO2"): 0.10, ("ethane", "CO2"): 0.13})
    other = Mixture({"carbon dioxide": 0.2, "methane": 0.7, "ethane": 0.1})
    assert BinaryParameters.from_matrix(k.matrix(other), other) == k
    assert BinaryParameters.from_matrix(k.matrix(MIX), ["methane", "ethane", "CO2"]) == k


@pytest.mark.parametrize("matrix, pattern", [
    ([[0.1, 0, 0], [0, 0, 0], [0, 0, 0]], r"diagonal must be 0.*k\[0, 0\] = 0\.1"),
    ([[0, 0.1, 0], [0.2, 0, 0], [0, 0, 0]], r"symmetric; k\[0, 1\] = 0\.1 but k\[1, 0\] = 0\.2"),
    ([[0, np.nan, 0], [np.nan, 0, 0], [0, 0, 0]], r"k\[0, 1\] = nan is not finite"),
    ([[0, 1.0, 0], [1.0, 0, 0], [0, 0, 0]], r"\|k\| < 1"),
    ([[0, 0.1], [0.1, 0]], r"shape \(2, 2\).*\(3, 3\)"),
])
def test_matrix_validation(matrix, pattern):
    with pytest.raises(InputError, match=pattern):
        BinaryParameters.from_matrix(matrix, MIX)


def test_pair_validation():
    with pytest.raises(InputError, match=r"one fluid twice"):
        BinaryParameters({("CO2", "carbon dioxide"): 0.1})
    with pytest.raises(InputError, match=r"given twice with different values"):
        BinaryParameters({("methane", "CO2"): 0.1, ("carbon dioxide", "methane"): 0.12})
    with pytest.raises(InputError, match=r"\|k\| < 1"):
        BinaryParameters({("methane", "CO2"): -1.5})
    with pytest.raises(WrongTypeError, match=r"pair of components"):
        BinaryParameters({"methane": 0.1})
    with pytest.raises(UnknownFluidError, match=r"Did you mean"):
        BinaryParameters({("methane", "carbon dioxid"): 0.1})


def test_pairs_outside_the_mixture_are_refused_with_the_names():
    k = BinaryParameters({("methane", "hydrogen sulfide"): 0.08, ("methane", "CO2"): 0.1})
    with pytest.raises(InputError, match=r"hydrogen sulfide is not in the mixture.*methane, ethane, carbon dioxide"):
        k.matrix(MIX)


def test_binary_parameters_repr():
    k = BinaryParameters({("methane", "CO2"): 0.1})
    assert repr(k) == "BinaryParameters({('carbon dioxide', 'methane'): 0.1})"
    assert "kᵢⱼ" in k._repr_html_() and "0.1" in k._repr_html_()


def test_the_ideal_gas_takes_one_pure_fluid_and_says_to_use_a_cubic_for_a_mixture():
    gas = tr.Mixture({"methane": 0.9, "ethane": 0.1})
    assert tr.PengRobinson(gas).n_components == 2        # the cubics take a mixture
    with pytest.raises(tr.InputError, match="one pure fluid.*PengRobinson"):
        tr.IdealGas(gas)


def test_a_blend_by_mass_fractions_has_the_mole_fractions_of_its_molar_masses():
    """R-407C is R32/R125/R134a 23/25/52 % by mass (ANSI/ASHRAE Standard 34); its mole
    fractions 0.381/0.180/0.439 are zᵢ = (wᵢ/Mᵢ)/Σ(wⱼ/Mⱼ) with CoolProp's molar masses
    (the mole fractions recalled from memory as a check)."""
    import CoolProp.CoolProp as CP

    blend = Mixture.from_mass_fractions({"R32": 0.23, "R125": 0.25, "R134a": 0.52})
    M = np.array([CP.PropsSI("M", name) for name in ("R32", "R125", "R134a")])
    w = np.array([0.23, 0.25, 0.52])
    np.testing.assert_allclose(blend.z, (w / M) / np.sum(w / M), rtol=1e-12)
    np.testing.assert_allclose(blend.z, [0.381, 0.180, 0.439], atol=1e-3)
    np.testing.assert_allclose(blend.mass_fractions, w, rtol=1e-12)
    with pytest.raises(InputError):
        Mixture.from_mass_fractions({"R32": 0.23, "R125": 0.25, "R134a": 0.50})
