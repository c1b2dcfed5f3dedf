"""Reading part outlines from DXF drawings (diegen.sources.dxf), checked against closed forms and against
ezdxf's own geometry (its bulge, OCS and spline evaluation functions) and shapely's areas and distances.

Every drawing is made here with ezdxf; the parts are invented.
"""

from __future__ import annotations

import math

import ezdxf
import numpy as np
import pytest
import shapely
from ezdxf.math import bulge_to_arc
from shapely.geometry import LineString, Polygon

from diegen.errors import DiegenError, DrawingError, GeometryError
from diegen.sources import CHORD_TOL_MM, read_dxf

MM_PER_IN = 25.4  # NIST SP 811: 1 in = 25.4 mm exactly


def new_doc(insunits: int = 4):
    """An empty R2010 drawing whose header says ``insunits`` (DXF Reference, HEADER $INSUNITS: 1 in, 4 mm)."""
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = insunits
    return doc


def save(doc, tmp_path, name: str = "part.dxf"):
    path = tmp_path / name
    doc.saveas(path)
    return path


def rounded_rectangle(msp, w: float, h: float, r: float, layer: str = "OUTLINE", x0: float = 0.0, y0: float = 0.0):
    """A w × h rectangle with corner fillets of radius r, as four LINEs and four ARCs (drawn in no order)."""
    attrs = {"layer": layer}
    msp.add_arc((x0 + r, y0 + h - r), r, 90, 180, dxfattribs=attrs)
    msp.add_line((x0 + r, y0), (x0 + w - r, y0), dxfattribs=attrs)
    msp.add_arc((x0 + w - r, y0 + h - r), r, 0, 90, dxfattribs=attrs)
    msp.add_line((x0, y0 + h - r), (x0, y0 + r), dxfattribs=attrs)
    msp.add_arc((x0 + w - r, y0 + r), r, 270, 360, dxfattribs=attrs)
    msp.add_line((x0 + w - r, y0 + h), (x0 + r, y0 + h), dxfattribs=attrs)
    msp.add_arc((x0 + r, y0 + r), r, 180, 270, dxfattribs=attrs)
    msp.add_line((x0 + w, y0 + r), (x0 + w, y0 + h - r), dxfattribs=attrs)


def chord_sagittas(points, centre, radius) -> np.ndarray:
    """How far each chord's midpoint lies inside the circle (mm): the chordal error of a flattened arc."""
    p = np.asarray(points)
    mid = 0.5 * (p[1:] + p[:-1])
    return radius - np.hypot(*(mid - np.asarray(centre)).T)


# -- lines and arcs --------------------------------------------------------------------------------------


def test_rounded_rectangle_of_lines_and_arcs_has_the_closed_form_area_and_perimeter(tmp_path):
    w, h, r = 160.0, 90.0, 12.0
    doc = new_doc()
    rounded_rectangle(doc.modelspace(), w, h, r)
    drawing = read_dxf(save(doc, tmp_path))
    (contour,) = drawing.contours
    assert [e.kind for e in contour.edges].count("arc") == 4
    # closed forms: area w·h − (4 − π)·r², perimeter 2(w + h) − 8r + 2πr
    assert abs(contour.area) == pytest.approx(w * h - (4 - math.pi) * r**2, rel=1e-12)
    assert contour.length == pytest.approx(2 * (w + h) - 8 * r + 2 * math.pi * r, rel=1e-12)
    # each fillet: arc length r·θ with θ = π/2 (closed form)
    for arc in (e for e in contour.edges if e.kind == "arc"):
        assert arc.length == pytest.approx(r * math.pi / 2, rel=1e-12)
        assert arc.radius == pytest.approx(r, rel=1e-12)
        assert chord_sagittas(arc.points, arc.centre, arc.radius).max() <= CHORD_TOL_MM
    # the flattened loop (shapely): inside the exact area by no more than the chordal tolerance × perimeter
    flat = Polygon(contour.points)
    assert flat.is_valid
    exact = w * h - (4 - math.pi) * r**2
    assert 0.0 <= exact - flat.area <= CHORD_TOL_MM * contour.length
    # the chain is closed edge to edge
    for a, b in zip(contour.edges, contour.edges[1:] + contour.edges[:1]):
        assert a.end == b.start


