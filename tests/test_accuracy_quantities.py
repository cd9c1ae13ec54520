"""Accuracy maps of h, cp and w: the same numbers as a direct cross-check and as CoolProp,
an honest measure where h crosses zero, the colour bar and the panel following the quantity."""

import CoolProp.CoolProp as CP
import matplotlib
import numpy as np
import pytest

matplotlib.use("Agg")

import thermo_roots as tr  # noqa: E402
from thermo_roots import accuracy as acc  # noqa: E402
from thermo_roots import plots  # noqa: E402
from thermo_roots.reference import cross_check  # noqa: E402

GRID = dict(T=(190.0, 500.0), P=(0.5e5, 80e5), n=7, progress=False)


@pytest.fixture(scope="module")
def propane():
    return tr.get_fluid("propane")


@pytest.fixture(scope="module")
def maps(propane):
    return {q: acc.accuracy_map(propane, ["PR", "SRK"], quantity=q, **GRID) for q in ("v", "h", "s", "cp", "w")}


@pytest.mark.parametrize("quantity", ["cp", "w"])
def test_cp_and_w_deviations_are_those_of_a_direct_cross_check(maps, propane, quantity):
    pts = maps[quantity].points
    assert tuple(pts.columns) == acc.point_columns(quantity)
    for label, cls in (("PR", tr.PengRobinson), ("SRK", tr.SoaveRedlichKwong)):
        sample = pts[pts["model"] == label].iloc[::5]
        check = cross_check(tr.solve(cls(propane), T=sample["T"].to_numpy(), P=sample["P"].to_numpy()),
                            with_saturation=False)
        np.testing.assert_allclose(sample["deviation"], getattr(check, f"deviation_{quantity}_percent"),
                                   rtol=1e-10)
        np.testing.assert_allclose(sample["deviation_percent"], sample["deviation"], rtol=0)
    # the reference values are CoolProp's (PropsSI, a separate path)
    row = pts.iloc[3]
    key = {"cp": "Cpmolar", "w": "speed_of_sound"}[quantity]
    assert row[f"{quantity}_reference"] == pytest.approx(CP.PropsSI(key, "T", row["T"], "P", row["P"],
                                                                    "HEOS::Propane"), rel=1e-9)
    assert pts.attrs["units"]["deviation"] == "%" and maps[quantity].summary.attrs["units"]["mean_abs_deviation"] == "%"


def test_h_is_measured_in_kj_per_kg_and_stays_finite_where_h_crosses_zero(maps, propane):
    amap = maps["h"]
    pts = amap.points
    assert "deviation_percent" not in pts and amap.points.attrs["deviation_unit"] == "kJ/kg"
    M = propane.molar_mass
    row = pts.iloc[4]
    h_ref = CP.PropsSI("Hmolar", "T", row["T"], "P", row["P"], "HEOS::Propane")
    assert row["h_reference"] == pytest.approx(h_ref, rel=1e-9, abs=1e-6)
    assert row["deviation"] == pytest.approx((row["h_model"] - h_ref) / M / 1e3, rel=1e-9)
    # the grid crosses h = 0 (the reference equation's zero, IIR for propane: 200 kJ/kg for
    # saturated liquid at 0 °C, so about -80 °C in the liquid): there a percentage of h would
    # explode, the difference does not
    near_zero = pts[np.abs(pts["h_reference"]) < 8.314 * pts["T"]]
    assert len(near_zero) >= 2
    assert np.abs(near_zero["deviation"]).max() < 20.0
    # the shares follow the measure: the percentage of a region's points within 1 and 5 kJ/kg
    liquid = pts[(pts["model"] == "PR") & (pts["phase_reference"] == "liquid")]
    agree = liquid["phase_model"] == liquid["phase_reference"]
    s = amap.summary
    pr_liquid = s[(s["model"] == "PR") & (s["region"] == "liquid")].iloc[0]
    for limit in (1, 5):
        share = 100.0 * ((liquid["deviation"].abs() <= limit) & agree).mean()
        assert pr_liquid[f"percent_within_{limit}"] == pytest.approx(share)
    assert s.attrs["units"]["mean_abs_deviation"] == "kJ/kg"


def test_h_map_equals_the_cross_checks_difference(maps, propane):
    pts = maps["h"].points
    sample = pts[pts["model"] == "SRK"].iloc[::4]
    check = cross_check(tr.solve(tr.SoaveRedlichKwong(propane), T=sample["T"].to_numpy(), P=sample["P"].to_numpy()),
                        with_saturation=False)
    np.testing.assert_allclose(sample["deviation"], check.deviation_h / propane.molar_mass / 1e3, rtol=1e-10)


def test_s_map_is_the_cross_checks_difference_per_kilogram(maps, propane):
    pts = maps["s"].points
    assert pts.attrs["deviation_unit"] == "J/(kg K)" and "deviation_percent" not in pts
    sample = pts[pts["model"] == "PR"].iloc[::4]
    check = cross_check(tr.solve(tr.PengRobinson(propane), T=sample["T"].to_numpy(), P=sample["P"].to_numpy()),
                        with_saturation=False)
    np.testing.assert_allclose(sample["deviation"], check.deviation_s / propane.molar_mass, rtol=1e-10)
    row = pts.iloc[2]
    s_ref = CP.PropsSI("Smolar", "T", row["T"], "P", row["P"], "HEOS::Propane")     # CoolProp directly
    assert row["s_reference"] == pytest.approx(s_ref, rel=1e-9)


