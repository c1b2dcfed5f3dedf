"""Input paths that are not plain files: a located, truthful message and exit 2, never a hang.

An airfoil ``file:`` (or the spec itself) that is a folder, a named pipe, a device or too large is refused with
what it is and what was expected; a named pipe or device is never opened.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest
from testing import DEMO_RIB

from diegen import api, cli
from diegen.errors import SpecError
from diegen.fileio import UnusableInput, read_plain_file


@pytest.fixture
def airfoil_spec(tmp_path):
    def spec_for(airfoil: Path) -> Path:
        path = tmp_path / "rib.yaml"
        path.write_text(DEMO_RIB.read_text().replace("airfoil: naca 2412", f"airfoil: {{file: {airfoil}}}"))
        return path

    return spec_for


@pytest.mark.parametrize("kind", ["folder", "fifo", "device", "too large"])
def test_airfoil_path_that_is_not_a_plain_file(tmp_path, airfoil_spec, kind):
    if kind == "folder":
        airfoil, found = tmp_path / "section.dat", "is a folder"
        airfoil.mkdir()
    elif kind == "fifo":
        airfoil, found = tmp_path / "section.dat", "is a named pipe (FIFO)"
        os.mkfifo(airfoil)
    elif kind == "device":
        airfoil, found = Path("/dev/zero"), "is a character device"
    else:
        airfoil, found = tmp_path / "section.dat", f"file is {6 * 2**20} bytes, larger than the 5 MB limit for"
        with open(airfoil, "wb") as handle:
            handle.truncate(6 * 2**20)  # sparse
    spec_path = airfoil_spec(airfoil)
    line = next(i for i, text in enumerate(spec_path.read_text().splitlines(), 1) if text.startswith("airfoil:"))
    with pytest.raises(SpecError) as caught:
        api.load(spec_path)
    (problem,) = caught.value.problems
    assert (problem.file, problem.line, problem.key) == (str(spec_path), line, "airfoil.file")
    assert problem.message == f"airfoil file {airfoil}: {found}" + (
        " a plain-text airfoil coordinate file" if kind == "too large" else
        ", expected a plain-text airfoil coordinate file")
    assert "not found" not in problem.message


def test_airfoil_fifo_and_device_never_hang_the_command_line(tmp_path, airfoil_spec):
    fifo = tmp_path / "pipe.dat"
    os.mkfifo(fifo)
    for airfoil in (fifo, Path("/dev/zero")):
        run = subprocess.run([sys.executable, "-m", "diegen.cli", "build", str(airfoil_spec(airfoil)), "-o",
                              str(tmp_path / "out"), "-q"], capture_output=True, text=True, timeout=60, check=False)
        assert run.returncode == cli.EXIT_BAD_INPUT and "Traceback" not in run.stderr
        assert "airfoil.file: airfoil file" in run.stderr and "expected a plain-text airfoil" in run.stderr
    assert not (tmp_path / "out").exists()


def test_reading_a_pipe_or_device_directly_is_refused_unopened(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)  # opening it to read would wait for a writer forever
    for path, what in ((fifo, "is a named pipe (FIFO)"), (Path("/dev/zero"), "is a character device"),
                       (tmp_path, "is a folder")):
        with pytest.raises(UnusableInput, match=rf"^{path}: {what.replace('(', '[(]').replace(')', '[)]')}, "
                                                r"expected a spec"):
            read_plain_file(path, 1000, "a spec")


def test_spec_path_that_is_a_pipe_exits_2(tmp_path):
    fifo = tmp_path / "rib.yaml"
    os.mkfifo(fifo)
    run = subprocess.run([sys.executable, "-m", "diegen.cli", "check", str(fifo)], capture_output=True, text=True,
                         timeout=60, check=False)
    assert run.returncode == cli.EXIT_BAD_INPUT
    assert run.stderr.startswith(f"error: {fifo}: is a named pipe (FIFO), expected a YAML spec file\n")
