"""The output folder says what the spec makes: a failed piece keeps no earlier output, a piece gone from the spec
goes (unless its folder holds somebody else's files), and the manifest, ``summary.csv`` and the disk agree.

The solid step is the stand-in die writer of ``conftest.fake_solids``; here it can be told to fail a part.
"""

from __future__ import annotations

import csv
import functools
import json
from pathlib import Path

import pytest
from conftest import StandInDies

from diegen import api, cli
from diegen.errors import SolidError
from diegen.pipeline.build import FAILURE_NOTE

ROOT = Path(__file__).resolve().parents[1]
DEMO_RIB = ROOT / "specs" / "demo-rib.yaml"
PIECE_ROLES = ("-die.step", "-blank.dxf", "-blank.svg", "-blank.pdf", "-preview.png", "-report.json", "-sheet.md")


class FailingDies(StandInDies):
    """The stand-in die writer, raising the kernel's error for the parts in ``failing``."""

    def __init__(self, failing: set[str]):
        super().__init__()
        self.failing = failing

    def __call__(self, rib, piece, folder, claimed=False):
        part = piece.piece.part_id
        if part in self.failing:
            self.append(part)
            raise SolidError(f"{part}: the kernel could not close the die's side wall")
        return super().__call__(rib, piece, folder, claimed)


def _rib(tmp_path: Path, pieces: str = "[nose, center, tail]", text: str | None = None) -> Path:
    path = tmp_path / "rib.yaml"
    path.write_text((text or DEMO_RIB.read_text()).replace("pieces: [nose, center, tail]", f"pieces: {pieces}"))
    return path


def _files_on_disk(folder: Path) -> dict[str, set[str]]:
    return {d.name: {f.name for f in d.iterdir()} for d in folder.iterdir() if d.is_dir()}


def _assert_manifest_matches_disk(folder: Path) -> dict:
    """Every built piece's files exist; a failed piece lists none and its folder holds only the failure note."""
    manifest = json.loads((folder / "manifest.json").read_text())
    disk = _files_on_disk(folder)
    assert set(disk) == set(manifest["pieces"])
    for part, entry in manifest["pieces"].items():
        if entry["status"] == "built":
            assert disk[part] == set(entry["files"]), part
        else:
            assert entry["status"] == "failed" and entry["files"] == [] and disk[part] == {FAILURE_NOTE}, part
    return manifest


def test_failed_piece_keeps_no_earlier_output_and_a_dropped_piece_goes(tmp_path, fake_solids):
    out = tmp_path / "out"
    first = api.build(api.load(_rib(tmp_path)), out, jobs=1, die_writer=fake_solids)
    assert not first.failed
    folder = out / "T1"
    for part in ("T1-nose", "T1-center", "T1-tail"):
        assert {part + role for role in PIECE_ROLES} <= {p.name for p in (folder / part).iterdir()}

    # the centre now fails in the kernel, the tail is no longer in the spec; the clamp changes every piece
    text = DEMO_RIB.read_text().replace("at: 0.70", "at: 0.68")
    dies = FailingDies({"T1-center"})
    second = api.build(api.load(_rib(tmp_path, "[nose, center]", text)), out, jobs=1, die_writer=dies)
    status = {o.part_id: o.status for o in second.outcomes}
    assert status == {"T1-nose": "unchanged", "T1-center": "failed"}
    assert second.removed == ["T1-tail"] and second.left == []
    assert not (folder / "T1-tail").exists()
    center = folder / "T1-center"
    assert [p.name for p in center.iterdir()] == [FAILURE_NOTE]  # no die, blank or sheet of the earlier build
    note = (center / FAILURE_NOTE).read_text()
    assert "the kernel could not close the die's side wall" in note and "T1-center-die.step" in note
    assert "20" in note.splitlines()[0]  # the date: 20xx-...
    manifest = _assert_manifest_matches_disk(folder)
    assert set(manifest["pieces"]) == {"T1-nose", "T1-center"}
    assert manifest["pieces"]["T1-center"]["error"] == "T1-center: the kernel could not close the die's side wall"
    summary = second.summary()
    assert "FAILED     T1-center: T1-center: the kernel could not close" in summary
    assert "removed    T1-tail (no longer in the spec)" in summary

    # the same inputs again: reported failed from the manifest, not tried again
    dies.clear()
    third = api.build(api.load(_rib(tmp_path, "[nose, center]", text)), out, jobs=1, die_writer=dies)
    assert dies == [] and [o.part_id for o in third.failed] == ["T1-center"]
    assert "inputs unchanged since it failed; not tried again" in third.summary()
    _assert_manifest_matches_disk(folder)

    # once it builds, the note goes
    fake_solids.clear()
    fourth = api.build(api.load(_rib(tmp_path, "[nose, center]", text)), out, jobs=1, die_writer=fake_solids,
                       force=True)
    assert not fourth.failed and sorted(fake_solids) == ["T1-center", "T1-nose"]
    assert not (center / FAILURE_NOTE).exists()
    _assert_manifest_matches_disk(folder)