def test_arc_edges_match_ezdxf_bulge_to_arc(tmp_path):
    doc = new_doc()
    rounded_rectangle(doc.modelspace(), 80.0, 50.0, 7.5)
    (contour,) = read_dxf(save(doc, tmp_path)).contours
    for arc in (e for e in contour.edges if e.kind == "arc"):
        centre, _, _, radius = bulge_to_arc(arc.start, arc.end, arc.bulge)  # ezdxf.math
        assert arc.centre == pytest.approx((centre.x, centre.y), abs=1e-9)
        assert arc.radius == pytest.approx(radius, rel=1e-12)


def test_an_arc_seen_from_below_is_mirrored_as_its_ocs_says(tmp_path):
    doc = new_doc()
    msp = doc.modelspace()
    # a half disc drawn with extrusion −Z: OCS x points along WCS −x
    arc = msp.add_arc((0, 0), 20, 0, 180, dxfattribs={"extrusion": (0, 0, -1)})
    msp.add_line((-20, 0), (20, 0))
    (contour,) = read_dxf(save(doc, tmp_path)).contours
    arc_edge = next(e for e in contour.edges if e.kind == "arc")
    # ezdxf's own OCS → WCS conversion of the arc's end points
    ends = {(round(p.x, 9), round(p.y, 9)) for p in (arc.start_point, arc.end_point)}
    assert {tuple(round(v, 9) for v in p) for p in (arc_edge.start, arc_edge.end)} == ends
    assert abs(contour.area) == pytest.approx(math.pi * 20**2 / 2, rel=1e-12)


# -- polylines with bulges ----------------------------------------------------------------------------------


def test_polyline_with_bulges_is_a_slot_of_closed_form_area(tmp_path):
    length, r = 70.0, 15.0
    doc = new_doc()
    doc.modelspace().add_lwpolyline([(0, 0, 0), (length, 0, 1), (length, 2 * r, 0), (0, 2 * r, 1)], format="xyb",
                                    close=True, dxfattribs={"layer": "OUTLINE"})
    (contour,) = read_dxf(save(doc, tmp_path), layers="OUTLINE").contours
    # closed form: a rectangle of length × 2r plus a full circle of radius r
    assert abs(contour.area) == pytest.approx(length * 2 * r + math.pi * r**2, rel=1e-12)
    assert contour.length == pytest.approx(2 * length + 2 * math.pi * r, rel=1e-12)
    for arc in (e for e in contour.edges if e.kind == "arc"):
        centre, start, end, radius = bulge_to_arc(arc.start, arc.end, arc.bulge)  # ezdxf.math
        assert arc.centre == pytest.approx((centre.x, centre.y), abs=1e-9)
        assert arc.radius == pytest.approx(radius, rel=1e-12)
        assert abs(arc.sweep) == pytest.approx((end - start) % (2 * math.pi), rel=1e-12)


