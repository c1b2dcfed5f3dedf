"""Flat-blank writers: DXF, SVG and the 1:1 PDF template, checked from outside.

The synthetic blank is a rounded rectangle with a round hole and two pin
holes; its areas come from closed-form formulas written here.  The DXF is
checked with ezdxf's own auditor and re-read with ezdxf, areas with shapely
(GEOS), the SVG with the standard library's XML parser, and the PDF with pypdf
in the PDF's own units.
"""

from __future__ import annotations

import math
import time
import xml.etree.ElementTree as ET
from pathlib import Path
from typing import Any

import ezdxf
import pytest
from shapely.geometry import Polygon, box
from shapely.ops import unary_union

from diegen.blank.drawing import BlankDrawing, Circle, Note
from diegen.errors import GeometryError, OutputError
from diegen.export.dxf import read_dxf_outline, write_dxf
from diegen.export.pdf import MM_PER_INCH, plan_tiles, write_pdf
from diegen.export.svg import SVG_MARGIN, write_svg

MM_PER_PT = 25.4 / 72.0  # PDF default user unit is 1/72 in (ISO 32000-1:2008 §8.3.2.3); 1 in = 25.4 mm exactly
LETTER_PT = (612.0, 792.0)  # 8.5 × 11 in (ANSI/ASME Y14.1) × 72 pt/in
A4_PT = (210.0 / MM_PER_PT, 297.0 / MM_PER_PT)  # 210 × 297 mm (ISO 216) = 595.28 × 841.89 pt


# ------------------------------------------------------------------ fixtures
def rounded_rect(w: float, h: float, r: float, n: int) -> list[tuple[float, float]]:
    """CCW rounded rectangle [0, w] × [0, h] mm, ``n`` chords per corner arc."""
    pts: list[tuple[float, float]] = []
    for cx, cy, a0 in ((w - r, h - r, 0.0), (r, h - r, 90.0), (r, r, 180.0), (w - r, r, 270.0)):
        for i in range(n + 1):
            a = math.radians(a0 + 90.0 * i / n)
            pts.append((cx + r * math.cos(a), cy + r * math.sin(a)))
    return pts


def rounded_rect_polygon_area(w: float, h: float, r: float, n: int) -> float:
    """Closed form: rectangle minus four r×r corner squares plus four n-chord quarter-circle fans."""
    fan = n * 0.5 * r * r * math.sin(math.radians(90.0 / n))
    return w * h - 4.0 * r * r + 4.0 * fan


W, H, R, N = 160.0, 90.0, 12.0, 250  # 4 × 251 = 1004 vertices, ~1000-vertex outline
HOLE = Circle(60.0, 45.0, 30.0)
PINS = (Circle(20.0, 45.0, 4.8), Circle(140.0, 45.0, 4.8))


@pytest.fixture(scope="module")
def blank() -> BlankDrawing:
    return BlankDrawing(
        part_id="TEST-RIB 3 NOSE",
        material="2024-T3, 0.635 mm",
        outer=tuple(rounded_rect(W, H, R, N)),
        cut_circles=(HOLE,),
        drill_circles=PINS,
        scribe_lines=(((5.0, 6.0), (155.0, 6.0)),),
        notes=(Note(70.0, 70.0, 3.0, "BEND DOWN 90"),),
        grain_angle_deg=30.0,
    )


def long_blank(width: float = 900.0, height: float = 150.0) -> BlankDrawing:
    return BlankDrawing(
        part_id="TEST-RIB 3 FULL",
        material="2024-T3, 0.635 mm",
        outer=tuple(rounded_rect(width, height, 10.0, 40)),
        cut_circles=(Circle(0.3 * width, 0.5 * height, 0.4 * height),),
    )


