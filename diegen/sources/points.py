"""Reading a part outline from a list of points with optional arc bulges, as a spec gives it.

Each point is ``[x, y]`` or ``[x, y, bulge]``; the bulge belongs to the edge from that point to the
next (the last point's to the edge closing back to the first), and is the DXF convention: the tangent
of a quarter of the arc's included angle, positive counter-clockwise (DXF Reference, LWPOLYLINE group
42): 0 for a straight edge, 1 for a half circle, tan(22.5°) ≈ 0.4142 for a quarter circle.  The list
is one closed contour; a last point equal to the first is dropped.
"""

from __future__ import annotations

import math

from diegen.errors import DrawingError, Problem, SpecError
from diegen.sources.contour import Contour, Place, arc_edge, check_contour, line_edge
from diegen.sources.model import Drawing
from diegen.spec.reader import describe

MAX_POINTS = 100_000
MAX_BULGE = 1e6  # tan(θ/4) beyond this is an arc of nearly a full circle on a vanishing chord


def read_points(points: object, mm_per_unit: float = 1.0, unit: str = "mm", key: str = "outline.points",
                file: str = "") -> Drawing:
    """The closed contour through ``points`` (numbers in a unit of ``mm_per_unit`` mm), in mm.

    A list that is not points is a :class:`SpecError` naming ``key[index]`` (and ``file``); an outline
    that crosses itself or encloses nothing is a :class:`~diegen.errors.DrawingError`.
    """

    def fail(message: str, where: str = "") -> SpecError:
        return SpecError(Problem(message, file, None, None, key + where))

    if not isinstance(points, (list, tuple)):
        raise fail(f"expected a list of points [x, y] or [x, y, bulge], found {describe(points)}")
    if len(points) > MAX_POINTS:
        raise fail(f"expected at most {MAX_POINTS} points, found {len(points)}")
    parsed: list[tuple[float, float, float]] = []
    for i, item in enumerate(points):
        where = f"[{i}]"
        if not isinstance(item, (list, tuple)) or len(item) not in (2, 3):
            raise fail(f"expected a point [x, y] or [x, y, bulge], found {describe(item)}"
                       + (f" of {len(item)} values" if isinstance(item, (list, tuple)) else ""), where)
        values = []
        for j, value in enumerate(item):
            if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
                raise fail(f"expected {('x', 'y', 'a bulge')[j]} as a finite number, found {describe(value)}", where)
            values.append(float(value))
        bulge = values[2] if len(values) == 3 else 0.0
        if abs(bulge) > MAX_BULGE:
            raise fail(f"bulge {bulge:g} is out of range (|bulge| ≤ {MAX_BULGE:g}; 1 is a half circle)", where)
        parsed.append((values[0] * mm_per_unit, values[1] * mm_per_unit, bulge))
    if len(parsed) > 2 and parsed[-1][:2] == parsed[0][:2]:
        parsed.pop()
    if len(parsed) < 2 or (len(parsed) == 2 and parsed[0][2] == 0.0 and parsed[1][2] == 0.0):
        raise fail(f"expected at least 3 points (or 2 joined by arcs) to enclose an outline, found {len(parsed)}")
    edges = []
    for i, (x, y, bulge) in enumerate(parsed):
        nx, ny, _ = parsed[(i + 1) % len(parsed)]
        if (x, y) == (nx, ny):
            raise fail(f"point {i} repeats the next one, ({x / mm_per_unit:g}, {y / mm_per_unit:g}): remove one",
                       f"[{i}]")
        origin = f"{key}[{i}]"
        try:
            edges.append(arc_edge((x, y), (nx, ny), bulge, origin=origin) if bulge != 0.0
                         else line_edge((x, y), (nx, ny), origin=origin))
        except DrawingError as error:
            raise DrawingError(f"{file + ': ' if file else ''}{origin}: {error}") from None
    place = Place(f"{file + ': ' if file else ''}{key}", unit, mm_per_unit)
    contour = Contour(tuple(edges))
    check_contour(contour, place, "the outline")
    return Drawing((contour,), (), place)


def points_with_bulges(contour: Contour) -> list[list[float]]:
    """The contour as ``[x, y, bulge]`` rows (mm), one per edge start: the form :func:`read_points` reads.

    Curve edges (flattened splines and ellipses) give one row per flattened point, with bulge 0.
    """
    rows: list[list[float]] = []
    for edge in contour.edges:
        if edge.kind == "curve":
            rows.extend([x, y, 0.0] for x, y in edge.points[:-1])
        else:
            rows.append([edge.start[0], edge.start[1], edge.bulge])
    return rows


__all__ = ["points_with_bulges", "read_points"]
