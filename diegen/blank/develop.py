"""Flat-pattern development of a rib piece: the blank that is pinned to the die and pressed.

The blank is the web (the die's top face) plus, along every flanged edge, the
developed flange: bend allowance + straight leg (FAA-H-8083-31, ch. 4), laid
out along the true normal of the die outline (the die's mold line).  On the die
the web ends at the tangent line of the top-edge radius, Ri·tan(θi/2) inside the
mold line for a bend through the die angle θi; the bend's neutral-line length is
the same before and after springback, so the blank edge stands
``developed width − Ri·tan(θi/2)`` outside the die outline.

A run without a flange (a rib tail's cut end, a drawn part's cut edge) stops the blank flush with it.

A drawn part's flange runs may differ in height: each flanged run's blank edge then stands its own flange's
developed width (less the same tangent inset: one die radius) outside the die outline.  Where two runs of
different heights meet without a corner, the blank edge steps square, along the die outline's normal at the
junction, from the taller flange's edge to the lower one's (design choice).  No relief hole goes there: the bend
line runs on unbroken through the junction and only the flange's free edge steps, so no two bend lines cross
to tear the sheet as at a corner (design choice; the step's inside corner is a sharp notch in a free edge:
break it with a file before pressing, common practice, no source).
Corners where a perimeter flange meets an end flange get a relief: the
overlapping corner square is cut away and a relief hole is drilled at the
intersection of the bend tangent lines (FAA-H-8083-31, ch. 4, "folding a box":
relief holes at least 1/8 in for sheet up to 0.064 in, 3/16 in for 0.072–0.128 in;
common practice takes the larger of that and twice the bend radius).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
import shapely
from shapely.geometry import LineString, Polygon

from diegen.blank.drawing import BlankDrawing, Circle
from diegen.geometry.loops import is_corner
from diegen.geometry.polygon import QUAD_SEGS, single_polygon
from diegen.geometry.types import PieceGeometry, Point, Run
from diegen.units import MM_PER_IN

MITRE_LIMIT = 10.0  # the blank's outward offset keeps corners sharp up to this many offsets from the outline
_TO_RIGHT = np.array([[0.0, -1.0], [1.0, 0.0]])  # v @ _TO_RIGHT turns v a quarter turn clockwise

__all__ = ["MITRE_LIMIT", "develop_blank", "flange_band_area", "notch_polygon", "relief_hole_diameter"]


def relief_hole_diameter(thickness_mm: float, bend_radius_mm: float) -> float:
    """Corner relief hole (mm): FAA-H-8083-31 minimum by thickness, or 2 × bend radius if larger."""
    minimum = (1 / 8 if thickness_mm <= 0.064 * MM_PER_IN + 1e-9 else 3 / 16) * MM_PER_IN
    return max(minimum, 2 * bend_radius_mm)


def _unit(v: np.ndarray) -> np.ndarray:
    return v / np.linalg.norm(v)


def _beyond_cut_edge(run: Run, web: Polygon, offset_mm: float, corner_before: bool = True,
                     corner_after: bool = True) -> Polygon:
    """The blank material beyond a run that has no flange, outside the web.

    A straight run cuts along its own line as far as any flange corner can reach (the offset's mitre
    limit); a curved run takes off the band beyond it (wider than the developed flange) and, past each
    of its ends, the side beyond its end tangent, so a neighbouring flange stops flush with the cut edge.
    Where the outline runs on smoothly into a flanged run (``corner_before``/``corner_after`` False: no
    corner at that end, :func:`diegen.geometry.loops.is_corner`), the cut stops on the normal there instead: the
    flange beside it keeps its full width and ends square at the junction (its line extended would shave the
    flange of the curve it runs into).
    """
    reach = MITRE_LIMIT * offset_mm + 1.0
    pts = np.asarray(run.points, dtype=float)
    a, b = pts[0], pts[-1]
    t0, t1 = _unit(pts[1] - pts[0]), _unit(pts[-1] - pts[-2])
    n0, n1 = t0 @ _TO_RIGHT, t1 @ _TO_RIGHT  # the right normal of a CCW edge points outward
    back, ahead = (reach if corner_before else 0.0), (reach if corner_after else 0.0)
    if run.kind == "line" and len(pts) == 2:
        region = Polygon([a - t0 * back, b + t0 * ahead, b + t0 * ahead + n0 * reach, a - t0 * back + n0 * reach])
    else:
        band = LineString(pts).buffer(-(1.5 * offset_mm + 1.0), quad_segs=QUAD_SEGS, cap_style="flat",
                                      single_sided=True)
        ends = [Polygon([a - t0 * reach, a, a + n0 * reach, a - t0 * reach + n0 * reach])] if corner_before else []
        ends += [Polygon([b, b + t1 * reach, b + t1 * reach + n1 * reach, b + n1 * reach])] if corner_after else []
        region = shapely.union_all([band, *ends])
    if region.intersection(web).area > 0.0:
        region = region.difference(web)
    return region


def _along(segment: Sequence[Point]) -> Point:
    """The direction (not normalised) of a segment given by its two end points."""
    (x0, y0), (x1, y1) = segment
    return (x1 - x0, y1 - y0)


def _corner_cut(piece: PieceGeometry, corner: Point, reach: float) -> Polygon:
    """The wedge beyond both flanges at a corner (between the two edges' outward normals)."""
    loop = np.asarray(piece.outline)
    index = int(np.argmin(np.hypot(*(loop - np.asarray(corner)).T)))
    c = loop[index]
    before, after = loop[index - 1], loop[(index + 1) % len(loop)]
    n_in = _unit(c - before) @ np.array([[0, -1], [1, 0]])  # right normal of a CCW edge points outward
    n_out = _unit(after - c) @ np.array([[0, -1], [1, 0]])
    # the wedge spans far·n_in and far·n_out; the offset's mitre tip lies on the bisector at reach/(1 + n_in·n_out)
    # along each (cut off at the mitre limit), so a sharp corner needs a longer wedge than a square one
    spread = max(1.0 + float(n_in @ n_out), 1e-9)
    far = reach * max(3.0, min(1.0 / spread, MITRE_LIMIT / math.sqrt(2.0 * spread)) + 1.0)
    return Polygon([c, c + far * n_in, c + far * (n_in + n_out), c + far * n_out])


def _corner_insets(piece: PieceGeometry, corner: Point, inset: float,
                   run_insets: Sequence[float] | None) -> tuple[float, float]:
    """The bend lines' insets of the run that ends at ``corner`` and of the run that starts there (mm)."""
    if run_insets is None:
        return inset, inset
    starts = [math.dist(run.points[0], corner) for run in piece.runs]
    after = int(np.argmin(starts))
    return run_insets[after - 1], run_insets[after]


def _tangent_point(piece: PieceGeometry, corner: Point, inset: float, inset_after: float | None = None) -> Point:
    """Intersection of the two edges' bend tangent lines, ``inset`` (the edge after it: ``inset_after``) inside the
    corner."""
    loop = np.asarray(piece.outline)
    index = int(np.argmin(np.hypot(*(loop - np.asarray(corner)).T)))
    c = loop[index]
    d_in = _unit(c - loop[index - 1])
    d_out = _unit(loop[(index + 1) % len(loop)] - c)
    # both tangent lines are offset to the left (inside);
    # solve c + inset*n_in + a*d_in = c + inset_after*n_out + b*d_out
    n_in, n_out = np.array([-d_in[1], d_in[0]]), np.array([-d_out[1], d_out[0]])
    matrix = np.column_stack([d_in, -d_out])
    same = inset_after is None or inset_after == inset
    shift = inset * (n_out - n_in) if same else inset_after * n_out - inset * n_in
    a, _ = np.linalg.solve(matrix, shift)
    p = c + inset * n_in + a * d_in
    return float(p[0]), float(p[1])


def develop_blank(piece: PieceGeometry, *, offset_mm: float, die_radius_mm: float, tangent_inset_mm: float,
                  thickness_mm: float,
                  material: str, pilot_diameters: Sequence[float], notch_cuts: Sequence[Polygon] = (),
                  run_offsets_mm: Sequence[float] | None = None,
                  run_tangent_insets_mm: Sequence[float] | None = None) -> BlankDrawing:
    """The flat blank of ``piece`` (mm).

    ``offset_mm`` is the distance from the die outline to the blank edge; ``run_offsets_mm``, when given, that
    distance per run of the piece (its own flange's; a cut run's is ignored) where the flanged runs differ;
    ``tangent_inset_mm`` how far inside the die outline the web's bend tangent line lies (the bend lines), and
    ``run_tangent_insets_mm``, when given, that distance per run (a part's runs of their own die radius or angle:
    R_die·tan(θ_die/2) each; a cut run's is ignored);
    ``pilot_diameters`` gives, per hole of the piece, the pilot hole for a
    flanged hole (ignored for plain holes, which are cut to size).
    """
    web = Polygon(piece.outline)
    flanged_offsets = sorted({o for run, o in zip(piece.runs, run_offsets_mm, strict=True) if run.flanged}
                             if run_offsets_mm is not None else ())
    if len(flanged_offsets) > 1:
        blank = _stepped_flanges(piece, web, run_offsets_mm or (), flanged_offsets)
        offset_mm = flanged_offsets[-1]
    else:
        offset_mm = flanged_offsets[0] if flanged_offsets else offset_mm
        blank = web.buffer(offset_mm, quad_segs=QUAD_SEGS, join_style="mitre", mitre_limit=MITRE_LIMIT)
    runs = piece.runs
    for i, run in enumerate(runs):  # a cut edge (no flange) stops the blank flush with it
        if not run.flanged and len(run.points) >= 2:
            before, after = runs[i - 1], runs[(i + 1) % len(runs)]
            corner_before = not before.flanged or is_corner(_along(before.points[-2:]), _along(run.points[:2]))
            corner_after = not after.flanged or is_corner(_along(run.points[-2:]), _along(after.points[:2]))
            blank = blank.difference(_beyond_cut_edge(run, web, offset_mm, corner_before, corner_after))
    relief_d = relief_hole_diameter(thickness_mm, die_radius_mm)
    reliefs = []
    for corner in piece.relief_points:
        blank = blank.difference(_corner_cut(piece, corner, offset_mm + relief_d))
        x, y = _tangent_point(piece, corner, *_corner_insets(piece, corner, tangent_inset_mm, run_tangent_insets_mm))
        reliefs.append(Circle(x, y, relief_d))
    for cut in notch_cuts:
        blank = blank.difference(cut)
    for cutout in piece.cutouts:
        blank = blank.difference(Polygon(cutout))
    blank = single_polygon(blank, f"developing the blank of {piece.part_id}")
    blank = shapely.geometry.polygon.orient(blank, 1.0)
    cut_circles = list(reliefs)
    for hole, pilot in zip(piece.holes, pilot_diameters):
        cut_circles.append(Circle(hole.x, hole.y, pilot if hole.flanged else hole.d))
    scribe = []
    insets = run_tangent_insets_mm or [tangent_inset_mm] * len(piece.runs)
    for run, inset in zip(piece.runs, insets, strict=True):
        if run.flanged and len(run.points) >= 2:
            line = LineString(run.points).offset_curve(inset, quad_segs=QUAD_SEGS, join_style="round")
            for part in getattr(line, "geoms", [line]):
                scribe.append(tuple((float(x), float(y)) for x, y in part.coords))
    outer = tuple((float(x), float(y)) for x, y in np.asarray(blank.exterior.coords)[:-1])
    inner = tuple(tuple((float(x), float(y)) for x, y in np.asarray(r.coords)[:-1]) for r in blank.interiors)
    return BlankDrawing(part_id=piece.part_id, material=material, outer=outer, inner=inner,
                        cut_circles=tuple(cut_circles),
                        drill_circles=tuple(Circle(p.x, p.y, p.d) for p in piece.pins),
                        scribe_lines=tuple(scribe), grain_angle_deg=0.0)


def _stepped_flanges(piece: PieceGeometry, web: Polygon, run_offsets_mm: Sequence[float],
                     offsets: Sequence[float]) -> Polygon:
    """The web with each flanged run's flange band at its own offset: per offset, the web grown by it less the
    band beyond every flanged run of another offset (the run's outward normals from end to end: flat ends on the
    normals at its ends), all joined; the edge steps along the normal where runs of two offsets meet."""
    width = 1.5 * max(offsets) + 1.0
    bands = []
    for offset in offsets:
        band = web.buffer(offset, quad_segs=QUAD_SEGS, join_style="mitre", mitre_limit=MITRE_LIMIT)
        for run, own in zip(piece.runs, run_offsets_mm, strict=True):
            if run.flanged and own != offset and len(run.points) >= 2:
                beyond = LineString(run.points).buffer(-width, quad_segs=QUAD_SEGS, cap_style="flat",
                                                       single_sided=True)
                band = band.difference(beyond.difference(web))
        bands.append(band)
    return shapely.union_all([web, *bands])


def notch_polygon(piece: PieceGeometry, s_mm: float, opening_mm: float, depth_mm: float, offset_mm: float) -> Polygon:
    """A V-notch in the blank flange at arc length ``s_mm`` along the die outline (mm)."""
    ring = LineString([*piece.outline, piece.outline[0]])
    s = s_mm % ring.length
    p = np.asarray(ring.interpolate(s).coords[0])
    q = np.asarray(ring.interpolate(min(s + 0.5, ring.length)).coords[0]) - np.asarray(
        ring.interpolate(max(s - 0.5, 0.0)).coords[0])
    t = _unit(q)
    n = np.array([t[1], -t[0]])  # outward for a CCW loop
    edge = p + n * offset_mm
    tip = p + n * max(offset_mm - depth_mm, 0.0)
    far = edge + n * 1.0
    half = 0.5 * opening_mm
    return Polygon([tip, edge + t * half, far + t * half, far - t * half, edge - t * half])


def flange_band_area(blank: BlankDrawing, piece: PieceGeometry) -> float:
    """Blank area outside the die outline (mm²): the developed flanges."""
    return float(Polygon(blank.outer).difference(Polygon(piece.outline)).area)

