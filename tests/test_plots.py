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
