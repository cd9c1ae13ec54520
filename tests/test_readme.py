"""The README's examples run and its two quick-start commands are what CI and users run."""

import pathlib
import re

import pytest

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
    assert "pytest" in commands[1] and commands[0].endswith("thermo-roots-demo --lab")


def test_quick_start_main_command_is_the_demo_entry_point_with_lab(capsys):
    """The first command's last step is the installed script; its --lab option exists."""
    from thermo_roots import demo

    quick = README.split("## Quick start", 1)[1].split("\n## ", 1)[0]
    first = re.findall(r"```bash\n(.*?)\n```", quick, flags=re.S)[0]
    script = first.rsplit("&&", 1)[1].split()
    assert script[0].endswith("thermo-roots-demo")
    pyproject = (ROOT / "pyproject.toml").read_text(encoding="utf-8")
    assert 'thermo-roots-demo = "thermo_roots.demo:main"' in pyproject
    assert demo.WORK_FOLDER in quick
    with pytest.raises(SystemExit):
        demo.main(["--help"])
    assert "--lab" in capsys.readouterr().out


def test_readme_states_the_cautions():
    text = README.lower()
    assert "screening" in text and "licensed engineer" in text and "local codes" in text
