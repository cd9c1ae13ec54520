"""The fitted kᵢⱼ table: how it was made (regenerating a pair reproduces it), what it gives a
model (kij="fitted"), and its values against published kᵢⱼ of Peng-Robinson."""

from __future__ import annotations

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.mixtures import binary_table, fitted_binary_parameters, missing_fitted_pairs
from thermo_roots.reference.binary_fit import FIT_MODELS, TABLE_PAIRS, fit_kij


def _entry(model, a, b):
    names = {tr.get_fluid(a).library_name, tr.get_fluid(b).library_name}
    for row in binary_table()["pairs"]:
        if set(row["pair"]) == names:
            return row["fits"][model]
    raise AssertionError(f"{a} + {b} not in the table")


def test_the_table_covers_every_pair_and_cubic_and_says_how_it_was_made():
    table = binary_table()
    assert table["command"] == "python -m thermo_roots.reference.binary_fit"
    assert "Brent" in table["about"] and "bubble" in table["about"]
    assert len(table["pairs"]) == len(TABLE_PAIRS)
    for row in table["pairs"]:
        assert set(row["fits"]) == set(FIT_MODELS)
        for fit in row["fits"].values():
            if "k" in fit:     # a fit never does worse than kᵢⱼ = 0 (zero is inside its search)
                assert fit["rms_ln_P"] <= fit["rms_ln_P_at_zero"] + 1e-9
                assert fit["points"] >= 3


def test_regenerating_a_pair_reproduces_the_table():
    """The table is what fit_kij gives today against the reference mixture model (CoolProp HEOS,
    pinned series): methane + nitrogen with Peng-Robinson."""
    fit = fit_kij("PR", "nitrogen", "methane")
    entry = _entry("PR", "methane", "nitrogen")
    assert fit.k == pytest.approx(entry["k"], abs=2e-4)
    assert fit.rms_ln_P == pytest.approx(entry["rms_ln_P"], abs=2e-4)
    assert fit.rms_ln_P < 0.5 * fit.rms_ln_P_zero


@pytest.mark.parametrize("a, b, low, high", [
    # Published PR kᵢⱼ (from memory: Knapp et al., DECHEMA Chemistry Data Series VI (1982);
    # Nishiumi et al. (1988)): methane-CO2 about 0.09-0.10, methane-N2 about 0.03,
    # ethane-CO2 about 0.13, propane-n-butane about 0. A fit to other data lands nearby.
    ("methane", "CO2", 0.07, 0.13), ("methane", "nitrogen", 0.01, 0.06), ("ethane", "CO2", 0.09, 0.16),
    ("propane", "n-butane", -0.02, 0.02)])
def test_fitted_values_lie_near_published_peng_robinson_kij(a, b, low, high):
    assert low <= _entry("PR", a, b)["k"] <= high


def test_a_model_takes_the_fitted_values_and_names_the_pairs_the_table_lacks():
    gas = tr.Mixture({"methane": 0.9, "CO2": 0.05, "decane": 0.05})
    model = tr.PengRobinson(gas, kij="fitted")
    i, j = gas.index("methane"), gas.index("CO2")
    assert model.kij[i, j] == model.kij[j, i] == pytest.approx(_entry("PR", "methane", "CO2")["k"])
    assert model.kij[i, gas.index("decane")] == 0.0
    assert set(model.kij_missing) == {("methane", "n-decane"), ("carbon dioxide", "n-decane")}
    assert fitted_binary_parameters("SRK", gas).matrix(gas)[i, j] == pytest.approx(_entry("SRK", "methane", "CO2")["k"])
    assert len(missing_fitted_pairs("PR", gas)) == 2


def test_fitted_kij_moves_a_bubble_pressure_towards_the_reference():
    """Methane 0.2 / CO2 0.8 at 250 K: the fitted PR bubble pressure is closer to the reference
    mixture model's (CoolProp HEOS) than PR with kᵢⱼ = 0."""
    from thermo_roots.equilibrium.saturation_points import bubble_point
    from thermo_roots.reference import reference_bubble_point

    mix = tr.Mixture({"methane": 0.2, "CO2": 0.8})
    ref = float(reference_bubble_point(mix, T=250.0).P)
    plain = float(bubble_point(tr.PengRobinson(mix), T=250.0).P)
    fitted = float(bubble_point(tr.PengRobinson(mix, kij="fitted"), T=250.0).P)
    assert abs(np.log(fitted / ref)) < 0.5 * abs(np.log(plain / ref))


def test_bad_kij_text_and_fit_requests_are_refused_with_what_to_give():
    with pytest.raises(tr.InputError, match="fitted"):
        tr.PengRobinson(tr.Mixture({"methane": 0.5, "ethane": 0.5}), kij="PR")
    with pytest.raises(tr.InputError, match="not a cubic"):
        fit_kij("ideal", "methane", "ethane")
    with pytest.raises(tr.InputError, match="one fluid"):
        fit_kij("PR", "CO2", "carbon dioxide")
    with pytest.raises(tr.InputError, match="both T and x_light"):
        fit_kij("PR", "methane", "ethane", T=[200.0])


def test_a_state_says_which_pairs_got_no_fitted_kij():
    model = tr.PengRobinson(tr.Mixture({"methane": 0.9, "n-decane": 0.1}), kij="fitted")
    state = tr.solve(model, T=300.0, P=5e6)
    assert any("methane + n-decane" in w and "fit_kij" in w for w in state.warnings)
    assert not any("fitted table" in w for w in tr.solve(tr.PengRobinson(tr.Mixture({"methane": 0.9, "CO2": 0.1}),
                                                                          kij="fitted"), T=300.0, P=5e6).warnings)
