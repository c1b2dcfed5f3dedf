"""Build the die (form block) solid with the kernel.

Conventions: rib plane X–Y, the die's top face at z = 0, the block extends to
z = −height_mm; all lengths in mm, angles in degrees.  The outline is the
die's mold line (see :mod:`diegen.die.die_input` and
:mod:`diegen.geometry.die_wall`).

Method: the outline is offset inward exactly (normal offset) to a stack of
sections — ``fillet_sections`` across the top-edge arc, one where the flutes
reach full depth and one at the bottom face.  Every section is made of the
same sequence of edges (B-splines along the curves, one per flute and one per
stretch between flutes, interpolated at the same parameters, and straight
lines), so the sections match edge to edge; a flute is part of every section,
with its depth scaled from nothing at the top face to full at the flange
edge.  The arc sections are joined by a smooth loft, the straight wall by a
ruled loft (exact, as both the wall and the flutes' taper are linear in
depth), the top and bottom by plane faces with holes, the pins and bores by
their cylinders, floors and rounding tori, the engraving by its pocket faces
sunk into the bottom face; all are sewn into one closed shell, with no
boolean operation.  (A single smooth loft through all sections rings where
the arc meets the straight wall and is far off; a tapered extrude cannot take
the top fillet; booleans against the lofted walls take seconds per die — see
"How the die solid is made" in DEVELOPERS.md.)  Any kernel failure or invalid
result raises :class:`diegen.errors.SolidError` with a hint.

The kernel (OCP) is imported inside the functions, and never through CadQuery (see
:mod:`diegen.die.occ.shapes`): importing it costs most of a second.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import replace
from typing import TYPE_CHECKING, Any

from diegen.die.die_input import DieInput
from diegen.die.model import largest_inset_mm, level_depth_mm, level_section, loft_levels
from diegen.die.occ import shapes
from diegen.die.occ.validate import solid_problems
from diegen.die.outline import OffsetPiece, OutlineModel
from diegen.die.placement import engraving_marks
from diegen.die.rules import check_die
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.errors import DiegenError, SolidError

if TYPE_CHECKING:  # pragma: no cover
    from shapely.geometry import Polygon


def _wire(pieces: list[OffsetPiece], z: float) -> Any:
    """The kernel wire (``TopoDS_Wire``) of one section at height ``z`` (or each point at its own depth where the
    section gives them: a wall whose profile changes along the outline): a line or B-spline edge per piece."""
    edges = []
    for piece in pieces:
        if piece.depths is None:
            pts = [shapes.point(x, y, z) for x, y in piece.points]
        else:
            pts = [shapes.point(x, y, -d) for (x, y), d in zip(piece.points, piece.depths, strict=True)]
        if piece.kind == "line":
            edges.append(shapes.line_edge(pts[0], pts[-1]))
        elif piece.closed:
            edges.append(shapes.spline_edge(pts[:-1], list(piece.params), periodic=True))
        else:
            edges.append(shapes.spline_edge(pts, list(piece.params)))
    return shapes.wire(edges)


def _loft_faces(wires: list[Any], ruled: bool) -> Any:
    from OCP.BRepOffsetAPI import BRepOffsetAPI_ThruSections

    builder = BRepOffsetAPI_ThruSections(False, ruled, 1e-6)
    for w in wires:
        builder.AddWire(w)
    builder.CheckCompatibility(False)  # the sections already match edge to edge and start at the same corner
    builder.Build()
    if not builder.IsDone():
        raise SolidError("the kernel could not loft the die wall")
    return builder.Shape()


def _polygon_wire(ring: Any, z: float, clockwise: bool = False) -> Any:
    """A closed polygon wire at height ``z`` through a shapely ring's points, turning the way asked."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakePolygon
    from OCP.gp import gp_Pnt
    from shapely.geometry import LinearRing

    pts = list(ring.coords)[:-1]
    if LinearRing(pts).is_ccw == clockwise:
        pts.reverse()
    poly = BRepBuilderAPI_MakePolygon()
    for x, y in pts:
        poly.Add(gp_Pnt(float(x), float(y), z))
    poly.Close()
    return poly.Wire()


def _circle_wire(x: float, y: float, z: float, radius: float, clockwise: bool = False) -> Any:
    """A circle wire about the vertical axis through (x, y), its seam vertex on the +X side."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.gp import gp_Ax2, gp_Circ, gp_Dir, gp_Pnt
    from OCP.TopoDS import TopoDS

    edge = BRepBuilderAPI_MakeEdge(gp_Circ(gp_Ax2(gp_Pnt(x, y, z), gp_Dir(0, 0, 1), gp_Dir(1, 0, 0)), radius)).Edge()
    return BRepBuilderAPI_MakeWire(TopoDS.Edge_s(edge.Reversed()) if clockwise else edge).Wire()


def _plane_face(z: float, outer: Any, inner: list[Any]) -> Any:
    """The horizontal face at ``z`` inside ``outer`` (counter-clockwise seen from above) with holes ``inner``
    (clockwise seen from above), normal +Z.  The sewing and :func:`_faces_out` orient the shell later."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.gp import gp_Dir, gp_Pln, gp_Pnt

    maker = BRepBuilderAPI_MakeFace(gp_Pln(gp_Pnt(0.0, 0.0, z), gp_Dir(0, 0, 1)), outer, True)
    for wire in inner:
        maker.Add(wire)
    if not maker.IsDone():
        raise SolidError("the kernel could not make a plane face")
    return maker.Face()


