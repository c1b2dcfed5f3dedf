"""The die rules in the analysis: what check decides about each die, and how a die is fitted before it is refused.

No kernel here (the corpus in ``test_checkbuild.py`` holds check to build with the kernel).  Independent
expectations:

* A section that crosses itself is judged by shapely's own validity of the section's points (a reference
  library), not by diegen's check.
* Flute gather: a circular segment of chord b and depth d is an arc of length 2·α·(b/2)/sin α with
  α = 2·atan(2d/b) (plane geometry), so a flute gathers that less b.
* Springback of the lowered undercut: the angle the warning gives is the model's own (checked for consistency with
  it); outside the model, elastic–perfectly-plastic bending, Ri/Rf = 4X³ − 3X + 1 with the angle from constant
  neutral-line length (Gardiner 1957, as commonly quoted), bounds it, since strain hardening only adds springback.
* Force units: 1 tonne-force = 1000 kg × 9.80665 m/s², 1 short ton-force = 2000 lbf, 1 lbf = 4.4482216152605 N
  (NIST SP 811, appendix B).
* The sizes of the scenarios are invented; NACA 0009 and 0012 from NACA Report 824.
"""

from __future__ import annotations

import math
import re
from dataclasses import replace

import numpy as np
import pytest
from shapely.geometry import Polygon
from shapely.geometry.polygon import orient
from test_refusals import rib_yaml

from diegen import api, cli
from diegen.analysis import bend_sheet
from diegen.die.die_input import DieInput, DieRun
from diegen.die.model import loft_sections, outline_model
from diegen.die.rules import die_refusal
from diegen.forming.springback import springback_forward
from diegen.spec import parse_spec

REMEDY = re.compile(r"[:;] (?:give|use|lower|leave|move|round|make)\b")


def _analyse(**changes: object):
    return api.analyse(parse_spec(rib_yaml(**changes), "rib.yaml"))


def _sections_simple_by_shapely(die: DieInput) -> bool:
    model = outline_model(die)
    arc, wall = loft_sections(die)
    for s in arc + wall[1:]:
        pieces = model.offset(s.inset_mm, flute_scale=min(s.depth_mm / die.flute_length_mm, 1.0)
                              if die.flutes else 0.0)
        ring = np.concatenate([np.asarray(p.points)[:-1] for p in pieces])
        if not Polygon(ring).is_valid:
            return False
    return True


def _arc_gather(width: float, depth: float) -> float:
    alpha = 2.0 * math.atan(2.0 * depth / width)
    return 2.0 * alpha * (width / 2.0) / math.sin(alpha) - width


# -- flutes on a tight nose ------------------------------------------------------------------------------
# The relief places flutes window by window where the nose shrinks; on this nose they come out deeper than the
# nose's wall sections can hold once its wall is fitted, so fitting makes them shallower.
TIGHT_NOSE = dict(airfoil="naca 0012", chord=400, front=0.3, alloy="6061-T6", t=0.8, radius=1.6, height=8,
                  pieces="[nose]", die="{material: solid-surface, stock_thickness: 80, cutter_diameter: 6}")


def _die_relief_short(piece):
    """The located relief-short warning the die fitting gave (the relief's own shortfall is another one)."""
    (fitted,) = [f for f in piece.die.findings if f.code == "relief-short"]
    (located,) = [w for w in piece.warnings if w.code == "relief-short" and w.message == fitted.message]
    return located


def test_flutes_on_a_tight_nose_are_made_to_fit_and_the_shortfall_is_said():
    (piece,) = _analyse(**TIGHT_NOSE).pieces
    asked = piece.die.asked
    assert asked.flutes
    die = piece.die.die
    assert piece.die.buildable and _sections_simple_by_shapely(die)
    # the flutes as the relief sized them cross the fitted die's wall sections: they, not only the wall, are fitted
    assert die_refusal(replace(die, flutes=asked.flutes)) is not None
    assert 0 < len(die.flutes) <= len(asked.flutes)
    by_place = {f.s_mm: f for f in asked.flutes}
    assert all(f.depth_mm <= by_place[f.s_mm].depth_mm + 1e-12 for f in die.flutes)
    assert any(f.depth_mm < by_place[f.s_mm].depth_mm - 1e-6 for f in die.flutes)
    finding = _die_relief_short(piece)
    excess = sum(s.excess_mm for run in piece.runs for s in run.shrink_runs)
    gathered = sum(_arc_gather(f.width_mm, f.depth_mm) for f in die.flutes)
    assert 0 < gathered < excess
    assert f"gather {gathered:.1f} mm of the {excess:.1f} mm excess" in finding.message
    assert "relief: notches" in finding.message and finding.key == "relief" and finding.line == 16
    # the report shows the flutes the die has
    report = api.report_json(_analyse(**TIGHT_NOSE))["parts"][0]
    assert [f["depth_mm"] for f in report["flange"]["flutes"]] == [round(f.depth_mm, 3) for f in die.flutes]


