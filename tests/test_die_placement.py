"""Holes and marks on the demo rib's dies (``diegen.die.placement``), in 2D, without the kernel.

References: the die's sections are shapely ``buffer``s of its mold line inward by
the wall's inset (plane geometry of the die wall, see ``diegen/die/die_input.py``):
``H·tan α`` at the bottom face, and the top-edge setback ``r(1 + sin α)/cos α`` of
an arc of radius r tangent to the top face and to a wall leaning by α (the
centre lies r from both: c·cos α − r·sin α = r).  Distances are shapely's.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import replace

import pytest
from shapely.geometry import LineString, Point, Polygon
from shapely.ops import nearest_points, polylabel, unary_union

from diegen.die.die_input import DieBore, DieInput, DiePin, DieRun
from diegen.die.model import bottom_inset_mm, outline_model, section
from diegen.die.outline import pieces_to_polygon
from diegen.die.placement import check_placement, engraving_marks
from diegen.die.settings import DEFAULT_SETTINGS
from diegen.errors import GeometryError, NoRoomForMarks

WALL = DEFAULT_SETTINGS.min_wall_mm
# How far either side of a clearance limit the probes stand (mm): well above the outline model's sampling
# tolerance (0.001 mm) and the 128-sided circles the checks use (r·(1 − cos π/128) < 0.001 mm at r = 3 mm).
PROBE_MM = 0.05


def mold(die: DieInput) -> Polygon:
    return Polygon([p for run in die.outline for p in run.points[:-1]])


def inward(die: DieInput, inset_mm: float) -> Polygon:
    return mold(die).buffer(-inset_mm, join_style="mitre", mitre_limit=10.0)


def top_setback(die: DieInput) -> float:
    a = math.radians(die.undercut_deg)
    return die.top_radius_mm * (1 + math.sin(a)) / math.cos(a)


def bottom_inset(die: DieInput) -> float:
    return die.height_mm * math.tan(math.radians(die.undercut_deg))


def smallest_section(die: DieInput) -> Polygon:
    """What every horizontal section contains (no flutes on the dies these probes use)."""
    return inward(die, max(top_setback(die), bottom_inset(die)))


@pytest.fixture(scope="module")
def bare(dies) -> DieInput:
    """The center die without holes, pins or flutes: a clean plate to probe."""
    return replace(dies["center"], pins=(), bores=(), flutes=(), engraving=())


@pytest.fixture(scope="module")
def bare_model(bare):
    return outline_model(bare)


def test_setback_formula_matches_the_die_model(bare) -> None:
    """The plane-geometry setback written here is the one the die model uses (a check on the reference)."""
    from diegen.die.model import top_face_inset_mm

    assert top_face_inset_mm(bare) == pytest.approx(top_setback(bare), rel=1e-12)
    assert bottom_inset_mm(bare) == pytest.approx(bottom_inset(bare), rel=1e-12)


@pytest.mark.parametrize("name", ["nose", "center", "tail"])
def test_demo_holes_keep_the_wall(dies, name: str) -> None:
    """The analysis's pins and bores pass the check, and shapely agrees: each footprint (bores with their
    rounded top edge) stays ``min_wall`` inside the smallest section and away from the others."""
    die = dies[name]
    check_placement(die, outline_model(die), DEFAULT_SETTINGS)
    inner = inward(die, max(top_setback(die), bottom_inset(die)))
    if die.flutes:  # the grooves reach in by their depth at most, from the bottom inset
        inner = inner.intersection(inward(die, bottom_inset(die) + max(f.depth_mm for f in die.flutes)))
    shapes = [Point(p.x, p.y).buffer(p.d / 2) for p in die.pins]
    shapes += [Point(b.x, b.y).buffer(b.d / 2 + die.bore_radius_mm) for b in die.bores]
    assert shapes
    for i, shape in enumerate(shapes):
        assert inner.exterior.distance(shape) >= WALL and inner.contains(shape), (name, i)
        for other in shapes[i + 1:]:
            assert shape.distance(other) >= WALL, (name, i)


def _probe_points(die: DieInput, clearance: float) -> tuple[tuple[float, float], tuple[float, float]]:
    """Two points on the line from the section's pole of inaccessibility to the nearest edge point, whose distance
    to the edge is ``clearance`` + and − PROBE_MM (on that line the distance to the edge is the distance to the
    nearest point, by the triangle inequality)."""
    inner = smallest_section(die)
    pole = polylabel(inner, tolerance=0.01)
    edge = nearest_points(inner.exterior, pole)[0]
    line = LineString([edge, pole])
    assert line.length > clearance + 1.0, "the probe plate is too small"
    return (tuple(line.interpolate(clearance + PROBE_MM).coords[0]),
            tuple(line.interpolate(clearance - PROBE_MM).coords[0]))


def test_pin_near_the_edge_is_refused_just_inside_the_wall(bare, bare_model) -> None:
    d = 3.2
    ok, close = _probe_points(bare, d / 2 + WALL)
    check_placement(replace(bare, pins=(DiePin(*ok, d, 10.0),)), bare_model, DEFAULT_SETTINGS)
    with pytest.raises(GeometryError,
                       match=rf"{bare.part_id}: pin hole at .* closer than {WALL:g} mm to the die's edge"):
        check_placement(replace(bare, pins=(DiePin(*close, d, 10.0),)), bare_model, DEFAULT_SETTINGS)


def test_bore_counts_its_rounded_top_edge(bare, bare_model) -> None:
    d = 30.0
    reach = d / 2 + bare.bore_radius_mm
    ok, close = _probe_points(bare, reach + WALL)
    check_placement(replace(bare, bores=(DieBore(*ok, d),)), bare_model, DEFAULT_SETTINGS)
    with pytest.raises(GeometryError, match=r"bore at .* closer than"):
        check_placement(replace(bare, bores=(DieBore(*close, d),)), bare_model, DEFAULT_SETTINGS)


def test_two_bores_keep_the_wall_between_them(bare, bare_model) -> None:
    d = 20.0
    reach = d / 2 + bare.bore_radius_mm
    cx, cy = polylabel(smallest_section(bare), tolerance=0.01).coords[0]
    for gap, refused in ((WALL + PROBE_MM, False), (WALL - PROBE_MM, True)):
        step = 2 * reach + gap
        pair = (DieBore(cx - step / 2, cy, d), DieBore(cx + step / 2, cy, d))
        discs = [Point(b.x, b.y).buffer(reach) for b in pair]
        assert smallest_section(bare).buffer(-WALL - 0.1).contains(unary_union(discs)), "probe off the plate"
        die = replace(bare, bores=pair)
        if refused:
            with pytest.raises(GeometryError, match=r"are closer than .* move them apart"):
                check_placement(die, bare_model, DEFAULT_SETTINGS)
        else:
            check_placement(die, bare_model, DEFAULT_SETTINGS)


def test_pin_depths(bare, bare_model) -> None:
    """A pin hole is blind with at least ``min_wall`` under it, or goes through; never deeper than the block."""
    x, y = polylabel(smallest_section(bare), tolerance=0.01).coords[0]
    h = bare.height_mm
    for depth in (10.0, h - WALL - PROBE_MM, h):
        check_placement(replace(bare, pins=(DiePin(x, y, 3.0, depth),)), bare_model, DEFAULT_SETTINGS)
    with pytest.raises(GeometryError, match="drill it through or less deep"):
        check_placement(replace(bare, pins=(DiePin(x, y, 3.0, h - WALL + PROBE_MM),)), bare_model, DEFAULT_SETTINGS)
    with pytest.raises(GeometryError, match="deeper than"):
        check_placement(replace(bare, pins=(DiePin(x, y, 3.0, h + PROBE_MM),)), bare_model, DEFAULT_SETTINGS)


# ---------------------------------------------------------------- engraving
def bottom_face(die: DieInput, model) -> Polygon:
    """The bottom face: shapely's inward buffer, less the flutes' grooves at full depth (these taken from the
    die model's own bottom section, which ``test_die_laminate`` checks against shapely)."""
    face = inward(die, bottom_inset(die))
    if die.flutes:
        face = face.intersection(pieces_to_polygon(section(die, model, bottom_inset_mm(die), die.height_mm)))
    return face


@pytest.fixture(scope="module")
def marked(dies):
    """(die, marks) of each demo die."""
    out = {}
    for name, die in dies.items():
        out[name] = (die, engraving_marks(die, outline_model(die), DEFAULT_SETTINGS))
    return out


@pytest.mark.parametrize("name", ["nose", "center", "tail"])
def test_marks_lie_inside_the_bottom_face_clear_of_the_holes(marked, dies, name: str) -> None:
    die, marks = marked[name]
    assert len(marks) > 10 and all(m.is_valid and m.area > 0 for m in marks)
    face = bottom_face(die, outline_model(die))
    everything = unary_union(marks)
    assert face.buffer(-WALL).contains(everything), name
    for bore in die.bores:
        assert everything.distance(Point(bore.x, bore.y).buffer(bore.d / 2)) >= WALL, (name, bore)
    for pin in die.pins:  # blind pins from the top: material under them and above the marks
        reaches_marks = pin.depth >= die.height_mm - DEFAULT_SETTINGS.engrave_depth_mm - WALL
        if reaches_marks:
            assert everything.distance(Point(pin.x, pin.y).buffer(pin.d / 2)) >= WALL, (name, pin)
        else:
            assert die.height_mm - pin.depth - DEFAULT_SETTINGS.engrave_depth_mm >= WALL


def test_marks_clear_a_through_pin(dies) -> None:
    """A pin drilled through reaches the bottom face: the marks keep the wall from it, wherever it stands."""
    die = dies["tail"]
    first = unary_union(engraving_marks(die, outline_model(die), DEFAULT_SETTINGS))
    x, y = first.representative_point().coords[0]  # right on a mark
    pinned = replace(die, pins=(DiePin(x, y, 3.0, die.height_mm),))
    moved = unary_union(engraving_marks(pinned, outline_model(pinned), DEFAULT_SETTINGS))
    assert moved.distance(Point(x, y).buffer(1.5)) >= WALL


@pytest.mark.parametrize("name", ["nose", "center", "tail"])
def test_arrow_points_to_the_leading_edge_under_the_text(marked, name: str) -> None:
    """The last mark is the arrow: its tip is its leftmost point (towards −X, the leading edge), on its
    centre line, and it lies beyond the text in +Y (under the text once the die is turned over about X)."""
    _, marks = marked[name]
    arrow, text = marks[-1], unary_union(marks[:-1])
    xs, ys = zip(*arrow.exterior.coords[:-1])
    tip = min(range(len(xs)), key=xs.__getitem__)
    assert sorted(xs)[1] - xs[tip] > 0.1 * (max(xs) - min(xs)), "one tip"
    assert ys[tip] == pytest.approx((max(ys) + min(ys)) / 2, abs=1e-9)
    assert arrow.bounds[1] > text.bounds[3]


def test_nothing_to_engrave(dies) -> None:
    die = replace(dies["tail"], engraving=("", "  "))
    assert engraving_marks(die, outline_model(die), DEFAULT_SETTINGS) == []


def test_no_room_for_a_long_line(dies) -> None:
    die = replace(dies["tail"], engraving=("W" * 200,))
    with pytest.raises(NoRoomForMarks, match=f"die {die.part_id}: no room on the bottom face"):
        engraving_marks(die, outline_model(die), DEFAULT_SETTINGS)


def test_small_square_die() -> None:
    """A 40 mm square die (one line run per side): marks fit, inside its 1 mm-inset bottom less the wall."""
    s = 40.0
    corners = ((0.0, 0.0), (s, 0.0), (s, s), (0.0, s), (0.0, 0.0))
    runs = tuple(DieRun("line", (a, b)) for a, b in itertools.pairwise(corners))
    die = DieInput("SQ", runs, 12.0, 1.0, 3.0, 1.5, engraving=("SQ",))
    marks = unary_union(engraving_marks(die, outline_model(die), DEFAULT_SETTINGS))
    inset = 12.0 * math.tan(math.radians(3.0))
    square = Polygon([(inset, inset), (s - inset, inset), (s - inset, s - inset), (inset, s - inset)])
    assert square.buffer(-WALL, join_style="mitre").contains(marks)
