"""Joggle recesses in a drawn part's die outline: where a longeron, stringer or doubler passes under the flange.

A joggle is asked for by two points along the outline (``from`` and ``to``, counter-clockwise as drawn) and a
depth: over that stretch (the full-depth zone) the die's wall steps inward by the depth, and on either side it runs
back out along the same S-shaped ramp a rib's joggles use (:func:`diegen.geometry.pieces.ramp_shape`, its length
from :func:`diegen.geometry.pieces.ramp_length`).  The flange formed over the recess is set in by the depth, so it
laps the passing member.  Contoured-flange strain is judged on the outline without the recess (a local offset, not
a plan curve), as for ribs.

A joggle with its ramps must lie on one run of the outline (between two corners or flange-run ends): at a corner
the wall's normal turns, and the recess would tear the outline there.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np
from shapely.geometry import LineString
from shapely.geometry import Point as ShapelyPoint

from diegen.errors import GeometryError
from diegen.geometry.pieces import JOGGLE_SAMPLE_MM, joggle_inset
from diegen.geometry.types import Joggle, Point, Points, Run
from diegen.sources.contour import Place

__all__ = ["JoggleSpec", "recess"]

END_CLEARANCE_MM = 1.0  # project limit: a joggle's ramp ends at least this far from its run's ends
CURVE_STEP_MM = 2.0  # as diegen.sources.part: the longest segment along a straight stretch of a curve run


@dataclass(frozen=True)
class JoggleSpec:
    """A joggle asked for: the full-depth zone from ``start`` to ``end`` along the outline (mm, drawing frame),
    ``depth_mm`` deep; ``label`` names it in messages (``joggles[0]``)."""

    start: Point
    end: Point
    depth_mm: float
    label: str = ""


def recess(runs: tuple[Run, ...], joggles: Sequence[JoggleSpec], ramp_of, place: Place
           ) -> tuple[tuple[Run, ...], tuple[Joggle, ...]]:
    """``runs`` with each joggle's recess cut into the run it lies on, and the joggles as the geometry layer's
    :class:`Joggle` records (their ``path`` the recessed stretch, ramps included).

    ``ramp_of(depth)`` is the ramp length (mm) for a depth.  Raises :class:`GeometryError` for a joggle off the
    outline, one whose zone and ramps do not lie on one run, a cut edge, or one deeper than the run is wide.
    """
    runs = list(runs)
    records = []
    for index, joggle in enumerate(joggles):
        label = joggle.label or f"joggle {index + 1}"
        ramp = float(ramp_of(joggle.depth_mm))
        k, s0, s1 = _locate(runs, joggle, ramp, label, place)
        runs[k], path = _recessed(runs[k], s0, s1, joggle.depth_mm, ramp)
        records.append(Joggle(index, "outline", 0.0, 0.0, joggle.depth_mm, ramp, path=path))
    return tuple(runs), tuple(records)


def _locate(runs: list[Run], joggle: JoggleSpec, ramp: float, label: str, place: Place) -> tuple[int, float, float]:
    """(run index, zone start, zone end along that run, mm) of ``joggle``."""
    lines = [LineString(r.points) for r in runs]
    ends = []
    for role, p in (("from", joggle.start), ("to", joggle.end)):
        point = ShapelyPoint(p)
        k = int(np.argmin([line.distance(point) for line in lines]))
        ends.append((k, float(lines[k].project(point))))
        if lines[k].distance(point) > max(1.0, 2 * joggle.depth_mm) + 1.0:
            raise GeometryError(f"{place.source}: {label}: its {role} point {place.at(p)} is "
                                f"{place.length(lines[k].distance(point))} from the die outline: put it on the part's "
                                "outline", key=label)
    (k0, s0), (k1, s1) = ends
    run = runs[k0]
    length = lines[k0].length
    if k0 != k1 or s1 <= s0:
        raise GeometryError(f"{place.source}: {label}: from {place.at(joggle.start)} to {place.at(joggle.end)} "
                            "does not run counter-clockwise along one stretch of the outline between corners or "
                            "flange ends: give from and to in the order the outline runs, on one run (split the "
                            "joggle at a corner into two)", key=label)
    if not run.flanged:
        raise GeometryError(f"{place.source}: {label}: the stretch is a cut edge (no flange): a joggle recesses a "
                            "flange; leave it out there", key=label)
    if s0 - ramp < END_CLEARANCE_MM or s1 + ramp > length - END_CLEARANCE_MM:
        raise GeometryError(f"{place.source}: {label}: with its run-outs of {ramp:.1f} mm each side it needs "
                            f"{s1 - s0 + 2 * ramp:.1f} mm of one outline run, and reaches past the run's end (a corner "
                            "or a flange end) there: move it away from the corner, or make it shorter or shallower",
                            key=label)
    return k0, s0, s1


def _recessed(run: Run, s0: float, s1: float, depth: float, ramp: float) -> tuple[Run, Points]:
    """The run with the wall moved inward by depth over [s0, s1] and ramped out over ``ramp`` either side."""
    pts = np.asarray(run.points, dtype=float)
    along = np.r_[0.0, np.cumsum(np.hypot(*np.diff(pts, axis=0).T))]
    a, b = s0 - ramp, s1 + ramp
    samples = np.linspace(a, b, max(3, math.ceil((b - a) / JOGGLE_SAMPLE_MM) + 1))
    outside = along
    if run.kind == "line":  # becomes a curve: points along its straight parts keep the die's spline straight there
        outside = np.r_[along, np.linspace(0.0, along[-1], max(2, math.ceil(along[-1] / CURVE_STEP_MM) + 1))]
    keep = (outside < a - JOGGLE_SAMPLE_MM) | (outside > b + JOGGLE_SAMPLE_MM)
    s = np.unique(np.r_[outside[keep], samples])
    xy = np.column_stack([np.interp(s, along, pts[:, 0]), np.interp(s, along, pts[:, 1])])
    tangent = np.gradient(xy, s, axis=0)
    tangent /= np.linalg.norm(tangent, axis=1, keepdims=True)
    inward = np.column_stack([-tangent[:, 1], tangent[:, 0]])  # the part lies left of a counter-clockwise outline
    inset = joggle_inset(s, [Joggle(0, "outline", s0, s1, depth, ramp)])  # the zone and ramps as a rib's, along s
    moved = xy + inward * inset[:, None]
    points = tuple((float(x), float(y)) for x, y in moved)
    path = tuple(p for p, si in zip(points, s) if a <= si <= b)
    return replace(run, kind="curve", points=points), path
