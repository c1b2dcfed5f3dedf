"""Splitting a die outline into rib pieces at the spars, with joggles at the spar caps.

Conventions (DESIGN §4): each spar web's forward face is at ``at·chord``; a piece's
end flange lies against the web, so the die's end face (the flange's inner mold
line) stands one rib-sheet thickness off the web.  Spar caps are taken to lie on
both sides of the web (back-to-back angles), each ``cap_width`` wide along the
chord from the web face; where a rib flange laps a cap, the die wall steps inward
by the cap thickness over the cap width and runs out over a ramp.

Joggle run-out: ramp length = ``runout`` × depth (default 4×: from memory,
unverified — run-outs of 3–4 × depth are usual), and never shorter than needed
to keep the ramp's concave curvature radius at least the router cutter radius
(and its convex one rounder than the die wall's inset, see :func:`ramp_length`),
with ``RAMP_MARGIN`` to spare: the outline is a spline through samples of the
ramp laid on the curved section, which bent up to 6 % tighter than the exact
quintic in trials on a 0.8–1 mm joggle with a 3 mm cutter.
The ramp is the quintic S-curve d·(10u³ − 15u⁴ + 6u⁵), whose curvature is zero
at both ends and whose tightest radius is L²/((10/√3)·d).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from diegen.errors import GeometryError
from diegen.geometry.types import Joggle, Point, Points, Run

__all__ = [
    "JOGGLE_SAMPLE_MM",
    "MIN_END_FACE_MM",
    "MIN_POINT_GAP_MM",
    "RAMP_BEND",
    "SparCut",
    "depth_at",
    "joggle_inset",
    "joggles_for",
    "monotone_surfaces",
    "piece_runs",
    "ramp_length",
    "ramp_shape",
    "relief_points",
    "surface_y",
    "tail_end",
]

JOGGLE_SAMPLE_MM = 0.5  # point spacing along a joggle ramp and zone
RAMP_BEND = 10.0 / math.sqrt(3.0)  # the ramp's tightest radius is L²/(RAMP_BEND·d) (see ramp_shape)
MIN_POINT_GAP_MM = 0.2  # closer outline points are merged
# ramps are laid out this much rounder than they must be: room for sampling and the surface's own curve
RAMP_MARGIN = 1.25
MIN_END_FACE_MM = 1.0  # shortest end face (die depth at a spar cut) that is still a face


@dataclass(frozen=True)
class SparCut:
    """A spar as the geometry layer needs it (mm)."""

    x_front_mm: float  # web forward face
    web_mm: float
    cap_thickness_mm: float
    cap_width_mm: float

    @property
    def x_aft_mm(self) -> float:
        return self.x_front_mm + self.web_mm


def monotone_surfaces(loop: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Upper and lower surfaces of a CCW loop (mm), each from the leading edge (min x) aft; a point that does not
    advance in x beyond the one before it is dropped, so that the surfaces can be interpolated in x."""
    le, te = int(np.argmin(loop[:, 0])), int(np.argmax(loop[:, 0]))
    rolled = np.roll(loop, -te, axis=0)
    le_r = (le - te) % len(loop)
    upper = rolled[: le_r + 1][::-1]
    lower = np.vstack([rolled[le_r:], rolled[:1]])
    return _monotone(upper), _monotone(lower)


def _monotone(surface: np.ndarray) -> np.ndarray:
    keep = np.concatenate([[True], np.diff(surface[:, 0]) > 1e-9])
    return surface[keep]


def surface_y(surface: np.ndarray, x: float) -> float:
    return float(np.interp(x, surface[:, 0], surface[:, 1]))


def depth_at(upper: np.ndarray, lower: np.ndarray, x: float) -> float:
    """Vertical depth of the outline at chord position ``x`` (mm)."""
    return surface_y(upper, x) - surface_y(lower, x)


def tail_end(upper: np.ndarray, lower: np.ndarray, x_start: float, min_depth: float) -> float | None:
    """First x aft of ``x_start`` where the depth falls to ``min_depth`` (None: already below at the start)."""
    x_max = min(upper[-1, 0], lower[-1, 0])
    if depth_at(upper, lower, x_start) < min_depth:
        return None
    xs = np.arange(x_start, x_max, 1.0)
    depths = np.interp(xs, upper[:, 0], upper[:, 1]) - np.interp(xs, lower[:, 0], lower[:, 1])
    below = np.nonzero(depths < min_depth)[0]
    if len(below) == 0:
        return float(x_max)
    lo, hi = float(xs[below[0] - 1]), float(xs[below[0]])
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if depth_at(upper, lower, mid) >= min_depth else (lo, mid)
    return lo


