"""The README's examples run and its two quick-start commands are what CI and users run."""

import pathlib
import re

import thermo_roots as tr

ROOT = pathlib.Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text(encoding="utf-8")


def test_python_examples_in_the_readme_run():
    blocks = re.findall(r"```python\n(.*?)```", README, flags=re.S)
    assert blocks
    namespace = {"tr": tr}  # the blocks read as one session, top to bottom
    for block in blocks:
        exec(compile(block, "README.md", "exec"), namespace)


def test_quick_start_has_exactly_two_commands_and_ci_runs_the_second_verbatim():
    quick = README.split("## Quick start", 1)[1].split("\n## ", 1)[0]
    commands = re.findall(r"```bash\n(.*?)\n```", quick, flags=re.S)
    assert len(commands) == 2
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    assert commands[1] in ci.splitlines()
    assert "pytest" in commands[1] and "jupyter lab" in commands[0]


def test_readme_states_the_cautions():
    text = README.lower()
    assert "screening" in text and "licensed engineer" in text and "local codes" in text
