"""Drawn parts (``kind: part``) through the whole pipeline: spec, analysis, blank, die, build.

Checks against outside sources:

* the die outline of a drawn mold line against shapely's (GEOS) inward buffer of the mold line, the drawn mold line
  itself flattened by ezdxf's own path tools (``ezdxf.path.make_path(...).flattening``), not by our reader;
* the blank against Steiner's formula for the area of an outer parallel body of a convex figure,
  A(d) = A + P·d + π·d², with the flange's developed width from FAA-H-8083-31 ch. 4 (BA = θ(R + kT), SB = R + T);
* the contoured-flange strain at each corner of a rounded rectangle with concave corners against the closed forms
  e = w/(ρ + w) (shrink on a convex plan radius ρ) and e = w/(ρ − w) (stretch on a concave one), derived from the
  plan geometry of a flange of width w (the edge circle goes from ρ + w to ρ, or from ρ − w to ρ);
* STEP read back and checked by the kernel's own analyser, the STL by trimesh (watertight), the DXF by ezdxf's
  auditor.
"""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import ezdxf
import numpy as np
import pypdf
import pytest
from ezdxf.path import make_path
from shapely.geometry import LineString, Point, Polygon
from testing import SPECS, assert_valid_ccw_outline, loop_distance

from diegen import api
from diegen.cli import main
from diegen.errors import SpecError
from diegen.spec import parse_spec

DEMO_PARTS = [SPECS / "demo-former.yaml", SPECS / "demo-nose-rib.yaml", SPECS / "demo-gusset.yaml"]
QUARTER = math.tan(math.radians(90.0) / 4.0)  # DXF bulge of a quarter circle, tan(θ/4)

SHARED = """diegen: 1
kind: part
id: X1
units: mm
sheet: {alloy: 2024-T3, thickness: 0.8}
flange: {height: 12, bend_radius: 3}
die: {material: solid-surface, stock_thickness: 19, cutter_diameter: 6}
press: {force: 20 ton, box: [400, 300], rubber: {durometer: 55, thickness: 60}}
"""


def _parse(text: str, spec_dir: Path = SPECS):
    return parse_spec(text, "part.yaml", spec_dir)


def part_spec(outline: str, more: str = ""):
    return _parse(SHARED + f"outline: {outline}\n" + more)


def only_piece(spec):
    analysis = api.analyse(spec)
    (piece,) = analysis.pieces
    return analysis, piece


# -- the demo parts ------------------------------------------------------------------------------------------------


@pytest.mark.parametrize("path", DEMO_PARTS, ids=lambda p: p.stem)
def test_the_demo_parts_read_analyse_and_pass_check(path: Path, capsys) -> None:
    spec = api.load(path)
    assert spec.kind == "part" and spec.drawn is not None
    _, piece = only_piece(spec)
    assert piece.die is not None and piece.die.refusal is None
    assert_valid_ccw_outline(piece.piece.outline, f"{path.stem} die outline")
    assert main(["check", str(path)]) == 0
    assert f"part {spec.id}" in capsys.readouterr().out


def test_demo_former_die_is_the_dxf_mold_line_offset_inward_by_the_sheet() -> None:
    """Issue check: the die outline equals shapely's inward buffer of the drawn mold line by the sheet, within
    0.05 mm; the mold line here is flattened by ezdxf itself from the drawing's LWPOLYLINE (bulges)."""
    spec = api.load(SPECS / "demo-former.yaml")
    doc = ezdxf.readfile(SPECS / "drawings" / "bw418-former-f5.dxf")
    (outline,) = doc.modelspace().query('LWPOLYLINE[layer=="OUTLINE"]')
    mold = [(v.x, v.y) for v in make_path(outline).flattening(0.001)]
    expected = Polygon(mold).buffer(-spec.shared.sheet.thickness_mm, quad_segs=256)
    _, piece = only_piece(spec)
    plain = [p for run in piece.piece.plain_runs for p in run.points[:-1]]  # the outline without its joggle
    assert loop_distance(plain, list(expected.exterior.coords)[:-1], step_mm=0.5) <= 0.05
    assert Polygon(plain).area == pytest.approx(expected.area, rel=2e-4)
    # the flanged hole: Ø100 drawn, so the die bore is d + 2t and the pilot smaller than the hole (it flanges out)
    (hole,) = piece.holes
    assert hole.d_mm == pytest.approx(100.0) and hole.bore_d_mm == pytest.approx(100.0 + 2 * 0.8)
    assert hole.pilot_d_mm < hole.d_mm
    assert [(p.x, p.y) for p in piece.piece.pins] == [(-45.0, 40.0), (45.0, 40.0)]  # as drawn on layer PINS


def test_an_outline_given_as_the_die_is_taken_as_it_is() -> None:
    spec = part_spec("{points: [[0, 0], [200, 0], [200, 120], [0, 120]], is: die}")
    _, piece = only_piece(spec)
    assert Polygon(piece.piece.outline).area == pytest.approx(200 * 120, rel=1e-12)
    assert len(piece.piece.relief_points) == 4  # four flanged corners, each relieved in the blank


