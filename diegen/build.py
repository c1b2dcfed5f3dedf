"""Building a spec into files: per-piece folders, content hashes, the manifest, parallel workers.

Layout: ``<out>/<spec id>/<part id>/<part id>-{die.step,die.stl,blank.dxf,...}`` and
``<out>/<spec id>/manifest.json``.  Every file is written atomically.  A piece is
rebuilt only when the hash of what it is made from (the piece's geometry, forming
numbers and blank, and the diegen version) changed or one of its files is
missing; a rib whose inputs hash the same as last time is not even re-analysed.
The manifest is rewritten after every finished piece, so an interrupted build
keeps what it finished and the next build does only the rest.  One build at a
time may write into a spec's folder (a lock file; a second one is refused).
"""

from __future__ import annotations

import hashlib
import json
import os
import sys
import time
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import numpy as np

from diegen import __version__
from diegen.analysis import PieceAnalysis, RibAnalysis, analyse_rib
from diegen.errors import DiegenError, OutputError
from diegen.fileio import refuse_foreign, write_text
from diegen.spec.model import RibSpec, WingSpec

MANIFEST = "manifest.json"
LOCK = ".diegen.lock"


# -- hashing -----------------------------------------------------------------
def _digest(*parts: Any) -> str:
    h = hashlib.sha256(__version__.encode())
    for part in parts:
        h.update(b"\0")
        h.update(part if isinstance(part, bytes) else repr(part).encode())
    return h.hexdigest()[:24]


def rib_input_hash(rib: RibSpec, section: np.ndarray | None) -> str:
    """Hash of what a rib is computed from (the spec's file location left out)."""
    return _digest(replace(rib, file=""), b"" if section is None else np.round(np.asarray(section), 12).tobytes())


def piece_hash(rib: RibAnalysis, piece: PieceAnalysis) -> str:
    """Hash of everything a piece's files are made from."""
    from diegen.report import piece_json

    spec = replace(rib.spec, file="")
    return _digest(piece.piece, piece.blank, json.dumps(piece_json(rib, piece), sort_keys=True), spec.shared.die,
                   spec.title)


# -- the manifest ------------------------------------------------------------
@dataclass
class Manifest:
    path: Path
    data: dict[str, Any] = field(default_factory=dict)

    @classmethod
    def load(cls, path: Path) -> "Manifest":
        try:
            data = json.loads(path.read_text())
            if data.get("diegen_version") != __version__:
                data = {}
        except (OSError, ValueError):
            data = {}
        data.setdefault("ribs", {})
        data.setdefault("pieces", {})
        return cls(path, data)

    def save(self) -> None:
        self.data["diegen_version"] = __version__
        write_text(self.path, json.dumps(self.data, indent=1, sort_keys=True))

    def piece(self, part_id: str) -> dict[str, Any] | None:
        return self.data["pieces"].get(part_id)

    def files_ok(self, folder: Path, part_id: str) -> bool:
        entry = self.piece(part_id)
        return bool(entry) and entry.get("status") == "built" and all((folder / part_id / f).is_file() for f in entry["files"])


