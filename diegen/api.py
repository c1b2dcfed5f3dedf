"""The public Python API: load a spec, analyse it, build it.  The CLI is a thin shell over this.

>>> from diegen import api
>>> spec = api.load("specs/demo-rib.yaml")
>>> analysis = api.analyse(spec)          # geometry + forming, no solids
>>> report = api.report_json(analysis)    # plain dict, mm / MPa / degrees
>>> result = api.build(spec, "out")       # dies, blanks, sheets into out/<id>/<piece>/
"""

from __future__ import annotations

from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import Any

from diegen.analysis import RibAnalysis, analyse_rib
from diegen.errors import OutputError
from diegen.spec import RibSpec, Spec, WingSpec, load_spec
from diegen.wing import rib_spec, section_at, stations


@dataclass(frozen=True)
class WingAnalysis:
    spec: WingSpec
    ribs: tuple[RibAnalysis, ...]


Analysis = RibAnalysis | WingAnalysis


def load(path: str | Path) -> Spec:
    """Load and validate a rib or wing spec (raises :class:`diegen.errors.SpecError`)."""
    return load_spec(path)


def rib_jobs(spec: Spec) -> list[tuple[RibSpec, Any]]:
    """Every rib of ``spec`` as (rib spec, unit section or None for the rib's own airfoil)."""
    if isinstance(spec, RibSpec):
        return [(spec, None)]
    return [(rib_spec(spec, station), section_at(spec, station)) for station in stations(spec)]


def analyse(spec: Spec) -> Analysis:
    """Geometry and forming analysis of every piece (no solid kernel)."""
    if isinstance(spec, RibSpec):
        return analyse_rib(spec)
    return WingAnalysis(spec, tuple(analyse_rib(rib, section) for rib, section in rib_jobs(spec)))


def _ribs(analysis: Analysis) -> tuple[RibAnalysis, ...]:
    return analysis.ribs if isinstance(analysis, WingAnalysis) else (analysis,)


def report_json(analysis: Analysis) -> dict[str, Any]:
    """One JSON-ready document: ``{"parts": [...]}`` with every piece of every rib."""
    from diegen.report import MODELS, SAFETY, piece_json, rib_json

    if isinstance(analysis, RibAnalysis):
        return rib_json(analysis)
    from diegen import __version__

    return {"diegen_version": __version__, "spec": analysis.spec.id, "kind": "wing", "models": MODELS,
            "safety": SAFETY, "warnings": [w for r in analysis.ribs for w in r.geometry.warnings],
            "parts": [piece_json(r, p) for r in analysis.ribs for p in r.pieces]}


def report_text(analysis: Analysis) -> str:
    """The readable forming report."""
    from diegen.report import footer_text, rib_text

    return "\n\n".join([rib_text(r, footer=False) for r in _ribs(analysis)] + [footer_text()])


def write_plots(analysis: Analysis, out_dir: str | Path) -> list[Path]:
    """One PNG per piece: ``out_dir/<spec id>/<piece id>/<piece id>-geometry.png``."""
    from diegen.export.plot import piece_plot

    spec_id = analysis.spec.id
    paths = []
    for rib in _ribs(analysis):
        for piece in rib.pieces:
            folder = Path(out_dir) / spec_id / piece.piece.part_id
            paths.append(piece_plot(rib, piece, folder / f"{piece.piece.part_id}-geometry.png"))
    return paths


def write_starter(kind: str, path: str | Path, overwrite: bool = False) -> Path:
    """Write a commented starter spec of ``kind`` (rib | wing) that passes ``diegen check``."""
    from diegen.fileio import write_text

    path = Path(path)
    if path.exists() and not overwrite:
        raise OutputError(f"{path}: already exists; choose another name or pass --force to overwrite it")
    text = resources.files("diegen").joinpath("templates", f"{kind}.yaml").read_text(encoding="utf-8")
    write_text(path, text)
    return path


def build(spec: Spec, out_dir: str | Path, force: bool = False, jobs: int | None = None, progress: bool = False):
    """Build every piece into ``out_dir/<spec id>/<piece id>/``; returns a :class:`diegen.build.BuildResult`."""
    from diegen.build import build_spec

    return build_spec(spec, Path(out_dir), force=force, jobs=jobs, progress=progress)


def diff_text(old: Spec, new: Spec) -> str:
    """Which pieces two specs would change, and by how much (no solids built)."""
    from diegen.build import diff_specs

    return diff_specs(old, new)