# -- strain and blank against closed forms ---------------------------------------------------------------------


def rounded_with_concave_corners(width: float = 300.0, height: float = 200.0, convex: float = 40.0,
                                 concave: float = 60.0) -> str:
    """Points with bulges: bottom corners rounded convex to ``convex``, top corners cut concave by quarter circles
    of radius ``concave`` centred on the rectangle's corners (counter-clockwise)."""
    w, h, a, c = width, height, convex, concave
    pts = [(a, 0, 0.0), (w - a, 0, QUARTER), (w, a, 0.0), (w, h - c, -QUARTER), (w - c, h, 0.0), (c, h, -QUARTER),
           (0, h - c, 0.0), (0, a, QUARTER)]
    return "[" + ", ".join(f"[{x:g}, {y:g}, {b:.12f}]" for x, y, b in pts) + "]"


def test_strain_at_each_corner_of_a_rounded_rectangle_with_concave_corners_matches_the_closed_forms() -> None:
    """Issue check: mid-way round each convex corner the shrink is w/(ρ + w), ρ = 40 − t (the die is the mold
    line less the sheet); mid-way round each concave corner the stretch is w/(ρ − w), ρ = 60 + t; w is the
    flange's developed width (FAA-H-8083-31 ch. 4, recomputed here)."""
    t, height, radius = 0.8, 12.0, 3.0
    spec = part_spec(f"{{points: {rounded_with_concave_corners()}, is: mold-line}}")
    _, piece = only_piece(spec)
    k = piece.layout.k_factor
    w = (math.pi / 2) * (radius + k * t) + (height - (radius + t))  # BA + (H − SB)
    assert piece.layout.developed_width_mm == pytest.approx(w, rel=1e-9)
    samples = []  # (x, y, strain) of every strain sample along the flanged runs
    for run in piece.runs:
        pts = np.asarray(piece.piece.plain_runs[run.run_index].points)
        along = np.r_[0.0, np.cumsum(np.hypot(*np.diff(pts, axis=0).T))]
        s = np.asarray(run.profile.s_mm)
        samples += zip(np.interp(s, along, pts[:, 0]), np.interp(s, along, pts[:, 1]), run.profile.strain)
    samples = np.asarray(samples)

    def strain_at(x: float, y: float) -> float:
        return float(samples[np.argmin(np.hypot(samples[:, 0] - x, samples[:, 1] - y)), 2])

    half = math.sqrt(0.5)
    for cx in (40.0, 260.0):  # convex corners: centre (cx, 40), die radius 40 − t, shrink (negative) w/(ρ + w)
        rho = 40.0 - t
        x = cx + (rho * half if cx > 150 else -rho * half)
        assert -strain_at(x, 40.0 - rho * half) == pytest.approx(w / (rho + w), rel=0.01)
    for cx in (0.0, 300.0):  # concave corners: centre (cx, 200), die radius 60 + t, stretch (positive) w/(ρ − w)
        rho = 60.0 + t
        x = cx + (rho * half if cx < 150 else -rho * half)
        assert strain_at(x, 200.0 - rho * half) == pytest.approx(w / (rho - w), rel=0.01)
    # concave corners stretch the flange past the 2024-T3 limit: the verdict says so, never "formable"
    assert piece.flange.verdict == "not-formable"
    assert any(f.code == "stretch-over-limit" for f in piece.warnings)


def test_the_blank_of_a_convex_part_is_the_die_offset_by_the_developed_flange() -> None:
    """Steiner's formula for an outer parallel body of a convex figure, A + P·d + π·d², with d the developed flange
    width less the die radius's tangent inset R_die·tan(θ_die/2) (the die's top edge to the web's bend line)."""
    spec = part_spec("{points: [[30, 0], [270, 0, %.12f], [300, 30], [300, 170, %.12f], [270, 200], [30, 200, %.12f],"
                     " [0, 170], [0, 30, %.12f]], is: mold-line}" % ((QUARTER,) * 4))
    _, piece = only_piece(spec)
    sb = piece.springback
    d = piece.layout.developed_width_mm - sb.die_radius_mm * math.tan(math.radians(sb.die_angle_deg) / 2)
    die = Polygon(piece.piece.outline)
    steiner = die.area + die.length * d + math.pi * d**2
    blank = Polygon(piece.blank.outer, piece.blank.inner)
    assert blank.area == pytest.approx(steiner, rel=2e-4)
    assert piece.piece.relief_points == ()  # one smooth flanged run: no corner to relieve


