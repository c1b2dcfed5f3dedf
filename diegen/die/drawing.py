"""The die drawing for 2D CAM: the die's outlines, holes, marks and tile joints as layered plain geometry.

Everything is computed from the die model in plain numbers (no kernel) and
drawn as seen from above, on the rib plane (X along the chord, Y up), in mm:

* ``TOP-OUTLINE``: the mold line, where the top face would meet the leaning
  wall without the edge radius; its area is the report's die area;
* ``TOP-FLAT``: the edge of the flat top face, where the edge radius begins;
* ``BOTTOM-OUTLINE``: the wall's bottom edge on the bottom face (the outline
  inset by height × tan(undercut)), flutes at their full depth;
* ``FLUTES``: the flutes' grooves at full depth (open stretches of the bottom outline);
* ``JOGGLE-RECESSES``: the stretches of the mold line stepped in for spar caps;
* ``BORES`` and ``DOWEL-HOLES``: circles with their diameter and depth noted;
* ``MARKS``: the engraving on the bottom face, drawn as seen from the top
  (mirror it about X for a set-up with the bottom face up);
* ``TILE-JOINTS``: the cuts between the tiles of a printed die;
* ``NOTES``: title and notes, never cut.

Outlines are closed polylines sampled every :data:`SAMPLE_MM` along the
outline (chordal error under 0.01 mm where the outline is rounder than 3 mm);
holes are true circles.  Writers: :mod:`diegen.export.die_drawing`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Final

import numpy as np

from diegen.blank.drawing import LayerStyle
from diegen.die.die_input import DieInput
from diegen.die.model import (
    bottom_inset_mm,
    depth_level,
    flute_scale,
    level_section,
    section,
    top_face_inset_mm,
    top_level,
)
from diegen.die.outline import OffsetPiece, OutlineModel
from diegen.die.placement import PlacedMarks
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.die.tiles import TileLayout
from diegen.numbers import plain as _plain

SAMPLE_MM: Final = 0.5
"""Spacing of the outline samples along the outline (mm): a chord of 0.5 mm on a 3 mm radius strays 0.01 mm."""

TEXT_MM: Final = 3.5
"""Cap height of the drawing's text (mm; a usual minimum for shop drawings, common practice, no source)."""


TOP_OUTLINE: Final = LayerStyle("TOP-OUTLINE", 1, "#c00000", "mold line: the die's outline at its top face")
TOP_FLAT: Final = LayerStyle("TOP-FLAT", 6, "#a000a0", "edge of the flat top face, where the edge radius begins")
BOTTOM_OUTLINE: Final = LayerStyle("BOTTOM-OUTLINE", 5, "#0030c0", "the undercut wall's edge on the bottom face")
FLUTES: Final = LayerStyle("FLUTES", 4, "#007080", "flute grooves at full depth, in the bottom outline")
JOGGLES: Final = LayerStyle("JOGGLE-RECESSES", 3, "#008000", "stretches of the outline stepped in for spar caps")
BORES: Final = LayerStyle("BORES", 140, "#006060", "through bores for flanged lightening holes")
DOWEL_HOLES: Final = LayerStyle("DOWEL-HOLES", 30, "#b05000", "tooling-pin (dowel) holes from the top face")
MARKS: Final = LayerStyle("MARKS", 8, "#606060", "engraving on the bottom face, seen from the top")
TILE_JOINTS: Final = LayerStyle("TILE-JOINTS", 210, "#c00070", "cuts between the tiles of a printed die")
NOTES: Final = LayerStyle("NOTES", 7, "#000000", "title and notes, never cut")
DIE_LAYERS: Final[tuple[LayerStyle, ...]] = (TOP_OUTLINE, TOP_FLAT, BOTTOM_OUTLINE, FLUTES, JOGGLES, BORES,
                                                DOWEL_HOLES, MARKS, TILE_JOINTS, NOTES)

Point = tuple[float, float]


@dataclass(frozen=True)
class Polyline:
    layer: str
    points: tuple[Point, ...]
    closed: bool


@dataclass(frozen=True)
class Circle:
    """A round hole: centre and diameter (mm)."""

    layer: str
    x: float
    y: float
    d: float


