"""The wing summary (``diegen.reports.summary``) of the demo wing: its rows, ``summary.csv`` and ``summary.pdf``.

Stations and chords are worked out here from the spec file itself (read with
plain PyYAML): ``stations: {count: 13}`` spaces the ribs evenly from root to tip
and the chord tapers linearly between them, as the spec's comments say; inches by
NIST SP 811 (2008), App. B.  Extents are shapely's bounds; the CSV is read back
with the standard library's ``csv`` and the PDF with pypdf, the content of its piece
pages through ``piece_plot``, the plain data each page draws.  The wrinkle limit by its stated scaling
(a model of our own), written out in ``testing.py``.
"""

from __future__ import annotations

import csv
from pathlib import Path

import pytest
import yaml
from shapely.geometry import Polygon
from testing import DEMO_WING, wrinkle_limit

from diegen.reports.summary import COLUMNS, piece_plot, summary_rows, write_summary

MM_PER_IN = 25.4  # NIST SP 811 App. B, exact
RAW = yaml.safe_load(DEMO_WING.read_text(encoding="utf-8"))
PLAN = RAW["planform"]
RIB_COUNT = PLAN["stations"]["count"]
PIECES = RAW["pieces"]


@pytest.fixture(scope="module")
def wing_spec():
    from diegen import api

    return api.load(DEMO_WING)


@pytest.fixture(scope="module")
def wing(wing_spec):
    from diegen import api

    return api.analyse(wing_spec)


@pytest.fixture(scope="module")
def rows(wing_spec, wing):
    return summary_rows(wing_spec, wing.ribs)


def station_in(number: int) -> float:
    return (number - 1) * PLAN["span"] / (RIB_COUNT - 1)


def chord_in(number: int) -> float:
    y = station_in(number)
    return PLAN["root_chord"] + (PLAN["tip_chord"] - PLAN["root_chord"]) * y / PLAN["span"]


def test_one_row_per_piece_root_first(rows) -> None:
    expected = [(n, piece) for n in range(1, RIB_COUNT + 1) for piece in PIECES]
    assert [(r["rib"], r["piece"]) for r in rows] == expected
    assert [r["part_id"] for r in rows] == [f"{RAW['id']}-R{n:02d}-{piece}" for n, piece in expected]
    assert all(tuple(r) == COLUMNS for r in rows)


def test_stations_and_chords_from_the_planform(rows) -> None:
    for r in rows:
        assert r["station_mm"] == pytest.approx(station_in(r["rib"]) * MM_PER_IN, abs=0.05)
        assert r["chord_mm"] == pytest.approx(chord_in(r["rib"]) * MM_PER_IN, abs=0.05)


def test_values_equal_the_analysis(rows, wing) -> None:
    pieces = [p for rib in wing.ribs for p in rib.pieces]
    assert len(pieces) == len(rows)
    for r, p in zip(rows, pieces):
        assert r["part_id"] == p.piece.part_id
        x0, y0, x1, y1 = Polygon(p.piece.die_outline).bounds
        bx0, by0, bx1, by1 = Polygon(p.blank.outer).bounds
        assert r["die_length_mm"] == pytest.approx(x1 - x0, abs=0.05)
        assert r["die_depth_mm"] == pytest.approx(y1 - y0, abs=0.05)
        assert r["blank_length_mm"] == pytest.approx(bx1 - bx0, abs=0.05)
        assert r["blank_width_mm"] == pytest.approx(by1 - by0, abs=0.05)
        assert r["die_height_mm"] == pytest.approx(p.die_height_mm, abs=0.005)
        assert r["stock_layers"] == p.die_layers
        assert r["overbend_deg"] == pytest.approx(p.springback.overbend_deg, abs=0.005)
        assert r["die_radius_mm"] == pytest.approx(p.springback.die_radius_mm, abs=5e-4)
        assert r["max_shrink"] == pytest.approx(p.max_shrink, abs=5e-5)
        assert r["max_stretch"] == pytest.approx(p.max_stretch, abs=5e-5)
        assert (r["flutes"], r["notches"], r["press_verdict"]) == (len(p.flutes), len(p.notches), p.press.verdict)
        assert r["warnings"] == " | ".join(f"{p.piece.part_id}: {w.message}" for w in p.warnings)


