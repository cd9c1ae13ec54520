"""The README's main command: the demo site's state points, its one table of equipment data,
and the JupyterLab start on working copies of the notebooks."""

import os
import re
import shutil
import subprocess
from pathlib import Path

import nbformat
import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import demo

ROOT = Path(__file__).resolve().parents[1]


def test_demo_prints_every_duty_with_its_reference_check_and_the_caution(capsys):
    assert demo.main([]) == 0
    out = capsys.readouterr().out
    for tag, _, _ in demo.DUTIES:
        assert tag in out
    assert out.count("model deviates from it") == len(demo.DUTIES)
    assert "licensed engineer" in out and "invented" in out
    assert "vapour" not in out.split("given:", 1)[0]          # the tour's own words say "vapor"
    assert "degC" not in out and "kg/m^3" not in out           # units as engineers read them


def test_demo_numbers_are_the_library_numbers(capsys):
    demo.main(["--model", "SRK"])
    out = capsys.readouterr().out
    block = out.split("V-212", 1)[1].split("\n\n", 1)[0]
    shown = float(re.search(r"Mass density\s+([\d.]+) kg", block).group(1))
    state = tr.solve(tr.SoaveRedlichKwong(tr.get_fluid("propane")), T="20 degC", P="7 barg")
    assert np.isclose(shown, state.rho_mass, rtol=1e-5)


def test_the_tour_prints_the_mixture_duties_with_the_librarys_numbers(capsys):
    """The letdown's outlet, the drum's split and the blend's glide in the tour are the library's
    own answers for demo.MIXTURE_EQUIPMENT (PCV-610, V-640, E-220: invented duties)."""
    from thermo_roots import steps

    demo.main([])
    out = capsys.readouterr().out
    for tag in demo.MIXTURE_EQUIPMENT:
        assert tag in out
    pcv, drum = demo.MIXTURE_EQUIPMENT["PCV-610"], demo.MIXTURE_EQUIPMENT["V-640"]
    fuel = tr.PengRobinson(pcv.mixture(), kij="fitted")
    valve = steps.throttle(fuel, tr.solve(fuel, **pcv.duty), pcv.outlet_pressure)
    assert f"outlet {valve.outlet.T - 273.15:.1f} °C, {valve.outlet.phase}" in out
    assert f"reference mixture model {valve.reference.outlet.T - 273.15:.1f} °C" in out
    split = tr.solve(tr.PengRobinson(drum.mixture(), kij="fitted"), **drum.duty)
    assert f"vapor fraction {split.vapor_fraction:.3f}" in out
    assert re.search(r"glide \d+\.\d K", out)
    demo.main(["--model", "IG"])
    assert "no mixing rule" in capsys.readouterr().out


# --------------------------------------------------------------------------- one source of equipment data

def test_closed_vessel_fill_density_is_charge_over_volume():
    pv330 = demo.EQUIPMENT["PV-330"]
    # fill density = mass / volume (common practice): 0.30 kg in 0.5 L
    mass = float(tr.units.registry()(pv330.charge).to("kg").magnitude)
    volume = float(tr.units.registry()(pv330.volume).to("m**3").magnitude)
    assert pv330.fill_density == pytest.approx(mass / volume, rel=1e-12)
    title, fluid, knowns = next(d for d in demo.DUTIES if d[0].startswith("PV-330"))
    assert knowns["rho_mass"] == pytest.approx(pv330.fill_density)
    assert pv330.charge in title and pv330.volume in title


def test_notebooks_take_the_site_data_from_the_demo_module():
    """Notebook 04 reads PV-330 from demo.EQUIPMENT, and its text quotes the same charge and volume."""
    nb = nbformat.read(ROOT / "notebooks" / "04_closed_vessel_heatup.ipynb", as_version=4)
    code = "\n".join(c.source for c in nb.cells if c.cell_type == "code")
    text = "\n".join(c.source for c in nb.cells if c.cell_type == "markdown")
    assert 'EQUIPMENT["PV-330"]' in code
    assert not re.search(r"\d\s*kg\"", code), "the charge is typed into a code cell"
    pv330 = demo.EQUIPMENT["PV-330"]
    charges = set(re.findall(r"(\d+(?:\.\d+)?) kg of CO2", text))
    assert charges == {pv330.charge.split()[0]}
    for number in re.findall(r"(\d+(?:\.\d+)?) kg/m³", text.split("critical density", 1)[0]):
        assert float(number) == pytest.approx(pv330.fill_density)


def test_rated_pressure_is_reached_where_model_and_reference_give_that_pressure():
    pv330 = demo.EQUIPMENT["PV-330"]
    model = tr.PengRobinson(tr.get_fluid(pv330.fluid))
    T, T_ref = demo.rated_pressure_temperature(pv330, model)
    rated = tr.to_si(pv330.rated_pressure, "P")
    v = model.fluid.molar_mass / pv330.fill_density
    assert model.pressure(T, v) == pytest.approx(rated, rel=1e-9)
    # the reference temperature: CoolProp's equation of state gives the rated pressure there
    from CoolProp.CoolProp import PropsSI

    assert PropsSI("P", "T", T_ref, "Dmass", pv330.fill_density, "CO2") == pytest.approx(rated, rel=1e-6)
    assert T < float(tr.to_si(pv330.highest_temperature, "T"))   # the invented fill is not a safe one
    text = demo.rated_pressure_text(pv330, model)
    assert f"{T - 273.15:.1f} °C" in text and f"{T_ref - 273.15:.1f} °C" in text


