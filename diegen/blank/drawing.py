"""The flat-blank drawing: plain 2D data computed once, rendered by thin writers.

A :class:`BlankDrawing` holds everything a person needs to cut and mark one flat
blank: the cut contours, the holes, the bend (tangent) lines to scribe, notes and
the sheet's rolling (grain) direction.  The DXF, SVG and PDF writers in this
package only translate it; none of them computes geometry.

Units: millimetres for every length, degrees for angles.  The X–Y plane is the
rib plane (X along the chord, Y up).

Polylines are written exactly as given.  Keeping the chordal error of curved
edges at or below 0.01 mm is the job of the geometry layer that builds the
drawing, not of the writers.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final

from diegen.errors import GeometryError

__all__ = [
    "CUT",
    "DRILL",
    "GRAIN_ARROW_LENGTH",
    "LAYERS",
    "NOTE",
    "SCRIBE",
    "TEXT_WIDTH_FACTOR",
    "TITLE_TEXT_HEIGHT",
    "BlankDrawing",
    "Circle",
    "LayerStyle",
    "Note",
    "Point",
    "Polyline",
    "Segment",
    "TitleBlock",
    "arrow_segments",
]

Point = tuple[float, float]
"""A point in the drawing plane, (x, y) in mm."""

Polyline = tuple[Point, ...]
"""A sequence of points in mm (closed or open as the field says)."""


@dataclass(frozen=True)
class LayerStyle:
    """How one layer looks in every output format."""

    name: str  # DXF layer name, SVG group id, PDF legend entry
    aci: int  # DXF colour index (1..255)
    rgb: str  # SVG/PDF stroke colour, "#rrggbb"
    purpose: str


CUT: Final = LayerStyle("CUT", 1, "#cc0000", "cut contours and cut holes")
DRILL: Final = LayerStyle("DRILL", 5, "#0033cc", "tooling-pin holes, drill to size")
SCRIBE: Final = LayerStyle("SCRIBE", 3, "#008800", "bend (tangent) lines, scribe or mark only")
NOTE: Final = LayerStyle("NOTE", 7, "#000000", "text and grain arrow, never cut")
LAYERS: Final[tuple[LayerStyle, ...]] = (CUT, DRILL, SCRIBE, NOTE)
"""Every layer the writers create, in drawing order."""

TITLE_TEXT_HEIGHT: Final = 3.5
"""Height of title-block text in mm (a usual minimum for shop drawings; common practice, no source)."""

GRAIN_ARROW_LENGTH: Final = 24.0
"""Length of the grain-direction arrow in the title block, mm."""

TEXT_WIDTH_FACTOR: Final = 0.62
"""Estimated advance width of one character as a fraction of the text height.

