"""The summary of a wing or a set: ``summary.csv`` (a row a piece) and ``summary.pdf`` (a wing's planform, the table
of every piece, a page a piece)."""

from __future__ import annotations

import csv
import io
import os
import stat
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from diegen import __version__
from diegen.analysis import PieceAnalysis, RibAnalysis
from diegen.fileio import write_bytes, write_text
from diegen.geometry.loops import polyline_length
from diegen.numbers import plain
from diegen.spec.model import SetSpec, WingSpec
from diegen.wing import chord_at, leading_edge_at, stations

COLUMNS = ("rib", "station_mm", "chord_mm", "section", "piece", "part_id", "status", "die_length_mm", "die_depth_mm",
           "die_height_mm",
           "stock_layers", "blank_length_mm", "blank_width_mm", "overbend_deg", "die_radius_mm", "max_shrink",
           "max_stretch", "flutes", "notches", "press_verdict", "warnings")


def summary_rows(spec: WingSpec | SetSpec, ribs: Sequence[RibAnalysis],
                 status: Mapping[str, str] | None = None) -> list[dict[str, Any]]:
    """A row a piece; ``status``: what the build did with each part (built, unchanged, failed; '' when unknown).

    A set's rows number its members in order (``rib``) and have no station; ``chord_mm`` of a part is the drawing's
    extent in x."""
    by_rib = {f"{spec.id}-R{s.number:02d}": (s.number, round(s.y_mm, 1)) for s in stations(spec)} \
        if isinstance(spec, WingSpec) else {m.id: (k, "") for k, m in enumerate(spec.members, start=1)}
    rows = []
    for rib in ribs:
        number, station = by_rib[rib.spec.id]
        for p in rib.pieces:
            outline, blank = np.asarray(p.piece.die_outline), np.asarray(p.blank.outer)
            rows.append({
                "rib": number, "station_mm": station, "chord_mm": round(rib.spec.chord_mm, 1),
                "section": rib.spec.section_label, "piece": p.piece.name, "part_id": p.piece.part_id,
                "status": (status or {}).get(p.piece.part_id, ""),
                "die_length_mm": round(float(np.ptp(outline[:, 0])), 1),
                "die_depth_mm": round(float(np.ptp(outline[:, 1])), 1),
                "die_height_mm": round(p.die_height_mm, 2), "stock_layers": p.die_layers,
                "blank_length_mm": round(float(np.ptp(blank[:, 0])), 1),
                "blank_width_mm": round(float(np.ptp(blank[:, 1])), 1),
                "overbend_deg": round(p.springback.overbend_deg, 2),
                "die_radius_mm": round(p.springback.die_radius_mm, 3),
                "max_shrink": round(p.max_shrink, 4), "max_stretch": round(p.max_stretch, 4),
                "flutes": len(p.flutes), "notches": len(p.notches), "press_verdict": p.press.verdict,
                "warnings": " | ".join(str(w) for w in p.warnings),
            })
    return [{k: plain(v) if isinstance(v, float) else v for k, v in row.items()} for row in rows]


def _csv_text(rows: Sequence[Mapping[str, Any]]) -> str:
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=COLUMNS)
    writer.writeheader()
    writer.writerows(rows)
    return buffer.getvalue()


def update_summary_status(folder: Path, status: Mapping[str, str]) -> bool:
    """Bring the ``status`` column of an existing ``summary.csv`` up to date (rewritten only when it changes).

    False when there is no such summary with these columns and exactly these parts, in this order: it must then be
    written afresh.
    """
    path = folder / "summary.csv"
    try:
        if not stat.S_ISREG(os.lstat(path).st_mode):
            return False
        text = path.read_text(encoding="utf-8")
        reader = csv.DictReader(io.StringIO(text, newline=""))
        rows = list(reader)
    except (OSError, ValueError, csv.Error):
        return False
    if tuple(reader.fieldnames or ()) != COLUMNS or [r["part_id"] for r in rows] != list(status):
        return False
    for row in rows:
        row["status"] = status[row["part_id"]]
    updated = _csv_text(rows)
    if updated != text:
        write_text(path, updated)
    return True


# Landscape pages, in inches: A4 297 × 210 mm (ISO 216), Letter 11 × 8.5 in.
PAGE_IN = {"a4": (297.0 / 25.4, 210.0 / 25.4), "letter": (11.0, 8.5)}


