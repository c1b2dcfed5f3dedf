"""Flange runs of a drawn part with heights of their own (``flanges: [{..., height: H}]``).

Checks against outside sources:

* each flanged run's developed width from FAA-H-8083-31 ch. 4, recomputed here: BA = θ(R + kT), SB = R + T for a
  90° bend, developed = BA + (H − SB); the blank edge stands that less the die radius's tangent inset R_die·tan(θ/2)
  outside the die outline (the die's top edge to the web's bend line: the tangent length of a circular arc);
* the contoured-flange strain mid-way round a convex plan arc of radius ρ against the closed form w/(ρ + w), w the
  run's own developed width (a flange of width w on a circle of radius ρ has its edge go from ρ + w to ρ);
* areas by shapely (GEOS) against the closed form of a rectangle grown on two sides;
* the die height: whole layers of stock for the tallest flange plus 3 mm clearance (common practice, no source:
  the clearance lets the rubber wrap the die).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from shapely.geometry import Point, Polygon
from test_parts import SHARED, _parse, only_piece, part_spec

from diegen import api
from diegen.die.from_analysis import die_input
from diegen.die.model import flute_scale, loft_sections, outline_model
from diegen.die.outline import flute_taper_ratio
from diegen.reports.sheet import shop_sheet

T, R, STOCK = 0.8, 3.0, 19.0  # SHARED: 0.8 mm sheet, 3 mm bend radius, 12 mm flange, 19 mm die stock


def developed(height: float, k: float, t: float = T, radius: float = R) -> float:
    """FAA-H-8083-31 ch. 4: BA = θ(R + kT) with θ = π/2, SB = R + T, developed = BA + (H − SB)."""
    return (math.pi / 2) * (radius + k * t) + (height - (radius + t))


def tangent_inset(piece) -> float:
    sb = piece.springback
    return sb.die_radius_mm * math.tan(math.radians(sb.die_angle_deg) / 2)


def test_a_rectangle_flanged_on_two_opposite_edges_at_two_heights() -> None:
    """Die outline 240 × 160 mm (``is: die``): the bottom edge flanged 8 mm high (its own height), the top edge at
    the flange section's 12 mm, the ends cut.  Each flanged side of the blank stands that run's developed width less
    the tangent inset beyond the die outline; the cut ends are flush; the area is 240 × (160 + d₁ + d₂)."""
    spec = part_spec("{points: [[0, 0], [240, 0], [240, 160], [0, 160]], is: die}",
                     "flanges: [{from: [0, 0], to: [240, 0], height: 8}, {from: [240, 160], to: [0, 160]}]\n")
    _, piece = only_piece(spec)
    k = piece.layout.k_factor
    inset = tangent_inset(piece)
    d_low, d_high = developed(8.0, k) - inset, developed(12.0, k) - inset
    xs, ys = zip(*piece.blank.outer)
    assert min(ys) == pytest.approx(-d_low, abs=1e-6)
    assert max(ys) == pytest.approx(160.0 + d_high, abs=1e-6)
    assert (min(xs), max(xs)) == pytest.approx((0.0, 240.0), abs=1e-6)  # cut ends flush
    assert Polygon(piece.blank.outer).area == pytest.approx(240.0 * (160.0 + d_low + d_high), rel=1e-9)
    assert [h.height_mm for h in piece.shapes] == [8.0, 12.0]
    assert [h.layout.developed_width_mm for h in piece.shapes] == pytest.approx(
        [developed(8.0, k), developed(12.0, k)], rel=1e-12)
    assert piece.piece.relief_points == ()  # each flanged edge meets only cut edges
    # one press leg per height (the press check folds each flange of its own height)
    assert sorted(r.leg.leg_mm for r in piece.press.legs if r.leg.kind == "perimeter") == [8.0, 12.0]


STADIUM = "{points: [[0, 0], [200, 0, 1], [200, 200], [0, 200, 1]], is: die}"  # half circles of radius 100 at each end


def stadium(right: float, left: float, more: str = "") -> str:
    """Flange runs of the stadium: the bottom straight at the flange section's height, the right half circle
    ``right`` mm high, the left one ``left`` mm high, the top straight cut."""
    return ("flanges: [{from: [0, 0], to: [200, 0]}, "
            f"{{from: [200, 0], to: [200, 200], height: {right}}}, {{from: [0, 200], to: [0, 0], height: {left}}}]\n"
            + more)


def test_strain_on_each_arc_follows_its_own_flange_width() -> None:
    """Mid-way round each half circle (plan radius ρ = 100 mm, the die outline) the shrink is w/(ρ + w) with w the
    run's own developed width: 20 mm high on the right, 8 mm on the left."""
    spec = part_spec(STADIUM, stadium(20, 8, "relief: none\n"))
    _, piece = only_piece(spec)
    k = piece.layout.k_factor
    by_height = {run.height_mm: run for run in piece.runs}
    assert sorted(by_height) == [8.0, 20.0]
    for height in (8.0, 20.0):
        run = by_height[height]
        w = developed(height, k)
        mid = len(run.profile.strain) // 2
        assert -float(run.profile.strain[mid]) == pytest.approx(w / (100.0 + w), rel=0.01)
        limit = next(h.shrink_limit for h in piece.shapes if h.height_mm == height)
        assert run.shrink_limit == limit
    # the lower flange's wrinkle limit is the higher one (it scales with (t/h)², relief.wrinkle_limit)
    limits = {h.height_mm: h.shrink_limit for h in piece.shapes}
    assert limits[8.0] >= limits[12.0] >= limits[20.0]


