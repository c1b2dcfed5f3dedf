"""Features cut into the die body: dowel holes, bores, flutes and the bottom engraving.

Conventions as in :mod:`diegen.solid.form_block` (mm, degrees, top face at z = 0,
block down to z = −height).  Placement is checked in 2D first (raising
:class:`GeometryError` with the feature and what to change); a kernel failure
raises :class:`SolidError` naming the feature at fault.

* Pin: a flat-bottomed hole of diameter d, ``depth`` deep from the top face
  (through if ``depth`` equals the height).
* Bore: a through hole of diameter d whose top edge is rounded by the bore top
  radius (the lightening-hole flange bends down into it).
* Flute: a groove in the wall.  In every horizontal plane its cross-section is
  a circle of radius r = (w²/4 + D²)/(2D), so that at full depth D it is w wide
  at the wall; its penetration into the wall grows linearly from 0 at the top
  face to D at ``flute_length_mm`` below it, then stays D to the bottom.
* Engraving: the part id and the given lines, cut ``engrave_depth_mm`` into the
  bottom face, written on a plane facing down so it reads when the die is
  turned over, with an arrow pointing forward (towards −X, the leading edge).
"""

from __future__ import annotations

import math
import os
from typing import TYPE_CHECKING, Any

import numpy as np
from shapely.geometry import Point, Polygon, box
from shapely.ops import polylabel

from diegen.errors import GeometryError, SolidError
from diegen.solid import profile
from diegen.solid.die_input import Bore, DieInput, Flute, Pin
from diegen.solid.outline import OutlineModel, pieces_to_polygon
from diegen.solid.settings import BuildSettings
from diegen.solid.validate import solid_problems

if TYPE_CHECKING:  # pragma: no cover
    import cadquery as cq

CLEAR_MM = 0.5  # how far cutting tools reach past the faces they open (mm)


def flute_radius_mm(flute: Flute) -> float:
    """Radius of the flute's circular cross-section, r = (w²/4 + D²)/(2D) (mm)."""
    return (flute.width_mm**2 / 4.0 + flute.depth_mm**2) / (2.0 * flute.depth_mm)


def _smallest_section(die: DieInput, model: OutlineModel) -> Polygon:
    inset = max(profile.top_setback_mm(die.top_radius_mm, die.undercut_deg),
                profile.wall_inset_mm(die.height_mm, die.undercut_deg))
    return pieces_to_polygon(model.offset(inset))


def check_placement(die: DieInput, model: OutlineModel, settings: BuildSettings) -> None:
    """Raise :class:`GeometryError` for a hole or flute the die cannot carry."""
    inner = _smallest_section(die, model)
    wall = settings.min_wall_mm
    footprints: list[tuple[str, Polygon]] = []
    for pin in die.pins:
        name = f"pin hole at ({pin.x:g}, {pin.y:g}) mm"
        if not (pin.d > 0 and pin.depth > 0):
            raise GeometryError(f"die {die.part_id}: {name}: diameter and depth must be positive")
        if pin.depth > die.height_mm + 1e-9:
            raise GeometryError(
                f"die {die.part_id}: {name} is {pin.depth:g} mm deep, deeper than the {die.height_mm:g} mm block"
            )
        footprints.append((name, Point(pin.x, pin.y).buffer(pin.d / 2.0, quad_segs=32)))
    for bore in die.bores:
        name = f"bore at ({bore.x:g}, {bore.y:g}) mm"
        if not bore.d > 0:
            raise GeometryError(f"die {die.part_id}: {name}: diameter must be positive")
        footprints.append((name, Point(bore.x, bore.y).buffer(bore.d / 2.0 + die.bore_radius_mm, quad_segs=32)))
    for name, shape in footprints:
        if not inner.buffer(-wall).contains(shape):
            raise GeometryError(
                f"die {die.part_id}: {name} (with its edge rounding) comes closer than {wall:g} mm to the die's "
                "edge: move it inward or make it smaller"
            )
    for i, (name_a, a) in enumerate(footprints):
        for name_b, b in footprints[i + 1:]:
            if a.distance(b) < wall:
                raise GeometryError(
                    f"die {die.part_id}: {name_a} and {name_b} are closer than {wall:g} mm: move them apart"
                )
    if die.flutes and not 0 < die.flute_length_mm <= die.height_mm:
        raise GeometryError(
            f"die {die.part_id}: flute length {die.flute_length_mm:g} mm must be positive and no more than the "
            f"block height {die.height_mm:g} mm (set it to the flange height)"
        )
    for flute in die.flutes:
        name = f"flute at s = {flute.s_mm:g} mm"
        if not (flute.width_mm > 0 and flute.depth_mm > 0):
            raise GeometryError(f"die {die.part_id}: {name}: width and depth must be positive")
        if flute.depth_mm > flute.width_mm / 2.0 + 1e-9:
            raise GeometryError(
                f"die {die.part_id}: {name} is {flute.depth_mm:g} mm deep but only {flute.width_mm:g} mm wide: "
                "a groove deeper than half its width cannot be cut from the side; widen it or make it shallower"
            )
        if not 0.0 <= flute.s_mm < model.perimeter_mm:
            raise GeometryError(
                f"die {die.part_id}: {name} lies outside the outline (length {model.perimeter_mm:.1f} mm)"
            )