def test_notches_instead_of_flutes_need_no_fitting():
    (fluted,) = _analyse(**TIGHT_NOSE).pieces
    spec = rib_yaml(**TIGHT_NOSE).replace("relief: flutes", "relief: notches")
    (notched,) = api.analyse(parse_spec(spec)).pieces
    assert notched.die.buildable and not notched.die.die.flutes
    # only the wall is fitted (the 80 mm die is too deep for the nose either way): no flute fitting, no shortfall
    assert [f.code for f in notched.die.findings] == [f.code for f in fluted.die.findings
                                                      if f.code != "relief-short"] == ["die-undercut-lowered"]
    assert not [w for w in notched.warnings if w.code == "relief-short"]


# -- a piece too thin for its wall ---------------------------------------------------------------------------
THIN = dict(airfoil="naca 0009", chord=400, front=0.3, alloy="2024-T3", t=0.5, radius=1.8, height=8,
            pieces="[nose]", die="{material: solid-surface, stock_thickness: 80, cutter_diameter: 6}")


def test_a_piece_too_thin_for_the_undercut_gets_a_smaller_one_and_a_warning():
    analysis = _analyse(**THIN)
    (piece,) = analysis.pieces
    asked = piece.die.asked
    assert die_refusal(replace(asked, flutes=())) is not None  # the 80 mm die's bottom inset crosses the nose
    die = piece.die.die
    assert piece.die.buildable and die.undercut_deg < asked.undercut_deg and _sections_simple_by_shapely(die)
    (finding,) = [w for w in piece.warnings if w.code == "die-undercut-lowered"]
    assert f"leans in {die.undercut_deg:.2f}° instead of {asked.undercut_deg:.2f}°" in finding.message
    # The angle the message gives is the model's own (springback about the neutral surface with strain
    # hardening), so this checks the message is consistent with the model at the die actually made, not the
    # model itself: the die's 90° + lowered undercut, at the die's top radius.
    _, af = springback_forward(die.top_radius_mm, bend_sheet(analysis.spec, piece.alloy), 90.0 + die.undercut_deg)
    assert af < 90.0
    assert f"springs back to about {af:.1f}° instead of 90°" in finding.message
    # Outside the model: elastic–perfectly-plastic bending, Rf = Ri/(4X³ − 3X + 1), X = Ri·σy/(E·t), with the
    # angle from constant neutral-line length af = ai·(Ri + t/2)/(Rf + t/2).  Hardening only raises the stress
    # the bend releases, so the model's part must spring back at least that far.
    alloy, t, ri = piece.alloy, 0.5, die.top_radius_mm
    x = ri * alloy.yield_mpa / (alloy.youngs_modulus_mpa * t)
    rf = ri / (4 * x**3 - 3 * x + 1)
    assert af <= (90.0 + die.undercut_deg) * (ri + t / 2) / (rf + t / 2)


def test_a_wall_that_would_need_a_radius_below_the_table_is_refused_with_a_remedy(tmp_path, fake_solids):
    changes = {**THIN, "t": 0.8, "radius": 2.8, "die": "{material: solid-surface, stock_thickness: 50, "
               "cutter_diameter: 6}"}
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(**changes))
    analysis = api.analyse(api.load(path))
    (piece,) = analysis.pieces
    refusal = piece.die.refusal
    assert refusal and "below the" in refusal and "minimum bend radius" in refusal and REMEDY.search(refusal)
    (part,) = api.report_json(analysis)["parts"]
    assert part["die"]["buildable"] is False and part["die"]["refusal"] == refusal
    text = api.report_text(analysis)
    assert f"DIE REFUSED   {refusal}" in text and "1 of 1 piece(s) cannot be built" in text
    assert cli.main(["check", str(path)]) == cli.EXIT_FAILED_PIECES
    result = api.build(api.load(path), tmp_path / "out", jobs=1, die_writer=fake_solids)
    (outcome,) = result.outcomes
    assert outcome.status == "failed" and outcome.error == refusal and fake_solids == []  # never attempted
    assert not list((tmp_path / "out").rglob("R1-nose-*"))


# -- the tool's own limits -------------------------------------------------------------------------------
def _notched_die(printed: bool, cutter_radius: float) -> DieInput:
    """A 100 × 40 mm block whose top edge dips in a smooth bell y = 40 − a·exp(−(x − 50)²/(2σ²)), a = 3.6 mm,
    σ = 3 mm: at its bottom the inside radius is σ²/a = 2.5 mm (1/y''), the tightest of the outline; the corners
    are rounded 2 mm outward (shapely's buffer −2 then +2), as one closed counter-clockwise curve run."""
    x = np.linspace(100.0, 0.0, 2001)
    top = np.column_stack([x, 40.0 - 3.6 * np.exp(-((x - 50.0) ** 2) / (2 * 3.0**2))])
    shape = Polygon(np.vstack([[(0.0, 0.0), (100.0, 0.0)], top])).buffer(-2.0, quad_segs=64).buffer(2.0, quad_segs=64)
    ring = orient(shape, 1.0).exterior  # counter-clockwise
    points = [ring.interpolate(d).coords[0] for d in np.arange(0.0, ring.length, 0.25)]
    points.append(points[0])
    return DieInput("NOTCH", (DieRun("curve", tuple(points)),), 20.0, 0.5, 0.0, cutter_radius, printed=printed)


