"""The few kernel constructors the dies need, made with OCP's own classes (no CadQuery layer).

Why: in a new process CadQuery's import costs about a second on top of OCP's own (it loads a visualisation
toolkit the dies never use) and about 170 MB of memory in every build worker (measured on this machine:
``python -c "import cadquery"`` against ``python -c "import OCP"``).  The dies use the kernel's classes directly:
the calls below are the same ones the CadQuery helpers they replace made (B-spline interpolation through points
at given parameters, a wire from edges, a cylinder and a box on an axis, the exact bounding box), so the solids
and their files are unchanged.

Shapes are passed as raw ``TopoDS_Shape``; a function given anything holding one as ``.wrapped`` (a CadQuery
shape from a caller) takes the shape inside.  All lengths in mm.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

_QUIET = False


def quiet_kernel() -> None:
    """Have the kernel's messenger print failures only (its STEP writer reports statistics on standard output
    otherwise); once per process, before the first kernel call of each entry point."""
    global _QUIET  # noqa: PLW0603 - one setting per process
    if _QUIET:
        return
    from OCP.Message import Message, Message_Gravity

    for printer in Message.DefaultMessenger_s().Printers():
        printer.SetTraceLevel(Message_Gravity.Message_Fail)
    _QUIET = True


def raw(shape: Any) -> Any:
    """The kernel's ``TopoDS_Shape`` of ``shape`` (itself, or what it holds as ``.wrapped``)."""
    return getattr(shape, "wrapped", shape)


def point(x: float, y: float, z: float) -> Any:
    """A ``gp_Pnt``; a negative zero becomes zero (the top face's sections sit at z = −0.0, and no file shows
    a "-0.")."""
    from OCP.gp import gp_Pnt

    return gp_Pnt(float(x), float(y), float(z))


def line_edge(start: Any, end: Any) -> Any:
    """A straight edge between two ``gp_Pnt``."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge

    return BRepBuilderAPI_MakeEdge(start, end).Edge()


def spline_edge(points: Sequence[Any], parameters: Sequence[float], periodic: bool = False,
                tolerance: float = 1e-6) -> Any:
    """An edge on the B-spline interpolating ``points`` (``gp_Pnt``) at ``parameters``; a periodic one takes
    one parameter more than points (the closing one).  ``tolerance``: the smallest distance between points."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge
    from OCP.GeomAPI import GeomAPI_Interpolate
    from OCP.TColgp import TColgp_HArray1OfPnt
    from OCP.TColStd import TColStd_HArray1OfReal

    if len(parameters) != len(points) + periodic:
        raise ValueError(f"{len(parameters)} parameters for {len(points)} points (periodic: {periodic})")
    at = TColgp_HArray1OfPnt(1, len(points))
    for index, p in enumerate(points, 1):
        at.SetValue(index, p)
    values = TColStd_HArray1OfReal(1, len(parameters))
    for index, value in enumerate(parameters, 1):
        values.SetValue(index, float(value))
    builder = GeomAPI_Interpolate(at, values, periodic, tolerance)
    builder.Perform()
    if not builder.IsDone():
        raise ValueError("B-spline interpolation failed")
    return BRepBuilderAPI_MakeEdge(builder.Curve()).Edge()


def wire(edges: Sequence[Any]) -> Any:
    """One wire of ``edges`` (given in any order); ``ValueError`` if they do not join into one."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeWire
    from OCP.TopTools import TopTools_ListOfShape

    listed = TopTools_ListOfShape()
    for edge in edges:
        listed.Append(edge)
    builder = BRepBuilderAPI_MakeWire()
    builder.Add(listed)
    builder.Build()
    if not builder.IsDone():
        raise ValueError(f"the edges do not make one wire (kernel error {builder.Error()})")
    return builder.Wire()


def solids(shape: Any) -> list[Any]:
    """The distinct solids of ``shape``, in the kernel's order."""
    from OCP.TopAbs import TopAbs_SOLID
    from OCP.TopExp import TopExp
    from OCP.TopoDS import TopoDS
    from OCP.TopTools import TopTools_IndexedMapOfShape

    found = TopTools_IndexedMapOfShape()
    TopExp.MapShapes_s(raw(shape), TopAbs_SOLID, found)
    return [TopoDS.Solid_s(found.FindKey(index)) for index in range(1, found.Extent() + 1)]


def cylinder(radius: float, height: float, base: tuple[float, float, float],
             direction: tuple[float, float, float]) -> Any:
    """A solid cylinder of ``radius`` and ``height`` standing on ``base`` along ``direction``."""
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder
    from OCP.gp import gp_Ax2, gp_Dir

    axis = gp_Ax2(point(*base), gp_Dir(*(float(c) for c in direction)))
    return BRepPrimAPI_MakeCylinder(axis, float(radius), float(height), 2 * math.pi).Shape()


def box(dx: float, dy: float, dz: float, corner: tuple[float, float, float]) -> Any:
    """A solid box of ``dx`` × ``dy`` × ``dz`` with its lowest corner at ``corner``, edges along the axes."""
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeBox
    from OCP.gp import gp_Ax2, gp_Dir

    return BRepPrimAPI_MakeBox(gp_Ax2(point(*corner), gp_Dir(0.0, 0.0, 1.0)), float(dx), float(dy),
                               float(dz)).Shape()


def bounding_box(shape: Any) -> tuple[float, float, float, float, float, float]:
    """(x min, y min, z min, x max, y max, z max) of ``shape``: the kernel's tight box, not its padded one."""
    from OCP.Bnd import Bnd_Box
    from OCP.BRepBndLib import BRepBndLib

    found = Bnd_Box()
    BRepBndLib.AddOptimal_s(raw(shape), found)
    return found.Get()


__all__ = ["bounding_box", "box", "cylinder", "line_edge", "point", "quiet_kernel", "raw", "solids", "spline_edge",
           "wire"]
