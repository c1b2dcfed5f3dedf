"""How a printed die longer than the printer's bed is split into tiles (pure 2D, no kernel).

The die is cut by planes x = const (across the chord) into equal tiles; at each joint, dowel holes of
``dowel_d_mm`` run along X, ``dowel_depth_mm`` into each neighbouring tile, at mid-height of the block, so a dowel
(or a length of filament or rod) locates the tiles when they are glued.  Every dowel keeps ``min_wall_mm`` of
material round it over its whole length, clear of the wall, the flutes, the bores and the pins (common practice,
no source).  Each tile is kept ``margin_mm`` inside the bed.  The kernel layer
(:func:`diegen.die.occ.tiles.tile_for_bed`) only carries this plan out, so what is refused here is all that
tiling can refuse.  Lengths in mm, die coordinates (top face at z = 0, the block down to z = −height).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import shapely
from shapely.geometry import LineString, Point, Polygon, box

from diegen.die.die_input import DieInput
from diegen.die.model import loft_sections, section
from diegen.die.outline import OutlineModel, pieces_to_polygon
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.errors import GeometryError
from diegen.geometry import die_wall

DOWEL_D_MM = 5.0  # alignment dowel (or filament, or rod) across each joint (common practice, no source)
DOWEL_DEPTH_MM = 10.0  # how far each dowel reaches into each tile
TILE_MARGIN_MM = 2.0  # room left between a tile and the bed's edge
DOWEL_WALL_MM = 2.0  # least material round a dowel hole
SEARCH_STEP_MM = 0.5  # dowel positions are tried this far apart, outward from the wanted one
SEARCH_STEPS = 80


@dataclass(frozen=True)
class TilePlan:
    """Where the die is cut and where its dowels go (mm)."""

    count: int
    along_bed_y: bool  # each tile's X runs along the bed's Y
    bounds_mm: tuple[float, float, float, float]  # plan extent of the die: x min, y min, x max, y max
    cuts_mm: tuple[float, ...]  # x of each joint
    dowels: tuple[tuple[float, float], ...]  # (x of its joint, y) of every dowel
    dowel_z_mm: float  # the dowels' axis (negative: below the top face)
    dowel_d_mm: float
    dowel_depth_mm: float


def plan_extent(die: DieInput, model: OutlineModel, settings: BuildSettings = DEFAULT_SETTINGS) -> Polygon:
    """The die seen from above: its widest section, where the top-edge arc stands vertical (inset t − R)."""
    setback = die_wall.top_setback_mm(die.top_radius_mm, die.undercut_deg)
    return pieces_to_polygon(section(die, model, setback - die.top_radius_mm, die.top_radius_mm))


def _inset_at(die: DieInput, depth: float) -> float:
    """The wall's inset (mm) at ``depth`` below the top face: on the top-edge arc or on the straight wall."""
    r = die.top_radius_mm
    if depth >= die_wall.fillet_end_depth_mm(r, die.undercut_deg):
        return die_wall.wall_inset_mm(depth, die.undercut_deg)
    # on the arc: depth = R(1 − cos θ); past its vertical tangent (θ > 90°) the arc turns back inward
    theta = math.acos(max(-1.0, min(1.0, 1.0 - max(depth, 0.0) / r)))
    return die_wall.top_setback_mm(r, die.undercut_deg) - r * math.sin(theta)


def _solid_between(die: DieInput, model: OutlineModel, top: float, bottom: float,
                   settings: BuildSettings) -> Polygon:
    """What every horizontal section of the die between the depths ``top`` and ``bottom`` holds, less its holes."""
    arc, wall = loft_sections(die, settings)
    depths = {top, bottom} | {s.depth_mm for s in arc + wall if top < s.depth_mm < bottom}
    region: Polygon | None = None
    for depth in sorted(depths):
        poly = pieces_to_polygon(section(die, model, _inset_at(die, depth), depth))
        region = poly if region is None else region.intersection(poly)
    assert region is not None
    for bore in die.bores:
        region = region.difference(Point(bore.x, bore.y).buffer(bore.d / 2.0, quad_segs=32))
    for pin in die.pins:
        if pin.depth > top:
            region = region.difference(Point(pin.x, pin.y).buffer(pin.d / 2.0, quad_segs=32))
    return region