def test_a_routed_die_keeps_the_cutter_rule_and_a_printed_one_does_not():
    routed = die_refusal(_notched_die(False, 3.0))
    assert routed and "tighter than the router cutter radius 3 mm" in routed
    # the check samples the curve every 0.2 mm or so: within 0.02 mm of the bell's radius
    assert float(re.search(r"inside curve of radius ([0-9.]+) mm", routed)[1]) == pytest.approx(2.5, abs=0.02)
    assert die_refusal(_notched_die(False, 2.45)) is None  # the same curve, a cutter that fits it
    assert die_refusal(_notched_die(True, 0.2)) is None  # printed: the printer's 0.2 mm limit


def test_printed_spec_dies_use_the_printers_limit():
    spec = parse_spec(rib_yaml(pieces="[nose]", die="{material: pla, stock_thickness: 20, cutter_diameter: 25}"))
    (piece,) = api.analyse(spec).pieces
    assert piece.die.die.printed and piece.die.die.cutter_radius_mm == pytest.approx(0.2)
    assert piece.die.die.min_land_mm == pytest.approx(0.4)


# -- units ------------------------------------------------------------------------------------------------
@pytest.mark.parametrize("force, newtons, word", [
    ("20 t", 20 * 1000 * 9.80665, "metric tonnes-force (1,000 kgf)"),
    ("20 tonne", 20 * 1000 * 9.80665, "metric tonnes-force (1,000 kgf)"),
    ("20 ton", 20 * 2000 * 4.4482216152605, "short tons-force (2,000 lbf)"),
])
def test_tonnes_and_tons_are_told_apart_and_the_report_says_which(force, newtons, word):
    press = f"{{force: {force}, box: [400, 300], rubber: {{durometer: 55, thickness: 50}}}}"
    analysis = _analyse(press=press, pieces="[nose]")
    (part,) = api.report_json(analysis)["parts"]
    assert part["press"]["force_n"] == pytest.approx(newtons, abs=0.05)
    assert part["press"]["force_read_as"] == f"{force}: 20 {word} = {newtons / 1000:.1f} kN"
    assert f"press force   {part['press']['force_read_as']}" in api.report_text(analysis)


def test_numbers_that_look_written_in_the_other_unit_are_named():
    text = rib_yaml(skin=0.024, pieces="[nose]").replace("cap_width: 19", "cap_width: 0.75")
    analysis = api.analyse(parse_spec(text, "rib.yaml"))
    found = {w.key: w for w in analysis.geometry.warnings if w.code == "units-suspect"}
    assert set(found) == {"skin_thickness", "spars[0].cap_width"}
    assert (found["skin_thickness"].line, found["spars[0].cap_width"].line) == (7, 11)
    assert "0.024 in would be 0.6096 mm" in found["skin_thickness"].message  # 0.024 × 25.4, NIST SP 811
    assert "0.75 in would be 19.05 mm" in found["spars[0].cap_width"].message
    inch = (rib_yaml(pieces="[nose]", holes="none").replace("units: mm", "units: in")
            .replace("chord: 600", "chord: 24").replace("skin_thickness: 0.6", "skin_thickness: 0.025")
            .replace("thickness: 0.6}", "thickness: 0.025}").replace("height: 12, bend_radius: 2.4",
                                                                     "height: 0.5, bend_radius: 0.125")
            .replace("web: 1.6", "web: 0.063").replace("web: 1.3", "web: 0.05").replace("cap_width: 19", "cap_width: 6")
            .replace("cap_width: 16", "cap_width: 0.625").replace("stock_thickness: 19", "stock_thickness: 0.75")
            .replace("cutter_diameter: 6", "cutter_diameter: 0.25").replace("box: [400, 300]", "box: [16, 12]")
            .replace("thickness: 50}", "thickness: 2}"))
    found = {w.key for w in api.analyse(parse_spec(inch)).geometry.warnings if w.code == "units-suspect"}
    assert found == {"spars[0].cap_width"}  # a 6 in cap beside a 24 in chord: 6 mm meant


def test_a_value_with_its_unit_is_taken_as_written():
    text = rib_yaml(skin='"0.024 in"', pieces="[nose]")
    assert not [w for w in api.analyse(parse_spec(text)).geometry.warnings if w.code == "units-suspect"]


def test_mdf_is_fibreboard():
    spec = parse_spec(rib_yaml(die="{material: MDF, stock_thickness: 18, cutter_diameter: 6}"))
    assert spec.shared.die.material == "fibreboard"


@pytest.mark.parametrize("jobs", ["0", "-2", "two"])
def test_job_counts_below_one_are_refused(jobs, capsys, tmp_path):
    with pytest.raises(SystemExit) as stop:
        cli.main(["build", "specs/demo-rib.yaml", "-o", str(tmp_path), "-j", jobs])
    assert stop.value.code == cli.EXIT_BAD_INPUT
    err = capsys.readouterr().err
    assert "argument -j/--jobs: expected" in err and "Traceback" not in err
    assert not list(tmp_path.iterdir())
