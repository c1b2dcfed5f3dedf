"""The ribs of a spec as jobs, and the analysis of a whole spec (no solid kernel)."""

from __future__ import annotations

import multiprocessing
import os
import sys
import threading
from collections.abc import Iterator
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass

import numpy as np

from diegen.analysis import RibAnalysis
from diegen.locate import analyse_located, refusals_located
from diegen.spec.model import RibSpec, SetSpec, WingSpec
from diegen.wing import RibStation, rib_spec, section_at, stations

Spec = RibSpec | WingSpec | SetSpec


@dataclass(frozen=True)
class RibJob:
    """One rib to analyse: its own spec, its blended unit section (None: the spec's airfoil), its wing station."""

    rib: RibSpec
    section: np.ndarray | None = None
    station: RibStation | None = None


@dataclass(frozen=True)
class GroupAnalysis:
    """Every rib of a wing, in station order, or every part and rib of a set, in the set's order, analysed."""

    spec: WingSpec | SetSpec
    ribs: tuple[RibAnalysis, ...]


Analysis = RibAnalysis | GroupAnalysis


def rib_jobs(spec: Spec) -> Iterator[RibJob]:
    """Every rib (or part) of ``spec``, root first for a wing, in the set's order for a set."""
    if isinstance(spec, RibSpec):
        yield RibJob(spec)
        return
    if isinstance(spec, SetSpec):
        yield from (RibJob(member) for member in spec.members)
        return
    for station in stations(spec):
        yield RibJob(rib_spec(spec, station), section_at(spec, station), station)


PARALLEL_FROM_RIBS = 4  # fewer ribs are analysed faster in this process than split among forked ones


def analyse_spec(spec: Spec) -> Analysis:
    """Geometry and forming analysis of every piece of every rib (refusals located in the spec file)."""
    with refusals_located(spec):
        if isinstance(spec, RibSpec):
            return analyse_located(spec)
        return GroupAnalysis(spec, analyse_jobs(list(rib_jobs(spec))))


def analyse_jobs(jobs: list[RibJob]) -> tuple[RibAnalysis, ...]:
    """The analysis of every rib job, in order: split among forked processes, one a core, where that is safe and
    worth it (see :func:`_can_fork`); otherwise here, one after the other.  A rib whose analysis fails in a forked
    process is analysed again here, so its refusal is raised as it would be without them."""
    processes = min(os.cpu_count() or 1, len(jobs))
    if len(jobs) < PARALLEL_FROM_RIBS or processes < 2 or not _can_fork():
        return tuple(analyse_located(job.rib, job.section) for job in jobs)
    with ProcessPoolExecutor(processes, mp_context=multiprocessing.get_context("fork")) as pool:
        futures = [pool.submit(analyse_located, job.rib, job.section) for job in jobs]
        return tuple(future.result() if future.exception() is None else analyse_located(job.rib, job.section)
                     for future, job in zip(futures, jobs, strict=True))


def _can_fork() -> bool:
    """Forking this process is safe: Linux (where forking is the platform's own way; elsewhere system libraries
    may not survive it), and no thread but this one runs here (a fork keeps only the calling thread, so a lock
    another thread holds, the solid kernel's pool among them, would stay held)."""
    return sys.platform.startswith("linux") and threading.active_count() == 1 and "OCP" not in sys.modules


def rib_analyses(analysis: Analysis) -> tuple[RibAnalysis, ...]:
    """The analysed ribs of a rib or wing analysis."""
    return analysis.ribs if isinstance(analysis, GroupAnalysis) else (analysis,)


__all__ = ["PARALLEL_FROM_RIBS", "Analysis", "GroupAnalysis", "RibJob", "Spec", "analyse_jobs", "analyse_spec",
           "rib_analyses", "rib_jobs"]
