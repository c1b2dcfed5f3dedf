"""Drawn parts as geometry-layer pieces (diegen.sources.part): the die outline, flange runs, relief points,
holes and pins, and that the pieces pass the existing contoured-flange strain, blank development and die
outline model.

Checks against outside sources: closed-form areas and radii, the contoured-flange shrink e = w/(ρ + w) of a
flange of width w on a plan radius ρ (the flange's edge circle shrinks from ρ + w to ρ; derived from the
flange's plan geometry, as in diegen/forming/strain.py), shapely areas and distances, ezdxf-built drawings.
"""

from __future__ import annotations

import math

import ezdxf
import numpy as np
import pytest
from shapely.geometry import LineString, Point, Polygon, box
from testing import assert_valid_ccw_outline

from diegen.blank.develop import develop_blank
from diegen.die.die_input import DieRun
from diegen.die.outline import OutlineModel
from diegen.errors import DrawingError, GeometryError
from diegen.forming.strain import strain_along
from diegen.sources import (
    CHORD_TOL_MM,
    AllEdges,
    Between,
    Flange,
    FlangeRunSpec,
    OnLayer,
    drawn_part,
    drawn_piece,
    read_dxf,
    read_points,
    read_svg_path,
)

T = 1.0  # sheet thickness (mm)
FLANGE = Flange(height_mm=12.0, bend_radius_mm=3.0)
ALL = (FlangeRunSpec(AllEdges(), FLANGE, "flanges"),)
QUARTER = math.tan(math.radians(90.0) / 4.0)


def new_doc():
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 4  # DXF Reference, HEADER $INSUNITS: 4 = millimetres
    return doc


def blank_of(piece, offset=10.0, die_radius=2.5, inset=2.5):
    return develop_blank(piece.geometry, offset_mm=offset, die_radius_mm=die_radius, tangent_inset_mm=inset,
                         thickness_mm=T, material="test sheet", pilot_diameters=[h.d for h in piece.geometry.holes])


def die_model(piece, cutter_radius=3.0, max_inset=1.0):
    """The die layer's outline model (pure, no kernel) accepts the piece's runs."""
    return OutlineModel(tuple(DieRun(r.kind, r.points) for r in piece.geometry.runs), cutter_radius, max_inset)


# -- a circular bulkhead -------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def bulkhead(tmp_path_factory):
    radius = 150.0
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_circle((0, 0), radius, dxfattribs={"layer": "OUTLINE"})
    for x in (-70.0, 70.0):
        msp.add_circle((x, 0), 30.0, dxfattribs={"layer": "OUTLINE"})
    for y in (-110.0, 110.0):
        msp.add_point((0, y), dxfattribs={"layer": "PINS"})
    path = tmp_path_factory.mktemp("bulkhead") / "bulkhead.dxf"
    doc.saveas(path)
    part = drawn_part(read_dxf(path, layers="OUTLINE", pin_layer="PINS"), ALL, "mold-line")
    return radius, part, drawn_piece(part, part_id="F4", sheet_thickness_mm=T, pin_diameter_mm=3.0)


def test_bulkhead_die_is_the_mold_line_circle_less_the_sheet(bulkhead):
    radius, _, piece = bulkhead
    g = piece.geometry
    rho = radius - T
    (run,) = g.runs
    assert run.kind == "curve" and run.flanged and run.points[0] == run.points[-1]
    assert g.plain_runs == g.runs and g.relief_points == () and g.joggles == ()
    assert_valid_ccw_outline(g.outline, "bulkhead die outline")
    # every die point within the chordal tolerance of the circle of radius R − t (closed form)
    r = np.hypot(*np.asarray(g.outline).T)
    assert r.max() <= rho + 1e-9 and r.min() >= rho - 2 * CHORD_TOL_MM
    # shapely's area of the die against π(R − t)²
    assert abs(Polygon(g.outline).area - math.pi * rho**2) <= 2 * CHORD_TOL_MM * 2 * math.pi * rho
    assert g.x_range_mm == pytest.approx((-rho, rho), abs=2 * CHORD_TOL_MM)
    # depth sampled over the middle 80 %: from 2·√(ρ² − (0.8ρ)²) = 1.2ρ to 2ρ
    assert g.depth_range_mm[0] == pytest.approx(1.2 * rho, rel=2e-3)
    assert g.depth_range_mm[1] == pytest.approx(2 * rho, rel=2e-3)
    assert piece.run_flanges == (FLANGE,) and not piece.mirrored and piece.cutouts == ()


