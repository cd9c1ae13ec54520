"""benchmarks/run.py runs from end to end and prints its table.

Not a timed test: at --quick sizes the ratios mean nothing, so the quick run prints them
without PASS/FAIL verdicts and nothing is asserted about them. What is checked is that every
comparison ran, that the quick table carries no verdict (and says why), that a full-size
table does carry one per row, and that every saturation temperature converged.
"""

import importlib.util
import re
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
ROWS = ("1a (T,P)->v", "1b numpy path", "2  Psat", "3  (P,v)->T", "4a scaling", "4b peak memory",
        "5a first call", "5b first call")


def _benchmark_module():
    spec = importlib.util.spec_from_file_location("benchmark_run", ROOT / "benchmarks" / "run.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_quick_benchmark_prints_every_row_without_verdicts():
    out = subprocess.run([sys.executable, str(ROOT / "benchmarks" / "run.py"), "--quick"],
                         capture_output=True, text=True, timeout=600, cwd=ROOT)
    print(out.stdout)   # shown with pytest -s: the table itself
    assert out.returncode == 0, out.stderr
    lines = out.stdout.splitlines()
    assert re.match(r"thermo_roots benchmark, \d{4}-\d\d-\d\d \d\d:\d\d", lines[0])
    assert any(re.search(r"\d+ cores", line) for line in lines[:4])
    assert any("numpy " in line and "CoolProp " in line for line in lines[:4])
    for label in ROWS:
        row = [line for line in lines if line.startswith(label)]
        assert len(row) == 1, f"no row {label!r} in\n{out.stdout}"
        assert not re.search(r"\b(PASS|FAIL)\b", row[0]), row[0]
        assert "goal met" not in row[0] and "goal not met" not in row[0]
    assert not re.search(r"\bresult\b", next(line for line in lines if line.startswith("check")))
    assert _benchmark_module().QUICK_NOTE in lines
    saturation = next(line for line in lines if line.startswith("2  Psat"))
    n = int(re.search(r"Psat, (\d+) temperatures", saturation).group(1))
    assert f"converged {n}/{n}" in saturation
    assert "saturation converged everywhere: True" in out.stdout


def test_full_size_table_gives_each_row_its_verdict(capsys):
    run = _benchmark_module()
    table = run.Table()
    table.add("x check", "1 us", "2 us", "2.00x faster", ">= 1x", True)
    table.add("y check", "2 us", "1 us", "0.50x (slower)", ">= 1x", False)
    table.print()
    lines = capsys.readouterr().out.splitlines()
    assert "result" in lines[0]
    assert re.search(r"\bPASS\b", lines[2]) and re.search(r"\bFAIL\b", lines[3])