def test_cut_edges_stop_the_blank_and_a_non_round_cutout_is_cut_from_it() -> None:
    """An SVG rectangle (y down, so its top edge is y = 0) with a flange on the top edge only (from its right end
    counter-clockwise to its left end, as seen on screen) and a rectangular cut-out."""
    svg = ("M 0 0 L 240 0 L 240 160 L 0 160 Z M 80 50 L 160 50 L 160 110 L 80 110 Z")
    spec = part_spec(f"{{svg: \"{svg}\", units: mm, is: die}}", "flanges: [{from: [240, 0], to: [0, 0]}]\n")
    _, piece = only_piece(spec)
    xs, ys = zip(*piece.blank.outer)
    assert (min(xs), max(xs), min(ys)) == pytest.approx((0.0, 240.0, -160.0), abs=1e-6)  # cut edges flush
    d = piece.layout.developed_width_mm - piece.springback.die_radius_mm * math.tan(
        math.radians(piece.springback.die_angle_deg) / 2)
    assert max(ys) == pytest.approx(d, abs=1e-6)  # the one flanged edge, developed outward
    (cutout,) = piece.blank.inner
    assert Polygon(cutout).area == pytest.approx(80 * 60, rel=1e-9)
    assert Polygon(piece.blank.outer, piece.blank.inner).area == pytest.approx(240 * (160 + d) - 80 * 60, rel=1e-9)


def test_flanges_bending_up_mirror_the_die_and_say_so() -> None:
    spec = api.load(SPECS / "demo-gusset.yaml")
    analysis, piece = only_piece(spec)
    xs = [x for x, _ in piece.piece.outline]
    assert max(xs) == 0.0 and min(xs) == pytest.approx(-5 * 25.4)  # x → −x; the cut legs stay on the drawn lines
    assert [w.code for w in analysis.geometry.warnings] == ["part-mirrored"]
    assert analysis.geometry.warnings[0].line is not None  # located at the spec's flanges key


def test_a_mold_line_part_keeps_its_cut_edges_on_the_drawn_line() -> None:
    """The demo gusset is drawn as its mold line with one flanged edge and four cut edges: the die lies the sheet
    thickness inside the flanged edge (the flange's outer face is the drawn line) and on the drawn line along the
    cut edges, so the blank's cut edges, and the finished part's, are where the drawing puts them (shapely
    distances to the drawn lines, mirrored as the part is made)."""
    spec = api.load(SPECS / "demo-gusset.yaml")
    _, piece = only_piece(spec)
    t = spec.shared.sheet.thickness_mm
    drawn = [(-x * 25.4, y * 25.4) for x, y in [(0, 0), (5, 0), (5, 0.75), (0.75, 4), (0, 4)]]  # the spec's points
    flanged = LineString([drawn[2], drawn[3]])
    cut = [LineString([a, b]) for a, b in zip(drawn, drawn[1:] + drawn[:1]) if {a, b} != {drawn[2], drawn[3]}]
    die = piece.piece.outline
    assert Polygon(drawn).buffer(1e-6).contains(Polygon(die))
    (ax, ay), (bx, by) = flanged.coords
    def off_line(p) -> float:  # distance from the flanged edge's line, extended past its ends
        return abs((bx - ax) * (p[1] - ay) - (by - ay) * (p[0] - ax)) / flanged.length

    assert all(min(c.distance(Point(p)) for c in cut) < 1e-6 for p in die)  # every die point on a cut edge ...
    edge = [p for p in die if off_line(p) == pytest.approx(t, abs=1e-6)]
    assert len(edge) == 2  # ... and the two where the flanged edge's offset meets them: mitred corners
    assert all(off_line(p) > t for p in die if p not in edge)
    assert Polygon(die).intersection(flanged.buffer(t - 1e-6)).area < 1e-6  # nothing within t of the flanged edge
    # the die's two corners on the flanged edge: its offset meeting the cut edges (a mitre, not a notch)
    assert Polygon(die).area == pytest.approx(Polygon(drawn).area - t * flanged.length, rel=0.01)
    xs, ys = zip(*piece.blank.outer)
    assert (min(xs), max(xs), min(ys)) == pytest.approx((-5 * 25.4, 0.0, 0.0), abs=1e-6)  # the cut legs as drawn


def test_a_flange_run_ending_mid_edge_comes_out_to_the_drawn_line_smoothly() -> None:
    """A mold-line part whose one flange run starts and ends part way along straight edges: the die lies t inside
    the run and on the drawn line along the cut edges, and between the two it comes out over a run-out, no step a
    cutter could not follow: every die point lies between 0 and t inside the drawn outline, and no three
    consecutive die points bend tighter than the 3 mm cutter radius (circles through three points, numpy), so the
    die is buildable with a 6 mm router cutter."""
    spec = part_spec("{points: [[0, 0], [200, 0], [200, 60], [120, 120], [0, 120]], is: mold-line}",
                     "flanges: [{from: [200, 20], to: [160, 90]}]\n")
    _, piece = only_piece(spec)
    t = spec.shared.sheet.thickness_mm
    assert piece.die is not None and piece.die.refusal is None
    drawn = Polygon([(0, 0), (200, 0), (200, 60), (120, 120), (0, 120)])
    die = np.asarray(piece.piece.outline)
    depth = np.array([drawn.exterior.distance(Point(p)) for p in die])
    assert depth.max() == pytest.approx(t, abs=1e-6) and Polygon(die).within(drawn.buffer(1e-6))
    flanged = LineString([(200, 20), (200, 60), (160, 90)])
    far = np.array([flanged.distance(Point(p)) > 10.0 for p in die])
    assert far.sum() >= 4 and np.allclose(depth[far], 0.0, atol=1e-6)  # cut edges on the drawn line
    run_points = [p for run in piece.piece.runs if run.flanged for p in run.points]
    assert len(run_points) >= 3 and all(flanged.distance(Point(p)) == pytest.approx(t, abs=1e-6) for p in run_points)
    a, b, c = die, np.roll(die, -1, axis=0), np.roll(die, -2, axis=0)
    cross = (b - a)[:, 0] * (c - b)[:, 1] - (b - a)[:, 1] * (c - b)[:, 0]
    radius = (np.linalg.norm(b - a, axis=1) * np.linalg.norm(c - b, axis=1) * np.linalg.norm(c - a, axis=1)
              / np.maximum(2.0 * np.abs(cross), 1e-12))
    concave = cross < -1e-9
    assert radius[concave].min() >= 3.0