@dataclass(frozen=True)
class Text:
    """A line of text whose baseline starts at (x, y); ``height`` is its cap height (mm)."""

    layer: str
    x: float
    y: float
    height: float
    text: str


@dataclass(frozen=True)
class DieDrawing:
    """Everything the die drawing holds (mm): layered polylines, circles and text."""

    part_id: str
    title: str
    layers: tuple[LayerStyle, ...]
    polylines: tuple[Polyline, ...]
    circles: tuple[Circle, ...]
    texts: tuple[Text, ...]

    def on(self, layer: LayerStyle) -> tuple[Polyline, ...]:
        """The polylines on ``layer``."""
        return tuple(p for p in self.polylines if p.layer == layer.name)

    def extent(self) -> tuple[float, float, float, float]:
        """(xmin, ymin, xmax, ymax) of everything drawn (text by an estimated width of 0.62 × height a character)."""
        xs: list[float] = []
        ys: list[float] = []
        for line in self.polylines:
            xs += [p[0] for p in line.points]
            ys += [p[1] for p in line.points]
        for c in self.circles:
            xs += [c.x - c.d / 2, c.x + c.d / 2]
            ys += [c.y - c.d / 2, c.y + c.d / 2]
        for t in self.texts:
            xs += [t.x, t.x + 0.62 * t.height * len(t.text)]
            ys += [t.y - 0.3 * t.height, t.y + t.height]
        return min(xs), min(ys), max(xs), max(ys)


def _ring(pieces: list[OffsetPiece]) -> tuple[Point, ...]:
    ring = np.concatenate([np.asarray(p.points)[:-1] for p in pieces])
    return tuple((_plain(x), _plain(y)) for x, y in ring)


def _stretch_between(ring: Sequence[Point], x0: float, x1: float, upper: bool) -> tuple[Point, ...]:
    """The longest run of consecutive ring points with x0 <= x <= x1 on the upper (or lower) side of the piece.

    The side is judged against the middle of the piece's depth over that x range, so a straight end face that
    joins the two sides inside the range is not taken along.
    """
    pts = np.asarray(ring)
    inside = (pts[:, 0] >= x0) & (pts[:, 0] <= x1)
    if not inside.any():
        return ()
    mid = 0.5 * (pts[inside, 1].max() + pts[inside, 1].min())
    inside &= (pts[:, 1] > mid) if upper else (pts[:, 1] < mid)
    if not inside.any() or inside.all():
        return ()
    start = int(np.argmin(inside))  # a point outside: runs never wrap past it
    runs: list[list[int]] = []
    for i in np.roll(np.arange(len(pts)), -start):
        if inside[i]:
            if runs and runs[-1][-1] == (i - 1) % len(pts):
                runs[-1].append(int(i))
            else:
                runs.append([int(i)])
    runs = [r for r in runs if len(r) >= 2]
    if not runs:
        return ()
    best = max(runs, key=len)
    return tuple((float(pts[i, 0]), float(pts[i, 1])) for i in best)


