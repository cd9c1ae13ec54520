"""Every notebook runs top to bottom in a real Jupyter kernel without an error.

The kernel is "python3": ipykernel installed into this environment
(``python -m ipykernel install --sys-prefix``). The notebooks run two at a time (one kernel
each), as most of each run is the kernel and the reference library starting up.
"""

import os
import pathlib
import re
from concurrent.futures import ThreadPoolExecutor

import nbformat
import numpy as np
import pytest
from nbclient import NotebookClient

ROOT = pathlib.Path(__file__).parent.parent
NOTEBOOKS = sorted((ROOT / "notebooks").glob("*.ipynb"))


def _execute(path, workdir):
    nb = nbformat.read(path, as_version=4)
    client = NotebookClient(nb, kernel_name="python3", timeout=120, startup_timeout=60,
                            resources={"metadata": {"path": str(workdir)}})
    try:
        client.execute()   # raises CellExecutionError at the first failing cell
    except Exception as err:  # reported by the notebook's own test below
        return nb, err
    return nb, None


@pytest.fixture(scope="module")
def executed(tmp_path_factory):
    workdir = tmp_path_factory.mktemp("notebooks")
    # the kernels import this checkout's package, whatever the environment's install points to
    os.environ["PYTHONPATH"] = os.pathsep.join([str(ROOT)] + [p for p in [os.environ.get("PYTHONPATH")] if p])
    with ThreadPoolExecutor(max_workers=2) as pool:
        runs = {p.name: pool.submit(_execute, p, workdir) for p in NOTEBOOKS}
        return {name: run.result() for name, run in runs.items()}


def test_there_are_the_six_notebooks():
    assert [p.name for p in NOTEBOOKS] == ["01_state_point.ipynb", "02_isotherm.ipynb",
                                          "03_model_accuracy.ipynb", "04_closed_vessel_heatup.ipynb",
                                          "05_energy_duties.ipynb", "06_mixtures.ipynb"]


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_notebook_runs_top_to_bottom(path, executed):
    committed = nbformat.read(path, as_version=4)
    assert committed.metadata.kernelspec.name == "python3"
    assert all(not c.get("outputs") for c in committed.cells if c.cell_type == "code"), \
        "commit notebooks with their outputs cleared"
    nb, error = executed[path.name]
    if error is not None:
        raise error
    outputs = [o for c in nb.cells if c.cell_type == "code" for o in c.outputs]
    assert not [o for o in outputs if o.output_type == "error"]
    # the caution is shown in every notebook's output, in the project's wording
    markdown = "".join(str(o.get("data", {}).get("text/markdown", "")) for o in outputs)
    assert "Caution." in markdown and "licensed engineer" in markdown


# --------------------------------------------------------------------------- the text matches what "Run all" shows

_DISPLAYED = re.compile(r"^([A-Za-z_]\w*)\s*$")
_DRIVES = r"\b{name}\.[\w.]*(?:\.value\s*=(?!=)|\.set\(|\.solve\(|\.update\(|\.compute)"


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_a_displayed_panel_is_not_changed_by_a_later_cell(path):
    """A panel shown under its explanation keeps showing what that text describes: no later cell
    moves it to another fluid, temperature or pressure (that needs a second panel)."""
    cells = [c.source for c in nbformat.read(path, as_version=4).cells if c.cell_type == "code"]
    for i, source in enumerate(cells):
        last = source.strip().splitlines()[-1] if source.strip() else ""
        shown = _DISPLAYED.match(last)
        if not shown:
            continue
        name = shown.group(1)
        for later in cells[i + 1:]:
            assert not re.search(_DRIVES.format(name=re.escape(name)), later), \
                f"{path.name}: {name!r} is displayed, then changed by a later cell:\n{later}"


def _markdown_outputs(nb):
    return "\n".join(str(o.get("data", {}).get("text/markdown", ""))
                     for c in nb.cells if c.cell_type == "code" for o in c.outputs)


def test_closed_vessel_answers_its_question_with_the_numbers_of_its_own_plot(executed):
    """Notebook 04: the slope it quotes is the model's own dP/dT past the liquid-full point, and it says
    at what temperature the rated pressure is reached, with the pressure-equipment caution."""
    import thermo_roots as tr
    from thermo_roots import demo

    nb, error = executed["04_closed_vessel_heatup.ipynb"]
    if error is not None:
        raise error
    text = "\n".join(c.source for c in nb.cells if c.cell_type == "markdown")
    assert "tens of bar" not in text
    shown = _markdown_outputs(nb)
    pv330 = demo.EQUIPMENT["PV-330"]
    model = tr.PengRobinson(tr.get_fluid(pv330.fluid), volume_shift="peneloux")
    # dP/dT at constant density from two liquid-full states of the same model (finite difference)
    P1, P2 = (float(tr.solve(model, T=T, rho_mass=pv330.fill_density).P) for T in (313.15, 323.15))
    slope = (P2 - P1) / 10.0 * 1e-5
    quoted = float(re.search(r"climbs by \*\*([\d.]+) bar/K\*\*", shown).group(1))
    assert quoted == pytest.approx(slope, rel=0.15)
    T_rated, T_rated_ref = demo.rated_pressure_temperature(pv330, model)
    assert f"{T_rated - 273.15:.1f} °C" in shown and f"{T_rated_ref - 273.15:.1f} °C" in shown
    assert "licensed engineer" in shown and "Caution." in shown
    assert np.isfinite(T_rated_ref)


def test_mixtures_notebook_quotes_the_librarys_own_answers(executed):
    """Notebook 06: the letdown's outlet temperature, the drum's vapour fraction and the blend's
    glide it quotes are those of direct solves of the site's duties (demo.MIXTURE_EQUIPMENT)."""
    import thermo_roots as tr
    from thermo_roots import demo

    nb, error = executed["06_mixtures.ipynb"]
    if error is not None:
        raise error
    shown = _markdown_outputs(nb)
    pcv, drum, coil = (demo.MIXTURE_EQUIPMENT[t] for t in ("PCV-610", "V-640", "E-220"))
    fuel = tr.PengRobinson(pcv.mixture(), kij="fitted")
    outlet = tr.solve(fuel, P=pcv.outlet_pressure, h=tr.solve(fuel, **pcv.duty).h)
    assert f"**{outlet.T - 273.15:.1f} °C**" in shown
    split = tr.solve(tr.PengRobinson(drum.mixture(), kij="fitted"), **drum.duty)
    assert f"**{100 * split.vapor_fraction:.1f} %**" in shown
    blend = tr.PengRobinson(coil.mixture(), kij="fitted")
    glide = float(tr.dew_point(blend, P=coil.duty["P"]).T - tr.bubble_point(blend, P=coil.duty["P"]).T)
    assert f"a glide of **{glide:.1f} K**" in shown
    assert "licensed" in shown and "hydrates" in shown