def test_a_sharp_inside_corner_between_cut_edges_is_rounded_and_said() -> None:
    """An L-bracket drawn as its mold line, flanged along its long outer edge only: its inside corner lies between
    two cut edges, which no router cutter makes sharp, so die and blank round it to the cutter's radius (3 mm here,
    a 6 mm cutter) and a finding says where; the die is then buildable (before, the corner was refused).  The
    corner's fillet: the die's and the blank's points near the corner lie on a circle of that radius tangent to
    both edges (plane geometry: centre at (40 + r, 30 + r))."""
    spec = part_spec("{points: [[0, 0], [150, 0], [150, 30], [40, 30], [40, 100], [0, 100]], is: mold-line}",
                     "flanges: [{from: [0, 0], to: [150, 0]}]\n")
    analysis, piece = only_piece(spec)
    assert piece.die is not None and piece.die.refusal is None
    (finding,) = [w for w in analysis.geometry.warnings if w.code == "cut-corner-rounded"]
    assert "(40.0, 30.0)" in str(finding) and "R 3." in str(finding)
    r = float(str(finding).split("R ")[1].split(" mm")[0])
    assert r >= 3.0
    centre = Point(40.0 + r, 30.0 + r)
    for loop in (piece.piece.outline, piece.blank.outer):
        near = [p for p in loop if 40.0 < p[0] < 40.0 + r and 30.0 < p[1] < 30.0 + r]
        assert near and all(centre.distance(Point(p)) == pytest.approx(r, abs=0.02) for p in near)


def test_a_straight_flange_ending_at_a_concave_corner_of_a_cut_edge_does_not_wrap_round_it() -> None:
    """A straight flange whose run ends at a concave corner, the outline going on as a cut edge: the flange ends
    where its straight offset does, so it has no plan curvature at all: no stretch, formable (before, its run took
    in half the offset's turn round the corner, a curve of the sheet thickness's radius, and the stretch formula
    w/(ρ − w) ran to infinity: not formable)."""
    spec = part_spec("{points: [[0, 0], [120, 0], [120, 60], [60, 40], [0, 60]], is: mold-line}",
                     "flanges: [{from: [120, 60], to: [60, 40]}]\n")
    _, piece = only_piece(spec)
    t = spec.shared.sheet.thickness_mm
    (run,) = [r for r in piece.piece.runs if r.flanged]
    edge = LineString([(120, 60), (60, 40)])
    assert all(edge.distance(Point(p)) == pytest.approx(t, abs=1e-4) for p in run.points)
    assert piece.max_stretch == 0.0 and piece.max_shrink == 0.0 and piece.flange.verdict == "formable"


# -- spec mistakes: located, explained, nothing written --------------------------------------------------------

