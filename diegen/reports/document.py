"""The forming report as a JSON-ready document: one dict per piece, one per rib.

Numbers in mm / MPa / degrees; strains as positive fractions.
"""

from __future__ import annotations

from typing import Any

from diegen import __version__
from diegen.analysis import MODELS, PieceAnalysis, RibAnalysis
from diegen.blank.drawing import BlankDrawing
from diegen.die.from_analysis import die_making, flute_lengths_mm, tile_plan
from diegen.die.tiles import tile_files
from diegen.errors import GeometryError
from diegen.findings import once

SAFETY = (
    "A shop press stores a great deal of energy: rubber, blank or a split die or box can be ejected. Guard the "
    "press, keep hands clear and stay within its rating. Flight structure must follow the aircraft designer's "
    "drawings, the alloy's heat-treatment specification and the inspection the local authority requires; "
    "defer to local codes and licensed practice."
)


def die_life(material: str) -> int | None:
    """Expected parts from one die of ``material`` (None: indefinitely), from the catalogue."""
    from diegen import materials

    return materials.die_material(material).life_parts


def section_label(spec: Any) -> str:
    """The section a rib is cut from, as its reports name it (see :attr:`diegen.spec.model.RibSpec.section_label`)."""
    return spec.section_label


def _r(value: float, digits: int = 3) -> float:
    return round(float(value), digits) + 0.0  # + 0.0: a negative zero becomes 0.0


PRINT_ORIENTATION = ("top face up, the flat bottom face on the bed: the wall leans in by the over-bend only, so "
                     "it needs no support, and the edge radius and the web face are printed as smooth top layers "
                     "(common practice, no source)")
BED_MARGIN_WHY = ("kept clear of the bed's outermost edge, where the first layer sticks worst and clips or the "
                  "frame may sit (common practice, no source)")


def print_json(rib: RibAnalysis, p: PieceAnalysis) -> dict[str, Any]:
    """``tiles`` (one per printed tile: bounds in mm and files) and ``print`` (the bed, joints and dowels) of a
    printed die; an empty list and None for a die that is not printed."""
    try:
        layout = tile_plan(rib, p)
    except GeometryError as exc:
        return {"tiles": [], "print": {"bed_mm": list(rib.spec.shared.die.print_bed_mm or ()) or None,
                                       "problem": str(exc)}}
    if layout is None:
        return {"tiles": [], "print": None}
    files = tile_files(p.piece.part_id, layout)
    tiles = [{"number": t.number, "x_range_mm": [_r(t.x_min_mm), _r(t.x_max_mm)],
              "y_range_mm": [_r(t.y_min_mm), _r(t.y_max_mm)], "z_range_mm": [_r(t.z_min_mm), _r(t.z_max_mm)],
              "size_mm": [_r(v) for v in t.size_mm], "along_bed_y": t.along_bed_y, "files": list(names)}
             for t, names in zip(layout.tiles, files)]
    return {"tiles": tiles, "print": {
        "bed_mm": None if layout.bed_mm is None else [_r(v) for v in layout.bed_mm],
        "bed_margin_mm": _r(layout.margin_mm), "bed_margin_why": BED_MARGIN_WHY, "orientation": PRINT_ORIENTATION,
        "joints_x_mm": [_r(x) for x in layout.joints_x_mm],
        "dowel_d_mm": _r(layout.dowel_d_mm), "dowel_depth_mm": _r(layout.dowel_depth_mm),
        "dowels_mm": [[_r(x), _r(y), _r(z)] for x, y, z in layout.dowels],
    }}


def blank_numbers(blank: BlankDrawing) -> dict[str, float]:
    from shapely.geometry import Polygon

    outer = Polygon(blank.outer)
    return {"area_mm2": _r(blank.net_area(), 1), "perimeter_mm": _r(outer.length, 2)}


