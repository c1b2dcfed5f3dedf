"""Domain asserts and measurements shared by the geometry, analysis, blank and wing tests.

Everything here measures with general-purpose tools (shapely, numpy) rather
than with diegen's own helpers, so the tests compare diegen against an
independent computation.  Lengths in mm, angles in radians unless a name says
otherwise.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import numpy as np
import shapely
from shapely.geometry import LinearRing, LineString, Point, Polygon

ROOT = Path(__file__).resolve().parent.parent
SPECS = ROOT / "specs"
DEMO_RIB = SPECS / "demo-rib.yaml"
DEMO_WING = SPECS / "demo-wing.yaml"

#: The one length tolerance for "the same outline" (mm); looser ones are named where they are used.
OUTLINE_TOL_MM = 0.01


def stretch_limit(spec) -> float:
    """The stretch limit of the spec's sheet alloy, read from the catalogue as the analysis passes it to
    ``rib_geometry``."""
    from diegen import materials

    return materials.sheet_alloy(spec.shared.sheet.alloy).stretch_limit


def as_array(points: Sequence[Sequence[float]]) -> np.ndarray:
    return np.asarray(points, dtype=float).reshape(-1, 2)


def signed_area(points: Sequence[Sequence[float]]) -> float:
    """Shoelace area of a closed loop (mm², positive when counter-clockwise)."""
    x, y = as_array(points).T
    return float(0.5 * np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def distances_to(points: Sequence[Sequence[float]], target: shapely.Geometry) -> np.ndarray:
    """Euclidean distance (mm) from each point to ``target`` (shapely), as an array."""
    pts = shapely.points(as_array(points))
    return np.asarray(shapely.distance(pts, target), dtype=float)


def loop_distance(a: Sequence[Sequence[float]], b: Sequence[Sequence[float]], step_mm: float = 1.0) -> float:
    """Symmetric Hausdorff distance (mm) between two closed loops: every vertex of each, plus points every
    ``step_mm`` along its edges, measured to the other loop."""
    ra, rb = LinearRing(as_array(a)), LinearRing(as_array(b))
    da = shapely.segmentize(ra, step_mm)
    db = shapely.segmentize(rb, step_mm)
    return float(max(distances_to(shapely.get_coordinates(da), rb).max(),
                     distances_to(shapely.get_coordinates(db), ra).max()))


def assert_outlines_close(a: Sequence[Sequence[float]], b: Sequence[Sequence[float]],
                          tol: float = OUTLINE_TOL_MM) -> None:
    """Two closed loops describe the same curve within ``tol`` mm (start point and vertex count may differ)."""
    gap = loop_distance(a, b)
    assert gap <= tol, f"outlines differ by {gap:.4f} mm (allowed {tol} mm)"


def assert_valid_ccw_outline(points: Sequence[Sequence[float]], what: str = "outline") -> None:
    """A simple (non self-touching), valid, counter-clockwise closed loop with no repeated closing point."""
    p = as_array(points)
    assert len(p) >= 3, f"{what}: {len(p)} points"
    assert not np.allclose(p[0], p[-1]), f"{what}: the closing point is repeated"
    ring = LinearRing(p)
    assert ring.is_simple, f"{what}: the loop crosses or touches itself"
    assert Polygon(p).is_valid, f"{what}: {shapely.is_valid_reason(Polygon(p))}"
    assert signed_area(p) > 0.0, f"{what}: not counter-clockwise"


def turning_angles(points: Sequence[Sequence[float]]) -> np.ndarray:
    """Signed exterior angle at each vertex of a closed loop (rad, + = left turn = convex for a CCW loop)."""
    p = as_array(points)
    e = np.roll(p, -1, axis=0) - p
    heading = np.arctan2(e[:, 1], e[:, 0])
    return (heading - np.roll(heading, 1) + np.pi) % (2 * np.pi) - np.pi


def three_point_radii(points: Sequence[Sequence[float]]) -> tuple[np.ndarray, np.ndarray]:
    """Radius (mm) of the circle through each vertex and its two neighbours, and whether the vertex is concave.

    For a CCW loop a concave vertex turns right (negative cross product).
    """
    p = as_array(points)
    a, c = np.roll(p, 1, axis=0), np.roll(p, -1, axis=0)
    u, v = p - a, c - p
    cross = u[:, 0] * v[:, 1] - u[:, 1] * v[:, 0]
    la, lb, lc = np.hypot(*u.T), np.hypot(*v.T), np.hypot(*(c - a).T)
    with np.errstate(divide="ignore"):
        radius = np.where(cross != 0.0, la * lb * lc / (2.0 * np.abs(cross)), np.inf)
    return radius, cross < 0.0


def nearest_index(points: Sequence[Sequence[float]], point: Sequence[float]) -> int:
    p = as_array(points)
    return int(np.argmin(np.hypot(*(p - np.asarray(point, float)).T)))


def vertical_chord(polygon: Polygon, x: float) -> float:
    """Length (mm) of the polygon's cut by the vertical line at ``x`` (the local depth of a simple shape)."""
    _minx, miny, _maxx, maxy = polygon.bounds
    return float(polygon.intersection(LineString([(x, miny - 10), (x, maxy + 10)])).length)


def circle_points(radius: float, n: int, centre: tuple[float, float] = (0.0, 0.0), start: float = 0.0) -> np.ndarray:
    """``n`` CCW points of a regular polygon inscribed in a circle (mm)."""
    a = start + np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    return np.column_stack([centre[0] + radius * np.cos(a), centre[1] + radius * np.sin(a)])


def point(p: Sequence[float]) -> Point:
    return Point(float(p[0]), float(p[1]))


def timed_with_peak(function, *args):
    """Call ``function(*args)``: (result, seconds, peak traced memory in bytes).

    The peak comes from a second call, since tracing slows Python several times over.
    """
    import time
    import tracemalloc

    start = time.perf_counter()
    result = function(*args)
    seconds = time.perf_counter() - start
    tracemalloc.start()
    try:
        function(*args)
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    return result, seconds, peak


REPORTED: list[str] = []


def report(*parts: object) -> None:
    """A line for the end of the test run (counts of fuzz cases, database sweeps): shown even under -q."""
    REPORTED.append(" ".join(str(p) for p in parts))
