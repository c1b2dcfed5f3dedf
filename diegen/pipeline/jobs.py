"""The ribs of a spec as jobs, and the analysis of a whole spec (no solid kernel)."""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from diegen.analysis import RibAnalysis
from diegen.locate import analyse_located, refusals_located
from diegen.spec.model import RibSpec, WingSpec
from diegen.wing import RibStation, rib_spec, section_at, stations

Spec = RibSpec | WingSpec


@dataclass(frozen=True)
class RibJob:
    """One rib to analyse: its own spec, its blended unit section (None: the spec's airfoil), its wing station."""

    rib: RibSpec
    section: np.ndarray | None = None
    station: RibStation | None = None


@dataclass(frozen=True)
class WingAnalysis:
    """Every rib of a wing, analysed, in station order."""

    spec: WingSpec
    ribs: tuple[RibAnalysis, ...]


Analysis = RibAnalysis | WingAnalysis


def rib_jobs(spec: Spec) -> Iterator[RibJob]:
    """Every rib of ``spec``, root first for a wing."""
    if isinstance(spec, RibSpec):
        yield RibJob(spec)
        return
    for station in stations(spec):
        yield RibJob(rib_spec(spec, station), section_at(spec, station), station)


def analyse_spec(spec: Spec) -> Analysis:
    """Geometry and forming analysis of every piece of every rib (refusals located in the spec file)."""
    with refusals_located(spec):
        if isinstance(spec, RibSpec):
            return analyse_located(spec)
        return WingAnalysis(spec, tuple(analyse_located(job.rib, job.section) for job in rib_jobs(spec)))


def rib_analyses(analysis: Analysis) -> tuple[RibAnalysis, ...]:
    """The analysed ribs of a rib or wing analysis."""
    return analysis.ribs if isinstance(analysis, WingAnalysis) else (analysis,)


__all__ = ["Analysis", "RibJob", "Spec", "WingAnalysis", "analyse_spec", "rib_analyses", "rib_jobs"]
