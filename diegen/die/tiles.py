"""How a printed die is laid out on a printer's bed, in plain numbers (no kernel).

A die longer than the bed is cut by planes x = const (across the chord) into
equal tiles; alignment dowels cross every joint along X at mid-height of the
block, ``dowel_depth_mm`` into each neighbouring tile, so a dowel (a length of
rod) locates the tiles while they are glued.  Every tile keeps ``margin_mm``
from the bed's edges on every side.  The die's extent comes from its outline:
the wall leans inward below the mold line and the top-edge arc lies inside it,
so the outline's bounds hold the whole block.  Lengths in mm; the top face is
at z = 0 and the block reaches down to z = −height.

The kernel layer (:mod:`diegen.die.occ.tiles`) cuts the solid along this
layout and finds room for the dowels; the report and the shop sheet use it
without the kernel.

Sizes (common practice, no source): a 5 mm alignment dowel 10 mm into each
tile, and 2 mm of material round every dowel hole and at the end of a tile.
The bed margin (2 mm, common practice, no source) keeps each tile off the bed's
outermost edge, where the first layer sticks worst and clips or the frame may
sit.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any

from shapely.geometry import Point, box

from diegen.die.die_input import DieInput
from diegen.errors import GeometryError

if TYPE_CHECKING:  # pragma: no cover
    from diegen.die.outline import OutlineModel

DOWEL_D_MM = 5.0
DOWEL_DEPTH_MM = 10.0
BED_MARGIN_MM = 2.0
MIN_WALL_MM = 2.0


@dataclass(frozen=True)
class TileSpan:
    """One tile: its box in die coordinates (mm) and whether its X runs along the bed's Y."""

    index: int  # 0-based, from the leading edge aft
    x_min_mm: float
    x_max_mm: float
    y_min_mm: float
    y_max_mm: float
    z_min_mm: float
    z_max_mm: float
    along_bed_y: bool

    @property
    def number(self) -> int:
        """The tile's number as engraved and printed on the sheet (1-based)."""
        return self.index + 1

    @property
    def size_mm(self) -> tuple[float, float, float]:
        """Length (along the chord), width and height of the tile's box (mm)."""
        return (self.x_max_mm - self.x_min_mm, self.y_max_mm - self.y_min_mm, self.z_max_mm - self.z_min_mm)


@dataclass(frozen=True)
class TileLayout:
    """A die on a bed: the tiles, the joints between them and the alignment dowels that cross each joint."""

    bed_mm: tuple[float, float] | None  # None: no bed given, the die is one piece
    margin_mm: float
    dowel_d_mm: float
    dowel_depth_mm: float
    min_wall_mm: float
    tiles: tuple[TileSpan, ...]
    # axis points (x of the joint, y, z) of the alignment dowels, each running along X into both tiles;
    # empty until the joints are placed against the die's holes (:func:`die_tile_layout`)
    dowels: tuple[tuple[float, float, float], ...] = ()
    max_tile_mm: float = math.inf  # the longest tile the bed takes (mm)

    @property
    def joints_x_mm(self) -> tuple[float, ...]:
        """x of every joint between neighbouring tiles (mm)."""
        return tuple(t.x_max_mm for t in self.tiles[:-1])

    @property
    def dowel_z_mm(self) -> float:
        """Height of the dowels' axes: mid-height of the block (mm)."""
        first = self.tiles[0]
        return 0.5 * (first.z_min_mm + first.z_max_mm)


