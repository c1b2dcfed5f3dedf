"""The shop sheet: a Markdown page for the person who cuts the die, cuts the blank and runs the press."""

from __future__ import annotations

from collections.abc import Sequence

from diegen.analysis import PieceAnalysis, RibAnalysis
from diegen.die.drawing import (
    BORES,
    BOTTOM_OUTLINE,
    DOWEL_HOLES,
    FLUTES,
    JOGGLES,
    MARKS,
    TILE_JOINTS,
    TOP_FLAT,
    TOP_OUTLINE,
)
from diegen.die.from_analysis import die_making, flute_lengths_mm
from diegen.forming.relief import flute_arc_radius
from diegen.geometry import die_wall
from diegen.geometry.loops import polyline_length
from diegen.numbers import without_negative_zeros
from diegen.reports.document import PRINT_ORIENTATION, SAFETY, print_json, section_label
from diegen.reports.text import die_life_text
from diegen.units import MM_PER_IN, mpa_to_psi

# Standard round-over bit radii (common practice, no source): 1/16 to 1/2 in by 1/32 in, and 1 to 12 mm.
_INCH_ROUND_OVERS = tuple(n / 32 * MM_PER_IN for n in range(2, 17))
_MM_ROUND_OVERS = tuple(float(r) for r in range(1, 13))


def _flange_heights(piece: PieceAnalysis, shared) -> str:
    """"flange H" for one height, or each height of a part whose flange runs differ, with their run counts; each
    run's bend radius and angle where some run has its own."""
    if piece.mixed_bends:
        each = "; ".join(f"{', '.join(h.keys) or 'flanges'}: {_both(h.height_mm)} at inside radius "
                         f"{_both(h.bend_radius_mm)}, bent through {h.angle_deg:g}° (die radius "
                         f"{_both(h.die(piece.springback).die_radius_mm)}, over-bend "
                         f"{h.die(piece.springback).die_angle_deg - h.angle_deg:.1f}°)" for h in piece.shapes)
        return f"flange runs of their own shape ({each})"
    if not piece.mixed_heights:
        return f"flange {_both(shared.flange.height_mm)}"
    each = ", ".join(f"{_both(h.height_mm)} ({len(h.run_indexes)} run{'s' if len(h.run_indexes) > 1 else ''})"
                     for h in piece.shapes)
    return f"flange runs of their own heights, {each},"


def _both(mm: float) -> str:
    return f"{mm:.2f} mm ({mm / MM_PER_IN:.3f} in)"


def nearest_round_over(radius_mm: float, inch: bool) -> float:
    """The standard round-over bit radius closest to ``radius_mm`` (mm)."""
    sizes = _INCH_ROUND_OVERS if inch else _MM_ROUND_OVERS
    return min(sizes, key=lambda r: abs(r - radius_mm))


class _Steps:
    """Numbered steps that stay consecutive whatever is left out."""

    def __init__(self) -> None:
        self.count = 0

    def __call__(self, text: str) -> str:
        self.count += 1
        return f"{self.count}. {text}"


def _header(rib: RibAnalysis, piece: PieceAnalysis) -> list[str]:
    g, spec = piece.piece, rib.spec
    shared = spec.shared
    sb = piece.springback
    if spec.drawn is None:
        what = (f"Rib **{spec.id}**{' — ' + spec.title if spec.title else ''}, **{g.name}** piece, "
                f"x = {g.x_range_mm[0]:.1f} … {g.x_range_mm[1]:.1f} mm from the leading edge; section "
                f"**{section_label(spec)}** at {rib.geometry.chord_mm:.1f} mm chord. ")
    else:
        what = (f"Part **{spec.id}**{' — ' + spec.title if spec.title else ''}, drawn in **{section_label(spec)}**, "
                f"{rib.geometry.chord_mm:.1f} mm long (x = {g.x_range_mm[0]:.1f} … {g.x_range_mm[1]:.1f} mm on the "
                "die). ")
    return [
        f"# Shop sheet — {g.part_id}",
        "",
        what +
        f"Sheet **{piece.alloy.name} {_both(shared.sheet.thickness_mm)}**; {_flange_heights(piece, shared)}" +
        ("" if piece.mixed_bends else f" at inside radius {_both(sb.part_radius_mm)}") + (
            "; the blank's edge steps where two heights meet" if len({h.height_mm for h in piece.shapes}) > 1 else
            "") + ".",
        "",
        "> **Caution.** " + SAFETY,
        "",
    ]