def test_dropped_piece_with_somebody_elses_file_is_left_and_named(tmp_path, fake_solids):
    out = tmp_path / "out"
    api.build(api.load(_rib(tmp_path)), out, jobs=1, die_writer=fake_solids)
    tail = out / "T1" / "T1-tail"
    (tail / "my-notes.txt").write_text("trimmed 1 mm off the heel")
    result = api.build(api.load(_rib(tmp_path, "[nose, center]")), out, jobs=1, die_writer=fake_solids)
    assert result.removed == [] and [part for part, _ in result.left] == ["T1-tail"]
    assert f"left in place: {tail} holds files diegen did not write: my-notes.txt" in result.summary()
    assert (tail / "my-notes.txt").read_text() == "trimmed 1 mm off the heel"
    assert (tail / "T1-tail-die.step").is_file()  # nothing of the folder is touched
    manifest = json.loads((out / "T1" / "manifest.json").read_text())
    assert manifest["pieces"]["T1-tail"]["status"] == "left"
    # once the builder moves the file away, the next build removes the folder
    (tail / "my-notes.txt").unlink()
    again = api.build(api.load(_rib(tmp_path, "[nose, center]")), out, jobs=1, die_writer=fake_solids)
    assert again.removed == ["T1-tail"] and not tail.exists()
    assert "T1-tail" not in json.loads((out / "T1" / "manifest.json").read_text())["pieces"]


def test_edited_file_of_a_dropped_piece_keeps_its_folder(tmp_path, fake_solids):
    out = tmp_path / "out"
    api.build(api.load(_rib(tmp_path)), out, jobs=1, die_writer=fake_solids)
    sheet = out / "T1" / "T1-tail" / "T1-tail-sheet.md"
    sheet.write_text(sheet.read_text() + "\nBuilder's note: use the 55 pad.\n")
    result = api.build(api.load(_rib(tmp_path, "[nose, center]")), out, jobs=1, die_writer=fake_solids)
    assert result.left == [("T1-tail", "holds files diegen did not write: T1-tail-sheet.md (changed since diegen "
                                       "wrote it)")]
    assert "Builder's note" in sheet.read_text()


def test_unchanged_failed_piece_exits_1_from_the_command_line(tmp_path, monkeypatch, capsys):
    spec = _rib(tmp_path, "[nose, tail]")
    dies = FailingDies({"T1-tail"})
    monkeypatch.setattr(api, "build", functools.partial(api.build, die_writer=dies))
    out = tmp_path / "out"
    assert cli.main(["build", str(spec), "-o", str(out), "-j", "1"]) == 1
    dies.clear()
    assert cli.main(["build", str(spec), "-o", str(out), "-j", "1"]) == 1
    printed = capsys.readouterr().out
    assert dies == [] and "0 piece(s) built, 1 unchanged, 1 failed" in printed
    assert "FAILED     T1-tail" in printed and "not tried again" in printed


def test_forced_rebuild_of_an_unchanged_spec_says_so(tmp_path, fake_solids):
    spec = api.load(_rib(tmp_path, "[nose]"))
    api.build(spec, tmp_path / "out", jobs=1, die_writer=fake_solids)
    summary = api.build(spec, tmp_path / "out", jobs=1, die_writer=fake_solids, force=True).summary()
    assert "built      T1-nose (rebuilt (forced; no change);" in summary
    assert "die outline moved" not in summary


