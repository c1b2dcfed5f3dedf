"""The README's two commands: CI runs the test command verbatim; the build command names a real spec."""

from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _commands() -> list[str]:
    lines = (ROOT / "README.md").read_text().splitlines()
    return [line for line in lines if line.startswith("python3 -m venv .venv && ")]


def test_readme_has_exactly_two_commands():
    assert len(_commands()) == 2


def test_ci_runs_the_readme_test_command_verbatim():
    test_command = next(c for c in _commands() if "pytest" in c)
    ci = (ROOT / ".ci" / "run").read_text().splitlines()
    assert test_command in ci


def test_build_command_names_a_spec_that_exists():
    build = next(c for c in _commands() if "diegen build" in c)
    spec = build.split("diegen build", 1)[1].split()[0]
    assert (ROOT / spec).is_file()
