"""Whole-wing builds: every piece of every rib, incremental rebuilds and the change report.

The solid step is replaced by the stand-in die writer of ``conftest.fake_solids``; the die
layer is tested on its own in test_solid.py.
"""

from __future__ import annotations

import csv
import json
from pathlib import Path

import pytest

from diegen import api

ROOT = Path(__file__).resolve().parents[1]


def _small_wing(tmp_path: Path, tip: str = "naca 23012") -> Path:
    text = (ROOT / "specs" / "demo-wing.yaml").read_text()
    text = text.replace("stations: {count: 13}", "stations: {count: 3}").replace("tip: naca 23012", f"tip: {tip}")
    text = text.replace("pieces: [nose, center, tail]", "pieces: [nose, tail]")
    path = tmp_path / "wing.yaml"
    path.write_text(text)
    return path


@pytest.mark.slow  # three ribs of blanks, PDFs and previews, twice
def test_airfoil_change_rebuilds_exactly_the_pieces_whose_outline_changed(tmp_path, fake_solids):
    out = tmp_path / "out"
    first = api.build(api.load(_small_wing(tmp_path)), out, jobs=1, die_writer=fake_solids)
    assert {o.status for o in first.outcomes} == {"built"} and len(first.outcomes) == 6
    folder = out / "BW418-wing"
    rows = list(csv.DictReader((folder / "summary.csv").open()))
    assert [r["part_id"] for r in rows] == [o.part_id for o in first.outcomes]
    assert (folder / "summary.pdf").read_bytes().startswith(b"%PDF")

    fake_solids.clear()
    second = api.build(api.load(_small_wing(tmp_path, tip="naca 4412")), out, jobs=1, die_writer=fake_solids)
    outcome = {o.part_id: o for o in second.outcomes}
    # span fraction 0 is the root section exactly, so rib 1 keeps its outlines; ribs 2 and 3 change
    assert outcome["BW418-wing-R01-nose"].status == "unchanged"
    assert outcome["BW418-wing-R01-tail"].status == "unchanged"
    changed = {p for p, o in outcome.items() if o.status == "built"}
    assert changed == {"BW418-wing-R02-nose", "BW418-wing-R02-tail", "BW418-wing-R03-nose", "BW418-wing-R03-tail"}
    assert all(outcome[p].deviation_mm > 0.1 for p in changed)
    assert sorted(fake_solids) == sorted(changed)
    summary = second.summary()
    for part in changed:
        assert f"built      {part} (die outline moved up to" in summary
    manifest = json.loads((folder / "manifest.json").read_text())
    assert set(manifest["pieces"]) == set(outcome)


def test_check_of_the_whole_demo_wing():
    analysis = api.analyse(api.load(ROOT / "specs" / "demo-wing.yaml"))
    assert len(analysis.ribs) == 13
    report = api.report_json(analysis)
    ids = [p["id"] for p in report["parts"]]
    assert len(ids) == len(set(ids)) and all(i.startswith("BW418-wing-R") for i in ids)
    # the root rib override: heavier sheet and a larger radius
    root = next(p for p in report["parts"] if p["id"] == "BW418-wing-R01-nose")
    assert root["bend"]["part_radius_mm"] == pytest.approx(3.175)
    # the fuel-bay ribs 4 and 5 have no lightening holes
    assert not any(p["holes"] for p in report["parts"] if p["rib"] in ("BW418-wing-R04", "BW418-wing-R05"))


@pytest.mark.parametrize(("paper", "size_pt"), [("letter", (792.0, 612.0)), ("a4", (297 / 25.4 * 72, 210 / 25.4 * 72))])
def test_wing_summary_is_on_the_paper_asked_for(tmp_path, paper, size_pt):
    # Landscape pages: Letter 11 × 8.5 in (ANSI/ASME Y14.1), A4 297 × 210 mm (ISO 216); 72 pt to the inch (ISO
    # 32000-1 §8.3.2.3). Read back with pypdf; the CSV names each rib's section.
    pypdf = pytest.importorskip("pypdf")
    from diegen.reports.summary import write_summary

    path = _small_wing(tmp_path)
    path.write_text(path.read_text().replace("units: in\n", f"units: in\npaper: {paper}\n"))
    spec = api.load(path)
    analysis = api.analyse(spec)
    write_summary(spec, list(analysis.ribs), tmp_path)
    for page in pypdf.PdfReader(tmp_path / "summary.pdf").pages:
        assert (float(page.mediabox.width), float(page.mediabox.height)) == pytest.approx(size_pt, abs=0.01)
    rows = list(csv.DictReader((tmp_path / "summary.csv").open()))
    assert [r["section"] for r in rows if r["piece"] == "nose"] == [
        "NACA 23015", "50 % NACA 23015 + 50 % NACA 23012", "NACA 23012"]


@pytest.mark.slow  # two ribs of dies with the kernel, in two worker processes
@pytest.mark.solid
def test_build_with_two_workers_writes_the_whole_summary(tmp_path):
    """Built by worker processes, the wing's summary PDF is the whole document: planform, table, a page a piece
    (read back with pypdf)."""
    pypdf = pytest.importorskip("pypdf")
    path = _small_wing(tmp_path)
    path.write_text(path.read_text().replace("stations: {count: 3}", "stations: {count: 2}"))
    result = api.build(api.load(path), tmp_path / "out", jobs=2)
    assert [o.status for o in result.outcomes] == ["built"] * 4
    pages = pypdf.PdfReader(result.folder / "summary.pdf").pages
    assert len(pages) == 1 + 1 + 4
    assert "planform" in pages[0].extract_text()


CHILD_CHECK = """
import os, sys
from diegen import api, locate
from diegen.pipeline import jobs
spec = api.load(sys.argv[1])
assert jobs._can_fork(), "a fresh process that never touched the kernel may fork"
work = list(jobs.rib_jobs(spec))
alone = tuple(locate.analyse_located(job.rib, job.section) for job in work)
parent = os.getpid()
real = jobs.analyse_located

def failing_in_children(rib, section=None):
    if os.getpid() != parent and rib.id.endswith("R07"):
        raise RuntimeError("stand-in failure in a forked process")
    return real(rib, section)

jobs.analyse_located = failing_in_children
assert jobs.analyse_jobs(work) == alone
print("same", len(alone))
"""


def test_ribs_analysed_in_forked_processes_equal_those_analysed_alone(tmp_path):
    """A wing's ribs are analysed in forked processes (one a core) where that is safe: the analyses equal those made
    one after the other in one process, and a rib whose analysis fails in a forked process is analysed again in the
    parent. Run in a fresh interpreter, which has never started the solid kernel's threads."""
    import subprocess
    import sys

    script = tmp_path / "child.py"
    script.write_text(CHILD_CHECK)
    done = subprocess.run([sys.executable, str(script), str(ROOT / "specs" / "demo-wing.yaml")], capture_output=True,
                          text=True, cwd=ROOT, timeout=300, check=False)
    assert done.returncode == 0, done.stderr
    assert done.stdout.split() == ["same", "13"]