def test_old_style_polyline_and_lwpolyline_seen_from_below_match_ezdxf_wcs(tmp_path):
    doc = new_doc()
    msp = doc.modelspace()
    points = [(0, 0, 0), (40, 0, math.tan(math.radians(90) / 4)), (50, 10, 0), (50, 30, 0), (0, 30, 0)]
    lw = msp.add_lwpolyline(points, format="xyb", close=True, dxfattribs={"layer": "A", "extrusion": (0, 0, -1)})
    poly = msp.add_polyline2d([(100, 0), (140, 0), (140, 30)], close=True, dxfattribs={"layer": "B"})
    poly.vertices[0].dxf.bulge = 0.0
    drawing = read_dxf(save(doc, tmp_path))
    assert len(drawing.contours) == 2
    by_layer = {c.edges[0].layer: c for c in drawing.contours}
    # ezdxf's vertices_in_wcs() applies the OCS: every corner we read is one of them
    wcs = {(round(v.x, 9), round(v.y, 9)) for v in lw.vertices_in_wcs()}
    assert {(round(e.start[0], 9), round(e.start[1], 9)) for e in by_layer["A"].edges} == wcs
    # the quarter-circle bulge keeps its size under the mirror: area = polygon + segment r²/2(θ − sin θ)
    corners = Polygon([(0, 0), (40, 0), (50, 10), (50, 30), (0, 30)])
    r = math.hypot(10, 10) / (2 * math.sin(math.pi / 4))  # chord / (2 sin(θ/2)), θ = 90°
    assert abs(by_layer["A"].area) == pytest.approx(corners.area + r**2 / 2 * (math.pi / 2 - 1), rel=1e-12)
    assert abs(by_layer["B"].area) == pytest.approx(0.5 * 40 * 30, rel=1e-12)


# -- circles, holes, splines, ellipses ---------------------------------------------------------------------


def test_circular_bulkhead_with_round_holes(tmp_path):
    big, small = 150.0, 30.0
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_circle((0, 0), big, dxfattribs={"layer": "OUTLINE"})
    for x in (-70.0, 70.0):
        msp.add_circle((x, 0), small, dxfattribs={"layer": "OUTLINE"})
    drawing = read_dxf(save(doc, tmp_path), layers="outline")  # layer names compare without regard to case
    circles = sorted(c.circle for c in drawing.contours)
    assert circles == [pytest.approx((-70.0, 0.0, 60.0)), pytest.approx((0.0, 0.0, 300.0), abs=1e-9),
                       pytest.approx((70.0, 0.0, 60.0))]
    outer = max(drawing.contours, key=lambda c: abs(c.area))
    # closed form π·R² and 2πR; shapely's area of the flattened web within the chordal tolerance × its edges
    assert abs(outer.area) == pytest.approx(math.pi * big**2, rel=1e-12)
    assert outer.length == pytest.approx(2 * math.pi * big, rel=1e-12)
    web = Polygon(outer.points, [c.points for c in drawing.contours if c is not outer])
    exact = math.pi * (big**2 - 2 * small**2)
    edges = sum(c.length for c in drawing.contours)
    assert abs(web.area - exact) <= CHORD_TOL_MM * edges


def test_spline_gusset_is_flattened_within_the_chordal_tolerance_of_ezdxf_evaluation(tmp_path):
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_line((0, 0), (220, 0))
    msp.add_line((0, 160), (0, 0))
    spline = msp.add_spline([(220, 0), (180, 70), (110, 120), (40, 150), (0, 160)])
    (contour,) = read_dxf(save(doc, tmp_path)).contours
    (edge,) = [e for e in contour.edges if e.kind == "curve"]
    flat = LineString(edge.points)
    curve = spline.construction_tool()  # ezdxf's own B-spline evaluation
    samples = np.asarray([(p.x, p.y) for p in curve.points(np.linspace(0.0, curve.max_t, 20001))])
    # every point of the curve lies within the tolerance of the flattened edge ...
    assert shapely.distance(shapely.points(samples), flat).max() <= CHORD_TOL_MM
    # ... and every flattened point lies on the curve (within ezdxf's own dense flattening)
    fine = LineString([(p.x, p.y) for p in curve.flattening(1e-5)])
    assert shapely.distance(shapely.points(np.asarray(edge.points)), fine).max() <= 1e-4
    # the two straight edges and the curve close: shapely's area of the loop is positive and valid
    assert Polygon(contour.points).is_valid and abs(contour.area) > 0.5 * 220 * 160