def plan_tiles(die: DieInput, model: OutlineModel, bed_xy_mm: tuple[float, float],
               settings: BuildSettings = DEFAULT_SETTINGS, dowel_d_mm: float = DOWEL_D_MM,
               dowel_depth_mm: float = DOWEL_DEPTH_MM, margin_mm: float = TILE_MARGIN_MM,
               min_wall_mm: float = DOWEL_WALL_MM) -> TilePlan:
    """The tiles of ``die`` for a bed of ``bed_xy_mm`` (its usable size); :class:`GeometryError` when it cannot be
    tiled (the bed narrower than the die or shorter than a tile can be, the block too thin for the dowels, no room
    for a dowel across a joint), with what to change."""
    extent = plan_extent(die, model, settings)
    x0, y0, x1, y1 = extent.bounds
    xlen, ylen = x1 - x0, y1 - y0
    bx, by = (float(v) - 2 * margin_mm for v in bed_xy_mm)
    min_len = 2 * dowel_depth_mm + 2 * min_wall_mm
    options = [(bx, by, False), (by, bx, True)]
    feasible = [(length, rot) for length, width, rot in options if width >= ylen and length >= min_len]
    if not feasible:
        raise GeometryError(
            f"die {die.part_id}: a bed of {bed_xy_mm[0]:g} × {bed_xy_mm[1]:g} mm cannot take a tile of this die: it "
            f"is {ylen:.1f} mm deep and a tile must be at least {min_len:g} mm long (two dowel depths); use a larger "
            "bed, or cut the die from sheet instead")
    length, along_y = max(feasible)
    count = max(1, math.ceil(xlen / length - 1e-9))
    z_mid = die.height_mm / 2.0
    if count == 1:
        return TilePlan(1, along_y, (x0, y0, x1, y1), (), (), -z_mid, dowel_d_mm, dowel_depth_mm)
    reach = dowel_d_mm / 2.0 + min_wall_mm
    if die.height_mm < 2 * reach + 2 * settings.engrave_depth_mm:
        raise GeometryError(
            f"die {die.part_id}: the die is {die.height_mm:.1f} mm thick, too thin for {dowel_d_mm:g} mm alignment "
            f"dowels across its {count - 1} tile joint(s) (at least {2 * reach + 2 * settings.engrave_depth_mm:g} mm "
            "needed): use a larger bed or taller stock")
    cuts = tuple(x0 + xlen * k / count for k in range(1, count))
    region = _solid_between(die, model, z_mid - reach, z_mid + reach, settings)
    shapely.prepare(region)
    for k in range(count):
        lo_x = cuts[k - 1] if k else x0 - 1.0
        hi_x = cuts[k] if k < count - 1 else x1 + 1.0
        for s in loft_sections(die, settings)[1]:
            part = pieces_to_polygon(section(die, model, s.inset_mm, s.depth_mm)).intersection(
                box(lo_x, y0 - 1.0, hi_x, y1 + 1.0))
            if len(getattr(part, "geoms", [part])) > 1:
                raise GeometryError(
                    f"die {die.part_id}: tile {k + 1} of {count} falls apart into pieces: the die is too thin across "
                    "the cut; use a larger bed")
    dowels = []
    for x in cuts:
        spots = _dowel_spots(region, x, y0, y1, dowel_d_mm, dowel_depth_mm, min_wall_mm)
        if not spots:
            raise GeometryError(
                f"die {die.part_id}: no room for a {dowel_d_mm:g} mm alignment dowel across the tile joint at "
                f"x = {x:.1f} mm: use a larger bed (fewer joints), or move the holes near the joint")
        dowels += [(x, y) for y in spots]
    return TilePlan(count, along_y, (x0, y0, x1, y1), cuts, tuple(dowels), -z_mid, dowel_d_mm, dowel_depth_mm)


def _dowel_spots(region: Polygon, x: float, y0: float, y1: float, d: float, depth: float, wall: float) -> list[float]:
    """Y positions for dowels across the joint x, each with ``wall`` of material round it along its length."""
    cut = region.intersection(LineString([(x, y0 - 1.0), (x, y1 + 1.0)]))
    spans = [g.bounds for g in getattr(cut, "geoms", [cut]) if not g.is_empty and g.length > 0]
    if not spans:
        return []
    _, lo, _, hi = max(spans, key=lambda b: b[3] - b[1])
    reach = d / 2 + wall
    lo, hi = lo + reach, hi - reach
    if hi < lo:
        return []
    wanted = [0.5 * (lo + hi)] if hi - lo < 3 * d else [lo + 0.25 * (hi - lo), lo + 0.75 * (hi - lo)]
    half = depth + wall

    def clear(y: float) -> bool:
        return bool(region.contains(box(x - half, y - reach, x + half, y + reach)))

    spots: list[float] = []
    for y in wanted:
        for k in range(SEARCH_STEPS):
            yy = y + (SEARCH_STEP_MM * ((k + 1) // 2)) * (1 if k % 2 else -1)
            if lo <= yy <= hi and all(abs(yy - o) >= d + wall for o in spots) and clear(yy):
                spots.append(yy)
                break
    return spots


__all__ = ["DOWEL_DEPTH_MM", "DOWEL_D_MM", "TilePlan", "plan_extent", "plan_tiles"]
