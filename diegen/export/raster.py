"""A small chart canvas of our own for PNG pictures: axes with ticks, grid and labels, lines (solid, dashed,
dotted), markers, circles, coloured segments, a colour bar and a legend, drawn with Pillow onto an RGB image.

Why not the plotting library: in a new process, importing it and drawing a first figure cost about 0.35 s, and
each further picture about 80 ms (the demo rib's previews); this canvas needs Pillow only and draws a preview in
a few tens of milliseconds.  The data inside each axes is drawn on a layer :data:`SUPERSAMPLE` times larger and
reduced (each pixel the mean of a square of them), which smooths the edges of lines and circles; text, frames and
ticks are drawn at the picture's own size (the font renderer smooths letters itself; frames and ticks run along
the pixel grid).

Sizes follow the printing convention: line widths, marker and font sizes are in points (1/72 in), turned into
pixels at the picture's dots per inch.  Colours are 8-bit RGB triples.  Axes are placed by their rectangle in
figure fractions (left, bottom, width, height), as in the plotting library, so a picture keeps its layout; each
axes draws its data on a layer of its own size, which clips everything outside its limits.
"""

from __future__ import annotations

import importlib.util
import math
from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import numpy as np
from PIL import Image, ImageDraw, ImageFont

from diegen.export.ticks import tick_label, tick_values

Colour = tuple[int, int, int]

SUPERSAMPLE = 3
"""Layer pixels per picture pixel along each side, inside the axes: line widths come in steps of a third of a
pixel, so a 0.8-point outline (1.2 pixels at 110 dpi) covers a 0.6-point one drawn beneath it, which at 2 it did
not (both came out one pixel wide)."""

WHITE: Colour = (255, 255, 255)
BLACK: Colour = (0, 0, 0)


def hex_colour(code: str) -> Colour:
    """``"#rrggbb"`` as an RGB triple."""
    return (int(code[1:3], 16), int(code[3:5], 16), int(code[5:7], 16))


def grey(level: float) -> Colour:
    """A grey of ``level`` (0 black … 1 white)."""
    value = round(255 * level)
    return (value, value, value)


TAB10 = tuple(hex_colour(c) for c in ("#1f77b4", "#ff7f0e", "#2ca02c", "#d62728", "#9467bd", "#8c564b", "#e377c2",
                                      "#7f7f7f", "#bcbd22", "#17becf"))
"""The ten-colour cycle ("tab10") of the plotting library's default style, which the other pictures use: keeping
it makes a preview read like them.  ``tests/test_export_raster.py`` holds it to the library's table."""

TAB = dict(zip(("blue", "orange", "green", "red", "purple", "brown", "pink", "gray", "olive", "cyan"), TAB10))
"""The same colours by their names in that palette (``TAB["green"]`` is the library's "tab:green")."""

GRID: Colour = hex_colour("#b0b0b0")
FRAME_PT = 0.8
TICK_PT = 3.5
TICK_PAD_PT = 3.5
LABEL_PAD_PT = 4.0
TITLE_PAD_PT = 6.0
FONT_PT = 10.0
"""Frame line width, tick length, gaps and the font size of ticks and axis labels (points): the plotting library's
defaults, so the pictures look alike."""

_INFERNO = np.array([
    [0, 0, 4], [4, 3, 18], [11, 7, 36], [21, 11, 55], [33, 12, 74], [47, 10, 91], [61, 9, 101], [74, 12, 107],
    [87, 16, 110], [100, 21, 110], [113, 25, 110], [125, 30, 109], [138, 34, 106], [151, 39, 102], [163, 44, 97],
    [176, 49, 91], [188, 55, 84], [199, 62, 76], [210, 70, 68], [219, 80, 59], [228, 90, 49], [235, 102, 40],
    [241, 115, 29], [246, 128, 19], [249, 142, 9], [251, 157, 7], [252, 172, 17], [251, 188, 33], [249, 203, 53],
    [245, 219, 76], [242, 234, 105], [243, 246, 138], [252, 255, 164]], dtype=float)
"""The "inferno" colour map (dark purple-black to pale yellow, perceptually uniform) at 33 even steps, 8-bit:
the plotting library's table sampled; interpolated linearly between steps it stays within 5/255 of the library's
256 entries (``tests/test_export_raster.py`` checks it)."""


