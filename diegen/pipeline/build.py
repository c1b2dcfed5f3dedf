"""Build every piece of a spec under ``<out>/<spec id>/``: what to rebuild, the manifest, the wing summary."""

from __future__ import annotations

import contextlib
import os
import stat
from collections.abc import Callable
from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path

import numpy as np

from diegen import __version__
from diegen.analysis import RibAnalysis
from diegen.errors import OutputError
from diegen.fileio import confined_to, remove_empty_folder, remove_file, write_text
from diegen.findings import Finding, once, tagged
from diegen.geometry.polygon import outline_deviation_mm
from diegen.locate import analyse_located, refusals_located
from diegen.pipeline.diff import changed_keys, keys_text
from diegen.pipeline.folder import check_output_folder
from diegen.pipeline.hashing import piece_hash, rib_input_hash
from diegen.pipeline.jobs import Spec, rib_jobs
from diegen.pipeline.lock import BuildLock, remove_stale_temporaries
from diegen.pipeline.manifest import MANIFEST, Manifest, PieceRecord, RibRecord
from diegen.pipeline.outputs import DieWriter
from diegen.pipeline.workers import PieceTask, Progress, TaskResult, WorkerPool, pool_size, run_tasks
from diegen.reports.document import piece_json
from diegen.spec.model import RibSpec, SetSpec, WingSpec

_ANALYSIS_CACHE: dict[tuple, RibAnalysis] = {}


def analysed(rib_spec: RibSpec, section: np.ndarray | None) -> RibAnalysis:
    """The rib's analysis, computed once per process (the build, its summary and the pieces built here share it)."""
    key = (rib_input_hash(rib_spec, section), rib_spec.file, rib_spec.positions)  # findings name the file
    if key not in _ANALYSIS_CACHE:
        if len(_ANALYSIS_CACHE) >= 256:
            _ANALYSIS_CACHE.clear()
        _ANALYSIS_CACHE[key] = analyse_located(rib_spec, section)
    return _ANALYSIS_CACHE[key]


@dataclass
class PieceOutcome:
    part_id: str
    status: str  # built | unchanged | failed
    files: tuple[str, ...] = ()
    error: str = ""
    deviation_mm: float | None = None  # largest die-outline change from the previous build
    seconds: float = 0.0
    reason: str = ""  # why a piece whose inputs did not change was rebuilt (a file changed on disk, ...)


FAILURE_NOTE = "FAILED.txt"
"""The plain-text note a failed piece leaves in its folder (why, and when); a later good build removes it."""


@dataclass
class BuildResult:
    """What a build did: every piece of the spec, the findings (as ``check`` counts them), the folders of pieces no
    longer in the spec that were removed, and those left in place (with why)."""

    folder: Path
    outcomes: list[PieceOutcome]
    warnings: list[Finding]
    removed: list[str] = field(default_factory=list)
    left: list[tuple[str, str]] = field(default_factory=list)  # (part id, why its folder was kept)

    @property
    def failed(self) -> list[PieceOutcome]:
        return [o for o in self.outcomes if o.status == "failed"]

    def summary(self) -> str:
        built = [o for o in self.outcomes if o.status == "built"]
        same = [o for o in self.outcomes if o.status == "unchanged"]
        lines = [f"{len(built)} piece(s) built, {len(same)} unchanged, {len(self.failed)} failed → {self.folder}"]
        for o in built:
            change = (o.reason if o.reason else "new" if o.deviation_mm is None
                      else f"die outline moved up to {o.deviation_mm:.3f} mm")
            lines.append(f"  built      {o.part_id} ({change}; {o.seconds:.1f} s)")
        if same and built:
            lines.append(f"  unchanged  {', '.join(o.part_id for o in same)}")
        for o in self.failed:
            lines.append(f"  FAILED     {o.part_id}: {o.error}" + (f" ({o.reason})" if o.reason else ""))
        for part in self.removed:
            lines.append(f"  removed    {part} (no longer in the spec)")
        for part, why in self.left:
            lines.append(f"  left in place: {self.folder / part} {why}")
        if self.warnings:
            lines.append(f"{len(self.warnings)} warning(s) ({tagged(self.warnings)}): see `diegen check` for each, "
                         "and each piece's report and shop sheet")
        return "\n".join(lines)


