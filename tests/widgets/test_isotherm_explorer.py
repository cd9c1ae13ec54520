"""IsothermExplorer: one figure and one image widget, redrawn in place; roots from solve()."""

import asyncio

import CoolProp.CoolProp as CP
import pytest

import thermo_roots as tr
from thermo_roots.widgets import IsothermExplorer

PNG = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(scope="module")
def explorer():
    return IsothermExplorer(fluid="CO2", models=("PR", "SRK"), T="0 degC", P="30 bar")


def test_first_draw_shows_every_root_at_the_marker(explorer):
    assert explorer.error is None
    pr = next(s for s in explorer.result if s.model.short_name == "PR")
    direct = tr.solve(tr.PengRobinson(tr.get_fluid("CO2")), T=273.15, P=30e5)
    assert [r.v for r in pr.roots] == pytest.approx([r.v for r in direct.roots], rel=1e-12)
    assert len(pr.roots) == 3           # inside the loop at 0 degC, 30 bar (P_sat ~ 35 bar)
    # CoolProp (Span & Wagner 1996): at 0 degC, 30 bar CO2 is a vapour, below P_sat = 34.85 bar.
    assert CP.PropsSI("P", "T", 273.15, "Q", 0, "CO2") > 30e5 and pr.phase == "vapor"
    shown = explorer.roots.value
    assert "unstable" in shown and "Roots at 30 bar" in shown and "Caution." in shown
    assert bytes(explorer.image.value).startswith(PNG)


def test_controls_redraw_the_same_figure_and_image(explorer):
    image, figure, draws = explorer.image, explorer.figure, explorer.plot.draws
    before = bytes(image.value)
    explorer.temperature.value = 290.0
    explorer.pressure.value = 60.0
    assert explorer.image is image and explorer.plot.image is image and explorer.figure is figure
    assert explorer.plot.draws == draws + 2          # no event loop here: each change draws at once
    assert bytes(image.value) != before
    assert len(figure.axes) >= 1 and all(ax.figure is figure for ax in figure.axes)
    assert explorer.result[0].T == pytest.approx(290.0)
    assert explorer.result[0].P == pytest.approx(60e5)


def test_changes_in_a_running_loop_are_debounced_into_one_draw():
    panel = IsothermExplorer(fluid="propane", models=("PR",), T="20 degC", P="8 bar", delay=0.05)
    draws = panel.plot.draws

    async def burst():
        for T in (295.0, 300.0, 305.0, 310.0):
            panel.temperature.value = T
        assert panel.plot.draws == draws             # nothing drawn while changes keep coming
        await asyncio.sleep(0.3)

    asyncio.run(burst())
    assert panel.plot.draws == draws + 1
    assert panel.result[0].T == pytest.approx(310.0)


def test_new_fluid_resets_the_ranges_and_draws_once():
    panel = IsothermExplorer(fluid="CO2", models=("PR",), T="0 degC", P="30 bar")
    draws = panel.plot.draws
    panel.fluid_field.name.value = "ammonia"
    ammonia = tr.get_fluid("ammonia")
    assert panel.plot.draws == draws + 1
    assert panel.temperature.min < ammonia.Tc < panel.temperature.max
    assert panel.result[0].model.fluid.name == ammonia.name


def test_bad_fluid_keeps_the_picture():
    panel = IsothermExplorer(fluid="CO2", models=("PR",), T="0 degC", P="30 bar")
    image, result = bytes(panel.image.value), panel.result
    panel.fluid_field.name.value = "unobtainium"
    assert "Unknown fluid" in panel.error
    assert panel.result is result and bytes(panel.image.value) == image
    panel.fluid_field.name.value = "CO2"
    assert panel.error is None
    for box in panel.models.boxes.values():
        box.value = False
    assert "Tick at least one" in panel.error