def test_same_outline_names_the_numbers_that_changed(tmp_path, fake_solids):
    text = DEMO_RIB.read_text()
    before = api.load(_rib(tmp_path, "[nose]"))
    after_path = tmp_path / "stronger.yaml"
    after_path.write_text(text.replace("force: 25 ton", "force: 30 ton").replace(
        "pieces: [nose, center, tail]", "pieces: [nose]"))
    after = api.load(after_path)
    diff = api.diff_text(before, after)
    line = next(line for line in diff.splitlines() if "T1-nose" in line)
    assert line.startswith("  changed    T1-nose: same die outline; ")
    assert "press.force_n" in line and "press.pressure_mpa" in line and line.endswith(" differ")
    assert "bend.part_radius_mm" not in line
    assert api.diff_text(before, before).splitlines()[1:] == ["  unchanged  T1-nose"]
    # a build of the change says the same
    api.build(before, tmp_path / "out", jobs=1, die_writer=fake_solids)
    summary = api.build(after, tmp_path / "out", jobs=1, die_writer=fake_solids).summary()
    assert "built      T1-nose (same die outline; " in summary and "press.force_n" in summary


@pytest.mark.parametrize("spec_path", [DEMO_RIB, ROOT / "specs" / "demo-wing.yaml"], ids=["rib", "wing"])
def test_build_counts_the_warnings_check_reports(spec_path, tmp_path, fake_solids, monkeypatch):
    spec = api.load(spec_path)
    expected = api.warning_count(api.report_json(api.analyse(spec)))
    assert expected > 0
    if spec_path.name == "demo-wing.yaml":  # the count is the whole wing's; build only what it takes to count
        from diegen.pipeline import build as build_module

        monkeypatch.setattr(build_module, "_build_tasks", lambda *args, **kwargs: None)
        monkeypatch.setattr("diegen.reports.summary.write_summary", lambda *args, **kwargs: [])
    result = api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
    assert len(result.warnings) == expected
    assert f"{expected} warning(s) (" in result.summary()
    if spec_path == DEMO_RIB:  # an unchanged second build counts them from the manifest: the same number
        again = api.build(spec, tmp_path, jobs=1, die_writer=fake_solids)
        assert {o.status for o in again.outcomes} == {"unchanged"} and len(again.warnings) == expected


def _small_wing(tmp_path: Path, pieces: str = "[nose, tail]", tip: str = "naca 23012") -> Path:
    text = (ROOT / "specs" / "demo-wing.yaml").read_text().replace("tip: naca 23012", f"tip: {tip}")
    text = text.replace("stations: {count: 13}", "stations: {count: 2}").replace(
        "pieces: [nose, center, tail]", f"pieces: {pieces}")
    path = tmp_path / "wing.yaml"
    path.write_text(text)
    return path


@pytest.mark.slow  # two ribs of blanks, PDFs and previews, and the wing summary, three times
def test_wing_summary_agrees_with_the_manifest_and_the_disk(tmp_path, fake_solids):
    out = tmp_path / "out"
    api.build(api.load(_small_wing(tmp_path)), out, jobs=1, die_writer=fake_solids)
    folder = out / "BW418-wing"

    def rows() -> dict[str, str]:
        return {r["part_id"]: r["status"] for r in csv.DictReader((folder / "summary.csv").open())}

    assert set(rows().values()) == {"built"}
    failing = FailingDies({"BW418-wing-R02-nose"})  # a new tip section changes rib 2, not the root rib
    changed = _small_wing(tmp_path, "[nose]", tip="naca 4412")
    result = api.build(api.load(changed), out, jobs=1, die_writer=failing)
    assert sorted(result.removed) == ["BW418-wing-R01-tail", "BW418-wing-R02-tail"]
    assert rows() == {o.part_id: o.status for o in result.outcomes} == {
        "BW418-wing-R01-nose": "unchanged", "BW418-wing-R02-nose": "failed"}
    manifest = _assert_manifest_matches_disk(folder)
    assert {p: e["status"] for p, e in manifest["pieces"].items()} == {
        "BW418-wing-R01-nose": "built", "BW418-wing-R02-nose": "failed"}
    # nothing changes: the failed piece is reported from the manifest, the summary agrees
    pdf = (folder / "summary.pdf").stat().st_mtime_ns
    failing.clear()
    again = api.build(api.load(changed), out, jobs=1, die_writer=failing)
    assert failing == [] and rows() == {"BW418-wing-R01-nose": "unchanged", "BW418-wing-R02-nose": "failed"}
    assert [o.part_id for o in again.failed] == ["BW418-wing-R02-nose"]
    assert (folder / "summary.pdf").stat().st_mtime_ns == pdf
    _assert_manifest_matches_disk(folder)
