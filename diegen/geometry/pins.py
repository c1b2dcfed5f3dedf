"""Tooling-pin (dowel) spots: the blank is pinned to the die through the web.

``auto`` puts two pins as far apart along the piece as the web allows (a third
in the middle of long pieces), each clear of the flange bend line and of the
lightening holes by the hole rules' edge margin.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import shapely
from shapely.geometry import LineString, Polygon
from shapely.geometry import Point as ShapelyPoint

from diegen.errors import GeometryError
from diegen.geometry.polygon import QUAD_SEGS
from diegen.geometry.types import Hole, Pin
from diegen.spec.model import PinSpot

SCAN_LINES = 200  # candidate x positions across the piece
LONG_PIECE_MM = 400.0  # pieces longer than this get a third pin (common practice, no source)


def pin_room(piece: Polygon, bend_radius: float, margin: float, diameter: float, holes: Sequence[Hole]) -> shapely.Geometry:
    """Where a pin centre may go (mm)."""
    room = piece.buffer(-(bend_radius + margin + diameter / 2), quad_segs=QUAD_SEGS)
    for hole in holes:
        room = room.difference(ShapelyPoint(hole.x, hole.y).buffer(hole.d / 2 + margin + diameter / 2, quad_segs=QUAD_SEGS))
    return room


def _spots(room: shapely.Geometry, xs: np.ndarray) -> list[tuple[float, float]]:
    """For each x, the middle of the longest vertical chord of ``room`` there (x with none are left out)."""
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
        raise GeometryError(f"the {piece_name} piece has no web left for tooling pins of {diameter:.2f} mm "
                            f"(bend radius {bend_radius:.2f} mm + margin {margin:.2f} mm from the bend line and holes)")
    minx, _, maxx, _ = room.bounds
    inset = min(2.0, 0.1 * (maxx - minx))
    xs = np.linspace(minx + inset, maxx - inset, SCAN_LINES)
    spots = _first_spots(room, xs) + _first_spots(room, xs[::-1])[::-1]
    if len(spots) < 2 or spots[-1][0] - spots[0][0] < 2 * diameter:
        raise GeometryError(f"the {piece_name} piece has no room for two tooling pins {2 * diameter:.1f} mm apart")
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
                raise GeometryError(f"pins[{index}]: no web for a pin at x = {spot.x_mm:.1f} mm in the {piece_name} piece")
            y = found[0][1]
        if not room.contains(ShapelyPoint(spot.x_mm, y)):
            raise GeometryError(f"pins[{index}] at ({spot.x_mm:.1f}, {y:.1f}) mm falls in a hole, a flange or "
                                f"within {margin:.1f} mm of one in the {piece_name} piece")
        pins.append(Pin(spot.x_mm, y, diameter))
    return tuple(pins)