def _die_size(piece: PieceAnalysis) -> tuple[float, float]:
    xs = [p[0] for p in piece.piece.die_outline]
    ys = [p[1] for p in piece.piece.die_outline]
    return max(xs) - min(xs), max(ys) - min(ys)


def _blank_stock(piece: PieceAnalysis, shared) -> str:
    bx = [p[0] for p in piece.blank.outer]
    by = [p[1] for p in piece.blank.outer]
    return (f"* Blank: {piece.alloy.name}, {_both(shared.sheet.thickness_mm)}, at least "
            f"{_both(max(bx) - min(bx) + 2 * MARGIN_MM)} × {_both(max(by) - min(by) + 2 * MARGIN_MM)}; grain across "
            "the long bend lines (the arrow on the template).")


MARGIN_MM = 10.0  # stock left round a part for holding and trimming (common practice, no source)


def _stock(piece: PieceAnalysis, shared, what: str) -> list[str]:
    length, depth = _die_size(piece)
    lines = [
        "## 1. Stock to cut",
        "",
        f"* Die: {shared.die.material} {what} ({piece.die_layers} layer(s) of {_both(shared.die.stock_thickness_mm)} → "
        f"{_both(piece.die_height_mm)} high), at least {_both(length + 2 * MARGIN_MM)} × "
        f"{_both(depth + 2 * MARGIN_MM)}.",
        _blank_stock(piece, shared),
    ]
    if piece.die_layers > 1:
        lines.append(f"* Laminate the {piece.die_layers} layers with a rigid adhesive and align them on the dowel "
                     "holes before profiling (the layer outlines are in the die files' notes below).")
    return lines


def _own_walls(piece: PieceAnalysis) -> bool:
    """Whether the die's wall is not the one over-bent wall of a square flange: flange runs of their own die
    radius or angle, or a wall leaning out (flanges bent through less than 90°)."""
    return piece.mixed_bends and (piece.die is None or piece.die.die.profiles is not None
                                  or piece.die.die.undercut_deg < 0)


def _wall_lines(piece: PieceAnalysis, inch: bool) -> str:
    """Each flange shape's wall: its die radius (and the nearest standard bit), lean and die angle."""
    out = []
    for h in piece.shapes:
        die = h.die(piece.springback)
        lean = die.die_angle_deg - 90.0
        leans = (f"leaning in {lean:.1f}° going down" if lean >= 0 else
                 f"leaning out {-lean:.1f}° going down (cut it from the top face with a chamfer bit of {-lean:.1f}° "
                 "per side)")
        runs = ", ".join(f"`{k}`" for k in h.keys) or "the flanged edges"
        out.append(f"{runs} ({_both(h.height_mm)} high, part radius {_both(h.bend_radius_mm)}, bent through "
                   f"{h.angle_deg:g}°): top-edge radius **{_both(die.die_radius_mm)}** (nearest standard bit "
                   f"{_both(nearest_round_over(die.die_radius_mm, inch))}), wall {leans}, die angle "
                   f"{die.die_angle_deg:.1f}° (over-bend {die.die_angle_deg - h.angle_deg:.1f}°)")
    return "; ".join(out)


def _own_wall_steps(piece: PieceAnalysis, step: _Steps, inch: bool, tool: str) -> list[str]:
    """The set-ups of a die whose flange runs have walls of their own."""
    return [
        step("**The wall, run by run** (each flange run's own springback-compensated die): "
             f"{_wall_lines(piece, inch)}. "
             f"Between two runs the wall changes smoothly over the stretches the `profile-blend` findings name (and "
             f"across cut edges): cut the whole wall from the STEP model with a {tool} (3-axis surfacing from the "
             f"top face), or rough it to `{BOTTOM_OUTLINE.name}` and `{TOP_OUTLINE.name}` and finish each run's wall "
             "and the changes between them by hand to a template of each run's profile."),
        step(f"**Bottom face up.** Engrave layer `{MARKS.name}` on this face (never on the top: it would print into "
             "the web)."),
    ]


