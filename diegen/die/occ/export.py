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
from pathlib import Path
from typing import Any

from diegen import __version__
from diegen.die.occ.shapes import quiet_kernel, raw, solids
from diegen.die.occ.threads import parallel_ok
from diegen.die.occ.validate import step_file_problems, stl_problems
from diegen.errors import SolidError
from diegen.fileio import atomic_path

STL_TOLERANCE_MM = 0.05
STL_ANGULAR_TOLERANCE_DEG = 15.0


def write_step(shape: Any, path: str | os.PathLike[str], product: str = "", description: str = "") -> None:
    """Write ``shape`` (a kernel shape) as a STEP file in mm; raise :class:`SolidError` if it is not good.

    ``product``: the name of the product the file holds (the part id; the file's stem when empty).
    The header names this tool as the originating system and carries ``description``
    (ISO 10303-21: FILE_DESCRIPTION and FILE_NAME of the HEADER section).
    """
    quiet_kernel()
    from OCP.IFSelect import IFSelect_RetDone

    shape = raw(shape)
    name = product or Path(path).stem
    with atomic_path(path) as tmp:
        status = _write_named_step(shape, tmp, name, Path(path).name, description)
        if status != IFSelect_RetDone:
            raise SolidError(f"the kernel could not write the STEP file {os.fspath(path)!r}")
        problems = step_file_problems(tmp)
        if problems:
            raise SolidError(f"STEP file {os.fspath(path)!r} is not good: {'; '.join(problems)}")


def _write_named_step(shape: Any, tmp: Path, product: str, file_name: str, description: str) -> Any:
    """Write through the kernel's document writer, so the product carries exactly ``product`` as its name."""
    from OCP.APIHeaderSection import APIHeaderSection_MakeHeader
    from OCP.Interface import Interface_Static
    from OCP.STEPCAFControl import STEPCAFControl_Writer
    from OCP.STEPControl import STEPControl_AsIs
    from OCP.TCollection import TCollection_ExtendedString, TCollection_HAsciiString
    from OCP.TDataStd import TDataStd_Name
    from OCP.TDocStd import TDocStd_Document
    from OCP.XCAFDoc import XCAFDoc_DocumentTool

    document = TDocStd_Document(TCollection_ExtendedString("diegen"))
    label = XCAFDoc_DocumentTool.ShapeTool_s(document.Main()).AddShape(shape, False)
    TDataStd_Name.Set_s(label, TCollection_ExtendedString(product))
    writer = STEPCAFControl_Writer()
    writer.SetNameMode(True)
    writer.SetColorMode(False)
    writer.SetLayerMode(False)
    Interface_Static.SetIVal_s("write.surfacecurve.mode", 1)
    Interface_Static.SetIVal_s("write.precision.mode", 0)
    Interface_Static.SetCVal_s("xstep.cascade.unit", "MM")
    Interface_Static.SetCVal_s("write.step.unit", "MM")
    if not writer.Transfer(document, STEPControl_AsIs):
        raise SolidError(f"the kernel could not translate the die {product!r} to STEP")
    header = APIHeaderSection_MakeHeader(writer.ChangeWriter().Model())
    tool = TCollection_HAsciiString(f"diegen {__version__}")
    header.SetName(TCollection_HAsciiString(file_name))
    header.SetAuthorValue(1, TCollection_HAsciiString(""))
    header.SetOrganizationValue(1, TCollection_HAsciiString(""))
    header.SetPreprocessorVersion(tool)
    header.SetOriginatingSystem(tool)
    header.SetAuthorisation(TCollection_HAsciiString(""))
    header.SetDescriptionValue(1, TCollection_HAsciiString(description or product))
    return writer.Write(str(tmp))


def stl_header(text: str) -> bytes:
    """An 80-byte binary STL header holding ``text`` (ASCII, cut to fit, padded with spaces).

    A binary STL must not begin with "solid" (readers would take it for ASCII STL), so such text is prefixed.
    """
    raw = text.encode("ascii", "replace")
    if raw[:5].lower() == b"solid":
        raw = b"part " + raw
    return raw[:80].ljust(80, b" ")


def write_stl(shape: Any, path: str | os.PathLike[str], tolerance_mm: float = STL_TOLERANCE_MM,
              angular_tolerance_deg: float = STL_ANGULAR_TOLERANCE_DEG, header: str = "") -> None:
    """Write ``shape`` as a binary STL in mm; raise :class:`SolidError` unless the mesh is watertight.

    The 80-byte header names this tool, then ``header`` (the part id): "diegen <version> <header> mm".
    """
    from OCP.BRepMesh import BRepMesh_IncrementalMesh
    from OCP.BRepTools import BRepTools
    from OCP.StlAPI import StlAPI_Writer

    if not (tolerance_mm > 0 and 0 < angular_tolerance_deg < 90):
        raise SolidError(
            f"STL tolerance {tolerance_mm} mm / {angular_tolerance_deg}° out of range: give a positive tolerance "
            "and an angle between 0 and 90°"
        )
    quiet_kernel()
    shape = raw(shape)
    count = len(solids(shape))
    if count != 1:
        raise SolidError(f"STL for {os.fspath(path)!r}: the shape holds {count} solids, not one")
    BRepTools.Clean_s(shape)  # drop any earlier mesh so the tolerances asked for are the ones used
    with atomic_path(path) as tmp:
        # absolute deflection (not relative to each edge's size), parallel where safe; then a binary file
        BRepMesh_IncrementalMesh(shape, tolerance_mm, False, math.radians(angular_tolerance_deg), parallel_ok())
        writer = StlAPI_Writer()
        writer.ASCIIMode = False
        if not writer.Write(shape, str(tmp)):
            raise SolidError(f"the kernel could not write the STL file {os.fspath(path)!r}")
        with open(tmp, "r+b") as stl:
            stl.write(stl_header(f"diegen {__version__} {header or Path(path).stem} mm"))
        problems = stl_problems(tmp)
        if problems:
            raise SolidError(f"STL for {os.fspath(path)!r} is not printable: {'; '.join(problems)}")




__all__ = ["STL_ANGULAR_TOLERANCE_DEG", "STL_TOLERANCE_MM", "stl_header", "write_step", "write_stl"]
