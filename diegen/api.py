"""The public Python API: load a spec, analyse it, build it.  The CLI is a thin shell over this.

>>> from diegen import api
>>> spec = api.load("specs/demo-rib.yaml")
>>> analysis = api.analyse(spec)          # geometry + forming, no solids
>>> report = api.report_json(analysis)    # plain dict, mm / MPa / degrees
>>> result = api.build(spec, "out")       # dies, blanks, sheets into out/<id>/<piece>/
"""

from __future__ import annotations

from importlib import resources
from pathlib import Path
from typing import TYPE_CHECKING, Any

from diegen.errors import OutputError
from diegen.pipeline.jobs import Analysis, GroupAnalysis, RibJob, analyse_spec, rib_analyses, rib_jobs
from diegen.spec import Spec, load_spec

if TYPE_CHECKING:  # pragma: no cover
    from diegen.pipeline.build import BuildResult
    from diegen.pipeline.outputs import DieWriter


def load(path: str | Path) -> Spec:
    """Load and validate a rib, wing, part or set spec (raises :class:`diegen.errors.SpecError`)."""
    return load_spec(path)


def analyse(spec: Spec) -> Analysis:
    """Geometry and forming analysis of every piece (no solid kernel)."""
    return analyse_spec(spec)


def report_json(analysis: Analysis) -> dict[str, Any]:
    """One JSON-ready document: ``{"parts": [...]}`` with every piece of every rib."""
    from diegen.analysis import MODELS
    from diegen.findings import once
    from diegen.reports.document import SAFETY, piece_json, rib_json

    if not isinstance(analysis, GroupAnalysis):
        return rib_json(analysis)
    from diegen import __version__

    return {"diegen_version": __version__, "spec": analysis.spec.id, "kind": analysis.spec.kind, "models": MODELS,
            "safety": SAFETY,
            "warnings": [w.as_json() for w in once(w for r in analysis.ribs for w in r.geometry.warnings)],
            "parts": [piece_json(r, p) for r in analysis.ribs for p in r.pieces]}


def report_text(analysis: Analysis) -> str:
    """The readable forming report, ending with the pieces whose die ``build`` would refuse."""
    from diegen.reports.text import footer_text, refusals_text, rib_text

    refused = refused_pieces(analysis)
    shown: set[tuple] = set()
    parts = [rib_text(r, footer=False, shown=shown) for r in rib_analyses(analysis)]
    return "\n\n".join(parts + ([refusals_text(refused, sum(len(r.pieces) for r in rib_analyses(analysis)))]
                                if refused else []) + [footer_text()])


def warning_count(report: dict[str, Any]) -> int:
    """How many findings a report (:func:`report_json`) holds: those about the spec or a whole rib, and each
    piece's; ``diegen build`` counts the same ones."""
    return len(report["warnings"]) + sum(len(part["warnings"]) for part in report["parts"])


def refused_pieces(analysis: Analysis) -> list[tuple[str, str]]:
    """``(part id, reason with its remedy)`` of every piece whose die ``build`` would refuse."""
    return [(p.piece.part_id, p.die.refusal) for r in rib_analyses(analysis) for p in r.pieces
            if p.die is not None and p.die.refusal]


def write_plots(analysis: Analysis, out_dir: str | Path) -> list[Path]:
    """One PNG per piece: ``out_dir/<spec id>/<piece id>/<piece id>-geometry.png``."""
    from diegen.export.plot import piece_plot

    spec_id = analysis.spec.id
    paths = []
    for rib in rib_analyses(analysis):
        for piece in rib.pieces:
            folder = Path(out_dir) / spec_id / piece.piece.part_id
            paths.append(piece_plot(rib, piece, folder / f"{piece.piece.part_id}-geometry.png"))
    return paths


STARTER_KINDS = ("rib", "wing", "part")
STARTER_UNITS = ("in", "mm")


def write_starter(kind: str, path: str | Path, overwrite: bool = False, units: str = "in") -> Path:
    """Write a commented starter spec of ``kind`` (rib | wing) in ``units`` (in | mm) that passes ``diegen check``."""
    from diegen.fileio import write_text

    if kind not in STARTER_KINDS or units not in STARTER_UNITS:
        raise OutputError(f"a starter is a {' or '.join(STARTER_KINDS)} in {' or '.join(STARTER_UNITS)}, "
                          f"not a {kind} in {units}")
    path = Path(path)
    if path.exists() and not overwrite:
        raise OutputError(f"{path}: already exists; choose another name or pass --force to overwrite it")
    text = resources.files("diegen").joinpath("templates", f"{kind}-{units}.yaml").read_text(encoding="utf-8")
    write_text(path, text)
    return path


def build(spec: Spec, out_dir: str | Path, force: bool = False, jobs: int | None = None, progress: bool = False,
          die_writer: DieWriter | None = None) -> BuildResult:
    """Build every piece into ``out_dir/<spec id>/<piece id>/``.

    ``die_writer`` writes a piece's die files; by default the solid kernel's
    (:func:`diegen.die.occ.files.write_die_files`).
    """
    from diegen.pipeline.build import build_spec

    warm_up = None
    if die_writer is None:
        from diegen.die.occ.files import write_die_files
        from diegen.die.occ.form_block import warm_up

        die_writer = write_die_files
    return build_spec(spec, Path(out_dir), die_writer, warm_up, force=force, jobs=jobs, progress=progress)


def diff_text(old: Spec, new: Spec) -> str:
    """Which pieces two specs would change, and by how much (no solids built)."""
    from diegen.pipeline.diff import diff_specs

    return diff_specs(old, new)


__all__ = [
    "Analysis",
    "GroupAnalysis",
    "RibJob",
    "analyse",
    "build",
    "diff_text",
    "load",
    "refused_pieces",
    "report_json",
    "report_text",
    "rib_jobs",
    "warning_count",
    "write_plots",
    "write_starter",
]
