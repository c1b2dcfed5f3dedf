"""STEP and STL output of die solids, atomic and validated before the rename.

Both writers produce the file under a temporary name beside the target (see
:func:`diegen.fileio.atomic_path`), check the file and only then rename it over
the target, so an invalid file is never left at the target path.  The solid
itself has been checked by ``build_die`` (the kernel's shape check), so the
STEP file is checked for its structure only — complete, one closed solid —
(reading it back costs more than building the die; the tests read every
demo die back with the kernel); the STL must be watertight and consistently
wound.  Lengths in mm.

STL resolution: ``tolerance_mm`` is the largest distance between the true
surface and its triangles (absolute, not relative to edge size);
``angular_tolerance_deg`` the largest angle between neighbouring triangles'
normals along a curve.  Tessellation dominates export time, so the defaults
are chosen by measurement (``tests/bench_die.py``): 0.05 mm and 15° keep a
2.2 mm top radius in about seven facets, well under a printer's resolution.
"""

from __future__ import annotations

import math
import os
from typing import Any

from diegen.die.occ.tiles import DieTile, tile_for_bed
from diegen.die.occ.validate import step_file_problems, stl_problems
from diegen.errors import SolidError
from diegen.fileio import atomic_path

STL_TOLERANCE_MM = 0.05
STL_ANGULAR_TOLERANCE_DEG = 15.0


def write_step(shape: Any, path: str | os.PathLike[str]) -> None:
    """Write ``shape`` (a cadquery Shape) as a STEP file in mm; raise :class:`SolidError` if it is not good."""
    import cadquery as cq
    from OCP.IFSelect import IFSelect_RetDone

    shape = shape if isinstance(shape, cq.Shape) else cq.Shape.cast(shape)
    with atomic_path(path) as tmp:
        status = shape.exportStep(str(tmp), unit="MM")
        if status != IFSelect_RetDone:
            raise SolidError(f"the kernel could not write the STEP file {os.fspath(path)!r}")
        problems = step_file_problems(tmp)
        if problems:
            raise SolidError(f"STEP file {os.fspath(path)!r} is not good: {'; '.join(problems)}")


def write_stl(shape: Any, path: str | os.PathLike[str], tolerance_mm: float = STL_TOLERANCE_MM,
              angular_tolerance_deg: float = STL_ANGULAR_TOLERANCE_DEG) -> None:
    """Write ``shape`` as a binary STL in mm; raise :class:`SolidError` unless the mesh is watertight."""
    import cadquery as cq
    from OCP.BRepTools import BRepTools

    if not (tolerance_mm > 0 and 0 < angular_tolerance_deg < 90):
        raise SolidError(
            f"STL tolerance {tolerance_mm} mm / {angular_tolerance_deg}° out of range: give a positive tolerance "
            "and an angle between 0 and 90°"
        )
    shape = shape if isinstance(shape, cq.Shape) else cq.Shape.cast(shape)
    if len(shape.Solids()) != 1:
        raise SolidError(f"STL for {os.fspath(path)!r}: the shape holds {len(shape.Solids())} solids, not one")
    BRepTools.Clean_s(shape.wrapped)  # drop any earlier mesh so the tolerances asked for are the ones used
    with atomic_path(path) as tmp:
        ok = shape.exportStl(str(tmp), tolerance=tolerance_mm, angularTolerance=math.radians(angular_tolerance_deg),
                             ascii=False, relative=False, parallel=True)
        if not ok:
            raise SolidError(f"the kernel could not write the STL file {os.fspath(path)!r}")
        problems = stl_problems(tmp)
        if problems:
            raise SolidError(f"STL for {os.fspath(path)!r} is not printable: {'; '.join(problems)}")


__all__ = ["STL_ANGULAR_TOLERANCE_DEG", "STL_TOLERANCE_MM", "DieTile", "tile_for_bed", "write_step", "write_stl"]
