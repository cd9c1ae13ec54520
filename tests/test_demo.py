"""The README's main command prints real, cross-checked state points of the demo site."""

import re

import numpy as np

import thermo_roots as tr
from thermo_roots import demo


def test_demo_prints_every_duty_with_its_reference_check_and_the_caution(capsys):
    assert demo.main([]) == 0
    out = capsys.readouterr().out
    for tag, _, _ in demo.DUTIES:
        assert tag in out
    assert out.count("model deviates from it") == len(demo.DUTIES)
    assert "licensed engineer" in out and "invented" in out


def test_demo_numbers_are_the_library_numbers(capsys):
    demo.main(["--model", "SRK"])
    out = capsys.readouterr().out
    block = out.split("V-212", 1)[1].split("\n\n", 1)[0]
    shown = float(re.search(r"Mass density\s+([\d.]+) kg", block).group(1))
    state = tr.solve(tr.SoaveRedlichKwong(tr.get_fluid("propane")), T="20 degC", P="7 barg")
    assert np.isclose(shown, state.rho_mass, rtol=1e-5)
