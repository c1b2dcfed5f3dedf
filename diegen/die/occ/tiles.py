"""Split a die longer than a printer's bed into tiles joined by alignment dowels.

The die is cut by planes x = const (across the chord) into equal tiles; at
each joint, dowel holes of ``dowel_d_mm`` run along X, ``dowel_depth_mm`` into
each neighbouring tile, at mid-height of the block, so a dowel (or a length of
filament or rod) locates the tiles when they are glued.  Tiles keep the die's
coordinates (mm); ``along_bed_y`` says whether a tile's X runs along the bed's
Y to fit.  The dowel clearance rule (``min_wall_mm`` of material round every
dowel hole) is common practice, no source.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from diegen.die.die_input import DieInput
from diegen.die.occ.validate import check_solid
from diegen.errors import SolidError

__all__ = ["DieTile", "tile_for_bed"]


@dataclass(frozen=True, eq=False)
class DieTile:
    """One printable tile of a die: its place along X (mm) and its solid (a cadquery ``Solid``)."""

    index: int
    x_min_mm: float
    x_max_mm: float
    along_bed_y: bool
    shape: Any


def _inside(shape: Any, pts: list[tuple[float, float, float]]) -> list[bool]:
    from OCP.BRepClass3d import BRepClass3d_SolidClassifier
    from OCP.gp import gp_Pnt
    from OCP.TopAbs import TopAbs_IN

    classifier = BRepClass3d_SolidClassifier(shape.wrapped)
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
    inter.Load(shape.wrapped, 1e-7)
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
        ring = [(y + reach * math.cos(a), z + reach * math.sin(a))
                for a in np.linspace(0, 2 * math.pi, 16, endpoint=False)]
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


def tile_for_bed(shape_or_die: Any, bed_xy_mm: tuple[float, float], dowel_d_mm: float = 5.0,
                 dowel_depth_mm: float = 10.0, margin_mm: float = 2.0, min_wall_mm: float = 2.0) -> list[DieTile]:
    """Split a die (a cadquery solid, or a :class:`DieInput` to build) into tiles that fit the bed.

    ``bed_xy_mm`` is the bed's usable size (mm); each tile is kept ``margin_mm``
    inside it.  Raise :class:`SolidError` when the bed is smaller than one tile
    can be (narrower than the die, shorter than two dowel depths) or a joint has
    no room for a dowel.
    """
    import cadquery as cq

    if isinstance(shape_or_die, DieInput):
        from diegen.die.occ.form_block import build_die

        shape = build_die(shape_or_die)
    else:
        shape = shape_or_die if isinstance(shape_or_die, cq.Shape) else cq.Shape.cast(shape_or_die)
    check_solid(shape, "die to tile")
    bb = shape.BoundingBox()
    bx, by = (float(v) - 2 * margin_mm for v in bed_xy_mm)
    min_len = 2 * dowel_depth_mm + 2 * min_wall_mm
    options = [(bx, by, False), (by, bx, True)]
    feasible = [(length, rot) for length, width, rot in options if width >= bb.ylen and length >= min_len]
    if not feasible:
        raise SolidError(
            f"a bed of {bed_xy_mm[0]:g} × {bed_xy_mm[1]:g} mm cannot take a tile of this die: it is {bb.ylen:.1f} mm "
            f"deep and a tile must be at least {min_len:g} mm long (two dowel depths); use a larger bed, or cut "
            "the die from sheet instead"
        )
    length, along_y = max(feasible)
    count = max(1, math.ceil(bb.xlen / length - 1e-9))
    if count == 1:
        return [DieTile(0, bb.xmin, bb.xmax, along_y, shape)]
    if bb.zlen < dowel_d_mm + 2 * min_wall_mm:
        raise SolidError(
            f"the die is {bb.zlen:.1f} mm thick, too thin for {dowel_d_mm:g} mm alignment dowels: "
            "give a smaller dowel diameter"
        )
    cuts = [bb.xmin + bb.xlen * k / count for k in range(1, count)]
    z = bb.zmin + 0.5 * bb.zlen
    dowels = []
    for x in cuts:
        spots = _dowel_spots(shape, x, z, dowel_d_mm, dowel_depth_mm, min_wall_mm)
        if not spots:
            raise SolidError(
                f"no room for a {dowel_d_mm:g} mm alignment dowel across the tile joint at x = {x:.1f} mm: "
                "give a smaller dowel, a shorter dowel depth, or a larger bed"
            )
        for y in spots:
            dowels.append(cq.Solid.makeCylinder(dowel_d_mm / 2, 2 * dowel_depth_mm,
                                                cq.Vector(x - dowel_depth_mm, y, z), cq.Vector(1, 0, 0)))
    try:
        drilled = shape.cut(*dowels)
    except Exception as exc:  # OCP's Standard_Failure family
        raise SolidError(f"the kernel failed drilling the tile dowel holes ({exc}); give a smaller dowel") from exc
    check_solid(drilled, "die with tile dowel holes", "give a smaller dowel or a shorter dowel depth")
    edges = [bb.xmin - 1.0, *cuts, bb.xmax + 1.0]
    tiles = []
    for k in range(count):
        cutter = cq.Solid.makeBox(edges[k + 1] - edges[k], bb.ylen + 2, bb.zlen + 2,
                                  cq.Vector(edges[k], bb.ymin - 1, bb.zmin - 1))
        try:
            piece = drilled.intersect(cutter)
        except Exception as exc:  # OCP's Standard_Failure family
            raise SolidError(f"the kernel failed cutting tile {k + 1} of {count} ({exc})") from exc
        solids = piece.Solids()
        if len(solids) != 1:
            raise SolidError(
                f"tile {k + 1} of {count} falls apart into {len(solids)} pieces: the die is too thin across the cut; "
                "use a larger bed"
            )
        tile = cq.Solid(solids[0].wrapped)
        check_solid(tile, f"tile {k + 1} of {count}")
        x0 = max(edges[k], bb.xmin)
        x1 = min(edges[k + 1], bb.xmax)
        tiles.append(DieTile(k, x0, x1, along_y, tile))
    return tiles
