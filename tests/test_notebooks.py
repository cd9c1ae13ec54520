"""Every notebook runs top to bottom in a real Jupyter kernel without an error.

The kernel is "python3": ipykernel installed into this environment
(``python -m ipykernel install --sys-prefix``). The notebooks run two at a time (one kernel
each), as most of each run is the kernel and the reference library starting up.
"""

import pathlib
from concurrent.futures import ThreadPoolExecutor

import nbformat
import pytest
from nbclient import NotebookClient

NOTEBOOKS = sorted((pathlib.Path(__file__).parent.parent / "notebooks").glob("*.ipynb"))


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
    with ThreadPoolExecutor(max_workers=2) as pool:
        runs = {p.name: pool.submit(_execute, p, workdir) for p in NOTEBOOKS}
        return {name: run.result() for name, run in runs.items()}


def test_there_are_the_four_notebooks():
    assert [p.name for p in NOTEBOOKS] == ["01_state_point.ipynb", "02_isotherm.ipynb",
                                          "03_model_accuracy.ipynb", "04_closed_vessel_heatup.ipynb"]


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