# ------------------------------------------------------------------ data type
def test_net_area_matches_closed_form(blank: BlankDrawing) -> None:
    # closed form: polygon area minus π d²/4 per hole; shapely's 256-gon circles are short by ≤ 1e-4 relative
    expected = rounded_rect_polygon_area(W, H, R, N) - sum(math.pi * c.d**2 / 4 for c in (HOLE, *PINS))
    assert blank.net_area() == pytest.approx(expected, rel=1e-5)
    assert blank.bbox() == pytest.approx((0.0, 0.0, W, H), abs=1e-9)


def test_bad_input_raises_geometry_error() -> None:
    with pytest.raises(GeometryError):
        BlankDrawing("X", "m", ((0, 0), (1, 0)))  # two points are no contour
    with pytest.raises(GeometryError):
        BlankDrawing("X", "m", ((0, 0), (1, 0), (1, 1), (0, 0)))  # repeated first point
    with pytest.raises(GeometryError):
        Circle(0.0, 0.0, -1.0)


# ------------------------------------------------------------------------ DXF
def test_dxf_audit_units_layers_and_area(blank: BlankDrawing, tmp_path: Path) -> None:
    path = write_dxf(blank, tmp_path / "blank.dxf")
    doc = ezdxf.readfile(path)
    auditor = doc.audit()  # ezdxf's own DXF structure checker
    assert not auditor.has_errors, [str(e) for e in auditor.errors]
    # DXF Reference, HEADER section: $INSUNITS 4 = millimetres, $MEASUREMENT 1 = metric
    assert doc.header["$INSUNITS"] == 4
    assert doc.header["$MEASUREMENT"] == 1
    assert doc.dxfversion >= "AC1024"  # AC1024 = R2010
    layers = {layer.dxf.name: layer.dxf.color for layer in doc.layers}
    for name in ("CUT", "DRILL", "SCRIBE", "NOTE"):
        assert name in layers
    assert len({layers[n] for n in ("CUT", "DRILL", "SCRIBE", "NOTE")}) == 4  # distinct colours

    msp = doc.modelspace()
    outer = [e for e in msp.query('LWPOLYLINE[layer=="CUT"]') if e.closed]
    assert len(outer) == 1
    area = Polygon(list(outer[0].get_points("xy"))).area  # shapely (GEOS), independent of the writer
    true_area = W * H - (4.0 - math.pi) * R * R  # rounded rectangle, closed form
    assert area == pytest.approx(true_area, rel=1e-3)
    assert area == pytest.approx(rounded_rect_polygon_area(W, H, R, N), rel=1e-9)

    cut = sorted((c.dxf.center.x, c.dxf.center.y, 2 * c.dxf.radius) for c in msp.query('CIRCLE[layer=="CUT"]'))
    drill = sorted((c.dxf.center.x, c.dxf.center.y, 2 * c.dxf.radius) for c in msp.query('CIRCLE[layer=="DRILL"]'))
    assert [v for c in cut for v in c] == pytest.approx([60.0, 45.0, 30.0], abs=1e-9)
    assert [v for c in drill for v in c] == pytest.approx([20.0, 45.0, 4.8, 140.0, 45.0, 4.8], abs=1e-9)
    assert len(msp.query('LWPOLYLINE[layer=="SCRIBE"]')) == 1
    texts = {t.dxf.text for t in msp.query('TEXT[layer=="NOTE"]')}
    assert {"TEST-RIB 3 NOSE", "2024-T3, 0.635 mm", "GRAIN", "BEND DOWN 90"} <= texts
    assert len(msp.query('LINE[layer=="NOTE"]')) == 3  # grain arrow: shaft and two head strokes


def test_read_dxf_outline_round_trip(blank: BlankDrawing, tmp_path: Path) -> None:
    outline = read_dxf_outline(write_dxf(blank, tmp_path / "blank.dxf"))
    assert outline.insunits == 4  # DXF Reference: 4 = millimetres
    assert len(outline.outer) == len(blank.outer)
    # shapely: symmetric difference of written and re-read outline is empty to 1e-9 mm²
    assert Polygon(outline.outer).symmetric_difference(Polygon(blank.outer)).area < 1e-9
    assert outline.cut_circles == (HOLE,)
    assert outline.drill_circles == PINS