def _drawing_note(part: str) -> str:
    return (f"The die drawing `{part}-die.dxf` (and `{part}-die.svg`, 1:1 in mm) holds every outline for 2D CAM on "
            f"named layers; it is drawn as seen from the top face, so mirror it about X for a set-up with the bottom "
            f"face up.")


def _routed(rib: RibAnalysis, piece: PieceAnalysis) -> list[str]:
    g, shared, sb = piece.piece, rib.spec.shared, piece.springback
    inch = rib.spec.units == "in"
    step = _Steps()
    lines = [
        *_stock(piece, shared, "stock"),
        "",
        "## 2. Router set-ups (3-axis)",
        "",
        _drawing_note(g.part_id),
        "",
    ]
    if _own_walls(piece):
        lines += _own_wall_steps(piece, step, inch, "ball-nose bit")
        lines += _wall_features(piece, shared, step, "ball-nose bit from the side, or a round file no larger than "
                                "that radius", "round-over")
        return lines
    lines += [
        step(f"**Bottom face up.** Profile the outline with a **tapered bit of {sb.overbend_deg:.1f}° per side** "
             f"so the wall leans in by the over-bend (the die angle is {sb.die_angle_deg:.1f}° so the flange springs "
             f"back to 90°): the wall meets the bottom face on layer `{BOTTOM_OUTLINE.name}` and the top face on "
             f"`{TOP_OUTLINE.name}`. Without a tapered bit: cut `{TOP_OUTLINE.name}` straight with a "
             f"≤ {_both(shared.die.cutter_diameter_mm)} straight bit from the top and file the undercut by hand to "
             f"`{BOTTOM_OUTLINE.name}`. Engrave layer `{MARKS.name}` on this face (never on the top: it would print "
             "into the web): single-stroke capitals, cut along their centre lines with a bit as wide as the "
             "strokes."),
        step(f"**Top face up.** Round the top edge with a **round-over bit of radius {_both(sb.die_radius_mm)}** "
             f"(the springback-compensated die radius, not the part radius), from `{TOP_OUTLINE.name}` in to "
             f"`{TOP_FLAT.name}`; the nearest standard bit is {_both(nearest_round_over(sb.die_radius_mm, inch))}."),
    ]
    lines += _wall_features(piece, shared, step, "ball-nose bit from the side, or a round file no larger than "
                            "that radius", "round-over")
    return lines


def _machined(rib: RibAnalysis, piece: PieceAnalysis) -> list[str]:
    g, shared, sb = piece.piece, rib.spec.shared, piece.springback
    inch = rib.spec.units == "in"
    step = _Steps()
    lines = [
        *_stock(piece, shared, "plate"),
        "",
        "## 2. Machining set-ups (3-axis mill)",
        "",
        _drawing_note(g.part_id) + " Carbide end mills, not router bits; flood coolant or a lubricant mist, light "
        "finishing passes, chips cleared (common practice, no source).",
        "",
    ]
    if _own_walls(piece):
        lines += _own_wall_steps(piece, step, inch, "ball end mill")
        lines += _wall_features(piece, shared, step, "ball end mill from the side, finished with a round file",
                                "corner-rounding")
        lines.append(step("Deburr every edge and polish the edge radius and the walls: a scratch in the die marks "
                          "every part."))
        return lines
    lines += [
        step(f"**Bottom face up.** Profile the wall with a **tapered end mill of {sb.overbend_deg:.1f}° per side** "
             f"along `{BOTTOM_OUTLINE.name}` (the wall reaches `{TOP_OUTLINE.name}` at the top face; the die angle "
             f"is {sb.die_angle_deg:.1f}° so the flange springs back to 90°), or rough it with a square end mill and "
             f"finish the undercut with a ball end mill along the STEP wall. Engrave layer `{MARKS.name}` on this "
             "face with a small ball or engraving end mill."),
        step(f"**Top face up.** Round the top edge with a **corner-rounding end mill of radius "
             f"{_both(sb.die_radius_mm)}** from `{TOP_OUTLINE.name}` in to `{TOP_FLAT.name}`; the nearest standard "
             f"size is {_both(nearest_round_over(sb.die_radius_mm, inch))}."),
    ]
    lines += _wall_features(piece, shared, step, "ball end mill from the side, finished with a round file",
                            "corner-rounding")
    lines.append(step("Deburr every edge and polish the edge radius and the walls: a scratch in the die marks "
                      "every part."))
    return lines