def _record(folder: Path, manifest: Manifest, task: PieceTask, result: TaskResult, reason: str) -> PieceOutcome:
    rib, piece = task.rib, task.rib.pieces[task.index]
    part = piece.piece.part_id
    old = manifest.piece(part)
    deviation = outline_deviation_mm(old.outline, piece.piece.outline) if old and old.outline else None
    numbers = piece_json(rib, piece)
    numbers = {"chord_mm": numbers["chord_mm"], "bend": numbers["bend"], "die": numbers["die"],
               "blank": numbers["blank"], "press": numbers["press"],
               "max_shrink_strain": numbers["flange"]["max_shrink_strain"],
               "max_stretch_strain": numbers["flange"]["max_stretch_strain"],
               "flutes": len(numbers["flange"]["flutes"]), "notches": len(numbers["flange"]["notches"])}
    failed = bool(result.error)
    earlier = list(old.files) if old else []
    note = ""
    if failed:  # nothing from an earlier build may pass for this piece's output: remove it, say why
        gone = _remove_files(folder / part, earlier)
        note = _leave_failure_note(folder / part, part, result.error, gone, old.note if old else "")
    else:
        _remove_files(folder / part, [n for n in earlier if n not in result.files])  # a tile fewer, say
        if old and old.note:
            _remove_files(folder / part, [old.note])
        if not reason and deviation is not None and deviation < 0.0005 and old is not None:
            keys = changed_keys(old.numbers, numbers)
            reason = f"same die outline; {keys_text(keys)} differ" if keys else "same die outline and numbers"
    manifest.pieces[part] = PieceRecord(
        rib=rib.spec.id, piece=piece.piece.name, hash=task.digest if not failed or result.lasting else "",
        status="failed" if failed else "built", error=result.error, files=list(result.files),
        stamps=dict(result.stamps),
        outline=[[round(x, 4) + 0.0, round(y, 4) + 0.0] for x, y in piece.piece.outline],
        numbers=numbers, warnings=[w.as_json() for w in piece.warnings], note=note,
    )
    manifest.save()
    return PieceOutcome(part, "failed" if failed else "built", result.files, result.error, deviation, result.seconds,
                        reason)


def _remove_files(piece_folder: Path, names: list[str]) -> list[str]:
    """Remove the plain files ``names`` (diegen's, by the manifest) from ``piece_folder``; return those removed.

    Nothing is followed through a link or removed outside the output folder (:func:`diegen.fileio.remove_file`);
    a piece folder that leads out is left alone.
    """
    removed = []
    for name in names:
        try:
            if remove_file(piece_folder / name):
                removed.append(name)
        except (OutputError, OSError):
            pass
    return removed


def _leave_failure_note(piece_folder: Path, part: str, error: str, removed: list[str], earlier_note: str) -> str:
    """Write :data:`FAILURE_NOTE` into the piece folder; return its name ('' when it could not be written, or a
    file of that name is somebody else's)."""
    path = piece_folder / FAILURE_NOTE
    if earlier_note != FAILURE_NOTE and os.path.lexists(path):
        return ""
    when = datetime.now().astimezone().isoformat(timespec="seconds")
    lines = [f"{part} failed to build ({when}, diegen {__version__}).", "", f"Reason: {error}", ""]
    if removed:
        lines.append(f"Removed the files an earlier build wrote for this piece: {', '.join(removed)}.")
    lines.append("Nothing in this folder is output for this piece. A successful build of it removes this note.")
    try:
        write_text(path, "\n".join(lines) + "\n")
    except (OutputError, OSError):
        return ""
    return FAILURE_NOTE


