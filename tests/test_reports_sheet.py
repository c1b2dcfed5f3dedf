"""The shop sheet (``diegen.reports.sheet``) of the demo rib's pieces.

The numbers are read back from the Markdown and compared with the analysis and,
where one exists, with a value worked out here from the spec file itself (read
with plain PyYAML, not through diegen's units): inch values straight from the
spec, the press's box pressure from its rating and box, conversions by the
exact definitions of NIST SP 811 (2008), Appendix B.  The press's numbers come
from the formulas of its model (a model of our own: plastic hinge, fold angle)
and the wrinkle limit from its stated scaling, written out in ``testing.py``;
the residual shrink and the flange verdict are the analysis's, checked for
consistency with each other.
"""

from __future__ import annotations

import math
import re

import pytest
import yaml
from shapely.geometry import Polygon
from testing import (
    DEMO_RIB,
    MM_PER_IN,
    MM_RIB,
    N_PER_LBF,
    assert_flange_verdict_consistent,
    fits_box,
    fold_angle_deg,
    pilot_diameter_mm,
    press_legs,
    press_verdict,
    set_on_radius_mpa,
    wrinkle_limit,
)

from diegen import materials
from diegen.reports.document import SAFETY
from diegen.reports.sheet import shop_sheet
from diegen.spec import parse_spec

LBF_PER_TON = 2000.0  # short ton-force, NIST SP 811 App. B
PSI = N_PER_LBF / MM_PER_IN**2  # MPa per lbf/in², NIST SP 811 App. B
# 2024-T3 sheet's typical yield, 50 ksi (Aluminum Association typical values as printed in Kutz, Handbook of
# Materials Selection, 2002, Table 5, p. 101)
T3_YIELD_MPA = 50_000 * PSI
RAW = yaml.safe_load(DEMO_RIB.read_text(encoding="utf-8"))

HEADINGS = ("## 1. Stock to cut", "## 2. Router set-ups (3-axis)", "## 3. Drilling and notes from the die files",
            "## 4. The blank",
            "## 5. Forming", "## 6. Warnings")



def both(mm: float) -> str:
    """How the sheet writes a length: mm and inches, worked out here."""
    return f"{mm:.2f} mm ({mm / MM_PER_IN:.3f} in)"


def inches(value: str | float) -> float:
    """A spec length in inches: a number, or a string like "3/32 in"."""
    if isinstance(value, str):
        number = value.replace("in", "").strip()
        whole, _, frac = number.rpartition(" ")
        num, _, den = frac.partition("/")
        return float(whole or 0) + (float(num) / float(den) if den else float(num))
    return float(value)


def box_fits(piece) -> bool:
    """The die in the spec's box with the 1 in default wall clearance (specs/README.md), by shapely's bounds."""
    box = (RAW["press"]["box"][0] * MM_PER_IN, RAW["press"]["box"][1] * MM_PER_IN)
    return fits_box(piece.piece.die_outline, box, 1.0 * MM_PER_IN)


def number_after(text: str, pattern: str) -> float:
    match = re.search(pattern, text)
    assert match, f"{pattern!r} not found"
    return float(match.group(1))


@pytest.fixture(scope="module")
def rib(spec):
    from diegen import api

    return api.analyse(spec)


@pytest.fixture(scope="module")
def sheets(rib) -> dict[str, tuple[object, str]]:
    return {p.piece.name: (p, shop_sheet(rib, p)) for p in rib.pieces}


PIECES = ["nose", "center", "tail"]


@pytest.mark.parametrize("name", PIECES)
def test_headings_in_order(sheets, name: str) -> None:
    piece, text = sheets[name]
    lines = text.splitlines()
    assert lines[0] == f"# Shop sheet — {piece.piece.part_id}"
    at = [lines.index(h) for h in HEADINGS]
    assert at == sorted(at)
    numbers = [int(line[3:].split(".")[0]) for line in lines if line.startswith("## ")]
    assert numbers == list(range(1, len(HEADINGS) + 1))  # every section numbered once, in order


@pytest.mark.parametrize("name", PIECES)
def test_safety_cautions(sheets, name: str) -> None:
    """The caution comes first, before any cutting; the closing note sends flight parts to the designer."""
    _, text = sheets[name]
    lines = text.splitlines()
    caution = lines.index("> **Caution.** " + SAFETY)
    assert caution < lines.index(HEADINGS[0])
    for words in ("Guard the press", "keep hands clear", "stay within its rating", "heat-treatment",
                  "local codes and licensed practice"):
        assert words in SAFETY
    closing = text[text.rindex("---"):]
    assert "trial-form a part" in closing and "designer's drawings" in closing and "Heat treatment" in closing


