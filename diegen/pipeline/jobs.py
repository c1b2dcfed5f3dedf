"""The ribs of a spec as jobs, and the analysis of a whole spec (no solid kernel)."""

from __future__ import annotations

from collections.abc import Iterator
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


def analyse_spec(spec: Spec) -> Analysis:
    """Geometry and forming analysis of every piece of every rib (refusals located in the spec file)."""
    with refusals_located(spec):
        if isinstance(spec, RibSpec):
            return analyse_located(spec)
        return GroupAnalysis(spec, tuple(analyse_located(job.rib, job.section) for job in rib_jobs(spec)))


def rib_analyses(analysis: Analysis) -> tuple[RibAnalysis, ...]:
    """The analysed ribs of a rib or wing analysis."""
    return analysis.ribs if isinstance(analysis, GroupAnalysis) else (analysis,)


__all__ = ["Analysis", "GroupAnalysis", "RibJob", "Spec", "analyse_spec", "rib_analyses", "rib_jobs"]
