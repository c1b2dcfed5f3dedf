"""Write a piece's die files with the kernel: STEP, STL, print-bed tiles, and the laminate layers' outlines."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path
from typing import Any

from diegen.die.die_input import DieInput
from diegen.die.from_analysis import die_input, marks_note, pin_note
from diegen.die.laminate import laminate_layers
from diegen.die.occ.export import write_step, write_stl
from diegen.die.occ.form_block import build_die
from diegen.die.occ.tiles import tile_for_bed
from diegen.die.rules import tile_plan
from diegen.die.tiling import TilePlan
from diegen.errors import GeometryError, NoRoomForMarks
from diegen.export.dxf import write_outlines_dxf
from diegen.fileio import refuse_foreign


def write_die_files(rib: Any, piece: Any, folder: Path, claimed: bool = False) -> tuple[list[str], list[str]]:
    """Build the die and write its files into ``folder``; return (file names, notes for the shop sheet).

    A die the analysis refused (``piece.die.refusal``) is refused here with the same message, before the kernel.
    """
    plan = getattr(piece, "die", None)
    if plan is not None and plan.refusal is not None:
        raise GeometryError(plan.refusal)
    die = die_input(rib, piece)
    part = die.part_id
    shared = rib.spec.shared
    tolerance = shared.die.stl_tolerance_mm
    names = [f"{part}-die.step", f"{part}-die.stl"]
    refuse_foreign([folder / n for n in names], claimed)
    solid, marked = _build_with_marks(die)
    write_step(solid, folder / names[0])
    write_stl(solid, folder / names[1], tolerance_mm=tolerance)
    notes = [marks_note(die.engraving, marked)]
    if pin_note(die):
        notes.insert(0, pin_note(die))
    if die.layer_mm:
        names.append(_write_layers(die, die.layer_mm, folder, claimed))
        notes.append(f"Laminated die: {piece.die_layers} layers; each layer's cut outline is in {names[-1]} "
                     "(layer LAYER1 on top).")
    plan_of_tiles = tile_plan(die)
    if plan_of_tiles is not None and die.print_bed_mm:
        tile_names = _write_tiles(solid, plan_of_tiles, part, folder, claimed, tolerance)
        names.extend(tile_names)
        if len(tile_names) > 2:
            notes.append(f"Printed die in {len(tile_names) // 2} tiles for a {die.print_bed_mm[0]:.0f} × "
                         f"{die.print_bed_mm[1]:.0f} mm bed, with alignment dowel holes across each joint.")
    return names, notes


def _build_with_marks(die: DieInput) -> tuple[Any, tuple[str, ...]]:
    """The die solid and the engraving lines it carries: all, else the part id alone, else none."""
    for lines in (die.engraving, die.engraving[:1], ()):
        try:
            return build_die(replace(die, engraving=lines)), lines
        except NoRoomForMarks:
            continue
    raise AssertionError("a die without marks needs no room for them")


def _write_tiles(solid: Any, plan: TilePlan, part: str, folder: Path, claimed: bool, tolerance: float) -> list[str]:
    tiles = tile_for_bed(solid, plan)
    if len(tiles) == 1:
        return []
    names = []
    for tile in tiles:
        stem = f"{part}-die-tile{tile.index + 1}"
        refuse_foreign([folder / f"{stem}.step", folder / f"{stem}.stl"], claimed)
        write_step(tile.shape, folder / f"{stem}.step")
        write_stl(tile.shape, folder / f"{stem}.stl", tolerance_mm=tolerance)
        names += [f"{stem}.step", f"{stem}.stl"]
    return names


def _write_layers(die: DieInput, stock: float, folder: Path, claimed: bool) -> str:
    name = f"{die.part_id}-layers.dxf"
    refuse_foreign([folder / name], claimed)
    outlines = [(f"LAYER{layer.index + 1}", [p for run in layer.outline for p in run.points[:-1]])
                for layer in laminate_layers(die, stock)]
    write_outlines_dxf(outlines, folder / name)
    return name


__all__ = ["write_die_files"]
