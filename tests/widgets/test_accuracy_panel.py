"""AccuracyPanel: the map chunk by chunk, a cancel between chunks, the summary shown."""

import asyncio

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.accuracy import accuracy_map
from thermo_roots.widgets import AccuracyPanel

KW = dict(T=("-30 degC", "90 degC"), P=("1 bar", "50 bar"), n_T=6, n_P=5)


def test_chunked_map_equals_the_library_map_in_one_go():
    panel = AccuracyPanel(fluid="propane", models=("PR", "SRK"), **KW)
    amap = panel.solve()
    assert panel.error is None and not panel.cancelled
    assert panel.progress.value == panel.progress.max == 6
    Ts = np.linspace(tr.to_si("-30 degC", "T"), tr.to_si("90 degC", "T"), 6)
    Ps = np.geomspace(1e5, 50e5, 5)
    whole = accuracy_map("propane", ("PR", "SRK"), T=Ts, P=Ps, progress=False)
    key = ["model", "T", "P"]
    got = amap.points.sort_values(key).reset_index(drop=True)
    want = whole.points.sort_values(key).reset_index(drop=True)
    np.testing.assert_allclose(got["deviation_percent"], want["deviation_percent"], rtol=1e-12)
    assert amap.summary.equals(whole.summary)
    assert amap.points.attrs["T_grid"] == pytest.approx(whole.points.attrs["T_grid"])
    shown = panel.summary.value
    assert "Closest by region" in shown and "Caution." in shown
    assert bytes(panel.plot.image.value).startswith(b"\x89PNG")


def test_cancel_between_chunks_keeps_the_rows_done():
    panel = AccuracyPanel(fluid="propane", models=("PR",), **KW)
    panel.progress.observe(lambda change: panel.cancel() if change.new == 2 else None, "value")
    amap = asyncio.run(panel.compute_async())
    assert panel.cancelled and panel.progress.value == 2
    assert len(amap.points.attrs["T_grid"]) == 2
    assert "Cancelled" in panel.status.value
    assert not panel.compute_button.disabled and panel.cancel_button.disabled


def test_bad_range_keeps_the_previous_map():
    panel = AccuracyPanel(fluid="propane", models=("PR",), **KW)
    first = panel.solve()
    panel.T_to.set("-50 degC")
    assert panel.solve() is first and "upper end above" in panel.error
    panel.T_to.set("90 degC")
    panel.P_from.set("1 metre")
    assert panel.solve() is first and "wrong kind" in panel.P_from.message.value


def test_maps_of_the_models_share_one_colour_scale():
    panel = AccuracyPanel(fluid="propane", models=("PR", "SRK"), **KW)
    panel.solve()
    meshes = [ax.collections[0] for ax in panel.plot.figure.axes if ax.collections and ax.get_title() in ("PR", "SRK")]
    assert len(meshes) == 2
    assert (meshes[0].norm.vmin, meshes[0].norm.vmax) == (meshes[1].norm.vmin, meshes[1].norm.vmax)
    assert sum(m.colorbar is not None for m in meshes) == 1