BAD = [
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLNE, is: mold-line}", "", "outline.file",
     "no outline on layer 'OUTLNE' (did you mean 'OUTLINE'?)"),
    ("{file: drawings/missing.dxf, is: mold-line}", "", "outline.file", "drawing not found"),
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLINE}", "", "outline.is", "missing required key 'is'"),
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLINE, is: mold-line}", "flanges: [{from: [0, 500], to: [90, 0]}]",
     "flanges[0]", "the nearest outline point is (0.000, 240.000) mm"),
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLINE, is: mold-line}",
     "flanges: [{layer: FLANGE, height: 10, bend_radius: -3}]",
     "flanges[0].bend_radius", "expected a value greater than 0"),
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLINE, is: mold-line}", "flanges: [{layer: FLANGE, angle: 20}]",
     "flanges[0].angle", "in degrees from 30 to 90 (90: square to the web), found int 20"),
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLINE, is: mold-line}", "flanges: [{layer: FLANGE, angle: 120}]",
     "flanges[0].angle", "from 30 to 90"),
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLINE, is: mold-line}",
     "flanges: [{layer: FLANGE, angle: square}]", "flanges[0].angle", "found str 'square'"),
    ("{file: drawings/bw418-former-f5.dxf, layer: OUTLINE, is: mold-line}", "flanges: [{layer: FLANGE, height: -4}]",
     "flanges[0].height", "-4"),
    ("{points: [[0, 0], [100, 0], [0, 100], [100, 100]], is: die}", "", "outline.points",
     "crosses or touches itself at (50.000, 50.000) mm"),
    ("{points: [[0, 0], [100, a], [0, 100]], is: die}", "", "outline.points[1]", "expected y as a finite number"),
    ("{svg: \"M 0 0 H 100 V 100 Z\", is: die}", "", "outline.units", "SVG path data has no unit"),
    ("{svg: \"M 0 0 H 100 V 100\", units: mm, is: die}", "", "outline.svg", "is not closed"),
    ("{points: [[0, 0], [100, 0], [100, 100], [0, 100]], is: die}", "flanges: [{layer: FLANGE}]", "flanges[0]",
     "no outline edge is on layer 'FLANGE'"),
    ("{file: drawings/bw418-former-f5.dxf, points: [], is: die}", "", "outline", "expected exactly one of 'file'"),
    ("{points: [[0, 0], [100, 0], [100, 100], [0, 100]], is: die}", "flanges: [{from: [0, 0]}]", "flanges[0]",
     "both 'from' and 'to'"),
    ("{points: [[0, 0], [100, 0], [100, 100], [0, 100]], is: sideways}", "", "outline.is",
     "expected one of mold-line, die"),
]


@pytest.mark.parametrize(("outline", "more", "key", "says"), BAD, ids=[b[2] + ":" + b[3][:24] for b in BAD])
def test_mistakes_in_a_part_spec_are_located_and_explained(outline: str, more: str, key: str, says: str) -> None:
    text = SHARED + f"outline: {outline}\n" + (more + "\n" if more else "")
    with pytest.raises(SpecError) as caught:
        _parse(text, SPECS)
    problems = caught.value.problems
    assert any(p.key == key and says in p.message and p.line is not None and p.column is not None
               for p in problems), [str(p) for p in problems]


def test_a_bad_drawing_exits_2_and_writes_nothing(tmp_path: Path, capsys) -> None:
    spec = tmp_path / "bad.yaml"
    (tmp_path / "drawings").mkdir()
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 4
    msp = doc.modelspace()
    for a, b in (((0, 0), (100, 0)), ((100, 0), (100, 80)), ((100, 80), (0, 80)), ((0, 80), (0, 3))):  # a 3 mm gap
        msp.add_line(a, b)
    doc.saveas(tmp_path / "drawings" / "open.dxf")
    spec.write_text(SHARED + "outline: {file: drawings/open.dxf, is: mold-line}\n")
    assert main(["build", str(spec), "-o", str(tmp_path / "out")]) == 2
    err = capsys.readouterr().err
    assert "bad.yaml:9:" in err and "outline.file" in err and "open.dxf" in err and "3.000 mm" in err
    assert not (tmp_path / "out").exists()


def test_a_hole_too_near_a_flange_is_refused_at_the_outline_key(tmp_path: Path, capsys) -> None:
    svg = "M 0 0 L 200 0 L 200 120 L 0 120 Z " + "M 2 60 A 20 20 0 1 0 42 60 A 20 20 0 1 0 2 60 Z"
    spec = tmp_path / "near.yaml"
    spec.write_text(SHARED + f"outline: {{svg: \"{svg}\", units: mm, is: die}}\n")
    assert main(["check", str(spec)]) == 2
    err = capsys.readouterr().err
    assert "near.yaml:9:" in err and "outline" in err and "flanged edge" in err


# -- the starter ---------------------------------------------------------------------------------------------------


@pytest.mark.parametrize("units", ["in", "mm"])
def test_the_part_starter_passes_check(tmp_path: Path, units: str) -> None:
    path = api.write_starter("part", tmp_path / "starter.yaml", units=units)
    spec = api.load(path)
    assert spec.kind == "part" and spec.units == units
    _, piece = only_piece(spec)
    assert piece.die.refusal is None


# -- built: die solid, mesh, drawings --------------------------------------------------------------------------