def _pin_tool(die: DieInput, pin: Pin) -> "cq.Solid":
    import cadquery as cq

    through = pin.depth >= die.height_mm - 1e-9
    bottom = -die.height_mm - CLEAR_MM if through else -pin.depth
    return cq.Solid.makeCylinder(pin.d / 2.0, CLEAR_MM - bottom, cq.Vector(pin.x, pin.y, bottom), cq.Vector(0, 0, 1))


def _bore_tool(die: DieInput, bore: Bore) -> "cq.Solid":
    import cadquery as cq

    z0 = -die.height_mm - CLEAR_MM
    return cq.Solid.makeCylinder(bore.d / 2.0, die.height_mm + 2 * CLEAR_MM, cq.Vector(bore.x, bore.y, z0),
                                 cq.Vector(0, 0, 1))


def _flute_tool(die: DieInput, model: OutlineModel, flute: Flute) -> "cq.Solid":
    import cadquery as cq

    p, n = model.locate(flute.s_mm)
    r = flute_radius_mm(flute)
    length = die.flute_length_mm

    def centre(depth: float) -> cq.Vector:
        penetration = flute.depth_mm * min(depth / length, 1.0) if depth >= 0 else flute.depth_mm * depth / length
        inset = profile.wall_inset_mm(depth, die.undercut_deg) - (r - penetration)
        return cq.Vector(float(p[0] + inset * n[0]), float(p[1] + inset * n[1]), -depth)

    depths = [-CLEAR_MM, length, die.height_mm + CLEAR_MM]
    if length >= die.height_mm - 1e-9:
        depths = [-CLEAR_MM, die.height_mm + CLEAR_MM]
    wires = [cq.Wire.makeCircle(r, centre(d), cq.Vector(0, 0, 1)) for d in depths]
    return cq.Solid.makeLoft(wires, ruled=True)


def _cut(body: "cq.Shape", tools: list[tuple[str, Any]], die: DieInput) -> "cq.Shape":
    """Cut all tools at once; on failure find the first tool that fails alone and name it."""
    if not tools:
        return body
    try:
        result = body.cut(*[t for _, t in tools])
        if not solid_problems(result):
            return result
    except Exception:  # noqa: BLE001 - kernel failure, diagnosed below
        pass
    current = body
    for name, tool in tools:
        try:
            nxt = current.cut(tool)
        except Exception as exc:  # noqa: BLE001
            raise SolidError(f"die {die.part_id}: the kernel failed cutting the {name} ({exc}); move or resize it") from exc
        problems = solid_problems(nxt)
        if problems:
            raise SolidError(
                f"die {die.part_id}: cutting the {name} gives an invalid solid ({'; '.join(problems)}); "
                "move it away from other features and the die's edge, or resize it"
            )
        current = nxt
    return current