def test_rational_spline_quarter_circle_stays_on_its_circle(tmp_path):
    r = 50.0
    doc = new_doc()
    msp = doc.modelspace()
    # a rational quadratic with middle weight cos 45° is exactly a quarter circle (the standard conic form)
    msp.add_rational_spline([(r, 0), (r, r), (0, r)], [1.0, math.sqrt(0.5), 1.0], degree=2)
    msp.add_line((0, r), (0, 0))
    msp.add_line((0, 0), (r, 0))
    (contour,) = read_dxf(save(doc, tmp_path)).contours
    (edge,) = [e for e in contour.edges if e.kind == "curve"]
    p = np.asarray(edge.points)
    assert np.hypot(*p.T) == pytest.approx(r, abs=1e-9)
    assert chord_sagittas(p, (0, 0), r).max() <= CHORD_TOL_MM
    # quarter-disc area π r²/4 (closed form), within the tolerance × the arc length
    assert abs(abs(contour.area) - math.pi * r**2 / 4) <= CHORD_TOL_MM * math.pi * r / 2


def test_ellipse_full_and_half_against_pi_a_b(tmp_path):
    a, b = 60.0, 25.0
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_ellipse((0, 0), major_axis=(a, 0), ratio=b / a, dxfattribs={"layer": "FULL"})
    msp.add_ellipse((0, 200), major_axis=(0, a), ratio=b / a, start_param=0, end_param=math.pi,
                    dxfattribs={"layer": "HALF"})
    msp.add_line((0, 200 - a), (0, 200 + a), dxfattribs={"layer": "HALF"})
    full = read_dxf(save(doc, tmp_path), layers="FULL").contours[0]
    half = read_dxf(tmp_path / "part.dxf", layers="HALF").contours[0]
    # closed form: ellipse area π·a·b; the flattened loop lies inside by at most tolerance × perimeter
    perimeter = full.length
    assert 0.0 <= math.pi * a * b - abs(full.area) <= CHORD_TOL_MM * perimeter
    assert 0.0 <= math.pi * a * b / 2 - abs(half.area) <= CHORD_TOL_MM * perimeter
    # every flattened point is on the ellipse (x/b)² + (y/a)² = 1 for the half with its major axis along y
    p = np.asarray([q for e in half.edges if e.kind == "curve" for q in e.points]) - (0, 200)
    assert (p[:, 0] / b) ** 2 + (p[:, 1] / a) ** 2 == pytest.approx(1.0, abs=1e-12)


def test_an_ellipse_of_ratio_one_is_a_circle(tmp_path):
    doc = new_doc()
    doc.modelspace().add_ellipse((5, 5), major_axis=(0, 40), ratio=1.0)
    (contour,) = read_dxf(save(doc, tmp_path)).contours
    assert contour.circle == pytest.approx((5.0, 5.0, 80.0))


# -- units and pins ------------------------------------------------------------------------------------------


def test_inch_drawing_is_read_in_millimetres(tmp_path):
    doc = new_doc(insunits=1)
    rounded_rectangle(doc.modelspace(), 6.0, 3.5, 0.5)
    doc.modelspace().add_point((1.0, 1.75), dxfattribs={"layer": "PINS"})
    drawing = read_dxf(save(doc, tmp_path), pin_layer="PINS")
    (contour,) = drawing.contours
    w, h, r = 6.0 * MM_PER_IN, 3.5 * MM_PER_IN, 0.5 * MM_PER_IN
    assert abs(contour.area) == pytest.approx(w * h - (4 - math.pi) * r**2, rel=1e-12)
    assert drawing.place.unit == "in"
    assert [(p.x, p.y) for p in drawing.pins] == [pytest.approx((25.4, 1.75 * 25.4))]


