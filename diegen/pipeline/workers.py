"""Building pieces, one process or a pool of them: a worker gets a piece's analysed rib and writes that piece.

A worker's failure comes back as text, so the rest of a wing goes on; a piece that fails leaves none of the files
it had begun to write.  Ctrl-C keeps what finished and drops what did not start.
"""

from __future__ import annotations

import multiprocessing
import os
import sys
import time
from collections.abc import Callable, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from dataclasses import dataclass, field
from pathlib import Path

from diegen.analysis import RibAnalysis
from diegen.errors import DiegenError, OutputError
from diegen.fileio import confined_to, inside, reason, remove_empty_folder, remove_file
from diegen.pipeline.manifest import FileStamp
from diegen.pipeline.outputs import DieWriter, write_piece


@dataclass(frozen=True)
class PieceTask:
    """One piece to build: the analysed rib it belongs to, the piece's index, its content hash."""

    rib: RibAnalysis
    index: int
    digest: str

    @property
    def part_id(self) -> str:
        return self.rib.pieces[self.index].piece.part_id


@dataclass(frozen=True)
class TaskResult:
    """What a worker sends back: the files written and their stamps, or the error; the time it took (s).

    ``lasting``: the error follows from the piece's inputs (its geometry, its die), not from the output folder or
    the machine, so building the same inputs again would fail the same way."""

    part_id: str
    files: tuple[str, ...]
    error: str
    seconds: float
    stamps: dict[str, FileStamp] = field(default_factory=dict)
    lasting: bool = False


def build_piece(rib: RibAnalysis, index: int, folder: str, root: str, claimed: bool,
                die_writer: DieWriter) -> TaskResult:
    """Worker entry point: write piece ``index`` of the analysed ``rib`` (analysed once, by the build: a worker
    process gets the analysis, pickled, rather than repeating it).

    Every path written or removed must lie inside ``root`` (the resolved output folder, :mod:`diegen.fileio`).
    """
    start = time.perf_counter()
    piece = rib.pieces[index]
    part = piece.piece.part_id
    target = Path(folder) / part
    existed: set[str] | None = None
    with confined_to(root):
        try:
            inside(target)  # the piece folder itself (a link, say) must lead inside: checked before it is listed
            existed = _files_in(target)
            files = write_piece(rib, piece, target, die_writer, claimed)
            stamps = {name: FileStamp.of(target / name) for name in files}
            return TaskResult(part, files, "", time.perf_counter() - start, stamps)
        except (DiegenError, OSError) as error:
            if existed is not None or _is_new_folder(target):
                _remove_new_files(target, existed)
            message = str(error) if isinstance(error, DiegenError) else f"{error.filename or target}: {reason(error)}"
            lasting = isinstance(error, DiegenError) and not isinstance(error, (OutputError, OSError))
            return TaskResult(part, (), message, time.perf_counter() - start, lasting=lasting)


def _files_in(folder: Path) -> set[str] | None:
    """Names of everything in ``folder`` (None: the folder does not exist)."""
    return set(os.listdir(folder)) if os.path.isdir(folder) else None


def _is_new_folder(folder: Path) -> bool:
    """The piece folder leads inside the output folder (so this attempt may have made it)."""
    try:
        inside(folder)
    except DiegenError:
        return False
    return True


def _remove_new_files(folder: Path, existed: set[str] | None) -> None:
    """After a failed piece: delete the files this attempt created (a die STEP without its STL, say).

    Anything that was there before is left alone: earlier good output or somebody else's.  Only plain files in
    a folder inside the output folder are removed, never through a link (:func:`diegen.fileio.remove_file`).
    """
    if not os.path.isdir(folder):
        return
    for name in os.listdir(folder):
        if existed is None or name not in existed:
            remove_file(folder / name)
    if existed is None:
        remove_empty_folder(folder)


class Progress:
    """A one-line progress bar on standard error (only when asked for and there is work)."""

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


def _work(task: PieceTask) -> float:
    """A piece's expected share of the work: its die outline's length, and more for every flute and hole."""
    piece = task.rib.pieces[task.index]
    return piece.piece.length_mm * (1.0 + 0.1 * len(piece.flutes) + 0.1 * len(piece.piece.holes))


class WorkerPool:
    """Fresh worker processes (not forks), started as soon as a build knows it has pieces to make, so their imports
    (the kernel's most of all) overlap the analysis; ``warm_up`` runs first in each.

    Not forks: a fork taken while the solid kernel's own threads run (after a build in the same process) can leave a
    worker waiting forever inside the kernel.  Used as a context manager; a pool of one job starts no process.
    """

    def __init__(self, jobs: int, warm_up: Callable[[], None] | None) -> None:
        self.jobs = max(1, jobs)
        self.executor: ProcessPoolExecutor | None = None
        if self.jobs > 1:
            self.executor = ProcessPoolExecutor(max_workers=self.jobs, initializer=warm_up,
                                                mp_context=multiprocessing.get_context("spawn"))
            self.executor.submit(int)  # the processes start on the first task: start them now

    def __enter__(self) -> WorkerPool:
        return self

    def __exit__(self, kind: object, error: object, trace: object) -> None:
        if self.executor is not None:
            self.executor.shutdown(wait=error is None, cancel_futures=True)


def pool_size(jobs: int | None, pieces: int) -> int:
    """Worker processes for ``pieces`` pieces: ``jobs`` (default: the cores), never more than the pieces."""
    return max(1, min(jobs or os.cpu_count() or 1, pieces or 1))


def run_tasks(tasks: Sequence[PieceTask], folder: Path, root: Path, claimed: dict[str, bool], die_writer: DieWriter,
              pool: WorkerPool, finish: Callable[[PieceTask, TaskResult], None]) -> None:
    """Build ``tasks`` in this process (a pool of one job) or in ``pool``'s workers; every path written stays
    inside ``root`` (the resolved output folder)."""

    def args(task: PieceTask) -> tuple:
        return task.rib, task.index, str(folder), str(root), claimed[task.part_id], die_writer

    if pool.executor is None or len(tasks) == 1:
        for task in tasks:
            finish(task, build_piece(*args(task)))
        return
    ordered = sorted(tasks, key=_work, reverse=True)  # the largest pieces first, so the pool ends together
    executor = pool.executor
    pending: dict[Future, PieceTask] = {executor.submit(build_piece, *args(t)): t for t in ordered}
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
        executor.shutdown(wait=False, cancel_futures=True)
        raise


__all__ = ["PieceTask", "Progress", "TaskResult", "WorkerPool", "build_piece", "pool_size", "run_tasks"]