def tile_layout(bounds_xy_mm: tuple[float, float, float, float], z_range_mm: tuple[float, float],
                bed_xy_mm: tuple[float, float] | None, dowel_d_mm: float = DOWEL_D_MM,
                dowel_depth_mm: float = DOWEL_DEPTH_MM, margin_mm: float = BED_MARGIN_MM,
                min_wall_mm: float = MIN_WALL_MM) -> TileLayout:
    """Tiles of a block ``bounds_xy_mm`` = (xmin, ymin, xmax, ymax), ``z_range_mm`` = (zmin, zmax), on the bed.

    Raise :class:`GeometryError` when the bed is smaller than one tile can be
    (narrower than the die, or shorter than two dowel depths) or the block is
    too thin for the dowels.
    """
    xmin, ymin, xmax, ymax = (float(v) for v in bounds_xy_mm)
    zmin, zmax = (float(v) for v in z_range_mm)
    xlen, ylen, zlen = xmax - xmin, ymax - ymin, zmax - zmin

    def span(index: int, x0: float, x1: float, along_y: bool) -> TileSpan:
        return TileSpan(index, x0, x1, ymin, ymax, zmin, zmax, along_y)

    common: dict[str, float] = {"margin_mm": margin_mm, "dowel_d_mm": dowel_d_mm, "dowel_depth_mm": dowel_depth_mm,
                                "min_wall_mm": min_wall_mm}
    if bed_xy_mm is None:
        return TileLayout(None, tiles=(span(0, xmin, xmax, False),), **common)
    bed = (float(bed_xy_mm[0]), float(bed_xy_mm[1]))
    bx, by = (v - 2 * margin_mm for v in bed)
    min_len = 2 * dowel_depth_mm + 2 * min_wall_mm
    options = [(bx, by, False), (by, bx, True)]
    feasible = [(length, rot) for length, width, rot in options if width >= ylen and length >= min_len]
    if not feasible:
        raise GeometryError(
            f"a bed of {bed[0]:g} × {bed[1]:g} mm cannot take a tile of this die: it is {ylen:.1f} mm "
            f"deep and a tile must be at least {min_len:g} mm long (two dowel depths); use a larger bed, or cut "
            "the die from sheet instead"
        )
    length, along_y = max(feasible, key=lambda f: f[0])  # the longer way; on a tie, X along the bed's X
    common["max_tile_mm"] = length
    count = max(1, math.ceil(xlen / length - 1e-9))
    if count > 1 and zlen < dowel_d_mm + 2 * min_wall_mm:
        raise GeometryError(
            f"the die is {zlen:.1f} mm thick, too thin for {dowel_d_mm:g} mm alignment dowels: "
            "give a smaller dowel diameter"
        )
    edges = [xmin + xlen * k / count for k in range(count + 1)]
    edges[-1] = xmax
    tiles = tuple(span(k, edges[k], edges[k + 1], along_y) for k in range(count))
    return TileLayout(bed, tiles=tiles, **common)


def tile_file_stems(part_id: str, layout: TileLayout) -> list[str]:
    """The file stems of a die's tiles (``<part>-die-tile<k>``); none when the die is one tile (its own files)."""
    if len(layout.tiles) < 2:
        return []
    return [f"{part_id}-die-tile{span.number}" for span in layout.tiles]


def tile_files(part_id: str, layout: TileLayout) -> list[tuple[str, str]]:
    """(STEP, STL) file names of every tile: the tile's own files, or the die's for a die printed in one piece."""
    stems = tile_file_stems(part_id, layout) or [f"{part_id}-die"]
    return [(f"{stem}.step", f"{stem}.stl") for stem in stems]


def outline_bounds_mm(points: object) -> tuple[float, float, float, float]:
    """(xmin, ymin, xmax, ymax) of a sequence of (x, y) points (mm)."""
    xs = [float(p[0]) for p in points]  # type: ignore[attr-defined, index]
    ys = [float(p[1]) for p in points]  # type: ignore[attr-defined, index]
    return min(xs), min(ys), max(xs), max(ys)


def die_tile_layout(die: DieInput, bed_xy_mm: tuple[float, float] | None, model: OutlineModel | None = None,
                    **sizes: float) -> TileLayout:
    """The tiles of ``die`` on the bed, with joints placed where the alignment dowels have room.

    The die spans its outline's bounds, from its top face (z = 0) down to −height.  Each joint starts at an
    equal split and moves along X (while every tile still fits the bed) to the nearest place where at least
    one dowel fits: ``min_wall_mm`` of material all round it over its whole length, clear of the wall, the
    bores and the pin holes that reach its depth.  Raise :class:`GeometryError` where no such place exists.
    """
    bounds = outline_bounds_mm([p for run in die.outline for p in run.points])
    layout = tile_layout(bounds, (-die.height_mm, 0.0), bed_xy_mm, **sizes)
    if len(layout.tiles) < 2:
        return layout
    from diegen.die.model import outline_model
    from diegen.die.placement import smallest_section

    model = model or outline_model(die)
    reach = layout.dowel_d_mm / 2 + layout.min_wall_mm
    solid = smallest_section(die, model)  # inside the top face and the bottom face: inside every section
    for bore in die.bores:
        solid = solid.difference(Point(bore.x, bore.y).buffer(bore.d / 2 + die.bore_radius_mm, quad_segs=32))
    ring_top = -layout.dowel_z_mm - reach
    for pin in die.pins:
        if pin.depth > ring_top:
            solid = solid.difference(Point(pin.x, pin.y).buffer(pin.d / 2, quad_segs=32))
    return place_joints(layout, solid, die.part_id)