@pytest.mark.parametrize("name", PIECES)
def test_inch_values_are_the_specs_own(sheets, name: str) -> None:
    """The demo spec is in inches: its values come back as written, next to their millimetres."""
    _, text = sheets[name]
    thickness = inches(RAW["sheet"]["thickness"])
    assert f"{RAW['sheet']['alloy']} {both(thickness * MM_PER_IN)}" in text
    assert f"flange {both(inches(RAW['flange']['height']) * MM_PER_IN)}" in text
    assert f"inside radius {both(inches(RAW['flange']['bend_radius']) * MM_PER_IN)}" in text
    assert f"layer(s) of {both(inches(RAW['die']['stock_thickness']) * MM_PER_IN)}" in text
    assert f"≤ {both(inches(RAW['die']['cutter_diameter']) * MM_PER_IN)} straight bit" in text
    assert f"(≥ {both(1.0 * MM_PER_IN)} from every wall)" in text  # the 1 in default clearance (specs/README.md)
    assert "(0.025 in)" in text and "(0.500 in)" in text and "(0.094 in)" in text


@pytest.mark.parametrize("name", PIECES)
def test_stock_sizes_cover_die_and_blank(sheets, name: str) -> None:
    """At least the die's and the blank's extents (shapely bounds) plus the sheet's 10 mm a side (its own
    choice of margin)."""
    piece, text = sheets[name]
    for what, loop in (("Die", piece.piece.die_outline), ("Blank", piece.blank.outer)):
        x0, y0, x1, y1 = Polygon(loop).bounds
        line = next(line for line in text.splitlines() if line.startswith(f"* {what}:"))
        a = number_after(line, r"at least ([\d.]+) mm")
        b = number_after(line, r"× ([\d.]+) mm")
        assert a == pytest.approx(x1 - x0 + 20.0, abs=0.006) and b == pytest.approx(y1 - y0 + 20.0, abs=0.006)


@pytest.mark.parametrize("name", PIECES)
def test_die_layers_and_height(sheets, rib, name: str) -> None:
    """Layers to stand 3 mm above the flange (common practice, no source), stacked to the die's height."""
    piece, text = sheets[name]
    stock = rib.spec.shared.die.stock_thickness_mm
    layers = math.ceil((rib.spec.shared.flange.height_mm + 3.0) / stock)
    assert piece.die_layers == layers
    assert f"({layers} layer(s) of {both(stock)} → {both(layers * stock)} high)" in text
    assert ("Laminate the" in text) == (layers > 1)


def nearest_inch_round_over(radius_mm: float) -> float:
    """Round-over bits come in 1/32 in steps from 1/16 to 1/2 in (common practice, no source)."""
    return min((n / 32 * MM_PER_IN for n in range(2, 17)), key=lambda r: abs(r - radius_mm))


@pytest.mark.parametrize("name", PIECES)
def test_router_numbers(sheets, name: str) -> None:
    piece, text = sheets[name]
    sb = piece.springback
    taper = number_after(text, r"tapered bit of ([\d.]+)° per side")
    angle = number_after(text, r"the die angle is ([\d.]+)°")
    assert taper == round(sb.overbend_deg, 1) and angle == round(sb.die_angle_deg, 1)
    assert sb.die_angle_deg - 90.0 == pytest.approx(sb.overbend_deg, abs=1e-9)  # the wall leans by the over-bend
    assert f"round-over bit of radius {both(sb.die_radius_mm)}" in text
    assert f"the nearest standard bit is {both(nearest_inch_round_over(sb.die_radius_mm))}" in text


