"""Flange runs of a drawn part with their own bend radius and angle (``flanges: [{..., bend_radius, angle}]``).

Checks against outside sources, each named beside its check:

* bend allowance and setback for a 45° bend and for a second radius: FAA-H-8083-31, *Aviation Maintenance
  Technician Handbook — Airframe*, ch. 4 (sheet-metal layout): BA = (0.01743·R + 0.0078·T)·N, N in degrees;
  SB = K·(R + T), K = tan(θ/2) (its setback K chart: K = 0.41421 at 45°, 1.0 at 90°); developed flange = BA + the
  mold-line leg less the setback;
* springback per radius: the elastic–perfectly-plastic closed form ρi/ρf = 4X³ − 3X + 1, X = ρi·σy'/(E'·t), on the
  neutral surface (Gardiner 1957, as given in Marciniak, Duncan & Hu, *Mechanics of Sheet Metal Forming*, 2002,
  ch. 6), and the bend angle from a constant neutral-line length αi·ρi = αf·ρf;
* the die wall's section for a run bent through less than 90°: plane geometry of a circle of radius R tangent to
  the top face and to a wall leaning out by θd − 90° (the top setback is the arc's tangent length R·tan(θd/2),
  the wall's inset at depth d is d·tan(θd − 90°)), written out here;
* the die's volume: its sections' areas integrated over its height, each section a rectangle (or, for a rounded
  outline, its parallel body by Steiner's formula A(u) = A − P·u + π·u², exact for a convex outline offset by u
  less than its corner radius), with the insets from the closed forms above;
* the contoured-flange strain of a sloped flange: a flange of developed width w bent through θ moves its free edge
  in by w·(1 − cos θ) in plan, so on a plan radius ρ its edge goes from ρ + w to ρ + w·cos θ (plane geometry,
  derived in ``diegen/forming/strain.py``), which at θ = 90° is the handbook's −w/(ρ + w).
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from scenarios import parts, write
from shapely.geometry import LineString, Polygon
from test_parts import SHARED, only_piece, part_spec

from diegen import api
from diegen.cli import main
from diegen.die.model import largest_outset_mm, level_section, loft_levels, outline_model
from diegen.die.wall import BLEND_MIN_MM, BLEND_PER_MM, LoftLevel, quintic, wall_plan
from diegen.errors import FormingError
from diegen.forming.bend import bend_allowance_aviation, setback
from diegen.forming.springback import BendSheet, die_for_part, radius_ratio
from diegen.forming.strain import strain_along
from diegen.reports.sheet import shop_sheet
from diegen.units import MM_PER_IN

T = 0.8  # SHARED: 0.8 mm 2024-T3, flange 12 mm at R 3, 19 mm solid-surface stock

TRAY = ("{points: [[0, 0], [260, 0], [260, 160], [0, 160]], is: die}",
        "flanges: [{from: [0, 0], to: [260, 0]}, {from: [260, 160], to: [0, 160], bend_radius: 5}, "
        "{from: [0, 160], to: [0, 0], angle: 45, height: 10}]\n")


def scenario(name: str):
    return next(s for s in parts() if s.name == name)


@pytest.fixture(scope="module")
def tray():
    """A 260 × 160 mm tray (die outline): the bottom side flanged 12 mm at the spec's R 3, the top side 12 mm at
    its own R 5, the left end a 10 mm lip at 45°, the right end cut."""
    return only_piece(part_spec(*TRAY))


def shape_of(piece, key: str):
    return next(h for h in piece.shapes if key in h.keys)


# -- bend allowance, setback and springback --------------------------------------------------------------------


def test_faa_worked_numbers_for_a_45_degree_bend_and_a_second_radius() -> None:
    """FAA-H-8083-31 ch. 4 formulas with numbers worked here by hand: 0.040 in sheet bent 45° over R = 0.125 in:
    BA = (0.01743 × 0.125 + 0.0078 × 0.040) × 45 = 0.112084 in; K(45°) = 0.41421 (the handbook's K chart),
    SB = 0.414214 × 0.165 = 0.068345 in.  The same sheet bent 90° over R = 0.1875 in: BA = (0.01743 × 0.1875 +
    0.0078 × 0.040) × 90 = 0.322211 in, SB = 1 × 0.2275 in."""
    r, t = 0.125 * MM_PER_IN, 0.040 * MM_PER_IN
    assert bend_allowance_aviation(r, t, 45.0) / MM_PER_IN == pytest.approx(0.112084, abs=5e-7)
    assert setback(r, t, 45.0) / MM_PER_IN == pytest.approx(0.068345, abs=5e-7)
    r2 = 0.1875 * MM_PER_IN
    assert bend_allowance_aviation(r2, t, 90.0) / MM_PER_IN == pytest.approx(0.322211, abs=5e-7)
    assert setback(r2, t, 90.0) / MM_PER_IN == pytest.approx(0.2275, abs=1e-9)


def test_each_run_is_developed_for_its_own_radius_and_angle(tray) -> None:
    """Each run's layout follows FAA-H-8083-31 ch. 4 with its own R and θ: BA (aviation form) =
    (0.01743·R + 0.0078·T)·θ, SB = tan(θ/2)·(R + T), developed = θ·(R + kT) + (H − SB)."""
    _, piece = tray
    k = piece.layout.k_factor
    for key, height, radius, angle in (("flanges[0]", 12.0, 3.0, 90.0), ("flanges[1]", 12.0, 5.0, 90.0),
                                       ("flanges[2]", 10.0, 3.0, 45.0)):
        shape = shape_of(piece, key)
        assert (shape.height_mm, shape.bend_radius_mm, shape.angle_deg) == (height, radius, angle)
        layout = shape.layout
        assert layout.bend_allowance_aviation_mm == pytest.approx((0.01743 * radius + 0.0078 * T) * angle, rel=1e-12)
        sb = math.tan(math.radians(angle) / 2) * (radius + T)
        assert layout.setback_mm == pytest.approx(sb, rel=1e-12)
        assert layout.developed_width_mm == pytest.approx(math.radians(angle) * (radius + k * T) + height - sb,
                                                          rel=1e-12)


@pytest.mark.parametrize("radius, angle", [(3.0, 90.0), (5.0, 90.0), (3.0, 45.0), (5.0, 60.0)])
def test_springback_per_radius_and_angle_against_the_closed_form(radius: float, angle: float) -> None:
    """Without hardening the model is the closed form ρi/ρf = 4X³ − 3X + 1 (Gardiner 1957; Marciniak, Duncan & Hu
    2002, ch. 6) with X = ρi·σy'/(E'·t), σy' = 2/√3·σy, E' = E/(1 − ν²), on the neutral surface (R + t/2); the die
    angle keeps the neutral line's length, αi = αf·ρf/ρi, so a 45° flange is over-bent half as much as a square one.
    2024-T3: σy = 345 MPa, E = 73.1 GPa (typical values of the alloy; from memory, unverified)."""
    sheet = BendSheet(T, 345.0, 73_100.0)
    die = die_for_part(radius, sheet, angle)
    rho_i, rho_f = die.die_radius_mm + T / 2, radius + T / 2
    x = rho_i * (2 / math.sqrt(3) * 345.0) / (73_100.0 / (1 - 0.33**2) * T)
    assert rho_i / rho_f == pytest.approx(radius_ratio(x), rel=1e-9)
    assert radius_ratio(x) == pytest.approx(4 * x**3 - 3 * x + 1, rel=1e-15)
    assert die.die_angle_deg == pytest.approx(angle * rho_f / rho_i, rel=1e-12)


def test_each_run_gets_its_own_die_from_the_springback_model(tray) -> None:
    """The analysis gives each run the model's die for its own radius and angle (the same model as the spec's
    flange: hardening and all), the spec's flange run the piece's own."""
    analysis, piece = tray
    from diegen.analysis import bend_sheet

    sheet = bend_sheet(analysis.spec, piece.alloy)
    for key, radius, angle in (("flanges[1]", 5.0, 90.0), ("flanges[2]", 3.0, 45.0)):
        die = shape_of(piece, key).die(piece.springback)
        expected = die_for_part(radius, sheet, angle)
        assert (die.die_radius_mm, die.die_angle_deg) == pytest.approx((expected.die_radius_mm,
                                                                         expected.die_angle_deg), rel=1e-12)
    assert shape_of(piece, "flanges[0]").die(piece.springback) == piece.springback
    # a larger radius springs back more: a smaller ratio of die to part radius and a larger over-bend
    r3, r5 = shape_of(piece, "flanges[0]").die(piece.springback), shape_of(piece, "flanges[1]").die(piece.springback)
    assert r5.die_radius_mm / 5.0 < r3.die_radius_mm / 3.0 and r5.die_angle_deg > r3.die_angle_deg


# -- the blank ---------------------------------------------------------------------------------------------------


def test_the_blank_edge_of_each_run_stands_its_own_developed_width_less_its_own_tangent_inset(tray) -> None:
    """Mid-way along each side the blank's edge stands (developed width − R_die·tan(θ_die/2)) outside the die
    outline: the web's bend line lies the die radius's tangent length inside the die's sharp corner (plane
    geometry), and the developed flange is laid out from there (FAA-H-8083-31 ch. 4); the cut end is flush."""
    _, piece = tray
    blank = Polygon(piece.blank.outer)

    def stands(key: str) -> float:
        shape = shape_of(piece, key)
        die = shape.die(piece.springback)
        return shape.layout.developed_width_mm - die.die_radius_mm * math.tan(math.radians(die.die_angle_deg) / 2)

    across = blank.intersection(LineString([(130, -100), (130, 300)]))
    along = blank.intersection(LineString([(-100, 80), (400, 80)]))
    assert across.bounds[1] == pytest.approx(-stands("flanges[0]"), abs=1e-6)
    assert across.bounds[3] == pytest.approx(160 + stands("flanges[1]"), abs=1e-6)
    assert along.bounds[0] == pytest.approx(-stands("flanges[2]"), abs=1e-6)
    assert along.bounds[2] == pytest.approx(260.0, abs=1e-6)
    assert len({round(stands(k), 6) for k in ("flanges[0]", "flanges[1]", "flanges[2]")}) == 3


# -- contour strain of a sloped flange ---------------------------------------------------------------------------


@pytest.mark.parametrize("angle", [45.0, 60.0, 90.0])
def test_a_sloped_flange_shrinks_by_its_loss_of_reach(angle: float) -> None:
    """A flange of width w on a plan circle of radius ρ, bent through θ: the edge goes from ρ + w (blank) to
    ρ + w·cos θ (formed), so e = −w·(1 − cos θ)/(ρ + w) (plane geometry; at 90° the handbook's −w/(ρ + w))."""
    rho, w = 100.0, 12.0
    t = np.linspace(0.0, 2 * math.pi, 721)[:-1]
    profile = strain_along(np.column_stack([rho * np.cos(t), rho * np.sin(t)]), w, closed=True, angle_deg=angle)
    expected = -w * (1 - math.cos(math.radians(angle))) / (rho + w)
    assert np.median(profile.strain) == pytest.approx(expected, rel=2e-4)  # the polygon's chords: ρ within 1e-4


def test_a_sloped_flanges_excess_edge_is_what_its_edge_loses_in_plan() -> None:
    """Round a closed circle (ρ = 100 mm) a 12 mm flange bent through 45° has an edge of 2π(ρ + w) in the blank and
    2π(ρ + w·cos 45°) formed (plane geometry): the excess over a shrink limit L is 2π·(w·(1 − cos θ) − L·(ρ + w)).
    With L = 0.02 the relief model's shrink run carries exactly that; with L = 0.04 (above the 0.031 it shrinks) it
    finds none, though the square flange (0.107) would pass it."""
    from diegen.forming.relief import shrink_runs

    rho, w = 100.0, 12.0
    t = np.linspace(0.0, 2 * math.pi, 2881)[:-1]
    ring = np.column_stack([rho * np.cos(t), rho * np.sin(t)])
    lip = strain_along(ring, w, closed=True, angle_deg=45.0)
    (run,) = shrink_runs(lip, 0.02)
    loss = 1 - math.cos(math.radians(45.0))
    assert run.excess_mm == pytest.approx(2 * math.pi * (w * loss - 0.02 * (rho + w)), rel=1e-4)
    assert shrink_runs(lip, 0.04) == ()
    assert shrink_runs(strain_along(ring, w, closed=True), 0.04)


def test_a_60_degree_half_circle_of_a_stadium_shrinks_less_than_the_square_one(tmp_path: Path) -> None:
    """The stadium of the corpus (P16): the right half circle is a 60° flange of R 4, the rest square.  Mid-way
    round the right arc the shrink is w·(1 − cos 60°)/(ρ + w), half the square flange's at the same w and ρ."""
    spec = api.load(write(scenario("P16"), tmp_path))
    analysis = api.analyse(spec)
    (piece,) = analysis.pieces
    shape = shape_of(piece, "flanges[1]")
    w = shape.layout.developed_width_mm
    rho = 90.0 - T  # the mold line's half circle of radius 90, the die outline inside it by the sheet
    run = next(r for r in piece.runs if piece.piece.plain_runs[r.run_index].flange_key == "flanges[1]")
    mid = float(np.median(run.profile.strain))
    assert mid == pytest.approx(-w * 0.5 / (rho + w), rel=2e-3)


# -- the die wall --------------------------------------------------------------------------------------------------


def test_the_45_degree_runs_wall_follows_the_closed_form(tray) -> None:
    """Mid-way along the 45° lip (x = 0, y = 80, the die outline), every loft section lies at the profile's own
    inset and depth: on the arc of radius R at angle φ = f·θd from the top face, inset R·tan(θd/2) − R·sin φ and
    depth R·(1 − cos φ); at the bottom face (depth H) the wall has leant out H·tan(θd − 90°) (negative: outside)."""
    _, piece = tray
    die = piece.die.die
    assert die.profiles is not None
    sb = shape_of(piece, "flanges[2]").die(piece.springback)
    r, theta = sb.die_radius_mm, math.radians(sb.die_angle_deg)
    model = outline_model(die)
    arc, wall = loft_levels(die)
    for level in (*arc, wall[-1]):
        pieces = level_section(die, model, level)
        pts = np.concatenate([np.asarray(p.points) for p in pieces])
        depths = np.concatenate([np.asarray(p.depths) for p in pieces])
        ends = [np.asarray(p.points) for p in pieces if p.kind == "line"]
        side = [e for e in ends if abs(e[0, 0] - e[-1, 0]) < 1e-9 and e[0, 0] < 40.0]  # the left side's line
        assert len(side) == 1
        left = np.isin(pts[:, 0], side[0][:, 0]) & (pts[:, 0] < 40.0)
        if isinstance(level, LoftLevel) and level.fraction is not None:
            phi = level.fraction * theta
            inset, depth = r * math.tan(theta / 2) - r * math.sin(phi), r * (1 - math.cos(phi))
        else:
            depth = die.height_mm
            inset = die.height_mm * math.tan(theta - math.pi / 2)
        xs = pts[left, 0]
        assert xs.size and np.allclose(xs, inset, atol=1e-6), (level, xs[:3], inset)
        assert np.allclose(depths[left], depth, atol=1e-9)
    assert largest_outset_mm(die) == pytest.approx(-die.height_mm * math.tan(theta - math.pi / 2), rel=1e-12)


def test_the_wall_changes_between_runs_with_the_quintic_run_out(tray) -> None:
    """The bottom section along the cut right end (x = 260): it goes from the bottom run's inset (its lean over
    the block's height) to the top run's over the blend, as the quintic w = 10x³ − 15x⁴ + 6x⁵ of the joggles;
    the blend's length is max(10 mm, 2 × the largest change of inset or depth) (project limit)."""
    _, piece = tray
    die = piece.die.die
    plan = wall_plan(die)
    assert plan is not None
    low = shape_of(piece, "flanges[0]").die(piece.springback)
    high = shape_of(piece, "flanges[1]").die(piece.springback)
    h = die.height_mm
    u0, u1 = h * math.tan(math.radians(low.die_angle_deg - 90)), h * math.tan(math.radians(high.die_angle_deg - 90))
    on_cut = next(b for b in plan.blends if not b.on_flange)
    assert on_cut.length_mm == pytest.approx(max(BLEND_MIN_MM, BLEND_PER_MM * abs(u1 - u0)), rel=1e-9)
    assert on_cut.start_mm == pytest.approx(260 + (160 - on_cut.length_mm) / 2, abs=1e-9)  # centred on the cut end
    model = outline_model(die)
    bottom = level_section(die, model, LoftLevel(None, h))
    pts = np.concatenate([np.asarray(p.points) for p in bottom])
    end = pts[(pts[:, 1] > 5) & (pts[:, 1] < 155) & (pts[:, 0] > 200)]
    y0 = on_cut.start_mm - 260.0
    x = np.clip((end[:, 1] - y0) / on_cut.length_mm, 0, 1)
    w, _ = quintic(x)
    assert np.allclose(260.0 - end[:, 0], u0 + w * (u1 - u0), atol=1e-6)


def test_a_run_too_short_for_the_change_is_refused_by_check_and_build_alike(tmp_path: Path) -> None:
    """A 120 × 40 mm plate with a 45° lip on one long side and a square flange on the other (scenario P19): at the
    foot of the 19.05 mm block the wall leans in 8.3° under the one and out 40.9° under the other, so it must change
    over 2 × 19.05 × (tan 8.3° + tan 40.9°) ≈ 38.5 mm, more than the 40 mm cut end holds clear of its corners: check
    refuses the die, naming the runs and the remedy, and build refuses it with the same message."""
    spec_path = tmp_path / "short.yaml"
    spec_path.write_text(SHARED + "outline: {points: [[0, 0], [120, 0], [120, 40], [0, 40]], is: die}\n"
                         "flanges: [{from: [0, 0], to: [120, 0], angle: 45}, {from: [120, 40], to: [0, 40]}]\n")
    analysis = api.analyse(api.load(spec_path))
    (piece,) = analysis.pieces
    refusal = piece.die.refusal
    assert refusal is not None and "flanges[0]" in refusal and "flanges[1]" in refusal and "cut edge" in refusal
    assert "make that cut edge longer" in refusal
    result = api.build(api.load(spec_path), tmp_path / "out", jobs=1)
    ((status, error),) = [(o.status, o.error) for o in result.outcomes]
    assert status != "built" and error == refusal


# -- the spec ----------------------------------------------------------------------------------------------------


@pytest.mark.parametrize("run, says", [
    ("{from: [0, 0], to: [240, 0], angle: 20}", "found int 20"),
    ("{from: [0, 0], to: [240, 0], angle: 90.5}", "from 30 to 90"),
    ("{from: [0, 0], to: [240, 0], bend_radius: 0}", "expected a value greater than 0"),
    ("{from: [0, 0], to: [240, 0], bend_radius: 150}", "at most 100"),
])
def test_a_bad_run_shape_exits_2_located_and_writes_nothing(tmp_path: Path, capsys, run: str, says: str) -> None:
    spec = tmp_path / "bad.yaml"
    spec.write_text(SHARED + "outline: {points: [[0, 0], [240, 0], [240, 160], [0, 160]], is: die}\n"
                    f"flanges: [{run}]\n")
    assert main(["build", str(spec), "-o", str(tmp_path / "out")]) == 2
    err = capsys.readouterr().err
    key = "angle" if "angle" in run else "bend_radius"
    assert "bad.yaml:10:" in err and f"flanges[0].{key}" in err and says in err and "Traceback" not in err
    assert not (tmp_path / "out").exists()


def test_a_run_radius_below_the_table_is_refused_at_its_own_key(tmp_path: Path, capsys) -> None:
    """0.8 mm 2024-T3 needs at least 2.4 mm (the catalogue's minimum-bend-radius table); a run of 1 mm is refused
    at ``flanges[1].bend_radius`` (its line and column), not at the flange section's radius."""
    spec = tmp_path / "tight.yaml"
    spec.write_text(SHARED + "outline: {points: [[0, 0], [240, 0], [240, 160], [0, 160]], is: die}\n"
                    "flanges: [{from: [0, 0], to: [240, 0]}, {from: [240, 160], to: [0, 160], bend_radius: 1}]\n")
    assert main(["check", str(spec)]) == 2
    err = capsys.readouterr().err
    assert "tight.yaml:10:" in err and "flanges[1].bend_radius" in err and "minimum" in err
    with pytest.raises(FormingError):
        api.analyse(api.load(spec))


def test_the_reports_state_each_runs_bend(tray) -> None:
    analysis, piece = tray
    report = api.report_json(analysis)
    (part,) = report["parts"] if "parts" in report else report["pieces"]
    runs = part["flange"]["runs"]
    bends = {tuple(r["bend"]["flange_runs"]): r["bend"] for r in runs}
    lip = bends[("flanges[2]",)]
    die = shape_of(piece, "flanges[2]").die(piece.springback)
    assert lip["angle_deg"] == 45.0 and lip["die_angle_deg"] == pytest.approx(die.die_angle_deg, abs=1e-3)
    assert lip["overbend_deg"] == pytest.approx(die.die_angle_deg - 45.0, abs=1e-3)
    text = api.report_text(analysis)
    assert "bent 45°" in text and "R 5.00 mm bent 90°" in text
    codes = {w.code: w for w in piece.warnings}
    assert codes["profile-blend"].key.startswith("flanges[")
    # the stretch of flange formed where the wall changes between runs comes out at neither angle: finished by hand
    assert piece.flange.verdict == "hand-finish" and "profile-blend" in piece.flange.remedies[0]
    sheet = shop_sheet(analysis, piece)
    for key in ("flanges[0]", "flanges[1]", "flanges[2]"):
        die = shape_of(piece, key).die(piece.springback)
        assert f"`{key}`" in sheet and f"{die.die_radius_mm:.2f} mm" in sheet
    assert "leaning out" in sheet and "bent through 45°" in sheet


# -- the solid -----------------------------------------------------------------------------------------------------


def _inset(radius: float, die_angle_deg: float, depth: float) -> float:
    """The wall's inset at ``depth`` (closed form, plane geometry): on the arc of radius R tangent to the top face
    (centre at inset R·tan(θd/2), depth R) down to where it meets the wall, then depth·tan(θd − 90°)."""
    lean = math.radians(die_angle_deg - 90.0)
    arc_end = radius * (1 + math.sin(lean))
    if depth >= arc_end:
        return depth * math.tan(lean)
    return radius * math.tan(math.radians(die_angle_deg) / 2) - math.sqrt(radius**2 - (radius - depth) ** 2)


def _volume(solid) -> float:
    """The solid's volume (mm³) by the kernel's adaptive integration to a relative error of 1e-7: its fixed-order
    default is about 0.7 % off on the walls whose sections change along the outline (measured against a 5 µm
    mesh of the same solid)."""
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(solid, props, 1e-7)
    return props.Mass()


@pytest.mark.slow
@pytest.mark.solid
def test_the_tray_die_is_a_valid_closed_solid_of_the_estimated_volume(tray, tmp_path: Path) -> None:
    """The tray's die (two radii and a 45° lip): the STEP file re-reads as one valid closed solid, the STL is
    watertight with the STEP's volume (a general-purpose mesh library as the check), and the volume of the bare
    block (no holes, no engraving) is the integral over its height of its plane sections' areas (shapely): each
    side stands its own wall's inset (closed form above), going from one run's to the next over the blends the die
    reports by the quintic 10x³ − 15x⁴ + 6x⁵ mixing the two insets at that depth, the corners where the sides'
    offset lines meet; within 0.2 % (measured: 0.11 %; in a blend the loft mixes the sections along the arc, not
    at one depth)."""
    trimesh = pytest.importorskip("trimesh")
    from OCP.BRepCheck import BRepCheck_Analyzer

    from diegen.die.occ.export import write_step, write_stl
    from diegen.die.occ.form_block import build_die
    from diegen.die.occ.validate import read_step

    _, piece = tray
    die = piece.die.die
    solid = build_die(die)
    write_step(solid, tmp_path / "tray.step")
    write_stl(solid, tmp_path / "tray.stl")
    shape = read_step(tmp_path / "tray.step")
    assert BRepCheck_Analyzer(shape).IsValid()
    mesh = trimesh.load(tmp_path / "tray.stl")
    assert mesh.is_watertight and mesh.is_winding_consistent
    assert mesh.volume == pytest.approx(_volume(shape), rel=0.005)

    bare = build_die(replace(die, pins=(), bores=(), engraving=()))
    plan = wall_plan(die)
    assert plan is not None and die.outline[0].points[0] == (0.0, 0.0)  # along the outline: bottom, right, top, left
    bottom, cut, top = plan.blends  # in order along the outline: on the bottom side, the cut end, the top side
    own = {k: shape_of(piece, k).die(piece.springback) for k in ("flanges[0]", "flanges[1]", "flanges[2]")}
    along = np.linspace(0.0, 1.0, 801)

    def side(depth: float, start: float, length: float, blend, before: str, after: str) -> np.ndarray:
        """A side's inset at ``along`` × its length: ``before``'s profile, the quintic 10x³ − 15x⁴ + 6x⁵ over the
        blend, ``after``'s beyond it."""
        a, b = (_inset(own[k].die_radius_mm, own[k].die_angle_deg, depth) for k in (before, after))
        x = np.clip((start + along * length - blend.start_mm) / blend.length_mm, 0.0, 1.0)
        return a + (10 * x**3 - 15 * x**4 + 6 * x**5) * (b - a)

    def area(depth: float) -> float:
        """The plane section ``depth`` down: each side's points stand their inset inside it, the corners where the
        neighbouring sides' offset lines meet (each side's inset is constant near its corners)."""
        lip = own["flanges[2]"]
        left = _inset(lip.die_radius_mm, lip.die_angle_deg, depth)
        low = side(depth, 0.0, 260.0, bottom, "flanges[2]", "flanges[0]")
        right = side(depth, 260.0, 160.0, cut, "flanges[0]", "flanges[1]")
        high = side(depth, 420.0, 260.0, top, "flanges[1]", "flanges[2]")
        x0, x1 = left, 260.0 - right[0]  # the bottom side between its corners (and so on round)
        ring = [(left, low[0]), *((x, y) for x, y in zip(260.0 * along, low) if x0 < x < x1),
                (260.0 - right[0], low[-1]),
                *((x, y) for x, y in zip(260.0 - right, 160.0 * along) if low[-1] < y < 160.0 - high[0]),
                (260.0 - right[-1], 160.0 - high[0]),
                *((x, y) for x, y in zip(260.0 * (1 - along), 160.0 - high) if left < x < 260.0 - right[-1]),
                (left, 160.0 - high[-1])]
        polygon = Polygon(ring)
        assert polygon.is_valid
        return polygon.area

    depths = np.linspace(0.0, die.height_mm, 801)
    estimate = float(np.trapezoid([area(d) for d in depths], depths))
    assert _volume(bare) == pytest.approx(estimate, rel=0.002)


@pytest.mark.slow
@pytest.mark.solid
def test_a_plate_with_a_45_degree_lip_all_round_has_a_die_of_steiners_volume(tmp_path: Path) -> None:
    """P17 of the corpus: a 200 × 140 mm plate with 30 mm corner radii (mold line), a 45° lip all round: one
    profile, the wall leaning out all round.  Each section is the die outline offset by the wall's inset u(z), whose
    area is A − P·u + π·u² (Steiner's formula for a convex outline's parallel body, the outline's corners rounder
    than any inset); the bare block's volume is its integral over the height, within 0.05 % (measured: 0.003 %)."""
    spec = api.load(write(scenario("P17"), tmp_path))
    analysis = api.analyse(spec)
    (piece,) = analysis.pieces
    die = piece.die.die
    assert die.profiles is None and die.undercut_deg < -40.0  # one profile: the wall leans out
    from diegen.die.occ.form_block import build_die

    bare = build_die(replace(die, pins=(), bores=(), engraving=(), flutes=()))  # the plain block
    outline = Polygon(piece.piece.outline)
    area, perimeter = outline.area, outline.length
    sb = piece.springback if not piece.shapes[0].springback else piece.shapes[0].springback
    depths = np.linspace(0.0, die.height_mm, 4001)
    u = np.array([_inset(sb.die_radius_mm, sb.die_angle_deg, d) for d in depths])
    estimate = float(np.trapezoid(area - perimeter * u + math.pi * u**2, depths))
    assert _volume(bare) == pytest.approx(estimate, rel=5e-4)