def _wall_features(piece: PieceAnalysis, shared, step: _Steps, flute_tool: str, edge_tool: str) -> list[str]:
    g = piece.piece
    lines = []
    if g.joggles:
        depth = "the cap thickness" if g.joggles[0].surface != "outline" else "the joggle's depth"
        lines.append(step(f"Joggle recesses ({len(g.joggles)}, layer `{JOGGLES.name}`): stepped into the wall by "
                          f"{depth} with S-shaped run-outs; they are part of the outline and cut with it."))
    if piece.flutes:
        sizes: dict[tuple[float, float], list] = {}
        for f in piece.flutes:
            sizes.setdefault((round(f.width_mm, 1), round(f.depth_mm, 1)), []).append(f)
        kinds = "; ".join(f"{len(same)} × {w:.1f} mm wide, {d:.1f} mm deep (an arc of radius "
                          f"{flute_arc_radius(same[0].width_mm, same[0].depth_mm):.1f} mm)"
                          for (w, d), same in sizes.items())
        lip = max(f.lip_radius_mm for f in piece.flutes)
        lengths = sorted(set(flute_lengths_mm(piece, shared.flange.height_mm)))
        full = (_both(shared.flange.height_mm) + " down" if not piece.mixed_heights else
                "its own flange's edge (" + ", ".join(_both(v) for v in lengths) + " down)")
        lines.append(step(f"**Flutes ({len(piece.flutes)}, layer `{FLUTES.name}`)**: grooves tapering from nothing at "
                          f"the top edge to full depth at {full}: {kinds} "
                          f"({flute_tool}). Round each flute's lips (where the groove meets the wall) to at least "
                          f"{_both(lip)} with a file: a sharp lip cracks the sheet."))
    cut = _cut_edge_strip_mm(piece)
    if cut:
        lines.append(step(f"**Cut edges** ({_cut_edges_text(piece)}): the blank stops flush with the die outline "
                          f"there, so leave the die's top edge **square** along them (no {edge_tool} there): rounded, "
                          f"it would leave the blank's last {_both(cut)} unsupported and the rubber would curl it "
                          "down (the die files round them like the flanged edges: stop the tool at their ends)."))
    elif g.die_overrun_mm:
        lines.append(step(f"**Cut end**: the die runs on {_both(g.die_overrun_mm)} past the blank's aft end (a cut "
                          "edge, no flange), so that end lies on the die's flat top, "
                          f"{_both(g.die_overrun_mm - _top_setback_mm(piece))} clear of the rounded top edge: do not "
                          "trim the die to the part's length; the pins place the blank."))
    bores = [(h, c) for h, c in zip(g.holes, piece.holes) if h.flanged]
    if bores:
        lines.append(step(f"Through bores for {len(bores)} flanged lightening hole(s) (layer `{BORES.name}`), each "
                          "the clear hole plus the sheet thickness on either side, top edges rounded to the die "
                          f"radius with the {edge_tool} tool: " +
                          ", ".join(f"Ø{c.bore_d_mm:.2f} mm at ({h.x:.1f}, {h.y:.1f}) for the Ø{h.d:.0f} mm hole"
                                    for h, c in bores) + "."))
    return lines


def _top_setback_mm(piece: PieceAnalysis) -> float:
    """How far the die's flat top ends inside its outline: the top setback R·(1 + sin α)/cos α of the die radius R
    and over-bend α (:mod:`diegen.geometry.die_wall`)."""
    sb = piece.springback
    return die_wall.top_setback_mm(sb.die_radius_mm, sb.overbend_deg)


def _cut_edge_strip_mm(piece: PieceAnalysis) -> float:
    """How much of the blank lies over the die's rounded top edge along the piece's cut edges (runs with no
    flange), where the blank stops flush with the piece's outline: the top setback, less how far the die runs on
    past a cut end (a rib tail's; none left once it runs on past the setback); 0 when the piece has no cut edge."""
    if all(run.flanged for run in piece.piece.runs):
        return 0.0
    return max(_top_setback_mm(piece) - piece.piece.die_overrun_mm, 0.0)


def _cut_edges_text(piece: PieceAnalysis) -> str:
    runs = [r for r in piece.piece.runs if not r.flanged]
    return f"{len(runs)} edge(s) with no flange, {sum(polyline_length(r.points) for r in runs):.0f} mm in all"


