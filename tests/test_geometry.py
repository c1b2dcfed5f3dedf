"""The rib's 2D geometry: mold-line offsets, pieces at the spars, joggles, holes and pins.

Every check measures diegen's output with shapely / numpy directly and compares
it with an expectation written here: a published formula (source named beside
it), plane geometry derived in the comment, or the spec's own numbers.
"""

from __future__ import annotations

import json
import math
import re
import subprocess
import sys
from dataclasses import replace

import numpy as np
import pytest
import shapely
from scipy.interpolate import CubicSpline
from shapely.geometry import LinearRing, LineString, Point, Polygon
from testing import (
    DEMO_RIB,
    DEMO_WING,
    OUTLINE_TOL_MM,
    ROOT,
    as_array,
    assert_valid_ccw_outline,
    distances_to,
    point,
    stretch_limit,
    vertical_chord,
)

from diegen import api
from diegen.errors import GeometryError
from diegen.geometry.pieces import ramp_length
from diegen.geometry.rib import min_tail_depth, rib_geometry
from diegen.geometry.types import PieceGeometry, RibGeometry
from diegen.spec.model import AirfoilSource, Holes, HoleSpec, RibSpec


@pytest.fixture(scope="module")
def rib(spec: RibSpec) -> RibGeometry:
    return rib_geometry(spec, stretch_limit=stretch_limit(spec))


def with_cutter(spec: RibSpec, diameter_mm: float) -> RibSpec:
    shared = spec.shared
    return replace(spec, shared=replace(shared, die=replace(shared.die, cutter_diameter_mm=diameter_mm)))


def surfaces(piece: PieceGeometry) -> tuple[np.ndarray, np.ndarray]:
    """Upper and lower contour points of a piece (joggled), each ordered from forward to aft."""
    curves = [np.asarray(r.points) for r in piece.runs if r.kind == "curve"]
    if len(curves) == 1:  # nose: one contour from the aft upper end over the leading edge to the aft lower end
        c = curves[0]
        le = int(np.argmin(c[:, 0]))
        return c[: le + 1][::-1], c[le:]
    return curves[0][::-1], curves[1]


# --------------------------------------------------------------------------- layering


def test_check_path_does_not_import_the_solid_kernel() -> None:
    # Project rule (layering): only the die-solid layer may import CadQuery/OCP; `diegen check` runs without it.
    code = f"""
import json, sys
import diegen.geometry, diegen.geometry.rib, diegen.geometry.pieces, diegen.geometry.holes, diegen.geometry.pins
import diegen.geometry.polygon, diegen.geometry.types, diegen.analysis, diegen.blank.develop
import diegen.reports.document, diegen.reports.text, diegen.wing
import diegen.api, diegen.cli
from diegen import api
analysis = api.analyse(api.load({str(DEMO_RIB)!r}))
api.report_json(analysis)
api.report_text(analysis)
print(json.dumps(sorted(m for m in sys.modules if m.split('.')[0] in ('cadquery', 'OCP'))))
"""
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, timeout=120,
                          check=False)
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout.strip().splitlines()[-1]) == []


# --------------------------------------------------------------------------- mold lines


def test_mold_lines_are_true_normal_offsets(spec: RibSpec, rib: RibGeometry) -> None:
    # Project convention: OML = section offset inward by the skin; die outline = OML offset inward by the rib sheet.
    # A true normal offset keeps every point at exactly that distance from the section (checked with shapely).
    section = LinearRing(rib.section)
    skin, sheet_t = spec.shared.skin_thickness_mm, spec.shared.sheet.thickness_mm
    oml = distances_to(rib.oml, section)
    die = distances_to(rib.die_outline, section)
    assert np.abs(oml - skin).max() < OUTLINE_TOL_MM
    assert np.abs(die - (skin + sheet_t)).max() < OUTLINE_TOL_MM
    assert np.abs(distances_to(rib.die_outline, LinearRing(rib.oml)) - sheet_t).max() < OUTLINE_TOL_MM
    assert_valid_ccw_outline(rib.die_outline, "die outline")
    # the offset loses area ~ perimeter × distance (Steiner, inward): a sanity bound on the whole loop
    lost = Polygon(rib.section).area - Polygon(rib.die_outline).area
    assert lost == pytest.approx(section.length * (skin + sheet_t), rel=0.01)