def test_the_blank_steps_where_two_heights_meet_without_a_corner() -> None:
    """At (200, 0) the bottom straight (12 mm) runs smoothly into the right half circle (20 mm): the blank edge
    steps along the normal there, from the 12 mm flange's edge to the 20 mm one's; no relief hole (design choice)."""
    spec = part_spec(STADIUM, stadium(20, 8))
    _, piece = only_piece(spec)
    k, inset = piece.layout.k_factor, tangent_inset(piece)
    d12, d20 = developed(12.0, k) - inset, developed(20.0, k) - inset
    blank = Polygon(piece.blank.outer, piece.blank.inner)
    assert piece.piece.relief_points == ()
    assert not piece.blank.cut_circles  # no relief holes (and no holes)
    middle = -(d12 + d20) / 2.0
    assert not blank.contains(Point(199.5, middle))  # beside the lower flange: beyond its edge
    assert blank.contains(Point(200.5, middle))  # beside the higher flange: still flange
    assert blank.exterior.distance(Point(200.0, -d12)) == pytest.approx(0.0, abs=1e-6)  # the step's two ends
    assert blank.exterior.distance(Point(200.0, -d20)) == pytest.approx(0.0, abs=1e-6)
    _, ys = zip(*piece.blank.outer)
    assert min(ys) == pytest.approx(-d20, abs=1e-3)  # the arc's lowest point (its start) carries the higher flange


def test_the_die_stands_on_the_tallest_flange_and_its_flutes_reach_each_flange_edge() -> None:
    """Die height: whole 19 mm layers for the tallest flange + 3 mm; each flute tapers from nothing at the top to
    full depth at its own flange's edge (8 or 20 mm down), and the die's sections hold that."""
    spec = part_spec(STADIUM, stadium(20, 8, "relief: flutes\n"))
    analysis, piece = only_piece(spec)
    layers = math.ceil((20.0 + 3.0) / STOCK)
    assert (piece.die_layers, piece.die_height_mm) == (layers, layers * STOCK)
    assert piece.flutes, "both half circles shrink past their limits"
    die = die_input(analysis, piece)
    assert die.height_mm == layers * STOCK
    assert die.flute_length_mm == 20.0  # the tallest fluted flange
    heights = {f.length_mm for f in die.flutes}
    assert heights == {8.0, 20.0}
    for flute in die.flutes:  # the flute in the 8 mm run is at full depth 8 mm down, half depth 4 mm down
        own = flute.length_mm
        ratio = flute_taper_ratio(die.flute_length_mm, flute)
        assert min(flute_scale(die, own) * ratio, 1.0) == pytest.approx(1.0)
        assert min(flute_scale(die, own / 2) * ratio, 1.0) == pytest.approx(0.5)
    _, wall = loft_sections(die)
    assert {8.0, 20.0} <= {round(s.depth_mm, 9) for s in wall}  # the ruled wall has a section where each taper ends
    flute_legs = sorted(r.leg.leg_mm for r in piece.press.legs if r.leg.kind == "flute")
    assert flute_legs == [8.0, 20.0]
    # one height on every run: the die stands on it alone (19 mm, one layer, for 12 mm + 3 mm)
    _, plain = only_piece(part_spec(STADIUM, "relief: flutes\n"))
    assert (plain.die_layers, plain.die_height_mm) == (1, STOCK)


def test_reports_state_each_runs_height(tmp_path: Path) -> None:
    spec_file = tmp_path / "runs.yaml"
    spec_file.write_text(SHARED + f"outline: {STADIUM}\n" + stadium(20, 8, "relief: flutes\n"))
    spec = api.load(spec_file)
    analysis = api.analyse(spec)
    document, text = api.report_json(analysis), api.report_text(analysis)
    (piece_doc,) = document["parts"]
    runs = piece_doc["flange"]["runs"]
    assert sorted(r["height_mm"] for r in runs) == [8.0, 12.0, 20.0]
    assert all(r["developed_width_mm"] > 0 and r["shrink_limit"] > 0 for r in runs)
    json.dumps(document)
    assert "8.0 mm high" in text and "20.0 mm high" in text
    assert piece_doc["die"]["flute_lengths_mm"] == [8.0, 20.0]  # both half circles carry flutes
    (rib,) = analysis.ribs if hasattr(analysis, "ribs") else (analysis,)
    sheet = shop_sheet(rib, rib.pieces[0])
    assert "flange runs of their own heights, 8.00 mm" in sheet and "20.00 mm" in sheet
    assert "the blank's edge steps where two heights meet" in sheet


