"""Plots (Agg backend): the right axes, labels, legends, titles and artists."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402
from matplotlib.axes import Axes  # noqa: E402
from matplotlib.colors import TwoSlopeNorm  # noqa: E402

import thermo_roots as tr  # noqa: E402
from thermo_roots import accuracy, plots, sweeps  # noqa: E402


@pytest.fixture(autouse=True)
def _close():
    yield
    plt.close("all")


@pytest.fixture(scope="module")
def co2():
    return tr.get_fluid("CO2")


def _basics(ax, fluid, model_word):
    assert isinstance(ax, Axes)
    assert ax.get_xlabel() and ax.get_ylabel() and "[" in ax.get_xlabel() and "[" in ax.get_ylabel()
    assert ax.get_legend() is not None and ax.get_legend().get_texts()
    assert fluid.name in ax.get_title() and model_word in ax.get_title()


def _by_gid(ax, prefix):
    return [a for a in ax.get_children() if (a.get_gid() or "").startswith(prefix)]


def test_isotherm_has_dome_equal_areas_reference_and_one_marker_per_root(co2):
    model = tr.PengRobinson(co2)
    ax = plots.plot_isotherm(model, "7 degC", P_marker="30 bar")
    _basics(ax, co2, "PR")
    assert ax.get_xscale() == "log" and "bar" in ax.get_ylabel()
    assert len(_by_gid(ax, "equal-area")) == 1
    roots = tr.solve(model, T=280.15, P=3e6).roots
    markers = _by_gid(ax, "root:")
    assert len(roots) == 3 and len(markers) == len(roots)
    assert {m.get_gid() for m in markers} == {"root:liquid-like", "root:unstable", "root:vapor-like"}
    assert len({m.get_marker() for m in markers}) == 3          # one marker shape per kind
    assert _by_gid(ax, "dome:PR") and _by_gid(ax, "reference")
    # the shaded lobes have equal areas (Maxwell 1875): the signed area between loop and P_sat vanishes
    s = tr.saturation(model, T=280.15)
    v = np.linspace(s.v_liquid, s.v_vapor, 20001)
    assert abs(np.trapezoid(model.pressure(280.15, v) - s.P, v)) < 1e-6 * s.P * (s.v_vapor - s.v_liquid)


def test_isotherm_compares_models_and_skips_missing_reference(co2):
    ax = plots.plot_isotherm([tr.PengRobinson(co2), tr.SoaveRedlichKwong(co2)], 250.0, P_marker=1.5e6)
    _basics(ax, co2, "SRK")
    assert len(_by_gid(ax, "isotherm:")) == 2
    n_roots = sum(len(tr.solve(m, T=250.0, P=1.5e6).roots) for m in (tr.PengRobinson(co2), tr.SoaveRedlichKwong(co2)))
    assert len(_by_gid(ax, "root:")) == n_roots
    styles = {line.get_linestyle() for line in _by_gid(ax, "isotherm:")}
    assert len(styles) == 2                                    # told apart without colour
    user = tr.Fluid("lab blend X", 420.0, 4.1e6, 0.21, 0.058)
    ax = plots.plot_isotherm(tr.PengRobinson(user), 350.0)
    assert not _by_gid(ax, "reference") and any("user fluid" in t.get_text() for t in ax.texts)
    ax = plots.plot_isotherm(tr.PengRobinson(co2), 200.0)       # below the reference's triple point
    assert not _by_gid(ax, "reference") and any("unavailable" in t.get_text() for t in ax.texts)


def test_saturation_curve(co2):
    models = [tr.PengRobinson(co2), tr.SoaveRedlichKwong(co2)]
    ax = plots.plot_saturation_curve(models)
    _basics(ax, co2, "PR")
    assert len(_by_gid(ax, "model:")) == 2 and _by_gid(ax, "reference")
    assert ax.get_yscale() == "log" and "K" in ax.get_xlabel()
    line = _by_gid(ax, "reference")[0]
    T, P = line.get_data()
    assert P[-1] == pytest.approx(co2.Pc * 1e-5, rel=1e-3)    # ends at the critical point


def test_compressibility(co2):
    ax = plots.plot_compressibility(tr.PengRobinson(co2), [250.0, 320.0])
    _basics(ax, co2, "PR")
    assert len(_by_gid(ax, "model:")) == 2 and len(_by_gid(ax, "reference")) == 2
    Z = _by_gid(ax, "model:")[0].get_ydata()
    assert np.isnan(Z).sum() == 1             # broken at the phase change of the 250 K isotherm
    assert ax.get_ylabel().startswith("Compressibility factor Z")


def test_accuracy_map_heatmap(co2):
    amap = accuracy.accuracy_map(co2, ["PR", "SRK"], n=12, progress=False)
    ax = plots.plot_accuracy_map(amap, "SRK")
    _basics(ax, co2, "SRK")
    mesh = ax.collections[0]
    assert isinstance(mesh.norm, TwoSlopeNorm) and mesh.norm.vcenter == 0.0
    assert mesh.norm.vmin == -mesh.norm.vmax
    assert "%" in mesh.colorbar.ax.get_ylabel()
    assert mesh.get_array().size == 12 * 12
    texts = [t.get_text() for t in ax.get_legend().get_texts()]
    assert "saturation, reference" in texts
    with pytest.raises(tr.InputError, match="No model"):
        plots.plot_accuracy_map(amap, "PR78")


def test_isochore_plot_marks_fill_points(co2):
    frame = sweeps.isochore(tr.PengRobinson(co2), rho_mass="700 kg/m^3", T=("0 degC", "40 degC"), n=12,
                            reference=True, progress=False)
    ax = plots.plot_isochore(frame)
    _basics(ax, co2, "PR")
    assert len(_by_gid(ax, "fill-point")) == 1 and len(_by_gid(ax, "reference-fill-point")) == 1
    T, P = _by_gid(ax, "fill-point")[0].get_data()
    assert T[0] == pytest.approx(frame.attrs["fill_point"]["T"])
    assert any(tr.CAUTION[:30] in t.get_text() for t in ax.texts)
    with pytest.raises(tr.InputError):
        plots.plot_isochore(sweeps.isobar(tr.PengRobinson(co2), 1e6, n=3))


def test_given_axes_are_used(co2):
    fig, axes = plt.subplots(1, 2)
    out = plots.plot_saturation_curve(tr.PengRobinson(co2), ax=axes[1])
    assert out is axes[1] and out.figure is fig


# --------------------------------------------------------------------------- what a reader sees (issue 8)

def _curve_end(line):
    x, y = (np.asarray(a, dtype=float) for a in line.get_data())
    k = np.flatnonzero(np.isfinite(y))[-1]
    return x[k], y[k]


def test_compressibility_labels_sit_at_their_own_curves_in_their_own_colours(co2):
    temps = [250.0, 300.0, 320.0, 400.0]
    ax = plots.plot_compressibility(tr.PengRobinson(co2), temps)
    span = np.diff(ax.get_ylim())[0]
    colours = set()
    for t in temps:
        curve, = _by_gid(ax, f"model:PR:{t:g}")
        label, = [a for a in ax.texts if a.get_gid() == f"isotherm-label:{t:g}"]
        x_end, z_end = _curve_end(curve)
        assert label.xy[0] == pytest.approx(x_end)
        assert abs(label.xy[1] - z_end) < 0.05 * span          # beside its curve, not another's
        assert label.get_color() == curve.get_color()
        colours.add(curve.get_color())
    assert len(colours) == len(temps)                          # one model: a colour per temperature


def test_ideal_gas_line_is_drawn_over_the_grid(co2):
    ax = plots.plot_compressibility(tr.PengRobinson(co2), 300.0)
    line, = _by_gid(ax, "ideal-gas")
    assert np.allclose(line.get_ydata(), 1.0)
    grid = ax.yaxis.get_gridlines()[0]
    assert line.get_zorder() > grid.get_zorder() and line.get_visible()


def test_isotherm_legend_of_four_models_is_grouped_and_outside_the_data(co2):
    models = [tr.PengRobinson(co2), tr.SoaveRedlichKwong(co2), tr.VanDerWaals(co2), tr.RedlichKwong(co2)]
    ax = plots.plot_isotherm(models, "0 degC", P_marker="30 bar")
    texts = [t.get_text() for t in ax.get_legend().get_texts()]
    assert len(texts) == len(set(texts))
    assert [t for t in texts if t.endswith(" isotherm")] == ["PR isotherm", "SRK isotherm", "vdW isotherm",
                                                             "RK isotherm"]
    assert sum("dome" in t for t in texts) == 1                # one entry explains every dome
    assert len(texts) <= len(models) + 8                       # was 15
    ax.figure.canvas.draw()
    legend_box = ax.get_legend().get_window_extent()
    assert legend_box.x0 >= ax.get_window_extent().x1          # right of the data, not over the vapor branch
    assert not any("vapour" in t for t in texts)


def test_low_isotherm_shows_the_whole_lower_equal_area_lobe():
    propane = tr.get_fluid("propane")
    model = tr.PengRobinson(propane)
    T = 0.6 * propane.Tc
    ax = plots.plot_isotherm(model, T, P_marker="1 bar")
    s = tr.saturation(model, T=T)
    v = np.geomspace(s.v_liquid, s.v_vapor, 4001)
    lobe_bottom = float(np.min(model.pressure(T, v))) * 1e-5
    assert lobe_bottom < -100.0                                 # a deep lobe: the case that was cut off
    low, high = ax.get_ylim()
    assert lobe_bottom >= low > 1.5 * lobe_bottom              # all of it shown, without a vast margin


def test_accuracy_maps_side_by_side_share_one_colour_scale_and_one_colour_bar(co2):
    amap = accuracy.accuracy_map(co2, ["PR", "SRK"], n=8, progress=False)
    axes = plots.plot_accuracy_maps(amap)
    assert len(axes) == 2
    meshes = [ax.collections[0] for ax in axes]
    assert meshes[0].norm.vmin == meshes[1].norm.vmin and meshes[0].norm.vmax == meshes[1].norm.vmax
    assert meshes[0].norm.vmin == -meshes[0].norm.vmax
    # the shared scale covers the 95th percentile of |deviation| over both maps (as one map's default)
    both = np.abs(amap.points["deviation_percent"].to_numpy())
    assert meshes[0].norm.vmax == pytest.approx(max(1.0, np.percentile(both[np.isfinite(both)], 95)))
    bars = [m.colorbar for m in meshes if m.colorbar is not None]
    assert len(bars) == 1 and bars[0].mappable.norm.vmax == meshes[1].norm.vmax
    fig = axes[0].figure
    fig.canvas.draw()
    boxes = [ax.title.get_window_extent() for ax in axes] + [fig._suptitle.get_window_extent()]
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            assert not boxes[i].overlaps(boxes[j]), "titles overlap"
    assert [ax.get_title() for ax in axes] == ["PR", "SRK"]


def _steep_pr(fluid):
    """Peng-Robinson with its alpha slope kappa raised by 30 %: a custom cubic for the test."""
    def alpha(T, Tc, omega):
        # kappa of Peng & Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59-64, eq. 18, times 1.3
        kappa = 1.3 * (0.37464 + 1.54226 * omega - 0.26992 * omega ** 2)
        root = np.sqrt(np.asarray(T, dtype=float) / Tc)
        a = 1.0 + kappa * (1.0 - root)
        return a * a, -kappa * a / (root * Tc), 0.5 * kappa * (1.0 + kappa) / (np.asarray(T) * root * Tc)

    pr = tr.PengRobinson(fluid)
    family = tr.CubicFamily("PR with a steeper alpha", pr.delta1, pr.delta2, alpha, "test only")

    class SteepPR(tr.CubicModel):
        short_name = "PR with a steeper alpha"

    SteepPR.family = family
    return SteepPR(fluid)


def test_accuracy_map_draws_the_saturation_curve_of_the_model_it_was_computed_with(co2):
    steep = _steep_pr(co2)
    amap = accuracy.accuracy_map(co2, ["PR", steep], n=6, progress=False)
    assert amap.models[1] == "PR with a steeper alpha" and amap.model_objects[1] is steep
    ax = plots.plot_accuracy_map(amap, "PR with a steeper alpha")
    line, = _by_gid(ax, "saturation:PR with a steeper alpha")
    T, P = (np.asarray(a, dtype=float) for a in line.get_data())
    assert np.allclose(P, tr.saturation(steep, T=T).P * 1e-5, rtol=1e-9)
    plain = tr.saturation(tr.PengRobinson(co2), T=T).P * 1e-5
    assert np.max(np.abs(P / plain - 1.0)) > 0.01             # visibly not plain Peng-Robinson's curve
    combined = tr.AccuracyMap.combine([amap]) if hasattr(tr, "AccuracyMap") else accuracy.AccuracyMap.combine([amap])
    assert combined.model_objects[1] is steep


def test_isochore_quality_axis_is_scaled_to_small_qualities(co2):
    frame = sweeps.isochore(tr.PengRobinson(co2), rho_mass="950 kg/m^3", T=(250.0, 300.0), n=8, progress=False)
    q_max = float(np.nanmax(frame["quality"]))
    assert 0.0 < q_max < 0.01                                  # a small quality: the case that looked flat
    ax = plots.plot_isochore(frame)
    quality_axes = next(a for a in ax.figure.axes if a is not ax and _by_gid(a, "quality"))
    low, high = quality_axes.get_ylim()
    assert low == 0.0 and q_max <= high <= 1.3 * q_max
    assert "vapour" not in quality_axes.get_ylabel().lower() and "vapor" in quality_axes.get_ylabel().lower()
