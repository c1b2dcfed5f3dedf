"""The spec language (``diegen.spec.schema``): sections read into plain data, defaults, and located problems.

Each mistake is planted in a copy of the demo specs; its line and column are
found here in the text (1-based), and the defaults are the ones
``specs/README.md`` documents.  Inches by NIST SP 811 (2008), Appendix B.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from testing import DEMO_RIB, DEMO_WING, SPECS

from diegen.spec.model import RibSpec, WingSpec
from diegen.spec.reader import Reader
from diegen.spec.schema import MAX_RIBS, read_rib, read_wing
from diegen.spec.yamltree import load_text

MM_PER_IN = 25.4  # NIST SP 811 App. B, exact
RIB = DEMO_RIB.read_text(encoding="utf-8")
WING = DEMO_WING.read_text(encoding="utf-8")


def at(text: str, token: str, nth: int = 1) -> tuple[int, int]:
    """(line, column) of the ``nth`` occurrence of ``token`` in ``text``, both from 1."""
    index = -1
    for _ in range(nth):
        index = text.index(token, index + 1)
    return text.count("\n", 0, index) + 1, index - (text.rfind("\n", 0, index) + 1) + 1


def edit(text: str, old: str, new: str) -> str:
    assert text.count(old) == 1, old
    return text.replace(old, new)


def read(text: str, kind: str = "rib", units: str = "in") -> tuple[RibSpec | WingSpec, Reader]:
    """Read ``text`` with the schema directly (no sorting, no raising), as the spec loader does."""
    root = load_text(text, "s.yaml").value
    r = Reader("s.yaml", units)
    spec = (read_rib if kind == "rib" else read_wing)(r, root, SPECS)
    return spec, r


def problems(text: str, kind: str = "rib", units: str = "in") -> dict[str, tuple[int | None, int | None, str]]:
    _, r = read(text, kind, units)
    return {p.key: (p.line, p.column, p.message) for p in r.problems}


def test_demo_specs_read_clean() -> None:
    rib, r = read(RIB)
    assert not r.problems and isinstance(rib, RibSpec)
    assert rib.chord_mm == pytest.approx(40 * MM_PER_IN) and rib.spars[1].at == 0.70
    wing, w = read(WING, "wing")
    assert not w.problems and isinstance(wing, WingSpec)
    assert wing.span_mm == pytest.approx(120 * MM_PER_IN) and wing.stations.count == 13


def test_mistakes_in_flow_mappings_are_located_at_their_value() -> None:
    text = edit(RIB, "web: 0.050,", "web: -0.05,")
    text = edit(text, "stock_thickness: 0.5,", "stock_thicknes: 0.5,")
    found = problems(text)
    assert found["spars[1].web"][:2] == at(text, "-0.05")
    assert "greater than 0" in found["spars[1].web"][2]
    assert found["die.stock_thicknes"][:2] == at(text, "stock_thicknes")
    assert "did you mean 'stock_thickness'" in found["die.stock_thicknes"][2]
    assert found["die.stock_thickness"][2] == "missing required key 'stock_thickness'"


def test_every_section_reports_at_once() -> None:
    text = edit(RIB, "chord: 40", "chord: forty")
    text = edit(text, "alloy: 2024-T3", "alloy: 2042-T3")
    text = edit(text, "durometer: 55", "durometer: 150")
    text = edit(text, "relief: flutes", "relief: crimps")
    found = problems(text)
    assert set(found) == {"chord", "sheet.alloy", "press.rubber.durometer", "relief"}
    assert found["chord"][:2] == at(text, "forty")
    assert found["sheet.alloy"][:2] == at(text, "2042-T3") and "did you mean '2024-T3'" in found["sheet.alloy"][2]
    assert found["press.rubber.durometer"][:2] == at(text, "150") and "at most 95" in found["press.rubber.durometer"][2]
    assert found["relief"][:2] == at(text, "crimps") and "flutes, notches, none" in found["relief"][2]


def test_spars_out_of_order_point_at_the_later_spar() -> None:
    text = edit(RIB, "at: 0.70", "at: 0.20")
    (key, (line, column, message)), = problems(text).items()
    assert key == "spars[1].at" and (line, column) == at(text, "{at: 0.20")
    assert "0.2 is not aft of spars[0] at 0.25" in message


def test_pieces_accept_centre_refuse_repeats_and_keep_their_order() -> None:
    spec, r = read(edit(RIB, "pieces: [nose, center, tail]", "pieces: [tail, centre, nose]"))
    assert not r.problems and spec.shared.pieces == ("nose", "center", "tail")
    text = edit(RIB, "pieces: [nose, center, tail]", "pieces: [nose, nose]")
    (key, (line, column, message)), = problems(text).items()
    assert key == "pieces[1]" and (line, column) == at(text, "nose", 2) and "listed twice" in message
    text = edit(RIB, "  - {at: 0.70, web: 0.050, cap_thickness: 0.050, cap_width: 0.625}\n", "")
    (key, (line, column, message)), = problems(text).items()
    assert key == "pieces" and (line, column) == at(text, "[nose, center, tail]")
    assert message == "piece 'center' needs at least 2 spar(s) to bound it, found 1"


def test_airfoil_forms() -> None:
    for form, naca in (("naca 2412", "2412"), ('{naca: "23012"}', "23012"), ("NACA-0012", "0012")):
        spec, r = read(edit(RIB, "naca 2412 ", f"{form} "))
        assert not r.problems and spec.airfoil.naca == naca, form
    text = edit(RIB, "naca 2412 ", "{naca: 0012} ")
    (key, (line, column, message)), = problems(text).items()  # YAML 1.1 reads a bare 0012 as octal 10
    assert key == "airfoil.naca" and (line, column) == at(text, "0012") and "write the digits in quotes" in message
    text = edit(RIB, "naca 2412 ", "{naca: '2412', file: x.dat} ")
    (key, (line, column, message)), = problems(text).items()
    assert key == "airfoil" and message == "expected exactly one of 'naca' or 'file'"


def test_defaults_in_the_specs_own_units() -> None:
    """specs/README.md: hole rules 0.25 / 0.5 / 0.75 / 0.25 in or 6 / 12 / 20 / 6 mm, dowels 1/8 in or 3 mm, box
    wall clearance 1 in or 25 mm, STL tolerance 0.05 mm, radius table aa, relief flutes."""
    spec, _ = read(RIB)
    rules = spec.shared.holes.rules
    assert (rules.edge_margin_mm, rules.ligament_mm, rules.min_diameter_mm, rules.flange_height_mm) == pytest.approx(
        (0.25 * MM_PER_IN, 0.5 * MM_PER_IN, 0.75 * MM_PER_IN, 0.25 * MM_PER_IN))
    assert spec.shared.pins.diameter_mm == pytest.approx(MM_PER_IN / 8)
    assert spec.shared.press.wall_clearance_mm == pytest.approx(MM_PER_IN)
    metric = (RIB.replace("units: in", "units: mm").replace("chord: 40", "chord: 1000")
              .replace("skin_thickness: 0.025", "skin_thickness: 0.6").replace("thickness: 0.025}", "thickness: 0.6}")
              .replace("height: 0.5,", "height: 12,").replace("0.063", "1.6").replace("0.050", "1.3")
              .replace("cap_width: 0.75", "cap_width: 19").replace("cap_width: 0.625", "cap_width: 16")
              .replace("stock_thickness: 0.5, cutter_diameter: 0.25", "stock_thickness: 20, cutter_diameter: 6")
              .replace("box: [12, 10]", "box: [300, 250]").replace("thickness: 2.5}", "thickness: 60}"))
    spec, r = read(metric, units="mm")
    assert not r.problems
    rules = spec.shared.holes.rules
    assert (rules.edge_margin_mm, rules.ligament_mm, rules.min_diameter_mm, rules.flange_height_mm) == (6, 12, 20, 6)
    assert spec.shared.pins.diameter_mm == 3.0 and spec.shared.press.wall_clearance_mm == 25.0
    assert spec.shared.die.stl_tolerance_mm == 0.05 and spec.shared.flange.radius_table == "aa"


def test_print_bed_is_in_millimetres_whatever_the_units() -> None:
    spec, r = read(edit(RIB, "cutter_diameter: 0.25}", "cutter_diameter: 0.25, print_bed: [220, 220]}"))
    assert not r.problems and spec.shared.die.print_bed_mm == (220.0, 220.0)
    text = edit(RIB, "cutter_diameter: 0.25}", "cutter_diameter: 0.25, print_bed: [220]}")
    (key, (line, column, _)), = problems(text).items()
    assert key == "die.print_bed" and (line, column) == at(text, "[220]")


# ---------------------------------------------------------------- wing
def test_wing_stations() -> None:
    text = edit(WING, "stations: {count: 13}", "stations: [0, 40, 30, 120]")
    (key, (line, column, message)), = problems(text, "wing").items()
    assert key == "planform.stations" and (line, column) == at(text, "[0, 40, 30, 120]")
    assert message == "expected rib stations in increasing order from the root"
    text = edit(WING, "stations: {count: 13}", "stations: {count: 13, pitch: 10}")
    assert problems(text, "wing")["planform.stations"][2] == ("expected a list of stations, or exactly one of "
                                                                "'count' or 'pitch'")
    text = edit(WING, "stations: {count: 13}", "stations: {pitch: 0.5}")
    message = problems(text, "wing")["planform.stations"][2]
    assert f"at most {MAX_RIBS} ribs" in message and "241 ribs" in message  # 120 in / 0.5 in + 1
    text = edit(WING, "stations: {count: 13}", "stations: [0, 60, 130]")
    assert "within the span" in problems(text, "wing")["planform.stations"][2]


def test_wing_overrides_keep_their_path_and_place() -> None:
    spec, _ = read(WING, "wing")
    first, second = spec.overrides
    assert first.ribs == (1,) and set(first.changes) == {"sheet", "flange"}
    assert first.changes["sheet"].thickness_mm == pytest.approx(0.032 * MM_PER_IN)
    assert first.changes["sheet"].alloy == "2024-T3"  # the keys not given stay the wing's
    assert second.ribs == (4, 5) and second.changes["holes"].mode == "none"
    text = edit(WING, "sheet: {thickness: 0.032}", "sheet: {thickness: -1}")
    found = problems(text, "wing")
    assert found["overrides[0].sheet.thickness"][:2] == at(text, "-1")
    text = edit(WING, "  - ribs: [4, 5]", "  - ribs: [4, 5]\n    flange: {heigth: 0.5}")
    found = problems(text, "wing")
    assert found["overrides[1].flange.heigth"][:2] == at(text, "heigth")


def test_wing_spar_lines() -> None:
    text = edit(WING, "- {at: 0.70, web:", "- {root_at: 0.70, tip_at: 0.65, web:")
    spec, r = read(text, "wing")
    assert not r.problems and (spec.spars[1].root_at, spec.spars[1].tip_at) == (0.70, 0.65)
    text = edit(WING, "- {at: 0.70, web:", "- {root_at: 0.70, web:")
    (key, (line, column, message)), = problems(text, "wing").items()
    assert key == "spars[1]" and (line, column) == at(text, "{root_at: 0.70")
    assert "both 'root_at' and 'tip_at'" in message


def test_spec_folder_locates_airfoil_files(tmp_path: Path) -> None:
    (tmp_path / "sections").mkdir()
    text = edit(RIB, "naca 2412 ", "{file: sections/missing.dat} ")
    root = load_text(text, "s.yaml").value
    r = Reader("s.yaml", "in")
    read_rib(r, root, tmp_path)
    (p,) = r.problems
    assert p.key == "airfoil.file" and (p.line, p.column) == at(text, "sections/missing.dat")
    assert str(tmp_path / "sections" / "missing.dat") in p.message