def _round_bores(body: "cq.Shape", die: DieInput) -> "cq.Shape":
    """Round the top edge of every bore by the bore top radius."""
    if not die.bores:
        return body
    edges = []
    for bore in die.bores:
        found = None
        for e in body.Edges():
            if e.geomType() != "CIRCLE":
                continue
            c = e.Center()
            if abs(c.z) < 1e-6 and math.hypot(c.x - bore.x, c.y - bore.y) < 1e-4 and abs(e.radius() - bore.d / 2) < 1e-6:
                found = e
                break
        if found is None:
            raise SolidError(f"die {die.part_id}: the top edge of the bore at ({bore.x:g}, {bore.y:g}) mm was not found")
        edges.append(found)
    try:
        result = body.fillet(die.bore_radius_mm, edges)
    except Exception as exc:  # noqa: BLE001
        raise SolidError(
            f"die {die.part_id}: the kernel could not round the bore top edges by {die.bore_radius_mm:g} mm ({exc}); "
            "lower the bore top radius"
        ) from exc
    problems = solid_problems(result)
    if problems:
        raise SolidError(
            f"die {die.part_id}: rounding the bore top edges by {die.bore_radius_mm:g} mm gives an invalid solid "
            f"({'; '.join(problems)}); lower the bore top radius"
        )
    return result


def engraving_font_path() -> str | None:
    """The engraving font file shipped inside matplotlib (a dependency), so no system font is needed."""
    import matplotlib

    path = os.path.join(matplotlib.get_data_path(), "fonts", "ttf", "DejaVuSans.ttf")
    return path if os.path.isfile(path) else None


def _engraving_tools(die: DieInput, model: OutlineModel, settings: BuildSettings) -> list[tuple[str, Any]]:
    """Text and arrow solids for the bottom face, fitted into the free area."""
    import cadquery as cq

    lines = [line for line in die.engraving if line.strip()]
    if not lines:
        return []
    depth = settings.engrave_depth_mm
    margin = max(settings.min_wall_mm, 2.0)
    free = pieces_to_polygon(model.offset(profile.wall_inset_mm(die.height_mm, die.undercut_deg))).buffer(-margin)
    for bore in die.bores:
        free = free.difference(Point(bore.x, bore.y).buffer(bore.d / 2.0 + margin))
    for pin in die.pins:
        if pin.depth >= die.height_mm - depth - settings.min_wall_mm:
            free = free.difference(Point(pin.x, pin.y).buffer(pin.d / 2.0 + margin))

    font_path = engraving_font_path()

    def text(line: str, size: float, plane: cq.Plane) -> cq.Shape:
        return cq.Compound.makeText(line, size, depth, font=settings.engrave_font, fontPath=font_path,
                                    halign="center", valign="center", position=plane)

    unit = [text(line, 1.0, cq.Plane(origin=(0, 0, 0), xDir=(1, 0, 0), normal=(0, 0, -1))).BoundingBox()
            for line in lines]
    widths = [bb.xlen for bb in unit]
    pitch = 1.5  # line pitch as a multiple of the font size
    size = settings.engrave_max_height_mm
    while size >= settings.engrave_min_height_mm - 1e-9:
        block_w = max(max(widths) * size, 4.0 * size)
        block_h = pitch * size * (len(lines) + 1)
        spot = _find_spot(free, block_w, block_h)
        if spot is not None:
            break
        size *= 0.85
    else:
        raise GeometryError(
            f"die {die.part_id}: no room on the bottom face for the engraving {lines!r} at "
            f"{settings.engrave_min_height_mm:g} mm letter size: shorten it or leave it out"
        )
    cx, cy = spot
    z0 = -die.height_mm + depth  # the text plane faces down (−Z) and is extruded down to the bottom face
    tools: list[tuple[str, Any]] = []
    # local y of the plane points to global −Y, so the first line (top of the block) has the smallest global Y
    top_local = block_h / 2.0 - pitch * size / 2.0
    for i, line in enumerate(lines):
        local_y = top_local - i * pitch * size
        plane = cq.Plane(origin=(cx, cy - local_y, z0), xDir=(1, 0, 0), normal=(0, 0, -1))
        tools.append((f"engraving {line!r}", text(line, size, plane)))
    arrow_y = cy - (top_local - len(lines) * pitch * size)
    tools.append(("orientation arrow", _arrow(cx, arrow_y, 3.0 * size, 0.8 * size, z0, depth)))
    return tools


