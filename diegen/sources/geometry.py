"""A ``kind: part`` spec's geometry in the form the rest of the pipeline reads: a one-piece rib geometry.

From here on a drawn part and a rib are the same thing to the forming analysis, the blank, the die model, the
kernel, the writers and the build: a :class:`~diegen.geometry.types.RibGeometry` whose pieces are die outlines
with flange runs, holes and pins.
"""

from __future__ import annotations

from dataclasses import replace

from diegen.errors import keyed
from diegen.findings import Finding
from diegen.geometry.pieces import ramp_length
from diegen.geometry.rib import joggle_fair_radius, unit_findings
from diegen.geometry.types import RibGeometry
from diegen.sources.part import drawn_piece
from diegen.spec.model import RibSpec

__all__ = ["part_geometry"]


def part_geometry(spec: RibSpec, die_inset_mm: float = 0.0) -> RibGeometry:
    """The die outline, flange runs, joggles, holes, cut-outs and pins of the part ``spec`` draws (mm), as one piece.

    Each flanged run carries its own flange height (``Run.flange_height_mm``, from the drawn part's flange runs:
    ``DrawnPiece.run_flanges``), which the analysis, blank and die follow.  ``die_inset_mm`` is the largest inset
    of the die's wall from its outline: joggle run-outs bend no tighter than it (plus a margin) nor than the cutter
    radius, as a rib's do (:func:`diegen.geometry.rib.rib_geometry`).
    """
    drawn, shared = spec.drawn, spec.shared
    assert drawn is not None, "part_geometry takes a kind: part spec"
    rules = shared.holes.rules
    fair_radius = joggle_fair_radius(spec, die_inset_mm)
    with keyed("outline"):
        piece = drawn_piece(drawn.part, part_id=spec.id, sheet_thickness_mm=shared.sheet.thickness_mm,
                            pin_diameter_mm=shared.pins.diameter_mm,
                            hole_flange_height_mm=rules.flange_height_mm if drawn.flanged_holes else None,
                            edge_margin_mm=rules.edge_margin_mm, joggles=drawn.joggles,
                            ramp_of=lambda depth: ramp_length(depth, shared.joggle_runout, fair_radius),
                            cut_corner_radius_mm=fair_radius)
    warnings = unit_findings(spec)
    if piece.mirrored:
        warnings.append(Finding(
            "part-mirrored", "every flange bends up in the drawing: the die, the blank and their drawings are the "
            "drawing's mirror image (seen from the other face), so the flanges fold down over the die", key="flanges"))
    if piece.rounded_corners:
        where = "; ".join(f"({x:.1f}, {y:.1f})" for x, y in piece.rounded_corners)
        warnings.append(Finding(
            "cut-corner-rounded", f"{len(piece.rounded_corners)} sharp inside corner(s) between cut edges, at {where} "
            f"mm in the drawing, are rounded to R {piece.rounded_radius_mm:.1f} mm on the die and the blank: no cutter "
            "leaves a sharp inside corner, and in sheet one starts cracks; draw the radius you want there to keep "
            "it", key="outline"))
    if drawn.flanged_holes and piece.cutouts:
        warnings.append(Finding(
            "cutout-not-flanged", f"{len(piece.cutouts)} inner contour(s) are not round: they are cut plain (the "
            "hole-flange model is for round holes)", key="holes"))
    warnings = [w.about(spec.id, spec.positions, rib_id=spec.id) for w in warnings]
    geometry = replace(piece.geometry, cutouts=piece.cutouts)
    mold = drawn.part.outline.points
    return RibGeometry(spec.id, spec.chord_mm, mold, mold, geometry.outline, (geometry,), tuple(warnings))
