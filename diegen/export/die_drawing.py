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
from diegen.errors import OutputError
from diegen.export.dxf import DXF_VERSION, INSUNITS_MM, MEASUREMENT_METRIC
from diegen.export.svg import STROKE_WIDTH, SVG_MARGIN, fmt
from diegen.fileio import write_text, write_with


def build_die_dxf(drawing: DieDrawing):  # -> ezdxf.document.Drawing (untyped so ezdxf loads lazily)
    """The in-memory ezdxf document of ``drawing`` (mm)."""
    import ezdxf

    doc = ezdxf.new(DXF_VERSION, setup=False, units=INSUNITS_MM)
    doc.header["$INSUNITS"] = INSUNITS_MM
    doc.header["$MEASUREMENT"] = MEASUREMENT_METRIC
    for style in drawing.layers:
        layer = doc.layers.add(style.name, color=style.aci)
        layer.description = style.purpose
    msp = doc.modelspace()
    for line in drawing.polylines:
        msp.add_lwpolyline(line.points, format="xy", close=line.closed, dxfattribs={"layer": line.layer})
    for c in drawing.circles:
        msp.add_circle((c.x, c.y), c.d / 2.0, dxfattribs={"layer": c.layer})
    for t in drawing.texts:
        msp.add_text(t.text, height=t.height, dxfattribs={"layer": t.layer}).set_placement((t.x, t.y))
    xmin, ymin, xmax, ymax = drawing.extent()
    doc.header["$EXTMIN"] = (xmin, ymin, 0.0)
    doc.header["$EXTMAX"] = (xmax, ymax, 0.0)
    doc.set_modelspace_vport(height=1.1 * max(ymax - ymin, 1.0), center=(0.5 * (xmin + xmax), 0.5 * (ymin + ymax)))
    return doc


def write_die_dxf(drawing: DieDrawing, path: str | os.PathLike[str]) -> Path:
    """Write ``drawing`` as a DXF in mm to ``path`` atomically; return the path."""
    doc = build_die_dxf(drawing)
    target = Path(path)
    try:
        write_with(target, doc.saveas)
    except OSError as exc:
        raise OutputError(f"cannot write DXF {target}: {exc}") from exc
    return target


def die_svg_text(drawing: DieDrawing) -> str:
    """The SVG document of ``drawing`` as a string."""
    xmin, ymin, xmax, ymax = drawing.extent()
    x0, y0 = xmin - SVG_MARGIN, ymin - SVG_MARGIN
    w, h = xmax - xmin + 2 * SVG_MARGIN, ymax - ymin + 2 * SVG_MARGIN
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
    lines = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        '<svg xmlns="http://www.w3.org/2000/svg" version="1.1" '
        f'width="{fmt(w)}mm" height="{fmt(h)}mm" viewBox="{fmt(x0)} {fmt(-(y0 + h))} {fmt(w)} {fmt(h)}">',
        f"<title>{escape(drawing.part_id)} die drawing, 1:1 in mm, seen from the top face</title>",
        f"<desc>{escape(drawing.title)}; layers {escape(names)}</desc>",
        f'<g id="drawing" transform="scale(1,-1)" stroke-width="{fmt(STROKE_WIDTH)}" '
        'stroke-linejoin="round" stroke-linecap="round">',
        *("  " + line for line in body),
        "</g>",
        "</svg>",
        "",
    ]
    return "\n".join(lines)


def write_die_svg(drawing: DieDrawing, path: str | os.PathLike[str]) -> Path:
    """Write ``drawing`` as a true-scale SVG (mm) to ``path`` atomically; return the path."""
    target = Path(path)
    try:
        write_text(target, die_svg_text(drawing))
    except OSError as exc:
        raise OutputError(f"cannot write SVG {target}: {exc}") from exc
    return target


__all__ = ["build_die_dxf", "die_svg_text", "write_die_dxf", "write_die_svg"]
