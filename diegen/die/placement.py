"""Where the die's holes and marks go: checks and 2D shapes (pure 2D, no kernel).

Conventions as in :mod:`diegen.die.model` (mm, degrees, top face at z = 0,
block down to z = −height).  Every hole is checked against the smallest
horizontal section of the die (flutes included) and against the other holes
before any solid is made, raising :class:`GeometryError` with the feature and
what to change.  :func:`diegen.die.occ.form_block.build_body` then makes:

* Pin: a flat-bottomed hole of diameter d, ``depth`` deep from the top face
  (through if ``depth`` equals the height).
* Bore: a through hole of diameter d whose top edge is rounded by the bore top
  radius (the lightening-hole flange bends down into it).
* Engraving: the given lines and an arrow as polygons on the bottom face
  (:func:`engraving_marks`), sunk ``engrave_depth_mm`` into it.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

import numpy as np
import shapely
from shapely.geometry import Point, Polygon, box
from shapely.ops import polylabel

from diegen.die import lettering
from diegen.die.die_input import DieInput
from diegen.die.model import depth_level, level_section, section, top_level
from diegen.die.outline import OutlineModel, pieces_to_polygon
from diegen.die.settings import BuildSettings
from diegen.errors import GeometryError, NoRoomForMarks
from diegen.geometry import die_wall

__all__ = ["ARROW_LENGTH", "check_placement", "engraving_marks"]


def smallest_section(die: DieInput, model: OutlineModel) -> Polygon:
    """What every horizontal section of the die contains: the flat top face and the bottom face, flutes and all."""
    if die.profiles is None:
        top = pieces_to_polygon(model.offset(die_wall.top_setback_mm(die.top_radius_mm, die.undercut_deg)))
    else:
        top = pieces_to_polygon(level_section(die, model, top_level(die)))
    return top.intersection(_bottom_section(die, model))


def _bottom_section(die: DieInput, model: OutlineModel) -> Polygon:
    if die.profiles is not None:
        return pieces_to_polygon(level_section(die, model, depth_level(die, die.height_mm)))
    return pieces_to_polygon(section(die, model, die_wall.wall_inset_mm(die.height_mm, die.undercut_deg),
                                     die.height_mm))


def check_placement(die: DieInput, model: OutlineModel, settings: BuildSettings) -> None:
    """Raise :class:`GeometryError` for a hole the die cannot carry (the outline model has checked the flutes)."""
    inner = smallest_section(die, model)
    wall = settings.min_wall_mm
    footprints: list[tuple[str, Polygon]] = []
    for pin in die.pins:
        name = f"pin hole at ({pin.x:g}, {pin.y:g}) mm"
        if not (pin.d > 0 and pin.depth > 0):
            raise GeometryError(f"die {die.part_id}: {name}: diameter and depth must be positive")
        if pin.depth > die.height_mm + 1e-9:
            raise GeometryError(
                f"die {die.part_id}: {name} is {pin.depth:g} mm deep, deeper than the {die.height_mm:g} mm block"
            )
        if die.height_mm - wall < pin.depth < die.height_mm - 1e-9:
            raise GeometryError(
                f"die {die.part_id}: {name} is {pin.depth:g} mm deep and leaves less than {wall:g} mm under it in "
                f"the {die.height_mm:g} mm block: drill it through or less deep"
            )
        footprints.append((name, Point(pin.x, pin.y).buffer(pin.d / 2.0, quad_segs=32)))
    for bore in die.bores:
        name = f"bore at ({bore.x:g}, {bore.y:g}) mm"
        if not bore.d > 0:
            raise GeometryError(f"die {die.part_id}: {name}: diameter must be positive")
        footprints.append((name, Point(bore.x, bore.y).buffer(bore.d / 2.0 + die.bore_radius_mm, quad_segs=32)))
    for name, shape in footprints:
        if not inner.buffer(-wall).contains(shape):
            raise GeometryError(
                f"die {die.part_id}: {name} (with its edge rounding) comes closer than {wall:g} mm to the die's "
                "edge: move it inward or make it smaller"
            )
    for i, (name_a, a) in enumerate(footprints):
        for name_b, b in footprints[i + 1:]:
            if a.distance(b) < wall:
                raise GeometryError(
                    f"die {die.part_id}: {name_a} and {name_b} are closer than {wall:g} mm: move them apart"
                )


@dataclass(frozen=True)
class PlacedMarks:
    """The engraving laid out on the bottom face (mm, die coordinates; see :func:`place_marks`).

    ``lines``: the lines of text engraved (with the arrow under them; none, no arrow);
    ``polygons``: every groove — the lines, the arrow and the tile numbers;
    ``tile_labels``: for a die printed in tiles, the label engraved on each tile, or None where there was no room.
    """

    lines: tuple[str, ...]
    polygons: tuple[Polygon, ...]
    tile_labels: tuple[str | None, ...] = ()


PITCH = 1.6  # line pitch as a multiple of the letter height


def _free_face(die: DieInput, model: OutlineModel, settings: BuildSettings) -> tuple[Any, float]:
    """Where marks may go on the bottom face (clear of its edge, the flutes, bores, deep pins and tile joints)."""
    depth = settings.engrave_depth_mm
    margin = max(settings.min_wall_mm, 2.0)
    free = _bottom_section(die, model).buffer(-margin)
    for bore in die.bores:
        free = free.difference(Point(bore.x, bore.y).buffer(bore.d / 2.0 + margin))
    for pin in die.pins:
        if pin.depth >= die.height_mm - depth - settings.min_wall_mm:
            free = free.difference(Point(pin.x, pin.y).buffer(pin.d / 2.0 + margin))
    if die.tile_joints_x_mm:
        _, y0, _, y1 = free.bounds if not free.is_empty else (0.0, 0.0, 0.0, 0.0)
        for x in die.tile_joints_x_mm:  # no joint may cut a letter
            free = free.difference(box(x - margin, y0 - 1.0, x + margin, y1 + 1.0))
    return free, margin


def _text_strokes(lines: list[str], cx: float, top: float, size: float) -> list[lettering.Stroke]:
    """Strokes of ``lines`` centred on ``cx``, the first line's top at ``top`` (letters' tops towards −Y)."""
    unit = size / lettering.CAP_UNITS
    strokes = []
    for i, line in enumerate(lines):
        width = lettering.line_width_units(line) / lettering.CAP_UNITS
        x0 = cx - width * size / 2.0
        base = top + (i * PITCH + 0.5 * (PITCH - 1.0) + 1.0) * size  # the baseline, its letters towards −Y
        strokes += [tuple((x0 + u * unit, base - v * unit) for u, v in stroke)
                    for stroke in lettering.line_strokes(line)]
    return strokes


def place_marks(die: DieInput, model: OutlineModel, settings: BuildSettings) -> PlacedMarks:
    """The engraving on the bottom face: the lines of text and an arrow, and each tile's number.

    Single-stroke capitals (:mod:`diegen.die.lettering`), as large as fit
    between ``engrave_min_height_mm`` and ``engrave_max_height_mm``, placed in
    the bottom face clear of the edge, the flutes, the bores, the pins that
    reach it and the tile joints.  Seen from below with the die turned over
    about the X axis the text reads normally, the first line on top, with an
    arrow under it pointing forward (towards −X, the leading edge).  A die
    printed in tiles (``tile_joints_x_mm``) gets ``<part id> k/n`` (or ``k/n``
    where that is too long) on every tile, clear of the other marks.  Raises
    :class:`NoRoomForMarks` when there is no room for the lines.
    """
    lines = [line for line in die.engraving if line.strip()]
    free, margin = _free_face(die, model, settings)
    polygons: list[Polygon] = []
    taken = None
    if lines:
        widths = [lettering.line_width_units(line) / lettering.CAP_UNITS for line in lines]  # per mm of letter height
        placed = _largest_fit(free, settings, lambda size: (
            max(max(widths) + lettering.STROKE_FRACTION, ARROW_LENGTH) * size, PITCH * size * (len(lines) + 1)))
        if placed is None:
            raise NoRoomForMarks(
                f"die {die.part_id}: no room on the bottom face for the engraving {lines!r} at "
                f"{settings.engrave_min_height_mm:g} mm letter height: shorten it or leave it out"
            )
        (cx, cy), size, (block_w, block_h) = placed
        top = cy - block_h / 2.0  # the first line is on top when turned over: at the smallest Y
        polygons += lettering.stroke_polygons(_text_strokes(lines, cx, top, size), lettering.STROKE_FRACTION * size)
        polygons.append(_arrow(cx, top + (len(lines) + 0.5) * PITCH * size, ARROW_LENGTH * size, 0.8 * size))
        taken = box(cx - block_w / 2, cy - block_h / 2, cx + block_w / 2, cy + block_h / 2).buffer(margin)
    labels: list[str | None] = []
    if die.tile_joints_x_mm:
        x0, _, x1, _ = _bottom_section(die, model).bounds
        edges = [x0 - 1.0, *die.tile_joints_x_mm, x1 + 1.0]
        count = len(edges) - 1
        for k in range(count):
            region = free.intersection(box(edges[k], -1e9, edges[k + 1], 1e9))
            if taken is not None:
                region = region.difference(taken)
            label = None
            for text in (f"{die.part_id} {k + 1}/{count}", f"{k + 1}/{count}"):
                width = lettering.line_width_units(text) / lettering.CAP_UNITS + lettering.STROKE_FRACTION
                found = _largest_fit(region, settings, lambda size, w=width: (w * size, PITCH * size))
                if found is not None:
                    (cx, cy), size, (_, block_h) = found
                    polygons += lettering.stroke_polygons(_text_strokes([text], cx, cy - block_h / 2.0, size),
                                                          lettering.STROKE_FRACTION * size)
                    label = text
                    break
            labels.append(label)
    return PlacedMarks(tuple(lines), tuple(polygons), tuple(labels))


def _largest_fit(free: Any, settings: BuildSettings, block: Any) -> tuple[tuple[float, float], float,
                                                                          tuple[float, float]] | None:
    """Spot, letter height and block size of the largest block (``block(size)`` → (w, h)) that fits in ``free``."""
    size = settings.engrave_max_height_mm
    while size >= settings.engrave_min_height_mm - 1e-9:
        w, h = block(size)
        spot = _find_spot(free, w, h)
        if spot is not None:
            return spot, size, (w, h)
        size *= 0.85
    return None


def engraving_marks(die: DieInput, model: OutlineModel, settings: BuildSettings) -> list[Polygon]:
    """The engraving's grooves on the bottom face as polygons (mm, die coordinates); see :func:`place_marks`."""
    return list(place_marks(die, model, settings).polygons)