def inferno_r(values: np.ndarray) -> np.ndarray:
    """Colours of ``values`` in 0…1 on the reversed "inferno" map (0 pale yellow, 1 black), as uint8 rows (n, 3)."""
    t = 1.0 - np.clip(np.asarray(values, dtype=float), 0.0, 1.0)
    steps = np.linspace(0.0, 1.0, len(_INFERNO))
    channels = [np.interp(t, steps, _INFERNO[:, k]) for k in range(3)]
    return np.rint(np.stack(channels, axis=-1)).astype(np.uint8)


# ------------------------------------------------------------------------------------------------------ text
@lru_cache(maxsize=1)
def _font_file() -> str | None:
    """DejaVu Sans as the plotting library ships it (found without importing the library), or None."""
    spec = importlib.util.find_spec("matplotlib")
    for folder in (spec.submodule_search_locations or []) if spec else []:
        candidate = Path(folder) / "mpl-data" / "fonts" / "ttf" / "DejaVuSans.ttf"
        if candidate.is_file():
            return str(candidate)
    return None


@lru_cache(maxsize=16)
def _font(size_px: int) -> ImageFont.FreeTypeFont | ImageFont.ImageFont:
    path = _font_file()
    return ImageFont.truetype(path, size_px) if path else ImageFont.load_default(size_px)


def _text(s: str) -> str:
    """``s`` in the glyphs the font has: Pillow's own font lacks the minus sign (U+2212)."""
    return s if _font_file() else s.replace("−", "-")


# ------------------------------------------------------------------------------------------------ the canvas
class Canvas:
    """A white RGB picture of ``width_in`` × ``height_in`` inches at ``dpi``."""

    def __init__(self, width_in: float, height_in: float, dpi: float) -> None:
        self.dpi = dpi
        self.size = (round(width_in * dpi), round(height_in * dpi))
        self.image = Image.new("RGB", self.size, WHITE)
        self.draw = ImageDraw.Draw(self.image)

    def px(self, points: float, supersample: int = 1) -> float:
        """``points`` (1/72 in) in pixels of the picture, or of a layer drawn ``supersample`` times larger."""
        return points * self.dpi / 72.0 * supersample

    def width(self, points: float, supersample: int = 1) -> int:
        """A line width of ``points`` in whole pixels (of a layer ``supersample`` times larger), at least one."""
        return max(1, round(self.px(points, supersample)))

    def font(self, size_pt: float, supersample: int = 1) -> ImageFont.FreeTypeFont | ImageFont.ImageFont:
        return _font(max(1, round(self.px(size_pt, supersample))))

    def text(self, xy: tuple[float, float], s: str, size_pt: float = FONT_PT, anchor: str = "mm",
             colour: Colour = BLACK) -> tuple[float, ...]:
        """Write ``s`` at ``xy`` (pixels) placed by Pillow's two-letter ``anchor``; return the box it fills."""
        font = self.font(size_pt)
        self.draw.text(xy, _text(s), fill=colour, font=font, anchor=anchor)
        return self.draw.textbbox(xy, _text(s), font=font, anchor=anchor)

    def upright_text(self, xy: tuple[float, float], s: str, size_pt: float = FONT_PT, side: str = "right",
                     colour: Colour = BLACK) -> None:
        """Write ``s`` turned a quarter turn (read from bottom to top), centred on ``xy[1]``, with its ``side``
        ("left" or "right") on ``xy[0]``."""
        font = self.font(size_pt)
        left, top, right, bottom = font.getbbox(_text(s), anchor="ls")
        mask = Image.new("L", (math.ceil(right - left) + 2, math.ceil(bottom - top) + 2), 0)
        ImageDraw.Draw(mask).text((1 - left, 1 - top), _text(s), fill=255, font=font, anchor="ls")
        mask = mask.transpose(Image.Transpose.ROTATE_90)
        x = xy[0] - mask.width if side == "right" else xy[0]
        self.image.paste(colour, (round(x), round(xy[1] - mask.height / 2)), mask)

    def axes(self, rect: tuple[float, float, float, float]) -> Axes:
        """Axes in ``rect`` = (left, bottom, width, height), fractions of the figure measured from its lower left."""
        left, bottom, width, height = rect
        w, h = self.size
        return Axes(self, (left * w, (1 - bottom - height) * h, (left + width) * w, (1 - bottom) * h))


@dataclass(frozen=True)
class Line:
    """How a line is drawn: colour, width (points) and style: "-" solid, "--" dashed, ":" dotted."""

    colour: Colour
    width_pt: float = 1.0
    style: str = "-"


DASHES = {"--": (3.7, 1.6), ":": (1.0, 1.65)}
"""Dash and gap lengths of each line style, in line widths (the plotting library's defaults)."""


