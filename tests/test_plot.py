"""The PNG pictures of a piece (diegen/export/plot.py), read back with Pillow.

The geometry plot's figure is reused from call to call, and the preview is drawn on a canvas of our own
(diegen/export/raster.py), so these tests check that a picture depends on its piece only, that nothing is left
behind, and that each picture shows its parts, found by their colours (matplotlib's tab10 palette, which both
use).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from PIL import Image
from testing import DEMO_RIB

from diegen import api
from diegen.export import plot

TAB = {  # matplotlib's "tab:" colours, (r, g, b)
    "green": (44, 160, 44), "purple": (148, 103, 189), "red": (214, 39, 40), "cyan": (23, 190, 207),
    "blue": (31, 119, 180),
}


@pytest.fixture(scope="module")
def rib():
    return api.analyse(api.load(DEMO_RIB))


def _pixels(path: Path) -> np.ndarray:
    image = Image.open(path)
    assert image.mode == "RGB"
    return np.asarray(image).astype(int)


def _count(pixels: np.ndarray, rgb: tuple[int, int, int], tolerance: int = 12) -> int:
    return int((np.abs(pixels - np.array(rgb)).max(axis=2) <= tolerance).sum())


@pytest.mark.parametrize(("writer", "size"), [(plot.preview_plot, (1210, 825)), (plot.piece_plot, (1210, 572))],
                         ids=["preview", "geometry"])
def test_pictures_depend_on_their_piece_only(rib, tmp_path: Path, writer, size) -> None:
    nose, center = rib.pieces[0], rib.pieces[1]
    first = writer(rib, nose, tmp_path / "first.png")
    writer(rib, center, tmp_path / "other.png")
    reused = plot._FIGURES.get("geometry") if writer is plot.piece_plot else None  # the preview keeps no figure
    children = sum(len(ax.get_children()) for ax in reused.figure.axes) if reused else 0
    again = writer(rib, nose, tmp_path / "again.png")
    assert Image.open(first).size == size
    assert first.read_bytes() == again.read_bytes()
    assert first.read_bytes() != (tmp_path / "other.png").read_bytes()
    if reused:
        assert sum(len(ax.get_children()) for ax in reused.figure.axes) == children  # each call takes its own off


def test_preview_shows_blank_die_holes_pins_flutes_and_strain(rib, tmp_path: Path) -> None:
    nose = rib.pieces[0]
    assert nose.flutes and nose.piece.holes and nose.piece.pins
    pixels = _pixels(plot.preview_plot(rib, nose, tmp_path / "preview.png"))
    top, strain = pixels[:480], pixels[480:]
    assert _count(top, TAB["green"]) > 500  # blank outline and cut circles
    assert _count(top, (77, 77, 77), 20) > 50  # die outline, 0.3 grey
    assert _count(top, TAB["purple"]) > 200  # lightening holes
    assert _count(top, TAB["red"]) > 40  # filled tooling pins
    assert _count(top, TAB["cyan"]) > 40  # flute marks
    assert _count(pixels[:, 1070:1100], (0, 0, 4), 40) > 20  # the colour bar's dark end
    assert _count(strain, TAB["blue"]) > 500  # strain curve and shrink limit
    reddish = (strain[..., 0] - strain[..., 1] > 100) & (strain[..., 0] - strain[..., 2] > 100)
    assert int(reddish.sum()) > 500  # stretch limit, a thin dashed line blended with white


def test_geometry_plot_shows_outline_joggles_and_legend(rib, tmp_path: Path) -> None:
    center = rib.pieces[1]
    assert center.piece.joggles and center.piece.relief_points
    pixels = _pixels(plot.piece_plot(rib, center, tmp_path / "geometry.png"))
    assert _count(pixels, (0, 0, 0), 30) > 1500  # die outline, 1.6 pt black, and text
    assert _count(pixels, (255, 223, 191), 12) > 2000  # joggle bands: tab:orange at 15 % over white
    assert _count(pixels, TAB["purple"]) > 300
    assert _count(pixels, TAB["red"]) > 40
    assert _count(pixels, TAB["green"]) > 500


def test_geometry_legend_follows_the_piece(rib, tmp_path: Path) -> None:
    import dataclasses

    tail = rib.pieces[2]
    assert tail.piece.relief_points
    plain = dataclasses.replace(tail, piece=dataclasses.replace(tail.piece, relief_points=()))
    first = plot.piece_plot(rib, plain, tmp_path / "plain.png").read_bytes()
    plot.piece_plot(rib, tail, tmp_path / "relief.png")
    assert plot.piece_plot(rib, plain, tmp_path / "again.png").read_bytes() == first
    texts = [t.get_text() for t in plot._FIGURES["geometry"].ax.get_legend().get_texts()]
    assert "bend relief" not in texts and "die outline" in texts


def test_geometry_plot_of_a_mirrored_part_draws_its_outline_mirrored(tmp_path: Path, monkeypatch) -> None:
    """The demo gusset's flange bends up, so its die is the drawing's mirror image (x → −x): the plot draws the
    drawn outline mirrored too, beside the die outline, and says so in the legend and the x label."""
    from testing import SPECS

    gusset = api.analyse(api.load(SPECS / "demo-gusset.yaml"))
    assert any(w.code == "part-mirrored" for w in gusset.geometry.warnings)
    drawn_lines = []
    line = plot._Picture.line

    def kept(self, ax, *args, **style):
        if style.get("color") == "0.6":  # the outline as drawn
            drawn_lines.append(np.asarray(args[0], dtype=float))
        return line(self, ax, *args, **style)

    monkeypatch.setattr(plot._Picture, "line", kept)
    plot.piece_plot(gusset, gusset.pieces[0], tmp_path / "gusset.png")
    ax = plot._FIGURES["geometry"].ax
    assert "outline as drawn, mirrored" in [t.get_text() for t in ax.get_legend().get_texts()]
    assert "mirrored" in ax.get_xlabel()
    (xs,) = drawn_lines
    drawn = np.asarray(gusset.geometry.section)
    assert np.sort(xs[:-1]) == pytest.approx(np.sort(-drawn[:, 0]))  # every drawn x, negated
    assert xs.max() <= 1e-9 < drawn[:, 0].max()
