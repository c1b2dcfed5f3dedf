"""Forming analysis of the demo rib, the JSON report and the command line.

Strain checks compare with the contoured-flange formulas e = −w/(ρ + w) (shrink)
and e = w/(ρ − w) (stretch): plan geometry of a flange standing on a curve —
the free edge lies at ρ ± w in the flat blank and at ρ when formed (derived; check values
for R = 2.0 / 5.0 / 1.0 in, h = 0.5 in worked out below).
"""

from __future__ import annotations

import json
import math
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import shapely
from shapely.geometry import LinearRing, LineString, Polygon
from testing import DEMO_RIB, ROOT, circle_points

from diegen import api, materials
from diegen.analysis import PieceAnalysis, RibAnalysis, _analyse_piece, check_radius, springback_for
from diegen.forming.bend import flange_layout
from diegen.forming.strain import strain_along
from diegen.geometry.types import PieceGeometry, Run
from diegen.spec.model import RibSpec

IN = 25.4  # mm per inch, exact (NIST SP 811)
N_PER_LBF = 4.4482216152605  # N per pound-force, exact by definition (NIST SP 811, appendix B)


def piece(analysis: RibAnalysis, name: str) -> PieceAnalysis:
    return next(p for p in analysis.pieces if p.piece.name == name)


def _peak_point(p: PieceAnalysis) -> tuple[float, float, float]:
    """(strain, x, y) of the largest shrink of a piece, located on its plain outline."""
    best = (0.0, math.nan, math.nan)
    for run in p.runs:
        i = int(np.argmin(run.profile.strain))
        where = LineString(p.piece.plain_runs[run.run_index].points).interpolate(float(run.profile.s_mm[i]))
        if -run.profile.strain[i] > best[0]:
            best = (float(-run.profile.strain[i]), where.x, where.y)
    return best


# --------------------------------------------------------------------------- demo rib


def test_nose_shrinks_past_the_limit_at_the_leading_edge_and_gets_flutes(spec: RibSpec, analysis: RibAnalysis) -> None:
    nose = piece(analysis, "nose")
    limit = materials.sheet_alloy("2024-T3").shrink_limit
    assert nose.alloy.shrink_limit == limit
    strain, x, _ = _peak_point(nose)
    assert strain == pytest.approx(nose.max_shrink)
    assert nose.max_shrink > limit
    assert x < 0.02 * spec.chord_mm  # at the leading edge
    # Expected size: the die outline's nose radius is the section's, r_t = 1.1019·t²·c (NACA Report 824),
    # less the inward offset skin + sheet (an inward normal offset of a circle shrinks its radius by the offset).
    # The analysis averages curvature over one flange width (its own model), so its peak lies a little below
    # the formula at the tightest radius: allow 10 % below, nothing above.
    w = nose.layout.developed_width_mm
    rho = 1.1019 * 0.12**2 * spec.chord_mm - spec.shared.skin_thickness_mm - spec.shared.sheet.thickness_mm
    expected = w / (rho + w)
    assert 0.9 * expected <= nose.max_shrink <= expected * 1.001
    # relief policy "flutes": flutes, no notches, each flute inside a run that passes the limit
    assert spec.shared.relief == "flutes"
    assert nose.flutes and not nose.notches
    spans = [(r.s_offset_mm + s.s_start_mm, r.s_offset_mm + s.s_start_mm + s.length_mm)
             for r in nose.runs for s in r.shrink_runs]
    for flute in nose.flutes:
        assert any(a - 1e-6 <= flute.s_mm <= b + 1e-6 for a, b in spans)


def test_centre_piece_needs_no_relief(analysis: RibAnalysis) -> None:
    centre = piece(analysis, "center")
    assert centre.max_shrink < centre.alloy.shrink_limit
    assert centre.max_stretch < centre.alloy.stretch_limit
    assert not centre.flutes and not centre.notches
    assert all(not r.shrink_runs and not r.stretch_runs for r in centre.runs)


def test_every_piece_uses_the_same_bend_layout(analysis: RibAnalysis) -> None:
    # BA = θ(R + kT) with θ = π/2 (FAA-H-8083-31 ch. 4, K-factor form); developed width = BA + h − SB,
    # SB = R + T for 90° (same source).
    for p in analysis.pieces:
        lay = p.layout
        r, t, k, h = p.springback.part_radius_mm, analysis.spec.shared.sheet.thickness_mm, lay.k_factor, \
            analysis.spec.shared.flange.height_mm
        assert lay.bend_allowance_mm == pytest.approx(math.pi / 2 * (r + k * t), rel=1e-9)
        assert lay.developed_width_mm == pytest.approx(lay.bend_allowance_mm + h - (r + t), rel=1e-9)


