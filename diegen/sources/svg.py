"""Reading a part outline from an SVG path ``d`` string (SVG 1.1, section 8.3, "The path data"), in mm.

All commands are read, absolute and relative: M L H V C S Q T A Z.  Each subpath must close (with Z,
or by ending where it started, within the join tolerance) and becomes one contour.  The caller gives
the unit of the path's numbers (``mm``, ``in``, ``px``, ``pt``, ...: see :mod:`diegen.sources.units`).

SVG's y axis points down the page; the outline is turned so Y points up (y → −y), so the part reads
as it looks on screen.  Circular arcs (equal radii after the out-of-range radii correction of SVG 1.1,
appendix F.6.6) stay arcs; elliptical arcs and Bézier segments are flattened within ``CHORD_TOL_MM``
(see :mod:`diegen.sources.contour`).  The arc's centre comes from its end points, radii and flags by
the endpoint-to-centre conversion of SVG 1.1 appendix F.6.5.
"""

from __future__ import annotations

import math
import re

import numpy as np

from diegen.errors import DrawingError
from diegen.sources.contour import (
    CHORD_TOL_MM,
    Contour,
    Edge,
    Place,
    arc_edge,
    bezier_tangents,
    check_contour,
    curve_edge,
    flatten_bezier,
    flatten_ellipse,
    line_edge,
)
from diegen.sources.model import Drawing
from diegen.sources.units import SVG_UNITS, length_unit_mm

