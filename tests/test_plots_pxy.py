"""plot_pxy: the binary's bubble and dew curves are the library's own bubble and dew points,
the pure ends are the pure fluids' saturation pressures, and the reference points come from
the reference mixture model."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium.saturation_points import bubble_point, dew_point
from thermo_roots.plots import plot_pxy


def _line(ax, gid):
    (line,) = [l for l in ax.get_lines() if l.get_gid() == gid]
    return line.get_xdata(), line.get_ydata()


def test_curves_are_the_bubble_and_dew_points_and_end_at_the_pure_saturation_pressures():
    model = tr.PengRobinson(tr.Mixture({"propane": 0.5, "n-butane": 0.5}))
    ax = plot_pxy(model, 300.0, n=11, reference=False)
    x, P_bubble = _line(ax, "model:bubble")
    y, P_dew = _line(ax, "model:dew")
    for i in (3, 7):
        z = np.array([x[i], 1 - x[i]])
        assert P_bubble[i] == pytest.approx(float(bubble_point(model, T=300.0, z=z).P) * 1e-5, rel=1e-9)
        assert P_dew[i] == pytest.approx(float(dew_point(model, T=300.0, z=z).P) * 1e-5, rel=1e-9)
    # the ends are the pure components' own saturation pressures (common practice)
    for end, name in ((-1, "propane"), (0, "n-butane")):
        pure = float(tr.saturation(tr.PengRobinson(name), T=300.0).P) * 1e-5
        assert P_bubble[end] == pytest.approx(pure, rel=1e-6) and P_dew[end] == pytest.approx(pure, rel=1e-6)
    assert np.all(P_bubble[1:-1] > P_dew[1:-1])          # the bubble curve lies above the dew curve


def test_reference_points_lie_near_the_model_for_an_ideal_like_pair():
    """Propane + n-butane is close to ideal (the reference mixture model, CoolProp HEOS):
    Peng-Robinson's bubble pressures within 3 % of its (measured: under 1 %)."""
    model = tr.PengRobinson(tr.Mixture({"propane": 0.5, "n-butane": 0.5}), kij="fitted")
    ax = plot_pxy(model, 300.0, n=21, n_reference=3)
    x_ref, P_ref = _line(ax, "reference:bubble")
    x, P = _line(ax, "model:bubble")
    np.testing.assert_allclose(np.interp(x_ref, x, P), P_ref, rtol=0.03)


def test_only_a_binary():
    with pytest.raises(tr.InputError, match="binary"):
        plot_pxy(tr.PengRobinson(tr.Mixture({"methane": 0.8, "ethane": 0.1, "propane": 0.1})), 250.0)
    with pytest.raises(tr.InputError, match="binary"):
        plot_pxy(tr.PengRobinson("propane"), 250.0)
