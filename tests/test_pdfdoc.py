"""The small PDF writer (diegen/export/pdfdoc.py), checked from outside.

Files are re-read with pypdf in strict mode (it refuses a wrong cross-reference table); the font widths are
re-derived from the standard fonts' metrics (AFM) files that matplotlib ships, mapped to WinAnsiEncoding
(ISO 32000-1 Annex D.2) through the glyph names of fontTools' glyph list.
"""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
from test_blank_writers import stroked_subpaths, text_origins

from diegen.export.pdfdoc import _HELVETICA, _HELVETICA_BOLD, Document, text_width


@pytest.fixture(scope="module")
def pypdf() -> Any:
    return pytest.importorskip("pypdf")


def _afm_widths(path: Path) -> dict[str, int]:
    widths = {}
    for line in path.read_text(encoding="latin-1").splitlines():
        if line.startswith("C "):
            fields = dict(f.strip().split(" ", 1) for f in line.split(";") if f.strip())
            widths[fields["N"]] = int(fields["WX"])
    return widths


@pytest.mark.parametrize(("afm", "table"), [("phvr8a.afm", _HELVETICA), ("phvb8a.afm", _HELVETICA_BOLD)],
                         ids=["regular", "bold"])
def test_font_widths_match_the_metrics_files(afm: str, table: tuple[int, ...]) -> None:
    import importlib.util

    agl = pytest.importorskip("fontTools.agl")
    spec = importlib.util.find_spec("matplotlib")
    assert spec is not None and spec.origin is not None
    path = Path(spec.origin).parent / "mpl-data" / "fonts" / "afm" / afm
    if not path.is_file():
        pytest.skip(f"{path} not shipped")
    widths = _afm_widths(path)
    assert len(table) == 224
    for code in range(32, 256):
        try:
            char = bytes([code]).decode("cp1252")
        except UnicodeDecodeError:
            assert table[code - 32] == 0, code  # undefined code: never written
            continue
        name = {0xA0: "space", 0xAD: "hyphen"}.get(code, agl.UV2AGL.get(ord(char)))
        assert table[code - 32] == widths.get(name, 0), (code, char, name)


def test_document_reads_back_strictly(pypdf: Any, tmp_path: Path) -> None:
    doc = Document({"Title": "T1-nose flat blank 1:1", "Subject": "2024-T3 — 0.635 mm"})
    page = doc.add_page(612.0, 792.0)
    page.style(width=0.5, colour="#cc0000", cap=1, join=1, dash=())
    page.polyline([(10.0, 10.0), (100.0, 10.0), (100.0, 50.0)], closed=True)
    page.circle(300.0, 300.0, 20.0)
    page.text(50.0, 700.0, "PRINT AT 100 % — (draft) \\ 3°", 12.0, bold=True)
    second = doc.add_page(842.0, 595.0)
    second.rect(10.0, 20.0, 30.0, 30.0)
    path = tmp_path / "doc.pdf"
    path.write_bytes(doc.to_bytes())

    reader = pypdf.PdfReader(path, strict=True)
    assert len(reader.pages) == 2
    assert [float(v) for v in reader.pages[1].mediabox] == [0.0, 0.0, 842.0, 595.0]
    assert reader.metadata.title == "T1-nose flat blank 1:1"
    assert reader.metadata.subject == "2024-T3 — 0.635 mm"
    assert "PRINT AT 100 % — (draft) \\ 3°" in reader.pages[0].extract_text()
    paths = stroked_subpaths(reader.pages[0], reader)
    assert paths[0] == ([(10.0, 10.0), (100.0, 10.0), (100.0, 50.0)], True)
    circle = paths[1][0]  # on-curve points of the four quarters: start and 90°, 180°, 270°, 360°
    assert [(round(x, 6), round(y, 6)) for x, y in circle] == [(320, 300), (300, 320), (280, 300), (300, 280),
                                                                (320, 300)]


def test_text_alignment_and_substitutes(pypdf: Any, tmp_path: Path) -> None:
    doc = Document()
    page = doc.add_page(600.0, 600.0)
    page.text(300.0, 300.0, "ABC", 10.0, ha="center")
    page.text(300.0, 200.0, "x ≤ 1", 10.0)  # ≤ is outside WinAnsiEncoding
    page.text(300.0, 100.0, "a → b ⊕", 10.0, angle=90.0)
    path = tmp_path / "text.pdf"
    path.write_bytes(doc.to_bytes())
    reader = pypdf.PdfReader(path, strict=True)
    runs = text_origins(reader.pages[0])
    # A, B and C are 667, 667 and 722 thousandths of an em wide (Helvetica)
    assert text_width("ABC", 10.0) == pytest.approx(20.56)
    assert runs[0][0] == "ABC" and runs[0][1] == pytest.approx(300.0 - 10.28) and runs[0][2] == pytest.approx(300.0)
    assert "x ? 1" in reader.pages[0].extract_text()
    # the arrow and the circled plus are strokes: the arrow's two, the circle's three (cross and ring)
    strokes = stroked_subpaths(reader.pages[0], reader)
    assert len(strokes) == 2 + 3
    assert all(abs(x - 300.0) < 10.0 and 100.0 < y < 140.0 for pts, _ in strokes for x, y in pts)  # turned 90°
    ring = next(pts for pts, closed in strokes if closed)
    assert math.dist(ring[0], ring[2]) == pytest.approx(2 * 0.30 * 10.0)


def test_pdf_template_does_not_load_matplotlib() -> None:
    code = (
        "import sys; from diegen.blank.drawing import BlankDrawing; from diegen.export.pdf import write_pdf; "
        "import tempfile, pathlib; "
        "write_pdf(BlankDrawing('X', 'm', ((0, 0), (50, 0), (50, 20))), pathlib.Path(tempfile.mkdtemp()) / 'x.pdf'); "
        "assert 'matplotlib' not in sys.modules, 'matplotlib loaded'"
    )
    subprocess.run([sys.executable, "-c", code], check=True)
