"""Edges and closed contours of a drawn part (mm, X–Y plane of the drawing, Y up).

An :class:`Edge` is one line, circular arc or flattened curve.  Arcs stay arcs:
an arc edge keeps its end points and its bulge (the DXF convention: the tangent
of a quarter of the included angle, positive counter-clockwise), so a writer can
emit it as an arc; its ``points`` are the same arc flattened for the polygon
work.  Curves (splines, ellipses, Bézier segments) are kept as flattened points
with their exact end tangents.

Chordal error (every flattening here stays within ``CHORD_TOL_MM`` of the curve):

* circular arc of radius r: equal steps of at most 2·acos(1 − tol/r), the angle
  whose chord stands the sagitta tol off the arc (exact);
* any curve with a bound M on its second derivative over a parameter interval:
  equal parameter steps h with h²·M/8 ≤ tol.  The error of linear interpolation
  between two curve points is at most h²/8·max‖c″‖ (the interpolation remainder,
  applied to the curve's component along the error), so no curve point is more
  than tol from its chord.  The bounds used:

  - Bézier segment of degree n: ‖c″‖ ≤ n(n − 1)·max‖Pᵢ − 2Pᵢ₊₁ + Pᵢ₊₂‖ (the
    second derivative is a Bézier curve on those control points, within their
    convex hull);
  - B-spline of degree p, per knot span: the same convex-hull bound on the
    control points of its second-derivative B-spline active on the span;
  - ellipse c + a·u·cos t + b·v·sin t (a ≥ b): ‖c″‖ ≤ a.

* a rational B-spline (with weights) has no such simple bound: it is
  subdivided until the curve, sampled at 15 points inside each chord's
  parameter interval, stays within tol of the chord.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from typing import Literal

import numpy as np
import shapely
from shapely.geometry import LinearRing, Polygon

from diegen.errors import DrawingError
from diegen.geometry.loops import polyline_length
from diegen.geometry.types import Point, Points

CHORD_TOL_MM = 0.01  # largest distance between a curve and its flattened polyline
MIN_ARC_STEPS = 2  # an arc is never flattened to fewer chords (a single chord would read as a line)
MAX_FLAT_POINTS = 200_000  # one edge flattened to more points than this is not a part outline
MAX_COORD_MM = 1.0e6  # project limit: a drawn point this far (1 km) from the origin is a mistake of units or data
MAX_SPAN_MM = 10_000.0  # project limit: no part formed in a shop press is 10 m across

EdgeKind = Literal["line", "arc", "curve"]


@dataclass(frozen=True)
class Place:
    """How messages name a place in a source: its name and the unit its coordinates are shown in."""

    source: str  # "bulkhead.dxf", "svg path", "outline.points"
    unit: str = "mm"
    mm_per_unit: float = 1.0
    y_down: bool = False  # the source's y axis points down (SVG): messages show its own y

    def at(self, p: Sequence[float]) -> str:
        """A point (given in mm, Y up) as the drawing shows it: ``(12.500, 4.000) mm``."""
        s = self.mm_per_unit
        y = -p[1] if self.y_down else p[1]
        return f"({p[0] / s:.3f}, {y / s:.3f}) {self.unit}"

    def length(self, d_mm: float) -> str:
        """A length (given in mm) in the drawing's unit, with mm beside it when the drawing is not in mm."""
        if self.unit == "mm":
            return f"{d_mm:.3f} mm"
        return f"{d_mm / self.mm_per_unit:.4f} {self.unit} ({d_mm:.3f} mm)"


# -- arcs by bulge ----------------------------------------------------------------


def bulge_arc(a: Sequence[float], b: Sequence[float], bulge: float) -> tuple[Point, float, float]:
    """Centre, radius and signed sweep (rad, + counter-clockwise) of the arc from ``a`` to ``b`` with ``bulge``.

    Bulge = tan(sweep/4) (DXF Reference, LWPOLYLINE group 42).  The centre lies on the chord's
    perpendicular bisector, (c/2)/tan(sweep/2) to the left of the chord (to the right when that is
    negative), and the radius is c/(2·|sin(sweep/2)|), c the chord.
    """
    ax, ay = float(a[0]), float(a[1])
    bx, by = float(b[0]), float(b[1])
    dx, dy = bx - ax, by - ay
    chord = math.hypot(dx, dy)
    sweep = 4.0 * math.atan(bulge)
    if chord == 0.0 or bulge == 0.0:
        raise ValueError("an arc needs two distinct end points and a bulge other than 0")
    half = sweep / 2.0
    radius = chord / (2.0 * abs(math.sin(half)))
    offset = (chord / 2.0) / math.tan(half)
    nx, ny = -dy / chord, dx / chord  # left normal of the chord
    centre = ((ax + bx) / 2.0 + nx * offset, (ay + by) / 2.0 + ny * offset)
    return centre, radius, sweep


