"""1:1 printable PDF template of a flat blank, written as vector paths (``pdfdoc``, our own small PDF writer).

Each page is the paper size; the drawing is clipped to a region of the page
and placed there by one ``cm`` of scale 72 / 25.4, so that one drawing
millimetre is one paper millimetre.  A blank larger than the
printable area is tiled over several pages that overlap by ``overlap`` mm;
the overlap bands carry dashed trim lines and registration marks at the same
drawing coordinates on both pages, and every page carries its row/column
label.  Every page also has a 50 mm scale-check square, a 1-inch bar, the part
id, material and grain arrow, and the instruction to print at actual size.

Paper sizes: A4 210 × 297 mm (ISO 216); Letter 8.5 × 11 in = 215.9 × 279.4 mm
(ANSI/ASME Y14.1).  1 in = 25.4 mm exactly.

Text is set in the standard Helvetica fonts, which PDF viewers supply (nothing
is embedded); the blank's contours are written vertex by vertex, circles as
four Bézier quarters.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Final, Literal, get_args

from diegen.blank.drawing import CUT, DRILL, NOTE, SCRIBE, BlankDrawing, arrow_segments
from diegen.errors import OutputError
from diegen.export.pdfdoc import ASCENT_EM, Canvas, Document, circle_operators, polyline_operators
from diegen.fileio import write_bytes

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
PT_PER_MM: Final = PT_PER_INCH / MM_PER_INCH
"""Scale of every ``cm`` below: drawing and page geometry are written in mm, the PDF's user unit is 1/72 in."""


def _lw(pt: float) -> float:
    """A line width given in pt, in the mm user space of the drawing and the page furniture."""
    return pt / PT_PER_MM


def _text_pt(height_mm: float) -> float:
    """Font size in pt for a cap height in mm (the fonts' cap height is 0.718 em; pdfdoc.ASCENT_EM)."""
    return _mm_to_pt(height_mm / ASCENT_EM)


def _blank_operators(drawing: BlankDrawing) -> str:
    """The blank itself in drawing mm, the same operators on every page (each page places them with a ``cm``)."""
    out = Canvas(0.0, 0.0)
    thin = _lw(0.3)
    out.style(width=_lw(LINE_PT), colour=CUT.rgb, cap=1, join=1, dash=())
    out.raw("".join(polyline_operators(c, True) for c in (drawing.outer, *drawing.inner))
            + "".join(circle_operators(c.x, c.y, c.r) for c in drawing.cut_circles) + "S\n")
    for circles, style in ((drawing.cut_circles, CUT), (drawing.drill_circles, DRILL)):
        if not circles:
            continue
        if style is not CUT:
            out.style(width=_lw(LINE_PT), colour=style.rgb)
            out.raw("".join(circle_operators(c.x, c.y, c.r) for c in circles) + "S\n")
        out.style(width=thin, colour=style.rgb)
        crosses = []
        for c in circles:
            arm = min(1.5, 0.4 * c.r)  # centre-punch cross
            crosses += [((c.x - arm, c.y), (c.x + arm, c.y)), ((c.x, c.y - arm), (c.x, c.y + arm))]
        out.polylines(crosses)
    if drawing.scribe_lines:
        out.style(width=_lw(LINE_PT), colour=SCRIBE.rgb, cap=0, dash=(6.0, 3.0))
        out.polylines(drawing.scribe_lines)
    for n in drawing.notes:
        out.text(n.x, n.y, n.text, _text_pt(n.height) / PT_PER_MM, colour=NOTE.rgb)
    return out.operators()