def die_drawing(die: DieInput, model: OutlineModel, marks: PlacedMarks, tiles: TileLayout | None = None,
                joggles: Sequence[tuple[str, float, float, float, float, tuple[Point, ...]]] = (), title: str = "",
                settings: BuildSettings = DEFAULT_SETTINGS) -> DieDrawing:
    """The drawing of ``die`` (its outline model ``model``, its laid-out ``marks``, its print-bed ``tiles``).

    ``joggles``: (surface "upper"/"lower", x_start, x_end, depth, ramp, path) in mm, the full-depth zone and the
    run-out at each open end — or, for a drawn part's joggle (surface "outline"), ``path``, the recessed stretch;
    ``title``: a line naming where the die comes from.  The alignment dowels across the tile joints are drawn in
    plan, each running along X into both tiles.
    """
    if die.profiles is None:
        flat = _ring(model.offset(top_face_inset_mm(die), spacing_mm=SAMPLE_MM))
        bottom_pieces = section(die, model, bottom_inset_mm(die), die.height_mm)
        even = model.offset(bottom_inset_mm(die), spacing_mm=SAMPLE_MM, flute_scale=flute_scale(die, die.height_mm))
    else:  # a wall whose profile changes along the outline: its sections' insets change with it
        flat = _ring(level_section(die, model, top_level(die), spacing_mm=SAMPLE_MM))
        bottom_pieces = level_section(die, model, depth_level(die, die.height_mm))
        even = level_section(die, model, depth_level(die, die.height_mm), spacing_mm=SAMPLE_MM)
    top = _ring(model.offset(0.0, spacing_mm=SAMPLE_MM))
    polylines = [Polyline(TOP_OUTLINE.name, top, True), Polyline(TOP_FLAT.name, flat, True),
                 Polyline(BOTTOM_OUTLINE.name, _ring(even), True)]
    for span, piece in zip(model.spans, bottom_pieces):
        if span.kind == "groove":
            polylines.append(Polyline(FLUTES.name, tuple((_plain(x), _plain(y)) for x, y in piece.points), False))
    texts: list[Text] = []
    table: list[str] = []
    h = TEXT_MM
    xmin, ymin, xmax, ymax = (min(p[0] for p in top), min(p[1] for p in top), max(p[0] for p in top),
                              max(p[1] for p in top))
    for k, (surface, x0, x1, depth, ramp, path) in enumerate(joggles, start=1):
        if surface == "outline":
            stretch = tuple((_plain(x), _plain(y)) for x, y in path)
            polylines.append(Polyline(JOGGLES.name, stretch, False))
            mid = stretch[len(stretch) // 2]
            texts.append(Text(JOGGLES.name, _plain(mid[0] - h), _plain(mid[1] - 2.5 * h), h, f"J{k}"))
            table.append(f"J{k}: JOGGLE RECESS {depth:.2f} DEEP IN THE WALL ALONG THE MARKED STRETCH, FROM "
                         f"({stretch[0][0]:.1f}, {stretch[0][1]:.1f}) TO ({stretch[-1][0]:.1f}, {stretch[-1][1]:.1f}), "
                         f"RUN-OUTS {ramp:.1f} LONG")
            continue
        stretch = _stretch_between(top, x0 - ramp, x1 + ramp, surface == "upper")
        if stretch:
            polylines.append(Polyline(JOGGLES.name, stretch, False))
            mid = stretch[len(stretch) // 2]
            y = mid[1] + 1.5 * h if surface == "upper" else mid[1] - 2.5 * h
            texts.append(Text(JOGGLES.name, _plain(mid[0] - h), _plain(y), h, f"J{k}"))
            table.append(f"J{k}: JOGGLE RECESS {depth:.2f} DEEP IN THE {surface.upper()} WALL, FULL DEPTH FROM "
                         f"X {max(x0, xmin):.1f} TO {min(x1, xmax):.1f}, RUN-OUTS {ramp:.1f} LONG")
    circles: list[Circle] = []
    for k, bore in enumerate(die.bores, start=1):
        circles.append(Circle(BORES.name, _plain(bore.x), _plain(bore.y), bore.d))
        texts.append(Text(BORES.name, _plain(bore.x - h), _plain(bore.y - h / 2), h, f"B{k}"))
        table.append(f"B{k}: BORE DIA {bore.d:.2f} THROUGH AT ({bore.x:.2f}, {bore.y:.2f}), TOP EDGE ROUNDED "
                     f"R{die.bore_radius_mm:.2f}")
    for k, pin in enumerate(die.pins, start=1):
        depth = "THROUGH" if pin.depth >= die.height_mm - 1e-9 else f"{pin.depth:.1f} DEEP FROM THE TOP FACE"
        circles.append(Circle(DOWEL_HOLES.name, _plain(pin.x), _plain(pin.y), pin.d))
        texts.append(Text(DOWEL_HOLES.name, _plain(pin.x + pin.d), _plain(pin.y + pin.d / 2), 0.8 * h, f"P{k}"))
        table.append(f"P{k}: DOWEL HOLE DIA {pin.d:.2f} {depth} AT ({pin.x:.2f}, {pin.y:.2f})")
    for mark in marks.polygons:
        for ring in (mark.exterior, *mark.interiors):
            pts = tuple((_plain(x), _plain(y)) for x, y in list(ring.coords)[:-1])
            polylines.append(Polyline(MARKS.name, pts, True))
    if tiles is not None:
        for x in tiles.joints_x_mm:
            polylines.append(Polyline(TILE_JOINTS.name, ((_plain(x), _plain(ymin - 5.0)),
                                                         (_plain(x), _plain(ymax + 5.0))), False))
        for k, (x, y, z) in enumerate(tiles.dowels, start=1):
            half, r = tiles.dowel_depth_mm, tiles.dowel_d_mm / 2
            corners = ((x - half, y - r), (x + half, y - r), (x + half, y + r), (x - half, y + r))
            polylines.append(Polyline(TILE_JOINTS.name, tuple((_plain(a), _plain(b)) for a, b in corners), True))
            texts.append(Text(TILE_JOINTS.name, _plain(x + half + 1.0), _plain(y - h / 2), 0.8 * h, f"D{k}"))
            table.append(f"D{k}: ALIGNMENT DOWEL HOLE DIA {tiles.dowel_d_mm:g} ALONG X, {half:g} INTO EACH TILE, "
                         f"AXIS AT Y {y:.2f}, Z {z:.2f}, ACROSS THE JOINT AT X {x:.2f}")
        if len(tiles.tiles) > 1:
            for span in tiles.tiles:
                texts.append(Text(TILE_JOINTS.name, _plain(0.5 * (span.x_min_mm + span.x_max_mm) - h),
                                  _plain(ymax + 7.0), h, f"TILE {span.number}"))
    notes = [
        (f"{die.part_id} DIE", 1.4 * h),
        (title, 0.8 * h),
        (f"MM, SEEN FROM THE TOP FACE (Z = 0); BLOCK {die.height_mm:.2f} HIGH, WALL UNDERCUT "
         f"{die.undercut_deg:.2f} DEG, TOP EDGE RADIUS {die.top_radius_mm:.2f}", 0.8 * h),
        ("TOP-OUTLINE: MOLD LINE. TOP-FLAT: WHERE THE EDGE RADIUS STARTS. BOTTOM-OUTLINE: WALL AT THE BOTTOM FACE.",
         0.8 * h),
        (f"MARKS: ENGRAVED {settings.engrave_depth_mm:g} DEEP ON THE BOTTOM FACE, DRAWN AS SEEN FROM THE TOP: "
         "MIRROR ABOUT X FOR A BOTTOM-UP SET-UP.", 0.8 * h),
    ]
    if die.profiles is not None:  # each flange run's own wall, changing between them
        notes[2] = (f"MM, SEEN FROM THE TOP FACE (Z = 0); BLOCK {die.height_mm:.2f} HIGH; THE WALL CHANGES ALONG THE "
                    "OUTLINE:", 0.8 * h)
        names = die.run_names or tuple(f"RUN {i + 1}" for i in range(len(die.outline)))
        for name, profile in dict.fromkeys(zip(names, die.profiles, strict=True)):
            if profile is not None:
                lean = "IN" if profile.lean_deg >= 0 else "OUT"
                notes.append((f"{name.upper()}: TOP EDGE RADIUS {profile.radius_mm:.2f}, WALL LEANING {lean} "
                              f"{abs(profile.lean_deg):.2f} DEG (DIE ANGLE {profile.die_angle_deg:.2f} DEG)", 0.8 * h))
    notes += [(line, 0.8 * h) for line in table]
    y = ymin - 8.0
    for text, height in notes:
        if text:
            y -= 1.8 * height
            texts.append(Text(NOTES.name, _plain(xmin), _plain(y), height, text))
    return DieDrawing(die.part_id, title, DIE_LAYERS, tuple(polylines), tuple(circles), tuple(texts))


__all__ = [
    "BORES",
    "BOTTOM_OUTLINE",
    "DIE_LAYERS",
    "DOWEL_HOLES",
    "FLUTES",
    "JOGGLES",
    "MARKS",
    "NOTES",
    "SAMPLE_MM",
    "TEXT_MM",
    "TILE_JOINTS",
    "TOP_FLAT",
    "TOP_OUTLINE",
    "Circle",
    "DieDrawing",
    "Polyline",
    "Text",
    "die_drawing",
]