def dash_pieces(points: np.ndarray, on: float, off: float) -> list[np.ndarray]:
    """The dashes of a polyline (pixel coordinates): ``on`` drawn, ``off`` left out, along its length."""
    s = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(points, axis=0).T))])
    starts = np.arange(0.0, s[-1], on + off)
    ends = np.minimum(starts + on, s[-1])
    first = np.column_stack([np.interp(starts, s, points[:, 0]), np.interp(starts, s, points[:, 1])])
    last = np.column_stack([np.interp(ends, s, points[:, 0]), np.interp(ends, s, points[:, 1])])
    inner_from, inner_to = np.searchsorted(s, starts, "right"), np.searchsorted(s, ends, "left")
    return [np.vstack([first[k:k + 1], points[i:j], last[k:k + 1]]) if j > i else np.vstack([first[k], last[k]])
            for k, (i, j) in enumerate(zip(inner_from.tolist(), inner_to.tolist()))]


class Axes:
    """A rectangle of the canvas showing data between limits, drawn on a layer :data:`SUPERSAMPLE` times larger;
    ``finish`` puts the layer on the canvas, frames it and writes ticks and labels."""

    def __init__(self, canvas: Canvas, box: tuple[float, float, float, float]) -> None:
        self.canvas = canvas
        self.box = (round(box[0]), round(box[1]), round(box[2]), round(box[3]))
        self.xlim, self.ylim = (0.0, 1.0), (0.0, 1.0)
        self._layer: Image.Image | None = None

    @property
    def layer(self) -> Image.Image:
        """The supersampled drawing layer of the box as it stands, made on first use (a picture sets its limits
        before it draws, and each layer of the preview's largest axes is some ten megabytes to fill)."""
        if self._layer is None:
            x0, y0, x1, y1 = self.box
            self._layer = Image.new("RGB", ((x1 - x0) * SUPERSAMPLE, (y1 - y0) * SUPERSAMPLE), WHITE)
            self._draw = ImageDraw.Draw(self._layer)
        return self._layer

    @property
    def draw(self) -> ImageDraw.ImageDraw:
        self.layer  # noqa: B018 - made with the layer
        return self._draw

    # -- limits, scale
    def limits(self, xlim: tuple[float, float], ylim: tuple[float, float], equal: bool = False) -> None:
        """Show ``xlim`` × ``ylim``; ``equal``: one scale in x and y, the box shrunk about its centre to fit and the
        limits then widened about their centre to fill the box's whole pixels."""
        x0, y0, x1, y1 = self.box
        if equal:
            dx, dy = xlim[1] - xlim[0], ylim[1] - ylim[0]
            scale = min((x1 - x0) / dx, (y1 - y0) / dy)
            w, h = round(scale * dx), round(scale * dy)
            x0, y0 = round((x0 + x1 - w) / 2), round((y0 + y1 - h) / 2)
            x1, y1 = x0 + w, y0 + h
            mx, my = (xlim[0] + xlim[1]) / 2, (ylim[0] + ylim[1]) / 2
            xlim, ylim = (mx - w / scale / 2, mx + w / scale / 2), (my - h / scale / 2, my + h / scale / 2)
        self.box = (x0, y0, x1, y1)
        self.xlim, self.ylim = (float(xlim[0]), float(xlim[1])), (float(ylim[0]), float(ylim[1]))
        self._layer = None  # anything drawn before is dropped with the old limits

    def to_pixels(self, x: Sequence[float] | np.ndarray, y: Sequence[float] | np.ndarray) -> np.ndarray:
        """Data points as layer pixel coordinates (n, 2), y growing downwards."""
        w, h = self.layer.size
        px = (np.asarray(x, dtype=float) - self.xlim[0]) / (self.xlim[1] - self.xlim[0]) * w
        py = (self.ylim[1] - np.asarray(y, dtype=float)) / (self.ylim[1] - self.ylim[0]) * h
        return np.column_stack([np.atleast_1d(px), np.atleast_1d(py)])

    def _px(self, points: float) -> float:
        return self.canvas.px(points, SUPERSAMPLE)

    def _width(self, points: float) -> int:
        return self.canvas.width(points, SUPERSAMPLE)

    def ticks(self, axis: str) -> tuple[list[float], float]:
        """Tick values of ``axis`` ("x" or "y") and their step, as many as the axis has room for: one per three
        font heights along x, per two along y (the plotting library's rule), nine at most."""
        x0, y0, x1, y1 = self.box
        if axis == "x":
            return tick_values(*self.xlim, min(9, math.floor((x1 - x0) / self.canvas.px(3 * FONT_PT))))
        return tick_values(*self.ylim, min(9, math.floor((y1 - y0) / self.canvas.px(2 * FONT_PT))))

    # -- drawing on the layer
    def grid(self) -> None:
        """Thin grey lines at the ticks of both axes."""
        style = Line(GRID, 0.3)
        for value in self.ticks("x")[0]:
            self.line([value, value], self.ylim, style)
        for value in self.ticks("y")[0]:
            self.line(self.xlim, [value, value], style)

    def polyline(self, pixels: np.ndarray, style: Line) -> None:
        """A polyline given in layer pixels."""
        width = self._width(style.width_pt)
        if style.style in DASHES:
            on, off = (self._px(k * style.width_pt) for k in DASHES[style.style])
            pieces = dash_pieces(pixels, on, off)
        else:
            pieces = [pixels]
        for piece in pieces:
            if len(piece) >= 2:
                self.draw.line(piece.ravel().tolist(), fill=style.colour, width=width, joint="curve")

    def line(self, x: Sequence[float] | np.ndarray, y: Sequence[float] | np.ndarray, style: Line) -> None:
        self.polyline(self.to_pixels(x, y), style)

    def hline(self, y: float, style: Line) -> None:
        """A line across the whole axes at height ``y``."""
        self.line(self.xlim, [y, y], style)

    def segments(self, segments: np.ndarray, colours: np.ndarray, width_pt: float) -> None:
        """Straight segments (n, 2, 2) in data units, each in its own colour (n, 3); a chain of segments of one
        colour, each starting where the one before ends, is drawn as one line (a flange of even strain is one
        colour along most of its length)."""
        pixels = self.to_pixels(segments[:, :, 0].ravel(), segments[:, :, 1].ravel()).reshape(-1, 2, 2)
        width = self._width(width_pt)
        joined = np.all(segments[1:, 0] == segments[:-1, 1], axis=1) & np.all(colours[1:] == colours[:-1], axis=1)
        starts = np.flatnonzero(~np.concatenate([[False], joined]))
        for first, stop in zip(starts.tolist(), [*starts[1:].tolist(), len(segments)]):
            chain = np.vstack([pixels[first:stop, 0], pixels[stop - 1, 1]])
            self.draw.line(chain.ravel().tolist(), fill=tuple(colours[first].tolist()), width=width, joint="curve")

    def circles(self, circles: Sequence[tuple[float, float, float]], edge: Line | None = None,
                fill: Colour | None = None) -> None:
        """Circles (x, y, radius in data units): filled with ``fill``, outlined as ``edge`` says (the outline
        centred on the circle)."""
        per_unit = self.layer.size[0] / (self.xlim[1] - self.xlim[0])
        for x, y, r in circles:
            ((cx, cy),) = self.to_pixels([x], [y]).tolist()
            radius = r * per_unit
            if edge is not None and edge.style in DASHES:
                if fill is not None:
                    self.draw.ellipse((cx - radius, cy - radius, cx + radius, cy + radius), fill=fill)
                turn = np.linspace(0.0, 2 * math.pi, max(33, math.ceil(2 * math.pi * radius / 3)))
                self.polyline(np.column_stack([cx + radius * np.cos(turn), cy + radius * np.sin(turn)]), edge)
                continue
            outer = radius + (self._px(edge.width_pt) / 2 if edge is not None else 0.0)
            self.draw.ellipse((cx - outer, cy - outer, cx + outer, cy + outer), fill=fill,
                              outline=edge.colour if edge is not None else None,
                              width=self._width(edge.width_pt) if edge is not None else 0)

    def markers(self, x: Sequence[float] | np.ndarray, y: Sequence[float] | np.ndarray, marker: str, colour: Colour,
                size_pt: float) -> None:
        """Filled markers ``size_pt`` across with a one-point edge: "v" triangle pointing down, "^" up, "o" disc."""
        half = self._px(size_pt) / 2
        edge = self._width(1.0)
        for cx, cy in self.to_pixels(x, y).tolist():
            if marker == "o":
                self.draw.ellipse((cx - half, cy - half, cx + half, cy + half), fill=colour, outline=colour,
                                  width=edge)
                continue
            tip = 1.0 if marker == "v" else -1.0  # rows grow downwards
            corners = [(cx, cy + tip * half), (cx - half, cy - tip * half), (cx + half, cy - tip * half)]
            self.draw.polygon(corners, fill=colour, outline=colour, width=edge)

    def gradient(self, colours: np.ndarray) -> None:
        """Fill the layer with rows of ``colours`` (n, 3), the first at the bottom, stretched to its height."""
        w, h = self.layer.size
        rows = (np.arange(h)[::-1] + 0.5) / h * len(colours)
        column = colours[np.clip(rows.astype(int), 0, len(colours) - 1)]
        self.layer.paste(Image.fromarray(np.ascontiguousarray(np.repeat(column[:, None, :], w, axis=1))))

    def legend(self, entries: Sequence[tuple[Line, str]], size_pt: float) -> None:
        """A framed legend in the upper right corner: a stretch of each line and its label (font ``size_pt``)."""
        em = self._px(size_pt)
        font = self.canvas.font(size_pt, SUPERSAMPLE)
        boxes = [self.draw.textbbox((0, 0), _text(label), font=font, anchor="lm") for _, label in entries]
        row = max(b[3] - b[1] for b in boxes)
        pad, handle, gap, spacing, margin = 0.4 * em, 2.0 * em, 0.8 * em, 0.5 * em, 0.5 * em
        w = pad + handle + gap + max(b[2] - b[0] for b in boxes) + pad
        h = pad + len(entries) * row + (len(entries) - 1) * spacing + pad
        right, top = self.layer.size[0] - margin, margin
        self.draw.rectangle((right - w, top, right, top + h), fill=WHITE, outline=grey(0.8), width=self._width(1.0))
        for index, (style, label) in enumerate(entries):
            x, y = right - w + pad, top + pad + index * (row + spacing) + row / 2
            self.polyline(np.array([[x, y], [x + handle, y]]), style)
            self.draw.text((x + handle + gap, y), _text(label), fill=BLACK, font=font, anchor="lm")

    # -- the frame, ticks and labels, on the canvas
    def finish(self, xlabel: str | None = None, ylabel: str | None = None, title: str | None = None,
               title_pt: float = FONT_PT, xticks: bool = True, yticks_right: bool = False,
               ylabel_right: bool = False) -> None:
        """Put the layer on the canvas, frame it, and write ticks, tick labels, axis labels and the title."""
        canvas = self.canvas
        x0, y0, x1, y1 = self.box
        canvas.image.paste(self.layer.reduce(SUPERSAMPLE) if SUPERSAMPLE > 1 else self.layer, (x0, y0))
        frame = canvas.width(FRAME_PT)
        canvas.draw.rectangle((x0 - frame, y0 - frame, x1 + frame - 1, y1 + frame - 1), outline=BLACK, width=frame)
        tick, pad, scale = canvas.px(TICK_PT), canvas.px(TICK_PAD_PT), self.layer.size[0] / (x1 - x0)
        label_bottom = y1 + tick
        if xticks:
            values, step = self.ticks("x")
            for value, (px, _) in zip(values, self.to_pixels(values, [self.ylim[0]] * len(values)).tolist()):
                x = round(x0 + px / scale)
                canvas.draw.line((x, y1, x, y1 + tick), fill=BLACK, width=frame)
                box = canvas.text((x, y1 + tick + pad), tick_label(value, step), anchor="mt")
                label_bottom = max(label_bottom, box[3])
        values, step = self.ticks("y")
        label_side = x1 + tick if yticks_right else x0 - tick
        for value, (_, py) in zip(values, self.to_pixels([self.xlim[0]] * len(values), values).tolist()):
            y = round(y0 + py / scale)
            if yticks_right:
                canvas.draw.line((x1, y, x1 + tick, y), fill=BLACK, width=frame)
                label_side = max(label_side, canvas.text((x1 + tick + pad, y), tick_label(value, step),
                                                         anchor="lm")[2])
            else:
                canvas.draw.line((x0 - tick, y, x0, y), fill=BLACK, width=frame)
                label_side = min(label_side, canvas.text((x0 - tick - pad, y), tick_label(value, step),
                                                         anchor="rm")[0])
        gap = canvas.px(LABEL_PAD_PT)
        if xlabel:
            canvas.text(((x0 + x1) / 2, label_bottom + gap), xlabel, anchor="mt")
        if ylabel:
            side = "left" if ylabel_right else "right"
            canvas.upright_text((label_side + gap if ylabel_right else label_side - gap, (y0 + y1) / 2), ylabel,
                                side=side)
        if title:
            canvas.text(((x0 + x1) / 2, y0 - canvas.px(TITLE_PAD_PT)), title, size_pt=title_pt, anchor="ms")


__all__ = ["BLACK", "DASHES", "SUPERSAMPLE", "TAB", "TAB10", "WHITE", "Axes", "Canvas", "Colour", "Line", "dash_pieces",
           "grey", "hex_colour", "inferno_r", "tick_label", "tick_values"]