DEFAULT_JOIN_TOL_MM = 0.01
MAX_PATH_CHARS = 1_000_000  # a part outline's path is far shorter
ARGUMENTS = {"M": 2, "L": 2, "H": 1, "V": 1, "C": 6, "S": 4, "Q": 4, "T": 2, "A": 7, "Z": 0}
_NUMBER = re.compile(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?")
_SEPARATORS = " \t\n\r\f,"


def read_svg_path(d: str, units: str, name: str = "svg path", join_tol_mm: float = DEFAULT_JOIN_TOL_MM) -> Drawing:
    """The closed contours of the SVG path data ``d`` whose numbers are in ``units``, in mm (Y up).

    Raises :class:`DrawingError` naming the character position for path data that cannot be read, and the
    place for a subpath that does not close, a contour that crosses itself or encloses nothing.
    """
    if not isinstance(d, str):
        raise DrawingError(f"{name}: expected SVG path data (a string such as \"M 0 0 H 50 V 20 Z\"), "
                           f"found {type(d).__name__}")
    if len(d) > MAX_PATH_CHARS:
        raise DrawingError(f"{name}: the path data is {len(d)} characters long (at most {MAX_PATH_CHARS})")
    scale = length_unit_mm(units, f"{name}: units", SVG_UNITS)
    place = Place(name, str(units).strip().lower(), scale, y_down=True)
    builder = _Builder(place, scale, join_tol_mm)
    for letter, args, pos in _commands(d, name):
        try:
            builder.command(letter, args, pos)
        except DrawingError as error:
            if str(error).startswith(f"{name}"):
                raise
            raise DrawingError(f"{name} at character {pos + 1} ({letter}): {error}") from None
    builder.finish(len(d))
    if not builder.contours:
        raise DrawingError(f"{name}: the path draws nothing (expected at least one closed subpath such as "
                           "\"M 0 0 H 50 V 20 H 0 Z\")")
    for i, contour in enumerate(builder.contours):
        check_contour(contour, place, f"subpath {i + 1}")
    return Drawing(tuple(builder.contours), (), place)


def _commands(d: str, name: str):
    """Yield (command letter, its numbers, character index) with implicit repeats made explicit."""
    i, n = 0, len(d)
    letter: str | None = None
    first = True
    while True:
        while i < n and d[i] in _SEPARATORS:
            i += 1
        if i >= n:
            return
        start = i
        if d[i].upper() in ARGUMENTS and d[i].isalpha():
            letter = d[i]
            i += 1
            first = True
            if letter.upper() == "Z":
                yield letter, [], start
                continue
        elif letter is None:
            raise DrawingError(f"{name} at character {i + 1}: expected a command letter (M to begin), "
                               f"found {d[i:i + 12]!r}")
        elif letter.upper() == "Z" or d[i].isalpha():
            raise DrawingError(f"{name} at character {i + 1}: expected a command letter "
                               f"({' '.join(ARGUMENTS)}, or lower case for relative), found {d[i:i + 12]!r}")
        elif not first and letter.upper() == "M":
            letter = "l" if letter == "m" else "L"  # further pairs after a moveto are linetos
        args: list[float] = []
        count = ARGUMENTS[letter.upper()]
        for k in range(count):
            while i < n and d[i] in _SEPARATORS:
                i += 1
            if letter.upper() == "A" and k in (3, 4):  # the two arc flags: a single 0 or 1
                if i < n and d[i] in "01":
                    args.append(float(d[i]))
                    i += 1
                    continue
                found = d[i:i + 12] if i < n else "the end of the path"
                raise DrawingError(f"{name} at character {i + 1}: expected the {'large-arc' if k == 3 else 'sweep'} "
                                   f"flag (0 or 1) of command {letter!r}, found {found!r}")
            match = _NUMBER.match(d, i)
            if not match:
                found = repr(d[i:i + 12]) if i < n else "the end of the path"
                raise DrawingError(f"{name} at character {i + 1}: expected number {k + 1} of {count} for command "
                                   f"{letter!r}, found {found}")
            value = float(match.group())
            if not math.isfinite(value):
                raise DrawingError(f"{name} at character {i + 1}: number {match.group()!r} is not finite")
            args.append(value)
            i = match.end()
        first = False
        yield letter, args, start


class _Builder:
    """Turns commands into edges (model coordinates, mm, Y up) and closed contours."""

    def __init__(self, place: Place, scale: float, join_tol: float):
        self.place, self.scale, self.tol = place, scale, join_tol
        self.contours: list[Contour] = []
        self.edges: list[Edge] = []
        self.current = (0.0, 0.0)  # SVG user coordinates
        self.start = (0.0, 0.0)
        self.start_pos = 0
        self.last_control: tuple[str, tuple[float, float]] | None = None
        self.count = 0

    def model(self, p: tuple[float, float]) -> tuple[float, float]:
        return p[0] * self.scale, -p[1] * self.scale

    def command(self, letter: str, a: list[float], pos: int) -> None:
        up = letter.upper()
        rel = letter != up
        x0, y0 = self.current
        ox, oy = (x0, y0) if rel else (0.0, 0.0)
        self.count += 1
        origin = f"path command {self.count} ({letter} at character {pos + 1})"
        control: tuple[str, tuple[float, float]] | None = None
        if up == "M":
            self.finish(pos)
            self.current = self.start = (ox + a[0], oy + a[1])
            self.start_pos = pos
        elif up == "Z":
            if self.edges or self.current != self.start:
                self._line(self.current, self.start, origin)
            self._close(pos)
            self.current = self.start
        elif up in ("L", "H", "V"):
            end = ((ox + a[0], oy + a[1]) if up == "L" else (ox + a[0], y0) if up == "H"
                   else (x0, (y0 if rel else 0.0) + a[0]))
            self._line(self.current, end, origin)
            self.current = end
        elif up in ("C", "S"):
            if up == "C":
                c1 = (ox + a[0], oy + a[1])
                c2, end = (ox + a[2], oy + a[3]), (ox + a[4], oy + a[5])
            else:
                c1 = self._reflect("C")
                c2, end = (ox + a[0], oy + a[1]), (ox + a[2], oy + a[3])
            self._bezier([self.current, c1, c2, end], origin)
            control = ("C", c2)
            self.current = end
        elif up in ("Q", "T"):
            if up == "Q":
                c1, end = (ox + a[0], oy + a[1]), (ox + a[2], oy + a[3])
            else:
                c1, end = self._reflect("Q"), (ox + a[0], oy + a[1])
            self._bezier([self.current, c1, end], origin)
            control = ("Q", c1)
            self.current = end
        else:  # A
            end = (ox + a[5], oy + a[6])
            self._arc(self.current, a[0], a[1], a[2], bool(a[3]), bool(a[4]), end, origin)
            self.current = end
        self.last_control = control

    def _reflect(self, kind: str) -> tuple[float, float]:
        """The first control point of S or T: the previous C/S (or Q/T) control reflected in the current point."""
        if self.last_control is None or self.last_control[0] != kind:
            return self.current
        cx, cy = self.last_control[1]
        x, y = self.current
        return 2 * x - cx, 2 * y - cy

    def _line(self, a: tuple[float, float], b: tuple[float, float], origin: str) -> None:
        if a != b:
            self.edges.append(line_edge(self.model(a), self.model(b), origin=origin))

    def _bezier(self, control: list[tuple[float, float]], origin: str) -> None:
        pts = np.asarray([self.model(p) for p in control])
        if all(p == control[0] for p in control):
            return
        tangents = bezier_tangents(pts)
        self.edges.append(curve_edge(flatten_bezier(pts, CHORD_TOL_MM), tangents, origin=origin))

    def _arc(self, p1: tuple[float, float], rx: float, ry: float, rotation_deg: float, large: bool, sweep: bool,
             p2: tuple[float, float], origin: str) -> None:
        if p1 == p2:
            return  # SVG 1.1 F.6.2: an arc whose end points coincide is omitted
        rx, ry = abs(rx), abs(ry)
        if rx == 0.0 or ry == 0.0:
            self._line(p1, p2, origin)  # F.6.2: a zero radius makes a straight line
            return
        phi = math.radians(rotation_deg % 360.0)
        cos_p, sin_p = math.cos(phi), math.sin(phi)
        dx, dy = (p1[0] - p2[0]) / 2.0, (p1[1] - p2[1]) / 2.0
        x1, y1 = cos_p * dx + sin_p * dy, -sin_p * dx + cos_p * dy
        lam = (x1 / rx) ** 2 + (y1 / ry) ** 2
        if lam > 1.0:  # F.6.6: radii too small to reach are scaled up just enough
            rx, ry = rx * math.sqrt(lam), ry * math.sqrt(lam)
        num = rx * rx * ry * ry - rx * rx * y1 * y1 - ry * ry * x1 * x1
        den = rx * rx * y1 * y1 + ry * ry * x1 * x1
        coef = math.sqrt(max(0.0, num / den)) * (-1.0 if large == sweep else 1.0)
        cx1, cy1 = coef * rx * y1 / ry, -coef * ry * x1 / rx
        cx = cos_p * cx1 - sin_p * cy1 + (p1[0] + p2[0]) / 2.0
        cy = sin_p * cx1 + cos_p * cy1 + (p1[1] + p2[1]) / 2.0
        ux, uy = (x1 - cx1) / rx, (y1 - cy1) / ry
        vx, vy = (-x1 - cx1) / rx, (-y1 - cy1) / ry
        theta1 = math.atan2(uy, ux)
        delta = math.atan2(ux * vy - uy * vx, ux * vx + uy * vy)
        if sweep and delta < 0:
            delta += 2 * math.pi
        elif not sweep and delta > 0:
            delta -= 2 * math.pi
        if math.isclose(rx, ry, rel_tol=1e-9):
            # the y flip reverses the turning sense: a positive-angle SVG arc runs clockwise in the model
            self.edges.append(arc_edge(self.model(p1), self.model(p2), -math.tan(delta / 4.0), origin=origin,
                                       tol=CHORD_TOL_MM))
            return
        s = self.scale
        centre = np.array(self.model((cx, cy)))
        major = np.array([rx * cos_p * s, -rx * sin_p * s])
        minor = np.array([-ry * sin_p * s, -ry * cos_p * s])
        points, tangents = flatten_ellipse(centre, major, minor, theta1, theta1 + delta, CHORD_TOL_MM)
        edge = curve_edge(points, tangents, origin=origin)
        self.edges.append(edge.with_ends(self.model(p1), self.model(p2)))

    def _close(self, pos: int) -> None:
        if self.edges:
            first, last = self.edges[0], self.edges[-1]
            self.edges[-1] = last.with_ends(last.start, first.start)
            self.contours.append(Contour(tuple(self.edges)))
        self.edges = []

    def finish(self, pos: int) -> None:
        """End the subpath in progress: it must be closed, or end where it began."""
        if not self.edges:
            return
        gap = math.dist(self.edges[-1].end, self.edges[0].start)
        if gap > self.tol:
            raise DrawingError(
                f"{self.place.source}: the subpath starting at character {self.start_pos + 1} is not closed: it ends "
                f"at {self.place.at(self.edges[-1].end)}, {self.place.length(gap)} from where it starts, "
                f"{self.place.at(self.edges[0].start)}; end it with Z")
        self._close(pos)