def _printed(rib: RibAnalysis, piece: PieceAnalysis) -> list[str]:
    from diegen import materials

    shared = rib.spec.shared
    material = materials.die_material(shared.die.material)
    info = print_json(rib, piece)
    lines = [
        "## 1. Printing the die",
        "",
        f"* Die: {material.description}, {_both(piece.die_height_mm)} high; no stock to cut and no layers to "
        "laminate.",
        f"* Print orientation: {PRINT_ORIENTATION}.",
        _blank_stock(piece, shared),
    ]
    plan = info["print"]
    if plan is None or plan.get("problem"):
        length, depth = _die_size(piece)
        lines.append(f"* **The die cannot be laid out on the bed:** {plan['problem']}." if plan else
                     f"* Printed in one piece: the bed must take {length:.0f} × {depth:.0f} mm plus a margin.")
        return lines
    tiles = info["tiles"]
    if plan["bed_mm"] is None:
        t = tiles[0]
        lines.append(f"* Printed in one piece of {t['size_mm'][0]:.1f} × {t['size_mm'][1]:.1f} × "
                     f"{t['size_mm'][2]:.1f} mm (`{t['files'][1]}`): no print bed is given (`die.print_bed`), so "
                     f"the bed must take it with {plan['bed_margin_mm']:g} mm to spare all round.")
        return lines
    bx, by = plan["bed_mm"]
    lines += [
        f"* Bed {bx:g} × {by:g} mm; every tile keeps {plan['bed_margin_mm']:g} mm from its edges: "
        f"{plan['bed_margin_why']}.",
        "",
        "| tile | x from – to (mm) | length × width × height (mm) | lies along the bed's | files |",
        "|---|---|---|---|---|",
    ]
    for t in tiles:
        lines.append(f"| {t['number']} | {t['x_range_mm'][0]:.1f} – {t['x_range_mm'][1]:.1f} | "
                     f"{t['size_mm'][0]:.1f} × {t['size_mm'][1]:.1f} × {t['size_mm'][2]:.1f} | "
                     f"{'Y' if t['along_bed_y'] else 'X'} | `{t['files'][0]}`, `{t['files'][1]}` |")
    lines.append("")
    if len(tiles) > 1:
        joints = ", ".join(f"{x:.1f}" for x in plan["joints_x_mm"])
        dowels = "; ".join(f"x = {x:.1f}, y = {y:.1f}" for x, y, _ in plan["dowels_mm"])
        lines += [
            f"* Joints at x = {joints} mm (layer `{TILE_JOINTS.name}` of the die drawing). Alignment dowels "
            f"Ø{plan['dowel_d_mm']:g} mm, {2 * plan['dowel_depth_mm']:g} mm long ({plan['dowel_depth_mm']:g} mm into "
            f"each tile), along X at mid-height: {dowels} mm.",
            "* Glue the tiles with the dowels in, on a flat plate with the top faces down so the top face is flush; "
            "sand any step at a joint smooth before forming (common practice, no source).",
            "* Each tile carries its number on its bottom face (see the notes below); no joint cuts a letter.",
        ]
    lines += ["* After printing: drill or ream the tooling-pin holes (see below).",
              f"* Material: {material.machining_note}"]
    return lines