Used only to reserve room for text in extents; the real width depends on the
font the viewer uses.
"""


@dataclass(frozen=True)
class Circle:
    """A round hole: centre (x, y) and diameter d, all in mm."""

    x: float
    y: float
    d: float

    def __post_init__(self) -> None:
        for name in ("x", "y", "d"):
            object.__setattr__(self, name, float(getattr(self, name)))
        if not all(math.isfinite(v) for v in (self.x, self.y, self.d)):
            raise GeometryError(f"hole at ({self.x}, {self.y}) has a non-finite position or diameter")
        if self.d <= 0.0:
            raise GeometryError(f"hole at ({self.x:.3f}, {self.y:.3f}) mm has diameter {self.d} mm; it must be > 0")

    @property
    def r(self) -> float:
        """Radius in mm."""
        return 0.5 * self.d


@dataclass(frozen=True)
class Note:
    """A line of text whose baseline starts at (x, y) mm; ``height`` is the cap height in mm."""

    x: float
    y: float
    height: float
    text: str

    def __post_init__(self) -> None:
        for name in ("x", "y", "height"):
            object.__setattr__(self, name, float(getattr(self, name)))
        if not (math.isfinite(self.x) and math.isfinite(self.y) and self.height > 0.0):
            raise GeometryError(f"note {self.text!r} needs a finite position and a height > 0 mm")

    def bbox(self) -> tuple[float, float, float, float]:
        """Estimated (xmin, ymin, xmax, ymax) in mm, using :data:`TEXT_WIDTH_FACTOR`."""
        width = TEXT_WIDTH_FACTOR * self.height * max(len(self.text), 1)
        return (self.x, self.y - 0.3 * self.height, self.x + width, self.y + self.height)


@dataclass(frozen=True)
class Segment:
    """A straight line from (x0, y0) to (x1, y1), mm (used for the grain arrow)."""

    x0: float
    y0: float
    x1: float
    y1: float


@dataclass(frozen=True)
class TitleBlock:
    """Part id, material and grain arrow, laid out below the blank (mm)."""

    notes: tuple[Note, ...]
    arrow: tuple[Segment, ...]

    def bbox(self) -> tuple[float, float, float, float]:
        """(xmin, ymin, xmax, ymax) of the block in mm (text widths estimated)."""
        boxes = [n.bbox() for n in self.notes]
        boxes += [(min(s.x0, s.x1), min(s.y0, s.y1), max(s.x0, s.x1), max(s.y0, s.y1)) for s in self.arrow]
        return _union(boxes)


def _points(value: object, what: str, closed: bool) -> Polyline:
    """Turn a sequence of (x, y) pairs into a tuple of float tuples, checking it."""
    try:
        pts = tuple((float(p[0]), float(p[1])) for p in value)  # type: ignore[attr-defined, index]
    except (TypeError, ValueError, IndexError) as exc:
        raise GeometryError(f"{what}: expected a sequence of (x, y) points in mm ({exc})") from exc
    if not all(math.isfinite(x) and math.isfinite(y) for x, y in pts):
        raise GeometryError(f"{what}: contains a non-finite coordinate")
    need = 3 if closed else 2
    if len(pts) < need:
        raise GeometryError(f"{what}: needs at least {need} points, got {len(pts)}")
    if closed and pts[0] == pts[-1]:
        raise GeometryError(f"{what}: the last point repeats the first; give a closed contour without the repeat")
    return pts


def _union(boxes: list[tuple[float, float, float, float]]) -> tuple[float, float, float, float]:
    return (
        min(b[0] for b in boxes),
        min(b[1] for b in boxes),
        max(b[2] for b in boxes),
        max(b[3] for b in boxes),
    )


def arrow_segments(cx: float, cy: float, length: float, angle_deg: float) -> tuple[Segment, ...]:
    """Shaft and two head strokes of an arrow centred on (cx, cy) mm pointing at ``angle_deg`` from +X."""
    a = math.radians(angle_deg)
    ux, uy = math.cos(a), math.sin(a)
    half = 0.5 * length
    tail = (cx - half * ux, cy - half * uy)
    tip = (cx + half * ux, cy + half * uy)
    head = 0.2 * length
    segs = [Segment(tail[0], tail[1], tip[0], tip[1])]
    for side in (+1.0, -1.0):
        b = a + math.pi - side * math.radians(25.0)
        segs.append(Segment(tip[0], tip[1], tip[0] + head * math.cos(b), tip[1] + head * math.sin(b)))
    return tuple(segs)


@dataclass(frozen=True)
class BlankDrawing:
    """Everything to cut and mark one flat blank, in mm.

    ``outer`` is the closed cut contour (counter-clockwise, last point not
    repeating the first).  ``inner`` are non-circular inner cut contours.
    ``cut_circles`` are plain and pilot holes (cut), ``drill_circles`` tooling-pin
    holes (drilled to size).  ``scribe_lines`` are open polylines along the bend
    tangent lines.  ``grain_angle_deg`` is the sheet's rolling direction, degrees
    from +X.
    """

    part_id: str
    material: str
    outer: Polyline
    inner: tuple[Polyline, ...] = ()
    cut_circles: tuple[Circle, ...] = ()
    drill_circles: tuple[Circle, ...] = ()
    scribe_lines: tuple[Polyline, ...] = ()
    notes: tuple[Note, ...] = ()
    grain_angle_deg: float = 0.0

    def __post_init__(self) -> None:
        set_ = object.__setattr__
        set_(self, "outer", _points(self.outer, f"{self.part_id}: outer contour", closed=True))
        inner = (_points(c, f"{self.part_id}: inner contour {i}", True) for i, c in enumerate(self.inner))
        set_(self, "inner", tuple(inner))
        scribe = (_points(c, f"{self.part_id}: scribe line {i}", False) for i, c in enumerate(self.scribe_lines))
        set_(self, "scribe_lines", tuple(scribe))
        set_(self, "cut_circles", tuple(self.cut_circles))
        set_(self, "drill_circles", tuple(self.drill_circles))
        set_(self, "notes", tuple(self.notes))
        set_(self, "grain_angle_deg", float(self.grain_angle_deg))
        if not math.isfinite(self.grain_angle_deg):
            raise GeometryError(f"{self.part_id}: grain angle must be finite")
        if not self.part_id.strip():
            raise GeometryError("a blank drawing needs a part id")

    # ----------------------------------------------------------------- extents
    def bbox(self) -> tuple[float, float, float, float]:
        """(xmin, ymin, xmax, ymax) of the cut and drill geometry in mm (the outer contour and any hole)."""
        xs = [p[0] for p in self.outer]
        ys = [p[1] for p in self.outer]
        boxes = [(min(xs), min(ys), max(xs), max(ys))]
        boxes += [(c.x - c.r, c.y - c.r, c.x + c.r, c.y + c.r) for c in self.cut_circles + self.drill_circles]
        return _union(boxes)

    def content_bbox(self) -> tuple[float, float, float, float]:
        """(xmin, ymin, xmax, ymax) in mm of the geometry plus scribe lines and notes (no title block)."""
        boxes = [self.bbox()]
        for line in self.scribe_lines:
            xs, ys = [p[0] for p in line], [p[1] for p in line]
            boxes.append((min(xs), min(ys), max(xs), max(ys)))
        boxes += [n.bbox() for n in self.notes]
        return _union(boxes)

    def title_block(self) -> TitleBlock:
        """Part id, material and a grain arrow laid out below :meth:`bbox` (mm).

        The arrow sits in a square of :data:`GRAIN_ARROW_LENGTH` at the left, the
        text to its right; the block's top is 5 mm below the blank.
        """
        xmin, ymin, _, _ = self.bbox()
        h = TITLE_TEXT_HEIGHT
        top = ymin - 5.0
        size = GRAIN_ARROW_LENGTH
        arrow = arrow_segments(xmin + 0.5 * size, top - 0.5 * size, size, self.grain_angle_deg)
        tx = xmin + size + 5.0
        notes = (
            Note(tx, top - h, h, self.part_id),
            Note(tx, top - 2.8 * h, h, self.material),
            Note(tx, top - 4.6 * h, 0.8 * h, "GRAIN (rolling direction) along arrow"),
            Note(xmin, top - size - 1.8 * h, 0.8 * h, "GRAIN"),
        )
        return TitleBlock(notes=notes, arrow=arrow)

    def extent(self) -> tuple[float, float, float, float]:
        """(xmin, ymin, xmax, ymax) in mm of everything the DXF and SVG writers draw, title block included."""
        return _union([self.content_bbox(), self.title_block().bbox()])

    # -------------------------------------------------------------------- area
    def net_area(self) -> float:
        """Area of sheet left after cutting, mm²: outer minus inner contours minus every hole.

        Computed with shapely; circles enter as 256-sided polygons, whose area is
        short of the true circle by a relative 1e-4.
        """
        from shapely.geometry import Point as ShPoint
        from shapely.geometry import Polygon
        from shapely.ops import unary_union

        outer = Polygon(self.outer)
        if not outer.is_valid:
            raise GeometryError(f"{self.part_id}: outer contour crosses itself")
        cuts = [Polygon(c) for c in self.inner]
        cuts += [ShPoint(c.x, c.y).buffer(c.r, quad_segs=64) for c in self.cut_circles + self.drill_circles]
        return float(outer.difference(unary_union(cuts)).area) if cuts else float(outer.area)
