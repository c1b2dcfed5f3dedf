"""Building into folders: layout, content hashes, incremental rebuilds, the manifest, the lock, foreign files.

The build orchestration is exercised with the solid step replaced by a small
stand-in writer (the solid layer has its own tests in test_solid.py); one slow
test builds a real die end to end.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from diegen import api
from diegen.errors import OutputError
from diegen.pipeline.hashing import rib_input_hash
from diegen.pipeline.lock import BuildLock
from diegen.pipeline.manifest import Manifest

ROOT = Path(__file__).resolve().parents[1]
DEMO_RIB = ROOT / "specs" / "demo-rib.yaml"


def test_layout_and_manifest(tmp_path, fake_solids):
    result = api.build(api.load(DEMO_RIB), tmp_path, jobs=1, die_writer=fake_solids)
    assert not result.failed
    folder = tmp_path / "T1"
    manifest = json.loads((folder / "manifest.json").read_text())
    assert set(manifest["pieces"]) == {"T1-nose", "T1-center", "T1-tail"}
    for part, entry in manifest["pieces"].items():
        assert entry["status"] == "built" and len(entry["hash"]) == 24
        for name in entry["files"]:
            assert (folder / part / name).is_file(), name
        assert {f"{part}-blank.dxf", f"{part}-blank.svg", f"{part}-blank.pdf", f"{part}-preview.png",
                f"{part}-report.json", f"{part}-sheet.md"} <= set(entry["files"])
        report = json.loads((folder / part / f"{part}-report.json").read_text())
        assert report["id"] == part
    sheet = (folder / "T1-nose" / "T1-nose-sheet.md").read_text()
    assert "Caution" in sheet and "local codes and licensed practice" in sheet


@pytest.mark.slow  # several builds of three pieces: blanks, PDFs and previews each time
def test_second_build_rewrites_nothing_and_force_rebuilds(tmp_path, fake_solids):
    spec = api.load(DEMO_RIB)
    api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
    stamps = {p: p.stat().st_mtime_ns for p in (tmp_path / "T1").rglob("*-*.*")}
    fake_solids.clear()
    result = api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
    assert fake_solids == [] and {o.status for o in result.outcomes} == {"unchanged"}
    assert stamps == {p: p.stat().st_mtime_ns for p in (tmp_path / "T1").rglob("*-*.*")}
    result = api.build(spec, tmp_path, jobs=1, die_writer=fake_solids, force=True)
    assert sorted(fake_solids) == ["T1-center", "T1-nose", "T1-tail"]
    assert {o.status for o in result.outcomes} == {"built"}


def test_change_rebuilds_only_what_changed(tmp_path, fake_solids):
    text = DEMO_RIB.read_text()
    spec_path = tmp_path / "rib.yaml"
    spec_path.write_text(text)
    api.build(api.load(spec_path), tmp_path / "out", jobs=1, die_writer=fake_solids)
    fake_solids.clear()
    # moving the rear spar changes the centre and tail pieces, not the nose
    spec_path.write_text(text.replace("at: 0.70", "at: 0.68"))
    result = api.build(api.load(spec_path), tmp_path / "out", jobs=1, die_writer=fake_solids)
    status = {o.part_id: o for o in result.outcomes}
    assert status["T1-nose"].status == "unchanged"
    assert status["T1-center"].status == "built" and status["T1-tail"].status == "built"
    # 0.02 of a 1016 mm chord moves the rear end face by about 20 mm
    assert status["T1-center"].deviation_mm == pytest.approx(0.02 * 1016, rel=0.05)
    assert sorted(fake_solids) == ["T1-center", "T1-tail"]


@pytest.mark.slow  # several builds of three pieces: blanks, PDFs and previews each time
def test_missing_file_is_rebuilt(tmp_path, fake_solids):
    spec = api.load(DEMO_RIB)
    api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
    (tmp_path / "T1" / "T1-tail" / "T1-tail-blank.svg").unlink()
    fake_solids.clear()
    result = api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
    assert [o.part_id for o in result.outcomes if o.status == "built"] == ["T1-tail"]


@pytest.mark.slow  # several builds of three pieces: blanks, PDFs and previews each time
def test_foreign_file_is_never_overwritten(tmp_path, fake_solids):
    folder = tmp_path / "T1" / "T1-nose"
    folder.mkdir(parents=True)
    mine = folder / "T1-nose-blank.dxf"
    mine.write_text("my own drawing")
    result = api.build(api.load(DEMO_RIB), tmp_path, jobs=1, die_writer=fake_solids)
    failed = {o.part_id: o.error for o in result.outcomes if o.status == "failed"}
    assert "not written by diegen" in failed["T1-nose"]
    assert mine.read_text() == "my own drawing"
    assert {o.part_id for o in result.outcomes if o.status == "built"} == {"T1-center", "T1-tail"}


def test_second_build_into_the_same_folder_is_refused(tmp_path):
    with BuildLock(tmp_path / "T1"), pytest.raises(OutputError, match="another diegen build"), \
            BuildLock(tmp_path / "T1"):
        pass


def test_rib_input_hash_ignores_file_location_but_not_values():
    spec = api.load(DEMO_RIB)
    from dataclasses import replace

    assert rib_input_hash(spec, None) == rib_input_hash(replace(spec, file="/elsewhere/x.yaml"), None)
    assert rib_input_hash(spec, None) != rib_input_hash(replace(spec, chord_mm=spec.chord_mm + 0.001), None)


@pytest.mark.slow  # several builds of three pieces: blanks, PDFs and previews each time
def test_corrupt_manifest_means_full_rebuild(tmp_path, fake_solids):
    spec = api.load(DEMO_RIB)
    api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
    (tmp_path / "T1" / "manifest.json").write_text("{not json")
    assert Manifest.load(tmp_path / "T1" / "manifest.json").pieces == {}
    fake_solids.clear()
    result = api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
    # the files exist but were never recorded: diegen refuses to overwrite what it cannot prove it wrote
    assert all(o.status == "failed" and "not written by diegen" in o.error for o in result.outcomes)


def test_diff_names_changed_pieces(tmp_path):
    old = api.load(DEMO_RIB)
    changed = tmp_path / "rib.yaml"
    changed.write_text(DEMO_RIB.read_text().replace("at: 0.70", "at: 0.68"))
    text = api.diff_text(old, api.load(changed))
    lines = {line.split()[1].rstrip(":"): line.split()[0] for line in text.splitlines()[1:]}
    assert lines == {"T1-nose": "unchanged", "T1-center": "changed", "T1-tail": "changed"}


@pytest.mark.slow
@pytest.mark.solid
def test_real_build_of_the_demo_rib_nose(tmp_path):
    """End to end with the solid kernel: STEP re-imports as one valid closed solid (OCP BRepCheck_Analyzer)."""
    from dataclasses import replace

    from diegen.die.occ.validate import check_step_file

    spec = api.load(DEMO_RIB)
    spec = replace(spec, shared=replace(spec.shared, pieces=("nose",)))
    result = api.build(spec, tmp_path, jobs=1)
    assert not result.failed, result.summary()
    check_step_file(tmp_path / "T1" / "T1-nose" / "T1-nose-die.step")


def test_two_builds_making_the_same_output_folder_at_once_both_go_on(tmp_path, monkeypatch):
    """A parent folder made by another build between the check and the mkdir is taken as it is, not an error."""
    import os

    from diegen.pipeline import lock

    real_mkdir = os.mkdir

    def racing_mkdir(path, *args, **kwargs):
        if not os.path.exists(path):
            real_mkdir(path, *args, **kwargs)  # the other build gets there first
        return real_mkdir(path, *args, **kwargs)

    monkeypatch.setattr(lock.os, "mkdir", racing_mkdir)
    made = lock._make_folders(tmp_path / "out" / "T1")
    assert (tmp_path / "out" / "T1").is_dir() and made == []


def test_worker_gets_the_analysis_pickled_whole(analysis) -> None:
    """Build workers receive the analysed rib (pickled) instead of analysing it again: the copy must equal the
    original, the sheet alloy's read-only source table included."""
    import pickle

    copy = pickle.loads(pickle.dumps(analysis))
    assert copy == analysis
    alloy = analysis.pieces[0].alloy
    assert copy.pieces[0].alloy.sources == alloy.sources and alloy.sources["yield_mpa"]
