"""Small helpers on shapely polygons (mm); a loop's area and length are in :mod:`diegen.geometry.loops`."""

from __future__ import annotations

import numpy as np
import shapely
from shapely.geometry import Polygon

from diegen.errors import GeometryError
from diegen.geometry.types import Points

__all__ = [
    "QUAD_SEGS",
    "as_points",
    "inscribed_diameter",
    "offset_inward",
    "outline_deviation_mm",
    "round_concave_corners",
    "single_polygon",
    "vertical_extent",
    "vertical_extents",
]

# Segments per quarter circle for offsets: the chordal error of a round join of
# radius r is r·(1 − cos(π/(4·QUAD_SEGS))), 0.0012·r at 16.
QUAD_SEGS = 16


def as_points(polygon: Polygon) -> Points:
    """Exterior of ``polygon`` as a counter-clockwise loop without the closing point."""
    ring = shapely.geometry.polygon.orient(polygon, 1.0).exterior
    coords = np.asarray(ring.coords)[:-1]
    return tuple((float(x), float(y)) for x, y in coords)


def single_polygon(geometry: shapely.Geometry, what: str) -> Polygon:
    """The one polygon of ``geometry`` (dropping slivers under 1 mm²); fail clearly if none or several."""
    if geometry.is_empty:
        raise GeometryError(f"{what}: nothing is left")
    parts = [g for g in getattr(geometry, "geoms", [geometry]) if isinstance(g, Polygon) and g.area > 1.0]
    if not parts:
        raise GeometryError(f"{what}: nothing is left")
    if len(parts) > 1:
        parts.sort(key=lambda g: g.area, reverse=True)
        raise GeometryError(f"{what}: splits into {len(parts)} separate pieces (largest {parts[0].area:.0f} mm², "
                            f"next {parts[1].area:.0f} mm²)")
    return parts[0]


def inscribed_diameter(polygon: Polygon) -> float:
    """Diameter (mm) of the largest circle inside ``polygon``: its depth at the thickest spot, twice the largest
    inward offset that leaves anything."""
    if polygon.is_empty:
        return 0.0
    return 2.0 * float(shapely.maximum_inscribed_circle(polygon, tolerance=0.01).length)


def offset_inward(polygon: Polygon, distance: float, what: str) -> Polygon:
    """True normal offset of ``polygon`` inward by ``distance`` mm (round joins)."""
    result = polygon.buffer(-distance, quad_segs=QUAD_SEGS, join_style="round")
    if not any(isinstance(g, Polygon) and g.area > 1.0 for g in getattr(result, "geoms", [result])):
        deepest = inscribed_diameter(polygon)
        raise GeometryError(f"{what}: nothing is left; the outline is only {deepest:.2f} mm deep at its thickest, "
                            f"so an inward offset must stay under about {deepest / 2:.2f} mm")
    return single_polygon(result, what)


def round_concave_corners(polygon: Polygon, radius: float) -> Polygon:
    """Morphological closing: concave corners get at least ``radius``; convex ones and smooth curves stay."""
    if radius <= 0:
        return polygon
    closed = polygon.buffer(radius, quad_segs=QUAD_SEGS, join_style="round").buffer(
        -radius, quad_segs=QUAD_SEGS, join_style="round")
    return single_polygon(closed, "rounding concave corners to the cutter radius")


def vertical_extent(polygon: Polygon, x: float) -> tuple[float, float] | None:
    """Lowest and highest y of ``polygon`` on the vertical line at ``x`` (None if it misses)."""
    minx, miny, maxx, maxy = polygon.bounds
    if not minx < x < maxx:
        return None
    cut = polygon.intersection(shapely.geometry.LineString([(x, miny - 1), (x, maxy + 1)]))
    if cut.is_empty:
        return None
    _, y0, _, y1 = cut.bounds
    return y0, y1


def vertical_extents(polygon: Polygon, xs: np.ndarray) -> np.ndarray:
    """Lowest and highest y of ``polygon`` on vertical lines at each of ``xs`` (NaN where a line misses), (N, 2)."""
    _, miny, _, maxy = polygon.bounds
    lines = shapely.linestrings([[(x, miny - 1), (x, maxy + 1)] for x in xs])
    bounds = shapely.bounds(shapely.intersection(polygon, lines))
    return bounds[:, [1, 3]]


def outline_deviation_mm(old: Points | list, new: Points) -> float:
    """Largest distance between two closed outlines (Hausdorff distance of their rings, mm)."""
    return float(Polygon(old).exterior.hausdorff_distance(Polygon(new).exterior))
