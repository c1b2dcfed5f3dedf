"""The chart canvas of our own (``diegen.export.raster``) and the build's preview drawn on it.

The canvas copies three things from the plotting library the other pictures use, and each is held here to that
library (matplotlib, the reference): the ten-colour "tab10" cycle, the "inferno" colour map, and the choice of
tick positions (``matplotlib.ticker.MaxNLocator`` with steps 1, 2, 2.5, 5, 10).  The preview itself is checked
for what it replaced: the same picture size, the same axes rectangles (matplotlib's layout of the figure
fractions), the die's features where the data puts them on equal axes, and no plotting library imported.
"""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest
from PIL import Image
from testing import DEMO_RIB, ROOT

from diegen.export import raster
from diegen.export.plot import preview_plot


def test_tab10_is_the_plotting_library_palette() -> None:
    """Reference: matplotlib's "tab10" colour map, its ten entries as 8-bit RGB."""
    from matplotlib import colormaps

    reference = [tuple(round(255 * c) for c in colormaps["tab10"](i)[:3]) for i in range(10)]
    assert list(raster.TAB10) == reference
    assert raster.TAB["cyan"] == reference[9] and raster.TAB["green"] == reference[2]


def test_inferno_follows_the_library_table() -> None:
    """Reference: matplotlib's 256-entry "inferno" table; the 33 samples interpolated linearly stay within 5/255
    of it (the table is smooth), and the reversed map runs from its pale end to its dark end."""
    from matplotlib import colormaps

    t = np.linspace(0.0, 1.0, 256)
    reference = colormaps["inferno_r"](t)[:, :3] * 255
    ours = raster.inferno_r(t).astype(float)
    assert np.abs(ours - reference).max() <= 5.0
    assert tuple(raster.inferno_r(np.array([0.0, 1.0]))[1]) == (0, 0, 4)
    assert tuple(raster.inferno_r(np.array([-1.0, 2.0]))[0]) == (252, 255, 164)  # clipped to the map's ends


def test_ticks_match_the_library_locator() -> None:
    """Reference: ``matplotlib.ticker.MaxNLocator(nbins, steps=[1, 2, 2.5, 5, 10])``, the ticks it returns inside
    the range, over random ranges of every size and sign."""
    from matplotlib.ticker import MaxNLocator

    rng = np.random.default_rng(7)
    for _ in range(2000):
        low = rng.uniform(-1000, 1000) * 10.0 ** rng.integers(-3, 3)
        span = rng.uniform(0.01, 1) * 10.0 ** rng.integers(-3, 4)
        most = int(rng.integers(1, 10))
        locator = MaxNLocator(nbins=most, steps=[1, 2, 2.5, 5, 10])
        inside = (low - 1e-9 * span, low + span * (1 + 1e-9))
        reference = [v for v in locator.tick_values(low, low + span) if inside[0] <= v <= inside[1]]
        ours, _ = raster.tick_values(low, low + span, most)
        assert len(ours) == len(reference)
        assert np.allclose(ours, reference, rtol=1e-9, atol=1e-9 * span), (low, span, most)


def test_tick_labels() -> None:
    """Decimals as the step needs them, the minus sign U+2212 as typeset mathematics writes it, no "−0"."""
    values, step = raster.tick_values(-0.21, 0.49, 6)
    assert [raster.tick_label(v, step) for v in values] == ["−0.2", "0.0", "0.2", "0.4"]
    values, step = raster.tick_values(-60.0, 92.0, 9)
    assert [raster.tick_label(v, step) for v in values] == ["−60", "−40", "−20", "0", "20", "40", "60", "80"]
    assert raster.tick_label(2.5, 2.5) == "2.5" and raster.tick_label(-1e-17, 0.25) == "0.00"


