"""The spec language: the issue's verbatim spec loads, every mistake gets one located message."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from diegen.errors import SpecError
from diegen.spec import load_spec, parse_spec
from diegen.spec.model import RibSpec, WingSpec

ROOT = Path(__file__).resolve().parents[1]
IN = 25.4  # mm per inch, exact (NIST SP 811, App. B)

VERBATIM = """\
diegen: 1
kind: rib
id: T1
units: in
airfoil: naca 2412          # or: {file: airfoils/section.dat}
chord: 40
skin_thickness: 0.025
sheet: {alloy: 2024-T3, thickness: 0.025}
flange: {height: 0.5, bend_radius: "3/32 in"}
spars:
  - {at: 0.25, web: 0.063, cap_thickness: 0.063, cap_width: 0.75}
  - {at: 0.70, web: 0.050, cap_thickness: 0.050, cap_width: 0.625}
pieces: [nose, center, tail]
lightening_holes: auto
pins: auto
relief: flutes              # flutes | notches | none
die: {material: solid-surface, stock_thickness: 0.5, cutter_diameter: 0.25}
press: {force: 25 ton, box: [12, 10], rubber: {durometer: 55, thickness: 2.5}}
"""


def test_verbatim_spec_loads_in_mm():
    spec = parse_spec(VERBATIM, "t1.yaml")
    assert isinstance(spec, RibSpec)
    assert spec.id == "T1"
    assert spec.airfoil.naca == "2412"
    assert spec.chord_mm == pytest.approx(40 * IN, abs=1e-9)
    assert spec.shared.flange.bend_radius_mm == pytest.approx(3 / 32 * IN, abs=1e-12)
    assert spec.spars[1].cap_width_mm == pytest.approx(0.625 * IN)
    assert spec.shared.press.force_n == pytest.approx(25 * 2000 * 4.4482216152605)  # NIST SP 811: short ton = 2000 lbf
    assert spec.shared.press.box_mm == pytest.approx((12 * IN, 10 * IN))
    assert spec.shared.pieces == ("nose", "center", "tail")
    assert spec.shared.relief == "flutes"


def test_demo_specs_load():
    assert isinstance(load_spec(ROOT / "specs" / "demo-rib.yaml"), RibSpec)
    assert isinstance(load_spec(ROOT / "specs" / "demo-wing.yaml"), WingSpec)


def _edit(old: str, new: str) -> str:
    assert old in VERBATIM, old
    return VERBATIM.replace(old, new)


# (id, spec text, expected line, fragments that must all be in the message)
BAD_SPECS = [
    ("wrong-type", _edit("chord: 40", "chord: [40]"), 6, ["chord", "expected a length", "found"]),
    ("unknown-key", _edit("chord: 40", "chord: 40\ncord_length: 3"), 7, ["cord_length", "unknown key"]),
    ("unknown-key-suggestion", _edit("relief: flutes ", "releif: flutes "), 16, ["did you mean 'relief'"]),
    ("negative-thickness", _edit("thickness: 0.025}", "thickness: -0.025}"), 8,
     ["sheet.thickness", "greater than 0", "-0.635"]),
    ("missing-chord", _edit("chord: 40\n", ""), None, ["chord", "missing required key"]),
    ("bad-unit", _edit('bend_radius: "3/32 in"', 'bend_radius: "3/32 furlong"'), 9,
     ["flange.bend_radius", "unknown length unit", "furlong"]),
    ("malformed-fraction", _edit('bend_radius: "3/32 in"', 'bend_radius: "3//32 in"'), 9,
     ["flange.bend_radius", "3//32"]),
    ("zero-fraction", _edit('bend_radius: "3/32 in"', 'bend_radius: "3/0 in"'), 9, ["divides by zero"]),
    ("spars-out-of-order", _edit("at: 0.70", "at: 0.20"), 12, ["spars[1].at", "in order"]),
    ("spar-outside-0-1", _edit("at: 0.70", "at: 1.3"), 12, ["spars[1].at", "less than 1", "1.3"]),
    ("negative-bend-radius", _edit('bend_radius: "3/32 in"', "bend_radius: -0.1"), 9,
     ["flange.bend_radius", "greater than 0"]),
    ("yaml-syntax", _edit("chord: 40", "chord: [40"), None, ["YAML syntax error"]),
    ("bad-alloy", _edit("alloy: 2024-T3", "alloy: 2042-T3"), 8, ["sheet.alloy", "did you mean '2024-T3'"]),
    ("bad-die-material", _edit("material: solid-surface", "material: granite"), 17,
     ["die.material", "expected one of"]),
    ("bad-force-unit", _edit("force: 25 ton", "force: 25"), 18, ["press.force", "with a unit"]),
    ("bad-relief-choice", _edit("relief: flutes ", "relief: crimps "), 16, ["relief", "flutes, notches, none"]),
    ("bad-naca", _edit("naca 2412", "naca 24x12"), 5, ["airfoil", "4 or 5 digits"]),
    ("missing-airfoil-file", _edit("naca 2412", "{file: nowhere/section.dat}"), 5, ["airfoil.file", "not found"]),
    ("bad-units", _edit("units: in", "units: furlongs"), 4, ["units", "in, mm"]),
    ("bad-kind", _edit("kind: rib", "kind: aileron"), 2, ["kind", "rib, wing"]),
    ("bad-id", _edit("id: T1", "id: ../../x"), 3, ["id", "no spaces or slashes"]),
    ("duplicate-key", _edit("chord: 40", "chord: 40\nchord: 41"), 7, ["duplicate key 'chord'"]),
    ("bad-box", _edit("box: [12, 10]", "box: [12]"), 18, ["press.box", "exactly 2 items, found 1 item"]),
    ("center-needs-two-spars", _edit("  - {at: 0.70, web: 0.050, cap_thickness: 0.050, cap_width: 0.625}\n", ""), 12,
     ["pieces", "'center' needs at least 2 spar"]),
    ("bad-version", _edit("diegen: 1", "diegen: 7"), 1, ["version 1", "7"]),
    ("nan", _edit("chord: 40", "chord: .nan"), 6, ["chord", "finite"]),
    ("boolean-as-length", _edit("chord: 40", "chord: yes"), 6, ["chord", "boolean"]),
]


@pytest.mark.parametrize("text,line,fragments", [b[1:] for b in BAD_SPECS], ids=[b[0] for b in BAD_SPECS])
def test_bad_spec_gives_one_located_message(text, line, fragments):
    with pytest.raises(SpecError) as caught:
        parse_spec(text, "bad.yaml")
    problems = caught.value.problems
    assert len(problems) == 1, [str(p) for p in problems]
    message = str(problems[0])
    assert message.startswith("bad.yaml:"), message
    if line is not None:
        assert problems[0].line == line, message
        assert problems[0].column is not None
    for fragment in fragments:
        assert fragment in message, message


def test_several_mistakes_are_all_reported_in_line_order():
    text = _edit("chord: 40", "chord: -40").replace("relief: flutes ", "relief: wrinkles ")
    with pytest.raises(SpecError) as caught:
        parse_spec(text, "bad.yaml")
    lines = [p.line for p in caught.value.problems]
    assert lines == [6, 16]


def test_alias_bomb_is_refused_quickly():
    bomb = "a: &a [x, x, x, x, x, x, x, x, x, x]\n"
    for i in range(1, 9):
        prev = chr(ord("a") + i - 1)
        cur = chr(ord("a") + i)
        bomb += f"{cur}: &{cur} [*{prev}, *{prev}, *{prev}, *{prev}, *{prev}, *{prev}, *{prev}, *{prev}, *{prev}]\n"
    with pytest.raises(SpecError) as caught:
        parse_spec(bomb, "bomb.yaml")
    assert "too large" in str(caught.value)


def test_cli_exits_2_with_message_and_no_traceback(tmp_path):
    bad = tmp_path / "bad.yaml"
    bad.write_text(_edit("chord: 40", "chord: forty"))
    result = subprocess.run([sys.executable, "-m", "diegen.cli", "check", str(bad)], capture_output=True, text=True,
                            check=False)
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    assert f"{bad}:6:8: chord:" in result.stderr


def test_cli_missing_file(tmp_path):
    result = subprocess.run([sys.executable, "-m", "diegen.cli", "check", str(tmp_path / "nope.yaml")],
                            capture_output=True, text=True, check=False)
    assert result.returncode == 2
    assert "file not found" in result.stderr and "Traceback" not in result.stderr


def test_wing_override_changes_only_named_keys():
    text = (ROOT / "specs" / "demo-wing.yaml").read_text()
    spec = parse_spec(text, "wing.yaml", ROOT / "specs")
    assert spec.overrides, "the demo wing shows per-rib overrides"
    for override in spec.overrides:
        assert override.changes and set(override.changes) <= set(spec.shared.__dataclass_fields__)


def test_wing_override_error_names_override_path():
    text = (ROOT / "specs" / "demo-wing.yaml").read_text()
    text = text.replace("overrides:\n", "overrides:\n  - {ribs: [2], sheet: {thickness: -1}}\n", 1)
    with pytest.raises(SpecError) as caught:
        parse_spec(text, "wing.yaml", ROOT / "specs")
    assert "overrides[0].sheet.thickness" in str(caught.value)


def test_paper_size_defaults_by_units_and_can_be_chosen():
    # Letter for a spec in inches, A4 for one in millimetres; either can be asked for by name
    assert parse_spec(VERBATIM, "t1.yaml").paper == "letter"
    assert parse_spec(_edit("units: in", "units: mm"), "t1.yaml").paper == "a4"
    assert parse_spec(_edit("units: in", "units: in\npaper: a4"), "t1.yaml").paper == "a4"
    with pytest.raises(SpecError) as caught:
        parse_spec(_edit("units: in", "units: in\npaper: a3"), "t1.yaml")
    (problem,) = caught.value.problems
    assert problem.line == 5 and problem.key == "paper" and "a4, letter" in problem.message
