"""The die drawing for 2D CAM (diegen.die.drawing, diegen.export.die_drawing), checked with ezdxf and shapely.

No kernel: the drawing is computed from the die model in plain numbers.  References outside the project:
ezdxf's auditor (the DXF structure), ezdxf.math.area (the shoelace area of the polyline read back from the
file), shapely for containment and distances, xml.etree for the SVG.
"""

from __future__ import annotations

import math
import xml.etree.ElementTree as ET
from dataclasses import replace
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from ezdxf.math import Vec2, area
from shapely.geometry import LineString, Point, Polygon
from testing import DEMO_RIB

from diegen import api
from diegen.die.drawing import (
    BORES,
    BOTTOM_OUTLINE,
    DOWEL_HOLES,
    MARKS,
    TILE_JOINTS,
    TOP_FLAT,
    TOP_OUTLINE,
    die_drawing,
)
from diegen.die.from_analysis import die_input, tile_plan
from diegen.die.model import bottom_inset_mm, outline_model, top_face_inset_mm
from diegen.die.placement import fit_marks
from diegen.die.settings import DEFAULT_SETTINGS
from diegen.export.die_drawing import write_die_dxf, write_die_svg
from diegen.reports.document import piece_json

AREA_TOL = 0.01  # project limit: the drawing's top outline encloses the report's die area within 1 %
SAMPLE_TOL_MM = 0.01  # project limit: outline samples lie within 0.01 mm of the exact offset


def _drawing(rib, piece):
    die = die_input(rib, piece)
    layout = tile_plan(rib, piece)
    model = outline_model(die)
    marks = fit_marks(die, model, DEFAULT_SETTINGS)
    joggles = [(j.surface, j.x_start_mm, j.x_end_mm, j.depth_mm, j.ramp_mm, j.path) for j in piece.piece.joggles]
    return die, die_drawing(replace(die, engraving=marks.lines), model, marks, layout, joggles, "test"), marks


@pytest.fixture(scope="module")
def demo():
    return api.analyse(api.load(DEMO_RIB))


def _closed(doc, layer: str) -> list[list[tuple[float, float]]]:
    return [[(x, y) for x, y in e.get_points("xy")] for e in doc.modelspace().query(f'LWPOLYLINE[layer=="{layer}"]')
            if e.closed]


@pytest.mark.parametrize("index", [0, 1, 2])
def test_die_dxf_reads_back_clean_and_encloses_the_report_area(demo, tmp_path: Path, index: int) -> None:
    piece = demo.pieces[index]
    die, drawing, _ = _drawing(demo, piece)
    path = write_die_dxf(drawing, tmp_path / "die.dxf")
    doc = ezdxf.readfile(path)
    auditor = doc.audit()
    assert not auditor.has_errors, [str(e) for e in auditor.errors]  # ezdxf's own structural check
    assert doc.header["$INSUNITS"] == 4  # DXF Reference, HEADER $INSUNITS: 4 = millimetres
    (top,) = _closed(doc, TOP_OUTLINE.name)
    report = piece_json(demo, piece)["die"]["area_mm2"]
    assert area([Vec2(p) for p in top]) == pytest.approx(report, rel=AREA_TOL)  # ezdxf.math.area: shoelace
    # the flat top face and the bottom outline lie inside the mold line, by their insets (shapely distances)
    (flat,) = _closed(doc, TOP_FLAT.name)
    (bottom,) = _closed(doc, BOTTOM_OUTLINE.name)
    mold = Polygon(top)
    for ring, inset in ((flat, top_face_inset_mm(die)), (bottom, bottom_inset_mm(die))):
        assert mold.contains(Polygon(ring))
        gap = min(mold.exterior.distance(Point(p)) for p in ring)
        assert gap == pytest.approx(inset, abs=SAMPLE_TOL_MM)


def test_blank_cut_end_lies_on_the_flat_top(demo, tmp_path: Path) -> None:
    """The tail's aft end is cut (no flange): the blank stops flush with the piece's outline there, and the die runs
    on past it so that end lies on the die's flat top (the drawing's TOP-FLAT, read back with ezdxf), clear of the
    rounded top edge by at least 1 mm (project limit) across the web; the flanged pieces' dies are their outlines.
    Without the run-on the flat top would end the top setback (about the die radius) short of the cut, and the
    rubber would curl the blank's last millimetres down over the round (common practice, no source)."""
    for piece in demo.pieces[:2]:
        assert piece.piece.die_outline == piece.piece.outline and piece.piece.die_overrun_mm == 0.0
    piece = demo.pieces[2]
    x_cut = piece.piece.x_range_mm[1]
    assert max(x for x, _ in piece.blank.outer) == pytest.approx(x_cut, abs=1e-6)  # the blank ends at the cut
    _, drawing, _ = _drawing(demo, piece)
    doc = ezdxf.readfile(write_die_dxf(drawing, tmp_path / "die.dxf"))
    (flat,) = _closed(doc, TOP_FLAT.name)
    def across(shape, x: float) -> float:  # the length of the vertical line at x inside shape
        return shape.intersection(LineString([(x, -1e4), (x, 1e4)])).length

    depth = across(Polygon(piece.piece.outline), x_cut - 1e-6)
    flat_top = Polygon(flat)
    assert flat_top.bounds[2] >= x_cut + 1.0
    # 1 mm past the cut the flat top still spans the web less a top setback (well under 3 mm here) top and bottom
    assert across(flat_top, x_cut + 1.0) >= depth - 2 * 3.0


