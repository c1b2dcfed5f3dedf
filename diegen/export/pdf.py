"""1:1 printable PDF template of a flat blank (matplotlib, PDF backend).

Each page is a figure whose size in inches is the paper size in mm / 25.4;
the drawing sits in an axes placed in figure fraction with limits chosen so
that one data millimetre is one paper millimetre.  A blank larger than the
printable area is tiled over several pages that overlap by ``overlap`` mm;
the overlap bands carry dashed trim lines and registration marks at the same
drawing coordinates on both pages, and every page carries its row/column
label.  Every page also has a 50 mm scale-check square, a 1-inch bar, the part
id, material and grain arrow, and the instruction to print at actual size.

Paper sizes: A4 210 × 297 mm (ISO 216); Letter 8.5 × 11 in = 215.9 × 279.4 mm
(ANSI/ASME Y14.1).  1 in = 25.4 mm exactly.

The figures are built with the object-oriented matplotlib API (no pyplot, no
global backend switch); rc settings are changed only inside a local
``rc_context`` while the pages are written.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Final, Literal, get_args

from diegen.errors import OutputError
from diegen.blank.drawing import CUT, DRILL, NOTE, SCRIBE, BlankDrawing, arrow_segments
from diegen.fileio import write_with

Paper = Literal["letter", "a4"]
Orientation = Literal["auto", "portrait", "landscape"]

PAPER_MM: Final[dict[str, tuple[float, float]]] = {
    "letter": (215.9, 279.4),  # 8.5 × 11 in, ANSI/ASME Y14.1
    "a4": (210.0, 297.0),  # ISO 216
}
MM_PER_INCH: Final = 25.4
PT_PER_INCH: Final = 72.0  # PDF default user-space unit, ISO 32000-1 §8.3.2.3
SCALE_SQUARE_MM: Final = 50.0
SCALE_LABEL: Final = "50 mm — measure to check 100 % scale"
FOOTER_MM: Final = 56.0
"""Height of the band at the foot of every page for the scale check and title, mm."""
FOOTER_GAP_MM: Final = 3.0
REGISTRATION_PITCH_MM: Final = 40.0
"""Spacing of registration marks along an overlap band, mm."""

LINE_PT: Final = 0.6  # stroke width of the drawing, pt
GUIDE_COLOUR: Final = "#777777"


def _mm_to_pt(mm: float) -> float:
    return mm / MM_PER_INCH * PT_PER_INCH


def parse_paper(value: str) -> Paper:
    """Return ``value`` as a :data:`Paper` name (case-insensitive) or raise listing the choices."""
    key = value.strip().lower()
    if key not in PAPER_MM:
        raise OutputError(f"unknown paper size {value!r}; choose one of: {', '.join(get_args(Paper))}")
    return key  # type: ignore[return-value]


def parse_orientation(value: str) -> Orientation:
    """Return ``value`` as an :data:`Orientation` (case-insensitive) or raise listing the choices."""
    key = value.strip().lower()
    if key not in get_args(Orientation):
        raise OutputError(f"unknown page orientation {value!r}; choose one of: {', '.join(get_args(Orientation))}")
    return key  # type: ignore[return-value]


@dataclass(frozen=True)
class PageLayout:
    """One page: paper size and the drawing region, all in page mm from the lower-left corner."""

    paper: Paper
    landscape: bool
    width: float
    height: float
    margin: float
    region_x: float
    region_y: float
    region_w: float
    region_h: float


@dataclass(frozen=True)
class Tile:
    """One page of the tiling: grid position (1-based, rows from the top) and the drawing window (mm)."""

    row: int
    col: int
    x0: float  # drawing x at the region's left edge
    y0: float  # drawing y at the region's bottom edge


@dataclass(frozen=True)
class TilePlan:
    """How a blank is laid over pages."""

    layout: PageLayout
    rows: int
    cols: int
    overlap: float
    extent: tuple[float, float, float, float]  # drawing window to cover (mm)
    tiles: tuple[Tile, ...]

    @property
    def pages(self) -> int:
        """Number of pages."""
        return self.rows * self.cols


def page_layout(paper: Paper, landscape: bool, margin: float) -> PageLayout:
    """The page geometry for ``paper`` with ``margin`` mm on every side."""
    w, h = PAPER_MM[paper]
    if landscape:
        w, h = h, w
    ry = margin + FOOTER_MM + FOOTER_GAP_MM
    return PageLayout(paper, landscape, w, h, margin, margin, ry, w - 2 * margin, h - margin - ry)


def _count(length: float, window: float, overlap: float) -> int:
    """Pages along one axis so that n windows overlapping by ``overlap`` cover ``length``."""
    if length <= window + 1e-9:
        return 1
    return math.ceil((length - overlap) / (window - overlap) - 1e-9)


CONTENT_PAD_MM: Final = 3.0
"""Blank paper wanted round the drawing inside the drawing region, mm; given up before a page is added for it."""


def _pad(length: float, window: float, overlap: float) -> float:
    """The padding either side of ``length`` along one axis: :data:`CONTENT_PAD_MM`, or less where that much
    would take another page (down to none: the drawing then reaches the region's edges)."""
    pages = _count(length, window, overlap)
    room = window if pages == 1 else pages * (window - overlap) + overlap
    return min(CONTENT_PAD_MM, max(0.0, 0.5 * (room - length)))


def _plan(layout: PageLayout, extent: tuple[float, float, float, float], overlap: float) -> TilePlan:
    ex0, ey0, ex1, ey1 = extent
    cols = _count(ex1 - ex0, layout.region_w, overlap)
    rows = _count(ey1 - ey0, layout.region_h, overlap)
    step_x = layout.region_w - overlap
    step_y = layout.region_h - overlap
    # one page along an axis: centre the blank; several: start at the left / top edge
    x_start = 0.5 * (ex0 + ex1 - layout.region_w) if cols == 1 else ex0
    y_top = 0.5 * (ey0 + ey1 + layout.region_h) if rows == 1 else ey1
    tiles = tuple(
        Tile(r + 1, c + 1, x_start + c * step_x, y_top - r * step_y - layout.region_h)
        for r in range(rows)
        for c in range(cols)
    )
    return TilePlan(layout, rows, cols, overlap, extent, tiles)


def plan_tiles(
    drawing: BlankDrawing,
    paper: Paper = "letter",
    orientation: Orientation = "auto",
    margin: float = 10.0,
    overlap: float = 10.0,
) -> TilePlan:
    """Lay ``drawing`` over pages of ``paper``; ``margin`` and ``overlap`` in mm.

    ``orientation="auto"`` takes the orientation that needs fewer pages
    (portrait on a tie).
    """
    paper = parse_paper(paper)
    orientation = parse_orientation(orientation)
    if not 5.0 <= margin <= 40.0:
        raise OutputError(
            f"page margin {margin} mm is outside 5..40 mm (most printers cannot print nearer the edge than 5 mm)"
        )
    xmin, ymin, xmax, ymax = drawing.content_bbox()
    choices = {"portrait": (False,), "landscape": (True,), "auto": (False, True)}[orientation]
    plans = []
    for landscape in choices:
        layout = page_layout(paper, landscape, margin)
        if not 0.0 <= overlap <= 0.25 * min(layout.region_w, layout.region_h):
            raise OutputError(f"tile overlap {overlap} mm must lie between 0 and a quarter of the printable area")
        px = _pad(xmax - xmin, layout.region_w, overlap)
        py = _pad(ymax - ymin, layout.region_h, overlap)
        plans.append(_plan(layout, (xmin - px, ymin - py, xmax + px, ymax + py), overlap))
    return min(plans, key=lambda p: p.pages)


# --------------------------------------------------------------------- drawing
def _line(ax: Any, xs: list[float], ys: list[float], colour: str, lw: float = LINE_PT, **kw: Any) -> None:
    from matplotlib.lines import Line2D

    kw.setdefault("solid_capstyle", "round")
    ax.add_line(Line2D(xs, ys, color=colour, linewidth=lw, **kw))


def _dashes(dash_mm: float, gap_mm: float, lw_pt: float) -> tuple[float, tuple[float, float]]:
    """A matplotlib dash style for dash and gap lengths in paper mm (matplotlib scales dashes by line width)."""
    return (0.0, (_mm_to_pt(dash_mm) / lw_pt, _mm_to_pt(gap_mm) / lw_pt))


def _text_pt(height_mm: float) -> float:
    """Font size in pt for a cap height in mm (cap height ≈ 0.72 em; estimate)."""
    return _mm_to_pt(height_mm / 0.72)


def _draw_blank(ax: Any, drawing: BlankDrawing) -> None:
    """The blank itself, in drawing mm."""
    from matplotlib.patches import Circle as CirclePatch
    from matplotlib.patches import Polygon

    for contour in (drawing.outer, *drawing.inner):
        ax.add_patch(Polygon(contour, closed=True, fill=False, edgecolor=CUT.rgb, linewidth=LINE_PT))
    for circles, style in ((drawing.cut_circles, CUT), (drawing.drill_circles, DRILL)):
        for c in circles:
            ax.add_patch(CirclePatch((c.x, c.y), c.r, fill=False, edgecolor=style.rgb, linewidth=LINE_PT))
            arm = min(1.5, 0.4 * c.r)  # centre-punch cross
            _line(ax, [c.x - arm, c.x + arm], [c.y, c.y], style.rgb, 0.3)
            _line(ax, [c.x, c.x], [c.y - arm, c.y + arm], style.rgb, 0.3)
    for line in drawing.scribe_lines:
        _line(ax, [p[0] for p in line], [p[1] for p in line], SCRIBE.rgb, linestyle=_dashes(6.0, 3.0, LINE_PT))
    for n in drawing.notes:
        ax.text(n.x, n.y, n.text, fontsize=_text_pt(n.height), color=NOTE.rgb, ha="left", va="baseline")


def _registration(ax: Any, x: float, y: float) -> None:
    from matplotlib.patches import Circle as CirclePatch

    ax.add_patch(CirclePatch((x, y), 2.5, fill=False, edgecolor="black", linewidth=0.4))
    _line(ax, [x - 4.0, x + 4.0], [y, y], "black", 0.4)
    _line(ax, [x, x], [y - 4.0, y + 4.0], "black", 0.4)


def _draw_overlaps(ax: Any, plan: TilePlan) -> None:
    """Trim lines and registration marks of every overlap band, in drawing mm (clipped to each page)."""
    ex0, ey0, ex1, ey1 = plan.extent
    lay = plan.layout
    first = plan.tiles[0]
    dash = {"linestyle": _dashes(3.0, 2.0, 0.4)}
    n_y = max(2, math.ceil((ey1 - ey0) / REGISTRATION_PITCH_MM) + 1)
    n_x = max(2, math.ceil((ex1 - ex0) / REGISTRATION_PITCH_MM) + 1)
    for c in range(1, plan.cols):
        sx = first.x0 + c * (lay.region_w - plan.overlap)
        for x in (sx, sx + plan.overlap):
            _line(ax, [x, x], [ey0 - 1e3, ey1 + 1e3], GUIDE_COLOUR, 0.4, **dash)
        for k in range(n_y):
            _registration(ax, sx + 0.5 * plan.overlap, ey0 + k * (ey1 - ey0) / (n_y - 1))
    top = first.y0 + lay.region_h
    for r in range(1, plan.rows):
        sy = top - r * (lay.region_h - plan.overlap)
        for y in (sy, sy - plan.overlap):
            _line(ax, [ex0 - 1e3, ex1 + 1e3], [y, y], GUIDE_COLOUR, 0.4, **dash)
        for k in range(n_x):
            _registration(ax, ex0 + k * (ex1 - ex0) / (n_x - 1), sy - 0.5 * plan.overlap)


def _draw_page_furniture(ax: Any, drawing: BlankDrawing, plan: TilePlan, tile: Tile, index: int) -> None:
    """Scale checks, title and page labels, in page mm."""
    from matplotlib.patches import Rectangle

    lay = plan.layout
    m = lay.margin
    rx, ry, rw, rh = lay.region_x, lay.region_y, lay.region_w, lay.region_h

    # corner marks of the drawing region (where this page's drawing window ends)
    arm = 6.0
    for cx, sx in ((rx, 1.0), (rx + rw, -1.0)):
        for cy, sy in ((ry, 1.0), (ry + rh, -1.0)):
            _line(ax, [cx + sx * arm, cx, cx], [cy, cy, cy + sy * arm], GUIDE_COLOUR, 0.4)

    # neighbour labels at the region edges
    label = {"fontsize": 6.5, "color": GUIDE_COLOUR, "ha": "center", "va": "center"}
    r, c = tile.row, tile.col
    if c < plan.cols:
        ax.text(rx + rw - 2.5, ry + rh - 30.0, f"overlap → R{r} C{c + 1}", rotation=90, **label)
    if c > 1:
        ax.text(rx + 2.5, ry + rh - 30.0, f"R{r} C{c - 1} ← overlap", rotation=90, **label)
    if r > 1:
        ax.text(rx + 30.0, ry + rh - 2.5, f"overlap ↑ R{r - 1} C{c}", **label)
    if r < plan.rows:
        ax.text(rx + 30.0, ry + 2.5, f"overlap ↓ R{r + 1} C{c}", **label)

    # scale-check square (the one closed square path on the page)
    s = SCALE_SQUARE_MM
    sq_x, sq_y = m, m + 2.0
    ax.add_patch(Rectangle((sq_x, sq_y), s, s, fill=False, edgecolor="black", linewidth=0.5))
    ax.text(sq_x + 0.5 * s, sq_y + s - 4.0, SCALE_LABEL, fontsize=5.6, ha="center", va="center")
    ax.text(sq_x + 0.5 * s, sq_y + 0.5 * s, "50 mm", fontsize=14, ha="center", va="center", weight="bold")
    ax.text(sq_x + 0.5 * s, sq_y + 0.5 * s - 7.0, "× 50 mm", fontsize=8, ha="center", va="center")

    # 1-inch bar with end ticks
    bx, by = m + s + 6.0, m + 6.0
    _line(ax, [bx, bx + MM_PER_INCH], [by, by], "black", 0.8, solid_capstyle="butt")
    for x in (bx, bx + MM_PER_INCH):
        _line(ax, [x, x], [by - 1.5, by + 1.5], "black", 0.4, solid_capstyle="butt")
    ax.text(bx + 0.5 * MM_PER_INCH, by + 3.0, "1 in = 25.4 mm", fontsize=6, ha="center", va="bottom")

    # grain arrow
    gx, gy = bx + 0.5 * MM_PER_INCH, m + 34.0
    for seg in arrow_segments(gx, gy, 22.0, drawing.grain_angle_deg):
        _line(ax, [seg.x0, seg.x1], [seg.y0, seg.y1], NOTE.rgb, 0.8)
    ax.text(gx, m + 19.0, "GRAIN (rolling direction)", fontsize=5.6, ha="center", va="center")

    # title and instructions
    tx = bx + MM_PER_INCH + 5.0
    where = f"page R{r} C{c} ({index} of {plan.pages}; {plan.rows} row(s) × {plan.cols} column(s), rows from the top)"
    lines = [
        (drawing.part_id, 11.0, "bold"),
        (drawing.material, 8.0, "normal"),
        (f"Flat blank 1:1, {where}", 6.0, "normal"),
        ("PRINT AT 100 % / ACTUAL SIZE — no fit-to-page, no shrink to margins.", 7.0, "bold"),
        ("Check before use: square 50 mm, bar 1 in (25.4 mm).", 6.0, "normal"),
        (f"Pages overlap {plan.overlap:g} mm: trim at a dashed line, match the ⊕ marks, tape.", 6.0, "normal"),
        ("Red solid: cut. Blue: drill pin holes. Green dashed: bend lines, mark only.", 6.0, "normal"),
        ("Template only: check it against the approved part drawing before cutting flight", 6.0, "normal"),
        ("parts; form and heat-treat per the alloy specification and local practice.", 6.0, "normal"),
    ]
    y = m + FOOTER_MM - 4.0
    for text, size, weight in lines:
        ax.text(tx, y, text, fontsize=size, weight=weight, ha="left", va="baseline")
        y -= max(4.2, 0.3528 * size * 1.45)


def _page_figure(drawing: BlankDrawing, plan: TilePlan, tile: Tile, index: int) -> Any:
    from matplotlib.figure import Figure

    lay = plan.layout
    fig = Figure(figsize=(lay.width / MM_PER_INCH, lay.height / MM_PER_INCH))
    page = fig.add_axes((0.0, 0.0, 1.0, 1.0))
    page.set_xlim(0.0, lay.width)
    page.set_ylim(0.0, lay.height)
    page.set_axis_off()
    frac = (lay.region_x / lay.width, lay.region_y / lay.height, lay.region_w / lay.width, lay.region_h / lay.height)
    ax = fig.add_axes(frac)
    ax.set_xlim(tile.x0, tile.x0 + lay.region_w)  # 1 data mm == 1 paper mm
    ax.set_ylim(tile.y0, tile.y0 + lay.region_h)
    ax.set_autoscale_on(False)
    ax.set_axis_off()
    _draw_blank(ax, drawing)
    _draw_overlaps(ax, plan)
    _draw_page_furniture(page, drawing, plan, tile, index)
    return fig


def write_pdf(
    drawing: BlankDrawing,
    path: str | os.PathLike[str],
    paper: Paper = "letter",
    orientation: Orientation = "auto",
    margin: float = 10.0,
    overlap: float = 10.0,
) -> TilePlan:
    """Write the 1:1 template of ``drawing`` to ``path`` atomically; return the tiling used.

    ``paper`` is ``"letter"`` or ``"a4"``; ``margin`` (page border left blank)
    and ``overlap`` (between neighbouring tiles) are in mm.
    """
    import matplotlib
    from matplotlib.backends.backend_pdf import PdfPages

    plan = plan_tiles(drawing, paper, orientation, margin, overlap)
    rc = {
        "pdf.fonttype": 3,  # Type 3 subsets: 4-5x faster to write than embedded TrueType (measured)
        "path.simplify": False,  # keep every vertex of the contours
        "path.snap": False,
        "font.family": "DejaVu Sans",
    }
    meta = {
        "Title": f"{drawing.part_id} flat blank 1:1",
        "Subject": f"{drawing.material}; print at 100 % / actual size",
        "Creator": "diegen",
        "CreationDate": None,
    }

    def render(tmp: Path) -> None:
        with matplotlib.rc_context(rc), PdfPages(tmp, metadata=meta) as pdf:
            for index, tile in enumerate(plan.tiles, start=1):
                pdf.savefig(_page_figure(drawing, plan, tile, index))

    target = Path(path)
    try:
        write_with(target, render)
    except OSError as exc:
        raise OutputError(f"cannot write PDF {target}: {exc}") from exc
    return plan