def test_piece_outlines_keep_the_offset_away_from_cuts_and_joggles(spec: RibSpec, rib: RibGeometry) -> None:
    section = LinearRing(rib.section)
    offset = spec.shared.skin_thickness_mm + spec.shared.sheet.thickness_mm
    for piece in rib.pieces:
        pts = as_array(piece.outline)
        x0, x1 = piece.x_range_mm
        keep = (pts[:, 0] > x0 + 1.0) & (pts[:, 0] < x1 - 1.0)
        for j in piece.joggles:
            keep &= ~((pts[:, 0] > j.x_start_mm - j.ramp_mm - 0.5) & (pts[:, 0] < j.x_end_mm + j.ramp_mm + 0.5))
        assert keep.sum() > 20, piece.name
        gap = distances_to(pts[keep], section) - offset
        assert np.abs(gap).max() < OUTLINE_TOL_MM, piece.name


def _le_radius(section: np.ndarray, slope: float) -> float:
    """Curvature radius at the nose (mm), from a least-squares fit x' = a + b·y' + y'²/(2r) + c·|y'|³ + d·y'⁴.

    The frame is turned so x' runs along the mean line at the nose (slope ``slope``); only points within half a
    radius of the nose vertex are used (estimated from the nose point spacing in a first pass).
    """
    c, s = math.cos(math.atan(slope)), math.sin(math.atan(slope))
    q = section @ np.array([[c, -s], [s, c]])
    q = q - q[np.argmin(q[:, 0])]
    r = 1.0
    for _ in range(3):
        near = (np.abs(q[:, 1]) < 0.5 * r) & (q[:, 0] < 0.3 * r)
        y, x = q[near, 1], q[near, 0]
        coef = np.linalg.lstsq(np.column_stack([np.ones_like(y), y, y**2, np.abs(y) ** 3, y**4]), x, rcond=None)[0]
        r = 1.0 / (2.0 * coef[2])
    return float(r)


@pytest.mark.parametrize(("naca", "rel"), [("0006", 0.005), ("0012", 0.005), ("0015", 0.005), ("2412", 0.01)],
                         ids=str)
def test_leading_edge_radius_matches_report_824(spec: RibSpec, naca: str, rel: float) -> None:
    # NACA Report 824 (Abbott, von Doenhoff, Stivers 1945): r_t = 1.1019·t²·c for the 4-digit thickness form
    # (NACA 0012: 1.587 % c, as tabulated).  Measured on the scaled, re-sampled section the rib uses.
    # Cambered sections: the nose circle's centre lies on the mean-line slope at the nose (Report 824), so the
    # fit frame is turned by that slope (2m/p for the 4-digit mean line); the mean line's own curvature there
    # shifts the surface curvature by about 1 %, hence the looser tolerance.
    m, p, t = int(naca[0]) / 100, int(naca[1]) / 10, int(naca[2:]) / 100
    rib = rib_geometry(replace(spec, airfoil=AirfoilSource(naca=naca)), stretch_limit=stretch_limit(spec))
    expected = 1.1019 * t**2 * spec.chord_mm
    measured = _le_radius(as_array(rib.section), 2 * m / p if p else 0.0)
    assert measured == pytest.approx(expected, rel=rel)


# --------------------------------------------------------------------------- pieces