def _find_spot(free: Any, w: float, h: float) -> tuple[float, float] | None:
    """Centre of a w × h rectangle lying inside ``free`` (the pole of inaccessibility first, then a grid)."""
    if free.is_empty:
        return None
    parts = list(free.geoms) if hasattr(free, "geoms") else [free]
    parts.sort(key=lambda g: -g.area)
    for part in parts:
        candidates = [polylabel(part, tolerance=0.5).coords[0]]
        x0, y0, x1, y1 = part.bounds
        for x in np.linspace(x0 + w / 2, x1 - w / 2, 25) if x1 - x0 > w else []:
            for y in np.linspace(y0 + h / 2, y1 - h / 2, 9) if y1 - y0 > h else []:
                candidates.append((float(x), float(y)))
        best = None
        for cx, cy in candidates:
            rect = box(cx - w / 2, cy - h / 2, cx + w / 2, cy + h / 2)
            if part.contains(rect):
                clearance = part.exterior.distance(rect)
                if best is None or clearance > best[0]:
                    best = (clearance, (cx, cy))
        if best is not None:
            return best[1]
    return None


def _arrow(cx: float, cy: float, length: float, width: float, z0: float, height: float) -> "cq.Solid":
    """A flat arrow centred at (cx, cy) pointing towards −X, extruded down from z0 by ``height``."""
    import cadquery as cq

    half, shaft, head = length / 2.0, width * 0.35, length * 0.35
    pts = [(half, shaft), (-half + head, shaft), (-half + head, width), (-half, 0.0), (-half + head, -width),
           (-half + head, -shaft), (half, -shaft)]
    wire = cq.Wire.makePolygon([cq.Vector(cx + x, cy + y, z0) for x, y in pts], close=True)
    return cq.Solid.extrudeLinear(cq.Face.makeFromWires(wire), cq.Vector(0, 0, -height))


def cut_features(body: "cq.Solid", die: DieInput, model: OutlineModel, settings: BuildSettings) -> "cq.Solid":
    """Cut pins, bores (rounded at the top), flutes and the engraving into the checked ``body``; check the result."""
    check_placement(die, model, settings)
    tools: list[tuple[str, Any]] = []
    tools += [(f"pin hole at ({p.x:g}, {p.y:g}) mm", _pin_tool(die, p)) for p in die.pins]
    tools += [(f"bore at ({b.x:g}, {b.y:g}) mm", _bore_tool(die, b)) for b in die.bores]
    tools += [(f"flute at s = {f.s_mm:g} mm", _flute_tool(die, model, f)) for f in die.flutes]
    shape = _cut(body, tools, die)
    shape = _round_bores(shape, die)
    shape = _single_solid(shape, die)
    engraving = _engraving_tools(die, model, settings)
    if not engraving:
        return shape  # every step above has checked its result
    shape = _engrave(shape, engraving, die)
    problems = solid_problems(shape)
    if problems:
        raise SolidError(
            f"die {die.part_id}: engraving the bottom face gives an invalid solid ({'; '.join(problems)}); "
            "shorten the engraving or leave it out"
        )
    return shape


