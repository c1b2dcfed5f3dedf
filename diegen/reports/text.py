"""The forming report as readable text; lengths also in the spec's own units when those are inches."""

from __future__ import annotations

from diegen import __version__
from diegen.analysis import MODELS, PieceAnalysis, RibAnalysis
from diegen.numbers import without_negative_zeros
from diegen.reports.document import SAFETY, die_life, piece_json
from diegen.units import MM_PER_IN, mpa_to_psi


def _len(mm: float, units: str) -> str:
    shown = f"{mm:.3f} mm" if mm < 10 else f"{mm:.1f} mm"
    return f"{shown} ({mm / MM_PER_IN:.3f} in)" if units == "in" else shown


def die_life_text(material: str) -> str:
    """'about N parts' (or 'indefinitely many parts') for a die of ``material``."""
    parts = die_life(material)
    return "indefinitely many parts" if parts is None else f"about {parts} parts"


def _run_bend(shape: dict) -> str:
    """"; R 3.00 mm bent 45°: die R 2.62 mm at 49.15° (over-bend 4.15°), flanges[2]" for a flange shape of its own
    bend (the report's ``flange.runs[i].bend``), else nothing."""
    bend = shape.get("bend")
    if not bend:
        return ""
    return (f"; R {bend['part_radius_mm']:.2f} mm bent {bend['angle_deg']:g}°: die R {bend['die_radius_mm']:.3f} mm at "
            f"{bend['die_angle_deg']:.2f}° (over-bend {bend['overbend_deg']:.2f}°), "
            f"{', '.join(bend['flange_runs']) or 'flanges'}")


def piece_text(rib: RibAnalysis, p: PieceAnalysis) -> str:
    g, u, d = p.piece, rib.spec.units, piece_json(rib, p)
    whole = (f"{rib.geometry.chord_mm:.1f} mm chord" if rib.spec.drawn is None
             else f"the drawing's {rib.geometry.chord_mm:.1f} mm")
    lines = [
        f"== {g.part_id} ({g.name + ' piece' if rib.spec.drawn is None else 'drawn part'})  x "
        f"{g.x_range_mm[0]:.1f}–{g.x_range_mm[1]:.1f} mm of {whole}",
        f"  die outline   length {_len(g.die_length_mm, u)}, area {g.die_area_mm2:.0f} mm², depth "
        f"{g.depth_range_mm[0]:.1f}–{g.depth_range_mm[1]:.1f} mm, height {_len(p.die_height_mm, u)} "
        f"({p.die_layers} layer(s) of stock)"
        + (f"; runs on {_len(g.die_overrun_mm, u)} past the cut end" if g.die_overrun_mm else ""),
        *([f"  DIE REFUSED   {p.die.refusal}"] if p.die is not None and p.die.refusal else []),
        f"  bend          part R {p.springback.part_radius_mm:.3f} mm (min {p.min_radius.radius_mm:.3f} mm, "
        f"{p.min_radius.table} table); die R {p.springback.die_radius_mm:.3f} mm; die angle "
        f"{p.springback.die_angle_deg:.2f}° → over-bend {p.springback.overbend_deg:.2f}°",
        f"                BA {p.layout.bend_allowance_mm:.3f} mm (k = {p.layout.k_factor:.3f}); aviation formula "
        f"{p.layout.bend_allowance_aviation_mm:.3f} mm; setback {p.layout.setback_mm:.3f} mm; developed flange "
        f"{p.layout.developed_width_mm:.2f} mm",
        *[f"  flange runs   {h['height_mm']:.1f} mm high: developed {h['developed_width_mm']:.2f} mm, blank edge "
          f"{h['blank_offset_mm']:.2f} mm outside the die, wrinkle limit {h['shrink_limit']:.3f}, "
          f"{len(h['die_runs'])} run(s)" + _run_bend(h) for h in d["flange"].get("runs", ())],
        f"                springback: {p.springback.model}",
        f"  flange strain max shrink {p.max_shrink:.3f}, after relief {p.flange.residual_shrink:.3f} (wrinkle limit "
        f"{p.flange.shrink_limit:.3f}), max stretch {p.max_stretch:.3f} (limit {p.alloy.stretch_limit:.3f}) → "
        f"{p.flange.verdict.upper()}",
    ]
    lines += [f"                remedy: {r}" for r in p.flange.remedies]
    if p.flutes or p.notches:
        lines += [f"  relief        {note}" for note in p.relief_notes]
    else:
        lines.append(f"  relief        none needed (policy: {rib.spec.shared.relief})")
    for j in g.joggles:
        if j.surface == "outline":
            (x0, y0), (x1, y1) = j.path[0], j.path[-1]
            lines.append(f"  joggle        joggles[{j.spar}]: {j.depth_mm:.2f} mm deep from ({x0:.1f}, {y0:.1f}) to "
                         f"({x1:.1f}, {y1:.1f}) mm, ramps {j.ramp_mm:.1f} mm included")
            continue
        lines.append(f"  joggle        spar {j.spar + 1} {j.surface}: {j.depth_mm:.2f} mm deep over x "
                     f"{j.x_start_mm:.1f}–"
                     f"{j.x_end_mm:.1f} mm, ramps {j.ramp_mm:.1f} mm")
    for h in d["holes"]:
        kind = f"flanged {h['flange_height_mm']:.1f} mm, pilot Ø{h['pilot_d_mm']:.1f}" if h["flanged"] else "plain"
        if h["flanged"]:
            kind += f", die bore Ø{h['bore_d_mm']:.1f}"
        lines.append(f"  hole          Ø{h['d_mm']:.0f} mm at ({h['x_mm']:.1f}, {h['y_mm']:.1f}) {kind}, "
                     f"stretch {h['stretch_strain']:.3f}")
    lines.append("  pins          " + ", ".join(f"Ø{q.d:.2f} at ({q.x:.1f}, {q.y:.1f})" for q in g.pins))
    pr = p.press
    lines += [
        f"  press force   {rib.spec.shared.press.force_read}",
        f"  press         {pr.pressure_mpa:.2f} MPa ({mpa_to_psi(pr.pressure_mpa):.0f} psi) over the box; "
        f"{pr.die_top_pressure_mpa:.2f} MPa on the die top; setting the flanges on the die radius needs "
        f"{pr.needed_mpa:.2f} MPa ({mpa_to_psi(pr.needed_mpa):.0f} psi); the perimeter flange reaches about "
        f"{pr.flange_angle_deg:.0f}°, pressed to R {pr.reachable_radius_mm:.2f} mm → {pr.verdict.upper()}",
        f"  die life      {die_life_text(rib.spec.shared.die.material)} from {rib.spec.shared.die.material} "
        f"(catalogue value); {pr.durometer_advice}",
        f"  blank         {d['blank']['area_mm2']:.0f} mm², perimeter {d['blank']['perimeter_mm']:.0f} mm",
    ]
    plan = d["die"]["print"]
    if plan is not None:
        if plan.get("problem"):
            lines.append(f"  printed die   cannot be laid out: {plan['problem']}")
        elif plan["bed_mm"] is None:
            lines.append("  printed die   in one piece (no print bed given)")
        else:
            joints = ", ".join(f"{x:.1f}" for x in plan["joints_x_mm"])
            where = f"; joints at x = {joints} mm" if joints else ""
            lines.append(f"  printed die   {len(d['die']['tiles'])} tile(s) on a {plan['bed_mm'][0]:g} × "
                         f"{plan['bed_mm'][1]:g} mm bed{where}")
    lines += [f"  warning       {w}" for w in p.warnings]
    return without_negative_zeros("\n".join(lines))