def arc_steps(radius: float, sweep: float, tol: float = CHORD_TOL_MM) -> int:
    """Equal steps of an arc whose chords stay within ``tol`` of it: step ≤ 2·acos(1 − tol/r)."""
    step = math.pi if tol >= radius else 2.0 * math.acos(1.0 - tol / radius)
    if not step > 0.0 or not math.isfinite(radius):
        raise DrawingError(f"an arc of radius {radius:.4g} mm is far too large for a part outline "
                           "(are the drawing's units right?)")
    n = math.ceil(abs(sweep) / step - 1e-12)
    _check_count(n)
    return max(MIN_ARC_STEPS, n)


def arc_points(a: Sequence[float], b: Sequence[float], bulge: float, tol: float = CHORD_TOL_MM) -> Points:
    """The arc from ``a`` to ``b`` flattened within ``tol`` (both end points exact)."""
    _check_points((a, b))
    (cx, cy), radius, sweep = bulge_arc(a, b, bulge)
    n = arc_steps(radius, sweep, tol)
    start = math.atan2(a[1] - cy, a[0] - cx)
    angles = start + sweep * np.arange(1, n) / n
    inner = [(cx + radius * math.cos(t), cy + radius * math.sin(t)) for t in angles]
    return ((float(a[0]), float(a[1])), *inner, (float(b[0]), float(b[1])))


# -- flattening of general curves ------------------------------------------------------


def _check_points(points: Sequence[Sequence[float]]) -> None:
    """Every coordinate finite and within ``MAX_COORD_MM`` of the origin."""
    for p in points:
        if not (math.isfinite(p[0]) and math.isfinite(p[1])) or max(abs(p[0]), abs(p[1])) > MAX_COORD_MM:
            raise DrawingError(f"a point at ({p[0]:.4g}, {p[1]:.4g}) mm lies more than {MAX_COORD_MM:.0f} mm from the "
                               "origin (or is not a number): not a part outline (are the drawing's units right?)")


def _check_count(n: int) -> None:
    if n > MAX_FLAT_POINTS:
        raise DrawingError(f"a curve needs {n} points to stay within {CHORD_TOL_MM} mm of its chords "
                           f"(more than {MAX_FLAT_POINTS}): it is far too large for a part outline "
                           "(are the drawing's units right?)")


def steps_for_bound(span: float, bound: float, tol: float = CHORD_TOL_MM) -> int:
    """Equal steps over a parameter ``span`` for a curve with ‖c″‖ ≤ ``bound``: h²·bound/8 ≤ tol."""
    if bound <= 0.0 or span <= 0.0:
        return 1
    n = math.ceil(span * math.sqrt(bound / (8.0 * tol)) - 1e-12)
    _check_count(n)
    return max(1, n)


