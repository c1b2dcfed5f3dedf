"""The wing summary: ``summary.csv`` (a row a piece) and ``summary.pdf`` (planform, table, a page a piece); a set's
``summary.csv``."""

from __future__ import annotations

import csv
import io
import os
import stat
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Any

import numpy as np

from diegen.analysis import PieceAnalysis, RibAnalysis
from diegen.fileio import write_bytes, write_text, write_with
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
            outline, blank = np.asarray(p.piece.outline), np.asarray(p.blank.outer)
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


def write_set_summary(spec: SetSpec, ribs: Sequence[RibAnalysis], folder: Path,
                      status: Mapping[str, str] | None = None) -> list[Path]:
    """Write a set's ``summary.csv`` (a row a piece of every member, in the set's order) into ``folder``."""
    write_text(folder / "summary.csv", _csv_text(summary_rows(spec, ribs, status)))
    return [folder / "summary.csv"]


def write_wing_summary(spec: WingSpec, ribs: Sequence[RibAnalysis], folder: Path,
                       status: Mapping[str, str] | None = None, pdf: bytes | None = None) -> list[Path]:
    """Write ``summary.csv`` and ``summary.pdf`` for the whole wing (``ribs``: every rib, analysed) into ``folder``;
    ``status`` is what the build did with each part.  ``pdf``: the PDF made beforehand by :func:`summary_pdf` of
    the same ``spec`` and ``ribs`` (the PDF shows no status), so a build can draw it while its pieces are made."""
    rows = summary_rows(spec, ribs, status)
    write_text(folder / "summary.csv", _csv_text(rows))
    if pdf is None:
        write_with(folder / "summary.pdf", lambda tmp: _pdf(spec, ribs, rows, tmp))
    else:
        write_bytes(folder / "summary.pdf", pdf)
    return [folder / "summary.csv", folder / "summary.pdf"]


def summary_pdf(spec: WingSpec, ribs: Sequence[RibAnalysis]) -> bytes:
    """The bytes of ``summary.pdf`` (planform, table, a page a piece): it shows nothing of a build's status, so it
    can be drawn before the build ends; writes no file."""
    buffer = io.BytesIO()
    _pdf(spec, ribs, summary_rows(spec, ribs), buffer)
    return buffer.getvalue()


def _planform(ax, spec: WingSpec) -> None:
    ys = np.array([0.0, spec.span_mm])
    le = np.array([leading_edge_at(spec, y) for y in ys])
    te = le + np.array([chord_at(spec, y) for y in ys])
    ax.plot(np.r_[le, te[::-1], le[:1]], np.r_[ys, ys[::-1], ys[:1]], color="k", lw=1.2)
    for st in stations(spec):
        ax.plot([st.x_le_mm, st.x_le_mm + st.chord_mm], [st.y_mm, st.y_mm], color="tab:blue", lw=0.8)
        ax.text(st.x_le_mm - 20, st.y_mm, f"R{st.number}", ha="right", va="center", fontsize=6)
        for fraction in st.spar_fractions:
            ax.plot(st.x_le_mm + fraction * st.chord_mm, st.y_mm, "|", color="tab:red", ms=6)
    for i, spar in enumerate(spec.spars):
        xs = [spar.root_at * spec.root_chord_mm, leading_edge_at(spec, spec.span_mm) + spar.tip_at * spec.tip_chord_mm]
        ax.plot(xs, ys, color="tab:red", lw=0.8, ls="--", label="spars" if i == 0 else None)
    ax.set_aspect("equal")
    ax.invert_yaxis()
    ax.set_xlabel("x, chordwise (mm)")
    ax.set_ylabel("y, from the root rib (mm)")
    ax.set_title(f"{spec.id}: planform, rib stations (blue) and spars (red)")
    ax.legend(fontsize=7)