@pytest.mark.slow
@pytest.mark.solid
def test_the_demo_former_builds_a_valid_solid_a_watertight_mesh_and_clean_drawings(tmp_path: Path) -> None:
    trimesh = pytest.importorskip("trimesh")
    from OCP.BRepCheck import BRepCheck_Analyzer

    from diegen.die.occ.validate import read_step, volume_mm3

    spec = api.load(SPECS / "demo-former.yaml")
    result = api.build(spec, tmp_path, jobs=1)
    assert not result.failed, [o.error for o in result.failed]
    folder = tmp_path / spec.id / spec.id
    report = json.loads((folder / f"{spec.id}-report.json").read_text())
    assert report["drawing"].startswith("bw418-former-f5.dxf") and "airfoil" not in report
    shape = read_step(folder / f"{spec.id}-die.step")
    assert BRepCheck_Analyzer(shape).IsValid()
    mesh = trimesh.load(folder / f"{spec.id}-die.stl")
    assert mesh.is_watertight and mesh.volume == pytest.approx(volume_mm3(shape), rel=0.005)
    # the die is its outline's area less the hole's bore, times its height, less what the over-bent wall, the top
    # round and the flutes take off (a few per cent of it)
    (hole,) = report["holes"]
    prism = (report["die"]["area_mm2"] - math.pi / 4 * hole["bore_d_mm"] ** 2) * report["die"]["height_mm"]
    assert 0.93 * prism < volume_mm3(shape) < prism
    for name in ("die", "blank"):
        assert not ezdxf.readfile(folder / f"{spec.id}-{name}.dxf").audit().has_errors
    # the longeron's joggle: in the report, and drawn on its own layer of the die drawing
    (joggle,) = report["die"]["joggles"]
    assert joggle["depth_mm"] == pytest.approx(1.6) and joggle["joggle"] == 0
    drawing = ezdxf.readfile(folder / f"{spec.id}-die.dxf")
    assert len(drawing.modelspace().query('LWPOLYLINE[layer=="JOGGLE-RECESSES"]')) == 1


# -- sets --------------------------------------------------------------------------------------------------------


def test_the_demo_fuselage_set_lists_its_specs_and_one_part_per_frame_drawing() -> None:
    spec = api.load(SPECS / "demo-fuselage.yaml")
    assert spec.kind == "set"
    ids = [m.id for m in spec.members]
    assert ids == ["BW418-F5", "BW418-G2", "BW418-T2-nose", "BW418-fuselage-F3", "BW418-fuselage-F4",
                   "BW418-fuselage-F6"]
    frame = spec.members[3]
    assert frame.drawn is not None and frame.drawn.flanged_holes and frame.file == spec.file
    # a frame's keys are found in the set's `drawings` section
    file, line, _ = frame.positions.where("flange.bend_radius")
    assert file == spec.file and "flange:" in (SPECS / "demo-fuselage.yaml").read_text().splitlines()[line - 1]
    analysis = api.analyse(spec)
    assert [r.spec.id for r in analysis.ribs] == ids and not api.refused_pieces(analysis)
    report = api.report_json(analysis)
    assert report["kind"] == "set" and len(report["parts"]) == 6


def _set_folder(tmp_path: Path) -> Path:
    """A copy of the demo fuselage set (its specs and drawings) to change."""
    import shutil

    tmp_path.mkdir(parents=True, exist_ok=True)
    for name in ("demo-fuselage.yaml", "demo-former.yaml", "demo-gusset.yaml", "demo-nose-rib.yaml"):
        shutil.copy(SPECS / name, tmp_path / name)
    shutil.copytree(SPECS / "drawings", tmp_path / "drawings")
    return tmp_path / "demo-fuselage.yaml"


def test_a_set_rebuilds_only_the_frame_whose_drawing_changed_and_drops_a_removed_one(tmp_path: Path,
                                                                                     fake_solids) -> None:
    path = _set_folder(tmp_path / "specs")
    out = tmp_path / "out"
    first = api.build(api.load(path), out, jobs=1, die_writer=fake_solids)
    assert [o.status for o in first.outcomes] == ["built"] * 6
    assert [o.status for o in api.build(api.load(path), out, jobs=1, die_writer=fake_solids).outcomes] == \
        ["unchanged"] * 6
    frames = path.parent / "drawings" / "frames"
    doc = ezdxf.readfile(frames / "F4.dxf")
    (hole,) = doc.modelspace().query("CIRCLE")
    hole.dxf.radius = 45.0
    doc.saveas(frames / "F4.dxf")
    (frames / "F6.dxf").unlink()
    again = api.build(api.load(path), out, jobs=1, die_writer=fake_solids)
    status = {o.part_id: o.status for o in again.outcomes}
    assert status == {"BW418-F5": "unchanged", "BW418-G2": "unchanged", "BW418-T2-nose": "unchanged",
                      "BW418-fuselage-F3": "unchanged", "BW418-fuselage-F4": "built"}
    assert again.removed == ["BW418-fuselage-F6"] and not (out / "BW418-fuselage" / "BW418-fuselage-F6").exists()
    report = json.loads((out / "BW418-fuselage" / "BW418-fuselage-F4" / "BW418-fuselage-F4-report.json").read_text())
    assert report["holes"][0]["d_mm"] == pytest.approx(90.0)
    # the set's summary: a row a piece, in the set's order, with what this build did (read with the csv module)
    with open(out / "BW418-fuselage" / "summary.csv", newline="") as f:
        rows = list(csv.DictReader(f))
    assert [(r["rib"], r["part_id"], r["status"]) for r in rows] == [
        ("1", "BW418-F5", "unchanged"), ("2", "BW418-G2", "unchanged"), ("3", "BW418-T2-nose", "unchanged"),
        ("4", "BW418-fuselage-F3", "unchanged"), ("5", "BW418-fuselage-F4", "built")]
    assert rows[4]["section"].startswith("F4.dxf") and rows[4]["station_mm"] == ""
    # and its PDF (read back with pypdf): no planform, the table of the five parts, then a page a part
    pages = [page.extract_text() for page in pypdf.PdfReader(out / "BW418-fuselage" / "summary.pdf").pages]
    assert len(pages) == 1 + 5 and "BW418-fuselage: pieces 1–5 of 5" in pages[0] and "station_mm" not in pages[0]
    for page, row in zip(pages[1:], rows, strict=True):
        assert page.startswith(row["part_id"]) or f"{row['part_id']} (" in page
        assert "die outline" in page and "shrink limit" in page