def _clear_dropped(folder: Path, record: PieceRecord, part: str) -> str:
    """Remove the folder of a piece no longer in the spec when it holds only files diegen wrote for it (as they
    were written); otherwise leave it all and say why ('' when removed)."""
    where = folder / part
    try:
        mode = os.lstat(where).st_mode
    except FileNotFoundError:
        return ""
    if not stat.S_ISDIR(mode):
        return f"is {'a symbolic link' if stat.S_ISLNK(mode) else 'not a folder'}, not a folder diegen made"
    ours = set(record.files) | ({record.note} if record.note else set())
    foreign = []
    for entry in sorted(os.scandir(where), key=lambda e: e.name):
        if entry.name not in ours or not entry.is_file(follow_symlinks=False):
            foreign.append(entry.name)
        elif (stamp := record.stamps.get(entry.name)) is not None and stamp.check(where / entry.name):
            foreign.append(f"{entry.name} (changed since diegen wrote it)")
    if foreign:
        return f"holds files diegen did not write: {', '.join(foreign)}"
    _remove_files(where, sorted(ours))
    remove_empty_folder(where)
    return "" if not os.path.lexists(where) else "could not be removed"


def build_spec(spec: Spec, out: Path, die_writer: DieWriter, warm_up: Callable[[], None] | None = None,
               force: bool = False, jobs: int | None = None, progress: bool = False) -> BuildResult:
    """Build every piece of ``spec`` under ``out/<spec id>/``; ``die_writer`` writes each piece's die files.

    Nothing is written, renamed or removed outside that folder (resolved): a link that leads out fails its
    piece.  An ``out`` that cannot hold the build is refused (:class:`OutputError`) before anything is made.
    """
    folder = out / spec.id
    with refusals_located(spec):
        jobs_of_spec = list(rib_jobs(spec))
    check_output_folder(out, spec.id, (f"{job.rib.id}-{name}" for job in jobs_of_spec
                                       for name in job.rib.shared.pieces))
    with BuildLock(folder), confined_to(folder) as root, contextlib.ExitStack() as later:
        remove_stale_temporaries(folder)
        manifest = Manifest.load(folder / MANIFEST)
        kind = spec.kind
        changed = (manifest.spec, manifest.kind) != (spec.id, kind)
        manifest.spec, manifest.kind = spec.id, kind
        outcomes: list[PieceOutcome] = []
        tasks: list[PieceTask] = []
        refused: list[PieceTask] = []
        reasons: dict[str, str] = {}
        warnings: list[Finding] = []
        rib_warnings: list[Finding] = []
        analyses: list[RibAnalysis] = []

        def stale(part: str) -> str:
            if part not in reasons:
                reasons[part] = manifest.stale(folder, part)
            return reasons[part]

        keys = [rib_input_hash(job.rib, job.section) for job in jobs_of_spec]
        unchanged = [not force and job.rib.id in manifest.ribs and manifest.ribs[job.rib.id].input_hash == key
                     and not any(stale(p) for p in manifest.ribs[job.rib.id].pieces)
                     for job, key in zip(jobs_of_spec, keys, strict=True)]
        pieces = sum(len(job.rib.shared.pieces) for job, same in zip(jobs_of_spec, unchanged, strict=True) if not same)
        # workers start now, so their imports overlap the analysis below
        pool = later.enter_context(WorkerPool(pool_size(jobs, pieces) if pieces else 1, warm_up))
        for job, key, same in zip(jobs_of_spec, keys, unchanged, strict=True):
            rib_entry = manifest.ribs.get(job.rib.id)
            if same:
                outcomes.extend(PieceOutcome(p, "unchanged") for p in rib_entry.pieces)
                rib_warnings.extend(Finding.from_json(w) for w in rib_entry.warnings)
                warnings.extend(Finding.from_json(w) for p in rib_entry.pieces for w in manifest.pieces[p].warnings)
                continue
            with refusals_located(job.rib):
                rib = analysed(job.rib, job.section)
            analyses.append(rib)
            rib_warnings.extend(rib.geometry.warnings)
            manifest.ribs[job.rib.id] = RibRecord(key, [p.piece.part_id for p in rib.pieces],
                                                  warnings=[w.as_json() for w in rib.geometry.warnings])
            for index, piece in enumerate(rib.pieces):
                part = piece.piece.part_id
                digest = piece_hash(rib, piece)
                entry = manifest.piece(part)
                warnings.extend(piece.warnings)
                same_inputs = not force and entry is not None and entry.hash == digest
                if same_inputs and not stale(part):
                    outcomes.append(PieceOutcome(part, "unchanged"))
                    continue
                if same_inputs and entry.status == "failed":  # the same inputs failed last time: so they would now
                    if entry.note and not os.path.lexists(folder / part / entry.note):
                        entry.note = _leave_failure_note(folder / part, part, entry.error, [], entry.note)
                        manifest.dirty = True
                    outcomes.append(PieceOutcome(part, "failed", error=entry.error,
                                                 reason="inputs unchanged since it failed; not tried again"))
                    continue
                task = PieceTask(rib, index, digest)
                if piece.die is not None and not piece.die.buildable:  # check refused it: no kernel call
                    refused.append(task)
                    continue
                tasks.append(task)
                # say why when nothing the piece is made from changed: a file changed on disk, a failed attempt
                unfinished = entry is not None and entry.status != "built"
                reasons[part] = stale(part) if same_inputs or (unfinished and not force) else ""
                if force and entry is not None and entry.status == "built" and entry.hash == digest:
                    reasons[part] = f"rebuilt (forced; {manifest.stale(folder, part) or 'no change'})"
        for task in refused:
            plan = task.rib.pieces[task.index].die
            outcomes.append(_record(folder, manifest, task,
                                    TaskResult(task.part_id, (), plan.refusal or "", 0.0, lasting=True), ""))
        _build_tasks(tasks, folder, root, manifest, outcomes, reasons, die_writer, pool, progress)
        removed, left = _drop_pieces_not_in(folder, manifest, {o.part_id for o in outcomes},
                                            {job.rib.id for job in jobs_of_spec})
        for rib in analyses:
            entry = manifest.ribs[rib.spec.id]
            entry.complete = all((manifest.piece(p) or PieceRecord()).status == "built" for p in entry.pieces)
            if not entry.complete:
                entry.input_hash = ""  # re-analyse next time
        if tasks or refused or analyses or changed or removed or left or manifest.dirty:
            manifest.save()
        order = manifest.part_order()
        outcomes.sort(key=lambda o: order.get(o.part_id, 0))
        if isinstance(spec, (WingSpec, SetSpec)):
            from diegen.reports.summary import update_summary_status, write_summary

            status = {o.part_id: o.status for o in outcomes}
            if tasks or refused or changed or removed or not update_summary_status(folder, status):
                write_summary(spec, [analysed(job.rib, job.section) for job in jobs_of_spec], folder, status)
    return BuildResult(folder, outcomes, once(rib_warnings) + warnings, removed, left)


