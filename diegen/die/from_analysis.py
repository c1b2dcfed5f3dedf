"""From an analysed rib piece to the die builder's plain-data input, and the shop notes about its marks and pins.

Pins are press fits: the die hole is drilled ``PIN_INTERFERENCE_MM`` under the
dowel diameter (from memory, unverified: a few hundredths of a millimetre holds a
dowel in plastics and solid-surface stock) and ``pin_depth_mm`` deep.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from diegen.die.die_input import DieBore, DieFlute, DieInput, DiePin, DieRun
from diegen.die.tiles import TileLayout, die_tile_layout
from diegen.geometry.die_wall import WallProfile
from diegen.geometry.tooling import tooling

PIN_INTERFERENCE_MM = 0.03
ENGRAVING_NOTE = "Marks on the bottom face: part id, sheet, and an arrow pointing to the leading edge."


def pin_depth_mm(dowel_d_mm: float, die_height_mm: float) -> float:
    """Dowel hole depth (mm): three diameters, at least 10 mm, leaving 3 mm of floor."""
    return min(die_height_mm - 3.0, max(3.0 * dowel_d_mm, 10.0))


def flute_length_mm(piece: Any, spec_height_mm: float) -> float:
    """How far down the die wall the flutes taper to full depth (mm): the flange height, or where a part's
    flute-bearing runs differ in height the tallest of them (``piece``: PieceAnalysis); each flute then tapers to
    its own flange's height (:func:`flute_lengths_mm`)."""
    return max(flute_lengths_mm(piece, spec_height_mm), default=spec_height_mm)


def flute_lengths_mm(piece: Any, spec_height_mm: float) -> list[float]:
    """Each flute's taper length (mm): the height of the flange it stands in."""
    return [piece.piece.flange_height_at(f.s_mm, spec_height_mm) for f in piece.flutes]


def _die_flutes(piece: Any, spec_height_mm: float) -> tuple[DieFlute, ...]:
    """The piece's flutes for the die; each with its own taper length where the fluted flanges differ in height."""
    lengths = flute_lengths_mm(piece, spec_height_mm)
    if len(set(lengths)) <= 1:
        return tuple(DieFlute(f.s_mm, f.width_mm, f.depth_mm) for f in piece.flutes)
    return tuple(DieFlute(f.s_mm, f.width_mm, f.depth_mm, length) for f, length in zip(piece.flutes, lengths))


def die_making(die_spec: Any) -> str:
    """How the die of a spec's ``die`` section is made: ``printed``, ``machined`` or ``routed``."""
    from diegen import materials

    return materials.die_making(die_spec.material, die_spec.print_bed_mm)


def die_input(rib: Any, piece: Any) -> DieInput:
    """The die builder's input for one analysed piece (``rib``: RibAnalysis, ``piece``: PieceAnalysis).

    That is the die the analysis planned (:mod:`diegen.die.plan`: flutes and wall fitted to the piece, a printed
    die's tile joints placed), or, for a piece analysed without a plan, the die as the piece's numbers ask for it.
    """
    plan = getattr(piece, "die", None)
    die = plan.die if plan is not None else asked_die_input(rib.spec, piece)
    return with_tile_joints(die, rib.spec.shared.die)


def tile_plan(rib: Any, piece: Any) -> TileLayout | None:
    """The print-bed tiles of a printed die (one tile when no bed is given), None for a die that is not printed.

    Raises :class:`diegen.errors.GeometryError` when the bed cannot take the die or a joint has no room for
    its alignment dowels.
    """
    plan = getattr(piece, "die", None)
    return _layout(plan.die if plan is not None else asked_die_input(rib.spec, piece), rib.spec.shared.die)


def _layout(die: DieInput, die_spec: Any) -> TileLayout | None:
    if die_making(die_spec) != "printed":
        return None
    return die_tile_layout(die, die_spec.print_bed_mm)


def with_tile_joints(die: DieInput, die_spec: Any) -> DieInput:
    """``die`` carrying its tile joints when it is printed in tiles (the marks keep clear of them)."""
    layout = _layout(die, die_spec)
    return die if layout is None else replace(die, tile_joints_x_mm=layout.joints_x_mm)