# --------------------------------------------------------------------------- circles


def _circle_piece(radius: float, n: int = 720) -> PieceGeometry:
    """A closed circular die outline (CCW) as two flanged half-circle runs."""
    pts = [(float(x), float(y)) for x, y in circle_points(radius, n, centre=(radius + 10.0, 0.0), start=math.pi / 2)]
    upper, lower = tuple(pts[: n // 2 + 1]), tuple(pts[n // 2:] + pts[:1])
    runs = (Run("curve", upper), Run("curve", lower))
    return PieceGeometry("nose", "circle", (10.0, 2 * radius + 10.0), runs, (), (), (), (), (0.0, 0.0), runs)


@pytest.mark.parametrize(("rho_in", "w_in", "expected"), [(2.0, 0.5, 0.200), (5.0, 0.5, 0.0909), (1.0, 0.5, 0.333)],
                         ids=["R2", "R5", "R1"])
def test_strain_on_a_circle_matches_the_contoured_flange_formula(rho_in: float, w_in: float, expected: float) -> None:
    # Check values derived from the flange geometry: shrink −h/(R + h), stretch +h/(R − h).
    rho, w = rho_in * IN, w_in * IN
    circle = _circle_piece(rho)
    # A 720-gon's windowed curvature reads the circumradius × sin(π/n)/(π/n): 3e-6 relative, well inside 1e-4.
    for run in circle.runs:
        profile = strain_along(np.asarray(run.points), w, closed=False)
        assert -profile.strain.min() == pytest.approx(w / (rho + w), rel=1e-4)
        # uniform along the circle, except within half a window (+ one edge) of the run's open ends
        edge = 2 * math.pi * rho / 720
        inner = (profile.s_mm > w / 2 + edge) & (profile.s_mm < profile.length_mm - w / 2 - edge)
        assert inner.sum() > 100
        assert np.ptp(profile.strain[inner]) < 1e-9
    assert w / (rho + w) == pytest.approx(expected, abs=5e-4)
    # a concave arc (the flange inside the curve: the outline turns right) stretches by w/(ρ − w)
    arc = circle_points(rho, 720)[:181][::-1]  # quarter circle run clockwise
    stretch = strain_along(arc, w, closed=False)
    stretch_expected = {0.200: 0.333, 0.0909: 0.111, 0.333: 1.000}[expected]
    assert stretch.max_stretch == pytest.approx(w / (rho - w), rel=1e-4)
    assert w / (rho - w) == pytest.approx(stretch_expected, abs=5e-4)


@pytest.mark.parametrize("rho", [20.0, 50.0, 200.0])
def test_analysis_of_a_circular_piece_reads_w_over_rho_plus_w(spec: RibSpec, rho: float) -> None:
    shared = spec.shared
    alloy = materials.sheet_alloy(shared.sheet.alloy)
    springback = springback_for(spec, alloy)
    layout = flange_layout(shared.flange.height_mm, shared.flange.bend_radius_mm, shared.sheet.thickness_mm,
                           alloy.k_factor)
    result = _analyse_piece(spec, _circle_piece(rho), alloy, check_radius(spec, springback), springback, layout)
    w = layout.developed_width_mm
    assert result.max_shrink == pytest.approx(w / (rho + w), rel=1e-4)
    assert result.max_stretch == 0.0
    assert bool(result.flutes) == (w / (rho + w) > result.flange.shrink_limit)
    # the verdict follows the residual after relief against the limit
    assert (result.flange.verdict == "formable") == (result.flange.residual_shrink <= result.flange.shrink_limit)


# --------------------------------------------------------------------------- report


REPORT_KEYS = {
    "bend": {"part_radius_mm", "die_radius_mm", "die_angle_deg", "overbend_deg", "k_factor", "bend_allowance_mm",
             "min_radius_mm"},
    "flange": {"height_mm", "developed_width_mm", "max_shrink_strain", "max_stretch_strain", "shrink_limit",
               "stretch_limit", "flutes", "notches", "residual_shrink_strain", "verdict", "remedies"},
    "die": {"outline_length_mm", "area_mm2", "height_mm"},
    "blank": {"area_mm2", "perimeter_mm"},
    "press": {"force_n", "box_area_mm2", "pressure_mpa", "die_top_pressure_mpa", "needed_mpa", "verdict",
              "reachable_radius_mm", "flange_angle_deg"},
}


def test_json_report_has_the_documented_keys_and_consistent_numbers(spec: RibSpec, analysis: RibAnalysis) -> None:
    report = json.loads(json.dumps(api.report_json(analysis), allow_nan=False))  # strict JSON: no NaN / inf
    assert isinstance(report["warnings"], list)
    assert [p["piece"] for p in report["parts"]] == ["nose", "center", "tail"]
    force = 25 * 2000 * N_PER_LBF  # "25 ton": short tons-force, 2000 lbf each
    box = (12 * IN) * (10 * IN)
    for part, p in zip(report["parts"], analysis.pieces):
        assert part["id"] == p.piece.part_id and part["piece"] == p.piece.name
        for group, keys in REPORT_KEYS.items():
            assert keys <= set(part[group]), (group, keys - set(part[group]))
        assert isinstance(part["warnings"], list)
        for hole in part["holes"]:
            assert {"x_mm", "y_mm", "d_mm", "flanged", "pilot_d_mm"} <= set(hole)
            if hole["flanged"]:
                assert hole["pilot_d_mm"] < hole["d_mm"]
        assert [(q["x_mm"], q["y_mm"], q["d_mm"]) for q in part["pins"]] == \
            [(round(q.x, 3), round(q.y, 3), round(q.d, 3)) for q in p.piece.pins]
        # numbers measured again with shapely
        outline = Polygon(p.piece.die_outline)
        assert part["die"]["outline_length_mm"] == pytest.approx(outline.length, abs=0.01)
        assert part["die"]["area_mm2"] == pytest.approx(outline.area, abs=0.1)
        circles = p.blank.cut_circles + p.blank.drill_circles
        cuts = [shapely.Point(c.x, c.y).buffer(c.d / 2, quad_segs=128) for c in circles]
        net = Polygon(p.blank.outer).difference(shapely.union_all(cuts)).area
        assert part["blank"]["area_mm2"] == pytest.approx(net, rel=1e-4)
        assert part["blank"]["perimeter_mm"] == pytest.approx(LinearRing(p.blank.outer).length, abs=0.01)
        # press: pressure once the rubber has flowed = force / box area (common practice, no source)
        assert part["press"]["force_n"] == pytest.approx(force, abs=0.1)
        assert part["press"]["box_area_mm2"] == pytest.approx(box, abs=0.1)
        assert part["press"]["pressure_mpa"] == pytest.approx(force / box, abs=1e-4)
        assert part["press"]["verdict"] in {"full", "partial", "insufficient"}
        assert part["flange"]["max_shrink_strain"] == pytest.approx(p.max_shrink, abs=1e-4)
        assert part["bend"]["die_radius_mm"] < part["bend"]["part_radius_mm"]  # the die over-bends (springback)
        assert part["bend"]["min_radius_mm"] <= part["bend"]["part_radius_mm"]


# --------------------------------------------------------------------------- command line


def _cli(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    """Run the ``diegen`` console script of this environment (``python -m diegen.cli`` if it is not installed)."""
    script = shutil.which("diegen", path=str(Path(sys.executable).parent))
    command = [script] if script else [sys.executable, "-m", "diegen.cli"]
    return subprocess.run([*command, *args], capture_output=True, text=True, cwd=cwd, timeout=300, check=False)


@pytest.mark.slow
def test_new_rib_then_check_passes(tmp_path: Path) -> None:
    made = _cli("new", "rib", "x.yaml", cwd=tmp_path)
    assert made.returncode == 0, made.stderr
    checked = _cli("check", "x.yaml", "--json", cwd=tmp_path)
    assert checked.returncode == 0, checked.stderr
    assert {p["piece"] for p in json.loads(checked.stdout)["parts"]} == {"nose", "center", "tail"}
    again = _cli("new", "rib", "x.yaml", cwd=tmp_path)  # never overwrites without being asked
    assert again.returncode == 2 and "already exists" in again.stderr


@pytest.mark.slow
def test_new_wing_then_check_passes(tmp_path: Path) -> None:
    made = _cli("new", "wing", "w.yaml", cwd=tmp_path)
    assert made.returncode == 0, made.stderr
    checked = _cli("check", "w.yaml", cwd=tmp_path)
    assert checked.returncode == 0, checked.stderr
    assert checked.stdout.count("== ") >= 3


@pytest.mark.parametrize("kind", ["rib", "wing"])
@pytest.mark.parametrize("units", ["in", "mm"])
def test_starters_in_either_unit_check_and_offer_a_print_bed(tmp_path: Path, kind: str, units: str) -> None:
    path = api.write_starter(kind, tmp_path / f"{kind}-{units}.yaml", units=units)
    text = path.read_text()
    assert f"\nunits: {units} " in text
    assert any(line.strip().startswith("# print_bed: [") for line in text.splitlines())  # offered, commented out
    spec = api.load(path)
    assert spec.units == units and spec.paper == ("letter" if units == "in" else "a4")
    analysis = api.analyse(spec)
    ribs = analysis.ribs if kind == "wing" else (analysis,)
    assert all({p.piece.name for p in rib.pieces} == {"nose", "center", "tail"} for rib in ribs)
    # the print bed line, uncommented, gives a printed die
    printed = tmp_path / f"printed-{kind}-{units}.yaml"
    printed.write_text(text.replace("# print_bed:", "print_bed:").replace("material: solid-surface", "material: pla"))
    assert api.report_json(api.analyse(api.load(printed)))["parts"][0]["die"]["making"] == "printed"


@pytest.mark.slow
def test_new_with_units_on_the_command_line(tmp_path: Path) -> None:
    made = _cli("new", "rib", "m.yaml", "--units", "mm", cwd=tmp_path)
    assert made.returncode == 0, made.stderr
    assert "\nunits: mm " in (tmp_path / "m.yaml").read_text()
    refused = _cli("new", "rib", "n.yaml", "--units", "cm", cwd=tmp_path)
    assert refused.returncode == 2 and "invalid choice" in refused.stderr


def test_materials_prints_a_table() -> None:
    done = _cli("materials", cwd=ROOT)
    assert done.returncode == 0, done.stderr
    for name in materials.sheet_alloy_names() + materials.die_material_names():
        assert name in done.stdout
    assert len(done.stdout.splitlines()) > len(materials.sheet_alloy_names())


def test_bad_spec_is_reported_without_a_traceback(tmp_path: Path) -> None:
    bad = tmp_path / "bad.yaml"
    bad.write_text(DEMO_RIB.read_text(encoding="utf-8").replace("chord: 40", "chord: -40"), encoding="utf-8")
    done = _cli("check", str(bad), cwd=tmp_path)
    assert done.returncode == 2
    assert "Traceback" not in done.stderr and "chord" in done.stderr


def test_joggle_ramps_bend_rounder_than_the_die_wall_inset(tmp_path: Path) -> None:
    """With a large die radius and thick stock the die's wall sits further in than the cutter radius: the joggle
    ramps' convex bends (radius L²/((10/√3)·d) for the ramp d·(10u³ − 15u⁴ + 6u⁵), derived) are then made rounder
    than that inset, else the die's offset sections would cusp there.  The inset: top setback R(1 + sin α)/cos α
    (a circle tangent to the top face and the wall leaning by α, plane geometry) or the bottom inset H·tan α,
    whichever is larger."""
    text = DEMO_RIB.read_text().replace('bend_radius: "3/32 in"', 'bend_radius: "1/8 in"').replace(
        "stock_thickness: 0.5", "stock_thickness: 0.75").replace("chord: 40", "chord: 60")
    path = tmp_path / "rib.yaml"
    path.write_text(text)
    rib = api.analyse(api.load(path))
    sb = rib.pieces[0].springback
    height = rib.pieces[0].die_height_mm
    a = math.radians(sb.overbend_deg)
    inset = max(sb.die_radius_mm * (1 + math.sin(a)) / math.cos(a), height * math.tan(a))
    cutter = rib.spec.shared.die.cutter_diameter_mm / 2
    assert inset + 0.5 > cutter  # the case this test is about
    joggles = [j for p in rib.geometry.pieces for j in p.joggles]
    assert joggles
    for j in joggles:
        assert j.ramp_mm**2 / (10 / math.sqrt(3) * j.depth_mm) >= inset + 0.5 - 1e-9
