"""The files of one piece: their names in one table, and the writing of all of them (atomically).

The die's files come from a die writer passed in by the caller (the kernel's
:func:`diegen.die.occ.files.write_die_files` in a real build, a stand-in in tests), so this module never imports
the kernel.
"""

from __future__ import annotations

import json
from collections.abc import Callable
from pathlib import Path

from diegen.analysis import PieceAnalysis, RibAnalysis
from diegen.export.dxf import write_dxf
from diegen.export.pdf import write_pdf
from diegen.export.plot import preview_plot
from diegen.export.svg import write_svg
from diegen.fileio import refuse_foreign, write_text
from diegen.reports.document import piece_json
from diegen.reports.sheet import shop_sheet

DieWriter = Callable[[RibAnalysis, PieceAnalysis, Path, bool], tuple[list[str], list[str]]]
"""``(rib, piece, folder, claimed) -> (die file names, notes for the shop sheet)``."""

PIECE_FILES: dict[str, str] = {
    "blank_dxf": "{part}-blank.dxf",
    "blank_svg": "{part}-blank.svg",
    "blank_pdf": "{part}-blank.pdf",
    "preview": "{part}-preview.png",
    "report": "{part}-report.json",
    "sheet": "{part}-sheet.md",
}
"""Every file of a piece besides the die's, by role; ``{part}`` is the part id."""


def piece_file_names(part_id: str) -> dict[str, str]:
    """The names of a piece's files besides the die's, by role."""
    return {role: pattern.format(part=part_id) for role, pattern in PIECE_FILES.items()}


def write_piece(rib: RibAnalysis, piece: PieceAnalysis, folder: Path, die_writer: DieWriter,
                claimed: bool = False) -> tuple[str, ...]:
    """Write every file of one piece into ``folder`` (atomically); return their names, die files first.

    ``claimed``: the manifest already records this piece, so existing files are diegen's own.
    """
    names = piece_file_names(piece.piece.part_id)
    refuse_foreign([folder / name for name in names.values()], claimed)
    die_files, die_notes = die_writer(rib, piece, folder, claimed)
    write_dxf(piece.blank, folder / names["blank_dxf"])
    write_svg(piece.blank, folder / names["blank_svg"])
    write_pdf(piece.blank, folder / names["blank_pdf"], paper=rib.spec.paper)  # type: ignore[arg-type]
    preview_plot(rib, piece, folder / names["preview"])
    write_text(folder / names["report"], json.dumps(piece_json(rib, piece), indent=2))
    write_text(folder / names["sheet"], shop_sheet(rib, piece, die_notes))
    return tuple(die_files) + tuple(names.values())


__all__ = ["PIECE_FILES", "DieWriter", "piece_file_names", "write_piece"]
