"""Write a piece's die files with the kernel: STEP, STL, the die drawing, print-bed tiles, laminate layers."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path
from typing import Any

from diegen.die.die_input import DieInput
from diegen.die.drawing import die_drawing
from diegen.die.from_analysis import die_input, die_making, marks_note, pin_note, tile_plan
from diegen.die.laminate import layer_outlines
from diegen.die.model import outline_model
from diegen.die.occ.export import write_step, write_stl
from diegen.die.occ.form_block import build_die
from diegen.die.occ.tiles import cut_tiles
from diegen.die.outline import OutlineModel
from diegen.die.placement import PlacedMarks, fit_marks
from diegen.die.settings import DEFAULT_SETTINGS
from diegen.die.tiles import TileLayout, tile_file_stems
from diegen.export.die_drawing import write_die_dxf, write_die_svg
from diegen.export.dxf import write_outlines_dxf
from diegen.fileio import refuse_foreign


def die_file_names(part_id: str) -> list[str]:
    """The die's own files: STEP, STL and the die drawing (DXF and SVG)."""
    return [f"{part_id}-die.step", f"{part_id}-die.stl", f"{part_id}-die.dxf", f"{part_id}-die.svg"]


def write_die_files(rib: Any, piece: Any, folder: Path, claimed: bool = False) -> tuple[list[str], list[str]]:
    """Build the die and write its files into ``folder``; return (file names, notes for the shop sheet)."""
    die = die_input(rib, piece)
    layout = tile_plan(rib, piece)
    part = die.part_id
    shared = rib.spec.shared
    tolerance = shared.die.stl_tolerance_mm
    names = die_file_names(part)
    refuse_foreign([folder / n for n in names], claimed)
    model = outline_model(die, DEFAULT_SETTINGS)
    marks = fit_marks(die, model, DEFAULT_SETTINGS)
    marked = replace(die, engraving=marks.lines)
    solid = build_die(marked, DEFAULT_SETTINGS, marks.polygons, model)
    source = rib.spec.section_label + (f"; spec {Path(rib.spec.file).name}" if rib.spec.file else "")
    write_step(solid, folder / names[0], product=part, description=f"form block {part}, mm; {source}")
    write_stl(solid, folder / names[1], tolerance_mm=tolerance, header=part)
    tile_names: list[str] = []
    if layout is not None and len(layout.tiles) > 1:
        tile_names = _write_tiles(solid, layout, part, folder, claimed, tolerance)
    joggles = [(j.surface, j.x_start_mm, j.x_end_mm, j.depth_mm, j.ramp_mm, j.path) for j in piece.piece.joggles]
    drawing = die_drawing(marked, model, marks, layout, joggles, f"{rib.spec.kind} {rib.spec.id}, {source}")
    write_die_dxf(drawing, folder / names[2])
    write_die_svg(drawing, folder / names[3])
    forward = "the leading edge" if rib.spec.drawn is None else "the drawing's −x side"
    notes = [marks_note(die.engraving, marks.lines, forward)]
    if pin_note(die):
        notes.insert(0, pin_note(die))
    if piece.die_layers > 1 and die_making(shared.die) != "printed":
        names.append(_write_layers(die, model, shared.die.stock_thickness_mm, folder, claimed))
        notes.append(f"Laminated die: {piece.die_layers} layers; each layer's cut outline is in {names[-1]} "
                     "(layer LAYER1 on top).")
    if tile_names:
        names.extend(tile_names)
        notes.append(_tile_marks_note(layout, marks))
        notes.append(f"Alignment dowel holes (Ø{layout.dowel_d_mm:g} mm, {2 * layout.dowel_depth_mm:g} mm long, "
                     f"{layout.dowel_depth_mm:g} mm into each tile, at z = {layout.dowel_z_mm:.1f} mm) across the "
                     "joints at " + "; ".join(f"x = {x:.1f}, y = {y:.1f}" for x, y, _ in layout.dowels) + " mm.")
    return names, notes


def _tile_marks_note(layout: TileLayout, marks: PlacedMarks) -> str:
    missing = [span.number for span, label in zip(layout.tiles, marks.tile_labels) if label is None]
    engraved = [label for label in marks.tile_labels if label]
    text = "No tile joint crosses a mark: the marks were laid out clear of the joints."
    if engraved:
        text += " Each tile's number is engraved on its bottom face: " + ", ".join(engraved) + "."
    if missing:
        count = len(layout.tiles)
        text += (" No room to engrave the number on tile(s) " + ", ".join(str(n) for n in missing) +
                 ": write " + ", ".join(f"{n}/{count}" for n in missing) + " on them by hand before they are parted.")
    return text


def _write_tiles(solid: Any, layout: TileLayout, part: str, folder: Path, claimed: bool,
                 tolerance: float) -> list[str]:
    stems = tile_file_stems(part, layout)
    refuse_foreign([folder / f"{stem}.{ext}" for stem in stems for ext in ("step", "stl")], claimed)
    names = []
    count = len(layout.tiles)
    tiles, _ = cut_tiles(solid, layout)
    for tile, stem in zip(tiles, stems):
        label = f"{part} tile {tile.index + 1} of {count}"
        write_step(tile.shape, folder / f"{stem}.step", product=f"{part}-tile{tile.index + 1}",
                   description=f"form block {part}, tile {tile.index + 1} of {count}, mm")
        write_stl(tile.shape, folder / f"{stem}.stl", tolerance_mm=tolerance, header=label)
        names += [f"{stem}.step", f"{stem}.stl"]
    return names


def _write_layers(die: DieInput, model: OutlineModel, stock: float, folder: Path, claimed: bool) -> str:
    name = f"{die.part_id}-layers.dxf"
    refuse_foreign([folder / name], claimed)
    outlines = [(f"LAYER{layer.index + 1}", [p for run in layer.outline for p in run.points[:-1]])
                for layer in layer_outlines(die, model, stock)]
    write_outlines_dxf(outlines, folder / name)
    return name


__all__ = ["die_file_names", "write_die_files"]
