"""The PDF chart (``diegen.export.pdfchart``): data placed in its frame, one scale for equal axes, and strokes
clipped to the frame (content stream read back with pypdf, ISO 32000-1 §8.5 path operators)."""

from __future__ import annotations

import numpy as np
import pytest

from diegen.export.pdfchart import Chart, Stroke
from diegen.export.pdfdoc import Document


def test_limits_map_to_the_frame_with_five_percent_margins() -> None:
    canvas = Document().add_page(400.0, 300.0)
    chart = Chart(canvas, (50.0, 40.0, 300.0, 200.0), (0.0, 10.0), (-1.0, 1.0))
    corners = chart.page([-0.5, 10.5], [-1.1, 1.1])  # the limits widened by 5 % of their span each side
    assert corners.ravel().tolist() == pytest.approx([50.0, 40.0, 350.0, 240.0], abs=1e-9)


def test_equal_axes_share_one_scale_and_y_down_flips() -> None:
    canvas = Document().add_page(400.0, 300.0)
    chart = Chart(canvas, (0.0, 0.0, 300.0, 100.0), (0.0, 10.0), (0.0, 10.0), equal=True, y_down=True)
    (x0, y0), (x1, y1) = chart.page([0.0, 10.0], [0.0, 10.0])
    assert x1 - x0 == pytest.approx(y0 - y1, rel=1e-12)  # one unit is as long across as down
    assert y0 > y1  # y grows downwards


def test_lines_are_clipped_to_the_frame(tmp_path) -> None:
    pypdf = pytest.importorskip("pypdf")
    document = Document(compress=False)
    canvas = document.add_page(200.0, 200.0)
    chart = Chart(canvas, (20.0, 30.0, 100.0, 80.0), (0.0, 1.0), (0.0, 1.0))
    chart.line(np.array([0.0, 1.0]), np.array([0.5, 0.5]), Stroke("#ff0000", 2.0, (3.0, 1.0)))
    path = tmp_path / "chart.pdf"
    path.write_bytes(document.to_bytes())
    content = pypdf.PdfReader(path).pages[0].get_contents().get_data().decode("latin-1")
    clip = content.index("20 30 100 80 re W n")
    assert clip < content.index("1 0 0 RG") < content.index("\nS\n") < content.index("Q")
    assert "[3 1] 0 d" in content and "2 w" in content
