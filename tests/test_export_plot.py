"""The PNG plots of a piece (``diegen.export.plot``): read back with matplotlib's image reader.

A sane picture: the size the figure asks for (inches × dots per inch), a white
background with drawing on a fair share of it, the colours of what it shows, and
the tooling pins where they belong relative to each other, on equal axes
(pixel blobs found with ``scipy.ndimage.label``).  Colours are matplotlib's
named "tab:" palette.
"""

from __future__ import annotations

import itertools
from pathlib import Path

import matplotlib
import numpy as np
import pytest
from matplotlib import colors
from matplotlib.image import imread
from scipy import ndimage

from diegen.export.plot import piece_plot, preview_plot

DPI = 110  # the plots' resolution (dots per inch), as diegen.export.plot asks for it
COLOUR_TOL = 0.08  # per channel, 0..1: anti-aliased edges stray from the pure colour


def mask(image: np.ndarray, colour: str) -> np.ndarray:
    rgb = np.asarray(colors.to_rgb(colour))
    return np.all(np.abs(image[..., :3] - rgb) < COLOUR_TOL, axis=-1)


def drawn_fraction(image: np.ndarray) -> float:
    """Share of pixels that are not the white background."""
    return float(np.mean(np.any(image[..., :3] < 0.95, axis=-1)))


def blobs(m: np.ndarray, min_pixels: int = 12) -> list[tuple[float, float, int]]:
    """Centres (column, row) and sizes of the connected groups of pixels of a mask."""
    labels, count = ndimage.label(m)
    found = []
    for index in range(1, count + 1):
        rows, cols = np.nonzero(labels == index)
        if len(rows) >= min_pixels:
            found.append((float(cols.mean()), float(rows.mean()), len(rows)))
    return found


@pytest.fixture(scope="module")
def rib(spec):
    from diegen import api

    return api.analyse(spec)


@pytest.fixture(scope="module")
def pictures(rib, tmp_path_factory) -> dict[str, tuple[Path, np.ndarray]]:
    folder = tmp_path_factory.mktemp("plots")
    center, nose = rib.pieces[1], rib.pieces[0]
    piece_path = piece_plot(rib, center, folder / "sub" / "center-geometry.png")
    preview_path = preview_plot(rib, nose, folder / "nose-preview.png")
    return {"piece": (piece_path, imread(piece_path)), "preview": (preview_path, imread(preview_path))}


@pytest.mark.parametrize(("which", "inches"), [("piece", (11.0, 5.2)), ("preview", (11.0, 7.5))])
def test_png_size(pictures, which: str, inches: tuple[float, float]) -> None:
    path, image = pictures[which]
    assert path.is_file() and path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # the PNG signature (RFC 2083)
    assert image.shape[:2] == (round(inches[1] * DPI), round(inches[0] * DPI))
    assert image.shape[2] == 3 or image[..., 3].min() == 1.0  # RGB, or RGBA and opaque
    assert not list(path.parent.glob("*.tmp*")), "no temporary file left behind"


@pytest.mark.parametrize("which", ["piece", "preview"])
def test_background_and_drawing(pictures, which: str) -> None:
    _, image = pictures[which]
    assert np.all(image[0, :, :3] == 1.0) and np.all(image[:, 0, :3] == 1.0)  # white margins
    assert 0.03 < drawn_fraction(image) < 0.6


def test_piece_plot_colours(pictures) -> None:
    _, image = pictures["piece"]
    for colour, what in (("black", "die outline"), ("tab:green", "flat blank"), ("tab:purple", "lightening holes"),
                         ("tab:red", "tooling pins"), ("tab:blue", "outer mold line")):
        assert mask(image, colour).sum() > 50, what


def test_pins_drawn_in_place_on_equal_axes(pictures, rib) -> None:
    """One red blob per pin plus the legend's marker; dropping the legend's, the pins' pixel centres are their
    positions under one scale in x and y (equal axes, y up)."""
    _, image = pictures["piece"]
    pins = rib.pieces[1].piece.pins
    assert len(pins) >= 3
    found = blobs(mask(image, "tab:red"))
    assert len(found) == len(pins) + 1
    data = np.array([(q.x, q.y) for q in pins])

    def fits(candidate: tuple) -> bool:
        px = np.array([(c, -r) for c, r, _ in sorted(candidate)])  # rows grow downwards
        order = np.argsort(data[:, 0])
        d = data[order]
        scale_x = (px[-1, 0] - px[0, 0]) / (d[-1, 0] - d[0, 0])
        predicted = px[0] + (d - d[0]) * scale_x  # the same scale in y: equal axes
        return bool(np.all(np.abs(predicted - px) < 2.0))  # pixels

    assert any(fits(c) for c in itertools.combinations(found, len(pins)))


def test_preview_colours_by_strain(pictures, rib) -> None:
    """The nose's flange is coloured by the "inferno_r" map up to its worst strain: the dark end of the map shows
    (the leading edge passes twice the shrink limit), the flute marks too."""
    _, image = pictures["preview"]
    nose = rib.pieces[0]
    assert nose.max_shrink > 2 * nose.alloy.shrink_limit
    dark = np.asarray(matplotlib.colormaps["inferno_r"](0.95)[:3])
    near = np.all(np.abs(image[..., :3] - dark) < COLOUR_TOL, axis=-1)
    assert near.sum() > 30
    assert mask(image, "tab:cyan").sum() > 10 * len(nose.flutes)
    assert mask(image, "tab:green").sum() > 200


def test_plot_of_a_piece_without_pins_or_holes(rib, tmp_path) -> None:
    """Degenerate content still gives a picture: the tail without its pins and holes."""
    from dataclasses import replace

    tail = rib.pieces[2]
    bare = replace(tail, piece=replace(tail.piece, pins=(), holes=()))
    image = imread(piece_plot(rib, bare, tmp_path / "bare.png"))
    assert mask(image, "tab:red").sum() < 120  # only the legend's marker
    assert mask(image, "black").sum() > 200
