"""Cut a die longer than a printer's bed into the tiles of its layout, joined by alignment dowels.

The layout — where the joints are, the dowels' size and depth — is plain
numbers (:mod:`diegen.die.tiles`); here the kernel finds room for the dowels
across each joint (``min_wall_mm`` of material round every dowel hole and
clear of every other face along its length), drills them and cuts the tiles.
Tiles keep the die's coordinates (mm); ``along_bed_y`` says whether a tile's X
runs along the bed's Y to fit.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from diegen.die.die_input import DieInput
from diegen.die.occ.shapes import bounding_box, box, cylinder, quiet_kernel, raw, solids
from diegen.die.occ.threads import parallel_ok
from diegen.die.occ.validate import check_solid
from diegen.die.tiles import (
    BED_MARGIN_MM,
    DOWEL_D_MM,
    DOWEL_DEPTH_MM,
    MIN_WALL_MM,
    TileLayout,
    die_tile_layout,
    tile_layout,
)
from diegen.errors import GeometryError, SolidError


@dataclass(frozen=True, eq=False)
class DieTile:
    """One printable tile of a die: its place along X (mm) and its solid (the kernel's ``TopoDS_Solid``)."""

    index: int
    x_min_mm: float
    x_max_mm: float
    along_bed_y: bool
    shape: Any


def _inside(shape: Any, pts: list[tuple[float, float, float]]) -> list[bool]:
    from OCP.BRepClass3d import BRepClass3d_SolidClassifier
    from OCP.gp import gp_Pnt
    from OCP.TopAbs import TopAbs_IN

    classifier = BRepClass3d_SolidClassifier(raw(shape))
    out = []
    for x, y, z in pts:
        classifier.Perform(gp_Pnt(x, y, z), 1e-7)
        out.append(classifier.State() == TopAbs_IN)
    return out


def _hits(shape: Any, origin: tuple[float, float, float], direction: tuple[float, float, float]) -> list[float]:
    """Sorted parameters (mm from ``origin``) where the line meets the shape's faces."""
    from OCP.gp import gp_Dir, gp_Lin, gp_Pnt
    from OCP.IntCurvesFace import IntCurvesFace_ShapeIntersector

    inter = IntCurvesFace_ShapeIntersector()
    inter.Load(raw(shape), 1e-7)
    inter.Perform(gp_Lin(gp_Pnt(*origin), gp_Dir(*direction)), -1e6, 1e6)
    return sorted(inter.WParameter(i) for i in range(1, inter.NbPnt() + 1))


def _dowel_spots(shape: Any, x: float, z: float, d: float, depth: float, wall: float) -> list[float]:
    """Y positions for dowels across the joint x, at height z, each with ``wall`` of material round it."""
    hits = _hits(shape, (x, 0.0, z), (0.0, 1.0, 0.0))
    spans = [(hits[i], hits[i + 1]) for i in range(0, len(hits) - 1, 2)]
    if not spans:
        return []
    lo, hi = max(spans, key=lambda s: s[1] - s[0])
    lo, hi = lo + d / 2 + wall, hi - d / 2 - wall
    if hi < lo:
        return []
    wanted = [0.5 * (lo + hi)] if hi - lo < 3 * d else [lo + 0.25 * (hi - lo), lo + 0.75 * (hi - lo)]
    reach = d / 2 + wall

    def clear(y: float) -> bool:
        angles = np.linspace(0, 2 * math.pi, 16, endpoint=False)
        ring = [(y + reach * math.cos(a), z + reach * math.sin(a)) for a in angles]
        if not all(_inside(shape, [(x, yy, zz) for yy, zz in ring])):
            return False
        for yy, zz in ring:  # no face (bore, pin, wall) within the dowel's length
            if any(abs(t) < depth + wall for t in _hits(shape, (x, yy, zz), (1.0, 0.0, 0.0))):
                return False
        return True

    spots: list[float] = []
    for y in wanted:
        for k in range(80):
            yy = y + (0.5 * ((k + 1) // 2)) * (1 if k % 2 else -1)
            if lo <= yy <= hi and all(abs(yy - o) >= d + wall for o in spots) and clear(yy):
                spots.append(yy)
                break
    return spots


def _boolean(kind: str, shape: Any, tools: list[Any]) -> Any:
    """``shape`` cut by, or in common with, ``tools`` (kernel shapes); parallel only where that is safe."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Common, BRepAlgoAPI_Cut
    from OCP.TopTools import TopTools_ListOfShape

    op = BRepAlgoAPI_Cut() if kind == "cut" else BRepAlgoAPI_Common()
    args, others = TopTools_ListOfShape(), TopTools_ListOfShape()
    args.Append(raw(shape))
    for tool in tools:
        others.Append(raw(tool))
    op.SetArguments(args)
    op.SetTools(others)
    op.SetRunParallel(parallel_ok())
    op.Build()
    if not op.IsDone():
        raise SolidError(f"the kernel's boolean {kind} did not finish")
    return op.Shape()


def tile_for_bed(shape_or_die: Any, bed_xy_mm: tuple[float, float], dowel_d_mm: float = DOWEL_D_MM,
                 dowel_depth_mm: float = DOWEL_DEPTH_MM, margin_mm: float = BED_MARGIN_MM,
                 min_wall_mm: float = MIN_WALL_MM) -> list[DieTile]:
    """Split a die (a kernel solid, or a :class:`DieInput` to build) into tiles that fit the bed.

    ``bed_xy_mm`` is the bed's usable size (mm); each tile is kept ``margin_mm``
    inside it.  The layout is :func:`diegen.die.tiles.tile_layout` of the die's
    outline (of the solid's bounding box for a bare solid).  Raise
    :class:`SolidError` when the bed is smaller than one tile can be (narrower
    than the die, shorter than two dowel depths) or a joint has no room for a dowel.
    """
    sizes = {"dowel_d_mm": dowel_d_mm, "dowel_depth_mm": dowel_depth_mm, "margin_mm": margin_mm,
             "min_wall_mm": min_wall_mm}
    try:
        if isinstance(shape_or_die, DieInput):
            from diegen.die.occ.form_block import build_die

            shape = build_die(shape_or_die)
            layout = die_tile_layout(shape_or_die, bed_xy_mm, **sizes)
        else:
            shape = raw(shape_or_die)
            x0, y0, z0, x1, y1, z1 = bounding_box(shape)
            layout = tile_layout((x0, y0, x1, y1), (z0, z1), bed_xy_mm, **sizes)
    except GeometryError as exc:
        raise SolidError(str(exc)) from exc
    return cut_tiles(shape, layout)[0]


def cut_tiles(shape: Any, layout: TileLayout) -> tuple[list[DieTile], list[tuple[float, float, float]]]:
    """Drill the alignment dowel holes across every joint of ``layout`` and cut ``shape`` into its tiles.

    The dowels are where the layout placed them (:func:`diegen.die.tiles.die_tile_layout`); a layout without
    them (of a bare solid) has them found here, by probing the solid along each joint.

    Returns the tiles and the dowels' axis points (x of the joint, y, z; mm), each dowel running along X
    ``layout.dowel_depth_mm`` into either tile.
    """
    quiet_kernel()
    shape = raw(shape)
    check_solid(shape, "die to tile")
    if len(layout.tiles) == 1:
        only = layout.tiles[0]
        return [DieTile(0, only.x_min_mm, only.x_max_mm, only.along_bed_y, shape)], []
    d, depth, wall = layout.dowel_d_mm, layout.dowel_depth_mm, layout.min_wall_mm
    z = layout.dowel_z_mm
    dowels = []
    axes: list[tuple[float, float, float]] = []
    planned: dict[float, list[float]] = {}
    for x, y, _ in layout.dowels:
        planned.setdefault(x, []).append(y)
    for x in layout.joints_x_mm:
        spots = planned.get(x) or ([] if layout.dowels else _dowel_spots(shape, x, z, d, depth, wall))
        if not spots:
            raise SolidError(
                f"no room for a {d:g} mm alignment dowel across the tile joint at x = {x:.1f} mm: "
                "give a smaller dowel, a shorter dowel depth, or a larger bed"
            )
        for y in spots:
            axes.append((x, y, z))
            dowels.append(cylinder(d / 2, 2 * depth, (x - depth, y, z), (1, 0, 0)))
    try:
        drilled = _boolean("cut", shape, dowels)
    except Exception as exc:
        raise SolidError(f"the kernel failed drilling the tile dowel holes ({exc}); give a smaller dowel") from exc
    check_solid(drilled, "die with tile dowel holes", "give a smaller dowel or a shorter dowel depth")
    count = len(layout.tiles)
    tiles = []
    for k, span in enumerate(layout.tiles):
        x0 = span.x_min_mm - (1.0 if k == 0 else 0.0)
        x1 = span.x_max_mm + (1.0 if k == count - 1 else 0.0)
        cutter = box(x1 - x0, span.y_max_mm - span.y_min_mm + 2, span.z_max_mm - span.z_min_mm + 2,
                     (x0, span.y_min_mm - 1, span.z_min_mm - 1))
        try:
            piece = _boolean("common", drilled, [cutter])
        except Exception as exc:
            raise SolidError(f"the kernel failed cutting tile {k + 1} of {count} ({exc})") from exc
        parts = solids(piece)
        if len(parts) != 1:
            raise SolidError(
                f"tile {k + 1} of {count} falls apart into {len(parts)} pieces: the die is too thin across the cut; "
                "use a larger bed"
            )
        tile = parts[0]
        check_solid(tile, f"tile {k + 1} of {count}")
        tiles.append(DieTile(k, span.x_min_mm, span.x_max_mm, span.along_bed_y, tile))
    return tiles, axes

__all__ = ["DieTile", "cut_tiles", "tile_for_bed"]