def shop_sheet(rib: RibAnalysis, piece: PieceAnalysis, die_notes: Sequence[str] = ()) -> str:
    """The Markdown shop sheet of one piece: the die's section follows the way the die is made."""
    g, spec = piece.piece, rib.spec
    shared = spec.shared
    press = piece.press
    making = die_making(shared.die)
    lines = _header(rib, piece)
    lines += {"printed": _printed, "machined": _machined}.get(making, _routed)(rib, piece)
    lines += [
        "",
        "## 3. Drilling and notes from the die files" if making != "printed" else "## 2. Notes from the die files",
        "",
        f"* Tooling pins: Ø{g.pins[0].d:.2f} mm dowels, press fit — "
        + ("printed holes come out a little small and rough: drill or ream the die's holes a few hundredths under "
           "the dowel size (common practice, no source)" if making == "printed"
           else f"drill the die (layer `{DOWEL_HOLES.name}`) a few hundredths under size (or ream)")
        + ", blank holes at size: " + ", ".join(f"({q.x:.1f}, {q.y:.1f})" for q in g.pins) + " mm.",
    ]
    lines += [f"* {note}" for note in die_notes]
    if making != "printed":
        from diegen import materials

        lines.append(f"* Material: {materials.die_material(shared.die.material).machining_note}")
    number = 4 if making != "printed" else 3
    step = _Steps()
    lines += [
        "",
        f"## {number}. The blank",
        "",
        "* Print the PDF template at 100 % (check the 50 mm square), or cut from the DXF (CUT layer; DRILL layer for "
        "pin holes).",
        "* Drill the corner relief holes and pilot holes, deburr every edge. Mark the bend lines (SCRIBE layer) with a "
        "fine marker; do not scratch 2000-series or clad sheet — scratches start cracks (common practice).",
        "* Pilot holes for flanged lightening holes: " +
        (", ".join(f"Ø{c.pilot_d_mm:.1f} mm" for h, c in zip(g.holes, piece.holes) if h.flanged) or "none") + ".",
        "",
        f"## {number + 1}. Forming",
        "",
        step("Wipe the die and blank; a film of lubricant (spray furniture polish or light oil) on the die walls."),
        step("Pin the blank to the die on the dowels, web on the top face."),
        step("A sacrificial rubber sheet over the blank protects the pad from the sheet's edges."),
        step(f"Centre the die in the box (≥ {_both(shared.press.wall_clearance_mm)} from every wall), close the press "
             f"to its rating ({shared.press.force_n / 1000:.0f} kN), hold, release."),
        step(f"Press check: **{press.verdict.upper()}** — {press.pressure_mpa:.2f} MPa "
             f"({mpa_to_psi(press.pressure_mpa):.0f} psi) in the box; setting the flanges on the "
             f"{_both(piece.springback.die_radius_mm)} die radius needs {press.needed_mpa:.2f} MPa "
             f"({mpa_to_psi(press.needed_mpa):.0f} psi), " +
             (f"so expect the perimeter flange at about {press.flange_angle_deg:.0f}° (plastic-hinge model, see "
              "the report)." if press.fits_box else
              "but the die does not fit this box with the wall clearance: it cannot be pressed in it (use a "
              "larger box, or split the die).") +
             f" Expect {die_life_text(shared.die.material)} from a {shared.die.material} die; "
             f"{press.durometer_advice}."),
    ]
    cut = _cut_edge_strip_mm(piece)
    if cut and making == "printed":
        lines.append(step(f"Cut edges ({_cut_edges_text(piece)}): the printed die rounds its top edge there too, so "
                          f"the blank's last {_both(cut)} along them lies over the radius and turns down a little: "
                          "flatten that strip on a flat plate with a soft mallet after pressing."))
    if press.verdict != "full" and press.fits_box:
        names = ", ".join(f"{r.leg.name} (about {r.angle_deg:.0f}°)" for r in press.short_legs)
        lines.append(step("Finish by hand over the die, with the blank still pinned: a hand seamer, or a hardwood "
                          f"block and a soft mallet, working along the flange a little at a time: {names}."))
    flange = piece.flange
    check = (f"Check the flange angle (90°) and radius. Edge shrink left after relief "
             f"{flange.residual_shrink:.3f} at worst against a {flange.shrink_limit:.3f} wrinkle limit: "
             f"**{flange.verdict}**")
    lines.append(step(check + (". " + "; or ".join(flange.remedies) + "." if flange.remedies else ".")))
    if piece.alloy.name.endswith(("-O", "-W")):
        lines.append(step(f"**Heat treatment.** {piece.alloy.name} is not a flight temper: the formed part must be "
                          "solution heat-treated and aged to the temper the drawings call for, to the alloy's "
                          "heat-treatment specification, before it is a flight part. Trial-form and check it after "
                          "heat treatment: it distorts and its springback differs."))
    lines += [
        "",
        f"## {number + 2}. Warnings",
        "",
    ]
    lines += [f"* {w}" for w in (*piece.warnings, *rib.geometry.warnings)] or ["* none"]
    lines += [
        "",
        "---",
        "Numbers are typical handbook values and first-order models (named in the report JSON); trial-form a "
        "part before committing material. Heat treatment, if any, follows the alloy's specification. Flight parts "
        "follow the designer's drawings and the inspection the local authority requires.",
        "",
    ]
    return without_negative_zeros("\n".join(lines))
