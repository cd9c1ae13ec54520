"""benchmarks/run.py runs from end to end and prints its table.

Not a timed test: at --quick sizes the ratios mean nothing and nothing is asserted about
them. What is checked is that every comparison ran, every row carries a verdict, and
every saturation temperature converged.
"""

import re
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
ROWS = ("1a (T,P)->v", "1b numpy path", "2  Psat", "3  (P,v)->T", "4a scaling", "4b peak memory",
        "5a first call", "5b first call")


def test_quick_benchmark_prints_every_row():
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
        assert re.search(r"\b(PASS|FAIL)\b", row[0])
    saturation = next(line for line in lines if line.startswith("2  Psat"))
    n = int(re.search(r"Psat, (\d+) temperatures", saturation).group(1))
    assert f"converged {n}/{n}" in saturation
    assert "saturation converged everywhere: True" in out.stdout