def test_root_rib_override_shows(rows) -> None:
    """Rib 1 is made of heavier sheet with a larger bend radius (the spec's override): a larger die radius."""
    root = {r["die_radius_mm"] for r in rows if r["rib"] == 1}
    others = {r["die_radius_mm"] for r in rows if r["rib"] != 1}
    assert len(root) == 1 and len(others) == 1 and root.pop() > others.pop()


def test_die_height_is_whole_layers_of_stock(rows) -> None:
    stock_mm = RAW["die"]["stock_thickness"] * MM_PER_IN
    for r in rows:
        assert r["die_height_mm"] == pytest.approx(r["stock_layers"] * stock_mm, abs=0.005)


# ---------------------------------------------------------------- the files
@pytest.fixture(scope="module")
def written(wing_spec, wing, tmp_path_factory) -> tuple[Path, list, list[Path]]:
    """The summary of the root rib only."""
    folder = tmp_path_factory.mktemp("summary")
    ribs = [wing.ribs[0]]
    return folder, ribs, write_summary(wing_spec, ribs, folder)


def test_csv_reads_back_as_the_rows(wing_spec, written) -> None:
    folder, ribs, paths = written
    assert paths == [folder / "summary.csv", folder / "summary.pdf"]
    with open(folder / "summary.csv", newline="", encoding="utf-8") as handle:
        reader = csv.DictReader(handle)
        assert tuple(reader.fieldnames or ()) == COLUMNS
        read = list(reader)
    expected = summary_rows(wing_spec, ribs)
    assert len(read) == len(expected) == len(PIECES)
    for got, want in zip(read, expected):
        assert got == {k: str(v) for k, v in want.items()}


def pdf_pages(path: Path) -> list[str]:
    pypdf = pytest.importorskip("pypdf")
    reader = pypdf.PdfReader(path)
    for page in reader.pages:  # US letter, landscape: 11 × 8.5 in at 72 points to the inch
        assert (float(page.mediabox.width), float(page.mediabox.height)) == (792.0, 612.0)
    return [page.extract_text() for page in reader.pages]