class BuildLock:
    """Exclusive lock on a spec's output folder; a second build is refused with a clear message."""

    def __init__(self, folder: Path):
        self.path = folder / LOCK
        self.handle: Any = None

    def __enter__(self) -> "BuildLock":
        import fcntl

        self.path.parent.mkdir(parents=True, exist_ok=True)
        self.handle = open(self.path, "a+")
        try:
            fcntl.flock(self.handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            self.handle.close()
            raise OutputError(f"{self.path.parent}: another diegen build is writing here; wait for it to finish") from None
        return self

    def __exit__(self, *exc: object) -> None:
        self.handle.close()
        folder = self.path.parent
        if [p.name for p in folder.iterdir()] == [LOCK]:  # nothing was built: leave no empty folder behind
            self.path.unlink(missing_ok=True)
            folder.rmdir()


def remove_stale_temporaries(folder: Path) -> None:
    """Delete temporaries a killed build left behind (``.name.*.part.ext``, see :mod:`diegen.fileio`)."""
    for path in folder.rglob(".*.part*"):
        if path.is_file():
            path.unlink(missing_ok=True)


# -- results -----------------------------------------------------------------
@dataclass
class PieceOutcome:
    part_id: str
    status: str  # built | unchanged | failed
    files: tuple[str, ...] = ()
    error: str = ""
    deviation_mm: float | None = None  # largest die-outline change from the previous build
    seconds: float = 0.0


@dataclass
class BuildResult:
    folder: Path
    outcomes: list[PieceOutcome]
    warnings: list[str]

    @property
    def failed(self) -> list[PieceOutcome]:
        return [o for o in self.outcomes if o.status == "failed"]

    def summary(self) -> str:
        built = [o for o in self.outcomes if o.status == "built"]
        same = [o for o in self.outcomes if o.status == "unchanged"]
        lines = [f"{len(built)} piece(s) built, {len(same)} unchanged, {len(self.failed)} failed → {self.folder}"]
        for o in built:
            change = "new" if o.deviation_mm is None else f"die outline moved up to {o.deviation_mm:.3f} mm"
            lines.append(f"  built      {o.part_id} ({change}; {o.seconds:.1f} s)")
        if same and built:
            lines.append(f"  unchanged  {', '.join(o.part_id for o in same)}")
        for o in self.failed:
            lines.append(f"  FAILED     {o.part_id}: {o.error}")
        if self.warnings:
            lines.append(f"{len(self.warnings)} warning(s): see each piece's report and shop sheet")
        return "\n".join(lines)


@dataclass(frozen=True)
class Task:
    rib: RibAnalysis
    section: np.ndarray | None
    index: int
    digest: str

    @property
    def part_id(self) -> str:
        return self.rib.pieces[self.index].piece.part_id


# -- one piece ---------------------------------------------------------------
def write_piece(rib: RibAnalysis, piece: PieceAnalysis, folder: Path, claimed: bool = False) -> tuple[str, ...]:
    """Write every file of one piece into ``folder`` (atomically); return their names.

    ``claimed``: the manifest already records this piece, so existing files are diegen's own.
    """
    from diegen.export.dxf import write_dxf
    from diegen.export.pdf import write_pdf
    from diegen.export.plot import preview_plot
    from diegen.export.sheet import shop_sheet
    from diegen.export.svg import write_svg
    from diegen.report import piece_json
    from diegen.solid.from_piece import write_die_files

    part = piece.piece.part_id
    names = {
        "dxf": f"{part}-blank.dxf", "svg": f"{part}-blank.svg", "pdf": f"{part}-blank.pdf",
        "png": f"{part}-preview.png", "json": f"{part}-report.json", "md": f"{part}-sheet.md",
    }
    refuse_foreign([folder / name for name in names.values()], claimed)
    die_files, die_notes = write_die_files(rib, piece, folder, claimed)
    write_dxf(piece.blank, folder / names["dxf"])
    write_svg(piece.blank, folder / names["svg"])
    write_pdf(piece.blank, folder / names["pdf"], paper="letter" if rib.spec.units == "in" else "a4")
    preview_plot(rib, piece, folder / names["png"])
    write_text(folder / names["json"], json.dumps(piece_json(rib, piece), indent=2))
    write_text(folder / names["md"], shop_sheet(rib, piece, die_notes))
    return tuple(die_files) + tuple(names.values())


_ANALYSIS_CACHE: dict[str, RibAnalysis] = {}


def _analysed(rib_spec: RibSpec, section: np.ndarray | None) -> RibAnalysis:
    """The rib's analysis, computed once per process (workers get plain specs, not analyses)."""
    key = rib_input_hash(rib_spec, section)
    if key not in _ANALYSIS_CACHE:
        if len(_ANALYSIS_CACHE) >= 256:
            _ANALYSIS_CACHE.clear()
        _ANALYSIS_CACHE[key] = analyse_rib(rib_spec, section)
    return _ANALYSIS_CACHE[key]


def _piece_task(rib_spec: RibSpec, section: np.ndarray | None, index: int, folder: str,
                claimed: bool) -> tuple[str, tuple[str, ...], str, float]:
    """Worker entry point: build one piece; failures come back as text (the rest of the wing goes on)."""
    start = time.perf_counter()
    rib = _analysed(rib_spec, section)
    piece = rib.pieces[index]
    target = Path(folder) / piece.piece.part_id
    existed = _files_in(target)
    try:
        files = write_piece(rib, piece, target, claimed)
        return piece.piece.part_id, files, "", time.perf_counter() - start
    except DiegenError as error:
        _remove_new_files(target, existed)
        return piece.piece.part_id, (), str(error), time.perf_counter() - start


def _files_in(folder: Path) -> set[str] | None:
    """Names of the files in ``folder`` (None: the folder does not exist)."""
    return {p.name for p in folder.iterdir() if p.is_file()} if folder.is_dir() else None


def _remove_new_files(folder: Path, existed: set[str] | None) -> None:
    """After a failed piece: delete the files this attempt created (a die STEP without its STL, say).

    Files that were there before are left alone: they are earlier good output or somebody else's.
    """
    if not folder.is_dir():
        return
    for path in folder.iterdir():
        if path.is_file() and (existed is None or path.name not in existed):
            path.unlink(missing_ok=True)
    if existed is None and not any(folder.iterdir()):
        folder.rmdir()


def _warm_worker() -> None:
    import cadquery  # noqa: F401  (2-3 s per process: pay it once per worker)


# -- the whole spec ----------------------------------------------------------
def _outline_deviation(old: list | None, new: tuple) -> float | None:
    if not old:
        return None
    from shapely.geometry import Polygon

    return float(Polygon(old).exterior.hausdorff_distance(Polygon(new).exterior))


class _Progress:
    def __init__(self, total: int, enabled: bool):
        self.total, self.done, self.enabled = total, 0, enabled and total > 0

    def step(self, label: str) -> None:
        self.done += 1
        if self.enabled:
            width = 30
            filled = int(width * self.done / self.total)
            sys.stderr.write(f"\r[{'#' * filled}{'.' * (width - filled)}] {self.done}/{self.total} {label[:40]:<40}")
            sys.stderr.flush()
            if self.done == self.total:
                sys.stderr.write("\n")


def build_spec(spec: RibSpec | WingSpec, out: Path, force: bool = False, jobs: int | None = None,
               progress: bool = False) -> BuildResult:
    """Build every piece of ``spec`` under ``out/<spec id>/``."""
    from diegen.api import rib_jobs

    folder = out / spec.id
    with BuildLock(folder):
        remove_stale_temporaries(folder)
        manifest = Manifest.load(folder / MANIFEST)
        manifest.data.update(spec=spec.id, kind="wing" if isinstance(spec, WingSpec) else "rib")
        outcomes: list[PieceOutcome] = []
        tasks: list[Task] = []
        warnings: list[str] = []
        analyses: list[RibAnalysis] = []
        for rib_spec, section in rib_jobs(spec):
            key = rib_input_hash(rib_spec, section)
            rib_entry = manifest.data["ribs"].get(rib_spec.id)
            if (not force and rib_entry and rib_entry.get("input_hash") == key
                    and all(manifest.files_ok(folder, p) for p in rib_entry["pieces"])):
                outcomes.extend(PieceOutcome(p, "unchanged") for p in rib_entry["pieces"])
                warnings.extend(w for p in rib_entry["pieces"] for w in manifest.piece(p).get("warnings", []))
                continue
            rib = _analysed(rib_spec, section)
            analyses.append(rib)
            manifest.data["ribs"][rib_spec.id] = {"input_hash": key, "pieces": [p.piece.part_id for p in rib.pieces],
                                                  "complete": False}
            for index, piece in enumerate(rib.pieces):
                part = piece.piece.part_id
                digest = piece_hash(rib, piece)
                entry = manifest.piece(part)
                warnings.extend(piece.warnings)
                if not force and entry and entry.get("hash") == digest and manifest.files_ok(folder, part):
                    outcomes.append(PieceOutcome(part, "unchanged"))
                    continue
                tasks.append(Task(rib, section, index, digest))
        _run_tasks(tasks, folder, manifest, outcomes, jobs, progress)
        for rib in analyses:
            entry = manifest.data["ribs"][rib.spec.id]
            entry["complete"] = all((manifest.piece(p) or {}).get("status") == "built" for p in entry["pieces"])
            if not entry["complete"]:
                entry["input_hash"] = ""  # re-analyse next time
        manifest.save()
        if isinstance(spec, WingSpec) and (tasks or not (folder / "summary.csv").is_file()):
            from diegen.export.summary import write_wing_summary

            write_wing_summary(spec, folder, manifest)
    order = {p: i for i, p in enumerate(p for r in manifest.data["ribs"].values() for p in r["pieces"])}
    outcomes.sort(key=lambda o: order.get(o.part_id, 0))
    return BuildResult(folder, outcomes, warnings)


def _record(manifest: Manifest, rib: RibAnalysis, index: int, digest: str, files: tuple[str, ...], error: str,
            seconds: float) -> PieceOutcome:
    from diegen.report import piece_json

    piece = rib.pieces[index]
    part = piece.piece.part_id
    old = manifest.piece(part) or {}
    deviation = _outline_deviation(old.get("outline"), piece.piece.outline)
    numbers = piece_json(rib, piece)
    manifest.data["pieces"][part] = {
        "rib": rib.spec.id, "piece": piece.piece.name, "hash": digest if not error else "",
        "status": "failed" if error else "built", "error": error, "files": list(files),
        "outline": [[round(x, 4), round(y, 4)] for x, y in piece.piece.outline],
        "numbers": {"chord_mm": numbers["chord_mm"], "bend": numbers["bend"], "die": numbers["die"],
                    "blank": numbers["blank"], "press": numbers["press"],
                    "max_shrink_strain": numbers["flange"]["max_shrink_strain"],
                    "max_stretch_strain": numbers["flange"]["max_stretch_strain"],
                    "flutes": len(numbers["flange"]["flutes"]), "notches": len(numbers["flange"]["notches"])},
        "warnings": list(piece.warnings),
    }
    manifest.save()
    return PieceOutcome(part, "failed" if error else "built", files, error, deviation, seconds)


def _run_tasks(tasks: list[Task], folder: Path, manifest: Manifest, outcomes: list[PieceOutcome],
               jobs: int | None, progress: bool) -> None:
    bar = _Progress(len(tasks), progress)

    claimed = {t.part_id: manifest.piece(t.part_id) is not None for t in tasks}
    for task in tasks:  # claim every piece before writing, so an interrupted piece's files stay ours
        entry = manifest.data["pieces"].setdefault(task.part_id, {"files": []})
        entry.update(status="building", hash="")
    manifest.save()

    def submit_args(task: Task) -> tuple:
        return task.rib.spec, task.section, task.index, str(folder), claimed[task.part_id]

    def finish(task: Task, result: tuple[str, tuple[str, ...], str, float]) -> None:
        part, files, error, seconds = result
        outcomes.append(_record(manifest, task.rib, task.index, task.digest, files, error, seconds))
        bar.step(part)

    jobs = max(1, min(jobs or os.cpu_count() or 1, len(tasks) or 1))
    if jobs == 1:
        for task in tasks:
            finish(task, _piece_task(*submit_args(task)))
        return
    with ProcessPoolExecutor(max_workers=jobs, initializer=_warm_worker) as pool:
        pending: dict[Future, Task] = {pool.submit(_piece_task, *submit_args(t)): t for t in tasks}
        try:
            while pending:
                done, _ = wait(pending, return_when=FIRST_COMPLETED)
                for future in done:
                    finish(pending.pop(future), future.result())
        except BaseException:  # Ctrl-C: keep what finished, drop what did not start
            for future in pending:
                future.cancel()
            done, _ = wait(pending, timeout=60)
            for future in done:
                if not future.cancelled() and future.exception() is None:
                    finish(pending[future], future.result())
            pool.shutdown(wait=False, cancel_futures=True)
            raise


# -- diff without building ---------------------------------------------------
def diff_specs(old: RibSpec | WingSpec, new: RibSpec | WingSpec) -> str:
    """Which pieces change between two specs, by the largest die-outline deviation (no solids)."""
    from diegen.api import analyse, _ribs

    def pieces(spec):
        return {p.piece.part_id: (rib, p) for rib in _ribs(analyse(spec)) for p in rib.pieces}

    before, after = pieces(old), pieces(new)
    lines = []
    for part in sorted(set(before) | set(after), key=lambda k: (k not in after, k)):
        if part not in before:
            lines.append(f"  new        {part}")
        elif part not in after:
            lines.append(f"  removed    {part}")
        else:
            (rib_a, a), (rib_b, b) = before[part], after[part]
            deviation = _outline_deviation(list(a.piece.outline), b.piece.outline) or 0.0
            if piece_hash(rib_a, a) == piece_hash(rib_b, b):
                lines.append(f"  identical  {part}")
            elif deviation > 0:
                lines.append(f"  changed    {part}: die outline moves up to {deviation:.3f} mm")
            else:
                lines.append(f"  changed    {part}: same die outline, other numbers differ")
    changed = sum(1 for line in lines if not line.strip().startswith("identical"))
    return "\n".join([f"{changed} of {len(lines)} piece(s) differ between {old.file or old.id} and {new.file or new.id}"]
                     + lines)
