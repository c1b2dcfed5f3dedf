"""Smooth model of the die outline and its exact inward normal offsets (no kernel).

Each "curve" run is interpolated by a cubic spline through its points
(parameter = cumulative chord length, mm); each "line" run is one straight
edge per pair of consecutive points.  The offset of a section at inset ``u``
moves every point along the inward normal (exact normal offset); at each
junction between segments the two offset segments are trimmed (or, for a
tangent-continuous junction, met) at their intersection, found by Newton's
method.  Every section therefore has the same sequence of segments, and each
curve segment is sampled at the same parameter fractions, so the lofted
sections match edge to edge and point to point.

Flutes split their curve segment at their lips into separate edges ("spans")
in every section; within a flute the offset goes deeper by the flute's
circular segment, scaled by the section's ``flute_scale`` (0 at the top face,
1 from the flange edge down).  A flute whose lip would reach into a corner
trim is moved along the curve just clear of it.

Checks made here raise :class:`diegen.errors.GeometryError` with the place
(x, y in mm) and what to change: an open or clockwise loop, a concave spot
tighter than the router cutter radius, a convex spot tighter than the largest
inset, an offset that crosses itself (a piece too thin for its wall), and a
flute that is too deep for its width, on a straight edge, or crowding another.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
from shapely.geometry import Polygon
from shapely.validation import explain_validity

from diegen.die.die_input import DieFlute, DieRun, RunKind
from diegen.errors import GeometryError
from diegen.forming.relief import flute_arc_radius
from diegen.geometry.loops import FloatArray
from diegen.geometry.section import Cubic

__all__ = [
    "CONCAVE_JUNCTION_DEG",
    "GROOVE_SAMPLES",
    "JOIN_TOL_MM",
    "LIP_CLEARANCE_MM",
    "MAX_EXTENSION_MM",
    "MIN_GROOVE_GAP_MM",
    "CurveSegment",
    "OffsetPiece",
    "OutlineModel",
    "pieces_to_polygon",
]

JOIN_TOL_MM = 1e-6  # consecutive runs must share end points to this distance
CONCAVE_JUNCTION_DEG = 0.5  # a sharper concave turn at a run junction is a corner no cutter can make
MAX_EXTENSION_MM = 0.05  # how far a segment may be extended past its end to meet its neighbour
GROOVE_SAMPLES = 25  # samples across a flute: the spline then follows its arc within 1e-5 mm (h⁴/384r³)
MIN_GROOVE_GAP_MM = 0.2  # least land left between two flutes' lips (design choice: a thinner fin will not sew)
LIP_CLEARANCE_MM = 0.5  # least wall between a flute's lip and a corner trim (design choice)
SMOOTH_JUNCTION_DEG = 1.0  # edges meeting at a smaller turn run on into each other (no corner)
VARYING_STEP_MM = 2.0  # longest sample step where the wall's inset changes along the outline
RADIUS_TOL_MM = 1e-3  # a curve this much tighter than the tool's radius is the same curve (a micrometre is no shape)
MITRE_REACH = 4.0  # a straight edge may be extended this many times a wall's outward lean to meet its neighbour

#: (inset, d inset / d s, depth) in mm at positions along the outline model's parameter
WallValues = Callable[[FloatArray], tuple[FloatArray, FloatArray, FloatArray]]


def _rot90(v: FloatArray) -> FloatArray:
    """Rotate vectors by +90° (the inward normal of a counter-clockwise loop)."""
    return np.stack([-v[..., 1], v[..., 0]], axis=-1)


class _Segment:
    """One edge of the outline model; parameter ``s`` in mm from 0 to ``length``."""

    kind: RunKind
    length: float

    def point(self, s: FloatArray | float, inset: float) -> FloatArray:  # pragma: no cover - interface
        raise NotImplementedError

    def deriv(self, s: FloatArray | float, inset: float) -> FloatArray:  # pragma: no cover - interface
        raise NotImplementedError

    def point_and_deriv(self, s: float, inset: float) -> tuple[FloatArray, FloatArray]:
        """``point`` and ``deriv`` at one parameter (what a Newton step at a junction needs)."""
        return self.point(s, inset), self.deriv(s, inset)


class _LineSegment(_Segment):
    def __init__(self, a: FloatArray, b: FloatArray) -> None:
        self.kind = "line"
        self.a = a
        self.length = float(np.linalg.norm(b - a))
        self.t = (b - a) / self.length
        self.n = _rot90(self.t)

    def point(self, s: FloatArray | float, inset: float) -> FloatArray:
        s = np.asarray(s, dtype=float)
        return self.a + s[..., None] * self.t + inset * self.n

    def deriv(self, s: FloatArray | float, inset: float) -> FloatArray:
        s = np.asarray(s, dtype=float)
        return np.broadcast_to(self.t, (*s.shape, 2)).copy()

    def tangent(self, s: FloatArray | float) -> FloatArray:
        return self.deriv(s, 0.0)


class CurveSegment(_Segment):
    def __init__(self, pts: FloatArray, periodic: bool) -> None:
        self.kind = "curve"
        chord = np.linalg.norm(np.diff(pts, axis=0), axis=1)
        if np.any(chord < 1e-9):
            i = int(np.argmin(chord))
            raise GeometryError(
                f"outline curve has two coincident points at ({pts[i, 0]:.3f}, {pts[i, 1]:.3f}) mm: "
                "remove the duplicate"
            )
        u = np.concatenate([[0.0], np.cumsum(chord)])
        self.length = float(u[-1])
        self.spline = Cubic(u, pts, periodic=periodic)  # not-a-knot (or periodic) cubic through the points

    def d1(self, s: FloatArray | float) -> FloatArray:
        return self.spline(s, 1)

    def d2(self, s: FloatArray | float) -> FloatArray:
        return self.spline(s, 2)

    def base(self, s: FloatArray | float) -> FloatArray:
        return np.asarray(self.spline(s))

    def tangent(self, s: FloatArray | float) -> FloatArray:
        d = np.asarray(self.d1(s))
        return d / np.linalg.norm(d, axis=-1, keepdims=True)

    def curvature(self, s: FloatArray | float) -> FloatArray:
        """Signed curvature (1/mm), positive where the loop turns left (convex)."""
        d = np.asarray(self.d1(s))
        dd = np.asarray(self.d2(s))
        cross = d[..., 0] * dd[..., 1] - d[..., 1] * dd[..., 0]
        return cross / np.linalg.norm(d, axis=-1) ** 3

    def point(self, s: FloatArray | float, inset: float) -> FloatArray:
        base, d, _ = self.spline.with_derivatives(s)  # base(s) + inset · rot90(tangent(s)), one spline evaluation
        return base + inset * _rot90(d / np.linalg.norm(d, axis=-1, keepdims=True))

    def deriv(self, s: FloatArray | float, inset: float) -> FloatArray:
        d = np.asarray(self.d1(s))
        k = self.curvature(s)[..., None]
        return d * (1.0 - inset * k)

    def point_and_deriv(self, s: float, inset: float) -> tuple[FloatArray, FloatArray]:
        # the same expressions as point and deriv, from one evaluation of the spline
        base, d, dd = self.spline.with_derivatives(s)
        norm = np.linalg.norm(d, axis=-1)
        point = base + inset * _rot90(d / norm[..., None])
        k = (d[..., 0] * dd[..., 1] - d[..., 1] * dd[..., 0]) / norm ** 3
        return point, d * (1.0 - inset * k[..., None])


@dataclass(frozen=True)
class OffsetPiece:
    """One edge of an offset section: its kind, its points (mm) and their spline parameters.

    A "line" piece has its two end points; a "curve" piece its samples, to be
    interpolated at ``params`` (fractions from 0 to 1, the same for every
    section, so lofted sections match point to point).  ``closed``: the piece
    is the whole loop (first point repeated at the end), to be interpolated
    as a periodic curve.
    """

    kind: RunKind
    points: tuple[tuple[float, float], ...]
    params: tuple[float, ...] | None = None
    closed: bool = False
    depths: tuple[float, ...] | None = None  # each point's depth below the top face (None: the section's own)


@dataclass(frozen=True)
class _Groove:
    """A flute placed on a curve segment: centre parameter (mm), full-depth circle radius r and depth D (mm).

    The lips lie at parameters ``s_mid ± r·sin φ0`` (= ± half the width);
    ``half_angle`` is φ0, half the angle the full-depth arc subtends at its centre.
    """

    segment: int
    s_mid: float
    radius: float
    depth: float
    half_angle: float
    # the die's flute length over this flute's own (1: the die's): its taper reaches full depth that much sooner
    taper_ratio: float = 1.0

    @property
    def half_width(self) -> float:
        return self.radius * math.sin(self.half_angle)


@dataclass(frozen=True)
class _Span:
    """One edge of every section: a line segment, a stretch of a curve segment, or a groove.

    ``s0``, ``s1``: nominal parameter range on the segment (mm; beyond the
    length for the stretch of a closed curve that passes its start);
    ``trim_start``/``trim_stop``: the end meets the next segment and is moved
    to the offsets' intersection; ``fractions``: where to sample it.
    """

    segment: int
    kind: str  # "line", "curve" or "groove"
    s0: float
    s1: float
    fractions: FloatArray
    trim_start: bool = False
    trim_stop: bool = False
    groove: _Groove | None = None
    varying: bool = False  # the wall's inset changes along it (a line span is then sampled as a curve)


class OutlineModel:
    """The die outline as segments, with exact inward offsets and optional flutes.

    ``max_inset_mm`` is the largest inset any section will use (mm); convex
    curves must be rounder than it.  ``sample_tol_mm`` is the allowed deviation
    of a section's interpolating spline from the exact offset (mm) and
    ``max_spacing_mm`` the longest gap between samples.  ``flutes`` are grooves
    in the wall (see :meth:`offset`); each must lie on a curve, clear of
    corners and of the other flutes.
    """

    def __init__(self, runs: tuple[DieRun, ...], cutter_radius_mm: float, max_inset_mm: float,
                 sample_tol_mm: float = 0.001, max_spacing_mm: float = 6.0, flutes: Sequence[DieFlute] = (),
                 limit_text: str | None = None, min_land_mm: float = MIN_GROOVE_GAP_MM,
                 flute_length_mm: float = 0.0, max_outset_mm: float = 0.0,
                 varying_mm: Sequence[tuple[float, float]] = ()) -> None:
        self.cutter_radius_mm = cutter_radius_mm
        self.limit_text = limit_text or f"the router cutter radius {cutter_radius_mm:g} mm"
        self.min_land_mm = max(min_land_mm, MIN_GROOVE_GAP_MM)
        self.max_inset_mm = max_inset_mm
        self.max_outset_mm = max_outset_mm
        self.varying_mm = tuple(varying_mm)
        self.sample_tol_mm = sample_tol_mm
        self.max_spacing_mm = max_spacing_mm
        self.segments: list[_Segment] = []
        self.periodic = False
        self._corner_cache: dict[float, tuple[list[float], list[float], dict[int, FloatArray]]] = {}
        self._offset_cache: dict[tuple[float, float | None, float], tuple[OffsetPiece, ...]] = {}
        self._build(runs)
        self.segment_starts = np.concatenate([[0.0], np.cumsum([seg.length for seg in self.segments])])
        self._check_loop()
        self._check_curvature()
        self._lip_ranges: dict[int, tuple[float, float]] = {}
        self.flute_length_mm = flute_length_mm
        self.grooves = self._place_grooves(flutes)
        self.spans = self._plan_spans()

    # -- construction and checks ------------------------------------------------
    def _build(self, runs: tuple[DieRun, ...]) -> None:
        if not runs:
            raise GeometryError("die outline is empty: give at least one run")
        arrays = []
        for i, run in enumerate(runs):
            if run.kind not in ("curve", "line"):
                raise GeometryError(f"outline run {i}: kind {run.kind!r} is not one of 'curve', 'line'")
            pts = np.asarray(run.points, dtype=float)
            if pts.ndim != 2 or pts.shape[1] != 2 or len(pts) < 2:
                raise GeometryError(f"outline run {i}: needs at least two (x, y) points")
            if not np.all(np.isfinite(pts)):
                raise GeometryError(f"outline run {i}: has a point that is not a finite number")
            arrays.append(pts)
        for i, pts in enumerate(arrays):
            nxt = arrays[(i + 1) % len(arrays)]
            gap = float(np.linalg.norm(pts[-1] - nxt[0]))
            if gap > JOIN_TOL_MM:
                raise GeometryError(
                    f"outline run {i} ends at ({pts[-1, 0]:.3f}, {pts[-1, 1]:.3f}) mm but the next run starts "
                    f"{gap:.3f} mm away: consecutive runs must share end points and close the loop"
                )
        if len(runs) == 1 and runs[0].kind == "curve":
            self.periodic = True
            self.segments.append(CurveSegment(arrays[0], periodic=True))
            return
        for run, pts in zip(runs, arrays):
            if run.kind == "curve":
                self.segments.append(CurveSegment(pts, periodic=False))
            else:
                for a, b in itertools.pairwise(pts):
                    if np.linalg.norm(b - a) < 1e-6:
                        raise GeometryError(f"outline line run has a zero-length edge at ({a[0]:.3f}, {a[1]:.3f}) mm")
                    self.segments.append(_LineSegment(a, b))
        if len(self.segments) < 2 and self.segments[0].kind == "line":
            raise GeometryError("die outline of a single straight edge encloses nothing")

    def _check_loop(self) -> None:
        ring = self.dense_base()
        poly = Polygon(ring)
        if not poly.is_valid:
            raise GeometryError(f"die outline crosses itself: {explain_validity(poly)}: check the section's "
                                "coordinates and the spar caps (a joggle deeper than the section?)")
        if not poly.exterior.is_ccw:
            raise GeometryError("die outline runs clockwise: list the runs counter-clockwise (interior on the left)")
        # junction turns
        n = len(self.segments)
        for i in range(n if not self.periodic else 0):
            a, b = self.segments[i], self.segments[(i + 1) % n]
            ta = a.tangent(a.length)
            tb = b.tangent(0.0)
            cross = float(ta[0] * tb[1] - ta[1] * tb[0])
            turn = math.degrees(math.atan2(cross, float(np.dot(ta, tb))))
            if turn < -CONCAVE_JUNCTION_DEG:
                p = a.point(a.length, 0.0)
                raise GeometryError(
                    f"sharp inside corner ({-turn:.1f}°) in the die outline at ({p[0]:.2f}, {p[1]:.2f}) mm: "
                    f"{self.limit_text} cannot make it; round it to at least that radius"
                )

    def _check_curvature(self) -> None:
        for seg in self.segments:
            if not isinstance(seg, CurveSegment):
                continue
            s = np.linspace(0.0, seg.length, max(16, int(seg.length / 0.2) + 1))
            k = seg.curvature(s)
            i = int(np.argmin(k))
            if k[i] < 0 and 1.0 / -k[i] < self.cutter_radius_mm - RADIUS_TOL_MM:
                p = seg.base(s[i])
                raise GeometryError(
                    f"inside curve of radius {1.0 / -k[i]:.3f} mm in the die outline at ({p[0]:.2f}, {p[1]:.2f}) mm "
                    f"is tighter than {self.limit_text}: round it to at least that, or use a smaller cutter"
                )
            i = int(np.argmin(k))
            if self.max_outset_mm > 0 and k[i] < 0 and 1.0 / -k[i] < self.max_outset_mm + 0.05:
                p = seg.base(s[i])
                raise GeometryError(
                    f"inside curve of radius {1.0 / -k[i]:.2f} mm in the die outline at ({p[0]:.2f}, {p[1]:.2f}) mm "
                    f"is tighter than the {self.max_outset_mm:.2f} mm the die's wall leans out at its foot (under "
                    "a flange bent through less than 90°): round it to a larger radius, use lower die stock, or "
                    "give the flange there a larger angle")
            i = int(np.argmax(k))
            if k[i] > 0 and 1.0 / k[i] < self.max_inset_mm + 0.05:
                p = seg.base(s[i])
                raise GeometryError(
                    f"outside curve of radius {1.0 / k[i]:.2f} mm in the die outline at ({p[0]:.2f}, {p[1]:.2f}) mm "
                    f"is tighter than the die's top-edge setback {self.max_inset_mm:.2f} mm: round it to a larger "
                    "radius, lower the top radius, or start a new run at a true corner"
                )

    def _fractions(self, seg: CurveSegment, s0: float, s1: float) -> FloatArray:
        """Sample fractions of the stretch ``s0``–``s1`` of a curve segment, denser where it is curved.

        Spacing h from the cubic-interpolation error bound of a circle,
        h⁴/(384·ρ³) ≤ tol/8: the bound ignores the change of curvature, and on
        an airfoil nose the measured deviation was about 6–8× the bound, hence
        the factor 8.
        """
        length = s1 - s0
        s = np.linspace(s0, s1, max(32, int(length / 0.25) + 1))
        rho = 1.0 / np.maximum(np.abs(seg.curvature(s)), 1e-9)
        h = np.clip((384.0 * self.sample_tol_mm / 8.0 * rho**3) ** 0.25, 0.25, self.max_spacing_mm)
        density = np.concatenate([[0.0], np.cumsum(0.5 * (1 / h[1:] + 1 / h[:-1]) * np.diff(s))])
        count = max(4, math.ceil(density[-1]) + 1)
        targets = np.linspace(0.0, density[-1], count)
        return (np.interp(targets, density, s) - s0) / length

    def _lip_range(self, index: int) -> tuple[float, float]:
        """Parameters (mm) between which a flute's lips may lie on segment ``index``: clear of the corner trims.

        Every section's curve is trimmed at its corners where it meets the
        next segment's offset; the trim grows with the inset, so the sections
        at ``max_inset_mm`` fix the range (less ``LIP_CLEARANCE_MM``).
        """
        seg = self.segments[index]
        if self.periodic:
            return -math.inf, math.inf
        if index not in self._lip_ranges:
            n = len(self.segments)
            lo = max(0.0, self._junction(self.segments[index - 1], seg, self.max_inset_mm)[1])
            hi = min(seg.length, self._junction(seg, self.segments[(index + 1) % n], self.max_inset_mm)[0])
            self._lip_ranges[index] = (lo + LIP_CLEARANCE_MM, hi - LIP_CLEARANCE_MM)
        return self._lip_ranges[index]

    def _place_grooves(self, flutes: Sequence[DieFlute]) -> list[_Groove]:
        """Flutes as grooves on their curve segments; raise :class:`GeometryError` for one that cannot be cut.

        A flute whose lip would reach into a corner trim is moved along the
        flange just clear of it (a few millimetres at most).
        """
        grooves = []
        for flute in flutes:
            name = f"flute at s = {flute.s_mm:g} mm"
            if not (flute.width_mm > 0 and flute.depth_mm > 0):
                raise GeometryError(f"{name}: width and depth must be positive")
            if flute.depth_mm > flute.width_mm / 2.0 + 1e-9:
                raise GeometryError(
                    f"{name} is {flute.depth_mm:g} mm deep but only {flute.width_mm:g} mm wide: a groove deeper "
                    "than half its width cannot be cut from the side; widen it or make it shallower")
            if not 0.0 <= flute.s_mm < self.perimeter_mm:
                raise GeometryError(f"{name} lies outside the outline (length {self.perimeter_mm:.1f} mm)")
            index, s_mid = self._param_at(flute.s_mm)
            seg = self.segments[index]
            where = seg.point(s_mid, 0.0)
            if not isinstance(seg, CurveSegment):
                raise GeometryError(
                    f"{name} at ({where[0]:.1f}, {where[1]:.1f}) mm lies on a straight end face: flutes go on the "
                    "curved flange")
            depth = min(flute.depth_mm, flute.width_mm / 2.0)
            radius = flute_arc_radius(flute.width_mm, depth)
            half_angle = math.asin(min(1.0, flute.width_mm / (2.0 * radius)))
            half_width = radius * math.sin(half_angle)
            lo, hi = self._lip_range(index)
            if hi - lo < 2.0 * half_width:
                raise GeometryError(
                    f"{name} at ({where[0]:.1f}, {where[1]:.1f}) mm is {flute.width_mm:g} mm wide, wider than the "
                    f"{max(hi - lo, 0.0):.1f} mm of curved wall between the corners: make it narrower")
            s_mid = min(max(s_mid, lo + half_width), hi - half_width)
            grooves.append(_Groove(index, s_mid, radius, depth, half_angle,
                                   flute_taper_ratio(self.flute_length_mm, flute)))
        grooves.sort(key=lambda g: (g.segment, g.s_mid))
        for a, b in zip(grooves, grooves[1:] + grooves[:1] if self.periodic else grooves[1:]):
            if a.segment != b.segment or (a is b):
                continue
            gap = (b.s_mid - a.s_mid) % self.segments[a.segment].length - a.half_width - b.half_width
            if gap < self.min_land_mm - 1e-9:
                where = self.segments[a.segment].point(a.s_mid, 0.0)
                raise GeometryError(
                    f"two flutes near ({where[0]:.1f}, {where[1]:.1f}) mm leave {gap:.2f} mm of wall between them "
                    f"(at least {self.min_land_mm:g} mm): space them further apart or make them narrower")
        return grooves

    def _varies(self, index: int, s0: float, s1: float) -> bool:
        """Whether the stretch ``s0``–``s1`` of segment ``index`` overlaps a stretch where the wall changes."""
        start, total = float(self.segment_starts[index]), float(self.segment_starts[-1])
        for lo, hi in self.varying_mm:
            for shift in (-total, 0.0, total):
                if start + s0 < hi + shift and lo + shift < start + s1:
                    return True
        return False

    def _plan_spans(self) -> list[_Span]:
        """The edges every section is made of, in loop order."""
        spans = self._plain_spans()
        if not self.varying_mm:
            return spans
        planned = []
        for span in spans:
            if span.kind == "groove" or not self._varies(span.segment, span.s0, span.s1):
                planned.append(span)
                continue
            length = span.s1 - span.s0
            even = np.linspace(0.0, 1.0, max(8, math.ceil(length / VARYING_STEP_MM) + 1))
            fr = even if span.kind == "line" else _merged(span.fractions, even, 0.25 * VARYING_STEP_MM / length)
            planned.append(_Span(span.segment, span.kind, span.s0, span.s1, fr, span.trim_start, span.trim_stop,
                                 varying=True))
        return planned

    def _plain_spans(self) -> list[_Span]:
        spans: list[_Span] = []
        for index, seg in enumerate(self.segments):
            if isinstance(seg, _LineSegment):
                spans.append(_Span(index, "line", 0.0, seg.length, np.array([0.0, 1.0]), True, True))
                continue
            assert isinstance(seg, CurveSegment)
            own = [g for g in self.grooves if g.segment == index]
            if self.periodic and own:
                # the loop starts at the first groove; the stretch after the last groove runs past the curve's start
                cuts = [(g.s_mid - g.half_width, g.s_mid + g.half_width) for g in own]
                for i, g in enumerate(own):
                    spans.append(self._groove_span(g))
                    a = cuts[i][1]
                    b = cuts[i + 1][0] if i + 1 < len(own) else cuts[0][0] + seg.length
                    spans.append(_Span(index, "curve", a, b, self._fractions(seg, a, b)))
                continue
            start = 0.0
            for g in own:
                lip_a, lip_b = g.s_mid - g.half_width, g.s_mid + g.half_width
                spans.append(_Span(index, "curve", start, lip_a, self._fractions(seg, start, lip_a),
                                   trim_start=start == 0.0 and not self.periodic))
                spans.append(self._groove_span(g))
                start = lip_b
            spans.append(_Span(index, "curve", start, seg.length, self._fractions(seg, start, seg.length),
                               trim_start=start == 0.0 and not self.periodic, trim_stop=not self.periodic))
        return spans

    @staticmethod
    def _groove_span(g: _Groove) -> _Span:
        return _Span(g.segment, "groove", g.s_mid - g.half_width, g.s_mid + g.half_width,
                     np.linspace(0.0, 1.0, GROOVE_SAMPLES), groove=g)

    # -- queries -------------------------------------------------------------------
    @property
    def perimeter_mm(self) -> float:
        """Length of the outline (mm), along the smooth model."""
        return float(sum(self._arc_table(i)[1][-1] for i in range(len(self.segments))))

    def _arc_table(self, index: int) -> tuple[FloatArray, FloatArray]:
        """Parameters of segment ``index`` every 0.1 mm or so, and the arc length (mm) at each (computed once)."""
        cache: dict[int, tuple[FloatArray, FloatArray]] = self.__dict__.setdefault("_arcs", {})
        if index not in cache:
            seg = self.segments[index]
            if isinstance(seg, _LineSegment):
                cache[index] = (np.array([0.0, seg.length]), np.array([0.0, seg.length]))
            else:
                grid = np.linspace(0.0, seg.length, max(8, int(seg.length / 0.1) + 1))
                arc = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(seg.point(grid, 0.0), axis=0), axis=1))])
                cache[index] = (grid, arc)
        return cache[index]

    def _param_at(self, s_mm: float) -> tuple[int, float]:
        """Segment index and parameter (mm) at arc length ``s_mm`` from the outline's first point."""
        remaining = s_mm % self.perimeter_mm
        for index, seg in enumerate(self.segments):
            grid, arc = self._arc_table(index)
            if remaining <= arc[-1] or index == len(self.segments) - 1:
                if isinstance(seg, _LineSegment):
                    return index, min(remaining, seg.length)
                return index, float(np.interp(remaining, arc, grid))
            remaining -= arc[-1]
        raise AssertionError("unreachable")

    def locate(self, s_mm: float) -> tuple[FloatArray, FloatArray]:
        """Point and inward unit normal of the outline at arc length ``s_mm`` from its first point."""
        index, s = self._param_at(s_mm)
        seg = self.segments[index]
        return seg.point(s, 0.0), _rot90(seg.tangent(s))

    def dense_base(self, spacing_mm: float = 0.5) -> FloatArray:
        """The outline as a dense closed polyline (first point not repeated), mm."""
        parts = []
        for seg in self.segments:
            s = np.linspace(0.0, seg.length, max(2, int(seg.length / spacing_mm) + 1))[:-1]
            parts.append(seg.point(s, 0.0))
        return np.concatenate(parts)

    # -- offsets ------------------------------------------------------------------
    @staticmethod
    def _smooth(a: _Segment, b: _Segment) -> bool:
        """Whether ``a`` runs on into ``b`` without a corner (their tangents within ``SMOOTH_JUNCTION_DEG``)."""
        ta, tb = a.tangent(a.length), b.tangent(0.0)
        turn = math.degrees(math.atan2(float(ta[0] * tb[1] - ta[1] * tb[0]), float(np.dot(ta, tb))))
        return abs(turn) < SMOOTH_JUNCTION_DEG

    def _junction(self, a: _Segment, b: _Segment, inset: float) -> tuple[float, float]:
        """Parameters (on a, on b) where the offsets of a and b meet at ``inset``.

        Outward (a wall leaning out, ``inset`` < 0) two edges that run on into each other meet at their shared end:
        their offsets are nearly parallel there, so where they cross is ill-conditioned (a spline's end tangent is
        off its neighbour's by a fraction of a degree) and only a few hundredths of a millimetre from the ends.
        """
        if inset < 0.0 and self._smooth(a, b):
            return a.length, 0.0
        sa, sb = a.length, 0.0
        for _ in range(50):
            (pa, da), (pb, db) = a.point_and_deriv(sa, inset), b.point_and_deriv(sb, inset)
            f = pa - pb
            if float(np.linalg.norm(f)) < 1e-10:
                break
            jac = np.column_stack([da, -db])
            step = np.linalg.lstsq(jac, -f, rcond=1e-12)[0]
            sa, sb = sa + float(step[0]), sb + float(step[1])
        f = a.point(sa, inset) - b.point(sb, inset)
        reach = MAX_EXTENSION_MM
        if inset < 0.0 and isinstance(a, _LineSegment) and isinstance(b, _LineSegment):
            reach += MITRE_REACH * -inset  # a wall leaning out: two straight edges meet beyond the corner
        if float(np.linalg.norm(f)) > 1e-7 or sa > a.length + reach or sb < -reach \
                or sa < 0.0 or sb > b.length:
            p = a.point(a.length, 0.0)
            if inset < 0.0:
                raise GeometryError(
                    f"the die wall leaning out {-inset:.2f} mm (under a flange bent through less than 90°) cannot "
                    f"be closed at the corner ({p[0]:.2f}, {p[1]:.2f}) mm: a curved edge meets it there or the "
                    "corner is too sharp; round the corner, use lower die stock, or give the flange there a larger "
                    "angle")
            raise GeometryError(
                f"the die outline offset inward by {inset:.3f} mm cannot be closed at the corner "
                f"({p[0]:.2f}, {p[1]:.2f}) mm: an edge next to it is too short or the corner too sharp; lower the "
                "top radius or the undercut (lower die stock), or move the spar where the section is deeper"
            )
        return sa, sb

    def _corners(self, inset: float) -> tuple[list[float], list[float], dict[int, FloatArray]]:
        """(start and stop parameter of each segment, corner point after each) of the offset by ``inset``; kept per
        inset, as the die's sections, rules and drawing ask for the same insets more than once."""
        if inset not in self._corner_cache:
            n = len(self.segments)
            starts = [0.0] * n
            stops = [seg.length for seg in self.segments]
            corner: dict[int, FloatArray] = {}
            if not self.periodic:
                for i in range(n):
                    sa, sb = self._junction(self.segments[i], self.segments[(i + 1) % n], inset)
                    stops[i] = sa
                    starts[(i + 1) % n] = sb
                    corner[i] = self.segments[i].point(sa, inset)
            self._corner_cache[inset] = (starts, stops, corner)
        starts, stops, corner = self._corner_cache[inset]
        return list(starts), list(stops), dict(corner)

    def offset(self, inset: float, spacing_mm: float | None = None, flute_scale: float = 0.0) -> list[OffsetPiece]:
        """The outline offset inward by ``inset`` mm, one piece per span, the same structure for every inset.

        Kept per (inset, spacing, flute scale): the rules that check a die, the solid, its drawing and its laminate
        layers ask for the same sections (a refusal is raised again, as it is not kept).

        Curve pieces are sampled at the model's fixed fractions, or every
        ``spacing_mm`` along the base curve if given (for plain outlines).
        Flutes: each groove's cross-section is the circular segment of its
        width and ``flute_scale`` × its depth, measured along the outline's
        normals (a circle of radius r = (w²/4 + D²)/(2D) on a straight wall
        when ``flute_scale`` is 1); ``flute_scale`` 0 leaves the wall whole.
        """
        key = (inset, spacing_mm, flute_scale)
        if key not in self._offset_cache:
            self._offset_cache[key] = tuple(self._offset(inset, spacing_mm, flute_scale))
        return list(self._offset_cache[key])

    def _offset(self, inset: float, spacing_mm: float | None, flute_scale: float) -> list[OffsetPiece]:
        if self.periodic and not self.grooves:
            seg = self.segments[0]
            span = self.spans[0]
            fr = span.fractions if spacing_mm is None else self._even(seg.length, spacing_mm)
            pts = seg.point(fr * seg.length, inset)
            pts[-1] = pts[0]
            pieces = [OffsetPiece("curve", _points(pts), tuple(map(float, fr)), closed=True)]
            self._check_simple(pieces, inset)
            return pieces
        n = len(self.segments)
        starts, stops, corner = self._corners(inset)
        pieces = []
        for span in self.spans:
            seg = self.segments[span.segment]
            if span.kind == "line":
                pts = np.array([corner[span.segment - 1 if span.segment else n - 1], corner[span.segment]])
                pieces.append(OffsetPiece("line", _points(pts)))
                continue
            if span.kind == "groove":
                pieces.append(self._groove_piece(span, inset, flute_scale))
                continue
            a = starts[span.segment] if span.trim_start else span.s0
            b = stops[span.segment] if span.trim_stop else span.s1
            fr = span.fractions if spacing_mm is None else self._even(b - a, spacing_mm)
            pts = seg.point(a + fr * (b - a), inset)
            if span.trim_start:
                pts[0] = corner[(span.segment - 1) % n]
            if span.trim_stop:
                pts[-1] = corner[span.segment]
            pieces.append(OffsetPiece("curve", _points(pts), tuple(map(float, fr))))
        self._check_simple(pieces, inset)
        return pieces

    # -- offsets of a wall that changes along the outline ----------------------------------------------------------
    def offset_along(self, values: WallValues, key: object, spacing_mm: float | None = None,
                     flute_length_mm: float = 0.0) -> list[OffsetPiece]:
        """The section whose inset and depth change along the outline: ``values(at)`` gives (inset, its slope
        d inset / d s, depth), mm, at positions ``at`` along the outline model's parameter (``segment_starts``).

        The same sequence of pieces as :meth:`offset`, each point with its own depth (``OffsetPiece.depths``).  A
        point at inset u(s) is ``base(s) + u(s)·n(s)`` (exact normal offset); corners are where the two
        neighbours' offsets meet (Newton's method, with the slope of u).  Flutes sink by their circular segment
        scaled by depth / ``flute_length_mm`` (0: no flutes) at each point.  ``key`` names the section for the
        model's cache of corners (the same key, the same ``values``).
        """
        n = len(self.segments)
        starts, stops, corner, corner_depth = self._corners_along(values, key)
        pieces = []
        for span in self.spans:
            seg = self.segments[span.segment]
            origin = float(self.segment_starts[span.segment])
            if span.kind == "line" and not span.varying:
                before = span.segment - 1 if span.segment else n - 1
                pts = np.array([corner[before], corner[span.segment]])
                pieces.append(OffsetPiece("line", _points(pts), depths=(corner_depth[before],
                                                                       corner_depth[span.segment])))
                continue
            if span.kind == "groove":
                pieces.append(self._groove_piece_along(span, values, flute_length_mm))
                continue
            a = starts[span.segment] if span.trim_start else span.s0
            b = stops[span.segment] if span.trim_stop else span.s1
            fr = span.fractions if spacing_mm is None or span.varying else self._even(b - a, spacing_mm)
            s_at = a + fr * (b - a)
            inset, _, depth = values(origin + np.clip(s_at, 0.0, seg.length))
            pts = seg.point(s_at, 0.0) + inset[:, None] * _rot90(seg.tangent(s_at))
            if span.trim_start:
                pts[0] = corner[(span.segment - 1) % n]
                depth[0] = corner_depth[(span.segment - 1) % n]
            if span.trim_stop:
                pts[-1] = corner[span.segment]
                depth[-1] = corner_depth[span.segment]
            pieces.append(OffsetPiece("curve", _points(pts), tuple(map(float, fr)),
                                      depths=tuple(map(float, depth))))
        self._check_simple(pieces, None)
        return pieces

    def _groove_piece_along(self, span: _Span, values: WallValues, flute_length_mm: float) -> OffsetPiece:
        g = span.groove
        assert g is not None
        phi = (2.0 * span.fractions - 1.0) * g.half_angle
        s = g.s_mid + g.radius * np.sin(phi)
        seg = self.segments[span.segment]
        inset, _, depth = values(float(self.segment_starts[span.segment]) + s)
        scale = np.clip(depth / flute_length_mm, 0.0, 1.0) if flute_length_mm > 0 else np.zeros_like(depth)
        scale = np.minimum(scale * g.taper_ratio, 1.0)
        sink = scale * (g.radius * np.cos(phi) - (g.radius - g.depth))
        sink[[0, -1]] = 0.0  # the lips lie on the wall exactly
        pts = seg.point(s, 0.0) + (inset + sink)[:, None] * _rot90(seg.tangent(s))
        return OffsetPiece("curve", _points(pts), tuple(map(float, span.fractions)), depths=tuple(map(float, depth)))

    def _at(self, values: WallValues, index: int, s: float) -> tuple[float, float, float]:
        seg = self.segments[index]
        u, du, d = values(np.array([float(self.segment_starts[index]) + min(max(s, 0.0), seg.length)]))
        return float(u[0]), float(du[0]), float(d[0])

    def _point_along(self, index: int, s: float, values: WallValues) -> tuple[FloatArray, FloatArray, float]:
        """Point, derivative and depth of segment ``index``'s offset at parameter ``s`` for a changing inset."""
        seg = self.segments[index]
        u, du, d = self._at(values, index, s)
        point, deriv = seg.point_and_deriv(s, u)
        if 0.0 <= s <= seg.length:
            deriv = deriv + du * _rot90(seg.tangent(s))
        return point, deriv, d

    def _junction_along(self, index: int, values: WallValues) -> tuple[float, float]:
        """Parameters (on segment ``index``, on the next) where their offsets meet, the inset changing along."""
        n = len(self.segments)
        a, b = self.segments[index], self.segments[(index + 1) % n]
        if self._at(values, index, a.length)[0] < 0.0 and self._smooth(a, b):
            return a.length, 0.0  # see _junction
        sa, sb = a.length, 0.0
        for _ in range(60):
            (pa, da, _), (pb, db, _) = self._point_along(index, sa, values), self._point_along((index + 1) % n, sb,
                                                                                              values)
            f = pa - pb
            if float(np.linalg.norm(f)) < 1e-10:
                break
            step = np.linalg.lstsq(np.column_stack([da, -db]), -f, rcond=1e-12)[0]
            sa, sb = sa + float(step[0]), sb + float(step[1])
        f = self._point_along(index, sa, values)[0] - self._point_along((index + 1) % n, sb, values)[0]
        inset = self._at(values, index, sa)[0]
        reach = MAX_EXTENSION_MM if inset >= 0 else MAX_EXTENSION_MM + MITRE_REACH * -inset
        extends_line = isinstance(a, _LineSegment) and isinstance(b, _LineSegment)
        if float(np.linalg.norm(f)) > 1e-7 or sa < 0.0 or sb > b.length or \
                sa > a.length + (reach if extends_line else MAX_EXTENSION_MM) or \
                sb < -(reach if extends_line else MAX_EXTENSION_MM):
            p = a.point(a.length, 0.0)
            where = f"({p[0]:.2f}, {p[1]:.2f}) mm"
            if inset < 0:
                raise GeometryError(
                    f"the die wall leaning out {-inset:.2f} mm (under a flange bent through less than 90°) cannot "
                    f"be closed at the corner {where}: a curved edge meets it there or the corner is too sharp; "
                    "round the corner, use lower die stock, or give the flange there a larger angle")
            raise GeometryError(
                f"the die outline offset inward by {inset:.3f} mm cannot be closed at the corner {where}: an edge "
                "next to it is too short or the corner too sharp; lower the top radius or the undercut (lower die "
                "stock)")
        return sa, sb

    def _corners_along(self, values: WallValues, key: object
                       ) -> tuple[list[float], list[float], dict[int, FloatArray], dict[int, float]]:
        cache: dict[object, tuple] = self.__dict__.setdefault("_corner_along_cache", {})
        if key not in cache:
            n = len(self.segments)
            starts = [0.0] * n
            stops = [seg.length for seg in self.segments]
            corner: dict[int, FloatArray] = {}
            depth: dict[int, float] = {}
            for i in range(n):
                sa, sb = self._junction_along(i, values)
                stops[i] = sa
                starts[(i + 1) % n] = sb
                corner[i] = self._point_along(i, sa, values)[0]
                depth[i] = self._at(values, i, sa)[2]
            cache[key] = (starts, stops, corner, depth)
        starts, stops, corner, depth = cache[key]
        return list(starts), list(stops), dict(corner), dict(depth)

    def _groove_piece(self, span: _Span, inset: float, flute_scale: float) -> OffsetPiece:
        g = span.groove
        assert g is not None
        phi = (2.0 * span.fractions - 1.0) * g.half_angle
        s = g.s_mid + g.radius * np.sin(phi)
        scale = flute_scale if g.taper_ratio == 1.0 else min(flute_scale * g.taper_ratio, 1.0)
        sink = scale * (g.radius * np.cos(phi) - (g.radius - g.depth))
        sink[[0, -1]] = 0.0  # the lips lie on the wall exactly
        seg = self.segments[span.segment]
        pts = seg.point(s, 0.0) + (inset + sink)[:, None] * _rot90(seg.tangent(s))
        return OffsetPiece("curve", _points(pts), tuple(map(float, span.fractions)))

    @staticmethod
    def _even(length: float, spacing_mm: float) -> FloatArray:
        return np.linspace(0.0, 1.0, max(4, math.ceil(length / spacing_mm) + 1))

    @staticmethod
    def _check_simple(pieces: list[OffsetPiece], inset: float | None) -> None:
        poly = pieces_to_polygon(pieces)
        if not poly.is_valid or poly.area <= 0.0:
            if inset is None:
                deepest = max(max(p.depths or (0.0,)) for p in pieces)
                raise GeometryError(
                    f"the die's section {deepest:.2f} mm down crosses itself ({explain_validity(poly)}): the piece "
                    "is too thin there for its wall, or a wall leaning out (under a flange bent through less than "
                    "90°) meets another; lower the top radius, use lower die stock, or give the flange there a "
                    "larger angle")
            raise GeometryError(
                f"the die outline offset inward by {inset:.3f} mm crosses itself ({explain_validity(poly)}): "
                "the piece is too thin there for its wall; lower the top radius or the undercut, "
                "or end the piece sooner"
            )