def _engrave(body: "cq.Solid", tools: list[tuple[str, Any]], die: DieInput) -> "cq.Solid":
    """Sink the engraving pockets into the bottom face.

    A plain boolean cut takes seconds here: the kernel tests every letter face
    against the long lofted wall faces.  The pockets touch only the bottom
    face, so the bottom face is cut in its plane (a fast 2D boolean) and the
    pockets' floor and side faces are sewn in its place.
    """
    import cadquery as cq
    from OCP.BRepAdaptor import BRepAdaptor_Surface
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut
    from OCP.GeomAbs import GeomAbs_Plane
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeSolid, BRepBuilderAPI_Sewing
    from OCP.BRepLib import BRepLib
    from OCP.TopAbs import TopAbs_SHELL
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    if not tools:
        return body
    z_bottom = -die.height_mm
    hint = "the engraving overlaps a hole or the die's edge; shorten it or leave it out"
    try:
        pocket = tools[0][1].fuse(*[t for _, t in tools[1:]]) if len(tools) > 1 else tools[0][1]

        def on_bottom(face: Any) -> bool:
            surf = BRepAdaptor_Surface(face.wrapped)
            if surf.GetType() != GeomAbs_Plane:
                return False
            ax = surf.Plane().Axis()
            return abs(abs(ax.Direction().Z()) - 1.0) < 1e-9 and abs(ax.Location().Z() - z_bottom) < 1e-6

        old_bottom = [f for f in body.Faces() if on_bottom(f)]
        pocket_mouth = [f for f in pocket.Faces() if on_bottom(f)]
        pocket_rest = [f for f in pocket.Faces() if not on_bottom(f)]
        cut = BRepAlgoAPI_Cut(cq.Compound.makeCompound(old_bottom).wrapped,
                              cq.Compound.makeCompound(pocket_mouth).wrapped)
        if not cut.IsDone():
            raise SolidError(f"die {die.part_id}: the kernel could not cut the engraving into the bottom face; {hint}")
        new_bottom = cq.Shape.cast(cut.Shape()).Faces()
        area_old = sum(f.Area() for f in old_bottom)
        area_new = sum(f.Area() for f in new_bottom)
        area_mouth = sum(f.Area() for f in pocket_mouth)
        if abs(area_old - area_mouth - area_new) > 1e-6 * area_old + 1e-6:
            raise SolidError(f"die {die.part_id}: the engraving does not lie wholly on the bottom face; {hint}")
        sew = BRepBuilderAPI_Sewing(1e-6)
        for f in body.Faces():
            if not on_bottom(f):
                sew.Add(f.wrapped)
        for f in new_bottom + pocket_rest:
            sew.Add(f.wrapped)
        sew.Perform()
        exp = TopExp_Explorer(sew.SewedShape(), TopAbs_SHELL)
        shells = []
        while exp.More():
            shells.append(TopoDS.Shell_s(exp.Current()))
            exp.Next()
        if len(shells) != 1:
            raise SolidError(f"die {die.part_id}: the engraved faces did not close into one shell; {hint}")
        solid = BRepBuilderAPI_MakeSolid(shells[0]).Solid()
        BRepLib.OrientClosedSolid_s(solid)
    except SolidError:
        raise
    except Exception as exc:  # noqa: BLE001 - OCP's Standard_Failure family
        raise SolidError(f"die {die.part_id}: the kernel failed engraving the bottom face ({exc}); {hint}") from exc
    return cq.Solid(solid)  # checked by the caller


def _single_solid(shape: "cq.Shape", die: DieInput) -> "cq.Solid":
    import cadquery as cq

    solids = shape.Solids()
    if len(solids) != 1:
        raise SolidError(
            f"die {die.part_id}: the cuts split the die into {len(solids)} pieces: a flute or hole cuts right through "
            "a narrow spot; move it or make it smaller"
        )
    return cq.Solid(solids[0].wrapped)