def test_one_height_everywhere_has_no_per_run_report() -> None:
    spec = part_spec(STADIUM)
    _, piece = only_piece(spec)
    assert not piece.mixed_heights


def test_a_run_height_in_inches_is_read_in_the_spec_units() -> None:
    text = SHARED.replace("units: mm", "units: in").replace("{height: 12, bend_radius: 3}",
                                                           "{height: 0.5, bend_radius: 0.125}")
    text = text.replace("thickness: 0.8}", "thickness: 0.032}").replace("stock_thickness: 19", "stock_thickness: 0.75")
    text = text.replace("box: [400, 300]", "box: [16, 12]").replace("thickness: 60}", "thickness: 2.5}")
    text = text.replace("cutter_diameter: 6", "cutter_diameter: 0.25")
    spec = _parse(text + "outline: {points: [[0, 0], [8, 0], [8, 6], [0, 6]], is: die}\n"
                  "flanges: [{from: [0, 0], to: [8, 0], height: 0.375}, {from: [8, 6], to: [0, 6]}]\n")
    _, piece = only_piece(spec)
    assert [h.height_mm for h in piece.shapes] == pytest.approx([0.375 * 25.4, 0.5 * 25.4], rel=1e-12)


def test_a_run_height_that_looks_written_in_the_other_unit_is_flagged() -> None:
    """A 0.5 (mm) flange run in a millimetre spec looks like half an inch: the same warning as ``flange.height``
    (usual range 3–100 mm, common practice, no source)."""
    spec = part_spec("{points: [[0, 0], [240, 0], [240, 160], [0, 160]], is: die}",
                     "flanges: [{from: [0, 0], to: [240, 0], height: 0.5}, {from: [240, 160], to: [0, 160]}]\n")
    assert any(w.key == "flanges[0].height" for w in spec.unit_warnings)


def test_a_mirrored_part_keeps_each_runs_height_on_its_edge() -> None:
    """Every flange bends up: the die is the drawing's mirror image (x → −x); the 8 mm run stays on the bottom edge."""
    spec = part_spec("{points: [[0, 0], [240, 0], [240, 160], [0, 160]], is: die}",
                     "flanges: [{from: [0, 0], to: [240, 0], height: 8, direction: up}, "
                     "{from: [240, 160], to: [0, 160], direction: up}]\n")
    _, piece = only_piece(spec)
    k, inset = piece.layout.k_factor, tangent_inset(piece)
    xs, ys = zip(*piece.blank.outer)
    assert (min(xs), max(xs)) == pytest.approx((-240.0, 0.0), abs=1e-6)
    assert min(ys) == pytest.approx(-(developed(8.0, k) - inset), abs=1e-6)
    assert max(ys) == pytest.approx(160.0 + developed(12.0, k) - inset, abs=1e-6)


def test_flutes_and_notches_are_sized_by_their_own_runs_flange() -> None:
    """Flutes: at most a quarter of their own flange deep (``relief.flute_size``, common practice, no source);
    notches: cut from their own run's blank edge (the blank edge right beside a notch is cut away)."""
    fluted = part_spec(STADIUM, stadium(20, 8, "relief: flutes\n"))
    _, piece = only_piece(fluted)
    by_side = {side: [f for f in piece.flutes if (f.s_mm < piece.piece.length_mm / 2) == (side == "right")]
               for side in ("right", "left")}
    assert by_side["right"] and by_side["left"]
    assert max(f.depth_mm for f in by_side["left"]) <= 0.25 * 8.0 + 1e-9
    assert max(f.depth_mm for f in by_side["right"]) > 0.25 * 8.0  # the 20 mm flange takes deeper flutes
    notched = part_spec(STADIUM, stadium(20, 8, "relief: notches\n"))
    _, piece = only_piece(notched)
    assert piece.notches
    k, inset = piece.layout.k_factor, tangent_inset(piece)
    ring = Polygon(piece.piece.outline).exterior
    blank = Polygon(piece.blank.outer, piece.blank.inner)
    for notch in piece.notches:
        p = ring.interpolate(notch.s_mm)
        centre = (200.0, 100.0) if p.x > 100.0 else (0.0, 100.0)  # the half circle's centre
        height = 20.0 if p.x > 100.0 else 8.0
        d = developed(height, k) - inset
        u = ((p.x - centre[0]) / 100.0, (p.y - centre[1]) / 100.0)  # outward normal of the half circle
        just_inside_edge = Point(p.x + u[0] * (d - 0.2), p.y + u[1] * (d - 0.2))
        assert not blank.contains(just_inside_edge), (notch.s_mm, height)


