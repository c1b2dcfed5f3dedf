"""Build every piece of a spec under ``<out>/<spec id>/``: what to rebuild, the manifest, the wing summary."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from diegen.analysis import RibAnalysis
from diegen.fileio import confined_to
from diegen.findings import Finding
from diegen.geometry.polygon import outline_deviation_mm
from diegen.locate import refusals_located
from diegen.pipeline.folder import check_output_folder
from diegen.pipeline.hashing import piece_hash, rib_input_hash
from diegen.pipeline.jobs import Spec, rib_jobs
from diegen.pipeline.lock import BuildLock, remove_stale_temporaries
from diegen.pipeline.manifest import MANIFEST, Manifest, PieceRecord, RibRecord
from diegen.pipeline.outputs import DieWriter
from diegen.pipeline.workers import PieceTask, Progress, TaskResult, analysed, run_tasks
from diegen.reports.document import piece_json
from diegen.spec.model import WingSpec


@dataclass
class PieceOutcome:
    part_id: str
    status: str  # built | unchanged | failed
    files: tuple[str, ...] = ()
    error: str = ""
    deviation_mm: float | None = None  # largest die-outline change from the previous build
    seconds: float = 0.0
    reason: str = ""  # why a piece whose inputs did not change was rebuilt (a file changed on disk, ...)


@dataclass
class BuildResult:
    folder: Path
    outcomes: list[PieceOutcome]
    warnings: list[Finding]

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
            lines.append(f"  FAILED     {o.part_id}: {o.error}")
        if self.warnings:
            lines.append(f"{len(self.warnings)} warning(s): see each piece's report and shop sheet")
        return "\n".join(lines)


def _record(manifest: Manifest, task: PieceTask, result: TaskResult, reason: str) -> PieceOutcome:
    rib, piece = task.rib, task.rib.pieces[task.index]
    part = piece.piece.part_id
    old = manifest.piece(part)
    deviation = outline_deviation_mm(old.outline, piece.piece.outline) if old and old.outline else None
    numbers = piece_json(rib, piece)
    failed = bool(result.error)
    manifest.pieces[part] = PieceRecord(
        rib=rib.spec.id, piece=piece.piece.name, hash="" if failed else task.digest,
        status="failed" if failed else "built", error=result.error, files=list(result.files),
        stamps=dict(result.stamps),
        outline=[[round(x, 4), round(y, 4)] for x, y in piece.piece.outline],
        numbers={"chord_mm": numbers["chord_mm"], "bend": numbers["bend"], "die": numbers["die"],
                 "blank": numbers["blank"], "press": numbers["press"],
                 "max_shrink_strain": numbers["flange"]["max_shrink_strain"],
                 "max_stretch_strain": numbers["flange"]["max_stretch_strain"],
                 "flutes": len(numbers["flange"]["flutes"]), "notches": len(numbers["flange"]["notches"])},
        warnings=[w.as_json() for w in piece.warnings],
    )
    manifest.save()
    return PieceOutcome(part, "failed" if failed else "built", result.files, result.error, deviation, result.seconds,
                        reason)


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
    with BuildLock(folder), confined_to(folder) as root:
        remove_stale_temporaries(folder)
        manifest = Manifest.load(folder / MANIFEST)
        kind = "wing" if isinstance(spec, WingSpec) else "rib"
        changed = (manifest.spec, manifest.kind) != (spec.id, kind)
        manifest.spec, manifest.kind = spec.id, kind
        outcomes: list[PieceOutcome] = []
        tasks: list[PieceTask] = []
        refused: list[PieceTask] = []
        reasons: dict[str, str] = {}
        warnings: list[Finding] = []
        analyses: list[RibAnalysis] = []

        def stale(part: str) -> str:
            if part not in reasons:
                reasons[part] = manifest.stale(folder, part)
            return reasons[part]

        for job in jobs_of_spec:
            key = rib_input_hash(job.rib, job.section)
            rib_entry = manifest.ribs.get(job.rib.id)
            if (not force and rib_entry and rib_entry.input_hash == key
                    and not any(stale(p) for p in rib_entry.pieces)):
                outcomes.extend(PieceOutcome(p, "unchanged") for p in rib_entry.pieces)
                warnings.extend(Finding.from_json(w) for p in rib_entry.pieces for w in manifest.pieces[p].warnings)
                continue
            with refusals_located(spec):
                rib = analysed(job.rib, job.section)
            analyses.append(rib)
            manifest.ribs[job.rib.id] = RibRecord(key, [p.piece.part_id for p in rib.pieces])
            for index, piece in enumerate(rib.pieces):
                part = piece.piece.part_id
                digest = piece_hash(rib, piece)
                entry = manifest.piece(part)
                warnings.extend(piece.warnings)
                same_inputs = not force and entry is not None and entry.hash == digest
                if same_inputs and not stale(part):
                    outcomes.append(PieceOutcome(part, "unchanged"))
                    continue
                task = PieceTask(rib, job.section, index, digest)
                if piece.die is not None and not piece.die.buildable:  # check refused it: no kernel call
                    refused.append(task)
                    continue
                tasks.append(task)
                # say why when nothing the piece is made from changed: a file changed on disk, a failed attempt
                unfinished = entry is not None and entry.status != "built"
                reasons[part] = stale(part) if same_inputs or (unfinished and not force) else ""
        for task in refused:
            plan = task.rib.pieces[task.index].die
            outcomes.append(_record(manifest, task, TaskResult(task.part_id, (), plan.refusal or "", 0.0), ""))
        _build_tasks(tasks, folder, root, manifest, outcomes, reasons, die_writer, warm_up, jobs, progress)
        for rib in analyses:
            entry = manifest.ribs[rib.spec.id]
            entry.complete = all((manifest.piece(p) or PieceRecord()).status == "built" for p in entry.pieces)
            if not entry.complete:
                entry.input_hash = ""  # re-analyse next time
        if tasks or refused or analyses or changed or manifest.dirty:
            manifest.save()
        if isinstance(spec, WingSpec) and (tasks or refused or not (folder / "summary.csv").is_file()):
            from diegen.reports.summary import write_wing_summary

            write_wing_summary(spec, [analysed(job.rib, job.section) for job in jobs_of_spec], folder)
    order = manifest.part_order()
    outcomes.sort(key=lambda o: order.get(o.part_id, 0))
    return BuildResult(folder, outcomes, warnings)


def _build_tasks(tasks: list[PieceTask], folder: Path, root: Path, manifest: Manifest, outcomes: list[PieceOutcome],
                 reasons: dict[str, str], die_writer: DieWriter, warm_up: Callable[[], None] | None,
                 jobs: int | None, progress: bool) -> None:
    if not tasks:
        return
    bar = Progress(len(tasks), progress)
    claimed = {t.part_id: manifest.piece(t.part_id) is not None for t in tasks}
    for task in tasks:  # claim every piece before writing, so an interrupted piece's files stay ours
        entry = manifest.pieces.setdefault(task.part_id, PieceRecord())
        entry.status, entry.hash = "building", ""
    manifest.save()

    def finish(task: PieceTask, result: TaskResult) -> None:
        outcomes.append(_record(manifest, task, result, reasons.get(task.part_id, "")))
        bar.step(result.part_id)

    run_tasks(tasks, folder, root, claimed, die_writer, warm_up, finish, jobs)


__all__ = ["BuildResult", "PieceOutcome", "build_spec"]