def test_dashes_cover_their_share_of_the_line() -> None:
    """A dashed straight line of 100 px in dashes of 3 on, 1 off: 25 dashes, 3/4 of its length drawn."""
    line = np.array([[0.0, 0.0], [40.0, 0.0], [100.0, 0.0]])
    dashes = raster.dash_pieces(line, 3.0, 1.0)
    assert len(dashes) == 25
    drawn = sum(float(np.hypot(*np.diff(d, axis=0).T).sum()) for d in dashes)
    assert drawn == pytest.approx(75.0)


@pytest.fixture(scope="module")
def nose_preview(tmp_path_factory):
    from diegen import api

    rib = api.analyse(api.load(DEMO_RIB))
    path = preview_plot(rib, rib.pieces[0], tmp_path_factory.mktemp("preview") / "nose-preview.png")
    return rib.pieces[0], np.asarray(Image.open(path)).astype(int)


MATPLOTLIB_FRAMES = {"rows": [66, 495, 569, 767], "columns": [85, 146, 992, 1053, 1077, 1095]}
"""Rows and columns of the axes frames in the demo nose's preview as matplotlib drew it before this canvas replaced
it (the equal-aspect plan view, the colour bar, the strain plot), measured on that picture."""


def test_preview_keeps_the_figure_layout(nose_preview) -> None:
    """The picture is 11 × 7.5 in at 110 dpi, and every axes frame lies within one pixel of where matplotlib drew
    it: the plan view shrunk to equal axes, the colour bar, the strain plot."""
    _, pixels = nose_preview
    assert pixels.shape == (825, 1210, 3)
    black = np.all(pixels < 40, axis=2)
    black[:60] = False  # the title's letters
    rows, columns = np.nonzero(black.sum(axis=1) > 100)[0], np.nonzero(black.sum(axis=0) > 100)[0]
    assert len(rows) == len(MATPLOTLIB_FRAMES["rows"]) and len(columns) == len(MATPLOTLIB_FRAMES["columns"])
    assert np.abs(rows - MATPLOTLIB_FRAMES["rows"]).max() <= 1
    assert np.abs(columns - MATPLOTLIB_FRAMES["columns"]).max() <= 1


def test_preview_draws_pins_in_place_on_equal_axes(nose_preview) -> None:
    """The two tooling pins (red discs) lie at their data positions under one scale in x and y (rows grow
    downwards): the pixel distance between them over the data distance is the same along both axes."""
    from scipy import ndimage

    piece, pixels = nose_preview
    red = np.all(np.abs(pixels - np.array(raster.TAB["red"])) <= 12, axis=2)
    red[480:] = False  # the strain plot's stretch limit is red too
    labels, count = ndimage.label(red)
    centres = sorted(ndimage.center_of_mass(red, labels, range(1, count + 1)), key=lambda c: c[1])
    assert len(centres) == len(piece.piece.pins) == 2
    pins = sorted((p.x, p.y) for p in piece.piece.pins)
    (r0, c0), (r1, c1) = centres
    (x0, y0), (x1, y1) = pins
    scale_x = (c1 - c0) / (x1 - x0)
    assert (r0 - r1) / (y1 - y0) == pytest.approx(scale_x, rel=0.02)
    assert 2.0 < scale_x < 4.0  # pixels per mm: the die, about 275 mm long, across the 0.8-wide axes


def test_build_preview_needs_no_plotting_library(tmp_path) -> None:
    """Writing a preview in a new process loads Pillow but not matplotlib (its import alone cost more than the
    picture)."""
    probe = (
        "import json, sys\n"
        "from diegen import api\n"
        "from diegen.export.plot import preview_plot\n"
        f"rib = api.analyse(api.load({str(DEMO_RIB)!r}))\n"
        f"preview_plot(rib, rib.pieces[1], {str(tmp_path / 'p.png')!r})\n"
        "print(json.dumps(sorted({m.split('.')[0] for m in sys.modules} & {'matplotlib', 'PIL'})))\n"
    )
    run = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, cwd=ROOT, check=True)
    assert json.loads(run.stdout.strip().splitlines()[-1]) == ["PIL"]
