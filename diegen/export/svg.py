"""SVG writer for flat-blank drawings, true scale.

The document's ``width`` and ``height`` are given in mm and its ``viewBox`` is
in mm too, so one user unit is one millimetre (SVG 1.1, section 7 "Coordinate
Systems, Transformations and Units").  The drawing's +Y points up: the content
sits in a group that mirrors Y.  The canvas is :meth:`BlankDrawing.extent`
(blank, scribe lines, notes and title block) plus :data:`SVG_MARGIN` on every
side.  Layers are ``<g>`` groups whose ids are the layer names; everything is
stroke-only.
"""

from __future__ import annotations

import os
from pathlib import Path
from xml.sax.saxutils import escape

from diegen.blank.drawing import CUT, DRILL, NOTE, SCRIBE, BlankDrawing, LayerStyle, Note, Polyline
from diegen.fileio import write_text

__all__ = ["STROKE_WIDTH", "SVG_MARGIN", "canvas", "fmt", "save_svg", "svg_document", "svg_text", "write_svg"]

SVG_MARGIN = 5.0
"""Blank border round the drawing's extent, mm."""

STROKE_WIDTH = 0.2
"""Stroke width of every line, mm."""


def fmt(value: float) -> str:
    """A length in mm as SVG text: fixed 6 decimals (1 nm), trailing zeros dropped."""
    text = f"{value:.6f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def canvas(drawing: BlankDrawing) -> tuple[float, float, float, float]:
    """(xmin, ymin, width, height) of the SVG canvas in drawing mm (+Y up)."""
    return _canvas(drawing.extent())


def _canvas(extent: tuple[float, float, float, float]) -> tuple[float, float, float, float]:
    xmin, ymin, xmax, ymax = extent
    return (xmin - SVG_MARGIN, ymin - SVG_MARGIN, xmax - xmin + 2 * SVG_MARGIN, ymax - ymin + 2 * SVG_MARGIN)


def svg_document(extent: tuple[float, float, float, float], title: str, desc: str, body: list[str]) -> str:
    """A true-scale SVG (mm, +Y up) of the drawing ``body`` (its elements' lines) covering ``extent`` (xmin, ymin,
    xmax, ymax) with a margin; ``title`` and ``desc`` are plain text."""
    x0, y0, w, h = _canvas(extent)
    lines = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        '<svg xmlns="http://www.w3.org/2000/svg" version="1.1" '
        f'width="{fmt(w)}mm" height="{fmt(h)}mm" viewBox="{fmt(x0)} {fmt(-(y0 + h))} {fmt(w)} {fmt(h)}">',
        f"<title>{escape(title)}</title>",
        f"<desc>{escape(desc)}</desc>",
        f'<g id="drawing" transform="scale(1,-1)" stroke-width="{fmt(STROKE_WIDTH)}" '
        'stroke-linejoin="round" stroke-linecap="round">',
        *("  " + line for line in body),
        "</g>",
        "</svg>",
        "",
    ]
    return "\n".join(lines)


def save_svg(text: str, path: str | os.PathLike[str]) -> Path:
    """Write the SVG ``text`` to ``path`` atomically; return the path (:class:`OutputError` when it cannot)."""
    target = Path(path)
    write_text(target, text)  # an OutputError naming the file when it cannot
    return target


def _points_attr(points: Polyline) -> str:
    return " ".join(f"{fmt(x)},{fmt(y)}" for x, y in points)


def _group(style: LayerStyle, body: list[str], extra: str = "") -> list[str]:
    head = f'<g id="{style.name}" stroke="{style.rgb}" fill="none"{extra}>'
    return [head, *("  " + line for line in body), "</g>"]


def _text(n: Note, colour: str) -> str:
    # the enclosing group mirrors Y; mirror the text back so it reads upright
    size = n.height / 0.72  # font size from cap height (cap ≈ 0.72 em for common sans fonts; estimate)
    return (
        f'<text transform="translate({fmt(n.x)},{fmt(n.y)}) scale(1,-1)" font-size="{fmt(size)}" '
        f'font-family="sans-serif" fill="{colour}" stroke="none">{escape(n.text)}</text>'
    )


def svg_text(drawing: BlankDrawing) -> str:
    """The SVG document for ``drawing`` as a string."""
    cut: list[str] = [f'<polygon points="{_points_attr(drawing.outer)}"/>']
    cut += [f'<polygon points="{_points_attr(c)}"/>' for c in drawing.inner]
    cut += [f'<circle cx="{fmt(c.x)}" cy="{fmt(c.y)}" r="{fmt(c.r)}"/>' for c in drawing.cut_circles]
    drill = [f'<circle cx="{fmt(c.x)}" cy="{fmt(c.y)}" r="{fmt(c.r)}"/>' for c in drawing.drill_circles]
    scribe = [f'<polyline points="{_points_attr(line)}"/>' for line in drawing.scribe_lines]
    title = drawing.title_block()
    note = [f'<line x1="{fmt(s.x0)}" y1="{fmt(s.y0)}" x2="{fmt(s.x1)}" y2="{fmt(s.y1)}"/>' for s in title.arrow]
    note += [_text(n, NOTE.rgb) for n in drawing.notes + title.notes]

    body: list[str] = []
    body += _group(CUT, cut)
    body += _group(DRILL, drill)
    body += _group(SCRIBE, scribe, ' stroke-dasharray="6 3"')
    body += _group(NOTE, note)
    return svg_document(drawing.extent(), f"{drawing.part_id} flat blank, 1:1 in mm",
                        f"{drawing.material}; grain {drawing.grain_angle_deg:g} deg from +X; layers CUT, DRILL, "
                        "SCRIBE, NOTE", body)


def write_svg(drawing: BlankDrawing, path: str | os.PathLike[str]) -> Path:
    """Write ``drawing`` as a true-scale SVG (mm) to ``path`` atomically; return the path."""
    return save_svg(svg_text(drawing), path)