def _overlap_operators(plan: TilePlan, tile: Tile) -> str:
    """Trim lines and registration marks of the overlap bands that show on ``tile``'s page, in drawing mm."""
    ex0, ey0, ex1, ey1 = plan.extent
    lay = plan.layout
    first = plan.tiles[0]
    reach = 5.0  # a registration mark reaches 4 mm from its centre
    wx0, wy0 = tile.x0 - reach, tile.y0 - reach
    wx1, wy1 = tile.x0 + lay.region_w + reach, tile.y0 + lay.region_h + reach
    trims: list[tuple[tuple[float, float], tuple[float, float]]] = []
    marks: list[tuple[float, float]] = []
    n_y = max(2, math.ceil((ey1 - ey0) / REGISTRATION_PITCH_MM) + 1)
    n_x = max(2, math.ceil((ex1 - ex0) / REGISTRATION_PITCH_MM) + 1)
    for c in range(1, plan.cols):
        sx = first.x0 + c * (lay.region_w - plan.overlap)
        trims += [((x, ey0 - 1e3), (x, ey1 + 1e3)) for x in (sx, sx + plan.overlap) if wx0 <= x <= wx1]
        marks += [(sx + 0.5 * plan.overlap, ey0 + k * (ey1 - ey0) / (n_y - 1)) for k in range(n_y)]
    top = first.y0 + lay.region_h
    for r in range(1, plan.rows):
        sy = top - r * (lay.region_h - plan.overlap)
        trims += [((ex0 - 1e3, y), (ex1 + 1e3, y)) for y in (sy, sy - plan.overlap) if wy0 <= y <= wy1]
        marks += [(ex0 + k * (ex1 - ex0) / (n_x - 1), sy - 0.5 * plan.overlap) for k in range(n_x)]
    marks = [(x, y) for x, y in marks if wx0 <= x <= wx1 and wy0 <= y <= wy1]
    out = Canvas(0.0, 0.0)
    if trims:  # every page starts the dashes at the same drawing point, so they meet across a join
        out.style(width=_lw(0.4), colour=GUIDE_COLOUR, cap=0, dash=(3.0, 2.0))
        out.polylines(trims)
    if marks:
        out.style(width=_lw(0.4), colour=0.0, cap=1, dash=())
        out.raw("".join(circle_operators(x, y, 2.5) for x, y in marks) + "S\n")
        out.polylines([line for x, y in marks for line in (((x - 4.0, y), (x + 4.0, y)), ((x, y - 4.0), (x, y + 4.0)))])
    return out.operators()