@pytest.mark.parametrize("name", PIECES)
def test_features_listed(sheets, name: str) -> None:
    """Joggles, flutes, bores for the flanged holes only, every pin, every pilot hole (worked out here).  A
    flanged hole's bore is its clear diameter plus the sheet thickness on either side, d + 2t: the flange's wall
    stands inside the bore."""
    piece, text = sheets[name]
    g = piece.piece
    assert (f"Joggle recesses ({len(g.joggles)}, layer `JOGGLE-RECESSES`)" in text) == bool(g.joggles)
    flanged = [h for h in g.holes if h.flanged]
    if flanged:
        assert f"Through bores for {len(flanged)} flanged lightening hole(s) (layer `BORES`)" in text
    t = inches(RAW["sheet"]["thickness"]) * MM_PER_IN
    bores = next((line for line in text.splitlines() if "Through bores for" in line), "")
    for h in g.holes:
        assert (f"Ø{h.d + 2 * t:.2f} mm at ({h.x:.1f}, {h.y:.1f}) for the Ø{h.d:.0f} mm hole" in bores) == h.flanged
        assert (f"({h.x:.1f}, {h.y:.1f})" in bores) == h.flanged
    pins_line = next(line for line in text.splitlines() if line.startswith("* Tooling pins"))
    pairs = re.findall(r"\((-?[\d.]+), (-?[\d.]+)\)", pins_line)  # one (x, y) pair per pin, nothing else
    assert pairs == [(f"{q.x:.1f}", f"{q.y:.1f}") for q in g.pins]
    assert "(layer `DOWEL-HOLES`)" in pins_line
    for q in g.pins:
        assert f"({q.x:.1f}, {q.y:.1f})" in pins_line and f"Ø{q.d:.2f} mm dowels" in pins_line
    # the pilots from the flange's developed length (FAA-H-8083-31 ch. 4 setback, K-factor bend allowance with the
    # catalogue's k, from memory, unverified) on the spec's own radius and sheet
    pilots = [pilot_diameter_mm(h.d, h.flange_height, inches(RAW["sheet"]["thickness"]) * MM_PER_IN,
                                inches(RAW["flange"]["bend_radius"]) * MM_PER_IN, piece.alloy.k_factor)
              for h in g.holes if h.flanged]
    line = next(line for line in text.splitlines() if line.startswith("* Pilot holes for flanged"))
    assert line.endswith(": " + (", ".join(f"Ø{d:.1f} mm" for d in pilots) or "none") + ".")


def test_flute_numbers(sheets) -> None:
    """The nose's flutes: their count, and for each size its width, depth and the radius of its circular segment,
    r = (w²/4 + h²)/2h (plane geometry: chord w, height h); their lips rounded to at least the die radius."""
    piece, text = sheets["nose"]
    assert piece.flutes
    line = next(line for line in text.splitlines() if "**Flutes (" in line)
    # after the two router set-ups and the joggle recesses, if any, with no gap in the numbers
    number = 3 + bool(piece.piece.joggles)
    assert line.startswith(f"{number}. **Flutes ({len(piece.flutes)}, layer `FLUTES`)**: grooves ")
    # "N × W mm wide, D mm deep" a size: the counts grouped here by width and depth to 0.1 mm
    counts: dict[tuple[str, str], int] = {}
    for f in piece.flutes:
        key = (f"{f.width_mm:.1f}", f"{f.depth_mm:.1f}")
        counts[key] = counts.get(key, 0) + 1
    for (w, d), n in counts.items():
        assert f"{n} × {w} mm wide, {d} mm deep" in line, line
    for f in piece.flutes:
        r = (f.width_mm**2 / 4 + f.depth_mm**2) / (2 * f.depth_mm)
        assert f"{f.width_mm:.1f} mm wide" in line and f"{f.depth_mm:.1f} mm deep" in line, line
        assert f"an arc of radius {r:.1f} mm" in line, line
    assert f"at least {both(piece.springback.die_radius_mm)} with a file" in line
    assert "Flutes (" not in sheets["center"][1]