def test_dxf_write_is_atomic_and_keeps_old_file(
    blank: BlankDrawing, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    target = tmp_path / "blank.dxf"
    target.write_text("previous good file")

    def broken_save(self: object, filename: object, *args: object, **kwargs: object) -> None:
        Path(str(filename)).write_text("half a file")
        raise OSError("disk full")

    monkeypatch.setattr(ezdxf.document.Drawing, "saveas", broken_save)
    with pytest.raises(OutputError, match="disk full"):
        write_dxf(blank, target)
    assert target.read_text() == "previous good file"
    assert not list(tmp_path.glob(".*.part*"))  # no temporary left behind


def test_read_dxf_outline_rejects_non_dxf(tmp_path: Path) -> None:
    bad = tmp_path / "bad.dxf"
    bad.write_text("not a dxf")
    with pytest.raises(OutputError):
        read_dxf_outline(bad)


# ------------------------------------------------------------------------ SVG
def _svg_len_mm(value: str) -> float:
    assert value.endswith("mm"), value  # absolute unit, SVG 1.1 §7.10
    return float(value[:-2])


def test_svg_true_scale_and_layers(blank: BlankDrawing, tmp_path: Path) -> None:
    root = ET.parse(write_svg(blank, tmp_path / "blank.svg")).getroot()  # standard library XML parser
    ns = {"s": "http://www.w3.org/2000/svg"}
    xmin, ymin, xmax, ymax = blank.extent()
    assert xmin == 0.0 and xmax == W  # the title block is narrower than the blank
    width, height = _svg_len_mm(root.get("width", "")), _svg_len_mm(root.get("height", ""))
    assert width == round(W + 2 * SVG_MARGIN, 6)  # bbox + 5 mm each side, written to 1 nm
    assert height == round(ymax - ymin + 2 * SVG_MARGIN, 6)
    # viewBox in the same mm: one user unit is one millimetre (SVG 1.1 §7.7, viewBox)
    vb = [float(v) for v in root.get("viewBox", "").split()]
    assert vb[2:] == [width, height]
    assert vb[0] == -SVG_MARGIN and vb[1] == -(H + SVG_MARGIN)  # Y mirrored: top edge is -(ymax + margin)
    groups = {g.get("id"): g for g in root.iter("{http://www.w3.org/2000/svg}g")}
    for name in ("CUT", "DRILL", "SCRIBE", "NOTE"):
        assert groups[name].get("fill") == "none"
    # outline re-read from the SVG: same area (shapely) as the closed form within 1e-9 relative
    pts = [tuple(map(float, p.split(","))) for p in groups["CUT"].find("s:polygon", ns).get("points").split()]
    assert Polygon(pts).area == pytest.approx(rounded_rect_polygon_area(W, H, R, N), rel=1e-9)
    circles = sorted(float(c.get("r")) for c in groups["DRILL"].findall("s:circle", ns))
    assert circles == [2.4, 2.4]


# ------------------------------------------------------------------------ PDF
@pytest.fixture(scope="module")
def pypdf() -> Any:
    """pypdf, a test-only dependency (pure-Python PDF reader)."""
    return pytest.importorskip("pypdf")


def _mul(a: list[float], b: list[float]) -> list[float]:
    """Product a·b of PDF matrices [a b c d e f] (ISO 32000-1 §8.3.4)."""
    return [
        a[0] * b[0] + a[1] * b[2],
        a[0] * b[1] + a[1] * b[3],
        a[2] * b[0] + a[3] * b[2],
        a[2] * b[1] + a[3] * b[3],
        a[4] * b[0] + a[5] * b[2] + b[4],
        a[4] * b[1] + a[5] * b[3] + b[5],
    ]


def stroked_subpaths(page: object, reader: object) -> list[tuple[list[tuple[float, float]], bool]]:
    """Every stroked subpath of a page as (on-curve points in pt, closed), CTM applied.

    Follows the path operators of ISO 32000-1 §8.5 (m l c v y h re; S s B b painting; n discards).
    """
    from pypdf.generic import ContentStream

    ops = ContentStream(page.get_contents(), reader).operations  # type: ignore[attr-defined]
    ctm = [1.0, 0.0, 0.0, 1.0, 0.0, 0.0]
    stack: list[list[float]] = []
    current: list[tuple[list[tuple[float, float]], bool]] = []
    out: list[tuple[list[tuple[float, float]], bool]] = []

    def tf(x: float, y: float) -> tuple[float, float]:
        return (ctm[0] * x + ctm[2] * y + ctm[4], ctm[1] * x + ctm[3] * y + ctm[5])

    for args, op in ops:
        a = [float(v) for v in args] if op in (b"m", b"l", b"c", b"v", b"y", b"re", b"cm") else []
        if op == b"q":
            stack.append(ctm[:])
        elif op == b"Q":
            ctm = stack.pop()
        elif op == b"cm":
            ctm = _mul(a, ctm)
        elif op == b"m":
            current.append(([tf(a[0], a[1])], False))
        elif op in (b"l", b"c", b"v", b"y"):
            current[-1][0].append(tf(a[-2], a[-1]))
        elif op == b"h" and current:
            current[-1] = (current[-1][0], True)
        elif op == b"re":
            x, y, w, h = a
            current.append(([tf(x, y), tf(x + w, y), tf(x + w, y + h), tf(x, y + h)], True))
        elif op in (b"S", b"s", b"B", b"B*", b"b", b"b*"):
            closed = op in (b"s", b"b", b"b*")
            out += [(pts, c or closed) for pts, c in current]
            current = []
        elif op in (b"n", b"f", b"F", b"f*"):
            current = []
    return out


Subpath = tuple[list[tuple[float, float]], bool]


def squares(paths: list[Subpath], min_side_pt: float) -> list[tuple[float, float, float, float]]:
    """Closed axis-aligned squares (x0, y0, x1, y1) in pt with sides above ``min_side_pt``."""
    found = []
    for pts, closed in paths:
        corners = pts[:-1] if len(pts) == 5 and math.dist(pts[0], pts[-1]) < 1e-6 else pts
        if not closed or len(corners) != 4:
            continue
        xs = sorted({round(p[0], 4) for p in corners})
        ys = sorted({round(p[1], 4) for p in corners})
        if len(xs) != 2 or len(ys) != 2:
            continue
        if xs[1] - xs[0] > min_side_pt and abs((xs[1] - xs[0]) - (ys[1] - ys[0])) < 3.0:
            found.append((xs[0], ys[0], xs[1], ys[1]))
    return found


def text_origins(page: object) -> list[tuple[str, float, float]]:
    """(text, x, y) in pt for every text run of the page (pypdf's text visitor)."""
    runs: list[tuple[str, float, float]] = []

    def visit(text: str, cm: list[float], tm: list[float], font: object, size: float) -> None:
        if text.strip():
            m = _mul(list(map(float, tm)), list(map(float, cm)))
            runs.append((text, m[4], m[5]))

    page.extract_text(visitor_text=visit)  # type: ignore[attr-defined]
    return runs


def check_page_scale(page: object, reader: object) -> None:
    """The labelled scale square measures 50 mm and the 1-inch bar 25.4 mm, both ± 0.1 mm."""
    paths = stroked_subpaths(page, reader)
    runs = text_origins(page)
    label = [(x, y) for t, x, y in runs if "measure to check" in t]
    assert label, "scale-square label missing"
    lx, ly = label[0]
    holding = [s for s in squares(paths, min_side_pt=20.0 / MM_PER_PT) if s[0] < lx < s[2] and s[1] < ly < s[3]]
    assert len(holding) == 1
    x0, y0, x1, y1 = holding[0]
    assert (x1 - x0) * MM_PER_PT == pytest.approx(50.0, abs=0.1)
    assert (y1 - y0) * MM_PER_PT == pytest.approx(50.0, abs=0.1)

    bar_label = [(x, y) for t, x, y in runs if t.startswith("1 in")]
    assert bar_label
    bx, by = bar_label[0]
    bars = [
        pts
        for pts, _ in paths
        if len(pts) == 2 and abs(pts[0][1] - pts[1][1]) < 1e-6 and 0 < by - pts[0][1] < 8.0 / MM_PER_PT
        and min(pts[0][0], pts[1][0]) < bx < max(pts[0][0], pts[1][0])
    ]
    assert len(bars) == 1
    length_mm = abs(bars[0][1][0] - bars[0][0][0]) * MM_PER_PT
    assert length_mm == pytest.approx(MM_PER_INCH, abs=0.1)  # 1 in = 25.4 mm exactly


def page_text(page: object) -> str:
    return " ".join(page.extract_text().split())  # type: ignore[attr-defined]


@pytest.mark.parametrize(("paper", "size_pt"), [("letter", LETTER_PT), ("a4", A4_PT)], ids=["letter", "a4"])
def test_pdf_small_blank_one_page_true_scale(
    pypdf: Any, blank: BlankDrawing, tmp_path: Path, paper: str, size_pt: tuple[float, float]
) -> None:
    plan = write_pdf(blank, tmp_path / "blank.pdf", paper=paper)  # type: ignore[arg-type]
    reader = pypdf.PdfReader(tmp_path / "blank.pdf")
    assert plan.pages == len(reader.pages) == 1
    page = reader.pages[0]
    assert float(page.mediabox.width) == pytest.approx(size_pt[0], abs=0.01)
    assert float(page.mediabox.height) == pytest.approx(size_pt[1], abs=0.01)
    check_page_scale(page, reader)

    # the drawing itself is 1:1: the outline (the longest stroked path) spans W × H mm on paper
    paths = stroked_subpaths(page, reader)
    outline = max((pts for pts, _ in paths), key=len)
    assert len(outline) >= len(blank.outer)
    xs, ys = [p[0] for p in outline], [p[1] for p in outline]
    assert (max(xs) - min(xs)) * MM_PER_PT == pytest.approx(W, abs=0.1)
    assert (max(ys) - min(ys)) * MM_PER_PT == pytest.approx(H, abs=0.1)
    # the 30 mm hole: on-curve points of its Bezier circle span the diameter
    spans = [(max(p[0] for p in pts) - min(p[0] for p in pts)) * MM_PER_PT for pts, closed in paths if closed]
    assert any(span == pytest.approx(HOLE.d, abs=0.1) for span in spans)

    text = page_text(page).lower()
    assert "print at 100 % / actual size" in text and "no fit-to-page" in text
    assert "test-rib 3 nose" in text and "2024-t3, 0.635 mm" in text and "grain" in text
    assert "r1 c1" in text


def test_pdf_long_blank_tiles_with_overlap(pypdf: Any, tmp_path: Path) -> None:
    drawing = long_blank(900.0, 150.0)
    plan = write_pdf(drawing, tmp_path / "long.pdf", paper="letter")
    reader = pypdf.PdfReader(tmp_path / "long.pdf")
    # 900 mm cannot fit across fewer than ceil(900 / (215.9 - 2·10)) = 5 Letter widths
    assert len(reader.pages) == plan.pages >= math.ceil(900.0 / (215.9 - 20.0))
    assert plan.pages > 1
    for k, page in enumerate(reader.pages):
        assert float(page.mediabox.width) == pytest.approx(LETTER_PT[0 if not plan.layout.landscape else 1], abs=0.01)
        check_page_scale(page, reader)
        tile = plan.tiles[k]
        text = page_text(page)
        assert f"R{tile.row} C{tile.col}" in text
        assert "PRINT AT 100 % / ACTUAL SIZE" in text

    # the windows cover the whole blank (shapely) and neighbours overlap by the stated 10 mm
    lay = plan.layout
    windows = unary_union([box(t.x0, t.y0, t.x0 + lay.region_w, t.y0 + lay.region_h) for t in plan.tiles])
    assert windows.contains(Polygon(drawing.outer))
    by_pos = {(t.row, t.col): t for t in plan.tiles}
    for (r, c), t in by_pos.items():
        if (r, c + 1) in by_pos:
            overlap = t.x0 + lay.region_w - by_pos[(r, c + 1)].x0
            assert overlap == pytest.approx(10.0, abs=1e-9)


def test_pdf_square_blank_tiles_in_rows_and_columns(pypdf: Any, tmp_path: Path) -> None:
    drawing = long_blank(400.0, 400.0)
    plan = write_pdf(drawing, tmp_path / "sq.pdf", paper="a4")
    reader = pypdf.PdfReader(tmp_path / "sq.pdf")
    assert plan.rows > 1 and plan.cols > 1 and len(reader.pages) == plan.rows * plan.cols
    for page in reader.pages:
        assert float(page.mediabox.width) in (pytest.approx(A4_PT[0], abs=0.01), pytest.approx(A4_PT[1], abs=0.01))
        check_page_scale(page, reader)
    labels = {page_text(p).split("page ")[1].split(" (")[0] for p in reader.pages}
    assert labels == {f"R{r} C{c}" for r in range(1, plan.rows + 1) for c in range(1, plan.cols + 1)}


@pytest.mark.parametrize(("paper", "width"), [("a4", 272.0), ("letter", 255.0)])
def test_pdf_blank_that_fits_one_page_with_its_footer_takes_one(pypdf: Any, tmp_path: Path, paper: str,
                                                                 width: float) -> None:
    # Landscape A4 is 297 × 210 mm (ISO 216), Letter 279.4 × 215.9 mm (ANSI/ASME Y14.1); with 10 mm margins the
    # drawing window is 277 mm (A4) or 259.4 mm (Letter) wide: a blank just narrower than that fits, with the
    # footer band below it, on one page (the 3 mm blank paper round the drawing is given up first).
    drawing = long_blank(width, 90.0)
    plan = write_pdf(drawing, tmp_path / "one.pdf", paper=paper)  # type: ignore[arg-type]
    reader = pypdf.PdfReader(tmp_path / "one.pdf")
    assert plan.pages == len(reader.pages) == 1 and plan.layout.landscape
    (tile,) = plan.tiles
    xmin, ymin, xmax, ymax = drawing.content_bbox()
    assert tile.x0 <= xmin and xmax <= tile.x0 + plan.layout.region_w  # the whole blank is on the page
    assert tile.y0 <= ymin and ymax <= tile.y0 + plan.layout.region_h
    check_page_scale(reader.pages[0], reader)


def test_pdf_bad_options_are_clear_errors(blank: BlankDrawing) -> None:
    with pytest.raises(OutputError, match="letter, a4"):  # the error lists the valid choices
        plan_tiles(blank, paper="tabloid")  # type: ignore[arg-type]
    with pytest.raises(OutputError, match="margin"):
        plan_tiles(blank, margin=1.0)


# ------------------------------------------------------------------ benchmark
@pytest.mark.slow
def test_writer_timings_print(blank: BlankDrawing, tmp_path: Path) -> None:
    """Benchmark, not a timed test: prints seconds per writer for the 1004-vertex outline."""
    for name, writer in (("dxf", write_dxf), ("svg", write_svg), ("pdf", write_pdf)):
        start = time.perf_counter()
        writer(blank, tmp_path / f"bench.{name}")
        print(f"{name}: {time.perf_counter() - start:.3f} s for {len(blank.outer)} vertices")