def _surface_face(surface: Any, u0: float, u1: float, v0: float, v1: float) -> Any:
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace

    maker = BRepBuilderAPI_MakeFace(surface, u0, u1, v0, v1, 1e-7)
    if not maker.IsDone():
        raise SolidError("the kernel could not make a hole's face")
    return maker.Face()


def _hole_faces(die: DieInput) -> tuple[list[Any], list[Any], list[Any]]:
    """The dowel holes and bores as faces: (hole wires of the top face, of the bottom face, the holes' own faces).

    A pin is a cylinder ``depth`` deep with a flat floor (or through); a bore
    is a through cylinder whose top edge is rounded by the bore top radius: a
    quarter torus of tube radius ρ about the circle of radius d/2 + ρ at z = −ρ.
    """
    from OCP.Geom import Geom_CylindricalSurface, Geom_ToroidalSurface
    from OCP.gp import gp_Ax3, gp_Dir, gp_Pnt

    def axes(x: float, y: float, z: float) -> Any:
        return gp_Ax3(gp_Pnt(x, y, z), gp_Dir(0, 0, 1), gp_Dir(1, 0, 0))

    top, bottom, faces = [], [], []
    h = die.height_mm
    for pin in die.pins:
        r = pin.d / 2.0
        depth = min(pin.depth, h)
        top.append(_circle_wire(pin.x, pin.y, 0.0, r, clockwise=True))
        wall = Geom_CylindricalSurface(axes(pin.x, pin.y, -depth), r)
        faces.append(_surface_face(wall, 0.0, 2 * math.pi, 0.0, depth))
        if depth >= h - 1e-9:
            bottom.append(_circle_wire(pin.x, pin.y, -h, r, clockwise=True))
        else:
            faces.append(_plane_face(-depth, _circle_wire(pin.x, pin.y, -depth, r), []))
    rho = die.bore_radius_mm
    for bore in die.bores:
        a = bore.d / 2.0
        top.append(_circle_wire(bore.x, bore.y, 0.0, a + rho, clockwise=True))
        torus = Geom_ToroidalSurface(axes(bore.x, bore.y, -rho), a + rho, rho)
        faces.append(_surface_face(torus, 0.0, 2 * math.pi, math.pi / 2.0, math.pi))
        wall = Geom_CylindricalSurface(axes(bore.x, bore.y, -h), a)
        faces.append(_surface_face(wall, 0.0, 2 * math.pi, 0.0, h - rho))
        bottom.append(_circle_wire(bore.x, bore.y, -h, a, clockwise=True))
    return top, bottom, faces


def _pocket_faces(marks: list[Polygon], z_bottom: float, depth: float) -> tuple[list[Any], list[Any]]:
    """Engraving pockets sunk ``depth`` mm up into the bottom face at ``z_bottom``.

    Returns the hole wires the bottom face needs (the outer rings of the marks
    that lie on it) and the faces that close the pockets: floors, sides and the
    islands inside letters (with holes of their own for marks inside them).
    """
    from OCP.BRepPrimAPI import BRepPrimAPI_MakePrism
    from OCP.gp import gp_Vec
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS
    from shapely.geometry import Polygon as ShapelyPolygon

    outers = [_polygon_wire(mark.exterior, z_bottom, clockwise=True) for mark in marks]  # holes in their face
    islands = [ShapelyPolygon(ring) for mark in marks for ring in mark.interiors]
    inside = [[j for j, other in enumerate(marks) if island.contains(other)] for island in islands]
    nested = {j for js in inside for j in js}
    faces = []
    for mark, outer in zip(marks, outers):
        mouth = _plane_face(z_bottom, TopoDS.Wire_s(outer.Reversed()),
                            [_polygon_wire(ring, z_bottom, clockwise=True) for ring in mark.interiors])
        prism = BRepPrimAPI_MakePrism(mouth, gp_Vec(0.0, 0.0, depth))
        exp = TopExp_Explorer(prism.Shape(), TopAbs_FACE)
        while exp.More():
            if not exp.Current().IsSame(prism.FirstShape()):
                faces.append(exp.Current())
            exp.Next()
    for island, js in zip(islands, inside):
        faces.append(_plane_face(z_bottom, _polygon_wire(island.exterior, z_bottom), [outers[j] for j in js]))
    return [w for j, w in enumerate(outers) if j not in nested], faces