@pytest.mark.parametrize("name", PIECES)
def test_press_numbers(sheets, name: str) -> None:
    """The press's force and box pressure from the spec's rating and box: 25 ton (short, 2000 lbf) over a
    12 × 10 in box is 50000 lbf / 120 in² = 416.7 psi (NIST SP 811 for the conversions).  The pressure that sets
    the flanges on the die radius R, (2/√3)·σy·t²/(2R²), the angle the box's pressure folds the perimeter flange
    to, and the verdict, from the press model's stated formulas (a model of our own) with the spec's sheet and
    2024-T3's typical yield."""
    piece, text = sheets[name]
    force_lbf = float(RAW["press"]["force"].split()[0]) * LBF_PER_TON
    box_in2 = RAW["press"]["box"][0] * RAW["press"]["box"][1]
    psi = force_lbf / box_in2
    mpa = psi * PSI
    assert f"close the press to its rating ({force_lbf * N_PER_LBF / 1000:.0f} kN)" in text
    assert f"{mpa:.2f} MPa ({psi:.0f} psi) in the box" in text
    p = piece.press
    assert p.pressure_mpa == pytest.approx(mpa, rel=1e-9)

    assert RAW["sheet"]["alloy"] == "2024-T3"
    t = inches(RAW["sheet"]["thickness"]) * MM_PER_IN
    height = inches(RAW["flange"]["height"]) * MM_PER_IN
    radius = piece.springback.die_radius_mm
    needed = set_on_radius_mpa(T3_YIELD_MPA, t, radius)  # every leg sits on the die radius (flute lips too)
    assert p.needed_mpa == pytest.approx(needed, rel=1e-9)
    assert (f"setting the flanges on the {both(radius)} die radius needs {needed:.2f} MPa ({needed / PSI:.0f} psi)"
            in text)
    legs = press_legs(piece, mpa, height, t, T3_YIELD_MPA)
    fits = box_fits(piece)
    verdict = press_verdict([a for _, a in legs], fits)
    assert f"Press check: **{verdict.upper()}**" in text
    if not fits:  # the center die: the box cannot take it (see test_a_die_too_big_for_the_box_is_promised_no_fold)
        return
    angle = fold_angle_deg(mpa, height, radius, t, T3_YIELD_MPA)
    assert f"so expect the perimeter flange at about {angle:.0f}° (plastic-hinge model" in text
    hand = [line for line in text.splitlines() if line.startswith("6. Finish by hand")]
    if verdict == "full":
        assert not hand
    else:
        short = ", ".join(f"{leg} (about {a:.0f}°)" for leg, a in legs if a < 90.0)
        assert hand == [("6. Finish by hand over the die, with the blank still pinned: a hand seamer, or a hardwood "
                         f"block and a soft mallet, working along the flange a little at a time: {short}.")]


def test_a_die_too_big_for_the_box_is_promised_no_fold(sheets) -> None:
    """The demo's center die, 454 mm long, does not fit the 12 × 10 in box with 1 in at each wall: the press
    cannot take it, so the sheet promises no fold angle and no hand finishing of a fold."""
    piece, text = sheets["center"]
    assert not box_fits(piece)
    assert "Press check: **INSUFFICIENT**" in text
    forming = text[text.index("## 5. Forming"):text.index(HEADINGS[-1])]
    promised = [int(a) for a in re.findall(r"about (\d+)°", forming)]
    assert not any(promised), promised
    assert "Finish by hand" not in forming


@pytest.mark.parametrize("name", PIECES)
def test_die_life_shrink_and_warnings(sheets, rib, name: str) -> None:
    """The flange check: the residual shrink and the verdict as the analysis gives them, the wrinkle limit
    worked out here (the catalogue's limit scaled by (20·t/h)², a model of our own), the verdict consistent with
    them, its remedies; then every finding as "part: message"."""
    piece, text = sheets[name]
    life = materials.die_material(rib.spec.shared.die.material).life_parts
    assert f"Expect about {life} parts from a {rib.spec.shared.die.material} die" in text
    flange = piece.flange
    limit = wrinkle_limit(piece.alloy.shrink_limit, inches(RAW["flange"]["height"]) * MM_PER_IN,
                          inches(RAW["sheet"]["thickness"]) * MM_PER_IN)
    assert flange.shrink_limit == pytest.approx(limit, rel=1e-12)
    assert_flange_verdict_consistent(piece)
    check = next(line for line in text.splitlines() if "Check the flange angle (90°)" in line)
    step = 6 if piece.press.verdict == "full" or not box_fits(piece) else 7  # a hand-finish step before it
    tail = ". " + "; or ".join(flange.remedies) + "." if flange.remedies else "."
    assert check == (f"{step}. Check the flange angle (90°) and radius. Edge shrink left after relief "
                     f"{flange.residual_shrink:.3f} at worst against a {limit:.3f} wrinkle limit: "
                     f"**{flange.verdict}**{tail}")
    warnings = text[text.index(HEADINGS[-1]):text.rindex("---")]
    listed = [line[2:] for line in warnings.splitlines() if line.startswith("* ")]
    assert listed == [f"{piece.piece.part_id}: {w.message}" for w in piece.warnings] and listed