def test_die_dxf_holes_are_circles_with_their_sizes_noted(demo, tmp_path: Path) -> None:
    piece = demo.pieces[0]
    die, drawing, _ = _drawing(demo, piece)
    doc = ezdxf.readfile(write_die_dxf(drawing, tmp_path / "die.dxf"))
    msp = doc.modelspace()
    bores = sorted(2 * e.dxf.radius for e in msp.query(f'CIRCLE[layer=="{BORES.name}"]'))
    # the flange's wall stands inside the bore: clear hole d plus the sheet thickness t on each side
    t = demo.spec.shared.sheet.thickness_mm
    assert bores == pytest.approx(sorted(h.d + 2.0 * t for h in piece.piece.holes if h.flanged), abs=1e-9)
    dowels = msp.query(f'CIRCLE[layer=="{DOWEL_HOLES.name}"]')
    pins = [(e.dxf.center.x, e.dxf.center.y, 2 * e.dxf.radius) for e in dowels]
    assert len(pins) == len(die.pins)
    for (x, y, d), pin in zip(pins, die.pins):
        assert (x, y, d) == pytest.approx((pin.x, pin.y, pin.d), abs=1e-9)
    texts = [e.dxf.text for e in msp.query("TEXT")]
    for pin in die.pins:
        assert any(f"DIA {pin.d:.2f} {pin.depth:.1f} DEEP" in t for t in texts)
    for bore in die.bores:
        assert any(f"BORE DIA {bore.d:.2f} THROUGH" in t for t in texts)
    # the engraving is on its own layer, closed outlines of the grooves
    assert _closed(doc, MARKS.name)
    # no "-0" anywhere in the file's numbers
    assert not any(v in {"-0.0", "-0"} for v in Path(tmp_path / "die.dxf").read_text().split())


def test_die_svg_is_true_scale_with_a_group_per_layer(demo, tmp_path: Path) -> None:
    _, drawing, _ = _drawing(demo, demo.pieces[2])
    root = ET.parse(write_die_svg(drawing, tmp_path / "die.svg")).getroot()
    ns = {"s": "http://www.w3.org/2000/svg"}
    width = float(root.get("width").removesuffix("mm"))
    assert width == pytest.approx(float(root.get("viewBox").split()[2]), abs=1e-6)  # one user unit is one mm
    groups = {g.get("id") for g in root.iterfind(".//s:g", ns)}
    assert {TOP_OUTLINE.name, BOTTOM_OUTLINE.name, MARKS.name} <= groups
    outline = root.find(f".//s:g[@id='{TOP_OUTLINE.name}']/s:polygon", ns)
    pts = np.array([[float(v) for v in p.split(",")] for p in outline.get("points").split()])
    x, y = pts.T
    shoelace = 0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(np.roll(x, -1), y))
    assert shoelace == pytest.approx(Polygon(demo.pieces[2].piece.die_outline).area, rel=AREA_TOL)  # shapely


def test_printed_die_marks_keep_clear_of_the_joints(demo, tmp_path: Path) -> None:
    spec = demo.spec
    die_spec = replace(spec.shared.die, material="pla", stock_thickness_mm=25.4, print_bed_mm=(220.0, 220.0))
    rib = replace(demo, spec=replace(spec, shared=replace(spec.shared, die=die_spec)))
    piece = rib.pieces[1]  # the centre piece: about 454 mm long, three tiles on a 216 mm usable bed
    layout = tile_plan(rib, piece)
    assert len(layout.tiles) == math.ceil((piece.piece.x_range_mm[1] - piece.piece.x_range_mm[0]) / 216.0)
    die, drawing, marks = _drawing(rib, piece)
    assert die.tile_joints_x_mm == layout.joints_x_mm
    assert marks.tile_labels == tuple(f"{die.part_id} {k}/{len(layout.tiles)}" for k in range(1, 4))
    for x in layout.joints_x_mm:  # no joint cuts a letter (shapely intersection)
        cut = LineString([(x, -1e4), (x, 1e4)])
        assert not any(cut.intersects(p) for p in marks.polygons)
    doc = ezdxf.readfile(write_die_dxf(drawing, tmp_path / "die.dxf"))
    lines = [e for e in doc.modelspace().query(f'LWPOLYLINE[layer=="{TILE_JOINTS.name}"]') if not e.closed]
    assert sorted(next(iter(e.get_points("xy")))[0] for e in lines) == pytest.approx(list(layout.joints_x_mm))
    dowels = [e for e in doc.modelspace().query(f'LWPOLYLINE[layer=="{TILE_JOINTS.name}"]') if e.closed]
    assert len(dowels) == len(layout.dowels) >= len(layout.joints_x_mm)
