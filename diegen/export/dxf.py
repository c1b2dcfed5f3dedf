"""DXF writer and reader for flat-blank drawings (ezdxf).

Output is DXF R2010 in millimetres (``$INSUNITS`` = 4, ``$MEASUREMENT`` = 1,
header variables as defined in the DXF Reference, HEADER section).  Layers:

* ``CUT``    outer and inner contours as closed LWPOLYLINEs, plain and pilot holes as CIRCLEs;
* ``DRILL``  tooling-pin holes as CIRCLEs;
* ``SCRIBE`` bend (tangent) lines as open LWPOLYLINEs, dashed;
* ``NOTE``   part id, material, notes (TEXT) and the grain arrow (LINEs).

Polylines are written vertex for vertex, no arcs are fitted: the geometry
layer is expected to deliver curved edges with a chordal error of at most
0.01 mm.
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from diegen.blank.drawing import CUT, DRILL, LAYERS, NOTE, SCRIBE, BlankDrawing, Circle, LayerStyle, Polyline
from diegen.errors import OutputError
from diegen.fileio import write_with
from diegen.geometry.loops import signed_area
from diegen.numbers import plain

__all__ = [
    "BEND_LINETYPE",
    "DXF_VERSION",
    "INSUNITS_MM",
    "MEASUREMENT_METRIC",
    "DxfOutline",
    "add_polyline",
    "build_dxf",
    "read_dxf_outline",
    "write_dxf",
    "write_outlines_dxf",
]

DXF_VERSION = "R2010"
INSUNITS_MM = 4  # DXF Reference, HEADER $INSUNITS: 4 = millimetres
MEASUREMENT_METRIC = 1  # DXF Reference, HEADER $MEASUREMENT: 1 = metric
BEND_LINETYPE = "BENDLINE"  # 6 mm dash, 3 mm gap


def write_outlines_dxf(outlines: list[tuple[str, list[tuple[float, float]]]], path: Path) -> None:
    """Write closed outlines (mm), each on its own named layer, as a DXF in millimetres (atomically)."""
    import ezdxf

    doc = ezdxf.new(DXF_VERSION, setup=False)
    doc.header["$INSUNITS"] = INSUNITS_MM
    msp = doc.modelspace()
    for index, (layer, points) in enumerate(outlines):
        doc.layers.add(layer, color=1 + index % 6)
        add_polyline(msp, points, True, layer)
    write_with(path, doc.saveas)


def add_polyline(space, points: Polyline, closed: bool, layer: str):  # -> ezdxf LWPolyline
    """An LWPOLYLINE through ``points`` (mm) on ``layer`` in ``space`` (a layout of an ezdxf document), with no
    negative zero among its coordinates (a "-0.0" in a drawing reads as a mistake).

    The points go in as one array: ezdxf's own ``add_lwpolyline`` appends them one at a time, copying the array
    each time (a die drawing's outlines, some two thousand points, took 7 ms that way, 1 ms this way; the file
    is the same).
    """
    line = space.add_lwpolyline([], format="xy", close=closed, dxfattribs={"layer": layer})
    rows = np.zeros((len(points), 5))  # x, y, start width, end width, bulge: ezdxf's vertex layout
    if len(points):
        rows[:, :2] = np.asarray(points, dtype=float) + 0.0  # -0.0 + 0.0 is +0.0 (IEEE 754)
    line.lwpoints.set(rows)
    return line


def build_dxf(drawing: BlankDrawing):  # -> ezdxf.document.Drawing (kept untyped so ezdxf loads lazily)
    """Build the in-memory ezdxf document for ``drawing`` (mm)."""

    doc = new_document(LAYERS)
    # pattern: total length, then dash (+) and gap (-) lengths in mm
    doc.linetypes.add(BEND_LINETYPE, pattern=[9.0, 6.0, -3.0], description="Bend line ______   ______")
    doc.layers.get(SCRIBE.name).dxf.linetype = BEND_LINETYPE
    msp = doc.modelspace()

    cut = {"layer": CUT.name}
    add_polyline(msp, drawing.outer, True, CUT.name)
    for contour in drawing.inner:
        add_polyline(msp, contour, True, CUT.name)
    for c in drawing.cut_circles:
        msp.add_circle((plain(c.x), plain(c.y)), c.r, dxfattribs=cut)
    for c in drawing.drill_circles:
        msp.add_circle((plain(c.x), plain(c.y)), c.r, dxfattribs={"layer": DRILL.name})
    for line in drawing.scribe_lines:
        add_polyline(msp, line, False, SCRIBE.name)

    note = {"layer": NOTE.name}
    title = drawing.title_block()
    for n in drawing.notes + title.notes:
        msp.add_text(n.text, height=n.height, dxfattribs=note).set_placement((plain(n.x), plain(n.y)))
    for s in title.arrow:
        msp.add_line((plain(s.x0), plain(s.y0)), (plain(s.x1), plain(s.y1)), dxfattribs={"layer": NOTE.name})

    fit_view(doc, drawing.extent())
    return doc


def new_document(layers: Sequence[LayerStyle]):  # -> ezdxf.document.Drawing
    """An empty DXF document in mm (header units and measurement) with ``layers``, each with its colour and
    purpose."""
    import ezdxf

    doc = ezdxf.new(DXF_VERSION, setup=False, units=INSUNITS_MM)
    doc.header["$INSUNITS"] = INSUNITS_MM
    doc.header["$MEASUREMENT"] = MEASUREMENT_METRIC
    for style in layers:
        layer = doc.layers.add(style.name, color=style.aci)
        layer.description = style.purpose
    return doc


def fit_view(doc, extent: tuple[float, float, float, float]) -> None:
    """Record ``extent`` (xmin, ymin, xmax, ymax in mm) in the header and open the model space on it."""
    xmin, ymin, xmax, ymax = extent
    doc.header["$EXTMIN"] = (xmin, ymin, 0.0)
    doc.header["$EXTMAX"] = (xmax, ymax, 0.0)
    doc.set_modelspace_vport(height=1.1 * max(ymax - ymin, 1.0), center=(0.5 * (xmin + xmax), 0.5 * (ymin + ymax)))


def save_dxf(doc, path: str | os.PathLike[str]) -> Path:
    """Write ``doc`` to ``path`` atomically; return the path (:class:`OutputError` when it cannot)."""
    target = Path(path)
    write_with(target, doc.saveas)  # an OutputError naming the file when it cannot
    return target


def write_dxf(drawing: BlankDrawing, path: str | os.PathLike[str]) -> Path:
    """Write ``drawing`` as a DXF R2010 file in mm to ``path`` atomically; return the path."""
    return save_dxf(build_dxf(drawing), path)


@dataclass(frozen=True)
class DxfOutline:
    """What :func:`read_dxf_outline` found on the CUT and DRILL layers (mm)."""

    outer: Polyline
    inner: tuple[Polyline, ...]
    cut_circles: tuple[Circle, ...]
    drill_circles: tuple[Circle, ...]
    insunits: int


def _closed_points(entity) -> Polyline:  # entity: ezdxf LWPolyline
    """Vertices of a closed LWPOLYLINE; arcs (bulges) flattened to 0.01 mm."""
    if any(abs(b) > 0.0 for (b,) in entity.get_points("b")):
        from ezdxf import path as dxfpath

        pts = tuple((v.x, v.y) for v in dxfpath.make_path(entity).flattening(0.01))
    else:
        pts = tuple((float(x), float(y)) for x, y in entity.get_points("xy"))
    if len(pts) > 1 and math.dist(pts[0], pts[-1]) < 1e-9:
        pts = pts[:-1]
    return pts


def read_dxf_outline(path: str | os.PathLike[str]) -> DxfOutline:
    """Read a blank DXF back: the largest closed CUT polyline is the outer contour.

    Other closed CUT polylines are returned as inner contours, CUT circles as
    cut holes and DRILL circles as pin holes.  Lengths in the file's units
    (``insunits`` tells which; this package writes mm).
    """
    import ezdxf

    try:
        doc = ezdxf.readfile(str(path))
    except (OSError, ezdxf.DXFError) as exc:
        raise OutputError(f"cannot read DXF {path}: {exc}") from exc
    msp = doc.modelspace()
    contours = [_closed_points(e) for e in msp.query(f'LWPOLYLINE[layer=="{CUT.name}"]') if e.closed]
    if not contours:
        raise OutputError(f"{path}: no closed polyline on layer {CUT.name}")
    contours.sort(key=lambda c: abs(signed_area(c)), reverse=True)

    def circles(layer: str) -> tuple[Circle, ...]:
        found = msp.query(f'CIRCLE[layer=="{layer}"]')
        return tuple(Circle(e.dxf.center.x, e.dxf.center.y, 2.0 * e.dxf.radius) for e in found)

    return DxfOutline(
        outer=contours[0],
        inner=tuple(contours[1:]),
        cut_circles=circles(CUT.name),
        drill_circles=circles(DRILL.name),
        insunits=int(doc.header.get("$INSUNITS", 0)),
    )