def test_die_notes_go_under_drilling(rib) -> None:
    piece = rib.pieces[1]
    text = shop_sheet(rib, piece, ["Dowel holes: first note.", "Marks: second note."])
    drilling = text[text.index(HEADINGS[2]):text.index(HEADINGS[3])]
    assert "* Dowel holes: first note.\n* Marks: second note.\n" in drilling


@pytest.fixture(scope="module")
def mm_rib():
    from diegen import api

    return api.analyse(parse_spec(MM_RIB.format(force="1200 kN"), "m1.yaml"))


def test_millimetre_spec_takes_metric_round_overs(mm_rib) -> None:
    """In a millimetre spec the nearest standard bit is a whole millimetre (1 to 12 mm bits, common practice,
    no source)."""
    for piece in mm_rib.pieces:
        text = shop_sheet(mm_rib, piece)
        radius = piece.springback.die_radius_mm
        metric = min(range(1, 13), key=lambda r: abs(r - radius))
        assert f"the nearest standard bit is {both(float(metric))}" in text
        assert f"2024-T3 {both(0.6)}" in text and f"flange {both(12.0)}" in text


def test_a_piece_without_warnings_says_none(mm_rib) -> None:
    """The millimetre rib's press, 1200 kN over 300 × 250 mm = 16 MPa, sets its flanges on the die radius (the
    set-on pressure (2/√3)·σy·t²/(2R²), a model of our own, with 2024-T3's typical yield): a full press, no hand
    finishing, and a piece with nothing to warn of says so."""
    quiet = [p for p in mm_rib.pieces if not p.warnings]
    assert quiet, "the millimetre rib has a piece without warnings"
    piece = quiet[0]
    pressure = 1200e3 / (300.0 * 250.0)
    assert pressure >= set_on_radius_mpa(T3_YIELD_MPA, 0.6, piece.springback.die_radius_mm)
    text = shop_sheet(mm_rib, piece)
    assert f"Press check: **FULL** — {pressure:.2f} MPa" in text and "Finish by hand" not in text
    assert text[text.index(HEADINGS[-1]):].split("\n---")[0].strip().endswith("* none")


# A rib whose nose needs flutes of two sizes: a crowded shrink run gets narrowed flutes, the long run full ones.
MIXED_FLUTES = (DEMO_RIB.read_text(encoding="utf-8").replace("chord: 40", "chord: 12")
                .replace("pieces: [nose, center, tail]", "pieces: [nose]"))


def test_every_flute_size_is_on_the_sheet() -> None:
    from diegen import api

    rib = api.analyse(parse_spec(MIXED_FLUTES, "mixed.yaml"))
    piece = rib.pieces[0]
    sizes = sorted({(round(f.width_mm, 1), round(f.depth_mm, 1)) for f in piece.flutes})
    assert len(sizes) > 1, "the case has flutes of several sizes"
    text = shop_sheet(rib, piece)
    line = next(line for line in text.splitlines() if "**Flutes (" in line)
    for width, depth in sizes:
        assert f"{width:.1f} mm" in line and f"{depth:.1f} mm" in line, (width, depth, line)


def test_the_cut_end_lies_on_the_flat_top_of_the_die(sheets) -> None:
    """The tail piece's aft end gets no flange: the blank stops flush with the piece's outline there, and the die
    runs on past it, so the sheet says how far and how far that end lies clear of the rounded top edge: the run-on
    less the top setback R·(1 + sin α)/cos α of the die radius R and over-bend α (plane geometry of a circle tangent
    to the top face and to a wall leaning in by α, worked here from the piece's own die radius and over-bend).  The
    nose and center pieces are flanged all round and have no such step."""
    piece, text = sheets["tail"]
    assert [r.flanged for r in piece.piece.runs].count(False) == 1
    radius, lean = piece.springback.die_radius_mm, math.radians(piece.springback.overbend_deg)
    setback = radius * (1.0 + math.sin(lean)) / math.cos(lean)
    overrun = piece.piece.die_overrun_mm
    assert number_after(text, r"\*\*Cut end\*\*: the die runs on ([0-9.]+) mm") == pytest.approx(overrun, abs=0.006)
    assert number_after(text, r"flat top, ([0-9.]+) mm \([0-9.]+ in\) clear of the rounded top edge") == \
        pytest.approx(overrun - setback, abs=0.006)
    assert overrun - setback >= 1.0  # project limit: room to spare
    assert "Cut edges" not in text
    for name in ("nose", "center"):
        assert "Cut edges" not in sheets[name][1] and "Cut end" not in sheets[name][1]