def _joggle_json(j) -> dict[str, Any]:
    """A rib's joggle by spar, wall and chord range; a drawn part's by its index and the recessed stretch's ends."""
    if j.surface == "outline":
        return {"joggle": j.spar, "from_mm": [_r(v) for v in j.path[0]], "to_mm": [_r(v) for v in j.path[-1]],
                "depth_mm": _r(j.depth_mm), "ramp_mm": _r(j.ramp_mm)}
    return {"spar": j.spar, "surface": j.surface, "x_start_mm": _r(j.x_start_mm), "x_end_mm": _r(j.x_end_mm),
            "depth_mm": _r(j.depth_mm), "ramp_mm": _r(j.ramp_mm)}


def run_heights_json(p: PieceAnalysis) -> list[dict[str, Any]]:
    """Per flange shape of a part whose flange runs differ (height, bend radius, angle): its developed width,
    wrinkle limit, how far the blank edge stands outside the die outline, and the die outline's runs (from, to)
    that carry it; where some run has its own bend radius or angle, each shape's bend: its die radius, die angle
    and over-bend, bend allowance and setback, and the spec keys of its runs."""
    sb = p.springback
    runs = p.piece.runs
    bends = [{"bend": {"flange_runs": list(h.keys), "part_radius_mm": _r(h.bend_radius_mm),
                       "angle_deg": _r(h.angle_deg), "die_radius_mm": _r(h.die(sb).die_radius_mm),
                       "die_angle_deg": _r(h.die(sb).die_angle_deg),
                       "overbend_deg": _r(h.die(sb).die_angle_deg - h.angle_deg),
                       "bend_allowance_mm": _r(h.layout.bend_allowance_mm), "setback_mm": _r(h.layout.setback_mm)}}
             if p.mixed_bends else {} for h in p.shapes]
    return [{**bend, "height_mm": _r(h.height_mm), "developed_width_mm": _r(h.layout.developed_width_mm),
             "blank_offset_mm": _r(h.layout.developed_width_mm - h.tangent_inset_mm(sb)),
             "shrink_limit": _r(h.shrink_limit, 4),
             "die_runs": [{"from": [_r(runs[i].points[0][0]), _r(runs[i].points[0][1])],
                           "to": [_r(runs[i].points[-1][0]), _r(runs[i].points[-1][1])]} for i in h.run_indexes]}
            for h, bend in zip(p.shapes, bends, strict=True)]