def test_bulkhead_holes_and_pins(bulkhead):
    _, part, piece = bulkhead
    assert sorted((h.x, h.y, h.d, h.flanged) for h in piece.geometry.holes) == [
        pytest.approx((-70.0, 0.0, 60.0, False)), pytest.approx((70.0, 0.0, 60.0, False))]
    assert sorted((p.x, p.y, p.d) for p in piece.geometry.pins) == [(0.0, -110.0, 3.0), (0.0, 110.0, 3.0)]
    flanged = drawn_piece(part, part_id="F4", sheet_thickness_mm=T, pin_diameter_mm=3.0, hole_flange_height_mm=6.0)
    assert all(h.flanged and h.flange_height == 6.0 for h in flanged.geometry.holes)


def test_bulkhead_flange_shrink_is_w_over_rho_plus_w(bulkhead):
    radius, _, piece = bulkhead
    rho, w = radius - T, 14.0
    expected = w / (rho + w)  # contoured flange on a convex plan radius ρ (shrink flange)
    whole = strain_along(np.asarray(piece.geometry.outline), w, closed=True)
    assert whole.max_shrink == pytest.approx(expected, rel=1e-3)
    assert whole.strain.max() == pytest.approx(-expected, rel=1e-3)  # the same shrink all round
    # as the analysis reads it: each flanged curve run as an open outline
    (run,) = piece.geometry.plain_runs
    assert strain_along(np.asarray(run.points), w, closed=False).max_shrink == pytest.approx(expected, rel=1e-3)


def test_bulkhead_blank_is_the_developed_circle_with_its_holes(bulkhead):
    radius, _, piece = bulkhead
    offset = 10.0
    blank = blank_of(piece, offset)
    # the blank's edge: the die circle grown by the developed flange, π(ρ + o)²
    assert Polygon(blank.outer).area == pytest.approx(math.pi * (radius - T + offset) ** 2, rel=1e-3)
    assert sorted(c.d for c in blank.cut_circles) == pytest.approx([60.0, 60.0])
    assert len(blank.drill_circles) == 2


def test_bulkhead_runs_pass_the_die_outline_model(bulkhead):
    model = die_model(bulkhead[2])
    assert model.periodic


# -- runs, corners and relief ---------------------------------------------------------------------------------


def half_disc_doc(diameter=200.0):
    """A half disc: the diameter on layer FLAT, the arc on layer ROUND (mm)."""
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_line((0, 0), (diameter, 0), dxfattribs={"layer": "FLAT"})
    msp.add_arc((diameter / 2, 0), diameter / 2, 0, 180, dxfattribs={"layer": "ROUND"})
    return doc


