"""Tooling-pin (dowel) spots: the blank is pinned to the die through the web.

``auto`` puts two pins as far apart along the piece as the web allows (a third
in the middle of long pieces), each clear of the flange bend line and of the
lightening holes by the hole rules' edge margin.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
import shapely
from shapely.geometry import LineString, Polygon
from shapely.geometry import Point as ShapelyPoint

from diegen.errors import GeometryError
from diegen.geometry.polygon import QUAD_SEGS, inscribed_diameter, vertical_extent
from diegen.geometry.types import Hole, Pin
from diegen.spec.model import PinSpot

__all__ = ["LONG_PIECE_MM", "SCAN_LINES", "auto_pins", "explicit_pins", "pin_room", "pin_web_depth"]

SCAN_LINES = 200  # candidate x positions across the piece
LONG_PIECE_MM = 400.0  # pieces longer than this get a third pin (common practice, no source)


def pin_room(piece: Polygon, bend_radius: float, margin: float, diameter: float,
             holes: Sequence[Hole]) -> shapely.Geometry:
    """Where a pin centre may go (mm)."""
    room = piece.buffer(-(bend_radius + margin + diameter / 2), quad_segs=QUAD_SEGS)
    for hole in holes:
        keep_off = ShapelyPoint(hole.x, hole.y).buffer(hole.d / 2 + margin + diameter / 2, quad_segs=QUAD_SEGS)
        room = room.difference(keep_off)
    return room


def _spots(room: shapely.Geometry, xs: np.ndarray) -> list[tuple[float, float]]:
    """For each x, the middle of the longest vertical chord of ``room`` there (x with none are left out)."""
    if room.is_empty:
        return []
    _, miny, _, maxy = room.bounds
    lines = shapely.linestrings([[(x, miny - 1), (x, maxy + 1)] for x in xs])
    spots = []
    for x, cut in zip(xs, shapely.intersection(room, lines)):
        segments = [g for g in getattr(cut, "geoms", [cut]) if isinstance(g, LineString) and g.length > 0]
        if segments:
            best = max(segments, key=lambda g: g.length)
            spots.append((float(x), 0.5 * (best.coords[0][1] + best.coords[-1][1])))
    return spots


def _first_spots(room: shapely.Geometry, xs: np.ndarray, chunk: int = 8) -> list[tuple[float, float]]:
    """The first spot along ``xs`` (tried a few lines at a time), as a one-item list, or []."""
    for start in range(0, len(xs), chunk):
        found = _spots(room, xs[start:start + chunk])
        if found:
            return found[:1]
    return []


def auto_pins(piece: Polygon, bend_radius: float, margin: float, diameter: float, holes: Sequence[Hole],
              piece_name: str) -> tuple[Pin, ...]:
    room = pin_room(piece, bend_radius, margin, diameter, holes)
    if room.is_empty:
        deepest = inscribed_diameter(piece)
        need = pin_web_depth(bend_radius, margin, diameter)
        why = (f"its web is only {deepest:.2f} mm deep at its deepest and a pin needs {need:.2f} mm"
               if deepest < need else "the lightening holes leave no such spot")
        raise GeometryError(f"the {piece_name} piece has no web left for tooling pins of {diameter:.2f} mm "
                            f"(bend radius {bend_radius:.2f} mm + margin {margin:.2f} mm from the bend line and "
                            f"holes): {why}; use thinner dowels (dowel_diameter), a smaller hole_rules.edge_margin, "
                            "fewer or smaller holes, or tooling pins placed by hand")
    minx, _, maxx, _ = room.bounds
    inset = min(2.0, 0.1 * (maxx - minx))
    xs = np.linspace(minx + inset, maxx - inset, SCAN_LINES)
    spots = _first_spots(room, xs) + _first_spots(room, xs[::-1])[::-1]
    if len(spots) < 2 or spots[-1][0] - spots[0][0] < 2 * diameter:
        raise GeometryError(f"the {piece_name} piece has no room for two tooling pins {2 * diameter:.1f} mm apart: "
                            "use thinner dowels (dowel_diameter) or a smaller hole_rules.edge_margin, or clamp the "
                            "blank to the die by hand")
    chosen = [spots[0], spots[-1]]
    if spots[-1][0] - spots[0][0] > LONG_PIECE_MM:
        middle = 0.5 * (spots[0][0] + spots[-1][0])
        near_middle = xs[np.argsort(np.abs(xs - middle))]
        found = _first_spots(room, near_middle)
        if found:
            chosen.insert(1, found[0])
    return tuple(Pin(round(x, 3), round(y, 3), diameter) for x, y in chosen)


def explicit_pins(piece: Polygon, x_range: tuple[float, float], bend_radius: float, margin: float, diameter: float,
                  holes: Sequence[Hole], wanted: Sequence[PinSpot], piece_name: str) -> tuple[Pin, ...]:
    room = pin_room(piece, bend_radius, margin, diameter, holes)
    pins = []
    for index, spot in enumerate(wanted):
        if not x_range[0] <= spot.x_mm <= x_range[1]:
            continue
        y = spot.y_mm
        if y is None:
            found = _spots(room, np.array([spot.x_mm]))
            if not found:
                extent = vertical_extent(piece, spot.x_mm)
                y_mid = 0.0 if extent is None else 0.5 * (extent[0] + extent[1])
                raise GeometryError(f"pins[{index}]: no web for a pin at x = {spot.x_mm:.1f} mm in the {piece_name} "
                                    f"piece: {_why_not(piece, spot.x_mm, y_mid, bend_radius, margin, diameter, holes)}")
            y = found[0][1]
        if not room.contains(ShapelyPoint(spot.x_mm, y)):
            raise GeometryError(f"pins[{index}] at ({spot.x_mm:.1f}, {y:.1f}) mm in the {piece_name} piece: "
                                f"{_why_not(piece, spot.x_mm, y, bend_radius, margin, diameter, holes)}")
        pins.append(Pin(spot.x_mm, y, diameter))
    return tuple(pins)


def pin_web_depth(bend_radius: float, margin: float, diameter: float) -> float:
    """Shallowest web (mm) that takes a pin: bend radius and edge margin on each side, plus the pin."""
    return 2 * (bend_radius + margin) + diameter


def _why_not(piece: Polygon, x: float, y: float, bend_radius: float, margin: float, diameter: float,
             holes: Sequence[Hole]) -> str:
    """Why a pin of ``diameter`` centred at (x, y) breaks the margins, with the numbers (mm)."""
    for hole in holes:
        gap = math.dist((x, y), (hole.x, hole.y)) - (hole.d + diameter) / 2
        if gap < margin:
            where = "falls in" if gap < 0 else f"is only {gap:.2f} mm from the edge of"
            return (f"the pin {where} the lightening hole at x = {hole.x:.1f} mm (d = {hole.d:.1f} mm); "
                    f"the rule needs {margin:.1f} mm of web between them")
    extent = vertical_extent(piece, x)
    need = pin_web_depth(bend_radius, margin, diameter)
    if extent is None or extent[1] - extent[0] < need:
        depth = 0.0 if extent is None else extent[1] - extent[0]
        return (f"the die is only {depth:.2f} mm deep there and a {diameter:.2f} mm pin needs {need:.2f} mm "
                f"(bend radius {bend_radius:.2f} mm + edge margin {margin:.1f} mm on each side, plus the pin)")
    centre = ShapelyPoint(x, y)
    inset = bend_radius + margin + diameter / 2
    if not piece.contains(centre):
        return (f"the pin lies {piece.exterior.distance(centre):.2f} mm outside the die outline; a pin centre must "
                f"stand at least {inset:.2f} mm inside it (bend radius {bend_radius:.2f} mm + edge margin "
                f"{margin:.1f} mm + half the pin)")
    clear = piece.exterior.distance(centre) - bend_radius - diameter / 2
    return f"the pin edge is only {clear:.2f} mm from the flange bend line; the rule needs {margin:.1f} mm"
