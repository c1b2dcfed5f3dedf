"""Build the die (form block) solid.

Conventions: rib plane X–Y, the die's top face at z = 0, the block extends to
z = −height_mm; all lengths in mm, angles in degrees.  The outline is the
die's mold line (see :mod:`diegen.solid.die_input` and
:mod:`diegen.solid.profile`).

Method: the outline is offset inward exactly (normal offset) to a stack of
sections — ``fillet_sections`` across the top-edge arc and one at the bottom
face.  Every section is made of the same sequence of edges (one B-spline per
curve segment, interpolated at the same parameters, and straight lines), so
the sections match edge to edge.  The arc sections are joined by a smooth
loft, the straight wall by a ruled loft between the arc's last section and
the bottom section, the top and bottom by plane faces; the faces are sewn
into one closed shell.  (A single smooth loft through all sections rings
where the arc meets the straight wall and is far off; a tapered extrude
cannot take the top fillet — see the design notes.)  Pins, bores, flutes and
the engraving are then cut.  Any kernel failure or invalid result raises
:class:`diegen.errors.SolidError` with a hint.

``cadquery`` is imported inside the functions: importing it costs seconds.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from diegen.errors import GeometryError, SolidError
from diegen.solid import profile
from diegen.solid.die_input import DieInput
from diegen.solid.outline import OffsetPiece, OutlineModel
from diegen.solid.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.solid.validate import check_solid

if TYPE_CHECKING:  # pragma: no cover
    import cadquery as cq

MAX_UNDERCUT_DEG = 30.0  # beyond this the wall is no longer a small over-bend (design choice)


def check_die_numbers(die: DieInput) -> None:
    """Raise :class:`GeometryError` for sizes a die cannot have (before any geometry is made)."""
    if not die.part_id.strip():
        raise GeometryError("die part_id is empty: give the part a name")
    if not die.height_mm > 0:
        raise GeometryError(f"die {die.part_id}: height {die.height_mm} mm must be positive")
    if not die.top_radius_mm > 0:
        raise GeometryError(f"die {die.part_id}: top radius {die.top_radius_mm} mm must be positive")
    if not 0.0 <= die.undercut_deg <= MAX_UNDERCUT_DEG:
        raise GeometryError(
            f"die {die.part_id}: undercut {die.undercut_deg}° must lie between 0 and {MAX_UNDERCUT_DEG:g}°"
        )
    if not die.cutter_radius_mm > 0:
        raise GeometryError(f"die {die.part_id}: cutter radius {die.cutter_radius_mm} mm must be positive")
    arc_depth = profile.fillet_end_depth_mm(die.top_radius_mm, die.undercut_deg)
    if arc_depth >= die.height_mm - 0.05:
        raise GeometryError(
            f"die {die.part_id}: the top-edge radius {die.top_radius_mm} mm reaches {arc_depth:.2f} mm down, "
            f"which leaves no straight wall in a {die.height_mm} mm block: use thicker stock or a smaller radius"
        )
    if die.bore_radius_mm <= 0:
        raise GeometryError(f"die {die.part_id}: bore top radius {die.bore_radius_mm} mm must be positive")


def largest_inset_mm(die: DieInput) -> float:
    """The largest inset of any section: the top setback or the bottom inset (mm)."""
    return max(profile.top_setback_mm(die.top_radius_mm, die.undercut_deg),
               profile.wall_inset_mm(die.height_mm, die.undercut_deg))


def outline_model(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS) -> OutlineModel:
    """The checked outline model of ``die`` (raises :class:`GeometryError` for unusable outlines)."""
    check_die_numbers(die)
    return OutlineModel(die.outline, die.cutter_radius_mm, largest_inset_mm(die),
                        sample_tol_mm=settings.outline_tol_mm, max_spacing_mm=settings.max_spacing_mm)


def _wire(model: OutlineModel, pieces: list[OffsetPiece], z: float) -> "cq.Wire":
    import cadquery as cq

    edges = []
    for i, piece in enumerate(pieces):
        pts = [cq.Vector(x, y, z) for x, y in piece.points]
        if piece.kind == "line":
            edges.append(cq.Edge.makeLine(pts[0], pts[-1]))
            continue
        fr = model.fractions[i]
        assert fr is not None
        if model.periodic:
            edges.append(cq.Edge.makeSpline(pts[:-1], periodic=True, parameters=list(map(float, fr)), scale=False))
        else:
            edges.append(cq.Edge.makeSpline(pts, parameters=list(map(float, fr)), scale=False))
    return cq.Wire.assembleEdges(edges)


def _loft_faces(wires: list["cq.Wire"], ruled: bool) -> Any:
    from OCP.BRepOffsetAPI import BRepOffsetAPI_ThruSections

    builder = BRepOffsetAPI_ThruSections(False, ruled, 1e-6)
    for w in wires:
        builder.AddWire(w.wrapped)
    builder.CheckCompatibility(False)  # the sections already match edge to edge and start at the same corner
    builder.Build()
    if not builder.IsDone():
        raise SolidError("the kernel could not loft the die wall")
    return builder.Shape()


def build_body(die: DieInput, model: OutlineModel, settings: BuildSettings = DEFAULT_SETTINGS) -> "cq.Solid":
    """The plain die body (outline, top-edge arc, undercut wall), without holes, flutes or engraving."""
    import cadquery as cq
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace, BRepBuilderAPI_MakeSolid, BRepBuilderAPI_Sewing
    from OCP.BRepLib import BRepLib
    from OCP.TopAbs import TopAbs_SHELL
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    arc = profile.fillet_sections(die.top_radius_mm, die.undercut_deg, settings.fillet_sections)
    bottom = profile.bottom_section(die.height_mm, die.undercut_deg)
    arc_wires = [_wire(model, model.offset(s.inset_mm), -s.depth_mm) for s in arc]
    bottom_wire = _wire(model, model.offset(bottom.inset_mm), -bottom.depth_mm)
    hint = ("check the outline for a spot where the piece is thinner than twice the wall inset "
            f"({2 * largest_inset_mm(die):.2f} mm) or lower the top radius")
    try:
        arc_faces = _loft_faces(arc_wires, ruled=False)
        wall_faces = _loft_faces([arc_wires[-1], bottom_wire], ruled=True)
        top = BRepBuilderAPI_MakeFace(arc_wires[0].wrapped, True).Face()
        base = BRepBuilderAPI_MakeFace(bottom_wire.wrapped, True).Face()
        sew = BRepBuilderAPI_Sewing(settings.sew_tol_mm)
        for part in (top, arc_faces, wall_faces, base):
            sew.Add(part)
        sew.Perform()
        exp = TopExp_Explorer(sew.SewedShape(), TopAbs_SHELL)
        if not exp.More():
            raise SolidError(f"die {die.part_id}: the lofted faces did not sew into a shell; {hint}")
        shell = TopoDS.Shell_s(exp.Current())
        maker = BRepBuilderAPI_MakeSolid(shell)
        solid = maker.Solid()
        BRepLib.OrientClosedSolid_s(solid)
    except SolidError:
        raise
    except Exception as exc:  # OCP raises its own Standard_Failure family
        raise SolidError(f"die {die.part_id}: the kernel failed building the die body ({exc}); {hint}") from exc
    body = cq.Solid(solid)
    check_solid(body, f"die {die.part_id} body", hint)
    return body


def build_die(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS) -> "cq.Solid":
    """The finished die solid (cadquery ``Solid``), checked valid.

    Raises :class:`GeometryError` for input the die cannot follow and
    :class:`SolidError` when the kernel fails or returns an invalid solid.
    """
    from diegen.solid.features import cut_features

    model = outline_model(die, settings)
    body = build_body(die, model, settings)
    return cut_features(body, die, model, settings)  # checks every result it makes


def top_face_inset_mm(die: DieInput) -> float:
    """Inset of the flat top face's edge from the outline: the top setback (mm)."""
    return profile.top_setback_mm(die.top_radius_mm, die.undercut_deg)


def bottom_inset_mm(die: DieInput) -> float:
    """Inset of the bottom face's edge from the outline, ``H·tan α`` (mm)."""
    return profile.wall_inset_mm(die.height_mm, die.undercut_deg)


__all__ = ["build_die", "build_body", "outline_model", "check_die_numbers", "top_face_inset_mm",
           "bottom_inset_mm", "largest_inset_mm"]