def test_each_flute_in_the_die_section_is_as_deep_as_its_own_taper() -> None:
    """The die's horizontal section 4 mm below the top face (no wall inset): a flute in the 8 mm flange is sunk to
    half its depth, one in the 20 mm flange to a fifth (the taper is linear from the top face to its flange's edge);
    measured as the largest distance of the groove's points from the die outline (shapely)."""
    spec = part_spec(STADIUM, stadium(20, 8, "relief: flutes\n"))
    analysis, piece = only_piece(spec)
    die = die_input(analysis, piece)
    model = outline_model(die)
    pieces = model.offset(0.0, flute_scale=flute_scale(die, 4.0))
    ring = Polygon(piece.piece.outline).exterior
    grooves = [p for p, span in zip(pieces, model.spans, strict=True) if span.kind == "groove"]
    assert len(grooves) == len(die.flutes)
    seen = set()
    for groove, g in zip(grooves, model.grooves, strict=True):
        sink = max(ring.distance(Point(p)) for p in groove.points)
        own = die.flute_length_mm / g.taper_ratio  # the flute's own taper length
        # 2 %: the groove is sampled at fixed fractions, not necessarily at its deepest point (0.5 against 0.2)
        assert sink == pytest.approx(g.depth * min(4.0 / own, 1.0), rel=0.02)
        seen.add(round(own, 6))
    assert seen == {8.0, 20.0}


def test_each_run_is_judged_against_its_own_wrinkle_limit() -> None:
    """With no relief the residual is the shrink itself.  The wrinkle limits scale as (t/h)² (the plastic buckling
    strain of a plate with one free edge: E. Z. Stowell, NACA TN 1556, 1948; the project's model applies it between
    its bounds): 12 mm against 20 mm gives (20/12)².  The verdict takes the run whose shrink is the largest fraction
    of its own limit, and reports that run's shrink and limit."""
    spec = part_spec(STADIUM, stadium(20, 8, "relief: none\n"))
    _, piece = only_piece(spec)
    limits = {h.height_mm: h.shrink_limit for h in piece.shapes}
    assert limits[12.0] / limits[20.0] == pytest.approx((20.0 / 12.0) ** 2, rel=1e-12)
    worst = max(piece.runs, key=lambda r: float(-r.profile.strain.min()) / r.shrink_limit)
    assert piece.flange.shrink_limit == worst.shrink_limit
    assert piece.flange.residual_shrink == pytest.approx(float(-worst.profile.strain.min()), rel=1e-12)
    assert worst.height_mm == 20.0  # the taller flange on the same plan radius: more shrink, lower limit


def test_a_printed_die_stands_on_the_tallest_flange() -> None:
    """A printed die is printed to the tallest flange + 3 mm, in whole millimetres, where that is more than its
    stock thickness (20 + 3 = 23 mm against 10 mm)."""
    text = SHARED.replace("die: {material: solid-surface, stock_thickness: 19, cutter_diameter: 6}",
                          "die: {material: pla, stock_thickness: 10, cutter_diameter: 6}")
    spec = _parse(text + f"outline: {STADIUM}\n" + stadium(20, 8))
    _, piece = only_piece(spec)
    assert (piece.die_layers, piece.die_height_mm) == (1, 23.0)
    assert any(w.code == "print-height-raised" and "tallest flange height 20.0 mm" in w.message
               for w in piece.warnings)


def test_a_part_whose_only_flange_has_its_own_height() -> None:
    """One flanged edge 8 mm high (the flange section says 12 mm), the rest cut: the blank stands that run's
    developed width less the tangent inset out (FAA-H-8083-31 ch. 4), the reports name the 8 mm height."""
    spec = part_spec("{points: [[0, 0], [240, 0], [240, 160], [0, 160]], is: die}",
                     "flanges: [{from: [0, 0], to: [240, 0], height: 8}]\n")
    analysis, piece = only_piece(spec)
    k, inset = piece.layout.k_factor, tangent_inset(piece)
    _, ys = zip(*piece.blank.outer)
    assert (min(ys), max(ys)) == pytest.approx((-(developed(8.0, k) - inset), 160.0), abs=1e-6)
    assert piece.mixed_heights and [h.height_mm for h in piece.shapes] == [8.0]
    assert "8.0 mm high" in api.report_text(analysis)
    assert (piece.die_layers, piece.die_height_mm) == (1, STOCK)