def test_unitless_drawing_takes_the_callers_units_and_refuses_without_them(tmp_path):
    doc = new_doc(insunits=0)
    rounded_rectangle(doc.modelspace(), 10.0, 5.0, 1.0)
    path = save(doc, tmp_path)
    in_cm = read_dxf(path, units="cm").contours[0]
    assert abs(in_cm.area) == pytest.approx((100 * 50 - (4 - math.pi) * 100), rel=1e-12)
    with pytest.raises(DrawingError, match=r"part.dxf: the drawing does not say its units .*\$INSUNITS is 0"):
        read_dxf(path, name="part.dxf")
    with pytest.raises(DrawingError, match=r"unknown unit 'furlong'"):
        read_dxf(path, units="furlong")


def test_units_that_contradict_the_header_are_refused(tmp_path):
    doc = new_doc(insunits=4)
    rounded_rectangle(doc.modelspace(), 10.0, 5.0, 1.0)
    with pytest.raises(DrawingError, match=r"header says mm \(\$INSUNITS = 4\) but units 'in' were given"):
        read_dxf(save(doc, tmp_path), units="in")


def test_mixed_unit_drawings_agree_in_millimetres(tmp_path):
    mm_doc, in_doc = new_doc(4), new_doc(1)
    rounded_rectangle(mm_doc.modelspace(), 101.6, 50.8, 12.7)
    rounded_rectangle(in_doc.modelspace(), 4.0, 2.0, 0.5)
    a = read_dxf(save(mm_doc, tmp_path, "mm.dxf")).contours[0]
    b = read_dxf(save(in_doc, tmp_path, "in.dxf")).contours[0]
    assert a.area == pytest.approx(b.area, rel=1e-12)
    assert LineString(a.points).hausdorff_distance(LineString(b.points)) <= 1e-9  # shapely


def test_points_and_circles_on_the_pin_layer_are_pins_not_holes(tmp_path):
    doc = new_doc()
    msp = doc.modelspace()
    rounded_rectangle(msp, 120.0, 60.0, 5.0)
    msp.add_point((20, 30), dxfattribs={"layer": "Pins"})
    msp.add_circle((100, 30), 1.5, dxfattribs={"layer": "Pins"})
    drawing = read_dxf(save(doc, tmp_path), pin_layer="PINS")
    assert len(drawing.contours) == 1
    assert sorted((p.x, p.y) for p in drawing.pins) == [(20.0, 30.0), (100.0, 30.0)]
    assert all(p.origin.split()[0] in ("POINT", "CIRCLE") for p in drawing.pins)


# -- refusals -------------------------------------------------------------------------------------------------


def test_a_gap_is_named_with_its_place_and_size(tmp_path):
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_line((0, 0), (100, 0))
    msp.add_line((100, 0), (100, 50))
    msp.add_line((100, 50), (0, 50))
    gap_line = msp.add_line((0, 50), (0, 0.5))
    path = save(doc, tmp_path)
    with pytest.raises(DrawingError) as caught:
        read_dxf(path, name="frame.dxf")
    message = str(caught.value)
    assert message.startswith("frame.dxf: the outline is not closed")
    assert "stops at (0.000, 0.500) mm (LINE #" in message and "(0.000, 0.000) mm (LINE #" in message
    assert "0.500 mm apart" in message
    assert f"LINE #{gap_line.dxf.handle}" in message
    # within a wider join tolerance the same drawing closes
    (contour,) = read_dxf(path, join_tol_mm=0.6).contours
    assert abs(contour.area) == pytest.approx(100 * 50, abs=0.6 * 50)


def test_nothing_on_the_named_layer_lists_the_layers_there_are(tmp_path):
    doc = new_doc()
    rounded_rectangle(doc.modelspace(), 50, 30, 4, layer="OUTLINE")
    doc.modelspace().add_point((10, 10), dxfattribs={"layer": "PINS"})
    with pytest.raises(DrawingError, match=r"no outline on layer 'OUTLNE' \(did you mean 'OUTLINE'\?\); "
                                           r"layers with geometry \(entities\): OUTLINE \(8\), PINS \(1\)"):
        read_dxf(save(doc, tmp_path), layers="OUTLNE")
    with pytest.raises(DrawingError, match=r"no POINT on the pin layer 'DOWELS'"):
        read_dxf(tmp_path / "part.dxf", pin_layer="DOWELS")