def bezier_point(control: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Points of the Bézier curve on ``control`` (k+1, 2) at parameters ``t`` (de Casteljau)."""
    t = np.asarray(t, dtype=float)[:, None, None]
    pts = np.broadcast_to(control, (t.shape[0], *control.shape)).copy()
    while pts.shape[1] > 1:
        pts = (1.0 - t) * pts[:, :-1] + t * pts[:, 1:]
    return pts[:, 0]


def bezier_bound(control: np.ndarray) -> float:
    """n(n − 1)·max‖Pᵢ − 2Pᵢ₊₁ + Pᵢ₊₂‖: a bound on the second derivative of a degree-n Bézier segment."""
    n = len(control) - 1
    if n < 2:
        return 0.0
    second = control[:-2] - 2.0 * control[1:-1] + control[2:]
    return n * (n - 1) * float(np.max(np.hypot(*second.T)))


def flatten_bezier(control: Sequence[Sequence[float]], tol: float = CHORD_TOL_MM) -> Points:
    """A Bézier segment of any degree flattened within ``tol`` (end points exact)."""
    ctrl = np.asarray(control, dtype=float)
    n = steps_for_bound(1.0, bezier_bound(ctrl), tol)
    pts = bezier_point(ctrl, np.linspace(0.0, 1.0, n + 1))
    pts[0], pts[-1] = ctrl[0], ctrl[-1]
    return _tuple(pts)


def bezier_tangents(control: Sequence[Sequence[float]]) -> tuple[Point, Point] | None:
    """Unit tangents at the start and end of a Bézier segment (the first control point apart from each end)."""
    ctrl = np.asarray(control, dtype=float)
    start = next((p - ctrl[0] for p in ctrl[1:] if np.hypot(*(p - ctrl[0])) > 0.0), None)
    end = next((ctrl[-1] - p for p in ctrl[-2::-1] if np.hypot(*(ctrl[-1] - p)) > 0.0), None)
    if start is None or end is None:
        return None
    return _unit(start), _unit(end)


def flatten_bspline(control: np.ndarray, knots: np.ndarray, degree: int, weights: np.ndarray | None = None,
                    tol: float = CHORD_TOL_MM) -> tuple[Points, tuple[Point, Point] | None]:
    """A B-spline (control points (n+1, 2), knots, degree, optional weights) over its valid domain
    [t_p, t_(n+1)], flattened within ``tol``; returns the points and the unit end tangents."""
    from scipy.interpolate import BSpline

    control = np.asarray(control, dtype=float)
    knots = np.asarray(knots, dtype=float)
    count = len(control)
    if degree < 1 or len(knots) != count + degree + 1 or count <= degree:
        raise ValueError(f"a degree {degree} spline with {count} control points needs {count + degree + 1} knots, "
                         f"has {len(knots)}")
    t0, t1 = float(knots[degree]), float(knots[count])
    if not t1 > t0:
        raise ValueError("the spline's knot vector spans no parameter range")
    rational = weights is not None and not np.allclose(weights, weights[0])
    if rational:
        homogeneous = np.column_stack([control * weights[:, None], weights])
        curve = BSpline(knots, homogeneous, degree)

        def evaluate(t: np.ndarray) -> np.ndarray:
            h = curve(t)
            return h[:, :2] / h[:, 2:3]

        params = _adaptive_params(evaluate, t0, t1, tol)
    else:
        curve = BSpline(knots, control, degree)
        evaluate = curve  # type: ignore[assignment]
        params = _bspline_params(curve, knots, degree, t0, t1, tol)
    pts = np.asarray(evaluate(params))
    eps = 1e-7 * (t1 - t0)
    ends = np.asarray(evaluate(np.array([t0, t0 + eps, t1 - eps, t1])))
    tangents = None
    if np.hypot(*(ends[1] - ends[0])) > 0 and np.hypot(*(ends[3] - ends[2])) > 0:
        tangents = (_unit(ends[1] - ends[0]), _unit(ends[3] - ends[2]))
    return _tuple(pts), tangents


def _bspline_params(curve, knots: np.ndarray, degree: int, t0: float, t1: float, tol: float) -> np.ndarray:
    """Parameters of a non-rational spline: each knot span in equal steps by its own second-derivative bound."""
    if degree < 2:
        spans = np.unique(knots[(knots >= t0) & (knots <= t1)])
        return spans
    second = curve.derivative(2)
    c2, t2, k2 = np.asarray(second.c), np.asarray(second.t), second.k
    params: list[float] = [t0]
    for j in range(k2, len(t2) - k2 - 1):
        a, b = max(float(t2[j]), t0), min(float(t2[j + 1]), t1)
        if b <= a:
            continue
        active = c2[max(0, j - k2): j + 1]
        bound = float(np.max(np.hypot(*active[:, :2].T))) if len(active) else 0.0
        n = steps_for_bound(b - a, bound, tol)
        params.extend(np.linspace(a, b, n + 1)[1:])
    out = np.unique(np.asarray(params))
    _check_count(len(out))
    return out


def _adaptive_params(evaluate: Callable[[np.ndarray], np.ndarray], t0: float, t1: float, tol: float,
                     samples: int = 15, start_steps: int = 16) -> np.ndarray:
    """Parameters whose chords stay within ``tol`` of the curve, checked at ``samples`` points per chord."""
    done: list[float] = []
    todo = list(np.linspace(t0, t1, start_steps + 1))
    stack = [(todo[i], todo[i + 1]) for i in range(len(todo) - 2, -1, -1)]
    done.append(t0)
    while stack:
        a, b = stack.pop()
        inner = np.linspace(a, b, samples + 2)[1:-1]
        pa, pb = evaluate(np.array([a, b]))
        q = evaluate(inner)
        chord = pb - pa
        length = math.hypot(*chord)
        if length > 0:
            u = np.clip(((q - pa) @ chord) / length**2, 0.0, 1.0)
            gap = np.hypot(*(q - (pa + u[:, None] * chord)).T).max()
        else:
            gap = np.hypot(*(q - pa).T).max()
        if gap > tol and (b - a) > 1e-12 * (t1 - t0):
            mid = 0.5 * (a + b)
            stack.extend([(mid, b), (a, mid)])
            _check_count(len(done) + len(stack))
        else:
            done.append(b)
    return np.asarray(done)


def flatten_ellipse(centre: Sequence[float], major: Sequence[float], minor: Sequence[float], t0: float, t1: float,
                    tol: float = CHORD_TOL_MM) -> tuple[Points, tuple[Point, Point]]:
    """Points c + A·cos t + B·sin t for t from ``t0`` to ``t1`` (A, B the axis vectors), within ``tol``.

    ‖c″‖ = ‖A·cos t + B·sin t‖ ≤ max(‖A‖, ‖B‖) when A ⟂ B.
    """
    c, a_vec, b_vec = (np.asarray(v, dtype=float)[:2] for v in (centre, major, minor))
    bound = max(float(np.hypot(*a_vec)), float(np.hypot(*b_vec)))
    n = steps_for_bound(abs(t1 - t0), bound, tol)
    t = np.linspace(t0, t1, n + 1)
    pts = c + np.outer(np.cos(t), a_vec) + np.outer(np.sin(t), b_vec)
    sign = 1.0 if t1 >= t0 else -1.0
    d0 = sign * (-a_vec * math.sin(t0) + b_vec * math.cos(t0))
    d1 = sign * (-a_vec * math.sin(t1) + b_vec * math.cos(t1))
    return _tuple(pts), (_unit(d0), _unit(d1))


# -- edges -----------------------------------------------------------------------------


@dataclass(frozen=True)
class Edge:
    """One edge of a contour (mm): a line, a circular arc (kept as its ends and bulge) or a flattened curve."""

    kind: EdgeKind
    points: Points  # line: its two ends; arc and curve: flattened within CHORD_TOL_MM, ends exact
    bulge: float = 0.0  # arc only: tan(sweep/4), + counter-clockwise (DXF convention)
    layer: str = ""  # the drawing layer the edge came from ("" where a source has none)
    origin: str = ""  # where it came from: "LINE #2A", "path command 3 (A)", "points[4]"
    tangents: tuple[Point, Point] | None = None  # curve only: unit tangents at its start and end

    @property
    def start(self) -> Point:
        return self.points[0]

    @property
    def end(self) -> Point:
        return self.points[-1]

    @property
    def centre(self) -> Point:
        return bulge_arc(self.start, self.end, self.bulge)[0]

    @property
    def radius(self) -> float:
        return bulge_arc(self.start, self.end, self.bulge)[1]

    @property
    def sweep(self) -> float:
        """Included angle of an arc (rad, + counter-clockwise); 0 for other edges."""
        return 4.0 * math.atan(self.bulge) if self.kind == "arc" else 0.0

    @property
    def length(self) -> float:
        """Exact for lines and arcs (r·|θ|), the flattened length for curves (mm)."""
        if self.kind == "line":
            return math.dist(self.start, self.end)
        if self.kind == "arc":
            return self.radius * abs(self.sweep)
        return polyline_length(self.points)

    def start_tangent(self) -> Point:
        """Unit direction of travel where the edge starts."""
        if self.kind == "curve" and self.tangents is not None:
            return self.tangents[0]
        if self.kind == "arc":
            return _rotate(_unit(np.subtract(self.end, self.start)), -self.sweep / 2.0)
        return _unit(np.subtract(self.points[1], self.points[0]))

    def end_tangent(self) -> Point:
        """Unit direction of travel where the edge ends."""
        if self.kind == "curve" and self.tangents is not None:
            return self.tangents[1]
        if self.kind == "arc":
            return _rotate(_unit(np.subtract(self.end, self.start)), self.sweep / 2.0)
        return _unit(np.subtract(self.points[-1], self.points[-2]))

    def reversed(self) -> Edge:
        tangents = None if self.tangents is None else (_neg(self.tangents[1]), _neg(self.tangents[0]))
        return replace(self, points=self.points[::-1], bulge=-self.bulge, tangents=tangents)

    def with_ends(self, start: Point, end: Point, tol: float = CHORD_TOL_MM) -> Edge:
        """The same edge with its end points moved (by a join tolerance at most) to ``start`` and ``end``."""
        if self.kind == "line":
            return replace(self, points=(start, end))
        if self.kind == "arc":
            return replace(self, points=arc_points(start, end, self.bulge, tol))
        return replace(self, points=(start, *self.points[1:-1], end))

    def area_term(self) -> float:
        """This edge's share of a closed contour's signed area: ½∮(x dy − y dx) along it (exact for arcs)."""
        if self.kind == "curve":
            p = np.asarray(self.points)
            return 0.5 * float(np.sum(p[:-1, 0] * p[1:, 1] - p[1:, 0] * p[:-1, 1]))
        (ax, ay), (bx, by) = self.start, self.end
        term = 0.5 * (ax * by - bx * ay)
        if self.kind == "arc":
            r, sweep = self.radius, self.sweep
            term += 0.5 * r * r * (sweep - math.sin(sweep))  # the circular segment between chord and arc
        return term


def line_edge(a: Sequence[float], b: Sequence[float], layer: str = "", origin: str = "") -> Edge:
    _check_points((a, b))
    return Edge("line", ((float(a[0]), float(a[1])), (float(b[0]), float(b[1]))), layer=layer, origin=origin)


def arc_edge(a: Sequence[float], b: Sequence[float], bulge: float, layer: str = "", origin: str = "",
             tol: float = CHORD_TOL_MM) -> Edge:
    return Edge("arc", arc_points(a, b, bulge, tol), bulge=float(bulge), layer=layer, origin=origin)


def curve_edge(points: Sequence[Sequence[float]], tangents: tuple[Point, Point] | None, layer: str = "",
               origin: str = "") -> Edge:
    _check_points(points)
    return Edge("curve", _tuple(np.asarray(points, dtype=float)), layer=layer, origin=origin, tangents=tangents)


def circle_edges(centre: Sequence[float], radius: float, layer: str = "", origin: str = "",
                 tol: float = CHORD_TOL_MM) -> tuple[Edge, Edge]:
    """A full circle as two counter-clockwise half arcs (bulge 1), starting at angle 0."""
    cx, cy = float(centre[0]), float(centre[1])
    a, b = (cx + radius, cy), (cx - radius, cy)
    return arc_edge(a, b, 1.0, layer, origin, tol), arc_edge(b, a, 1.0, layer, origin, tol)


def split_edge(edge: Edge, point: Sequence[float], tol: float = CHORD_TOL_MM) -> tuple[Edge, Edge]:
    """``edge`` split at the point on it nearest ``point``; for an arc the split point is put on the true arc."""
    if edge.kind == "line":
        (ax, ay), (bx, by) = edge.start, edge.end
        dx, dy = bx - ax, by - ay
        u = ((point[0] - ax) * dx + (point[1] - ay) * dy) / (dx * dx + dy * dy)
        p = (ax + u * dx, ay + u * dy)
        return replace(edge, points=(edge.start, p)), replace(edge, points=(p, edge.end))
    if edge.kind == "arc":
        (cx, cy), r, sweep = bulge_arc(edge.start, edge.end, edge.bulge)
        start = math.atan2(edge.start[1] - cy, edge.start[0] - cx)
        angle = math.atan2(point[1] - cy, point[0] - cx)
        part = (angle - start) % (2 * math.pi) if sweep > 0 else -((start - angle) % (2 * math.pi))
        part = min(max(part, min(0.0, sweep)), max(0.0, sweep))
        p = (cx + r * math.cos(start + part), cy + r * math.sin(start + part))
        return (arc_edge(edge.start, p, math.tan(part / 4.0), edge.layer, edge.origin, tol),
                arc_edge(p, edge.end, math.tan((sweep - part) / 4.0), edge.layer, edge.origin, tol))
    pts = np.asarray(edge.points)
    seg = pts[1:] - pts[:-1]
    rel = np.asarray(point, dtype=float) - pts[:-1]
    u = np.clip(np.einsum("ij,ij->i", rel, seg) / np.maximum(np.einsum("ij,ij->i", seg, seg), 1e-300), 0.0, 1.0)
    foot = pts[:-1] + u[:, None] * seg
    i = int(np.argmin(np.hypot(*(foot - np.asarray(point, dtype=float)[None, :]).T)))
    p = foot[i]
    tangent = _unit(seg[i])
    head = np.vstack([pts[: i + 1], p])
    tail = np.vstack([p, pts[i + 1:]])
    first_t = edge.tangents[0] if edge.tangents else _unit(seg[0])
    last_t = edge.tangents[1] if edge.tangents else _unit(seg[-1])
    return (replace(edge, points=_tuple(_dedupe(head)), tangents=(first_t, tangent)),
            replace(edge, points=_tuple(_dedupe(tail)), tangents=(tangent, last_t)))


# -- contours --------------------------------------------------------------------------


@dataclass(frozen=True)
class Contour:
    """A closed chain of edges: each edge ends where the next starts, the last where the first starts."""

    edges: tuple[Edge, ...]

    @property
    def points(self) -> Points:
        """The flattened loop, without repeating its first point."""
        return tuple(p for e in self.edges for p in e.points[:-1])

    @property
    def area(self) -> float:
        """Signed area (mm², + counter-clockwise), exact for line and arc edges."""
        return float(sum(e.area_term() for e in self.edges))

    @property
    def length(self) -> float:
        """Perimeter (mm), exact for line and arc edges."""
        return float(sum(e.length for e in self.edges))

    @property
    def is_ccw(self) -> bool:
        return self.area > 0.0

    @property
    def layers(self) -> tuple[str, ...]:
        return tuple(dict.fromkeys(e.layer for e in self.edges))

    @property
    def origins(self) -> tuple[str, ...]:
        return tuple(dict.fromkeys(e.origin for e in self.edges if e.origin))

    @property
    def circle(self) -> tuple[float, float, float] | None:
        """Centre x, y and diameter (mm) when the contour is one full circle of arcs, else None."""
        if not self.edges or any(e.kind != "arc" for e in self.edges):
            return None
        (cx, cy), r, _ = bulge_arc(self.edges[0].start, self.edges[0].end, self.edges[0].bulge)
        for e in self.edges[1:]:
            (x, y), rr, _ = bulge_arc(e.start, e.end, e.bulge)
            if math.hypot(x - cx, y - cy) > 1e-6 * max(r, 1.0) or abs(rr - r) > 1e-6 * max(r, 1.0):
                return None
        turn = sum(e.sweep for e in self.edges)
        if abs(abs(turn) - 2 * math.pi) > 1e-6:
            return None
        return cx, cy, 2.0 * r

    def reversed(self) -> Contour:
        return Contour(tuple(e.reversed() for e in reversed(self.edges)))

    def oriented(self, ccw: bool) -> Contour:
        return self if self.is_ccw == ccw else self.reversed()

    def starting_at(self, index: int) -> Contour:
        n = len(self.edges)
        return Contour(tuple(self.edges[(index + k) % n] for k in range(n)))

    def edge_offsets(self) -> np.ndarray:
        """Arc length along the flattened loop where each edge starts, and the total at the end (mm)."""
        lengths = [polyline_length(e.points) for e in self.edges]
        return np.concatenate([[0.0], np.cumsum(lengths)])

    def polygon(self) -> Polygon:
        return Polygon(self.points)


# -- joining open edges into closed contours -------------------------------------------


def join_edges(edges: Sequence[Edge], tol: float, place: Place) -> list[Contour]:
    """Chain open edges end to end into closed contours; ends closer than ``tol`` (mm) are joined.

    Raises :class:`DrawingError` naming every gap (each open chain's free ends, with the nearest other free
    end and its distance) and every point where three or more edge ends meet.
    """
    pool = [e for e in edges if polyline_length(e.points) > tol]  # specks shorter than the tolerance are dropped
    if not pool:
        return []
    ends = np.array([[*e.start, *e.end] for e in pool], dtype=float)
    used = np.zeros(len(pool), dtype=bool)
    contours: list[Contour] = []
    open_chains: list[list[Edge]] = []
    branches: list[str] = []

    def candidates(p: Point) -> list[tuple[int, bool]]:
        d_start = np.hypot(ends[:, 0] - p[0], ends[:, 1] - p[1])
        d_end = np.hypot(ends[:, 2] - p[0], ends[:, 3] - p[1])
        found = [(int(i), False) for i in np.nonzero((d_start <= tol) & ~used)[0]]
        found += [(int(i), True) for i in np.nonzero((d_end <= tol) & ~used)[0]]
        return found

    for first in range(len(pool)):
        if used[first]:
            continue
        used[first] = True
        chain = [pool[first]]
        if math.dist(chain[0].start, chain[0].end) <= tol:  # one edge that closes on itself
            edge = chain[0]
            closed_edges = (circle_edges(edge.centre, edge.radius, edge.layer, edge.origin) if edge.kind == "arc"
                            else (edge.with_ends(edge.start, edge.start),))
            contours.append(Contour(tuple(closed_edges)))
            continue
        closed = False
        for direction in (0, 1):
            while True:
                tip = chain[-1].end
                found = candidates(tip)
                closes = math.dist(tip, chain[0].start) <= tol
                if len(found) + (1 if closes else 0) > 1:
                    names = [chain[-1].origin] + [pool[i].origin for i, _ in found]
                    if closes:
                        names.append(chain[0].origin)
                    listed = ", ".join(n for n in names if n)
                    branches.append(f"{len(names)} edge ends meet at {place.at(tip)} ({listed})")
                    found = found[:1] if not closes else []
                if closes and not found:
                    closed = True
                    break
                if not found:
                    break
                index, flip = found[0]
                used[index] = True
                edge = pool[index].reversed() if flip else pool[index]
                chain.append(edge.with_ends(tip, edge.end))
            if closed:
                break
            if direction == 0:  # extend the other way from the first edge
                chain = [e.reversed() for e in reversed(chain)]
        if closed:
            chain[-1] = chain[-1].with_ends(chain[-1].start, chain[0].start)
            contours.append(Contour(tuple(chain)))
        else:
            open_chains.append(chain)
    problems = []
    if branches:
        problems.append("the outline branches: " + "; ".join(branches[:5]) +
                        (f"; and {len(branches) - 5} more" if len(branches) > 5 else "") +
                        " (a contour must run through each point once: remove duplicate or overlapping edges)")
    if open_chains:
        problems.append(_gap_message(open_chains, tol, place))
    if problems:
        raise DrawingError(f"{place.source}: " + "; ".join(problems))
    return contours


def _gap_message(chains: list[list[Edge]], tol: float, place: Place) -> str:
    free = [(c[0].start, c[0].origin) for c in chains] + [(c[-1].end, c[-1].origin) for c in chains]

    def named(p: Point, origin: str) -> str:
        return f"{place.at(p)} ({origin})" if origin else place.at(p)

    def nearest(p: Point) -> tuple[float, Point, str] | None:
        others = [(math.dist(p, q), q, o) for q, o in free if q is not p]
        return min(others, key=lambda x: x[0]) if others else None

    lines = []
    for chain in chains[:5]:
        (a, oa), (b, ob) = (chain[0].start, chain[0].origin), (chain[-1].end, chain[-1].origin)
        names = contour_names(Contour(tuple(chain)))
        head = f"the chain of {len(chain)} edge(s){f' [{names}]' if names else ''}"
        near_a, near_b = nearest(a), nearest(b)
        if near_a is not None and near_a[1] is b and near_b is not None and near_b[1] is a:
            lines.append(f"{head} stops at {named(a, oa)} and {named(b, ob)}, {place.length(near_a[0])} apart")
            continue
        ends = []
        for p, o, near in ((a, oa, near_a), (b, ob, near_b)):
            gap = f", {place.length(near[0])} from the nearest free end {named(near[1], near[2])}" if near else ""
            ends.append(named(p, o) + gap)
        lines.append(f"{head} stops at {ends[0]}; and at {ends[1]}")
    more = f"; and {len(chains) - 5} more open chains" if len(chains) > 5 else ""
    return (f"the outline is not closed (edge ends are joined within {place.length(tol)}): "
            + "; ".join(lines) + more)


# -- checks ------------------------------------------------------------------------------

_AT = re.compile(r"\[\s*([-+0-9.eE]+)\s+([-+0-9.eE]+)\s*\]")


def check_contour(contour: Contour, place: Place, what: str = "contour") -> None:
    """A contour that encloses area and does not cross or touch itself; else :class:`DrawingError` naming where."""
    label = f"{what} [{contour_names(contour)}]" if contour.origins else what
    xy = np.asarray(contour.points, dtype=float)
    span = float(np.max(xy.max(axis=0) - xy.min(axis=0))) if len(xy) else 0.0
    if span > MAX_SPAN_MM:
        raise DrawingError(f"{place.source}: {label} spans {place.length(span)}, more than the {MAX_SPAN_MM:.0f} mm a "
                           "part formed in a shop press could be (are the drawing's units right?)")
    length = contour.length
    ring = LinearRing(contour.points) if len(contour.points) >= 3 else None
    enclosed = 0.0 if ring is None else float(shapely.make_valid(Polygon(ring)).area)
    if enclosed <= CHORD_TOL_MM * length:
        raise DrawingError(f"{place.source}: {label} encloses no area ({enclosed:.3g} mm² inside "
                           f"{place.length(length)} of edge): a zero-area contour (lines drawn out and back?) "
                           "is not an outline")
    if not ring.is_simple:
        where = _crossing(ring)
        near = _edges_near(contour, where)
        raise DrawingError(f"{place.source}: {label} crosses or touches itself at {place.at(where)}"
                           f"{f' (edges {near})' if near else ''}: an outline must be one simple loop")


def contour_names(contour: Contour, most: int = 4) -> str:
    """The drawing entities a contour is made of (``LINE #2A, ARC #2B, ...``), for messages."""
    names = list(dict.fromkeys(o.split(" segment ")[0] for o in contour.origins))
    return ", ".join(names[:most]) + (f", and {len(names) - most} more" if len(names) > most else "")


def _crossing(ring: LinearRing) -> Point:
    reason = shapely.is_valid_reason(Polygon(ring))
    match = _AT.search(reason)
    if match:
        return float(match.group(1)), float(match.group(2))
    # a ring that is valid as a polygon but not simple: find the first pair of touching segments
    pts = np.asarray(ring.coords)
    segs = shapely.linestrings(np.stack([pts[:-1], pts[1:]], axis=1))
    tree = shapely.STRtree(segs)
    n = len(segs)
    for i, j in zip(*tree.query(segs, predicate="intersects")):
        if i < j and j - i not in (1, n - 1):
            p = shapely.intersection(segs[i], segs[j])
            x, y = shapely.get_coordinates(p)[0]
            return float(x), float(y)
    return float(pts[0, 0]), float(pts[0, 1])


def _edges_near(contour: Contour, p: Point, limit: float = 10 * CHORD_TOL_MM) -> str:
    pt = shapely.Point(p)
    near = [e.origin for e in contour.edges if e.origin and shapely.LineString(e.points).distance(pt) <= limit]
    return ", ".join(dict.fromkeys(near))


# -- small helpers ---------------------------------------------------------------------


def _unit(v: Sequence[float]) -> Point:
    x, y = float(v[0]), float(v[1])
    n = math.hypot(x, y)
    return (x / n, y / n) if n > 0 else (0.0, 0.0)


def _neg(v: Point) -> Point:
    return (-v[0], -v[1])


def _rotate(v: Point, angle: float) -> Point:
    c, s = math.cos(angle), math.sin(angle)
    return (c * v[0] - s * v[1], s * v[0] + c * v[1])


def _dedupe(pts: np.ndarray) -> np.ndarray:
    keep = np.concatenate([[True], np.hypot(*np.diff(pts, axis=0).T) > 0.0])
    return pts[keep]


def _tuple(pts: np.ndarray) -> Points:
    return tuple((float(x), float(y)) for x, y in np.asarray(pts, dtype=float))