def ramp_length(depth: float, runout: float, fair_radius: float) -> float:
    """Joggle ramp length (mm): ``runout``·depth, lengthened so the S-curve bends no tighter than ``fair_radius``.

    The ramp d·ramp_shape(u) over L bends tightest at two points inside it,
    radius L²/(RAMP_BEND·d); ``fair_radius`` is the larger of the cutter radius
    (the concave bend) and what the die's wall inset needs (the convex bend),
    and the ramp is laid out ``RAMP_MARGIN`` times rounder than that.
    """
    return max(runout * depth, math.sqrt(RAMP_BEND * depth * RAMP_MARGIN * max(fair_radius, 0.0)))


def ramp_shape(u: np.ndarray) -> np.ndarray:
    """The joggle ramp's depth fraction at ``u`` (0 at the ramp's far end, 1 at the recess): 10u³ − 15u⁴ + 6u⁵.

    Its slope and its curvature are zero at both ends, so the outline's
    curvature is continuous where the ramp meets the wall and the recess (a
    spline through the points then follows it, and the die's offsets do too).
    Its second derivative 60u − 180u² + 120u³ peaks at ±10/√3 (u = ½ ∓ √3/6).
    """
    return u**3 * (10.0 + u * (-15.0 + 6.0 * u))


def joggle_inset(x: np.ndarray, joggles: Sequence[Joggle]) -> np.ndarray:
    """Inward displacement of the wall at positions ``x`` from the given joggles (one surface): ``x`` is the chord
    position on a rib's wall, or the distance along the outline run a drawn part's joggle zone is given on."""
    inset = np.zeros_like(x)
    for j in joggles:
        full = (x >= j.x_start_mm) & (x <= j.x_end_mm)
        value = np.where(full, j.depth_mm, 0.0)
        for edge, sign in ((j.x_start_mm, -1.0), (j.x_end_mm, 1.0)):
            u = 1.0 - (x - edge) * sign / j.ramp_mm  # 1 at the zone edge, 0 at the ramp's far end
            in_ramp = (u > 0) & (u < 1) & ~full
            u = np.clip(u, 0.0, 1.0)
            value = np.where(in_ramp, j.depth_mm * ramp_shape(u), value)
        inset = np.maximum(inset, value)
    return inset


def _surface_between(surface: np.ndarray, x0: float, x1: float, joggles: Sequence[Joggle], upper: bool) -> np.ndarray:
    """Points of ``surface`` for x0 ≤ x ≤ x1 (exact ends), densified and displaced where joggles act.

    Displaced points move along the surface normal, so they are computed a little
    beyond the ends and clipped back to x0 and x1: end faces stay straight.
    """
    pad = 3.0 * max((j.depth_mm for j in joggles), default=0.0)
    lo, hi = max(x0 - pad, surface[0, 0]), min(x1 + pad, surface[-1, 0])
    xs = [lo, x0, x1, hi, *surface[(surface[:, 0] > lo) & (surface[:, 0] < hi), 0]]
    for j in joggles:
        a, b = max(lo, j.x_start_mm - j.ramp_mm), min(hi, j.x_end_mm + j.ramp_mm)
        if b > a:
            xs.extend(np.linspace(a, b, max(2, int((b - a) / JOGGLE_SAMPLE_MM) + 1)))
    x = np.unique(np.asarray(xs))
    points = np.column_stack([x, np.interp(x, surface[:, 0], surface[:, 1])])
    if joggles:
        points = _monotone(_displace(points, joggle_inset(x, joggles), upper))
    inside = points[(points[:, 0] > x0) & (points[:, 0] < x1)]
    ends = [[x, np.interp(x, points[:, 0], points[:, 1])] for x in (x0, x1)]
    return _thin(np.vstack([ends[0], inside, ends[1]]), MIN_POINT_GAP_MM)


