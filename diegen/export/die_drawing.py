"""Writers of the die drawing (:class:`diegen.die.drawing.DieDrawing`): DXF and SVG, in mm.

DXF: R2010 with ``$INSUNITS`` = 4 (millimetres) and ``$MEASUREMENT`` = 1
(metric), header variables as defined in the DXF Reference, HEADER section;
one layer per drawing layer with its purpose as the layer description;
closed outlines as closed LWPOLYLINEs, open stretches as open ones, holes as
CIRCLEs, notes as TEXT.  SVG: one user unit is one millimetre (``width`` and
``height`` in mm, ``viewBox`` in mm; SVG 1.1 section 7), +Y up through a
mirrored group, one ``<g>`` per layer whose id is the layer's name.  Neither
writer computes geometry.
"""

from __future__ import annotations

import os
from pathlib import Path
from xml.sax.saxutils import escape

from diegen.die.drawing import DieDrawing
from diegen.export.dxf import add_polyline, fit_view, new_document, save_dxf
from diegen.export.svg import fmt, save_svg, svg_document


def build_die_dxf(drawing: DieDrawing):  # -> ezdxf.document.Drawing (untyped so ezdxf loads lazily)
    """The in-memory ezdxf document of ``drawing`` (mm)."""
    doc = new_document(drawing.layers)
    msp = doc.modelspace()
    for line in drawing.polylines:
        add_polyline(msp, line.points, line.closed, line.layer)
    for c in drawing.circles:
        msp.add_circle((c.x, c.y), c.d / 2.0, dxfattribs={"layer": c.layer})
    for t in drawing.texts:
        msp.add_text(t.text, height=t.height, dxfattribs={"layer": t.layer}).set_placement((t.x, t.y))
    fit_view(doc, drawing.extent())
    return doc


def write_die_dxf(drawing: DieDrawing, path: str | os.PathLike[str]) -> Path:
    """Write ``drawing`` as a DXF in mm to ``path`` atomically; return the path."""
    return save_dxf(build_die_dxf(drawing), path)


def die_svg_text(drawing: DieDrawing) -> str:
    """The SVG document of ``drawing`` as a string."""
    body: list[str] = []
    for style in drawing.layers:
        items = []
        for line in (p for p in drawing.polylines if p.layer == style.name):
            points = " ".join(f"{fmt(x)},{fmt(y)}" for x, y in line.points)
            items.append(f'<{"polygon" if line.closed else "polyline"} points="{points}"/>')
        items += [f'<circle cx="{fmt(c.x)}" cy="{fmt(c.y)}" r="{fmt(c.d / 2.0)}"/>'
                  for c in drawing.circles if c.layer == style.name]
        for t in (t for t in drawing.texts if t.layer == style.name):
            size = t.height / 0.72  # font size from cap height (cap ≈ 0.72 em for common sans fonts; estimate)
            items.append(f'<text transform="translate({fmt(t.x)},{fmt(t.y)}) scale(1,-1)" font-size="{fmt(size)}" '
                         f'font-family="sans-serif" fill="{style.rgb}" stroke="none">{escape(t.text)}</text>')
        if items:
            body += [f'<g id="{style.name}" stroke="{style.rgb}" fill="none">', *("  " + i for i in items), "</g>"]
    names = ", ".join(style.name for style in drawing.layers)
    return svg_document(drawing.extent(), f"{drawing.part_id} die drawing, 1:1 in mm, seen from the top face",
                        f"{drawing.title}; layers {names}", body)


def write_die_svg(drawing: DieDrawing, path: str | os.PathLike[str]) -> Path:
    """Write ``drawing`` as a true-scale SVG (mm) to ``path`` atomically; return the path."""
    return save_svg(die_svg_text(drawing), path)


__all__ = ["build_die_dxf", "die_svg_text", "write_die_dxf", "write_die_svg"]