def _faces_out(shell: Any) -> bool:
    """Whether the sewn (consistently oriented) ``shell`` has its normals pointing out of the die.

    The top face at z = 0 is the highest face of the die, so its outward
    normal is +Z: one face decides for all (far cheaper than a volume).
    """
    from OCP.BRepAdaptor import BRepAdaptor_Surface
    from OCP.GeomAbs import GeomAbs_Plane
    from OCP.TopAbs import TopAbs_FACE, TopAbs_REVERSED
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    exp = TopExp_Explorer(shell, TopAbs_FACE)
    while exp.More():
        face = TopoDS.Face_s(exp.Current())
        surface = BRepAdaptor_Surface(face)
        if surface.GetType() == GeomAbs_Plane:
            axis = surface.Plane().Axis()
            if abs(axis.Location().Z()) < 1e-9 and abs(abs(axis.Direction().Z()) - 1.0) < 1e-12:
                up = axis.Direction().Z() > 0
                return up != (face.Orientation() == TopAbs_REVERSED)
        exp.Next()
    raise SolidError("the die's shell has no top face")


def build_body(die: DieInput, model: OutlineModel, settings: BuildSettings = DEFAULT_SETTINGS,
               marks: list[Polygon] | None = None) -> Any:
    """The die body: outline, top-edge arc, undercut wall with its flutes, and the engraving ``marks``.

    ``marks`` are the engraving's polygons on the bottom face (see
    :func:`diegen.die.placement.engraving_marks`), sunk ``settings.engrave_depth_mm``.
    The result is not checked here (see :func:`build_die`).
    """
    shapes.quiet_kernel()
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeSolid, BRepBuilderAPI_Sewing
    from OCP.TopAbs import TopAbs_SHELL
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    arc, wall = loft_levels(die, settings)
    hint = ("check the outline for a spot where the piece is thinner than twice the wall inset "
            f"({2 * largest_inset_mm(die):.2f} mm) or lower the top radius")
    try:
        arc_wires = [_wire(level_section(die, model, s), -level_depth_mm(s)) for s in arc]
        wall_wires = arc_wires[-1:] + [_wire(level_section(die, model, s), -level_depth_mm(s)) for s in wall[1:]]
        marked, pockets = _pocket_faces(marks or [], -die.height_mm, settings.engrave_depth_mm)
        top_holes, bottom_holes, holes = _hole_faces(die)
        sew = BRepBuilderAPI_Sewing(settings.sew_tol_mm)
        for part in [_loft_faces(arc_wires, ruled=False), _loft_faces(wall_wires, ruled=True),
                     _plane_face(0.0, arc_wires[0], top_holes),
                     _plane_face(-die.height_mm, wall_wires[-1], marked + bottom_holes), *pockets, *holes]:
            sew.Add(part)
        sew.Perform()
        exp = TopExp_Explorer(sew.SewedShape(), TopAbs_SHELL)
        if not exp.More():
            raise SolidError(f"die {die.part_id}: the lofted faces did not sew into a shell; {hint}")
        shell = TopoDS.Shell_s(exp.Current())
        if not _faces_out(shell):
            shell = TopoDS.Shell_s(shell.Reversed())
        solid = BRepBuilderAPI_MakeSolid(shell).Solid()
    except DiegenError:  # a refusal or the kernel's failure already put in words
        raise
    except Exception as exc:  # OCP raises its own Standard_Failure family
        raise SolidError(f"die {die.part_id}: the kernel failed building the die body ({exc}); {hint}") from exc
    return solid


def build_die(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS,
              marks: Sequence[Polygon] | None = None, model: OutlineModel | None = None) -> Any:
    """The finished die solid (the kernel's ``TopoDS_Solid``), checked valid.

    ``marks``: the engraving's grooves when already laid out
    (:func:`diegen.die.placement.place_marks`); by default they are laid out here.
    ``model``: the die's outline model when the caller has made it (checked here all the same).
    Raises :class:`GeometryError` for input the die cannot follow (the
    checks of :func:`diegen.die.rules.check_die`, the same ones ``diegen
    check`` makes) and :class:`SolidError` when the kernel fails or returns an
    invalid solid (a fault of the kernel step, not of the input);
    then the die is rebuilt without the engraving, and without the holes, to
    name the part at fault.
    """
    model = check_die(die, settings, model)  # every refusal is the analysis's own (diegen.die.rules)
    marks = engraving_marks(die, model, settings) if marks is None else list(marks)
    solid = build_body(die, model, settings, marks)
    problems = solid_problems(solid)
    if not problems:
        return solid
    suspects = [
        ("the engraving makes", lambda: build_body(die, model, settings), "shorten the engraving or leave it out"),
        ("the pin holes or bores make", lambda: build_body(replace(die, pins=(), bores=()), model, settings),
         "move the holes inward or make them smaller"),
    ]
    for what, without, change in suspects:
        if not solid_problems(without()):
            raise SolidError(f"die {die.part_id}: {what} the die an invalid solid ({'; '.join(problems)}); {change}")
    raise SolidError(
        f"die {die.part_id}: the die is not a valid solid ({'; '.join(problems)}): check the outline for a spot "
        f"thinner than twice the wall inset ({2 * largest_inset_mm(die):.2f} mm), move the flutes apart, or lower "
        "the top radius")


__all__ = ["build_body", "build_die", "warm_up"]


def warm_up() -> None:
    """Import the kernel (most of a second per process): worker processes pay it once, before their first piece."""
    shapes.quiet_kernel()
