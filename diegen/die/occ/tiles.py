"""Cut a die solid into the tiles of its plan (see :mod:`diegen.die.tiling`, which decides everything).

The plan's dowel holes are drilled across each joint, then the die is cut by the planes x = const.  Tiles keep
the die's coordinates (mm); ``along_bed_y`` says whether a tile's X runs along the bed's Y to fit.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from diegen.die.die_input import DieInput
from diegen.die.occ.validate import check_solid
from diegen.die.tiling import TilePlan, plan_tiles
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


def tile_for_bed(shape: Any, plan: TilePlan) -> list[DieTile]:
    """Split the die solid ``shape`` (a cadquery solid) into the tiles of ``plan``.

    Raises :class:`SolidError` only when the kernel fails carrying the plan out (a kernel fault).
    """
    import cadquery as cq

    shape = shape if isinstance(shape, cq.Shape) else cq.Shape.cast(shape)
    x0, y0, x1, y1 = plan.bounds_mm
    if plan.count == 1:
        return [DieTile(0, x0, x1, plan.along_bed_y, shape)]
    bb = shape.BoundingBox()  # the die itself was checked when it was built
    depth, z = plan.dowel_depth_mm, plan.dowel_z_mm
    dowels = [cq.Solid.makeCylinder(plan.dowel_d_mm / 2, 2 * depth, cq.Vector(x - depth, y, z), cq.Vector(1, 0, 0))
              for x, y in plan.dowels]
    try:
        drilled = shape.cut(*dowels)
    except Exception as exc:  # OCP's Standard_Failure family
        raise SolidError(f"the kernel failed drilling the tile dowel holes ({exc})") from exc
    check_solid(drilled, "die with tile dowel holes")
    edges = [min(x0, bb.xmin) - 1.0, *plan.cuts_mm, max(x1, bb.xmax) + 1.0]
    low, high = min(y0, bb.ymin) - 1.0, max(y1, bb.ymax) + 1.0
    tiles = []
    for k in range(plan.count):
        cutter = cq.Solid.makeBox(edges[k + 1] - edges[k], high - low, bb.zlen + 2,
                                  cq.Vector(edges[k], low, bb.zmin - 1))
        try:
            piece = drilled.intersect(cutter)
        except Exception as exc:  # OCP's Standard_Failure family
            raise SolidError(f"the kernel failed cutting tile {k + 1} of {plan.count} ({exc})") from exc
        solids = piece.Solids()
        if len(solids) != 1:
            raise SolidError(f"the kernel cut tile {k + 1} of {plan.count} into {len(solids)} pieces")
        tile = cq.Solid(solids[0].wrapped)
        check_solid(tile, f"tile {k + 1} of {plan.count}")
        tiles.append(DieTile(k, max(edges[k], x0), min(edges[k + 1], x1), plan.along_bed_y, tile))
    return tiles


def tile_die(die: DieInput, bed_xy_mm: tuple[float, float]) -> list[DieTile]:
    """Build ``die`` and split it for a bed of ``bed_xy_mm`` (plan and kernel together; for tests and scripts)."""
    from diegen.die.model import outline_model
    from diegen.die.occ.form_block import build_die

    return tile_for_bed(build_die(die), plan_tiles(die, outline_model(die), bed_xy_mm))


__all__ = ["DieTile", "tile_die", "tile_for_bed"]