def piece_json(rib: RibAnalysis, p: PieceAnalysis) -> dict[str, Any]:
    """The report of one piece (the keys ``diegen check --json`` documents)."""
    g = p.piece
    flange = rib.spec.shared.flange
    return {
        "id": g.part_id,
        "piece": g.name,
        "rib": rib.spec.id,
        ("airfoil" if rib.spec.drawn is None else "drawing"): section_label(rib.spec),
        "chord_mm": _r(rib.geometry.chord_mm),
        "x_range_mm": [_r(g.x_range_mm[0]), _r(g.x_range_mm[1])],
        "depth_range_mm": [_r(g.depth_range_mm[0]), _r(g.depth_range_mm[1])],
        "bend": {
            "part_radius_mm": _r(p.springback.part_radius_mm),
            "die_radius_mm": _r(p.springback.die_radius_mm),
            "die_angle_deg": _r(p.springback.die_angle_deg),
            "overbend_deg": _r(p.springback.overbend_deg),
            "k_factor": _r(p.layout.k_factor),
            "bend_allowance_mm": _r(p.layout.bend_allowance_mm),
            "bend_allowance_aviation_mm": _r(p.layout.bend_allowance_aviation_mm),
            "setback_mm": _r(p.layout.setback_mm),
            "min_radius_mm": _r(p.min_radius.radius_mm),
            "min_radius_table": p.min_radius.citation,
            "springback_model": p.springback.model,
            "trial": flange.trial is not None,
        },
        "flange": {
            "height_mm": _r(flange.height_mm),
            "developed_width_mm": _r(p.layout.developed_width_mm),
            "max_shrink_strain": _r(p.max_shrink, 4),
            "max_stretch_strain": _r(p.max_stretch, 4),
            "residual_shrink_strain": _r(p.flange.residual_shrink, 4),
            "shrink_limit": _r(p.flange.shrink_limit, 4),
            "stretch_limit": p.alloy.stretch_limit,
            "verdict": p.flange.verdict,
            "remedies": list(p.flange.remedies),
            "flutes": [{"s_mm": _r(f.s_mm, 1), "width_mm": _r(f.width_mm), "depth_mm": _r(f.depth_mm),
                        "lip_radius_mm": _r(f.lip_radius_mm)} for f in p.flutes],
            "notches": [{"s_mm": _r(n.s_mm, 1), "opening_mm": _r(n.opening_mm), "depth_mm": _r(n.depth_mm)}
                        for n in p.notches],
            "relief_policy": rib.spec.shared.relief,
            "relief_notes": list(p.relief_notes),
            **({"runs": run_heights_json(p)} if p.mixed_heights else {}),
        },
        "die": {
            "outline_length_mm": _r(g.die_length_mm, 2),
            "area_mm2": _r(g.die_area_mm2, 1),
            **({"overrun_mm": _r(g.die_overrun_mm)} if g.die_overrun_mm else {}),
            "height_mm": _r(p.die_height_mm),
            "layers": p.die_layers,
            **({"flute_lengths_mm": sorted({_r(v) for v in flute_lengths_mm(p, flange.height_mm)})}
               if p.mixed_heights and p.flutes else {}),
            "material": rib.spec.shared.die.material,
            "buildable": p.die is None or p.die.buildable,
            "refusal": None if p.die is None else p.die.refusal,
            "joggles": [_joggle_json(j) for j in g.joggles],
            "making": die_making(rib.spec.shared.die),
            "drawing_files": [f"{g.part_id}-die.dxf", f"{g.part_id}-die.svg"],
            **print_json(rib, p),
        },
        "blank": blank_numbers(p.blank),
        "holes": [{"x_mm": _r(h.x), "y_mm": _r(h.y), "d_mm": _r(h.d), "bore_d_mm": _r(c.bore_d_mm),
                   "flanged": h.flanged, "flange_height_mm": _r(h.flange_height), "pilot_d_mm": _r(c.pilot_d_mm),
                   "stretch_strain": _r(c.stretch_strain, 4), "stretch_ok": c.ok}
                  for h, c in zip(g.holes, p.holes, strict=True)],
        "pins": [{"x_mm": _r(q.x), "y_mm": _r(q.y), "d_mm": _r(q.d)} for q in g.pins],
        "press": {
            "force_n": _r(rib.spec.shared.press.force_n, 1),
            "force_read_as": rib.spec.shared.press.force_read,
            "box_area_mm2": _r(rib.spec.shared.press.box_mm[0] * rib.spec.shared.press.box_mm[1], 1),
            "pressure_mpa": _r(p.press.pressure_mpa, 4),
            "die_top_pressure_mpa": _r(p.press.die_top_pressure_mpa, 4),
            "needed_mpa": _r(p.press.needed_mpa, 4),
            "reachable_radius_mm": _r(p.press.reachable_radius_mm),
            "flange_angle_deg": _r(p.press.flange_angle_deg, 1),
            "verdict": p.press.verdict,
            "flanges": [{"name": r.leg.name, "kind": r.leg.kind, "height_mm": _r(r.leg.leg_mm),
                         "radius_mm": _r(r.leg.radius_mm), "start_mpa": _r(r.start_mpa, 4),
                         "full_mpa": _r(r.full_mpa, 4), "angle_deg": _r(r.angle_deg, 1)} for r in p.press.legs],
            "fits_box": p.press.fits_box,
            "rubber_ok": p.press.rubber_ok,
            "die_crush_ok": p.press.die_crush_ok,
            "durometer_advice": p.press.durometer_advice,
            "die_life_parts": die_life(rib.spec.shared.die.material),
        },
        "warnings": [w.as_json() for w in p.warnings],
    }


def rib_json(rib: RibAnalysis) -> dict[str, Any]:
    return {"diegen_version": __version__, "spec": rib.spec.id, "models": MODELS, "safety": SAFETY,
            "warnings": [w.as_json() for w in once(rib.geometry.warnings)],
            "parts": [piece_json(rib, p) for p in rib.pieces]}


__all__ = ["BED_MARGIN_WHY", "PRINT_ORIENTATION", "SAFETY", "blank_numbers", "die_life", "piece_json", "print_json",
           "rib_json", "section_label"]