def _thin(points: np.ndarray, gap: float) -> np.ndarray:
    """Drop interior points closer than ``gap`` to their predecessor or to the end point.

    Near-coincident points (left where surface samples and joggle samples meet)
    would read as tight kinks to anything that measures curvature.
    """
    step = np.hypot(*np.diff(points, axis=0).T)
    to_end = np.hypot(*(points - points[-1]).T)
    keep = np.concatenate([[True], (step[:-1] >= gap) & (to_end[1:-1] >= gap), [True]])
    return points[keep]


def _displace(points: np.ndarray, inset: np.ndarray, upper: bool) -> np.ndarray:
    """Move each point of an LE→TE surface by ``inset`` along its normal into the rib."""
    tangent = np.gradient(points, axis=0)
    tangent /= np.linalg.norm(tangent, axis=1, keepdims=True)
    left = np.column_stack([-tangent[:, 1], tangent[:, 0]])
    into_rib = -left if upper else left  # the rib lies right of the upper surface, left of the lower
    return points + into_rib * inset[:, None]


def joggles_for(x0: float, x1: float, spars: Sequence[SparCut], runout: float, fair_radius: float) -> list[Joggle]:
    """The joggles (both surfaces) whose full-depth zones overlap the piece from x0 to x1 (see :func:`ramp_length`)."""
    result = []
    for i, spar in enumerate(spars):
        if spar.cap_thickness_mm <= 0 or spar.cap_width_mm <= 0:
            continue
        ramp = ramp_length(spar.cap_thickness_mm, runout, fair_radius)
        for start, end in ((spar.x_front_mm - spar.cap_width_mm, spar.x_front_mm),
                           (spar.x_aft_mm, spar.x_aft_mm + spar.cap_width_mm)):
            lo, hi = max(start, x0), min(end, x1)
            if hi > lo:
                for surface in ("upper", "lower"):
                    result.append(Joggle(i, surface, start, end, spar.cap_thickness_mm, ramp))  # type: ignore[arg-type]
    return result


def _tuple(points: np.ndarray) -> Points:
    return tuple((float(x), float(y)) for x, y in points)


def piece_runs(upper: np.ndarray, lower: np.ndarray, x0: float | None, x1: float, joggles: Sequence[Joggle],
               aft_flanged: bool = True) -> tuple[Run, ...]:
    """Runs of a piece's CCW outline from ``x0`` (None: the leading edge) to ``x1``.

    The forward end face at ``x0`` is always flanged (it lies on a spar web); the
    aft end face at ``x1`` is flanged unless ``aft_flanged`` is False (a tail cut).
    """
    up_j = [j for j in joggles if j.surface == "upper"]
    lo_j = [j for j in joggles if j.surface == "lower"]
    start = upper[0, 0] if x0 is None else x0
    top = _surface_between(upper, start, x1, up_j, upper=True)
    bottom = _surface_between(lower, start, x1, lo_j, upper=False)
    if x0 is None:  # nose: one contour over the leading edge, then the aft end face
        contour = np.vstack([top[::-1], bottom[1:]])
        runs = [Run("curve", _tuple(contour)), Run("line", _tuple(np.array([contour[-1], contour[0]])), aft_flanged)]
    else:
        runs = [Run("curve", _tuple(top[::-1])),
                Run("line", _tuple(np.array([top[0], bottom[0]]))),
                Run("curve", _tuple(bottom)),
                Run("line", _tuple(np.array([bottom[-1], top[-1]])), aft_flanged)]
    for run in runs:
        if run.kind == "line" and math.dist(*run.points) < MIN_END_FACE_MM:
            raise GeometryError(
                f"the piece's end face at x = {run.points[0][0]:.1f} mm has no depth left: the die outline is only "
                f"{math.dist(*run.points):.2f} mm deep there (an end face needs at least {MIN_END_FACE_MM:.1f} mm); "
                "the skin and sheet offsets (and any joggles) leave too little of the section at the spar")
    return tuple(runs)


def relief_points(runs: Sequence[Run]) -> Points:
    """Corners where a flanged contour meets a flanged end face (bend relief in the blank)."""
    corners: list[Point] = []
    for run in runs:
        if run.kind == "line" and run.flanged:
            corners.extend([run.points[0], run.points[-1]])
    return tuple(corners)