def flute_taper_ratio(die_flute_length_mm: float, flute: DieFlute) -> float:
    """The die's flute length over ``flute``'s own (1.0 when it has none or the same): a section's flute scale for the
    die's length, times this (at most 1), is the flute's own."""
    if flute.length_mm <= 0.0 or die_flute_length_mm <= 0.0 or flute.length_mm == die_flute_length_mm:
        return 1.0
    return die_flute_length_mm / flute.length_mm


def _merged(a: FloatArray, b: FloatArray, least: float) -> FloatArray:
    """The sample fractions of ``a`` and ``b`` together (both from 0 to 1), none closer than ``least`` to the one
    before (a near pair would make the interpolating spline wiggle)."""
    kept = [0.0]
    for f in np.sort(np.concatenate([a, b])):
        if f - kept[-1] >= least and f < 1.0 - least:
            kept.append(float(f))
    kept.append(1.0)
    return np.asarray(kept)


def _points(pts: FloatArray) -> tuple[tuple[float, float], ...]:
    return tuple(map(tuple, pts.tolist()))


def pieces_to_polygon(pieces: list[OffsetPiece]) -> Polygon:
    """A shapely polygon of an offset section (curve pieces as their sample polylines)."""
    ring = np.concatenate([np.asarray(p.points)[:-1] for p in pieces])
    return Polygon(ring)