def fit_marks(die: DieInput, model: OutlineModel, settings: BuildSettings) -> PlacedMarks:
    """The marks that fit: all the engraving's lines, else the first (the part id) alone, else none."""
    for lines in (die.engraving, die.engraving[:1], ()):
        try:
            return place_marks(replace(die, engraving=lines), model, settings)
        except NoRoomForMarks:
            continue
    raise AssertionError("a die without lines of text needs no room for them")


ARROW_LENGTH = 4.0  # the orientation arrow's length as a multiple of the letter height


def _find_spot(free: Any, w: float, h: float) -> tuple[float, float] | None:
    """Centre of a w × h rectangle lying inside ``free``, as far from its edge as the candidates allow.

    Candidates: the pole of inaccessibility of each part of ``free``, then a
    25 × 9 grid over its bounds; the parts are tried largest first.
    """
    if free.is_empty:
        return None
    parts = list(free.geoms) if hasattr(free, "geoms") else [free]
    parts.sort(key=lambda g: -g.area)
    for part in parts:
        x0, y0, x1, y1 = part.bounds
        xs = np.linspace(x0 + w / 2, x1 - w / 2, 25) if x1 - x0 > w else np.empty(0)
        ys = np.linspace(y0 + h / 2, y1 - h / 2, 9) if y1 - y0 > h else np.empty(0)
        gx, gy = np.meshgrid(xs, ys)
        pole = polylabel(part, tolerance=0.5).coords[0]
        cx = np.concatenate([[pole[0]], gx.ravel()])
        cy = np.concatenate([[pole[1]], gy.ravel()])
        rects = shapely.box(cx - w / 2, cy - h / 2, cx + w / 2, cy + h / 2)
        shapely.prepare(part)
        inside = shapely.contains(part, rects)
        if not inside.any():
            continue
        clearance = np.where(inside, shapely.distance(part.boundary, rects), -1.0)
        best = int(np.argmax(clearance))
        return float(cx[best]), float(cy[best])
    return None


def _arrow(cx: float, cy: float, length: float, width: float) -> Polygon:
    """A flat arrow centred at (cx, cy) pointing towards −X."""
    half, shaft, head = length / 2.0, width * 0.35, length * 0.35
    pts = [(half, shaft), (-half + head, shaft), (-half + head, width), (-half, 0.0), (-half + head, -width),
           (-half + head, -shaft), (half, -shaft)]
    return Polygon([(cx + x, cy + y) for x, y in pts])