def wall_profiles(piece: Any) -> tuple[tuple[WallProfile | None, ...] | None, WallProfile]:
    """Each outline run's wall profile where a part's flange runs have dies of their own (None for a cut edge), or
    None where every flanged run takes one die; and the profile of the die's one wall (``top_radius_mm``,
    ``undercut_deg``): the piece's own, or where all its flanged runs share another die, theirs.

    A run's profile is its die radius and its lean, die angle − 90° (:mod:`diegen.geometry.die_wall`): the
    over-bend of a square flange, or a wall leaning out under a flange bent through less than 90°."""
    sb = piece.springback
    own = WallProfile(sb.die_radius_mm, sb.die_angle_deg - 90.0)
    shapes = getattr(piece, "shapes", ())
    if not any(getattr(h, "springback", None) is not None for h in shapes):
        return None, own
    by_run: dict[int, WallProfile] = {}
    for shape in shapes:
        die = shape.die(sb)
        for index in shape.run_indexes:
            by_run[index] = WallProfile(die.die_radius_mm, die.die_angle_deg - 90.0)
    if len(set(by_run.values())) == 1:
        return None, next(iter(by_run.values()))
    return tuple(by_run.get(i) for i in range(len(piece.piece.runs))), own


def asked_die_input(spec: Any, piece: Any) -> DieInput:
    """The die as an analysed piece asks for it, before any fitting (``spec``: RibSpec, ``piece``: PieceAnalysis)."""
    g, shared = piece.piece, spec.shared
    height = piece.die_height_mm
    tool = tooling(shared.die.material, shared.die.cutter_diameter_mm)
    printed = tool.printed or die_making(shared.die) == "printed"
    profiles, wall = wall_profiles(piece)
    return DieInput(
        part_id=g.part_id,
        outline=tuple(DieRun(run.kind, run.points) for run in g.die_runs or g.runs),
        height_mm=height,
        top_radius_mm=wall.radius_mm,
        undercut_deg=wall.lean_deg,
        cutter_radius_mm=tool.inside_radius_mm,
        flutes=_die_flutes(piece, shared.flange.height_mm),
        flute_length_mm=flute_length_mm(piece, shared.flange.height_mm),
        bores=tuple(DieBore(h.x, h.y, h.d + 2.0 * shared.sheet.thickness_mm) for h in g.holes if h.flanged),
        pins=tuple(DiePin(p.x, p.y, p.d - PIN_INTERFERENCE_MM, pin_depth_mm(p.d, height)) for p in g.pins),
        engraving=(g.part_id, f"{shared.sheet.alloy} {shared.sheet.thickness_mm:.2f} mm"),
        printed=tool.printed,
        min_land_mm=tool.thinnest_wall_mm,
        layer_mm=shared.die.stock_thickness_mm if piece.die_layers > 1 and not printed else None,
        print_bed_mm=shared.die.print_bed_mm,
        profiles=profiles,
        run_names=tuple(run.flange_key or ("cut edge" if not run.flanged else "flange") for run in g.runs)
        if profiles is not None else (),
    )


def marks_note(asked: tuple[str, ...], marked: tuple[str, ...], forward: str = "the leading edge") -> str:
    """What the bottom face carries; ``forward`` is what the arrow (towards −x) points to."""
    if marked == asked:
        return ENGRAVING_NOTE.replace("the leading edge", forward)
    if marked:
        return (f"No room on the bottom face for all the marks: only {', '.join(marked)} and the arrow are engraved; "
                f"write {', '.join(line for line in asked if line not in marked)} on it by hand.")
    return (f"No room on the bottom face for the marks: write {', '.join(asked)} and an arrow pointing to {forward} "
            "on it by hand.")


def pin_note(die: DieInput) -> str | None:
    """The shop sheet's line about the dowel holes, or None for a die without pins."""
    if not die.pins:
        return None
    pin = die.pins[0]
    return (f"Dowel holes in the die: Ø{pin.d:.2f} mm ({PIN_INTERFERENCE_MM:.2f} mm under the dowel for a "
            f"press fit), {pin.depth:.1f} mm deep from the top face.")


__all__ = ["ENGRAVING_NOTE", "PIN_INTERFERENCE_MM", "asked_die_input", "die_input", "die_making", "marks_note",
           "pin_depth_mm", "pin_note", "tile_plan", "with_tile_joints"]