# --------------------------------------------------------------------------- JupyterLab on working copies

def _shipped(tmp_path):
    source = tmp_path / "clone" / "notebooks"
    shutil.copytree(ROOT / "notebooks", source)
    return source


def test_working_copy_copies_once_and_never_overwrites_edits(tmp_path):
    source = _shipped(tmp_path)
    folder, copied, kept = demo.working_copy(source)
    assert folder == source.parent / demo.WORK_FOLDER
    assert sorted(copied) == sorted(p.name for p in source.glob("*.ipynb")) and not kept
    assert (folder / demo.FIRST_NOTEBOOK).read_bytes() == (source / demo.FIRST_NOTEBOOK).read_bytes()
    mine = folder / demo.FIRST_NOTEBOOK
    mine.write_text('{"my": "edits"}')
    (folder / "02_isotherm.ipynb").unlink()
    folder, copied, kept = demo.working_copy(source)
    assert copied == ["02_isotherm.ipynb"] and demo.FIRST_NOTEBOOK in kept
    assert mine.read_text() == '{"my": "edits"}'


def test_lab_command_adds_allow_root_only_for_root(monkeypatch):
    monkeypatch.setattr(os, "geteuid", lambda: 0)
    command = demo.lab_command()
    assert command[1:3] == ["-m", "jupyterlab"] and "--allow-root" in command
    assert demo.FIRST_NOTEBOOK in command
    monkeypatch.setattr(os, "geteuid", lambda: 1000)
    assert "--allow-root" not in demo.lab_command()
    assert demo.lab_command(extra=("--ip=0.0.0.0",))[-1] == "--ip=0.0.0.0"


def test_options_after_a_double_dash_go_to_jupyterlab(tmp_path, monkeypatch, capsys):
    source = _shipped(tmp_path)
    started = []
    monkeypatch.setattr(demo, "shipped_notebooks", lambda: source)
    monkeypatch.setattr(demo, "start_lab", lambda folder, extra=(): started.append(list(extra)) or 0)
    assert demo.main(["--lab", "--", "--ip=0.0.0.0", "--port=8890"]) == 0
    assert started == [["--ip=0.0.0.0", "--port=8890"]]
    with pytest.raises(SystemExit):
        demo.main(["--", "--ip=0.0.0.0"])          # without --lab there is no JupyterLab to give them to
    assert "--lab" in capsys.readouterr().err


def test_main_with_lab_prints_the_tour_then_starts_lab_in_the_working_copy(tmp_path, monkeypatch, capsys):
    source = _shipped(tmp_path)
    started = []
    monkeypatch.setattr(demo, "shipped_notebooks", lambda: source)
    monkeypatch.setattr(demo, "start_lab", lambda folder, extra=(): started.append(folder) or 0)
    assert demo.main(["--lab"]) == 0
    out = capsys.readouterr().out
    assert out.index("CAUTION") < out.index("working copies")
    assert started == [source.parent / demo.WORK_FOLDER]
    assert (started[0] / demo.FIRST_NOTEBOOK).exists()


@pytest.mark.skipif(shutil.which("git") is None or not (ROOT / ".git").exists(), reason="not a git checkout")
def test_git_ignores_the_virtual_environment_and_the_working_copies():
    for path in (".venv/pyvenv.cfg", f"{demo.WORK_FOLDER}/{demo.FIRST_NOTEBOOK}"):
        result = subprocess.run(["git", "check-ignore", "-q", path], cwd=ROOT)
        assert result.returncode == 0, f"git does not ignore {path}"
    result = subprocess.run(["git", "check-ignore", "-q", f"notebooks/{demo.FIRST_NOTEBOOK}"], cwd=ROOT)
    assert result.returncode == 1      # the shipped notebooks stay tracked


def test_the_tour_runs_the_sites_valve_and_compressor_steps():
    # XV-517 vents liquid CO2 to the atmosphere (dry ice: CO2's triple point 216.59 K, 5.18 bar,
    # CoolProp); K-101's discharge is compared with the reference equation's own (P, s) step
    vent = demo.run_step(demo.EQUIPMENT["XV-517"])
    assert vent.outlet.T < 216.59 and any("dry ice" in w for w in vent.warnings)
    assert vent.outlet.h == pytest.approx(vent.inlet.h, rel=1e-9)
    stage = demo.run_step(demo.EQUIPMENT["K-101"])
    assert stage.outlet.T == pytest.approx(stage.reference.outlet.T, abs=2.0)
    text = demo.step_text(demo.EQUIPMENT["K-101"])
    assert "compressed at efficiency 0.75" in text and "kJ/kg" in text
    assert demo.run_step(demo.EQUIPMENT["V-212"]) is None
