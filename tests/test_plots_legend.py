"""P–h and T–s diagrams with a process step keep the axes of the same diagram without one:
the legend right of the axes grows in lines, not in width, so neither the axes nor the title
over them (which starts with the fluid's name) is squeezed or clipped."""

import os
import types

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import pytest  # noqa: E402

import thermo_roots as tr  # noqa: E402
from thermo_roots import plots, steps  # noqa: E402

pytest.importorskip("CoolProp.CoolProp")

#: Where the figures are saved to be looked at (set THERMO_ROOTS_FIGURES to a folder).
FIGURES = os.environ.get("THERMO_ROOTS_FIGURES")


@pytest.fixture(autouse=True)
def _close():
    yield
    plt.close("all")


@pytest.fixture(scope="module")
def co2():
    return tr.PengRobinson(tr.get_fluid("CO2"))


@pytest.fixture(scope="module")
def propane():
    return tr.PengRobinson(tr.get_fluid("propane"))


def _layout(ax, name):
    """(axes left, width, title left, title right) in figure fractions, after a draw."""
    fig = ax.figure
    fig.canvas.draw()
    box = ax.get_position()
    title = ax.title.get_window_extent().transformed(fig.transFigure.inverted())
    if FIGURES:
        fig.savefig(os.path.join(FIGURES, f"{name}.png"), dpi=80)
    return box.x0, box.width, title.x0, title.x1


def _steps(co2, propane):
    """One step of every kind (the vessel's long legend entry was the one that squeezed the axes)."""
    # 10 kg of CO2 filled at 20 °C and 600 kg/m³, heated to a relief set pressure of 100 barg
    vessel = steps.heat_at_constant_volume(co2, tr.solve(co2, T="20 degC", rho_mass=600.0), mass=10.0,
                                           P="100 barg")
    vent = steps.throttle(co2, tr.solve(co2, T="20 degC", P="60 bar"), "5 bar")
    suction = tr.solve(propane, P="2 bar", quality=1.0)
    compressor = steps.compress(propane, suction, "15 bar", efficiency=0.75)
    expander = steps.expand(propane, tr.solve(propane, T="120 degC", P="30 bar"), "5 bar", efficiency=0.8)
    return {"vessel": (co2, vessel), "valve": (co2, vent), "compressor": (propane, compressor),
            "expander": (propane, expander)}


@pytest.mark.parametrize("kind", ["ph", "ts"])
def test_a_step_leaves_the_axes_and_the_title_as_they_are_without_one(co2, propane, kind):
    draw = plots.plot_pressure_enthalpy if kind == "ph" else plots.plot_temperature_entropy
    bare = {name: _layout(draw(model), f"{kind}-{model.fluid.name}-bare") for name, model in
            (("co2", co2), ("propane", propane))}
    for name, (model, step) in _steps(co2, propane).items():
        x0, width, t0, t1 = _layout(draw(model, step=step), f"{kind}-{name}")
        b_x0, b_width, _, _ = bare["co2" if model is co2 else "propane"]
        # the same figure width with and without a step: the axes keep their place and size
        # (before the fix the vessel's one-line legend entry left 0.26 of the width, not 0.61)
        assert x0 == pytest.approx(b_x0, abs=0.01), name
        assert width == pytest.approx(b_width, abs=0.02), name
        assert width > 0.5, name
        # the title, "carbon dioxide — pressure–enthalpy diagram, ...", stays inside the figure
        assert 0.0 <= t0 and t1 <= 1.0, (name, t0, t1)


def test_long_legend_entries_are_wrapped_and_keep_their_words(co2):
    vessel = steps.heat_at_constant_volume(co2, tr.solve(co2, T="20 degC", rho_mass=600.0), mass=10.0,
                                           P="100 barg")
    ax = plots.plot_pressure_enthalpy(co2, step=vessel)
    texts = [t.get_text() for t in ax.get_legend().get_texts()]
    assert all(len(line) <= plots._DIAGRAM_LEGEND_WIDTH for t in texts for line in t.split("\n"))
    joined = [t.replace("\n", " ") for t in texts]
    assert any(t.startswith("constant-volume heat, model: inlet (circle) → outlet (square)") for t in joined)
    assert "reference equation (CoolProp): dome and isotherms" in joined      # the widest plain entry: one line


def test_a_diagram_wants_a_model_and_a_step_result_not_lookalikes(co2):
    # an object that carries a fluid is not a model; one with inlet/outlet/reference is not a step
    with pytest.raises(tr.InputError, match="takes a model such as"):
        plots.plot_pressure_enthalpy(types.SimpleNamespace(fluid=co2.fluid, has_saturation=True))
    inlet = tr.solve(co2, T="20 degC", P="60 bar")
    lookalike = types.SimpleNamespace(inlet=inlet, outlet=inlet, reference=None)
    with pytest.raises(tr.InputError, match="StepResult"):
        plots.plot_pressure_enthalpy(co2, step=lookalike)
