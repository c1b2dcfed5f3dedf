"""Charts on a page of our small PDF writer (:mod:`diegen.export.pdfdoc`): a framed plot area showing data between
limits, with ticks, grid, lines (clipped to the frame), data-placed text, a title, axis labels and a legend.

Page coordinates are points (1/72 in) from the page's lower-left corner; data coordinates are whatever the caller
plots (mm, strain).  Vector paths throughout: the page is drawn in a few milliseconds, where a figure of the
plotting library took about a tenth of a second.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from diegen.export.pdfdoc import Canvas, text_width
from diegen.export.ticks import tick_label, tick_values

FONT_PT = 7.0
GRID = "#b0b0b0"
# the qualitative palette of ten colours used for the PNG pictures too
PALETTE = ("#1f77b4", "#ff7f0e", "#2ca02c", "#d62728", "#9467bd", "#8c564b", "#e377c2", "#7f7f7f", "#bcbd22",
           "#17becf")
BLUE, GREEN, RED = PALETTE[0], PALETTE[2], PALETTE[3]


@dataclass(frozen=True)
class Stroke:
    """How a line is drawn: colour (``#rrggbb`` or a grey level), width (pt), dash lengths (pt; () solid)."""

    colour: str | float = 0.0
    width: float = 1.0
    dash: tuple[float, ...] = ()


class Chart:
    """A plot area of ``box`` = (x, y, width, height) pt on ``canvas``, showing ``xlim`` × ``ylim``.

    ``equal``: one scale in x and y, the limits widened about their centre to fill the box; ``y_down``: y grows
    downwards (a planform drawn root at the top).
    """

    def __init__(self, canvas: Canvas, box: tuple[float, float, float, float], xlim: tuple[float, float],
                 ylim: tuple[float, float], equal: bool = False, y_down: bool = False) -> None:
        self.canvas, self.box, self.y_down = canvas, box, y_down
        xlim, ylim = _padded(xlim), _padded(ylim)
        if equal:
            scale = min(box[2] / (xlim[1] - xlim[0]), box[3] / (ylim[1] - ylim[0]))
            mx, my = sum(xlim) / 2, sum(ylim) / 2
            xlim = (mx - box[2] / scale / 2, mx + box[2] / scale / 2)
            ylim = (my - box[3] / scale / 2, my + box[3] / scale / 2)
        self.xlim, self.ylim = xlim, ylim

    def page(self, x: Sequence[float] | np.ndarray, y: Sequence[float] | np.ndarray) -> np.ndarray:
        """Data points as page points (n, 2)."""
        bx, by, bw, bh = self.box
        px = bx + (np.asarray(x, dtype=float) - self.xlim[0]) / (self.xlim[1] - self.xlim[0]) * bw
        fy = (np.asarray(y, dtype=float) - self.ylim[0]) / (self.ylim[1] - self.ylim[0])
        py = by + (1.0 - fy if self.y_down else fy) * bh
        return np.column_stack([np.atleast_1d(px), np.atleast_1d(py)])

    def lines(self, lines: Sequence[tuple[Sequence[float] | np.ndarray, Sequence[float] | np.ndarray]],
              stroke: Stroke) -> None:
        """Stroke each (xs, ys) polyline, clipped to the frame."""
        c = self.canvas
        c.save()
        c.clip_rect(*self.box)
        c.style(width=stroke.width, colour=stroke.colour, cap=0, join=1, dash=stroke.dash)
        c.polylines([[(float(px), float(py)) for px, py in self.page(xs, ys)] for xs, ys in lines])
        c.restore()

    def line(self, x: Sequence[float] | np.ndarray, y: Sequence[float] | np.ndarray, stroke: Stroke) -> None:
        self.lines([(x, y)], stroke)

    def hline(self, y: float, stroke: Stroke) -> None:
        """A line across the whole frame at data ``y``."""
        self.line(self.xlim, (y, y), stroke)

    def text(self, x: float, y: float, text: str, size: float = FONT_PT, **placing: str) -> None:
        """``text`` at the data point (x, y); ``placing``: ``ha``/``va`` as :meth:`Canvas.text` takes them."""
        (px, py), = self.page([x], [y])
        self.canvas.text(float(px), float(py), text, size, **placing)

    def frame(self, xlabel: str = "", ylabel: str = "", title: str = "", grid: bool = True) -> None:
        """Frame, ticks with their labels, grid lines at the ticks, axis labels and title."""
        c, (bx, by, bw, bh) = self.canvas, self.box
        xs, x_step = tick_values(*sorted(self.xlim), min(9, math.floor(bw / (3 * FONT_PT * 1.5))))
        ys, y_step = tick_values(*sorted(self.ylim), min(9, math.floor(bh / (2 * FONT_PT * 1.5))))
        xs_page = self.page(xs, [self.ylim[0]] * len(xs))[:, 0]
        ys_page = self.page([self.xlim[0]] * len(ys), ys)[:, 1]
        if grid:
            c.style(width=0.3, colour=GRID, dash=())
            c.polylines([[(x, by), (x, by + bh)] for x in xs_page] + [[(bx, y), (bx + bw, y)] for y in ys_page])
        c.style(width=0.8, colour=0.0, dash=())
        c.rect(bx, by, bw, bh)
        c.polylines([[(x, by), (x, by - 3.5)] for x in xs_page] + [[(bx, y), (bx - 3.5, y)] for y in ys_page])
        for value, x in zip(xs, xs_page, strict=True):
            c.text(x, by - 5.0, tick_label(value, x_step), FONT_PT, ha="center", va="top")
        width = 0.0
        for value, y in zip(ys, ys_page, strict=True):
            label = tick_label(value, y_step)
            width = max(width, _label_width(label))
            c.text(bx - 5.0, y, label, FONT_PT, ha="right", va="center")
        if xlabel:
            c.text(bx + bw / 2, by - 8.0 - 2.2 * FONT_PT, xlabel, FONT_PT + 1, ha="center", va="top")
        if ylabel:
            c.text(bx - 9.0 - width, by + bh / 2, ylabel, FONT_PT + 1, angle=90.0, ha="center", va="bottom")
        if title:
            c.text(bx + bw / 2, by + bh + 6.0, title, FONT_PT + 2, ha="center", va="baseline")

    def legend(self, entries: Sequence[tuple[Stroke, str]]) -> None:
        """A framed legend in the frame's upper-right corner: a short line of each stroke and its label."""
        if not entries:
            return
        c, (bx, by, bw, bh) = self.canvas, self.box
        row, sample, pad = FONT_PT * 1.6, 18.0, 4.0
        width = pad * 3 + sample + max(_label_width(label) for _, label in entries)
        height = pad * 2 + row * len(entries)
        x0, y0 = bx + bw - width - 4.0, by + bh - height - 4.0
        c.fill_colour(1.0)
        c.raw(f"{x0:.2f} {y0:.2f} {width:.2f} {height:.2f} re f\n")
        c.style(width=0.5, colour=0.6, dash=())
        c.rect(x0, y0, width, height)
        for k, (stroke, label) in enumerate(entries):
            y = y0 + height - pad - row * (k + 0.5)
            c.style(width=stroke.width, colour=stroke.colour, dash=stroke.dash)
            c.polyline([(x0 + pad, y), (x0 + pad + sample, y)])
            c.text(x0 + 2 * pad + sample, y, label, FONT_PT, va="center")


def _label_width(text: str) -> float:
    """Width (pt) of ``text`` at the charts' font size."""
    return text_width(text, FONT_PT)


def _padded(limits: tuple[float, float], margin: float = 0.05) -> tuple[float, float]:
    """``limits`` widened by ``margin`` of their span each side (a span of nothing opened to ±1 or ±5 %)."""
    low, high = float(min(limits)), float(max(limits))
    span = high - low
    if not span > 0:
        span = abs(low) * 0.1 or 2.0
        low, high = low - span / 2, high + span / 2
    return low - margin * span, high + margin * span


__all__ = ["BLUE", "FONT_PT", "GREEN", "PALETTE", "RED", "Chart", "Stroke"]
