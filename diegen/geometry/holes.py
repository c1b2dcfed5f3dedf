"""Lightening holes in a rib piece's web.

The web usable for holes is the die outline eroded by the bend radius (to the
flange's bend line on the web) plus an edge margin.  ``auto`` places holes
greedily, largest first — the biggest circle that still fits the usable web,
kept a ligament clear of the holes already placed — so a piece gets a few large
holes rather than many small ones.  A hole is also held to at most
``MAX_DEPTH_FRACTION`` of the local web depth so the web keeps some stiffness
(common practice, no source: lightening holes of up to about two thirds of the
depth are usual).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import shapely
from shapely.geometry import Point as ShapelyPoint
from shapely.geometry import Polygon

from diegen.errors import GeometryError
from diegen.geometry.polygon import QUAD_SEGS, vertical_extent
from diegen.geometry.types import Hole
from diegen.spec.model import HoleRules, HoleSpec

__all__ = [
    "MAX_AUTO_HOLES",
    "MAX_DEPTH_FRACTION",
    "ROUND_TO_MM",
    "auto_holes",
    "explicit_holes",
    "hole_flange_height",
    "usable_web",
]

MAX_DEPTH_FRACTION = 0.65
MAX_AUTO_HOLES = 12
ROUND_TO_MM = 1.0  # auto diameters are rounded down to a whole millimetre (hole saws and cutters come in steps)


def usable_web(piece: Polygon, bend_radius: float, rules: HoleRules) -> Polygon:
    """The part of the web where a hole edge may lie (mm)."""
    return piece.buffer(-(bend_radius + rules.edge_margin_mm), quad_segs=QUAD_SEGS)


def hole_flange_height(d: float, wanted: float, stretch_limit: float) -> float:
    """The hole flange height (mm) that keeps the edge stretch h/(R − h) within ``stretch_limit``.

    Inverting the stretch-flange strain gives h ≤ limit·R/(1 + limit); the
    result is rounded down to 0.1 mm.
    """
    allowed = stretch_limit * (d / 2) / (1 + stretch_limit)
    return min(wanted, math.floor(allowed * 10) / 10)


def auto_holes(piece: Polygon, bend_radius: float, rules: HoleRules, stretch_limit: float = math.inf,
               min_flange_mm: float = 0.0, keep_clear: Sequence[Polygon] = ()) -> tuple[Hole, ...]:
    """Greedy largest-first hole placement in ``piece`` (mm).

    Flanged holes get the rules' flange height, lowered where a small hole would
    stretch its flange edge past ``stretch_limit``; a hole whose flange would
    then be lower than ``min_flange_mm`` (too short to bend) is left plain.
    """
    room = usable_web(piece, bend_radius, rules)
    for area in keep_clear:
        room = room.difference(area)
    holes: list[Hole] = []
    while len(holes) < MAX_AUTO_HOLES and not room.is_empty:
        centre, radius = _largest_circle(room)
        if centre is None:
            break
        extent = vertical_extent(piece, centre.x)
        if extent is not None:
            radius = min(radius, 0.5 * MAX_DEPTH_FRACTION * (extent[1] - extent[0]))
        d = math.floor(2 * radius / ROUND_TO_MM) * ROUND_TO_MM
        if d < rules.min_diameter_mm:
            break
        y = centre.y if extent is None else 0.5 * (extent[0] + extent[1])
        moved = ShapelyPoint(centre.x, y)
        if not (room.contains(moved) and room.boundary.distance(moved) >= d / 2):  # the whole hole must stay in
            y = centre.y
        height = hole_flange_height(d, rules.flange_height_mm, stretch_limit) if rules.flanged else 0.0
        flanged = rules.flanged and height >= min_flange_mm
        holes.append(Hole(round(centre.x, 3), round(y, 3), d, flanged, height if flanged else 0.0))
        # one row of holes along the piece: the band the hole stands in is taken out whole
        band = d / 2 + rules.ligament_mm
        _minx, miny, _maxx, maxy = room.bounds
        room = room.difference(shapely.box(centre.x - band, miny - 1, centre.x + band, maxy + 1))
    return tuple(sorted(holes, key=lambda h: h.x))


def _largest_circle(region: shapely.Geometry) -> tuple[ShapelyPoint | None, float]:
    best: tuple[ShapelyPoint | None, float] = (None, 0.0)
    for part in getattr(region, "geoms", [region]):
        if not isinstance(part, Polygon) or part.area < 1.0:
            continue
        line = shapely.maximum_inscribed_circle(part, tolerance=0.25)  # diameters are rounded to 1 mm
        centre = ShapelyPoint(line.coords[0])
        radius = line.length
        if radius > best[1]:
            best = (centre, radius)
    return best


def explicit_holes(piece: Polygon, x_range: tuple[float, float], bend_radius: float, rules: HoleRules,
                   wanted: Sequence[HoleSpec], piece_name: str) -> tuple[Hole, ...]:
    """The listed holes whose centres fall in this piece, checked against the margins."""
    room = usable_web(piece, bend_radius, rules)
    holes: list[Hole] = []
    for index, spec in enumerate(wanted):
        if not x_range[0] <= spec.x_mm <= x_range[1]:
            continue
        y = spec.y_mm
        if y is None:
            extent = vertical_extent(piece, spec.x_mm)
            if extent is None:
                raise GeometryError(f"lightening_holes[{index}]: x = {spec.x_mm:.1f} mm misses the {piece_name} piece")
            y = 0.5 * (extent[0] + extent[1])
        circle = ShapelyPoint(spec.x_mm, y).buffer(spec.d_mm / 2, quad_segs=QUAD_SEGS)
        if not room.contains(circle):
            centre = ShapelyPoint(spec.x_mm, y)
            edge = room.boundary.distance(centre) if not room.is_empty else 0.0
            short = spec.d_mm / 2 - edge if room.contains(centre) else spec.d_mm / 2 + edge
            usable = vertical_extent(room, spec.x_mm) if not room.is_empty else None
            depth = 0.0 if usable is None else usable[1] - usable[0]
            raise GeometryError(
                f"lightening_holes[{index}] (x = {spec.x_mm:.1f} mm, d = {spec.d_mm:.1f} mm) in the {piece_name} piece "
                f"breaks the edge margin of {rules.edge_margin_mm:.1f} mm from the bend line by {short:.2f} mm: "
                f"the web there leaves {depth:.1f} mm for a hole (die depth less bend radius {bend_radius:.2f} mm and "
                f"margin on each side), so a hole there may be at most about {depth:.1f} mm across")
        for other in holes:
            gap = math.dist((other.x, other.y), (spec.x_mm, y)) - (other.d + spec.d_mm) / 2
            if gap < rules.ligament_mm:
                raise GeometryError(
                    f"lightening_holes[{index}] leaves only {gap:.2f} mm of web to the hole at x = {other.x:.1f} mm; "
                    f"the ligament rule needs {rules.ligament_mm:.1f} mm (short by {rules.ligament_mm - gap:.2f} mm)")
        holes.append(Hole(spec.x_mm, y, spec.d_mm, spec.flanged,
                          spec.flange_height_mm if spec.flange_height_mm is not None else rules.flange_height_mm))
    return tuple(holes)
