"""The shop sheet: a Markdown page for the person who cuts the die, cuts the blank and runs the press."""

from __future__ import annotations

from collections.abc import Sequence

from diegen.analysis import PieceAnalysis, RibAnalysis
from diegen.forming.relief import flute_arc_radius
from diegen.reports.document import SAFETY
from diegen.reports.text import die_life_text
from diegen.units import MM_PER_IN, mpa_to_psi

# Standard round-over bit radii (common practice, no source): 1/16 to 1/2 in by 1/32 in, and 1 to 12 mm.
_INCH_ROUND_OVERS = tuple(n / 32 * MM_PER_IN for n in range(2, 17))
_MM_ROUND_OVERS = tuple(float(r) for r in range(1, 13))


def _both(mm: float) -> str:
    return f"{mm:.2f} mm ({mm / MM_PER_IN:.3f} in)"


def nearest_round_over(radius_mm: float, inch: bool) -> float:
    """The standard round-over bit radius closest to ``radius_mm`` (mm)."""
    sizes = _INCH_ROUND_OVERS if inch else _MM_ROUND_OVERS
    return min(sizes, key=lambda r: abs(r - radius_mm))


def shop_sheet(rib: RibAnalysis, piece: PieceAnalysis, die_notes: Sequence[str] = ()) -> str:
    """The Markdown shop sheet of one piece."""
    g, spec = piece.piece, rib.spec
    shared = spec.shared
    inch = spec.units == "in"
    sb = piece.springback
    xs = [p[0] for p in g.outline]
    ys = [p[1] for p in g.outline]
    bx = [p[0] for p in piece.blank.outer]
    by = [p[1] for p in piece.blank.outer]
    margin = 10.0
    round_over = nearest_round_over(sb.die_radius_mm, inch)
    press = piece.press
    lines = [
        f"# Shop sheet — {g.part_id}",
        "",
        f"Rib **{spec.id}**{' — ' + spec.title if spec.title else ''}, **{g.name}** piece, "
        f"x = {g.x_range_mm[0]:.1f} … {g.x_range_mm[1]:.1f} mm from the leading edge. "
        f"Sheet **{piece.alloy.name} {_both(shared.sheet.thickness_mm)}**; flange {_both(shared.flange.height_mm)} "
        f"at inside radius {_both(sb.part_radius_mm)}.",
        "",
        "> **Caution.** " + SAFETY,
        "",
        "## 1. Stock to cut",
        "",
        f"* Die: {shared.die.material} ({piece.die_layers} layer(s) of {_both(shared.die.stock_thickness_mm)} → "
        f"{_both(piece.die_height_mm)} high), at least {_both(max(xs) - min(xs) + 2 * margin)} × "
        f"{_both(max(ys) - min(ys) + 2 * margin)}.",
        f"* Blank: {piece.alloy.name}, {_both(shared.sheet.thickness_mm)}, at least "
        f"{_both(max(bx) - min(bx) + 2 * margin)} × {_both(max(by) - min(by) + 2 * margin)}; grain across the "
        "long bend lines (the arrow on the template).",
    ]
    if piece.die_layers > 1:
        lines.append(f"* Laminate the {piece.die_layers} layers with a rigid adhesive and align them on the dowel "
                     "holes before profiling (the layer outlines are in the die files' notes below).")
    lines += [
        "",
        "## 2. Router set-ups (3-axis)",
        "",
        f"1. **Bottom face up.** Profile the outline with a **tapered bit of {sb.overbend_deg:.1f}° per side** "
        f"so the wall leans in by the over-bend (the die angle is {sb.die_angle_deg:.1f}° so the flange springs back "
        f"to 90°). Without a tapered bit: cut the outline straight with a ≤ {_both(shared.die.cutter_diameter_mm)} "
        "straight bit from the top and file the undercut by hand to the bottom outline. Engrave the part id and "
        "arrow on this face (never on the top: it would print into the web): single-stroke capitals, cut along their "
        "centre lines with a bit as wide as the strokes.",
        f"2. **Top face up.** Round the top edge with a **round-over bit of radius {_both(sb.die_radius_mm)}** "
        f"(the springback-compensated die radius, not the part radius); the nearest standard bit is "
        f"{_both(round_over)}.",
    ]
    if g.joggles:
        lines.append(f"3. Joggle recesses ({len(g.joggles)}): stepped into the wall by the cap thickness with "
                     "S-shaped run-outs; they are part of the outline and cut with it.")
    if piece.flutes:
        sizes: dict[tuple[float, float], list] = {}
        for f in piece.flutes:
            sizes.setdefault((round(f.width_mm, 1), round(f.depth_mm, 1)), []).append(f)
        kinds = "; ".join(f"{len(same)} × {w:.1f} mm wide, {d:.1f} mm deep (an arc of radius "
                          f"{flute_arc_radius(same[0].width_mm, same[0].depth_mm):.1f} mm)"
                          for (w, d), same in sizes.items())
        lip = max(f.lip_radius_mm for f in piece.flutes)
        lines.append(f"4. **Flutes ({len(piece.flutes)})**: grooves tapering from nothing at the top edge to full depth "
                     f"at {_both(shared.flange.height_mm)} down: {kinds}; at the positions in the STEP file (ball-nose "
                     "bit from the side, or a round file no larger than the arc's radius). Round each flute's lips "
                     f"(where the groove meets the wall) to at least {_both(lip)} with a file: a sharp lip cracks the "
                     "sheet.")
    bores = [h for h in g.holes if h.flanged]
    if bores:
        lines.append(f"5. Through bores for {len(bores)} flanged lightening hole(s), edges rounded to the die "
                     f"radius: " + ", ".join(f"Ø{h.d:.0f} mm at ({h.x:.1f}, {h.y:.1f})" for h in bores) + ".")
    lines += [
        "",
        "## 3. Drilling",
        "",
        f"* Tooling pins: Ø{g.pins[0].d:.2f} mm dowels, press fit — drill the die a few hundredths under size "
        "(or ream), blank holes at size: " + ", ".join(f"({q.x:.1f}, {q.y:.1f})" for q in g.pins) + " mm.",
    ]
    lines += [f"* {note}" for note in die_notes]
    lines += [
        "",
        "## 4. The blank",
        "",
        "* Print the PDF template at 100 % (check the 50 mm square), or cut from the DXF (CUT layer; DRILL layer for "
        "pin holes).",
        "* Drill the corner relief holes and pilot holes, deburr every edge. Mark the bend lines (SCRIBE layer) with a "
        "fine marker; do not scratch 2000-series or clad sheet — scratches start cracks (common practice).",
        "* Pilot holes for flanged lightening holes: " +
        (", ".join(f"Ø{c.pilot_d_mm:.1f} mm" for h, c in zip(g.holes, piece.holes) if h.flanged) or "none") + ".",
        "",
        "## 5. Forming",
        "",
        "1. Wipe the die and blank; a film of lubricant (spray furniture polish or light oil) on the die walls.",
        "2. Pin the blank to the die on the dowels, web on the top face.",
        "3. A sacrificial rubber sheet over the blank protects the pad from the sheet's edges.",
        f"4. Centre the die in the box (≥ {_both(shared.press.wall_clearance_mm)} from every wall), close the press "
        f"to its rating ({shared.press.force_n / 1000:.0f} kN), hold, release.",
        f"5. Press check: **{press.verdict.upper()}** — {press.pressure_mpa:.2f} MPa "
        f"({mpa_to_psi(press.pressure_mpa):.0f} psi) in the box; setting the flanges on the "
        f"{_both(sb.die_radius_mm)} die radius needs {press.needed_mpa:.2f} MPa ({mpa_to_psi(press.needed_mpa):.0f} "
        "psi), " + (f"so expect the perimeter flange at about {press.flange_angle_deg:.0f}° (plastic-hinge model, see "
                    "the report)." if press.fits_box else
                    "but the die does not fit this box with the wall clearance: it cannot be pressed in it (use a "
                    "larger box, or split the die).") +
        f" Expect {die_life_text(shared.die.material)} from a {shared.die.material} die; {press.durometer_advice}.",
    ]
    step = 6
    if press.verdict != "full" and press.fits_box:
        names = ", ".join(f"{r.leg.name} (about {r.angle_deg:.0f}°)" for r in press.short_legs)
        lines.append(f"{step}. Finish by hand over the die, with the blank still pinned: a hand seamer, or a "
                     f"hardwood block and a soft mallet, working along the flange a little at a time: {names}.")
        step += 1
    flange = piece.flange
    check = (f"{step}. Check the flange angle (90°) and radius. Edge shrink left after relief "
             f"{flange.residual_shrink:.3f} at worst against a {flange.shrink_limit:.3f} wrinkle limit: "
             f"**{flange.verdict}**")
    lines.append(check + (". " + "; or ".join(flange.remedies) + "." if flange.remedies else "."))
    step += 1
    if piece.alloy.name.endswith(("-O", "-W")):
        lines.append(f"{step}. **Heat treatment.** {piece.alloy.name} is not a flight temper: the formed part must be "
                     "solution heat-treated and aged to the temper the drawings call for, to the alloy's heat-treatment "
                     "specification, before it is a flight part. Trial-form and check it after heat treatment: it "
                     "distorts and its springback differs.")
    lines += [
        "",
        "## 6. Warnings",
        "",
    ]
    lines += [f"* {w}" for w in piece.warnings] or ["* none"]
    lines += [
        "",
        "---",
        "Numbers are typical handbook values and first-order models (named in the report JSON); trial-form a "
        "part before committing material. Heat treatment, if any, follows the alloy's specification. Flight parts "
        "follow the designer's drawings and the inspection the local authority requires.",
        "",
    ]
    return "\n".join(lines)