def _pdf(spec: WingSpec, ribs: Sequence[RibAnalysis], rows: list[dict[str, Any]], path: Path | io.BytesIO) -> None:
    from matplotlib.backends.backend_pdf import PdfPages
    from matplotlib.figure import Figure

    page = PAGE_IN[spec.paper]
    with PdfPages(path) as pdf:
        fig = Figure(figsize=page)
        _planform(fig.add_subplot(1, 1, 1), spec)
        pdf.savefig(fig)
        shown = ("part_id", "station_mm", "chord_mm", "die_length_mm", "die_depth_mm", "die_height_mm", "overbend_deg",
                 "max_shrink", "max_stretch", "flutes", "press_verdict")
        for start in range(0, len(rows), 40):
            fig = Figure(figsize=page)
            ax = fig.add_axes((0.03, 0.03, 0.94, 0.92))
            ax.axis("off")
            ax.set_title(f"{spec.id}: pieces {start + 1}–{min(start + 40, len(rows))} of {len(rows)}")
            table = ax.table(cellText=[[str(r[c]) for c in shown] for r in rows[start:start + 40]], colLabels=shown,
                             loc="upper center", cellLoc="center")
            table.auto_set_font_size(False)
            table.set_fontsize(6)
            pdf.savefig(fig)
        piece_page = _PiecePage(page)
        for rib in ribs:
            for p in rib.pieces:
                piece_page.write(pdf, rib, p)


class _PiecePage:
    """One figure for every piece page: axes, grid, labels and legends are made once, a page adds its lines,
    is saved and takes them off again (axis limits follow each page's own lines)."""

    def __init__(self, page: tuple[float, float]) -> None:
        from matplotlib.figure import Figure
        from matplotlib.lines import Line2D

        self.fig = Figure(figsize=page)
        top = self.top = self.fig.add_axes((0.07, 0.42, 0.88, 0.5))
        top.set_aspect("equal")
        top.grid(True, lw=0.3)
        top.legend([Line2D([], [], color="tab:green", lw=0.9), Line2D([], [], color="k", lw=1.2)],
                   ["blank", "die outline"], fontsize=7)
        self.title = top.set_title(" ", fontsize=9)
        bottom = self.bottom = self.fig.add_axes((0.07, 0.07, 0.88, 0.25))
        self.limit = bottom.axhline(0.0, color="tab:blue", ls="--", lw=1, label="shrink limit")
        bottom.set_xlabel("position along the die outline (mm)")
        bottom.set_ylabel("shrink (+) / stretch (−)")
        bottom.grid(True, lw=0.3)
        bottom.legend(fontsize=7)

    def write(self, pdf: Any, rib: RibAnalysis, p: PieceAnalysis) -> None:
        top, bottom = self.top, self.bottom
        added = []
        for points, style in ((p.blank.outer, {"color": "tab:green", "lw": 0.9}),
                              (p.piece.outline, {"color": "k", "lw": 1.2})):
            loop = np.vstack([np.asarray(points), np.asarray(points)[:1]])
            added += top.plot(loop[:, 0], loop[:, 1], **style)
        self.title.set_text(f"{p.piece.part_id} ({rib.spec.section_label}): over-bend "
                            f"{p.springback.overbend_deg:.2f}°, die R "
                            f"{p.springback.die_radius_mm:.2f} mm, {len(p.flutes)} flute(s), press {p.press.verdict}")
        for index, run in enumerate(p.runs):
            added += bottom.plot(run.s_offset_mm + run.profile.s_mm, -run.profile.strain, lw=1, color=f"C{index % 10}")
        self.limit.set_ydata([p.flange.shrink_limit, p.flange.shrink_limit])
        for ax in (top, bottom):
            ax.relim()
            ax.autoscale_view()
        try:
            pdf.savefig(self.fig)
        finally:
            for artist in added:
                artist.remove()


__all__ = ["COLUMNS", "summary_pdf", "summary_rows", "update_summary_status", "write_wing_summary"]
