"""From a drawing to a drawn part (outline, holes, pins, flange runs) and on to a geometry-layer piece.

:func:`drawn_part` takes the largest closed contour as the outline (made counter-clockwise), the
contours inside it as holes, and lays the flange runs on the outline's edges.  :func:`drawn_piece`
makes the die outline — the outline itself, or for a mold-line outline the outline offset inward by
the sheet thickness along its flanged edges (a true normal offset with round joins, as the rib's mold-line
offsets), its cut edges left on the drawn line — and
fills a :class:`~diegen.geometry.types.PieceGeometry` the forming analysis, blank and die layers read:

* runs are split at flange-run boundaries and at corners; a run that is one straight edge is a
  ``line``, anything else a ``curve`` (its straight stretches given points every ``CURVE_STEP_MM`` so
  a spline through them stays straight);
* a corner is an edge junction of the drawn outline that turns by ``CORNER_TURN_DEG`` or more
  (project limit: a gentler turn is left inside its run, where the contoured-flange strain, windowed
  over one flange width, sees it as a tight curve); a concave corner of a mold-line outline becomes a
  round of the sheet thickness in the die outline and so is no corner of the die;
* each flanged run carries its flange's mold-line height (a run of its own height, or the spec's); a cut
  edge carries none;
* relief points are the die's corners where a flanged run meets another flanged run;
* round holes become holes (plain, or flanged to a given height), other inner contours cutouts;
  drawn pin spots become pins (or pins are placed as for a rib when none are drawn).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import replace

import numpy as np
import shapely
import shapely.ops
from shapely.geometry import LinearRing, LineString, Polygon
from shapely.geometry import Point as ShapelyPoint

from diegen.errors import DrawingError, GeometryError
from diegen.geometry import pins as pin_rules
from diegen.geometry.loops import CORNER_TURN_DEG, turn_angle
from diegen.geometry.pieces import ramp_shape
from diegen.geometry.polygon import QUAD_SEGS, as_points, offset_inward, single_polygon, vertical_extents
from diegen.geometry.types import Hole, PieceGeometry, Pin, Point, Points, Run
from diegen.sources.contour import CHORD_TOL_MM, Contour, Place, contour_names, split_edge
from diegen.sources.joggle import JoggleSpec, recess
from diegen.sources.model import (
    OUTLINE_IS,
    AllEdges,
    Between,
    Drawing,
    DrawnHole,
    DrawnPart,
    DrawnPiece,
    Flange,
    FlangeRun,
    FlangeRunSpec,
    OnLayer,
)

SNAP_MM = 1.0  # a from/to point may lie this far from the outline (default)
VERTEX_SNAP_MM = CHORD_TOL_MM  # a split this close to an edge end moves onto the end
MERGE_MM = 0.05  # a run boundary this close to a die outline point moves onto that point
MIN_CUT_CORNER_MM = 1.0  # design choice: the least radius a cut edge's concave corner gets on the die
OVERLAP_MM = 0.01  # a flanged run's offset is taken this far on into a run-out along its own line, so they overlap
CURVE_STEP_MM = 2.0  # longest segment inside a curve run (the die's spline then keeps straight stretches straight)
DEPTH_SAMPLES = 64
DEPTH_SPAN = 0.8  # the web's depth is sampled over the middle 80 % of its length (a rounded end has none)
PIECE_NAME = "part"


# -- the drawn part -------------------------------------------------------------------------------------


def drawn_part(drawing: Drawing, flanges: Sequence[FlangeRunSpec], outline_is: str = "mold-line",
               snap_mm: float = SNAP_MM) -> DrawnPart:
    """The drawing's largest contour as a counter-clockwise outline with ``flanges`` laid on it, the
    contours inside it as holes, and its pin spots.

    ``outline_is`` is ``mold-line`` (the finished part's outline) or ``die``.  A from/to point may lie
    up to ``snap_mm`` from the outline; it is taken to the nearest outline point, or to the nearest edge end
    (a vertex of the drawing) when one lies within ``snap_mm`` of it.  Raises :class:`DrawingError` for a contour
    outside the outline or crossing it, a hole inside another, a pin off the part, a layer no outline edge is on, a
    from/to point too far from the outline, and edges two flange runs both claim.
    """
    place = drawing.place
    if outline_is not in OUTLINE_IS:
        raise DrawingError(f"{place.source}: expected the outline to be one of {', '.join(OUTLINE_IS)}, "
                           f"found {outline_is!r}")
    if not drawing.contours:
        raise DrawingError(f"{place.source}: no closed contour to take as the outline")
    contours = sorted(drawing.contours, key=lambda c: abs(c.area), reverse=True)
    outer = contours[0].oriented(ccw=True)
    outer_poly = Polygon(outer.points)
    holes: list[DrawnHole] = []
    for contour in contours[1:]:
        poly = Polygon(contour.points)
        _check_inside(outer, outer_poly, contour, poly, place)
        for other in holes:
            other_poly = Polygon(other.contour.points)
            if poly.intersects(other_poly):
                where = _some_point(poly.boundary.intersection(other_poly.boundary) or poly.intersection(other_poly))
                raise DrawingError(f"{place.source}: the inner contours [{_names(contour)}] and "
                                   f"[{_names(other.contour)}] overlap near {place.at(where)}: a hole may not lie in "
                                   "or cross another")
        holes.append(DrawnHole(contour.oriented(ccw=False), contour.circle))
    web = Polygon(outer.points, [h.contour.points for h in holes])
    for pin in drawing.pins:
        if not web.contains(ShapelyPoint(pin.x, pin.y)):
            inside_hole = outer_poly.contains(ShapelyPoint(pin.x, pin.y))
            raise DrawingError(f"{place.source}: pin {pin.origin} at {place.at((pin.x, pin.y))} lies "
                               f"{'in a hole' if inside_hole else 'outside the outline'}: a pin goes through the web")
    outline, runs = _lay_runs(outer, flanges, place, snap_mm)
    return DrawnPart(outline, outline_is, runs, tuple(holes), drawing.pins, place.source, place)  # type: ignore[arg-type]


def _names(contour: Contour) -> str:
    return contour_names(contour)


def _some_point(geometry) -> Point:
    if geometry is None or geometry.is_empty:
        return (math.nan, math.nan)
    x, y = shapely.get_coordinates(geometry)[0]
    return float(x), float(y)


def _check_inside(outer: Contour, outer_poly: Polygon, contour: Contour, poly: Polygon, place: Place) -> None:
    if outer_poly.contains(poly):
        return
    crossing = outer_poly.boundary.intersection(poly.boundary)
    if not crossing.is_empty:
        raise DrawingError(f"{place.source}: the contour [{_names(contour)}] crosses the outline [{_names(outer)}] "
                           f"at {place.at(_some_point(crossing))}: a hole must lie inside the outline")
    p = poly.representative_point()
    raise DrawingError(f"{place.source}: the contour [{_names(contour)}] near {place.at((p.x, p.y))} lies outside the "
                       f"outline [{_names(outer)}]: a drawing (or its outline layers) must hold one part")


def _lay_runs(outer: Contour, specs: Sequence[FlangeRunSpec], place: Place,
              snap_mm: float) -> tuple[Contour, tuple[FlangeRun, ...]]:
    """Split the outline at every from/to point, give each edge the flange that claims it, and start the
    outline at a run boundary."""
    ring = LinearRing(outer.points)
    ends: dict[int, tuple[Point, Point]] = {}
    for index, spec in enumerate(specs):
        if isinstance(spec.edges, Between):
            snapped = []
            for role, p in (("from", spec.edges.start), ("to", spec.edges.end)):
                distance = ring.distance(ShapelyPoint(p))
                foot = ring.interpolate(ring.project(ShapelyPoint(p)))
                if distance > snap_mm:
                    raise DrawingError(
                        f"{place.source}: {_label(spec, index)}: the {role} point {place.at(p)} is "
                        f"{place.length(distance)} from the outline (at most {place.length(snap_mm)} allowed); the "
                        f"nearest outline point is {place.at((foot.x, foot.y))}")
                corner = min((e.start for e in outer.edges), key=lambda q: math.dist(p, q))
                snapped.append(corner if math.dist(p, corner) <= snap_mm else (foot.x, foot.y))
            if math.dist(*snapped) <= VERTEX_SNAP_MM:
                raise DrawingError(f"{place.source}: {_label(spec, index)}: from and to meet at the same outline point "
                                   f"{place.at(snapped[0])}: a flange run needs two different ends")
            ends[index] = (snapped[0], snapped[1])
            for p in snapped:
                outer = _split_at(outer, p)
    claims: list[int | None] = [None] * len(outer.edges)
    for index, spec in enumerate(specs):
        chosen = _chosen_edges(outer, spec, index, ends.get(index), place)
        for k in chosen:
            if claims[k] is not None:
                edge = outer.edges[k]
                raise DrawingError(
                    f"{place.source}: {_label(specs[claims[k]], claims[k])} and {_label(spec, index)} both claim the "
                    f"edge {edge.origin + ' ' if edge.origin else ''}from {place.at(edge.start)} to "
                    f"{place.at(edge.end)}: each edge may have one flange at most")
            claims[k] = index
    n = len(outer.edges)
    start = next((k for k in range(n) if claims[k] != claims[k - 1]), 0)
    outer = outer.starting_at(start)
    claims = claims[start:] + claims[:start]
    runs = []
    k = 0
    while k < n:
        stop = k + 1
        while stop < n and claims[stop] == claims[k]:
            stop += 1
        if claims[k] is not None:
            spec = specs[claims[k]]
            runs.append(FlangeRun(k, stop, spec.flange, _label(spec, claims[k])))
        k = stop
    return outer, tuple(runs)


def _label(spec: FlangeRunSpec, index: int) -> str:
    return spec.label or f"flange run {index + 1}"


def _split_at(contour: Contour, p: Point) -> Contour:
    """The contour with the edge under ``p`` split there (unless ``p`` is at an edge end already)."""
    best, best_d = 0, math.inf
    for k, edge in enumerate(contour.edges):
        if min(math.dist(p, edge.start), math.dist(p, edge.end)) <= VERTEX_SNAP_MM:
            return contour
        d = LineString(edge.points).distance(ShapelyPoint(p))
        if d < best_d:
            best, best_d = k, d
    head, tail = split_edge(contour.edges[best], p)
    return Contour((*contour.edges[:best], head, tail, *contour.edges[best + 1:]))


def _vertex_edge(contour: Contour, p: Point) -> int:
    """Index of the edge that starts at the outline point ``p``."""
    return int(np.argmin([math.dist(p, e.start) for e in contour.edges]))


def _chosen_edges(outer: Contour, spec: FlangeRunSpec, index: int, ends: tuple[Point, Point] | None,
                  place: Place) -> list[int]:
    n = len(outer.edges)
    if isinstance(spec.edges, AllEdges):
        return list(range(n))
    if isinstance(spec.edges, OnLayer):
        key = spec.edges.layer.casefold()
        chosen = [k for k, e in enumerate(outer.edges) if e.layer.casefold() == key]
        if not chosen:
            layers = ", ".join(sorted({e.layer for e in outer.edges if e.layer})) or "none (the source has no layers)"
            raise DrawingError(f"{place.source}: {_label(spec, index)}: no outline edge is on layer "
                               f"{spec.edges.layer!r}; the outline's edges are on: {layers}")
        return chosen
    if isinstance(spec.edges, Between) and ends is not None:
        first, last = _vertex_edge(outer, ends[0]), _vertex_edge(outer, ends[1])
        count = (last - first) % n
        return [(first + i) % n for i in range(count)]
    raise DrawingError(f"{place.source}: {_label(spec, index)}: expected the edges as all, a layer or from/to points, "
                       f"found {spec.edges!r}")


# -- the geometry-layer piece -----------------------------------------------------------------------------


def drawn_piece(part: DrawnPart, *, part_id: str, sheet_thickness_mm: float, pin_diameter_mm: float,
                hole_flange_height_mm: float | None = None, edge_margin_mm: float = 6.0,
                auto_pins: bool = True, joggles: Sequence[JoggleSpec] = (),
                ramp_of: Callable[[float], float] = lambda depth: 4.0 * depth,
                cut_corner_radius_mm: float = 0.0) -> DrawnPiece:
    """The drawn part as the geometry layer's piece (mm).

    The die outline is the outline (``die``) or the outline offset inward by ``sheet_thickness_mm`` along its
    flanged edges, its cut edges left on the drawn line (``mold-line``).  Round holes are plain, or flanged to
    ``hole_flange_height_mm``.  Drawn pin spots become pins of ``pin_diameter_mm``; with none drawn and
    ``auto_pins``, pins are placed as a rib's are,
    ``edge_margin_mm`` clear of the flange bend line and the holes.  When every flange bends up, the piece
    is the drawing's mirror image (x → −x) so the flanges fold down over the die.

    ``joggles`` are recessed into the die outline (see :mod:`diegen.sources.joggle`), ``ramp_of(depth)`` giving
    their run-out length (mm); the strain is judged on the outline without them (``plain_runs``).

    ``cut_corner_radius_mm``: of a mold-line outline, a sharp inside corner between two cut edges is rounded to
    this (at least :data:`MIN_CUT_CORNER_MM`; 0 leaves it sharp), said in ``DrawnPiece.rounded_corners``.

    Raises :class:`GeometryError` for flanges bending both ways, a joggle off one flanged run, an offset that
    leaves nothing or splits the part, a hole that reaches the flange bend or outside the die, a pin without room.
    """
    place = part.place
    flanges = part.edge_flanges()
    used = list(part.runs)
    directions = {r.flange.direction for r in used}
    if len(directions) > 1:
        ups = ", ".join(dict.fromkeys(r.label for r in used if r.flange.direction == "up"))
        downs = ", ".join(dict.fromkeys(r.label for r in used if r.flange.direction == "down"))
        raise GeometryError(
            f"{place.source}: flanges bend up ({ups}) and down ({downs}): the rubber folds every flange away from "
            "itself, over the form block, so one pressing forms them one way only (a second pressing, the part turned "
            "over, would crush the first flanges); draw the part as two parts riveted together, each with its flanges "
            "one way, or make this part with the flanges of one way and bend the others afterwards on a brake or "
            "over a hardwood block by hand")
    mirrored = directions == {"up"}
    bend_radius = max((r.flange.bend_radius_mm for r in used), default=0.0)
    mold = part.outline
    mold_pts = np.asarray(mold.points, dtype=float)
    offsets = mold.edge_offsets()
    total = float(offsets[-1])
    marks = _mold_marks(part)
    rounded: tuple[Point, ...] = ()
    corner_radius = max(cut_corner_radius_mm, MIN_CUT_CORNER_MM) if cut_corner_radius_mm > 0.0 else 0.0
    if part.outline_is == "die":
        die_pts = mold_pts
        die_s = np.cumsum(np.r_[0.0, np.hypot(*np.diff(mold_pts, axis=0).T)])
    else:
        die_poly, rounded = _die_inside_mold_line(part, sheet_thickness_mm, ramp_of, corner_radius,
                                         f"{place.source}: offsetting the mold line inward by the sheet "
                                         f"({sheet_thickness_mm:.3f} mm) for the die outline")
        die_pts = np.asarray(as_points(die_poly), dtype=float)
        die_s = np.asarray(shapely.line_locate_point(LinearRing(mold_pts), shapely.points(die_pts)), dtype=float)
        die_pts, die_s = _unwrap(die_pts, die_s, total)
    inset = 0.0 if part.outline_is == "die" else sheet_thickness_mm
    pts, s, vertex_marks = _place_marks(die_pts, die_s, marks, total, inset)
    pts, s, vertex_marks = _drop_inserted_points(pts, s, vertex_marks, offsets, mold, total)
    straight = _straight_segments(pts, s, offsets, mold, total)
    plain, run_flanges, reliefs = _runs(pts, s, vertex_marks, straight, offsets, flanges, part.edge_keys(), total)
    runs, recesses = recess(plain, joggles, ramp_of, place) if joggles else (plain, ())
    die_poly = Polygon([p for run in runs for p in run.points[:-1]])
    holes, cutouts = _holes(part, die_poly, runs, bend_radius, hole_flange_height_mm, place)
    pins = _pins(part, die_poly, holes, bend_radius, edge_margin_mm, pin_diameter_mm, auto_pins, part_id, place)
    minx, _, maxx, _ = die_poly.bounds
    geometry = PieceGeometry(PIECE_NAME, part_id, (float(minx), float(maxx)), runs, recesses, holes, pins, reliefs,
                             _depth_range(die_poly), plain)
    if mirrored:
        geometry, run_flanges, cutouts = _mirror(geometry, run_flanges, cutouts)
    return DrawnPiece(geometry, run_flanges, mirrored, cutouts, rounded, corner_radius if rounded else 0.0)


def _die_inside_mold_line(part: DrawnPart, sheet_thickness_mm: float, ramp_of: Callable[[float], float],
                          cut_corner_radius_mm: float, what: str) -> tuple[Polygon, tuple[Point, ...]]:
    """The die outline of a part drawn as its mold line: along a flanged edge the sheet thickness inside it (the
    flange's outer face is the mold line), along a cut edge the drawn line itself (the part's edge is the blank's
    edge, and the blank lies flat on the die there).

    The drawn outline less every point within the sheet thickness t of a flanged run.  Where a run ends on a cut
    edge at a convex corner, the run is taken on straight past the corner first, so the die's corner is where the
    run's offset meets the cut edge (a mitre).  Where it ends on a cut edge without one (mid-edge, or at a concave
    corner, where the offset also turns round the corner on a circle of radius t), the die's edge comes out from t
    to the drawn line along the cut edge over ``ramp_of(t)``, the joggles' run-out for a step of t (:func:`_taper`),
    instead of a step no cutter could follow.  A concave corner between two cut edges is rounded on the die to
    ``cut_corner_radius_mm`` (0: left sharp; the blank is cut sharp there, the die only holds the web flat, and no
    cutter leaves a sharp inside corner); the corners so rounded are returned beside the outline (drawing
    coordinates, mm)."""
    mold = Polygon(part.outline.points)
    edges = part.outline.edges
    if sum(run.stop_edge - run.first_edge for run in part.runs) == len(edges):
        return offset_inward(mold, sheet_thickness_mm, what), ()  # flanged all round
    points = part.outline.points
    ring = LineString([*points, points[0]])
    offsets = part.outline.edge_offsets()
    total = float(offsets[-1])
    flanged = {k for run in part.runs for k in range(run.first_edge, run.stop_edge)}
    t = sheet_thickness_mm
    parts = []
    for run in part.runs:
        s0, s1 = float(offsets[run.first_edge]), float(offsets[run.stop_edge])
        line = np.asarray(shapely.ops.substring(ring, s0, s1).coords)
        before, after = (run.first_edge - 1) % len(edges), run.stop_edge % len(edges)
        start_turn = turn_angle(edges[before].end_tangent(), edges[run.first_edge].start_tangent())
        end_turn = turn_angle(edges[run.stop_edge - 1].end_tangent(), edges[after].start_tangent())
        if before not in flanged:
            reach, out = _run_end(ring, total, s0, -float(offsets[before + 1] - offsets[before]), start_turn, t,
                                  ramp_of)
            line = np.vstack([line[0] - reach * np.asarray(edges[run.first_edge].start_tangent()), line])
            parts += out
        if after not in flanged:
            reach, out = _run_end(ring, total, s1, float(offsets[after + 1] - offsets[after]), end_turn, t, ramp_of)
            line = np.vstack([line, line[-1] + reach * np.asarray(edges[run.stop_edge - 1].end_tangent())])
            parts += out
        parts.append(LineString(line).buffer(t, quad_segs=QUAD_SEGS, cap_style="flat"))
    die = mold.difference(shapely.unary_union(parts))
    corner = math.radians(CORNER_TURN_DEG)
    concave = [ShapelyPoint(edges[(k + 1) % len(edges)].points[0]) for k in range(len(edges))
               if cut_corner_radius_mm > 0.0 and k not in flanged and (k + 1) % len(edges) not in flanged
               and turn_angle(edges[k].end_tangent(), edges[(k + 1) % len(edges)].start_tangent()) <= -corner]
    if concave:
        r = cut_corner_radius_mm
        closed = die.buffer(r, quad_segs=QUAD_SEGS).buffer(-r, quad_segs=QUAD_SEGS)
        die = die.union(closed.intersection(shapely.unary_union([p.buffer(10.0 * r) for p in concave])))
    outline = Polygon(single_polygon(die, what).exterior)  # the die's outline: no sliver or hole of the pieces
    cleaned = shapely.remove_repeated_points(outline, 1e-3)  # the pieces' points where they join (1 µm)
    rounded = tuple((float(p.x), float(p.y)) for p in concave)
    return (cleaned if cleaned.is_valid and not cleaned.is_empty else outline), rounded


def _run_end(ring: LineString, total: float, s_mm: float, cut_edge_mm: float, turn: float, depth_mm: float,
             ramp_of: Callable[[float], float]) -> tuple[float, list[Polygon]]:
    """Where a flanged run ends on a cut edge, at ``s_mm`` along the drawn ``ring``, the outline turning by ``turn``
    (rad) onto a cut edge ``cut_edge_mm`` long (negative: the edge before the run): how far the run's offset by
    ``depth_mm`` is taken on straight past its end, and what else comes off the outline there.

    At a convex corner the offset runs on to meet the cut edge (a mitre) and nothing else comes off.  Otherwise the
    :func:`_taper` along the cut edge over the joggles' run-out (``ramp_of``), which the offset overlaps a little
    where the two run on in one line; where the outline turns inward, also the circle of the offset turning round
    the corner (finely divided: it meets the run's offset and the taper on their lines)."""
    corner = math.radians(CORNER_TURN_DEG)
    if turn >= corner:
        return _mitre_reach(depth_mm, turn), []
    length = math.copysign(min(ramp_of(depth_mm), abs(cut_edge_mm)), cut_edge_mm)
    out = [_taper(ring, total, s_mm, length, depth_mm)]
    if turn < 0.0:
        out.append(ShapelyPoint(ring.interpolate(s_mm % total)).buffer(depth_mm, quad_segs=4 * QUAD_SEGS))
    return (OVERLAP_MM if turn > -corner else 0.0), out


def _taper(ring: LineString, total: float, s_mm: float, length_mm: float, depth_mm: float) -> Polygon:
    """The strip between the closed counter-clockwise outline ``ring`` (``total`` mm round; from just outside it)
    and a line inside it that comes out from ``depth_mm`` deep at ``s_mm`` along the ring to the ring itself
    ``length_mm`` further on (back, when negative), along the joggles' run-out profile
    (:func:`diegen.geometry.pieces.ramp_shape`: no kink at either end), sampled closer towards its ends (cosine
    spacing), where it joins the run's offset and the drawn line: a spline through the die's points then leaves the
    run's offset at the run's own direction."""
    count = max(int(abs(length_mm) / 0.25), 8) + 1
    u = 0.5 - 0.5 * np.cos(np.linspace(0.0, math.pi, count))
    along = (s_mm + u * length_mm) % total
    base = np.asarray([ring.interpolate(float(v)).coords[0] for v in along])
    step = 0.01 * np.sign(length_mm) if length_mm else 0.01
    ahead = np.asarray([ring.interpolate(float((v + step) % total)).coords[0] for v in along])
    tangent = (ahead - base) * np.sign(step)
    tangent /= np.linalg.norm(tangent, axis=1, keepdims=True)
    inward = np.column_stack([-tangent[:, 1], tangent[:, 0]])
    depth = depth_mm * (1.0 - ramp_shape(u))
    outside = base - 0.1 * inward  # the strip's outer side just outside the outline: no sliver along the outline
    return Polygon(np.vstack([outside, (base + depth[:, None] * inward)[::-1]])).buffer(0)


def _mitre_reach(offset_mm: float, turn: float) -> float:
    """How far past a convex corner turning by ``turn`` (rad) an edge's offset by ``offset_mm`` meets the next edge
    (``offset_mm``/sin of the corner's inside angle), and a little more; bounded for a corner turned almost back."""
    return offset_mm / max(math.sin(math.pi - turn), 0.05) + offset_mm


def _mold_marks(part: DrawnPart) -> list[tuple[float, bool, float, int]]:
    """Boundaries along the drawn outline, at edge starts: (arc length, is a run boundary, signed turn in rad
    where the edges meet at a corner, else 0, which side is flanged where only one is: −1 the edge before the
    mark, +1 the edge after it, else 0)."""
    edges = part.outline.edges
    offsets = part.outline.edge_offsets()
    run_of: list[int | None] = [None] * len(edges)
    for i, run in enumerate(part.runs):
        for k in range(run.first_edge, run.stop_edge):
            run_of[k] = i
    marks = []
    for k, edge in enumerate(edges):
        turn = turn_angle(edges[k - 1].end_tangent(), edge.start_tangent())
        boundary = run_of[k] != run_of[k - 1]
        corner = abs(math.degrees(turn)) >= CORNER_TURN_DEG
        before, after = run_of[k - 1] is not None, run_of[k] is not None
        side = 0 if before == after else (-1 if before else 1)
        if boundary or corner:
            marks.append((float(offsets[k]), boundary, turn if corner else 0.0, side))
    return marks


def _unwrap(pts: np.ndarray, s: np.ndarray, total: float) -> tuple[np.ndarray, np.ndarray]:
    """Start the die loop where its footpoints on the drawn outline wrap round, and make them non-decreasing."""
    jumps = np.diff(np.r_[s, s[0]])
    start = (int(np.argmin(jumps)) + 1) % len(s)
    pts, s = np.roll(pts, -start, axis=0), np.roll(s, -start)
    if s[0] > total / 2:  # the first point's footpoint sits at the very end of the outline: read it as 0
        s[0] -= total
    return pts, np.maximum.accumulate(s)


def _place_marks(pts: np.ndarray, s: np.ndarray, marks: list[tuple[float, bool, float, int]], total: float,
                 inset: float) -> tuple[list[Point], list[float], list[tuple[bool, bool]]]:
    """Die outline points and footpoint positions with a point at every mark, and each point's marks
    (run boundary, corner).  ``inset`` is how far the die outline lies inside the drawn one (mm)."""
    points = [(float(x), float(y)) for x, y in pts]
    where = [float(v) for v in s]
    flags: list[tuple[bool, bool]] = [(False, False)] * len(points)
    eps = 1e-6 * max(1.0, total)
    for s_mark, boundary, turn, side in marks:
        count = len(points)
        index = _corner_index(points, where, s_mark, turn, inset, total) if turn > 0 and inset > 0 else None
        if index is None:
            index = _mark_index(points, where, s_mark, eps, total, side)
        if len(points) > count:  # a point was put in for the mark
            flags.insert(index, (False, False))
        old = flags[index]
        flags[index] = (old[0] or boundary, old[1] or turn != 0.0)
    return points, where, flags


def _corner_index(points: list[Point], where: list[float], s_mark: float, turn: float, inset: float,
                  total: float) -> int | None:
    """The die's own corner for a convex corner of the drawn outline offset inward by ``inset``.

    The offset corner's nearest points on the drawn outline are its two feet, inset/tan(half the corner's
    inside angle) either side of the corner; where a flanged edge meets a cut edge (offset by nothing) the corner
    lies on the cut edge, inset/sin(the inside angle) from the drawn corner: the die point within the farther of
    the two reaches that turns most is the corner.
    """
    inside = max(math.pi - turn, math.radians(1.0))
    reach = inset * max(1.0 / math.tan(inside / 2.0), 1.0 / math.sin(inside)) + 2 * MERGE_MM
    s = np.asarray(where)
    near = [i for i in range(len(points))
            if min(abs(s[i] - s_mark), abs(s[i] - s_mark - total), abs(s[i] - s_mark + total)) <= reach]
    n = len(points)
    best, best_turn = None, 0.0
    for i in near:
        a, b, c = points[i - 1], points[i], points[(i + 1) % n]
        t = turn_angle(_direction(a, b), _direction(b, c))
        if t > best_turn:
            best, best_turn = i, t
    return best if best is not None and best_turn >= math.radians(CORNER_TURN_DEG) / 2 else None


def _mark_index(points: list[Point], where: list[float], s_mark: float, eps: float, total: float,
                side: int = 0) -> int:
    """The die outline point for the drawn outline's position ``s_mark`` (inserting one where needed).

    Where several die points stand over the mark (the offset turning round a concave corner on a circle), the
    mark goes on the circle's middle, or where only one side is flanged (``side``: −1 the one before, +1 the one
    after) on the circle's end on that side: the flange ends where its straight offset does, and does not wrap
    round the corner of the cut edge."""
    n = len(points)
    s = np.asarray(where)
    for target in (s_mark, s_mark + total, s_mark - total):
        same = np.nonzero(np.abs(s - target) <= eps)[0]
        if len(same) == 1:
            return int(same[0])
        if len(same) > 1:  # a round join about a concave corner: mark its middle, or the flanged side's end
            if side:
                return int(same[0] if side < 0 else same[-1])
            return _middle(points, where, [int(i) for i in same])
    ext = np.r_[s, s[0] + total]
    for target in (s_mark, s_mark + total):
        i = int(np.searchsorted(ext, target, side="right")) - 1
        if 0 <= i < n and ext[i] < target < ext[i + 1]:
            u = (target - ext[i]) / (ext[i + 1] - ext[i])
            a, b = points[i], points[(i + 1) % n]
            if ext[i + 1] - ext[i] > math.dist(a, b) + MERGE_MM:
                # the footpoints jump here: one end is a corner of the die, the mark belongs on it
                return i if _turn_at(points, i) >= _turn_at(points, (i + 1) % n) else (i + 1) % n
            p = (a[0] + u * (b[0] - a[0]), a[1] + u * (b[1] - a[1]))
            if math.dist(p, a) <= MERGE_MM:
                return i
            if math.dist(p, b) <= MERGE_MM:
                return (i + 1) % n
            return _insert(points, where, i + 1, p, float(target))
    return int(np.argmin(np.abs(s - s_mark)))


def _middle(points: list[Point], where: list[float], same: list[int]) -> int:
    """The point halfway along the outline points ``same`` (consecutive), inserted unless one lies there."""
    run = np.asarray([points[i] for i in same])
    lengths = np.r_[0.0, np.cumsum(np.hypot(*np.diff(run, axis=0).T))]
    half = lengths[-1] / 2.0
    j = int(np.argmin(np.abs(lengths - half)))
    if abs(lengths[j] - half) <= MERGE_MM:
        return same[j]
    j = int(np.searchsorted(lengths, half))
    u = (half - lengths[j - 1]) / (lengths[j] - lengths[j - 1])
    a, b = run[j - 1], run[j]
    return _insert(points, where, same[j], (float(a[0] + u * (b[0] - a[0])), float(a[1] + u * (b[1] - a[1]))),
                   where[same[0]])


def _turn_at(points: list[Point], i: int) -> float:
    n = len(points)
    return abs(turn_angle(_direction(points[i - 1], points[i]), _direction(points[i], points[(i + 1) % n])))


def _insert(points: list[Point], where: list[float], index: int, p: Point, s_value: float) -> int:
    points.insert(index, (float(p[0]), float(p[1])))
    where.insert(index, float(s_value))
    return index


def _mold_edge(s_value: float, offsets: np.ndarray) -> int:
    k = int(np.searchsorted(offsets, s_value % offsets[-1], side="right")) - 1
    return min(max(k, 0), len(offsets) - 2)


def _straight_segments(pts: list[Point], s: list[float], offsets: np.ndarray, mold: Contour,
                       total: float) -> list[bool]:
    """For each die segment (point i to i + 1), whether it lies along a straight edge of the drawn outline."""
    n = len(pts)
    straight = []
    for i in range(n):
        a, b = pts[i], pts[(i + 1) % n]
        s_next = s[(i + 1) % n] + (total if i + 1 == n else 0.0)
        edge = mold.edges[_mold_edge((s[i] + s_next) / 2.0, offsets)]
        if edge.kind != "line" or math.dist(a, b) == 0.0:
            straight.append(False)
            continue
        d, e = _direction(a, b), _direction(edge.start, edge.end)
        straight.append(d[0] * e[0] + d[1] * e[1] > 1.0 - 1e-9)
    return straight


def _drop_inserted_points(pts: list[Point], s: list[float], flags: list[tuple[bool, bool]], offsets: np.ndarray,
                          mold: Contour, total: float) -> tuple[list[Point], list[float], list[tuple[bool, bool]]]:
    """Drop unmarked points where a curved stretch does not turn (points the offset put on a chord's middle).

    The contoured-flange strain spreads each point's turning over its half edges, which is a uniform
    turning rate only when the points that turn are evenly spaced: a point on a chord's middle breaks that.
    """
    n = len(pts)
    straight = _straight_segments(pts, s, offsets, mold, total)
    keep = []
    for i in range(n):
        before, after = pts[i - 1], pts[(i + 1) % n]
        turn = abs(turn_angle(_direction(before, pts[i]), _direction(pts[i], after)))
        keep.append(flags[i] != (False, False) or straight[i - 1] or straight[i] or turn > 1e-7)
    return ([p for p, k in zip(pts, keep) if k], [v for v, k in zip(s, keep) if k],
            [f for f, k in zip(flags, keep) if k])


def _runs(pts: list[Point], s: list[float], flags: list[tuple[bool, bool]], straight: list[bool],
          offsets: np.ndarray, flanges: tuple[Flange | None, ...], keys: tuple[str, ...],
          total: float) -> tuple[tuple[Run, ...], tuple[Flange | None, ...], Points]:
    """The die outline split at its marked points into runs, each run's flange, and the relief points."""
    n = len(pts)
    cuts = [i for i in range(n) if flags[i][0] or flags[i][1]]
    if len(cuts) == 1:  # one corner alone: split the loop opposite it too, so no run is a loop with a corner
        target = (s[cuts[0]] + total / 2.0)
        cuts.append(int(np.argmin([abs(((v - target + total / 2) % total) - total / 2) for v in s])))
        cuts.sort()
    if not cuts:
        loop = [*pts, pts[0]]
        mid = s[n // 2] % total
        flange = _flange_at(mid, offsets, flanges)
        return ((_with_flange(Run("curve", _densify(loop, straight), flange is not None), flange,
                              _flange_at(mid, offsets, keys)),), (flange,), ())
    pieces = []
    for j, a in enumerate(cuts):
        b = cuts[(j + 1) % len(cuts)]
        idx = list(range(a, b + 1)) if b > a else list(range(a, n)) + list(range(b + 1))
        s_a, s_b = s[a], s[b] if b > a else s[b] + total
        pieces.append((a, b, [pts[i] for i in idx], (s_a + s_b) / 2.0 % total, [straight[i] for i in idx[:-1]]))
    runs, run_flanges = [], []
    for _, _, points, mid, along in pieces:
        flange = _flange_at(mid, offsets, flanges)
        runs.append(_with_flange(_run(points, along, flange is not None), flange, _flange_at(mid, offsets, keys)))
        run_flanges.append(flange)
    reliefs = []
    for j, (a, _, _, _, _) in enumerate(pieces):
        before = run_flanges[j - 1]
        if flags[a][1] and before is not None and run_flanges[j] is not None and len(pieces) > 1:
            turn = abs(math.degrees(turn_angle(_direction(pts[a - 1], pts[a]), _direction(pts[a], pts[(a + 1) % n]))))
            if turn >= CORNER_TURN_DEG:
                reliefs.append(pts[a])
    return tuple(runs), tuple(run_flanges), tuple(reliefs)


def _with_flange(run: Run, flange: Flange | None, key: str) -> Run:
    """The geometry layer's run with its own flange's height, bend radius, angle and spec key (none: a cut edge)."""
    if flange is None:
        return run
    shape = flange
    return replace(run, flange_height_mm=shape.height_mm, bend_radius_mm=shape.bend_radius_mm,
                   angle_deg=shape.angle_deg, flange_key=key)


def _direction(a: Point, b: Point) -> Point:
    d = math.dist(a, b)
    return ((b[0] - a[0]) / d, (b[1] - a[1]) / d)


def _flange_at(s_mid: float, offsets: np.ndarray, flanges: tuple):
    k = int(np.searchsorted(offsets, s_mid, side="right")) - 1
    return flanges[min(max(k, 0), len(flanges) - 1)]


def _run(points: list[Point], straight: list[bool], flanged: bool) -> Run:
    p = np.asarray(points, dtype=float)
    chord = p[-1] - p[0]
    length = float(np.hypot(*chord))
    if len(p) == 2 or (length > 0 and _off_chord(p, chord, length) <= 1e-9 * max(1.0, length)):
        return Run("line", (points[0], points[-1]), flanged)
    return Run("curve", _densify(points, straight), flanged)


def _off_chord(p: np.ndarray, chord: np.ndarray, length: float) -> float:
    rel = p - p[0]
    return float(np.max(np.abs(rel[:, 0] * chord[1] - rel[:, 1] * chord[0])) / length)


def _densify(points: list[Point], straight: list[bool]) -> Points:
    """Points every ``CURVE_STEP_MM`` at most along each segment on a straight edge of the drawing (ends kept);
    chords of curved stretches are left alone (a point on a chord would be a kink to the strain's windowing)."""
    out: list[Point] = [points[0]]
    for a, b, along in zip(points[:-1], points[1:], straight):
        steps = max(1, math.ceil(math.dist(a, b) / CURVE_STEP_MM)) if along else 1
        for k in range(1, steps + 1):
            u = k / steps
            out.append(b if k == steps else (a[0] + u * (b[0] - a[0]), a[1] + u * (b[1] - a[1])))
    return tuple(out)


def _holes(part: DrawnPart, die_poly: Polygon, runs: tuple[Run, ...], bend_radius: float,
           flange_height: float | None, place: Place) -> tuple[tuple[Hole, ...], tuple[Points, ...]]:
    flanged_edges = [LineString(r.points) for r in runs if r.flanged]
    holes, cutouts = [], []
    for drawn in part.holes:
        poly = Polygon(drawn.contour.points)
        name = _names(drawn.contour)
        label = f"the hole [{name}]" if name else "a hole"
        if not die_poly.contains(poly):
            offset_note = (" (the mold line offset inward by the sheet along its flanged edges)"
                           if part.outline_is == "mold-line" else "")
            raise GeometryError(f"{place.source}: {label} reaches outside the die outline{offset_note}"
                                f" near {place.at(_some_point(poly.boundary.difference(die_poly)))}")
        if drawn.circle is not None:  # the true circle, not its flattened polygon
            centre = ShapelyPoint(drawn.circle[0], drawn.circle[1])
            gap = min((line.distance(centre) for line in flanged_edges), default=math.inf) - drawn.circle[2] / 2
        else:
            gap = min((line.distance(poly) for line in flanged_edges), default=math.inf)
        if gap < bend_radius:
            raise GeometryError(f"{place.source}: {label} comes within {place.length(gap)} of a flanged edge of the "
                                f"die; the flange bend takes {place.length(bend_radius)} of web (its bend radius) "
                                "along a flanged edge")
        if drawn.circle is not None:
            x, y, d = drawn.circle
            holes.append(Hole(x, y, d, flange_height is not None, float(flange_height or 0.0)))
        else:
            cutouts.append(drawn.contour.points)
    return tuple(holes), tuple(cutouts)


def _pins(part: DrawnPart, die_poly: Polygon, holes: tuple[Hole, ...], bend_radius: float, margin: float,
          diameter: float, auto: bool, part_id: str, place: Place) -> tuple[Pin, ...]:
    if not part.pins:
        return pin_rules.auto_pins(die_poly, bend_radius, margin, diameter, holes, part_id) if auto else ()
    room = pin_rules.pin_room(die_poly, bend_radius, margin, diameter, holes)
    inset = bend_radius + margin + diameter / 2.0
    pins = []
    for pin in part.pins:
        spot = ShapelyPoint(pin.x, pin.y)
        if not room.contains(spot):
            edge = die_poly.exterior.distance(spot) if die_poly.contains(spot) else -die_poly.exterior.distance(spot)
            raise GeometryError(
                f"{place.source}: pin {pin.origin} at {place.at((pin.x, pin.y))}: a {diameter:.2f} mm pin's centre "
                f"must stand {inset:.2f} mm inside the die outline (bend radius {bend_radius:.2f} mm + margin "
                f"{margin:.2f} mm + half the pin) and as clear of the holes; it is {edge:.2f} mm inside the die "
                "outline")
        pins.append(Pin(pin.x, pin.y, diameter))
    return tuple(pins)


def _depth_range(die_poly: Polygon) -> tuple[float, float]:
    """Smallest and largest vertical depth of the web (mm), sampled across the middle of its length."""
    minx, _, maxx, _ = die_poly.bounds
    margin = (1.0 - DEPTH_SPAN) / 2.0 * (maxx - minx)
    extents = vertical_extents(die_poly, np.linspace(minx + margin, maxx - margin, DEPTH_SAMPLES))
    depths = extents[:, 1] - extents[:, 0]
    depths = depths[np.isfinite(depths)]
    return (round(float(depths.min()), 3), round(float(depths.max()), 3)) if depths.size else (0.0, 0.0)


def _mirror(geometry: PieceGeometry, run_flanges: tuple[Flange | None, ...],
            cutouts: tuple[Points, ...]) -> tuple[PieceGeometry, tuple[Flange | None, ...], tuple[Points, ...]]:
    """The piece seen from its other face (x → −x), still counter-clockwise."""

    def flip(points: Points) -> Points:
        return tuple((-x, y) for x, y in reversed(points))

    runs = tuple(replace(r, points=flip(r.points)) for r in reversed(geometry.runs))
    plain = tuple(replace(r, points=flip(r.points)) for r in reversed(geometry.plain_runs))
    x0, x1 = geometry.x_range_mm
    mirrored = replace(geometry, x_range_mm=(-x1, -x0), runs=runs, plain_runs=plain,
                       joggles=tuple(replace(j, path=flip(j.path)) for j in geometry.joggles),
                       holes=tuple(replace(h, x=-h.x) for h in geometry.holes),
                       pins=tuple(replace(p, x=-p.x) for p in geometry.pins),
                       relief_points=tuple((-x, y) for x, y in geometry.relief_points))
    return mirrored, tuple(reversed(run_flanges)), tuple(flip(c) for c in cutouts)


__all__ = ["CORNER_TURN_DEG", "SNAP_MM", "drawn_part", "drawn_piece"]