def test_layered_flange_runs_meet_at_relieved_corners(tmp_path):
    doc = half_disc_doc()
    doc.saveas(tmp_path / "d.dxf")
    flat, round_ = Flange(15.0, 3.0), Flange(10.0, 2.0)
    specs = (FlangeRunSpec(OnLayer("flat"), flat, "flanges[0]"), FlangeRunSpec(OnLayer("ROUND"), round_, "flanges[1]"))
    part = drawn_part(read_dxf(tmp_path / "d.dxf"), specs, "die")
    assert [(r.label, r.flange) for r in part.runs] in ([("flanges[0]", flat), ("flanges[1]", round_)],
                                                        [("flanges[1]", round_), ("flanges[0]", flat)])
    piece = drawn_piece(part, part_id="G1", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    g = piece.geometry
    kinds = sorted((r.kind, f.height_mm) for r, f in zip(g.runs, piece.run_flanges))
    assert kinds == [("curve", 10.0), ("line", 15.0)]
    assert sorted(g.relief_points) == [pytest.approx((0.0, 0.0)), pytest.approx((200.0, 0.0))]
    # the arc run, read as the analysis reads it, shrinks by w/(ρ + w) with ρ = 100 mm (a die outline, no offset)
    arc = next(r for r in g.plain_runs if r.kind == "curve")
    w = 12.0
    assert strain_along(np.asarray(arc.points), w, closed=False).max_shrink == pytest.approx(w / (100.0 + w), rel=1e-3)
    blank = blank_of(piece)
    assert len(blank.cut_circles) == 2  # a relief hole at each corner
    assert Polygon(blank.outer).contains(Polygon(g.outline))
    die_model(piece)


def test_from_to_runs_leave_cut_edges_and_the_blank_stops_flush_with_them(tmp_path):
    r = 150.0
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_line((0, 0), (r, 0))
    msp.add_arc((0, 0), r, 0, 90)
    msp.add_line((0, r), (0, 0))
    doc.saveas(tmp_path / "q.dxf")
    # from the top of the left edge, counter-clockwise round the square corner, to the bottom edge's end (each given
    # within the 1 mm snap of the drawing's vertex)
    specs = (FlangeRunSpec(Between((0.3, r - 0.2), (r - 0.1, 0.4)), FLANGE, "flanges[0]"),)
    part = drawn_part(read_dxf(tmp_path / "q.dxf"), specs, "mold-line")
    piece = drawn_piece(part, part_id="G2", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    g = piece.geometry
    by_kind = sorted((run.kind, run.flanged) for run in g.runs)
    assert by_kind == [("curve", False), ("line", True), ("line", True)]
    # the one corner between two flanged runs: the mold line's square corner, offset in by t
    assert g.relief_points == (pytest.approx((T, T)),)
    # plain data: every coordinate a Python float
    assert {type(v) for run in g.runs for p in run.points for v in p} == {float}
    # pins were placed automatically (none drawn), inside the web clear of the bends
    assert len(g.pins) >= 2 and all(Polygon(g.outline).contains(Point(p.x, p.y)) for p in g.pins)
    offset = 10.0
    blank = Polygon(blank_of(piece, offset).outer)
    # the cut arc gets no flange: beyond the die's arc (inside the two flanged edges' lines) the blank is the web
    beyond_arc = blank.difference(Polygon(g.outline)).intersection(box(T, T, 2 * r, 2 * r))
    assert beyond_arc.area <= 1e-9
    # ... and the bottom and left flanges stop flush with the arc's first chord, which leans from the arc's tangent
    # by at most acos(1 − tol/R), half a chord's angle.  The cut arc stays on the drawn line (the part's edge is the
    # blank's), so the die corner is where the bottom edge's offset y = t meets it: x = √(R² − t²), within the
    # flattening (plane geometry)
    corner_x = max(x for x, _ in g.outline)
    assert corner_x == pytest.approx(math.sqrt(r**2 - T**2), abs=2 * CHORD_TOL_MM)
    arc = [p for p in g.outline if p[0] > 2 * T and p[1] > 2 * T]
    assert arc and all(abs(math.hypot(*p) - r) <= CHORD_TOL_MM for p in arc)
    lean = offset * math.tan(math.acos(1.0 - CHORD_TOL_MM / r))
    _, _, maxx, maxy = blank.bounds
    assert corner_x - 1e-9 <= maxx <= corner_x + lean + 1e-9
    assert corner_x - 1e-9 <= maxy <= corner_x + lean + 1e-9


def test_sharp_rectangle_all_flanged_has_four_relieved_corners_and_the_closed_form_blank():
    w, h, offset = 120.0, 60.0, 10.0
    part = drawn_part(read_points([[0, 0], [w, 0], [w, h], [0, h]]), ALL, "die")
    piece = drawn_piece(part, part_id="P1", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    g = piece.geometry
    assert [r.kind for r in g.runs] == ["line"] * 4 and all(r.flanged for r in g.runs)
    assert sorted(g.relief_points) == [(0.0, 0.0), (0.0, h), (w, 0.0), (w, h)]
    blank = blank_of(piece, offset)
    # the web plus a flange of the developed width on each side, the corner squares cut away: wh + 2o(w + h)
    assert Polygon(blank.outer).area == pytest.approx(w * h + 2 * offset * (w + h), rel=1e-12)
    assert len(blank.cut_circles) == 4


def test_sharp_triangle_gusset_develops_one_blank():
    # a long, thin gusset: the corner at (300, 0) turns through 165°, its flanges' offset corner reaches far out
    part = drawn_part(read_points([[0, 0], [300, 0], [0, 80]]), ALL, "mold-line")
    piece = drawn_piece(part, part_id="T3", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    assert len(piece.geometry.relief_points) == 3
    blank = Polygon(blank_of(piece).outer)
    assert blank.is_valid and blank.contains(Polygon(piece.geometry.outline))
    die_model(piece)


def test_rounded_rectangle_is_one_curve_run_whose_fillets_shrink_by_the_closed_form():
    w, h, r = 240.0, 160.0, 40.0
    rows = [[r, 0], [w - r, 0, QUARTER], [w, r], [w, h - r, QUARTER], [w - r, h], [r, h, QUARTER], [0, h - r],
            [0, r, QUARTER]]
    part = drawn_part(read_points(rows), ALL, "mold-line")
    piece = drawn_piece(part, part_id="R1", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    (run,) = piece.geometry.runs
    assert run.kind == "curve" and piece.geometry.relief_points == ()
    # straight stretches carry points at most 2 mm apart, so the die's spline through them stays straight
    steps = np.hypot(*np.diff(np.asarray(run.points), axis=0).T)
    assert steps.max() <= 2.0 + 1e-9
    # shapely: the die is the mold line offset by t, area (w − 2t)(h − 2t) − (4 − π)(r − t)²
    exact = (w - 2 * T) * (h - 2 * T) - (4 - math.pi) * (r - T) ** 2
    assert abs(Polygon(piece.geometry.outline).area - exact) <= 2 * CHORD_TOL_MM * 2 * (w + h)
    width = 12.0
    profile = strain_along(np.asarray(run.points), width, closed=False)
    assert profile.max_shrink == pytest.approx(width / (r - T + width), rel=2e-3)
    die_model(piece)


def test_spline_gusset_in_inches_with_a_flanged_curve_and_drawn_pins(tmp_path):
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 1  # inches
    msp = doc.modelspace()
    msp.add_line((0, 0), (9, 0), dxfattribs={"layer": "CUT"})
    msp.add_line((0, 6), (0, 0), dxfattribs={"layer": "CUT"})
    msp.add_spline([(9, 0), (7.5, 2.8), (4.5, 4.9), (1.6, 5.9), (0, 6)], dxfattribs={"layer": "EDGE"})
    for x, y in ((1.5, 1.5), (4.0, 1.2)):
        msp.add_point((x, y), dxfattribs={"layer": "PINS"})
    doc.saveas(tmp_path / "gusset.dxf")
    drawing = read_dxf(tmp_path / "gusset.dxf", layers=["CUT", "EDGE"], pin_layer="PINS")
    part = drawn_part(drawing, (FlangeRunSpec(OnLayer("EDGE"), FLANGE, "flanges[0]"),), "mold-line")
    piece = drawn_piece(part, part_id="K2", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    g = piece.geometry
    assert sorted((r.kind, r.flanged) for r in g.runs) == [("curve", True), ("line", False), ("line", False)]
    assert g.relief_points == ()  # the flanged curve meets only cut edges
    assert sorted((p.x, p.y) for p in g.pins) == [pytest.approx((1.5 * 25.4, 1.5 * 25.4)),
                                                  pytest.approx((4.0 * 25.4, 1.2 * 25.4))]
    # the cut edge x = 0 stays on the drawn line; the sharp tip moves in by more than t (the curve's offset meets the
    # cut bottom edge at the tip's small angle)
    assert g.x_range_mm[0] == pytest.approx(0.0, abs=1e-9) and g.x_range_mm[1] < 9 * 25.4 - T
    curve = next(r for r in g.plain_runs if r.flanged)
    profile = strain_along(np.asarray(curve.points), 14.0, closed=False)
    assert 0.0 < profile.max_shrink < 14.0 / (14.0 + 50.0)  # a gentle convex curve (its radius is above 50 mm)
    blank = Polygon(blank_of(piece).outer)
    web = Polygon(g.outline)
    # cut edges: the blank stops on the drawn lines y = 0 and x = 0, the finished part's edges
    minx, miny, _, _ = blank.bounds
    assert (minx, miny) == pytest.approx((0.0, 0.0), abs=1e-9)
    assert blank.contains(web)
    die_model(piece)


def test_flanges_bending_up_mirror_the_piece():
    rows = [[0, 0], [100, 0], [100, 50], [0, 80]]
    up = (FlangeRunSpec(AllEdges(), Flange(10.0, 2.0, direction="up")),)
    down = (FlangeRunSpec(AllEdges(), Flange(10.0, 2.0)),)
    a = drawn_piece(drawn_part(read_points(rows), up, "die"), part_id="M", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    b = drawn_piece(drawn_part(read_points(rows), down, "die"), part_id="M", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    assert a.mirrored and not b.mirrored
    assert_valid_ccw_outline(a.geometry.outline, "mirrored outline")
    assert sorted(a.geometry.outline) == sorted((-x, y) for x, y in b.geometry.outline)
    assert sorted(a.geometry.relief_points) == sorted((-x, y) for x, y in b.geometry.relief_points)
    assert a.geometry.x_range_mm == (-100.0, 0.0)
    assert sorted((p.x, p.y) for p in a.geometry.pins) == sorted((-p.x, p.y) for p in b.geometry.pins)


def test_svg_drawn_part_with_a_non_round_cutout():
    drawing = read_svg_path("M 0 0 H 200 V 120 H 0 Z M 60 40 H 140 V 80 H 60 Z", "mm")
    part = drawn_part(drawing, ALL, "mold-line")
    (hole,) = part.holes
    assert hole.circle is None and hole.contour.area < 0  # inner rings run clockwise
    piece = drawn_piece(part, part_id="S1", sheet_thickness_mm=T, pin_diameter_mm=3.0, auto_pins=False)
    assert piece.geometry.holes == () and len(piece.cutouts) == 1
    assert Polygon(piece.cutouts[0]).area == pytest.approx(80 * 40)


# -- refusals ----------------------------------------------------------------------------------------------------


def square(size=100.0):
    return read_points([[0, 0], [size, 0], [size, size], [0, size]])


def test_flanges_bending_both_ways_are_refused():
    specs = (FlangeRunSpec(Between((0, 0), (100, 0)), Flange(10, 2, "up"), "flanges[0]"),
             FlangeRunSpec(Between((100, 0), (100, 100)), Flange(10, 2, "down"), "flanges[1]"))
    part = drawn_part(square(), specs, "die")
    with pytest.raises(GeometryError, match=r"flanges bend up \(flanges\[0\]\) and down \(flanges\[1\]\)") as refused:
        drawn_piece(part, part_id="X", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    # what to do instead: two parts, or the other flanges bent by hand
    assert "two parts riveted together" in str(refused.value) and "by hand" in str(refused.value)


def test_a_from_point_far_from_the_outline_is_refused_with_the_nearest_point():
    specs = (FlangeRunSpec(Between((50, 7), (100, 50)), FLANGE, "flanges[0]"),)
    with pytest.raises(DrawingError, match=r"flanges\[0\]: the from point \(50\.000, 7\.000\) mm is 7\.000 mm from the "
                                           r"outline \(at most 1\.000 mm allowed\); the nearest outline point is "
                                           r"\(50\.000, 0\.000\) mm"):
        drawn_part(square(), specs)


def test_edges_claimed_twice_and_layers_not_on_the_outline_are_refused():
    twice = (FlangeRunSpec(AllEdges(), FLANGE, "flanges"), FlangeRunSpec(Between((0, 0), (100, 0)), FLANGE, "extra"))
    with pytest.raises(DrawingError, match=r"flanges and extra both claim the edge outline.points\[0\] from "
                                           r"\(0\.000, 0\.000\) mm to \(100\.000, 0\.000\) mm"):
        drawn_part(square(), twice)
    with pytest.raises(DrawingError, match=r"no outline edge is on layer 'FLANGE'; the outline's edges are on: none"):
        drawn_part(square(), (FlangeRunSpec(OnLayer("FLANGE"), FLANGE, "flanges[0]"),))


def test_a_contour_outside_or_across_the_outline_is_refused():
    apart = read_svg_path("M 0 0 H 100 V 100 H 0 Z M 150 0 H 170 V 20 H 150 Z", "mm")
    with pytest.raises(DrawingError, match=r"lies outside the outline .*: a drawing \(or its outline layers\) must "
                                           r"hold one part"):
        drawn_part(apart, ALL)
    across = read_svg_path("M 0 0 H 100 V 100 H 0 Z M 90 40 H 120 V 60 H 90 Z", "mm")
    with pytest.raises(DrawingError, match=r"crosses the outline .* at \(100\.000, -?\d+\.000\) mm"):
        drawn_part(across, ALL)


def test_a_hole_in_the_flange_bend_and_a_pin_off_the_web_are_refused(tmp_path):
    doc = new_doc()
    msp = doc.modelspace()
    msp.add_lwpolyline([(0, 0), (100, 0), (100, 60), (0, 60)], close=True)
    msp.add_circle((50, 6), 4.0)  # its edge 2 mm from the die outline: inside a 3 mm bend
    doc.saveas(tmp_path / "h.dxf")
    part = drawn_part(read_dxf(tmp_path / "h.dxf"), ALL, "die")
    with pytest.raises(GeometryError, match=r"the hole \[CIRCLE #\w+\] comes within 2\.000 mm of a flanged edge of the "
                                            r"die; the flange bend takes 3\.000 mm"):
        drawn_piece(part, part_id="H", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    doc2 = new_doc()
    msp2 = doc2.modelspace()
    msp2.add_lwpolyline([(0, 0), (100, 0), (100, 60), (0, 60)], close=True)
    msp2.add_point((4, 30), dxfattribs={"layer": "PINS"})
    doc2.saveas(tmp_path / "p.dxf")
    part2 = drawn_part(read_dxf(tmp_path / "p.dxf", pin_layer="PINS"), ALL, "die")
    with pytest.raises(GeometryError, match=r"pin POINT #\w+ at \(4\.000, 30\.000\) mm: a 3\.00 mm pin's centre must "
                                            r"stand 10\.50 mm inside the die outline"):
        drawn_piece(part2, part_id="P", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    msp2.add_point((150, 30), dxfattribs={"layer": "PINS"})
    doc2.saveas(tmp_path / "p2.dxf")
    with pytest.raises(DrawingError, match=r"pin POINT #\w+ at \(150\.000, 30\.000\) mm lies outside the outline"):
        drawn_part(read_dxf(tmp_path / "p2.dxf", pin_layer="PINS"), ALL)


def test_an_outline_too_thin_for_the_sheet_offset_and_a_bad_outline_kind_are_refused():
    sliver = read_points([[0, 0], [100, 0], [100, 0.5], [0, 0.5]])
    with pytest.raises(GeometryError,
                       match=r"offsetting the mold line inward by the sheet \(1\.000 mm\).*nothing is left"):
        drawn_piece(drawn_part(sliver, ALL), part_id="S", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    with pytest.raises(DrawingError, match=r"expected the outline to be one of mold-line, die, found 'oml'"):
        drawn_part(square(), ALL, "oml")


def test_outline_without_flanges_is_all_cut_edges():
    part = drawn_part(square(), (), "die")
    piece = drawn_piece(part, part_id="C", sheet_thickness_mm=T, pin_diameter_mm=3.0)
    assert not any(r.flanged for r in piece.geometry.runs) and piece.geometry.relief_points == ()
    blank = Polygon(blank_of(piece).outer)
    assert blank.area == pytest.approx(100.0 * 100.0, rel=1e-12)  # every edge is cut: the blank is the web
    die_ring = LineString(Polygon(piece.geometry.outline).exterior.coords)
    assert LineString(blank.exterior.coords).hausdorff_distance(die_ring) <= 1e-9