def _page_furniture(page: Canvas, drawing: BlankDrawing, plan: TilePlan, tile: Tile, index: int) -> None:
    """Scale checks, title and page labels, in page mm (font sizes in pt, as the reader sees them)."""
    lay = plan.layout
    m = lay.margin
    rx, ry, rw, rh = lay.region_x, lay.region_y, lay.region_w, lay.region_h

    def text(x: float, y: float, value: str, size_pt: float, **kw: Any) -> None:
        page.text(x, y, value, size_pt / PT_PER_MM, **kw)

    # corner marks of the drawing region (where this page's drawing window ends)
    arm = 6.0
    page.style(width=_lw(0.4), colour=GUIDE_COLOUR, cap=1, join=1, dash=())
    corners = []
    for cx, sx in ((rx, 1.0), (rx + rw, -1.0)):
        for cy, sy in ((ry, 1.0), (ry + rh, -1.0)):
            corners.append(((cx + sx * arm, cy), (cx, cy), (cx, cy + sy * arm)))
    page.polylines(corners)

    # neighbour labels at the region edges
    label: dict[str, Any] = {"colour": GUIDE_COLOUR, "ha": "center", "va": "center"}
    r, c = tile.row, tile.col
    if c < plan.cols:
        text(rx + rw - 2.5, ry + rh - 30.0, f"overlap → R{r} C{c + 1}", 6.5, angle=90.0, **label)
    if c > 1:
        text(rx + 2.5, ry + rh - 30.0, f"R{r} C{c - 1} ← overlap", 6.5, angle=90.0, **label)
    if r > 1:
        text(rx + 30.0, ry + rh - 2.5, f"overlap ↑ R{r - 1} C{c}", 6.5, **label)
    if r < plan.rows:
        text(rx + 30.0, ry + 2.5, f"overlap ↓ R{r + 1} C{c}", 6.5, **label)

    # scale-check square (the one closed square path on the page)
    s = SCALE_SQUARE_MM
    sq_x, sq_y = m, m + 2.0
    page.style(width=_lw(0.5), colour=0.0, join=0)
    page.rect(sq_x, sq_y, s, s)
    text(sq_x + 0.5 * s, sq_y + s - 4.0, SCALE_LABEL, 5.6, ha="center", va="center")
    text(sq_x + 0.5 * s, sq_y + 0.5 * s, "50 mm", 14.0, bold=True, ha="center", va="center")
    text(sq_x + 0.5 * s, sq_y + 0.5 * s - 7.0, "× 50 mm", 8.0, ha="center", va="center")

    # 1-inch bar with end ticks
    bx, by = m + s + 6.0, m + 6.0
    page.style(width=_lw(0.8), cap=0)
    page.polyline(((bx, by), (bx + MM_PER_INCH, by)))
    page.style(width=_lw(0.4))
    page.polylines([((x, by - 1.5), (x, by + 1.5)) for x in (bx, bx + MM_PER_INCH)])
    text(bx + 0.5 * MM_PER_INCH, by + 3.0, "1 in = 25.4 mm", 6.0, ha="center", va="bottom")

    # grain arrow
    gx, gy = bx + 0.5 * MM_PER_INCH, m + 34.0
    page.style(width=_lw(0.8), colour=NOTE.rgb, cap=1)
    arrow = arrow_segments(gx, gy, 22.0, drawing.grain_angle_deg)
    page.polylines([((seg.x0, seg.y0), (seg.x1, seg.y1)) for seg in arrow])
    text(gx, m + 19.0, "GRAIN (rolling direction)", 5.6, ha="center", va="center")

    # title and instructions
    tx = bx + MM_PER_INCH + 5.0
    where = f"page R{r} C{c} ({index} of {plan.pages}; {plan.rows} row(s) × {plan.cols} column(s), rows from the top)"
    lines = [
        (drawing.part_id, 11.0, True),
        (drawing.material, 8.0, False),
        (f"Flat blank 1:1, {where}", 6.0, False),
        ("PRINT AT 100 % / ACTUAL SIZE — no fit-to-page, no shrink to margins.", 7.0, True),
        ("Check before use: square 50 mm, bar 1 in (25.4 mm).", 6.0, False),
        (f"Pages overlap {plan.overlap:g} mm: trim at a dashed line, match the ⊕ marks, tape.", 6.0, False),
        ("Red solid: cut. Blue: drill pin holes. Green dashed: bend lines, mark only.", 6.0, False),
        ("Template only: check it against the approved part drawing before cutting flight", 6.0, False),
        ("parts; form and heat-treat per the alloy specification and local practice.", 6.0, False),
    ]
    y = m + FOOTER_MM - 4.0
    for value, size, bold in lines:
        text(tx, y, value, size, bold=bold)
        y -= max(4.2, 0.3528 * size * 1.45)


def _page(document: Document, blank_ops: str, drawing: BlankDrawing, plan: TilePlan, tile: Tile, index: int) -> None:
    lay = plan.layout
    page = document.add_page(_mm_to_pt(lay.width), _mm_to_pt(lay.height))
    k = PT_PER_MM
    page.save()  # the drawing window: clipped to the region, 1 drawing mm == 1 paper mm
    page.clip_rect(k * lay.region_x, k * lay.region_y, k * lay.region_w, k * lay.region_h)
    page.transform(k, 0.0, 0.0, k, k * (lay.region_x - tile.x0), k * (lay.region_y - tile.y0))
    page.raw(blank_ops)
    page.raw(_overlap_operators(plan, tile))
    page.restore()
    page.save()  # the page furniture, in page mm
    page.transform(k, 0.0, 0.0, k, 0.0, 0.0)
    _page_furniture(page, drawing, plan, tile, index)
    page.restore()


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
    plan = plan_tiles(drawing, paper, orientation, margin, overlap)
    document = Document({
        "Title": f"{drawing.part_id} flat blank 1:1",
        "Subject": f"{drawing.material}; print at 100 % / actual size",
        "Creator": "diegen",
    })
    blank_ops = _blank_operators(drawing)
    for index, tile in enumerate(plan.tiles, start=1):
        _page(document, blank_ops, drawing, plan, tile, index)
    data = document.to_bytes()

    write_bytes(Path(path), data)  # an OutputError naming the file when it cannot
    return plan