def test_self_intersecting_outline_names_the_crossing(tmp_path):
    doc = new_doc()
    doc.modelspace().add_lwpolyline([(0, 0), (100, 50), (100, 0), (0, 50)], close=True)
    with pytest.raises(DrawingError, match=r"crosses or touches itself at \(50\.000, 25\.000\) mm"):
        read_dxf(save(doc, tmp_path))


def test_zero_area_contour_is_refused(tmp_path):
    doc = new_doc()
    doc.modelspace().add_lwpolyline([(0, 0), (40, 0), (80, 0)], close=True)
    with pytest.raises(DrawingError, match=r"encloses no area"):
        read_dxf(save(doc, tmp_path))


def test_three_edges_meeting_at_a_point_is_a_branch(tmp_path):
    doc = new_doc()
    msp = doc.modelspace()
    for a, b in (((0, 0), (50, 0)), ((50, 0), (50, 40)), ((50, 40), (0, 0)), ((50, 0), (90, 0))):
        msp.add_line(a, b)
    with pytest.raises(DrawingError, match=r"the outline branches: 3 edge ends meet at \(50\.000, 0\.000\) mm"):
        read_dxf(save(doc, tmp_path))


def test_unreadable_missing_and_out_of_plane_drawings_are_refused(tmp_path):
    junk = tmp_path / "junk.dxf"
    junk.write_text("this is not a drawing\n")
    with pytest.raises(DrawingError, match=r"junk.dxf: not a readable DXF file"):
        read_dxf(junk)
    with pytest.raises(DrawingError, match=r"nowhere.dxf: no such file"):
        read_dxf(tmp_path / "nowhere.dxf")
    doc = new_doc()
    doc.modelspace().add_circle((0, 0), 10, dxfattribs={"extrusion": (1, 0, 0)})
    with pytest.raises(DrawingError, match=r"CIRCLE #\w+ on layer 0 is not drawn in the X–Y plane"):
        read_dxf(save(doc, tmp_path))


def test_block_references_on_the_outline_layer_are_refused(tmp_path):
    doc = new_doc()
    block = doc.blocks.new("BRACKET")
    block.add_circle((0, 0), 5)
    doc.modelspace().add_blockref("BRACKET", (10, 10), dxfattribs={"layer": "OUTLINE"})
    with pytest.raises(DrawingError, match=r"block reference INSERT #\w+ \(block 'BRACKET'\) on layer OUTLINE"):
        read_dxf(save(doc, tmp_path), layers="OUTLINE")


def test_drawing_errors_belong_to_the_error_family():
    assert issubclass(DrawingError, GeometryError) and issubclass(DrawingError, DiegenError)
    assert issubclass(DrawingError, ValueError)


def test_an_arc_that_closes_on_itself_within_the_tolerance_is_a_circle(tmp_path):
    doc = new_doc()
    doc.modelspace().add_arc((10, 20), 25, 30.0, 30.0 - 1e-6)  # nearly 360°: its ends 4e-7 mm apart
    (contour,) = read_dxf(save(doc, tmp_path)).contours
    assert contour.circle == pytest.approx((10.0, 20.0, 50.0))


def test_a_drawing_far_too_large_for_a_part_is_refused(tmp_path):
    doc = new_doc(insunits=6)  # metres: a 40 × 20 "part" is 40 m long
    doc.modelspace().add_lwpolyline([(0, 0), (40, 0), (40, 20), (0, 20)], close=True)
    with pytest.raises(DrawingError, match=r"contour 1 \[LWPOLYLINE #\w+\] spans 40\.0000 m \(40000\.000 mm\), more "
                                           r"than the 10000 mm a part formed in a shop press could be"):
        read_dxf(save(doc, tmp_path))
