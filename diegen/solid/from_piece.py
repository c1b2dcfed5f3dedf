"""From an analysed rib piece to its die files: the plain-data DieInput, STEP, STL, tiles and layer outlines.

Pins are press fits: the die hole is drilled ``PIN_INTERFERENCE_MM`` under the
dowel diameter (from memory, unverified: a few hundredths of a millimetre holds a
dowel in plastics and solid-surface stock) and ``pin_depth_mm`` deep.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path
from typing import Any

from diegen.fileio import refuse_foreign
from diegen.solid.die_input import Bore, DieInput, Flute, OutlineRun, Pin

PIN_INTERFERENCE_MM = 0.03
ENGRAVING_NOTE = "Marks on the bottom face: part id, sheet, and an arrow pointing to the leading edge."


def pin_depth_mm(dowel_d_mm: float, die_height_mm: float) -> float:
    """Dowel hole depth (mm): three diameters, at least 10 mm, leaving 3 mm of floor."""
    return min(die_height_mm - 3.0, max(3.0 * dowel_d_mm, 10.0))


def die_input(rib: Any, piece: Any) -> DieInput:
    """The die builder's input for one analysed piece (``rib``: RibAnalysis, ``piece``: PieceAnalysis)."""
    g, shared = piece.piece, rib.spec.shared
    height = piece.die_height_mm
    return DieInput(
        part_id=g.part_id,
        outline=tuple(OutlineRun(run.kind, run.points) for run in g.runs),
        height_mm=height,
        top_radius_mm=piece.springback.die_radius_mm,
        undercut_deg=piece.springback.overbend_deg,
        cutter_radius_mm=shared.die.cutter_diameter_mm / 2,
        flutes=tuple(Flute(f.s_mm, f.width_mm, f.depth_mm) for f in piece.flutes),
        flute_length_mm=shared.flange.height_mm,
        bores=tuple(Bore(h.x, h.y, h.d) for h in g.holes if h.flanged),
        pins=tuple(Pin(p.x, p.y, p.d - PIN_INTERFERENCE_MM, pin_depth_mm(p.d, height)) for p in g.pins),
        engraving=(g.part_id, f"{shared.sheet.alloy} {shared.sheet.thickness_mm:.2f} mm"),
    )


def write_die_files(rib: Any, piece: Any, folder: Path, claimed: bool = False) -> tuple[list[str], list[str]]:
    """Build the die and write its files into ``folder``; return (file names, notes for the shop sheet)."""
    from diegen.solid.export import write_step, write_stl

    die = die_input(rib, piece)
    part = die.part_id
    shared = rib.spec.shared
    tolerance = shared.die.stl_tolerance_mm
    names = [f"{part}-die.step", f"{part}-die.stl"]
    refuse_foreign([folder / n for n in names], claimed)
    solid, marked = _build_with_marks(die)
    write_step(solid, folder / names[0])
    write_stl(solid, folder / names[1], tolerance_mm=tolerance)
    pin = die.pins[0] if die.pins else None
    notes = [_marks_note(die.engraving, marked)]
    if pin:
        notes.insert(0, f"Dowel holes in the die: Ø{pin.d:.2f} mm ({PIN_INTERFERENCE_MM:.2f} mm under the dowel for a "
                        f"press fit), {pin.depth:.1f} mm deep from the top face.")
    if piece.die_layers > 1:
        names.append(_write_layers(die, shared.die.stock_thickness_mm, folder, claimed))
        notes.append(f"Laminated die: {piece.die_layers} layers; each layer's cut outline is in {names[-1]} "
                     "(layer LAYER1 on top).")
    if shared.die.print_bed_mm:
        tile_names = _write_tiles(solid, shared.die.print_bed_mm, part, folder, claimed, tolerance)
        names.extend(tile_names)
        if len(tile_names) > 2:
            notes.append(f"Printed die in {len(tile_names) // 2} tiles for a {shared.die.print_bed_mm[0]:.0f} × "
                         f"{shared.die.print_bed_mm[1]:.0f} mm bed, with alignment dowel holes across each joint.")
    return names, notes


def _marks_note(asked: tuple[str, ...], marked: tuple[str, ...]) -> str:
    if marked == asked:
        return ENGRAVING_NOTE
    if marked:
        return (f"No room on the bottom face for all the marks: only {', '.join(marked)} and the arrow are engraved; "
                f"write {', '.join(line for line in asked if line not in marked)} on it by hand.")
    return (f"No room on the bottom face for the marks: write {', '.join(asked)} and an arrow pointing to the leading "
            "edge on it by hand.")


def _build_with_marks(die: DieInput) -> tuple[Any, tuple[str, ...]]:
    """The die solid and the engraving lines it carries: all, else the part id alone, else none."""
    from diegen.errors import NoRoomForMarks
    from diegen.solid.form_block import build_die

    for lines in (die.engraving, die.engraving[:1], ()):
        try:
            return build_die(replace(die, engraving=lines)), lines
        except NoRoomForMarks:
            continue
    raise AssertionError("a die without marks needs no room for them")


def _write_tiles(solid: Any, bed: tuple[float, float], part: str, folder: Path, claimed: bool,
                 tolerance: float) -> list[str]:
    from diegen.solid.export import write_step, write_stl
    from diegen.solid.tiles import tile_for_bed

    tiles = tile_for_bed(solid, bed)
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
    import ezdxf

    from diegen.fileio import write_with
    from diegen.solid.laminate import laminate_layers

    name = f"{die.part_id}-layers.dxf"
    refuse_foreign([folder / name], claimed)
    doc = ezdxf.new("R2010", setup=False)
    doc.header["$INSUNITS"] = 4
    msp = doc.modelspace()
    for layer in laminate_layers(die, stock):
        layer_name = f"LAYER{layer.index + 1}"
        doc.layers.add(layer_name, color=1 + layer.index % 6)
        points = [p for run in layer.outline for p in run.points[:-1]]
        msp.add_lwpolyline(points, close=True, dxfattribs={"layer": layer_name})
    write_with(folder / name, lambda tmp: doc.saveas(tmp))
    return name