def test_piece_ends_at_the_spar_webs(spec: RibSpec, rib: RibGeometry) -> None:
    # Project convention: each cut's end flange sits on the spar web, so the die's end face stands one rib-sheet
    # thickness off the web face (forward face at at·chord, aft face one web thickness further).
    t, c = spec.shared.sheet.thickness_mm, spec.chord_mm
    front, rear = spec.spars[0], spec.spars[-1]
    pieces = {p.name: p for p in rib.pieces}
    assert set(pieces) == {"nose", "center", "tail"}
    assert pieces["nose"].x_range_mm[1] == pytest.approx(front.at * c - t, abs=1e-9)
    assert pieces["nose"].x_range_mm[0] == pytest.approx(min(x for x, _ in rib.die_outline), abs=1e-9)
    assert pieces["center"].x_range_mm[0] == pytest.approx(front.at * c + front.web_mm + t, abs=1e-9)
    assert pieces["center"].x_range_mm[1] == pytest.approx(rear.at * c - t, abs=1e-9)
    assert pieces["tail"].x_range_mm[0] == pytest.approx(rear.at * c + rear.web_mm + t, abs=1e-9)


@pytest.mark.parametrize("min_depth_mm", [None, 50.8], ids=["default", "2in"])
def test_tail_ends_at_the_minimum_depth(spec: RibSpec, min_depth_mm: float | None) -> None:
    # Default minimum tail depth: 2 × flange height + 10 mm (the project's rule, common practice, no source).
    flange = replace(spec.shared.flange, min_tail_depth_mm=min_depth_mm)
    variant = replace(spec, shared=replace(spec.shared, flange=flange))
    rib = rib_geometry(variant, stretch_limit=stretch_limit(variant))
    expected = min_depth_mm if min_depth_mm is not None else 2 * spec.shared.flange.height_mm + 10.0
    assert min_tail_depth(variant) == pytest.approx(expected)
    tail = next(p for p in rib.pieces if p.name == "tail")
    x_end = tail.x_range_mm[1]
    die = Polygon(rib.die_outline)
    assert vertical_chord(die, x_end) == pytest.approx(expected, abs=0.1)
    assert vertical_chord(die, x_end - 1.0) > expected  # the depth is still above the minimum just forward of it
    aft_face = tail.runs[-1]
    assert math.dist(*aft_face.points) == pytest.approx(expected, abs=0.1)


def test_end_faces_are_straight_vertical_lines(rib: RibGeometry) -> None:
    for piece in rib.pieces:
        lines = [r for r in piece.runs if r.kind == "line"]
        assert len(lines) == (1 if piece.name == "nose" else 2)
        ends = {round(x, 9) for x in piece.x_range_mm[1:]} if piece.name == "nose" else \
            {round(x, 9) for x in piece.x_range_mm}
        for line in lines:
            assert len(line.points) == 2  # one straight segment, no intermediate points
            (xa, ya), (xb, yb) = line.points
            assert xa == xb  # exactly vertical
            assert round(xa, 9) in ends
            assert abs(ya - yb) > 10.0
        # nothing of the outline lies beyond the end faces
        xs = as_array(piece.outline)[:, 0]
        assert xs.max() <= piece.x_range_mm[1] + 1e-9 and xs.min() >= piece.x_range_mm[0] - 1e-9


def test_piece_outlines_are_valid_ccw_loops_of_joined_runs(rib: RibGeometry) -> None:
    for piece in rib.pieces:
        assert_valid_ccw_outline(piece.outline, piece.part_id)
        assert_valid_ccw_outline([p for r in piece.plain_runs for p in r.points[:-1]], piece.part_id + " plain")
        runs = piece.runs
        for a, b in zip(runs, runs[1:] + runs[:1]):
            assert a.points[-1] == b.points[0]  # consecutive runs share their end points
        assert Polygon(piece.outline).within(Polygon(rib.die_outline).buffer(1e-6))