SET_HEAD = "diegen: 1\nkind: set\nid: S1\nunits: mm\n"


@pytest.mark.parametrize(("body", "key", "says"), [
    ("specs: [nothing-*.yaml]\n", "specs[0]", "no spec file matches 'nothing-*.yaml'"),
    ("specs: [demo-wing.yaml]\n", "specs[0]", "demo-wing.yaml is a wing spec: a set holds parts and ribs"),
    ("specs: [demo-gusset.yaml, demo-gusset.yaml]\n", "specs[1]", "two members have the id 'BW418-G2'"),
    ("title: nothing listed\n", "specs", "expected 'specs'"),
    ("drawings: {files: drawings/frames/*.dxf, outline: {file: x.dxf, is: die}}\n", "drawings.outline.file",
     "'file' is not taken here"),
    ("drawings: {files: drawings/frames/*.dxf, outline: {is: die}}\n", "drawings.sheet",
     "missing required key 'sheet'"),
    ("drawings: {files: \"drawings/*.svg\", outline: {is: die}}\n", "drawings.files", "no drawing matches"),
], ids=["no-match", "wing", "duplicate", "empty", "outline-file", "drawings-keys", "no-drawing"])
def test_mistakes_in_a_set_are_located_in_the_set(body: str, key: str, says: str) -> None:
    with pytest.raises(SpecError) as caught:
        parse_spec(SET_HEAD + body, str(SPECS / "set.yaml"), SPECS)
    assert any(p.key == key and says in p.message for p in caught.value.problems), \
        [str(p) for p in caught.value.problems]


def test_a_members_own_mistake_is_reported_in_its_own_file_and_a_set_in_a_set_is_refused(tmp_path: Path) -> None:
    bad_part = SHARED.replace("id: X1", "id: X2") + "outline: {points: [[0, 0]], is: die}\n"
    (tmp_path / "bad-part.yaml").write_text(bad_part)
    (tmp_path / "inner.yaml").write_text(SET_HEAD.replace("S1", "S2") + "specs: [bad-part.yaml]\n")
    (tmp_path / "outer.yaml").write_text(SET_HEAD + "specs: [bad-part.yaml, inner.yaml]\n")
    with pytest.raises(SpecError) as caught:
        api.load(tmp_path / "outer.yaml")
    where = {(Path(p.file).name, p.key) for p in caught.value.problems}
    assert ("bad-part.yaml", "outline.points") in where
    assert ("inner.yaml", "kind") in where


# -- joggles -------------------------------------------------------------------------------------------------------


def test_a_joggle_steps_the_die_wall_in_by_its_depth_with_the_quintic_run_outs() -> None:
    """Over the full-depth zone every die outline point lies the depth inside the outline without the joggle
    (shapely distance); along a run-out the inset follows 10u³ − 15u⁴ + 6u⁵ of the way along it (the quintic
    'smootherstep', zero slope and curvature at both ends); outside, the outline is untouched.  The flange's strain
    is judged on the outline without the recess, so it is the same as with no joggle."""
    from shapely.geometry import LineString, Point

    rect = "{points: [[0, 0], [300, 0], [300, 200], [0, 200]], is: die}"
    plain_spec = part_spec(rect)
    spec = part_spec(rect, "joggles: [{from: [100, 0], to: [160, 0], depth: 1.6}]\n")
    _, plain_piece = only_piece(plain_spec)
    _, piece = only_piece(spec)
    (joggle,) = piece.piece.joggles
    depth, ramp = 1.6, joggle.ramp_mm
    assert ramp >= 4.0 * depth  # at least joggle_runout (default 4) times the depth
    bottom = LineString([(0, 0), (300, 0)])
    for x, y in piece.piece.outline:
        if abs(y) > 5.0 or not 1.0 < x < 299.0:
            continue  # the other sides
        inset = bottom.distance(Point(x, y))
        if 100.0 <= x <= 160.0:
            assert inset == pytest.approx(depth, abs=1e-9)
        elif 100.0 - ramp < x < 100.0 or 160.0 < x < 160.0 + ramp:
            u = 1.0 - (100.0 - x) / ramp if x < 100.0 else 1.0 - (x - 160.0) / ramp
            assert inset == pytest.approx(depth * (10 * u**3 - 15 * u**4 + 6 * u**5), abs=1e-9)
        else:
            assert inset == pytest.approx(0.0, abs=1e-9)
    assert Polygon(piece.piece.outline).area == pytest.approx(
        300 * 200 - depth * (60.0 + ramp), rel=1e-4)  # each run-out takes half its length × depth (the quintic's mean)
    assert piece.max_shrink == pytest.approx(plain_piece.max_shrink, abs=1e-12)
    assert piece.flange.verdict == plain_piece.flange.verdict