def refusals_text(refused: list[tuple[str, str]], total: int) -> str:
    """The pieces whose die ``build`` would refuse, each with the reason and its remedy."""
    lines = [f"{len(refused)} of {total} piece(s) cannot be built as specified (build would fail them, nothing is "
             "written for them):"]
    return "\n".join(lines + [f"  {part}: {reason}" for part, reason in refused])


def footer_text() -> str:
    """Which model each number comes from, and the safety cautions."""
    models = ["Models behind the numbers:"] + [f"  {name.replace('_', ' ')}: {text}" for name, text in MODELS.items()]
    return "\n".join([*models, "", "Safety: " + SAFETY])


def rib_text(rib: RibAnalysis, footer: bool = True, shown: set[tuple] | None = None) -> str:
    """The report of one rib; ``shown`` collects the findings about the spec file already printed (a wing's
    ribs share them), so each is printed once."""
    size = "chord" if rib.spec.drawn is None else "length"
    head = [f"diegen {__version__} — {rib.spec.kind} {rib.spec.id}" + (f": {rib.spec.title}" if rib.spec.title else ""),
            f"  {rib.spec.section_label}, {size} {_len(rib.spec.chord_mm, rib.spec.units)}, "
            f"{rib.spec.shared.sheet.alloy} {_len(rib.spec.shared.sheet.thickness_mm, rib.spec.units)}"]
    shown = set() if shown is None else shown
    for w in rib.geometry.warnings:
        key = (w.code, w.key, w.line, w.column, w.message)
        if w.code == "units-suspect" and key in shown:
            continue
        shown.add(key)
        head.append(f"  warning: {w.located() if w.code == 'units-suspect' else w}")
    return without_negative_zeros(
        "\n".join(head + [piece_text(rib, p) for p in rib.pieces] + (["", footer_text()] if footer else [])))


__all__ = ["die_life_text", "footer_text", "piece_text", "refusals_text", "rib_text"]