def write_summary(spec: WingSpec | SetSpec, ribs: Sequence[RibAnalysis], folder: Path,
                  status: Mapping[str, str] | None = None) -> list[Path]:
    """Write ``summary.csv`` and ``summary.pdf`` of a wing or a set (``ribs``: every rib or part, analysed, in the
    spec's order) into ``folder``; ``status`` is what the build did with each part (the CSV shows it, the PDF
    does not)."""
    rows = summary_rows(spec, ribs, status)
    write_text(folder / "summary.csv", _csv_text(rows))
    write_bytes(folder / "summary.pdf", _pdf(spec, ribs, rows))
    return [folder / "summary.csv", folder / "summary.pdf"]


TABLE_COLUMNS = ("part_id", "station_mm", "chord_mm", "die_length_mm", "die_depth_mm", "die_height_mm",
                 "overbend_deg", "max_shrink", "max_stretch", "flutes", "press_verdict")
ROWS_A_PAGE = 40


@dataclass(frozen=True)
class PiecePlot:
    """What a piece's page shows: the blank and die outline (closed loops, mm), the shrink (+) / stretch (−) along
    each flange run against the position along the die outline (mm), and the wrinkle limit it is judged by."""

    title: str
    blank: np.ndarray
    die_outline: np.ndarray
    strain: tuple[tuple[np.ndarray, np.ndarray], ...]
    shrink_limit: float


def piece_plot(rib: RibAnalysis, p: PieceAnalysis) -> PiecePlot:
    """The plain content of piece ``p``'s page of the summary."""
    def closed(points: Any) -> np.ndarray:
        loop = np.asarray(points, dtype=float)
        return np.vstack([loop, loop[:1]])

    title = (f"{p.piece.part_id} ({rib.spec.section_label}): over-bend {p.springback.overbend_deg:.2f}°, die R "
             f"{p.springback.die_radius_mm:.2f} mm, {len(p.flutes)} flute(s), press {p.press.verdict}")
    strain = tuple((run.s_offset_mm + run.profile.s_mm, -run.profile.strain) for run in p.runs)
    return PiecePlot(title, closed(p.blank.outer), closed(p.piece.die_outline), strain, p.flange.shrink_limit)


def _pdf(spec: WingSpec | SetSpec, ribs: Sequence[RibAnalysis], rows: list[dict[str, Any]]) -> bytes:
    """The summary PDF: a wing's planform, then the table of every piece, then a page a piece."""
    from diegen.export.pdfdoc import Document

    width, height = (72.0 * size for size in PAGE_IN[spec.paper])
    document = Document({"Title": f"{spec.id}: {spec.kind} summary", "Creator": f"diegen {__version__}"})
    if isinstance(spec, WingSpec):
        _planform(document.add_page(width, height), spec)
    for start in range(0, len(rows), ROWS_A_PAGE):
        _table(document.add_page(width, height), spec, rows, start)
    for rib in ribs:
        for p in rib.pieces:
            _piece_page(document.add_page(width, height), piece_plot(rib, p))
    return document.to_bytes()


def _planform(canvas: Any, spec: WingSpec) -> None:
    from diegen.export.pdfchart import BLUE, RED, Chart, Stroke

    ys = np.array([0.0, spec.span_mm])
    le = np.array([leading_edge_at(spec, y) for y in ys])
    te = le + np.array([chord_at(spec, y) for y in ys])
    places = stations(spec)
    xs = [x for st in places for x in (st.x_le_mm - 60.0, st.x_le_mm + st.chord_mm)]
    chart = Chart(canvas, (70.0, 50.0, canvas.width - 100.0, canvas.height - 90.0), (min(xs), max(xs)),
                  (0.0, spec.span_mm), equal=True, y_down=True)
    chart.frame("x, chordwise (mm)", "y, from the root rib (mm)",
                f"{spec.id}: planform, rib stations (blue) and spars (red)")
    chart.line(np.r_[le, te[::-1], le[:1]], np.r_[ys, ys[::-1], ys[:1]], Stroke(0.0, 1.2))
    chart.lines([([st.x_le_mm, st.x_le_mm + st.chord_mm], [st.y_mm, st.y_mm]) for st in places], Stroke(BLUE, 0.8))
    for st in places:
        chart.text(st.x_le_mm - 20.0, st.y_mm, f"R{st.number}", 6.0, ha="right", va="center")
    ticks = chart.page([st.x_le_mm + f * st.chord_mm for st in places for f in st.spar_fractions],
                       [st.y_mm for st in places for _ in st.spar_fractions])
    canvas.style(width=1.0, colour=RED, dash=())
    canvas.polylines([[(x, y - 3.0), (x, y + 3.0)] for x, y in ticks])
    spars = Stroke(RED, 0.8, (3.0, 1.5))
    chart.lines([([s.root_at * spec.root_chord_mm, leading_edge_at(spec, spec.span_mm) + s.tip_at * spec.tip_chord_mm],
                  ys) for s in spec.spars], spars)
    chart.legend([(spars, "spars")] if spec.spars else [])


