"""Building pieces, one process or a pool of them: a worker gets plain specs, analyses once, writes one piece.

A worker's failure comes back as text, so the rest of a wing goes on; a piece that fails leaves none of the files
it had begun to write.  Ctrl-C keeps what finished and drops what did not start.
"""

from __future__ import annotations

import os
import sys
import time
from collections.abc import Callable, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from diegen.analysis import RibAnalysis
from diegen.locate import analyse_located
from diegen.errors import DiegenError
from diegen.pipeline.hashing import rib_input_hash
from diegen.pipeline.outputs import DieWriter, write_piece
from diegen.spec.model import RibSpec

_ANALYSIS_CACHE: dict[tuple, RibAnalysis] = {}


def analysed(rib_spec: RibSpec, section: np.ndarray | None) -> RibAnalysis:
    """The rib's analysis, computed once per process (workers get plain specs, not analyses)."""
    key = (rib_input_hash(rib_spec, section), rib_spec.file, rib_spec.positions)  # findings name the file
    if key not in _ANALYSIS_CACHE:
        if len(_ANALYSIS_CACHE) >= 256:
            _ANALYSIS_CACHE.clear()
        _ANALYSIS_CACHE[key] = analyse_located(rib_spec, section)
    return _ANALYSIS_CACHE[key]


@dataclass(frozen=True)
class PieceTask:
    """One piece to build: the analysed rib it belongs to, the piece's index, its content hash."""

    rib: RibAnalysis
    section: np.ndarray | None
    index: int
    digest: str

    @property
    def part_id(self) -> str:
        return self.rib.pieces[self.index].piece.part_id


@dataclass(frozen=True)
class TaskResult:
    """What a worker sends back: the files written, or the error; the time it took (s)."""

    part_id: str
    files: tuple[str, ...]
    error: str
    seconds: float


def build_piece(rib_spec: RibSpec, section: np.ndarray | None, index: int, folder: str, claimed: bool,
                die_writer: DieWriter) -> TaskResult:
    """Worker entry point: analyse the rib (once per process) and write one piece."""
    start = time.perf_counter()
    rib = analysed(rib_spec, section)
    piece = rib.pieces[index]
    target = Path(folder) / piece.piece.part_id
    existed = _files_in(target)
    try:
        files = write_piece(rib, piece, target, die_writer, claimed)
        return TaskResult(piece.piece.part_id, files, "", time.perf_counter() - start)
    except DiegenError as error:
        _remove_new_files(target, existed)
        return TaskResult(piece.piece.part_id, (), str(error), time.perf_counter() - start)


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


def run_tasks(tasks: Sequence[PieceTask], folder: Path, claimed: dict[str, bool], die_writer: DieWriter,
              warm_up: Callable[[], None] | None, finish: Callable[[PieceTask, TaskResult], None],
              jobs: int | None) -> None:
    """Build ``tasks`` in this process (one job) or a pool whose workers first call ``warm_up``."""

    def args(task: PieceTask) -> tuple:
        return task.rib.spec, task.section, task.index, str(folder), claimed[task.part_id], die_writer

    jobs = max(1, min(jobs or os.cpu_count() or 1, len(tasks) or 1))
    if jobs == 1:
        for task in tasks:
            finish(task, build_piece(*args(task)))
        return
    with ProcessPoolExecutor(max_workers=jobs, initializer=warm_up) as pool:
        pending: dict[Future, PieceTask] = {pool.submit(build_piece, *args(t)): t for t in tasks}
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


__all__ = ["PieceTask", "Progress", "TaskResult", "analysed", "build_piece", "run_tasks"]
