"""RootTracePanel: every root finder on the same residual, checked against scipy and solve()."""

import numpy as np
import pytest
from scipy.optimize import brentq

import thermo_roots as tr
from thermo_roots.roots import METHODS
from thermo_roots.widgets import RootTracePanel

PNG = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(scope="module")
def traced():
    panel = RootTracePanel(fluid="propane", model="PR", T="20 degC", P="8 bar")
    panel.solve()
    return panel


def test_every_method_is_traced_and_shown(traced):
    assert traced.error is None
    assert set(traced.result) == set(METHODS)
    for name, result in traced.result.items():
        assert len(result.trace) >= 1
        assert name in traced.summary.value
    assert bytes(traced.plot.image.value).startswith(PNG)
    assert "Iterates of" in traced.steps.value


def test_bracketed_methods_agree_with_scipy_brentq(traced):
    # scipy.optimize.brentq (Brent 1973) on the same residual and bracket as an outside check.
    model = tr.PengRobinson(tr.get_fluid("propane"))
    T, P = 293.15, 8e5
    lo, hi = traced._problem.lo, traced._problem.hi
    v_brent = brentq(lambda v: model.pressure(T, v) / P - 1.0, lo, hi, xtol=1e-16, rtol=1e-14)
    for name in ("chandrupatla", "bisect", "illinois"):
        assert traced.result[name].root == pytest.approx(v_brent, rel=1e-9)


def test_landing_root_is_named_from_the_residual(traced):
    stable_v = traced.state.v
    for name, result in traced.result.items():
        words = traced._problem.describe(result)
        if abs(traced._problem.residual(result.root)) > 1e-6:
            assert words.startswith("NOT a root")
        elif result.root == pytest.approx(stable_v, rel=1e-6):
            assert words == "vapor-like root (stable)"
    assert "NOT a root" in traced.summary.value or all(
        abs(traced._problem.residual(r.root)) <= 1e-6 for r in traced.result.values())


def test_free_newton_from_the_ideal_gas_volume_finds_the_vapour_root():
    # Newton from v = b + RT/P is the textbook start for the vapour root (common practice).
    panel = RootTracePanel(fluid="propane", model="PR", T="20 degC", P="8 bar",
                           methods=("newton", "secant"), guarded=False)
    results = panel.solve()
    for result in results.values():
        assert result.converged
        assert result.root == pytest.approx(panel.state.v, rel=1e-9)
        assert np.isnan(result.trace[0].a)       # no bracket: run as a free open method


def test_temperature_trace_matches_solve():
    panel = RootTracePanel(fluid="CO2", model="SRK", unknown="T", P="60 bar", v="0.3 L/mol")
    results = panel.solve()
    direct = tr.solve(tr.SoaveRedlichKwong(tr.get_fluid("CO2")), P=6e6, v=3e-4)
    assert direct.phase != "two-phase"
    assert results["chandrupatla"].root == pytest.approx(direct.T, rel=1e-10)
    assert "the temperature solve() reports" in panel.summary.value


def test_bad_input_keeps_the_previous_trace(traced):
    panel = RootTracePanel(fluid="propane", model="PR", T="20 degC", P="8 bar", methods=("bisect",))
    before = panel.solve()
    image = panel.plot.image.value
    panel.fields["P"].text.value = "eight"
    assert panel.solve() is None and panel.result is before and panel.plot.image.value == image
    assert "Cannot read P" in panel.fields["P"].message.value
    panel.fields["P"].text.value = "8"
    for box in panel.method_boxes.values():
        box.value = False
    assert panel.solve() is None and "Tick at least one" in panel.error


def _overlapping_tick_labels(ax):
    renderer = ax.figure.canvas.get_renderer()
    boxes = [t.get_window_extent(renderer) for t in ax.get_xticklabels(which="both")
             if t.get_visible() and t.get_text()]
    return [(a, b) for i, a in enumerate(boxes) for b in boxes[i + 1:] if a.overlaps(b)]


def test_log_axis_tick_labels_do_not_overlap():
    # CO2 at 0 degC and 30 bar: three roots, the residual drawn over a decade and more of volume
    panel = RootTracePanel(fluid="CO2", model="PR", T="0 degC", P="30 bar")
    panel.solve()
    fig = panel.plot.figure
    fig.canvas.draw()
    axes = [ax for ax in fig.axes if ax.get_visible() and ax.axison]
    assert axes and all(ax.get_xscale() == "log" for ax in axes)
    for ax in axes:
        labelled = [t for t in ax.get_xticklabels(which="both") if t.get_text()]
        assert len(labelled) >= 2                     # the axis is readable at all
        assert not _overlapping_tick_labels(ax), [t.get_text() for t in labelled]