@pytest.mark.parametrize(("joggle", "says"), [
    ("{from: [280, 0], to: [300, 60], depth: 1.6}", "does not run counter-clockwise along one stretch"),
    ("{from: [2, 0], to: [40, 0], depth: 1.6}", "reaches past the run's end"),
    ("{from: [100, 50], to: [160, 50], depth: 1.6}", "from the die outline"),
    ("{from: [100, 200], to: [160, 200], depth: 1.6}", "does not run counter-clockwise"),
], ids=["across-a-corner", "into-a-corner", "off-the-outline", "backwards"])
def test_a_joggle_that_cannot_be_cut_is_refused_at_its_key(joggle: str, says: str, tmp_path: Path, capsys) -> None:
    spec = tmp_path / "jog.yaml"
    spec.write_text(SHARED + "outline: {points: [[0, 0], [300, 0], [300, 200], [0, 200]], is: die}\n"
                    f"joggles: [{joggle}]\n")
    assert main(["check", str(spec)]) == 2
    err = capsys.readouterr().err
    assert "jog.yaml:10:" in err and "joggles[0]" in err and says in err, err


def test_a_joggle_on_a_run_of_its_own_height_keeps_that_height() -> None:
    rect = "{points: [[0, 0], [300, 0], [300, 200], [0, 200]], is: die}"
    spec = part_spec(rect, "flanges: [{from: [0, 0], to: [300, 0], height: 8}, {from: [300, 0], to: [0, 0]}]\n"
                           "joggles: [{from: [100, 0], to: [160, 0], depth: 1.2}]\n")
    _, piece = only_piece(spec)
    assert len(piece.piece.joggles) == 1
    recessed = [r for r in piece.piece.runs if r.kind == "curve" and min(y for _, y in r.points) < 0.5
                and max(y for _, y in r.points) > 1.0]
    assert len(recessed) == 1 and recessed[0].flange_height_mm == 8.0
    assert [r.flange_height_mm for r in piece.piece.runs] == [r.flange_height_mm for r in piece.piece.plain_runs]


def test_a_flange_running_smoothly_into_a_cut_edge_keeps_its_full_width_to_the_end() -> None:
    """A 'D': a flanged half circle (radius 50 mm) running tangentially into a straight cut edge.  The blank keeps
    the developed flange (d from FAA-H-8083-31 less the die radius's tangent inset) all round the half circle, up
    to its end, where it ends square on the normal; beyond the cut edge there is no material (shapely tests)."""
    from shapely.geometry import Point

    spec = part_spec("{points: [[0, 0], [150, 0, 1], [150, 100], [0, 100]], is: die}",
                     "flanges: [{from: [0, 0], to: [150, 100]}]\n")
    _, piece = only_piece(spec)
    sb = piece.springback
    d = piece.layout.developed_width_mm - sb.die_radius_mm * math.tan(math.radians(sb.die_angle_deg) / 2)
    blank = Polygon(piece.blank.outer, piece.blank.inner)
    for degrees in range(-85, 90, 5):  # just inside the flange's outer edge, all round the half circle
        phi = math.radians(degrees)
        assert blank.contains(Point(150 + (50 + d - 0.05) * math.cos(phi), 50 + (50 + d - 0.05) * math.sin(phi))), \
            degrees
    assert not blank.contains(Point(140.0, 100.5)) and not blank.contains(Point(75.0, 100.5))  # flush along the cut
    assert not blank.contains(Point(149.0, 100.0 + d / 2))  # the flange ends square at the junction's normal


def test_a_sets_drawings_section_warns_of_a_number_in_the_other_unit(tmp_path: Path) -> None:
    """A sheet 0.032 thick in a millimetre set's `drawings` section (0.032 mm: 0.032 in was meant) draws the
    units-suspect finding on each frame drawn from it, located at that key of the set (usual ranges: common
    practice, no source; 1 in = 25.4 mm, NIST SP 811 App. B)."""
    path = _set_folder(tmp_path)
    text = path.read_text().replace("thickness: 0.8}", "thickness: 0.032}")
    path.write_text(text)
    line = next(n for n, row in enumerate(text.splitlines(), start=1) if "thickness: 0.032" in row)
    analysis = api.analyse(api.load(path))
    frames = [r for r in analysis.ribs if r.spec.id.startswith("BW418-fuselage-F")]
    assert len(frames) == 3
    for rib in frames:
        (found,) = [w for w in rib.geometry.warnings if w.code == "units-suspect"]
        assert (found.key, found.file, found.line) == ("drawings.sheet.thickness", str(path), line)
        assert "0.8128 mm" in found.message  # 0.032 in, as it looks meant
    others = [r for r in analysis.ribs if not r.spec.id.startswith("BW418-fuselage-F")]
    assert not [w for r in others for w in r.geometry.warnings if w.code == "units-suspect"]