def _drop_pieces_not_in(folder: Path, manifest: Manifest, parts: set[str],
                        ribs: set[str]) -> tuple[list[str], list[tuple[str, str]]]:
    """Forget the pieces (and ribs) no longer in the spec, removing each one's folder when it holds only the files
    diegen wrote for it; a folder holding anything else is left, its piece recorded as ``left``."""
    removed: list[str] = []
    left: list[tuple[str, str]] = []
    for rib in [r for r in manifest.ribs if r not in ribs]:
        del manifest.ribs[rib]
    for part in sorted(p for p in manifest.pieces if p not in parts):
        record = manifest.pieces[part]
        why = _clear_dropped(folder, record, part)
        if why:
            record.status, record.hash, record.error = "left", "", f"no longer in the spec; its folder {why}"
            left.append((part, why))
        else:
            del manifest.pieces[part]
            removed.append(part)
    return removed, left


def _build_tasks(tasks: list[PieceTask], folder: Path, root: Path, manifest: Manifest, outcomes: list[PieceOutcome],
                 reasons: dict[str, str], die_writer: DieWriter, pool: WorkerPool, progress: bool) -> None:
    if not tasks:
        return
    bar = Progress(len(tasks), progress)
    claimed = {t.part_id: manifest.piece(t.part_id) is not None for t in tasks}
    for task in tasks:  # claim every piece before writing, so an interrupted piece's files stay ours
        entry = manifest.pieces.setdefault(task.part_id, PieceRecord())
        entry.status, entry.hash = "building", ""
    manifest.save()

    def finish(task: PieceTask, result: TaskResult) -> None:
        outcomes.append(_record(folder, manifest, task, result, reasons.get(task.part_id, "")))
        bar.step(result.part_id)

    run_tasks(tasks, folder, root, claimed, die_writer, pool, finish)


__all__ = ["FAILURE_NOTE", "BuildResult", "PieceOutcome", "build_spec"]