def _table(canvas: Any, spec: WingSpec | SetSpec, rows: list[dict[str, Any]], start: int) -> None:
    from diegen.export.pdfdoc import text_width

    size, line = 6.0, (canvas.height - 80.0) / (ROWS_A_PAGE + 1)
    shown = rows[start:start + ROWS_A_PAGE]
    columns = [c for c in TABLE_COLUMNS if isinstance(spec, WingSpec) or c != "station_mm"]  # a set has no stations
    cells = [columns] + [[str(r[c]) for c in columns] for r in shown]
    widths = [max(text_width(row[k], size, bold=(n == 0)) for n, row in enumerate(cells)) + 8.0
              for k in range(len(columns))]
    x0 = (canvas.width - sum(widths)) / 2
    top = canvas.height - 50.0
    canvas.text(canvas.width / 2, canvas.height - 30.0,
                f"{spec.id}: pieces {start + 1}–{start + len(shown)} of {len(rows)}", 9.0, ha="center")
    canvas.style(width=0.4, colour=0.5, dash=())
    canvas.polylines([[(x0, top - line * n), (x0 + sum(widths), top - line * n)] for n in range(len(cells) + 1)])
    for n, row in enumerate(cells):
        x = x0
        for k, cell in enumerate(row):
            canvas.text(x + widths[k] / 2, top - line * (n + 0.5), cell, size, bold=(n == 0), ha="center",
                        va="center")
            x += widths[k]


def _piece_page(canvas: Any, plot: PiecePlot) -> None:
    from diegen.export.pdfchart import BLUE, GREEN, PALETTE, Chart, Stroke

    w, h = canvas.width, canvas.height
    loops = np.vstack([plot.blank, plot.die_outline])
    top = Chart(canvas, (0.07 * w, 0.42 * h, 0.88 * w, 0.5 * h), (loops[:, 0].min(), loops[:, 0].max()),
                (loops[:, 1].min(), loops[:, 1].max()), equal=True)
    top.frame(title=plot.title)
    blank, die = Stroke(GREEN, 0.9), Stroke(0.0, 1.2)
    top.line(plot.blank[:, 0], plot.blank[:, 1], blank)
    top.line(plot.die_outline[:, 0], plot.die_outline[:, 1], die)
    top.legend([(blank, "blank"), (die, "die outline")])
    # straight flanges only: no strain to draw, the axis still spans the outline
    outline_mm = polyline_length(plot.die_outline)  # a closed loop, its first point repeated
    s = np.concatenate([run[0] for run in plot.strain]) if plot.strain else np.array([0.0, outline_mm])
    e = np.concatenate([run[1] for run in plot.strain] + [[plot.shrink_limit]])
    bottom = Chart(canvas, (0.07 * w, 0.07 * h, 0.88 * w, 0.25 * h), (s.min(), s.max()), (e.min(), e.max()))
    bottom.frame("position along the die outline (mm)", "shrink (+) / stretch (−)")
    for index, (run_s, run_e) in enumerate(plot.strain):
        bottom.line(run_s, run_e, Stroke(PALETTE[index % len(PALETTE)], 1.0))
    limit = Stroke(BLUE, 1.0, (4.0, 2.0))
    bottom.hline(plot.shrink_limit, limit)
    bottom.legend([(limit, "shrink limit" if plot.strain else "shrink limit; every flange is straight: no shrink "
                    "or stretch along it")])


__all__ = ["COLUMNS", "PiecePlot", "piece_plot", "summary_rows", "update_summary_status", "write_summary"]
