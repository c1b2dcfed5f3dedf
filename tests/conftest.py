"""Shared fixtures; the test header names the kernel and geometry library versions in use."""

from __future__ import annotations

import pytest


@pytest.fixture(scope="module")
def spec():
    """The demo rib spec (specs/demo-rib.yaml), loaded once per test module."""
    from testing import DEMO_RIB

    from diegen import api
    from diegen.spec.model import RibSpec

    loaded = api.load(DEMO_RIB)
    assert isinstance(loaded, RibSpec)
    return loaded


@pytest.fixture(scope="module")
def analysis(spec):
    """The analysis of the module's ``spec`` (the demo rib unless the module gives its own)."""
    from diegen import api
    from diegen.analysis import RibAnalysis

    result = api.analyse(spec)
    assert isinstance(result, RibAnalysis)
    return result


@pytest.fixture(scope="module")
def dies(analysis):
    """The analysed rib's dies by piece name, as the die builder gets them."""
    from diegen.die.from_analysis import die_input

    return {p.piece.name: die_input(analysis, p) for p in analysis.pieces}


def pytest_terminal_summary(terminalreporter):
    from testing import REPORTED

    if REPORTED:
        terminalreporter.section("counts")
        for line in REPORTED:
            terminalreporter.write_line(line.strip("\n"))


def pytest_report_header(config):
    import shapely

    from diegen import __version__

    try:
        from importlib.metadata import version

        kernel = f"cadquery {version('cadquery')}, OCP {version('cadquery-ocp')}"
    except Exception:  # noqa: BLE001 - reported, not fatal: the quick tests do not need the kernel
        kernel = "cadquery not installed"
    return f"diegen {__version__}; {kernel}; shapely {shapely.__version__}"


class StandInDies(list):
    """A die writer for build tests: writes a tiny text file in place of the die, records each part built."""

    def __call__(self, rib, piece, folder, claimed=False):
        from diegen.fileio import write_text

        name = f"{piece.piece.part_id}-die.step"
        write_text(folder / name, f"stand-in die for {piece.piece.part_id}\n")
        self.append(piece.piece.part_id)
        return [name], ["stand-in"]


@pytest.fixture
def fake_solids():
    """A stand-in die writer to pass as ``api.build(..., die_writer=fake_solids)``; it lists the parts it wrote."""
    return StandInDies()