def test_tail_aft_end_is_unflanged_and_other_ends_are_flanged(rib: RibGeometry) -> None:
    for piece in rib.pieces:
        flags = [(r.kind, r.flanged) for r in piece.runs]
        if piece.name == "tail":
            assert flags == [("curve", True), ("line", True), ("curve", True), ("line", False)]
            assert piece.runs[-1].points[0][0] == pytest.approx(piece.x_range_mm[1])
        else:
            assert all(flanged for _, flanged in flags)


def test_relief_points_are_the_flanged_end_face_corners(rib: RibGeometry) -> None:
    # Project convention: corners where a perimeter flange meets an end flange get bend relief; a cut end has none.
    for piece in rib.pieces:
        corners = {p for r in piece.runs if r.kind == "line" and r.flanged for p in r.points}
        assert set(piece.relief_points) == corners
        assert len(piece.relief_points) == {"nose": 2, "center": 4, "tail": 2}[piece.name]
        for x, _ in piece.relief_points:
            assert x in piece.x_range_mm  # exactly on an end face, not near it


# --------------------------------------------------------------------------- joggles


def _joggle_points(rib: RibGeometry, piece: PieceGeometry, surface: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Points of one joggled surface, their normal distance to the plain die outline and their foot x."""
    upper, lower = surfaces(piece)
    pts = upper if surface == "upper" else lower
    plain = LinearRing(rib.die_outline)
    geoms = shapely.points(pts)
    dist = np.asarray(shapely.distance(geoms, plain))
    foot = shapely.get_coordinates(shapely.line_interpolate_point(plain, shapely.line_locate_point(plain, geoms)))
    return pts, dist, foot[:, 0]


@pytest.mark.parametrize("cutter_mm", [6.35, 25.4], ids=["demo-cutter", "25mm-cutter"])
def test_joggle_depth_and_ramp_profile(spec: RibSpec, cutter_mm: float) -> None:
    # The joggle recess: the wall steps in by the spar-cap thickness (a joggle in the
    # form block is a recess of depth d with a run-out ramp: plane geometry of two reverse bends).  Measured as the
    # shapely normal distance between the joggled piece outline and the plain die outline.
    # Ramp: d·(10u³ − 15u⁴ + 6u⁵) over L = max(runout·d, √(k·d·m·r_cutter)), k = 10/√3, m = RAMP_MARGIN (the
    # project's rule: run-out 4·d is from memory, unverified; the √ term keeps the quintic's tightest radius
    # L²/(k·d) at least m × the cutter radius — derived: y'' = (d/L²)(60u − 180u² + 120u³) peaks at ±10/√3 where
    # u = ½ ∓ √3/6).
    from diegen.geometry.pieces import RAMP_MARGIN

    variant = with_cutter(spec, cutter_mm)
    rib = rib_geometry(variant, stretch_limit=stretch_limit(variant))
    r_cutter = cutter_mm / 2
    seen = 0
    for piece in rib.pieces:
        assert len(piece.joggles) in (2, 4)
        for j in piece.joggles:
            cap = variant.spars[j.spar].cap_thickness_mm
            assert j.depth_mm == pytest.approx(cap)
            k = 10 / math.sqrt(3)
            assert j.ramp_mm == pytest.approx(max(variant.shared.joggle_runout * cap,
                                                  math.sqrt(k * cap * RAMP_MARGIN * r_cutter)))
            _pts, dist, foot_x = _joggle_points(rib, piece, j.surface)
            full = (foot_x >= j.x_start_mm) & (foot_x <= j.x_end_mm)
            assert full.sum() >= 20
            assert np.abs(dist[full] - j.depth_mm).max() < OUTLINE_TOL_MM
            for edge, sign in ((j.x_start_mm, -1.0), (j.x_end_mm, 1.0)):
                u = 1.0 - (foot_x - edge) * sign / j.ramp_mm
                ramp = (u > 0.0) & (u < 1.0)
                if not ramp.any():  # this end of the zone lies beyond the piece's end face
                    continue
                seen += 1
                assert ramp.sum() >= 8
                q = u[ramp]
                expected = j.depth_mm * (10 * q**3 - 15 * q**4 + 6 * q**5)
                assert np.abs(dist[ramp] - expected).max() < OUTLINE_TOL_MM
            outside = (foot_x < j.x_start_mm - j.ramp_mm - 0.01) | (foot_x > j.x_end_mm + j.ramp_mm + 0.01)
            others = [o for o in piece.joggles if o is not j and o.surface == j.surface]
            for o in others:
                outside &= (foot_x < o.x_start_mm - o.ramp_mm) | (foot_x > o.x_end_mm + o.ramp_mm)
            assert np.abs(dist[outside]).max() < 1e-6  # the plain wall elsewhere is untouched
    assert seen >= 8  # nose fwd ramps (2), centre aft-of-front and fwd-of-rear ramps (4), tail aft ramps (2)


def test_ramp_length_rule() -> None:
    # max(4·d, √(k·d·m·r)), k = 10/√3, m = RAMP_MARGIN (project limit): d = 1.6, r = 3.175 → 6.4 (run-out governs);
    # r = 12.7 → √(117.3·m) (the radius governs)
    from diegen.geometry.pieces import RAMP_MARGIN

    k = 10 / math.sqrt(3)
    assert RAMP_MARGIN >= 1.2
    assert ramp_length(1.6, 4.0, 3.175) == pytest.approx(6.4)
    assert ramp_length(1.6, 4.0, 12.7) == pytest.approx(math.sqrt(k * 1.6 * RAMP_MARGIN * 12.7))
    # the quintic's tightest radius L²/(k·d) is the given one with the margin to spare
    assert ramp_length(1.6, 4.0, 12.7) ** 2 / (k * 1.6) == pytest.approx(RAMP_MARGIN * 12.7)


def test_ramp_shape_is_curvature_continuous_and_its_tightest_bend_is_as_stated() -> None:
    from diegen.geometry.pieces import RAMP_BEND, ramp_shape

    u = np.linspace(0.0, 1.0, 200001)
    f = ramp_shape(u)
    assert f[0] == 0.0 and f[-1] == pytest.approx(1.0, abs=1e-15)
    h = u[1] - u[0]
    d2 = np.diff(f, 2) / h**2  # numerical second derivative
    assert abs(d2[0]) < 1e-3 and abs(d2[-1]) < 1e-3  # no curvature jump where the ramp meets the wall
    assert np.abs(d2).max() == pytest.approx(RAMP_BEND, rel=1e-4)
    assert RAMP_BEND == pytest.approx(10 / math.sqrt(3), rel=1e-15)


def _min_concave_radius(piece: PieceGeometry) -> float:
    """Smallest concave plan radius (mm) of a piece's curve runs, from scipy's cubic spline through their points.

    The runs run counter-clockwise round the piece: concave is negative signed curvature (x'y'' − y'x'')/|r'|³.
    """
    worst = math.inf
    for run in piece.runs:
        if run.kind != "curve":
            continue
        p = np.asarray(run.points)
        u = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(p, axis=0).T))])
        spline = CubicSpline(u, p)
        s = np.linspace(0.0, u[-1], int(u[-1] / 0.05))
        d1, d2 = spline(s, 1), spline(s, 2)
        kappa = (d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0]) / np.hypot(*d1.T) ** 3
        if kappa.min() < 0:
            worst = min(worst, float(-1.0 / kappa.min()))
    return worst


@pytest.mark.parametrize("cutter_mm", [6.35, 25.4], ids=["demo-cutter", "25mm-cutter"])
def test_concave_radii_are_no_tighter_than_the_cutter(spec: RibSpec, cutter_mm: float) -> None:
    # Project convention: internal concave corners of the die outline are no tighter than the router cutter radius.
    # Measured on scipy's cubic spline through the outline points, with no allowance: the ramps are laid out with
    # a margin (RAMP_MARGIN) so the sampled outline still clears the cutter.
    rib = rib_geometry(with_cutter(spec, cutter_mm), stretch_limit=stretch_limit(spec))
    for piece in rib.pieces:
        assert _min_concave_radius(piece) >= cutter_mm / 2, piece.name


# --------------------------------------------------------------------------- holes and pins


def test_auto_holes_respect_edge_margin_ligament_and_depth(spec: RibSpec, rib: RibGeometry) -> None:
    # Web usable for holes: die outline inset by the bend radius (the flange's bend line on the web) plus the
    # edge margin; neighbouring holes a ligament apart (the spec's hole rules; FAA-H-8083-31 ch. 4 asks only that
    # lightening holes not be too close to the edge, the numbers are common practice, no source).
    rules = spec.shared.holes.rules
    bend = spec.shared.flange.bend_radius_mm
    total = 0
    for piece in rib.pieces:
        web = Polygon(piece.outline)
        assert piece.holes, piece.name
        for h in piece.holes:
            total += 1
            clear = web.exterior.distance(point((h.x, h.y))) - h.d / 2
            assert web.contains(point((h.x, h.y)))
            assert clear >= bend + rules.edge_margin_mm - 1e-6, (piece.name, h)
            assert h.d >= rules.min_diameter_mm
            # at most 0.65 of the local depth (the project's rule, common practice, no source)
            assert h.d <= 0.65 * vertical_chord(web, h.x) + 1e-6
        for a in piece.holes:
            for b in piece.holes:
                if a is not b:
                    assert math.dist((a.x, a.y), (b.x, b.y)) - (a.d + b.d) / 2 >= rules.ligament_mm - 1e-6
    assert total >= 6


def _with_holes(spec: RibSpec, *holes: HoleSpec) -> RibSpec:
    shared = spec.shared
    return replace(spec, shared=replace(shared, holes=Holes("list", shared.holes.rules, tuple(holes))))


def test_explicit_hole_breaking_the_margin_names_the_shortfall(spec: RibSpec, rib: RibGeometry) -> None:
    rules = spec.shared.holes.rules
    bend = spec.shared.flange.bend_radius_mm
    nose = Polygon(next(p for p in rib.pieces if p.name == "nose").outline)
    x = 110.0
    _, lo, _, hi = nose.intersection(LineString([(x, -500), (x, 500)])).bounds
    y = 0.5 * (lo + hi)  # an explicit hole without y is centred in the local depth
    room = nose.exterior.distance(point((x, y))) - bend - rules.edge_margin_mm  # clear radius for the hole
    fits = 2 * room - 1.0
    geometry = rib_geometry(_with_holes(spec, HoleSpec(x_mm=x, d_mm=fits)), stretch_limit=stretch_limit(spec))
    placed = geometry.pieces[0].holes
    assert [(h.x, h.d) for h in placed] == [(x, fits)]
    assert placed[0].y == pytest.approx(y, abs=1e-6)
    too_big = 2 * room + 1.0  # breaks the margin by 0.50 mm
    with pytest.raises(GeometryError) as caught:
        rib_geometry(_with_holes(spec, HoleSpec(x_mm=x, d_mm=too_big)), stretch_limit=stretch_limit(spec))
    message = str(caught.value)
    assert "lightening_holes[0]" in message and "edge margin" in message
    shortfall = float(re.search(r"by (\d+\.\d+) mm", message).group(1))
    assert shortfall == pytest.approx(0.5, abs=0.01)


def test_explicit_holes_too_close_together_name_the_ligament(spec: RibSpec, rib: RibGeometry) -> None:
    ligament = spec.shared.holes.rules.ligament_mm
    a, b = HoleSpec(x_mm=300.0, d_mm=40.0), HoleSpec(x_mm=300.0 + 40.0 + ligament - 2.0, d_mm=40.0)
    centre = Polygon(next(p for p in rib.pieces if p.name == "center").outline)

    def mid_y(x: float) -> float:  # holes without y are centred in the local depth
        _, lo, _, hi = centre.intersection(LineString([(x, -500), (x, 500)])).bounds
        return 0.5 * (lo + hi)

    gap = math.dist((a.x_mm, mid_y(a.x_mm)), (b.x_mm, mid_y(b.x_mm))) - (a.d_mm + b.d_mm) / 2
    with pytest.raises(GeometryError) as caught:
        rib_geometry(_with_holes(spec, a, b), stretch_limit=stretch_limit(spec))
    message = str(caught.value)
    assert "lightening_holes[1]" in message and "ligament" in message
    shortfall = float(re.search(r"short by (\d+\.\d+) mm", message).group(1))
    assert shortfall == pytest.approx(ligament - gap, abs=0.01)
    assert 1.9 < shortfall < 2.0  # the centres' small height difference adds a little web


def test_pins_clear_of_holes_and_flanges(spec: RibSpec, rib: RibGeometry) -> None:
    # The blank is pinned through the web: two or more pins per piece (two locate and stop rotation), each clear
    # of the flange bend line and of every hole by the edge margin (the project's rule, common practice).
    margin = spec.shared.holes.rules.edge_margin_mm
    bend = spec.shared.flange.bend_radius_mm
    for piece in rib.pieces:
        web = Polygon(piece.outline)
        assert len(piece.pins) >= 2, piece.name
        for pin in piece.pins:
            assert pin.d == pytest.approx(spec.shared.pins.diameter_mm)
            assert web.exterior.distance(point((pin.x, pin.y))) - pin.d / 2 >= bend + margin - 1e-3
            for h in piece.holes:
                assert math.dist((pin.x, pin.y), (h.x, h.y)) - (h.d + pin.d) / 2 >= margin - 1e-3
        spread = max(p.x for p in piece.pins) - min(p.x for p in piece.pins)
        assert spread > 0.5 * (piece.x_range_mm[1] - piece.x_range_mm[0])  # far apart along the piece


def test_auto_holes_respect_the_margin_on_every_demo_wing_rib() -> None:
    # Wedge-shaped webs (the nose of thinner sections) once let a hole slide off its inscribed-circle centre to
    # mid-depth and cross the margin by up to 1.8 mm; every hole of every rib of the demo wing must stay clear.
    from diegen.wing import rib_spec, section_at, stations

    wing = api.load(DEMO_WING)
    count = 0
    for station in stations(wing):
        rib_spec_ = rib_spec(wing, station)
        need = rib_spec_.shared.flange.bend_radius_mm + rib_spec_.shared.holes.rules.edge_margin_mm
        for piece in rib_geometry(rib_spec_, section_at(wing, station), stretch_limit=stretch_limit(rib_spec_)).pieces:
            web = Polygon(piece.outline)
            for h in piece.holes:
                count += 1
                assert web.exterior.distance(point((h.x, h.y))) - h.d / 2 >= need - 1e-6, (piece.part_id, h)
    assert count > 60


def test_the_tail_die_runs_on_past_the_cut_along_the_section(spec: RibSpec) -> None:
    """The tail's aft end is a cut: its die runs on aft by 1.5 × bend radius + 3 mm (project limit) following the
    die outline of the whole rib (shapely: the extra length lies on the rib's die outline), so the blank's end lies
    on the flat top; the piece itself (web, flanges, blank) still ends at the cut."""
    rib = rib_geometry(spec, stretch_limit=stretch_limit(spec))
    tail = next(p for p in rib.pieces if p.name == "tail")
    x_cut = tail.x_range_mm[1]
    expected = 1.5 * spec.shared.flange.bend_radius_mm + 3.0
    assert tail.die_overrun_mm == pytest.approx(expected)
    die = Polygon(tail.die_outline)
    assert die.bounds[2] == pytest.approx(x_cut + expected, abs=1e-6)
    assert max(x for x, _ in tail.outline) == pytest.approx(x_cut, abs=1e-6)
    # the added stretch of the upper and lower edges lies on the rib's die outline, the new end face square across
    whole = LinearRing(rib.die_outline)
    added = [p for p in tail.die_outline if p[0] > x_cut + 1e-6 and p[0] < x_cut + expected - 1e-6]
    assert added and max(whole.distance(Point(p)) for p in added) < 0.01
    assert Polygon(tail.outline).within(die.buffer(1e-6))
    assert vertical_chord(die, x_cut + expected - 1e-6) == pytest.approx(vertical_chord(Polygon(rib.die_outline),
                                                                                       x_cut + expected), abs=0.05)


def test_run_on_shortens_where_the_section_ends_and_stops_where_it_has_no_room() -> None:
    """A wedge 40 mm deep at x = 0 tapering to 4 mm at x = 100 (its end), bend radius 2 mm: 6 mm of run-on wanted
    (1.5 × 2 + 3); from a cut at x = 50 it all fits, from x = 96 only 4 mm (the section ends), from x = 98 only 2 mm,
    less than half of what is wanted, so none (arithmetic of the wedge)."""
    from diegen.geometry.rib import die_overrun_mm

    x = np.linspace(0.0, 100.0, 201)
    upper = np.column_stack([x, 20.0 - 0.18 * x])
    lower = np.column_stack([x, -20.0 + 0.18 * x])
    assert die_overrun_mm(upper, lower, 50.0, 2.0) == pytest.approx(6.0)
    assert die_overrun_mm(upper, lower, 96.0, 2.0) == pytest.approx(4.0)
    assert die_overrun_mm(upper, lower, 98.0, 2.0) == 0.0


def test_a_tail_without_run_on_asks_for_a_square_cut_edge(spec: RibSpec) -> None:
    """Where the die cannot run on past the cut (no room), the shop sheet asks for a square top edge along it; with
    the run-on it says how far the die runs on instead."""
    from diegen.analysis import analyse_rib
    from diegen.reports.sheet import shop_sheet

    rib = analyse_rib(spec)
    tail = rib.pieces[2]
    sheet = shop_sheet(rib, tail)
    assert "**Cut end**: the die runs on" in sheet and "**Cut edges**" not in sheet
    flush = replace(tail, piece=replace(tail.piece, die_runs=(), die_overrun_mm=0.0))
    sheet = shop_sheet(rib, flush)
    assert "**Cut edges**" in sheet and "**square**" in sheet and "**Cut end**" not in sheet


def test_a_dropped_tail_is_told_about_its_rib_and_every_other_warning_names_rib_and_part(spec: RibSpec) -> None:
    # A minimum tail depth deeper than the section aft of the rear spar drops the tail piece: the finding is about
    # the whole rib (no part), and says so in every form; every piece's finding names its rib and its part.
    from diegen.analysis import analyse_rib
    from diegen.reports.sheet import shop_sheet

    flange = replace(spec.shared.flange, min_tail_depth_mm=500.0)
    variant = replace(spec, shared=replace(spec.shared, flange=flange))
    rib = analyse_rib(variant)
    (dropped,) = rib.geometry.warnings
    assert dropped.code == "tail-piece-dropped" and dropped.part_id == "" and dropped.rib_id == spec.id
    assert str(dropped).startswith(f"rib {spec.id}: no tail piece")
    assert dropped.as_json()["rib"] == spec.id and dropped.as_json()["part"] == ""
    for piece in rib.pieces:
        for finding in piece.warnings:
            assert finding.rib_id == spec.id and finding.part_id == piece.piece.part_id
            assert str(finding).startswith(f"{piece.piece.part_id}: ")
        assert f"* rib {spec.id}: no tail piece" in shop_sheet(rib, piece)