def place_joints(layout: TileLayout, solid: Any, part_id: str = "") -> TileLayout:
    """``layout`` with each joint moved to the nearest place where alignment dowels fit in ``solid``.

    ``solid``: the plan region (shapely) that is material all the way through the dowels' height.
    """
    first, last = layout.tiles[0], layout.tiles[-1]
    xmin, xmax = first.x_min_mm, last.x_max_mm
    count = len(layout.tiles)
    longest = layout.max_tile_mm
    shortest = 2 * layout.dowel_depth_mm + 2 * layout.min_wall_mm
    edges = [xmin]
    dowels: list[tuple[float, float, float]] = []
    for j in range(1, count):
        lo = max(edges[-1] + shortest, xmax - (count - j) * longest)
        hi = min(edges[-1] + longest, xmax - (count - j) * shortest)
        nominal = min(max(xmin + (xmax - xmin) * j / count, lo), hi)
        for x in _outward(nominal, lo, hi, JOINT_STEP_MM):
            spots = dowel_spots(layout, solid, x)
            if spots:
                edges.append(x)
                dowels += [(x, y, layout.dowel_z_mm) for y in spots]
                break
        else:
            who = f"die {part_id}: " if part_id else ""
            raise GeometryError(
                f"{who}no room for a {layout.dowel_d_mm:g} mm alignment dowel across a tile joint anywhere between "
                f"x = {lo:.1f} and {hi:.1f} mm (the bores and the wall leave too little material): use a larger bed "
                "or cut the die from sheet instead"
            )
    edges.append(xmax)
    tiles = tuple(replace(span, x_min_mm=edges[k], x_max_mm=edges[k + 1]) for k, span in enumerate(layout.tiles))
    return replace(layout, tiles=tiles, dowels=tuple(dowels))


JOINT_STEP_MM = 1.0  # how far a joint moves between the places tried


def _outward(start: float, lo: float, hi: float, step: float) -> list[float]:
    """``start``, then alternately a step further right and left, within [lo, hi]."""
    found = [start]
    for k in range(1, int((hi - lo) / step) + 2):
        for x in (start + k * step, start - k * step):
            if lo <= x <= hi:
                found.append(x)
    return found


def dowel_spots(layout: TileLayout, solid: Any, x: float) -> list[float]:
    """y of the dowels across the joint at ``x``: one in the middle of the widest stretch where a dowel fits,
    or two (at its quarter points) where it is at least three diameters wide; none where none fits.

    A dowel fits at y when the plan rectangle it needs, ``depth + wall`` either side of the joint and
    ``d/2 + wall`` either side of y, lies in ``solid``.
    """
    d, wall = layout.dowel_d_mm, layout.min_wall_mm
    half, reach = layout.dowel_depth_mm + wall, d / 2 + wall
    y0, y1 = layout.tiles[0].y_min_mm, layout.tiles[0].y_max_mm
    blocked = box(x - half, y0 - 1.0, x + half, y1 + 1.0).difference(solid)
    forbidden = sorted((part.bounds[1] - reach, part.bounds[3] + reach)
                       for part in getattr(blocked, "geoms", [blocked]) if not part.is_empty)
    free: list[tuple[float, float]] = []
    at = y0 - 1.0
    for a, b in [*forbidden, (y1 + 1.0, y1 + 1.0)]:
        if a > at:
            free.append((at, a))
        at = max(at, b)
    if not free:
        return []
    lo, hi = max(free, key=lambda f: f[1] - f[0])
    if hi - lo >= 3 * d and (hi - lo) / 2 >= d + wall:
        return [lo + 0.25 * (hi - lo), lo + 0.75 * (hi - lo)]
    return [0.5 * (lo + hi)]


__all__ = ["BED_MARGIN_MM", "DOWEL_DEPTH_MM", "DOWEL_D_MM", "MIN_WALL_MM", "TileLayout", "TileSpan", "die_tile_layout",
           "dowel_spots", "outline_bounds_mm", "place_joints", "tile_file_stems", "tile_files", "tile_layout"]