def check_pdf(pages: list[str], spec_id: str, rows: list[dict], ribs) -> None:
    """Planform first, then the table pages (40 rows each), then a page a piece in order."""
    tables = -(-len(rows) // 40)
    assert len(pages) == 1 + tables + len(rows)
    assert f"{spec_id}: planform, rib stations" in pages[0]
    for n in range(1, RIB_COUNT + 1):
        assert f"R{n}\n" in pages[0] + "\n"
    table_lines = [line for page in pages[1:1 + tables] for line in page.splitlines()]
    header = next(line for line in table_lines if line.startswith("part_id "))
    shown = header.split()
    assert set(shown) <= set(COLUMNS) and "part_id" in shown
    for row in rows:
        assert " ".join(str(row[c]) for c in shown) in table_lines, row["part_id"]
    for k in range(tables):
        last = min(40 * (k + 1), len(rows))
        assert f"{spec_id}: pieces {40 * k + 1}–{last} of {len(rows)}" in pages[1 + k]
    pieces = [p for rib in ribs for p in rib.pieces]
    assert len(pieces) == len(rows)
    root = " ".join(RAW["airfoil"]["root"].split()).casefold()  # the spec file's root section, "naca 23015"
    for page, p, row in zip(pages[1 + tables:], pieces, rows):
        assert row["part_id"] == p.piece.part_id
        if row["rib"] == 1:  # the root rib is cut from the root section itself (span fraction 0)
            assert row["section"].casefold() == root
        # the title names the section the piece is cut from, as its table row does
        assert (f"{p.piece.part_id} ({row['section']}): over-bend {p.springback.overbend_deg:.2f}°, die R "
                f"{p.springback.die_radius_mm:.2f} mm, {len(p.flutes)} flute(s), press {p.press.verdict}") in page
        assert "die outline" in page and "shrink limit" in page


def test_pdf_has_planform_table_and_a_page_a_piece(wing_spec, written) -> None:
    folder, ribs, _ = written
    pages = pdf_pages(folder / "summary.pdf")
    check_pdf(pages, wing_spec.id, summary_rows(wing_spec, ribs), ribs)


def test_piece_pages_draw_the_wrinkle_limit(written) -> None:
    """The root rib is of 0.032 in sheet (the spec's override) with a 0.5 in flange: its wrinkle limit is the
    catalogue's 2024-T3 limit scaled by (20·t/h)² = 1.28² (model of our own, specs/README.md), and the strain plot
    of each of its pieces draws the limit there."""
    _, ribs, _ = written
    override = RAW["overrides"][0]
    assert override["ribs"] == [1]
    t_mm, h_mm = override["sheet"]["thickness"] * MM_PER_IN, RAW["flange"]["height"] * MM_PER_IN
    for p in ribs[0].pieces:
        level = piece_plot(ribs[0], p).shrink_limit
        assert level == pytest.approx(wrinkle_limit(p.alloy.shrink_limit, h_mm, t_mm), rel=1e-9), p.piece.part_id


def test_wrinkle_limit_follows_each_ribs_sheet(wing) -> None:
    """The wrinkle limit the summary's ribs are judged by: the catalogue's limit scaled by (20·t/h)² (model of our
    own, specs/README.md), 1.28² for the root rib's 0.032 in sheet (the spec's override), 1 for the 0.025 in of
    the others, with the 0.5 in flange."""
    h_mm = RAW["flange"]["height"] * MM_PER_IN
    for number, rib in enumerate(wing.ribs, start=1):
        t_in = (RAW["overrides"][0] if number in RAW["overrides"][0]["ribs"] else RAW)["sheet"]["thickness"]
        for p in rib.pieces:
            assert p.flange.shrink_limit == pytest.approx(wrinkle_limit(p.alloy.shrink_limit, h_mm, t_in * MM_PER_IN),
                                                          rel=1e-12), p.piece.part_id
    assert wing.ribs[0].pieces[0].flange.shrink_limit > wing.ribs[1].pieces[0].flange.shrink_limit


@pytest.mark.slow
def test_whole_wing_pdf(wing_spec, wing, rows, tmp_path) -> None:
    write_summary(wing_spec, wing.ribs, tmp_path)
    pages = pdf_pages(tmp_path / "summary.pdf")
    assert len(pages) == 1 + 1 + RIB_COUNT * len(PIECES)
    check_pdf(pages, wing_spec.id, rows, wing.ribs)




def test_a_piece_page_of_straight_flanges_says_there_is_no_strain(tmp_path) -> None:
    """A part whose flanges are all straight has no shrink or stretch to plot: its page says so, over an axis that
    spans the die outline (a 100 × 50 mm rectangle: 300 mm), read back with pypdf."""
    import numpy as np
    pypdf = pytest.importorskip("pypdf")

    from diegen.export.pdfdoc import Document
    from diegen.reports.summary import PiecePlot, _piece_page

    loop = np.array([[0.0, 0.0], [100.0, 0.0], [100.0, 50.0], [0.0, 50.0], [0.0, 0.0]])
    document = Document()
    _piece_page(document.add_page(792.0, 612.0), PiecePlot("X1: a plate", loop * 1.1, loop, (), 0.07))
    path = tmp_path / "page.pdf"
    path.write_bytes(document.to_bytes())
    text = pypdf.PdfReader(path).pages[0].extract_text()
    assert "every flange is straight: no shrink" in text
    assert "300" in text.split()  # the last tick: the axis spans the outline's 300 mm