def test_v_map_keeps_its_columns(maps):
    amap = maps["v"]
    assert tuple(amap.points.columns) == acc.POINT_COLUMNS and amap.quantity == "v"
    np.testing.assert_allclose(amap.points["deviation"], amap.points["deviation_percent"], rtol=0)


@pytest.mark.parametrize("bad", ["rho", "H", "", None, 3])
def test_unknown_quantities_are_refused_with_the_allowed_list(bad):
    with pytest.raises(tr.InputError, match="allowed: 'v', 'h', 's', 'cp', 'w'"):
        acc.accuracy_map("propane", ["PR"], T=[300.0], P=[1e5], quantity=bad)


def test_h_map_needs_the_reference_equations_zero(propane):
    with pytest.raises(tr.InputError, match="reference_state='reference'"):
        acc.accuracy_map(propane, [tr.PengRobinson(propane, reference_state="ASHRAE")], T=[300.0], P=[1e5],
                         quantity="h")
    # a relative measure does not depend on the zero
    acc.accuracy_map(propane, [tr.PengRobinson(propane, reference_state="ASHRAE")], T=[300.0], P=[1e5],
                     quantity="cp", progress=False)


@pytest.mark.parametrize("quantity, words", [("v", "Molar volume deviation [%]"),
                                             ("h", "Enthalpy, model − reference [kJ/kg]"),
                                             ("s", "Entropy, model − reference [J/(kg K)]"),
                                             ("cp", "Isobaric heat capacity deviation [%]"),
                                             ("w", "Speed of sound deviation [%]")])
def test_colour_bar_and_titles_name_the_quantity(maps, quantity, words):
    axes = plots.plot_accuracy_maps(maps[quantity])
    bar = axes[0].collections[0].colorbar
    assert words in bar.ax.get_ylabel()
    assert maps[quantity].measure.what in axes[0].figure._suptitle.get_text()
    one = plots.plot_accuracy_map(maps[quantity], "SRK")
    assert words in one.collections[0].colorbar.ax.get_ylabel()
    assert maps[quantity].measure.what in one.get_title()
    matplotlib.pyplot.close("all")


def test_combined_chunks_keep_the_quantity(propane):
    parts = [acc.accuracy_map(propane, ["PR"], T=T, P=[1e5, 1e6], quantity="w", progress=False)
             for T in ([250.0, 300.0], [350.0, 400.0])]
    whole = acc.AccuracyMap.combine(parts)
    assert whole.quantity == "w" and whole.summary.attrs["units"]["mean_abs_deviation"] == "%"
    direct = acc.accuracy_map(propane, ["PR"], T=[250.0, 300.0, 350.0, 400.0], P=[1e5, 1e6], quantity="w",
                              progress=False)
    assert whole.summary.equals(direct.summary)


def test_panel_maps_the_chosen_quantity():
    from thermo_roots.widgets import AccuracyPanel

    panel = AccuracyPanel(fluid="propane", models=("PR",), T=("-30 degC", "90 degC"), P=("1 bar", "50 bar"),
                          n_T=4, n_P=3)
    panel.quantity.value = "h"
    amap = panel.solve()
    assert panel.error is None and amap.quantity == "h"
    assert "mean |dev| [kJ/kg]" in panel.summary.value and "within 5 kJ/kg" in panel.summary.value
    panel.quantity.value = "cp"
    assert "another quantity" in panel.status.value
    assert panel.solve().quantity == "cp" and "Isobaric heat capacity against" in panel.summary.value
    with pytest.raises(tr.InputError, match="allowed"):
        AccuracyPanel(quantity="density")


def test_contours_do_not_ring_a_point_whose_phase_differs():
    # SRK puts CO2's saturation line off the reference's, so on this grid one point near the
    # line is vapor in the model and liquid in the reference: its enthalpy "deviation" is a
    # latent heat, and contours through it would stack every level around one cell
    amap = acc.accuracy_map("CO2", ["SRK"], T=np.linspace(223.15, 393.15, 14), P=np.geomspace(6e5, 150e5, 12),
                            quantity="h", progress=False)
    pts = amap.points
    differ = pts[pts["phase_model"] != pts["phase_reference"]]
    assert len(differ) >= 1
    ax = plots.plot_accuracy_map(amap)
    Ts, Ps = np.asarray(pts.attrs["T_grid"]), np.asarray(pts.attrs["P_grid"])
    dT, dlogP = np.diff(Ts).min(), np.diff(np.log(Ps)).min()
    vertices = np.concatenate([p.vertices for c in ax.collections[1:] if hasattr(c, "get_paths")
                               for p in c.get_paths() if len(p.vertices)] or [np.empty((0, 2))])
    assert len(vertices) > 0
    for T0, P0 in zip(differ["T"], differ["P"]):
        # with the point left out, no contour comes nearer to it than the diagonal between its
        # neighbours (matplotlib still contours the other half of each cell touching it)
        near = np.abs(vertices[:, 0] - T0) / dT + np.abs(np.log(vertices[:, 1] / (P0 * 1e-5))) / dlogP < 0.95
        assert not near.any()
    matplotlib.pyplot.close("all")
