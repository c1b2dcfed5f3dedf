"""The readable forming report (``diegen.reports.text``) of the demo rib.

Numbers are read back from the text and compared with the analysis and with
values worked out here: lengths and areas with shapely, the bend layout from
the spec file's own inch values (read with plain PyYAML) by the formulas of
FAA-H-8083-31 (Aviation Maintenance Technician Handbook – Airframe), ch. 4:
setback SB = K(R + T) with K = 1 at 90°, bend allowance BA = (0.01743R + 0.0078T)N.
Conversions by the exact definitions of NIST SP 811 (2008), Appendix B.  The
press's numbers by the formulas of its model (a model of our own: plastic hinge,
fold angle; Gent's relation for the rubber) and the wrinkle limit by its stated
scaling, written out in ``testing.py``; the residual shrink and the flange
verdict are the analysis's, checked for consistency with each other.
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
import yaml
from shapely.geometry import LinearRing, Point, Polygon
from shapely.ops import unary_union
from testing import (
    DEMO_RIB,
    MM_PER_IN,
    MM_RIB,
    N_PER_LBF,
    assert_flange_verdict_consistent,
    fits_box,
    fold_angle_deg,
    gent_modulus_mpa,
    hinge_lever_mm,
    pilot_diameter_mm,
    press_legs,
    press_verdict,
    set_on_radius_mpa,
    vertical_chord,
    wrinkle_limit,
)

from diegen import __version__, materials
from diegen.analysis import MODELS
from diegen.reports.document import SAFETY
from diegen.reports.text import die_life_text, footer_text, piece_text, rib_text
from diegen.spec import parse_spec

# 2024-T3 sheet's typical yield, 50 ksi (Aluminum Association typical values as printed in Kutz, Handbook of
# Materials Selection, 2002, Table 5, p. 101); 1 ksi = 1000 lbf/in² (NIST SP 811 App. B)
T3_YIELD_MPA = 50_000 * N_PER_LBF / MM_PER_IN**2
RAW = yaml.safe_load(DEMO_RIB.read_text(encoding="utf-8"))
R_IN = 3 / 32  # flange.bend_radius: "3/32 in"
T_IN = RAW["sheet"]["thickness"]



def length_text(mm: float, inch: bool) -> str:
    """A length as the report writes it: 3 decimals under 10 mm, 1 above; inches beside when the spec is in
    inches."""
    shown = f"{mm:.3f} mm" if mm < 10 else f"{mm:.1f} mm"
    return f"{shown} ({mm / MM_PER_IN:.3f} in)" if inch else shown


def field(block: str, label: str) -> str:
    """The line of a piece block that starts with ``label``."""
    return next(line for line in block.splitlines() if line.strip().startswith(label))


def number_after(text: str, pattern: str) -> float:
    match = re.search(pattern, text)
    assert match, f"{pattern!r} not in {text!r}"
    return float(match.group(1))


@pytest.fixture(scope="module")
def rib(spec):
    from diegen import api

    return api.analyse(spec)


@pytest.fixture(scope="module")
def report(rib) -> str:
    return rib_text(rib)


@pytest.fixture(scope="module")
def blocks(rib, report) -> dict[str, str]:
    """Each piece's block of the report, by piece name."""
    parts = re.split(r"(?m)^(?===)", report.split("\n\nModels behind")[0])
    found = {}
    for p in rib.pieces:
        (block,) = [b for b in parts if b.startswith(f"== {p.piece.part_id} ")]
        found[p.piece.name] = block
    return found


PIECES = ["nose", "center", "tail"]


def test_head_names_rib_airfoil_and_sheet(report) -> None:
    lines = report.splitlines()
    assert lines[0] == f"diegen {__version__} — rib {RAW['id']}: {RAW['title']}"
    chord_mm = RAW["chord"] * MM_PER_IN
    assert lines[1] == (f"  NACA {RAW['airfoil'].split()[1]}, chord {chord_mm:.1f} mm ({RAW['chord']:.3f} in), "
                        f"{RAW['sheet']['alloy']} {T_IN * MM_PER_IN:.3f} mm ({T_IN:.3f} in)")


def test_one_block_per_piece_in_order(rib, report) -> None:
    heads = [line for line in report.splitlines() if line.startswith("== ")]
    assert [h.split()[1] for h in heads] == [f"{RAW['id']}-{name}" for name in RAW["pieces"]]
    for p, head in zip(rib.pieces, heads):
        g = p.piece
        assert head == (f"== {g.part_id} ({g.name} piece)  x {g.x_range_mm[0]:.1f}–{g.x_range_mm[1]:.1f} mm of "
                        f"{rib.geometry.chord_mm:.1f} mm chord")


@pytest.mark.parametrize("name", PIECES)
def test_die_outline_measured_by_shapely(rib, blocks, name: str) -> None:
    p = rib.pieces[PIECES.index(name)]
    line = field(blocks[name], "die outline")
    length = LinearRing(p.piece.die_outline).length
    area = Polygon(p.piece.die_outline).area
    assert f"length {length_text(length, True)}" in line
    assert number_after(line, r"area (\d+) mm²") == pytest.approx(area, abs=0.5)
    # the web's depth: shapely's vertical chords across the piece (the nose from a tenth of its length, its tip
    # having none), every 0.5 mm
    x0, x1 = p.piece.x_range_mm
    start = x0 + (0.1 * (x1 - x0) if name == "nose" else 1e-6)
    shape = Polygon(p.piece.outline)
    chords = [vertical_chord(shape, x) for x in np.arange(start, x1 - 1e-6, 0.5)]
    lo = number_after(line, r"depth ([\d.]+)–")
    hi = number_after(line, r"depth [\d.]+–([\d.]+) mm")
    assert lo == pytest.approx(min(chords), abs=0.1) and hi == pytest.approx(max(chords), abs=0.1)
    assert f"height {length_text(p.die_height_mm, True)} ({p.die_layers} layer(s) of stock)" in line


@pytest.mark.parametrize("name", PIECES)
def test_bend_layout_by_the_handbook(rib, blocks, name: str) -> None:
    """Setback and the aviation bend-allowance formula from the spec's R = 3/32 in and T = 0.025 in; the K-factor
    form BA = (π/2)(R + kT) at 90° (common practice, no source) with the alloy's k."""
    p = rib.pieces[PIECES.index(name)]
    bend, layout = field(blocks[name], "bend"), field(blocks[name], "BA")
    setback = (R_IN + T_IN) * MM_PER_IN
    aviation = (0.01743 * R_IN + 0.0078 * T_IN) * 90 * MM_PER_IN
    k = number_after(layout, r"k = ([\d.]+)")
    assert k == round(materials.sheet_alloy(RAW["sheet"]["alloy"]).k_factor, 3)
    k_form = math.pi / 2 * (R_IN + k * T_IN) * MM_PER_IN
    assert number_after(layout, r"setback ([\d.]+) mm") == pytest.approx(setback, abs=5e-4)
    assert number_after(layout, r"aviation formula ([\d.]+) mm") == pytest.approx(aviation, abs=5e-4)
    assert number_after(layout, r"BA ([\d.]+) mm") == pytest.approx(k_form, abs=5e-4)
    assert number_after(bend, r"part R ([\d.]+) mm") == pytest.approx(R_IN * MM_PER_IN, abs=5e-4)
    sb = p.springback
    assert f"die R {sb.die_radius_mm:.3f} mm" in bend and f"over-bend {sb.overbend_deg:.2f}°" in bend
    assert f"min {p.min_radius.radius_mm:.3f} mm, {p.min_radius.table} table" in bend
    assert p.min_radius.radius_mm <= R_IN * MM_PER_IN  # the demo passes its radius check


@pytest.mark.parametrize("name", PIECES)
def test_strain_relief_joggles(rib, blocks, name: str) -> None:
    """The flange strain line: the wrinkle limit worked out here (the catalogue's limit scaled by (20·t/h)², a
    model of our own), the residual shrink and verdict as the analysis gives them, checked for consistency; a
    remedy line for each remedy; relief notes and joggles."""
    p = rib.pieces[PIECES.index(name)]
    block = blocks[name]
    strain = field(block, "flange strain")
    flange = p.flange
    limit = wrinkle_limit(p.alloy.shrink_limit, RAW["flange"]["height"] * MM_PER_IN, T_IN * MM_PER_IN)
    assert flange.shrink_limit == pytest.approx(limit, rel=1e-12)
    assert_flange_verdict_consistent(p)
    assert strain.strip() == (f"flange strain max shrink {p.max_shrink:.3f}, after relief "
                              f"{flange.residual_shrink:.3f} (wrinkle limit {limit:.3f}), max stretch "
                              f"{p.max_stretch:.3f} (limit {p.alloy.stretch_limit:.3f}) → {flange.verdict.upper()}")
    remedies = [line.strip()[len("remedy:"):].strip() for line in block.splitlines()
                if line.strip().startswith("remedy:")]
    assert remedies == list(flange.remedies)
    relief = [line.strip()[len("relief"):].strip() for line in block.splitlines() if line.strip().startswith("relief")]
    if p.flutes or p.notches:
        assert relief == list(p.relief_notes)
        assert f"{len(p.flutes)} flute(s)" in relief[0]
    else:
        assert relief == [f"none needed (policy: {RAW['relief']})"]
    joggles = [line for line in block.splitlines() if line.strip().startswith("joggle")]
    assert len(joggles) == len(p.piece.joggles)
    for j, line in zip(p.piece.joggles, joggles):
        assert f"spar {j.spar + 1} {j.surface}: {j.depth_mm:.2f} mm deep" in line


@pytest.mark.parametrize("name", PIECES)
def test_holes_and_pins(rib, blocks, name: str) -> None:
    """A line per hole.  A flanged hole's pilot from the flange's developed length (setback by FAA-H-8083-31
    ch. 4, the K-factor bend allowance with the catalogue's k) on the spec's R and T; its die bore the clear hole
    plus the two flange walls, d + 2t; its edge stretch the flange's mid-surface circumference over the pilot's,
    (d + t)/pilot − 1 (plane geometry)."""
    p = rib.pieces[PIECES.index(name)]
    t = T_IN * MM_PER_IN
    k = materials.sheet_alloy(RAW["sheet"]["alloy"]).k_factor
    holes = [line for line in blocks[name].splitlines() if line.strip().startswith("hole ")]
    assert len(holes) == len(p.piece.holes)
    for h, line in zip(p.piece.holes, holes):
        assert f"Ø{h.d:.0f} mm at ({h.x:.1f}, {h.y:.1f})" in line
        stretch = number_after(line, r"stretch ([\d.]+)")
        if h.flanged:
            pilot = pilot_diameter_mm(h.d, h.flange_height, t, R_IN * MM_PER_IN, k)
            assert (f"flanged {h.flange_height:.1f} mm, pilot Ø{pilot:.1f}, die bore Ø{h.d + 2 * t:.1f}, "
                    f"stretch {(h.d + t) / pilot - 1:.3f}") in line
            assert stretch > 0.0
        else:
            assert "plain" in line and "pilot" not in line and stretch == 0.0
    pins = field(blocks[name], "pins")
    assert pins.count("Ø") == len(p.piece.pins)
    for q in p.piece.pins:
        assert f"Ø{q.d:.2f} at ({q.x:.1f}, {q.y:.1f})" in pins


@pytest.mark.parametrize("name", PIECES)
def test_press_die_life_and_blank(rib, blocks, name: str) -> None:
    """Box pressure from the spec's 25 ton (2000 lbf each) over 12 × 10 in.  The die top's pressure, the box's
    plus the rubber's extra compression over the die, E_r·h/T with E_r by Gent's relation from the spec's
    durometer; the pressure that sets the flanges on the die radius R, (2/√3)·σy·t²/(2R²); the perimeter flange's
    angle, the radius it is pressed to and the verdict: all by the press model's stated formulas (a model of our
    own) with 2024-T3's typical yield.  The blank's net area (outer contour less inner cuts and holes) and
    perimeter measured with shapely."""
    p = rib.pieces[PIECES.index(name)]
    block = blocks[name]
    press = field(block, "press  ")
    psi = float(RAW["press"]["force"].split()[0]) * 2000.0 / (RAW["press"]["box"][0] * RAW["press"]["box"][1])
    mpa = psi * N_PER_LBF / MM_PER_IN**2
    assert RAW["sheet"]["alloy"] == "2024-T3"
    t, height = T_IN * MM_PER_IN, RAW["flange"]["height"] * MM_PER_IN
    radius = p.springback.die_radius_mm
    stock = RAW["die"]["stock_thickness"] * MM_PER_IN
    die_height = math.ceil((height + 3.0) / stock) * stock  # 3 mm above the flange (common practice, no source)
    rubber = RAW["press"]["rubber"]
    top = mpa + gent_modulus_mpa(rubber["durometer"]) * die_height / (rubber["thickness"] * MM_PER_IN)
    needed = set_on_radius_mpa(T3_YIELD_MPA, t, radius)
    angle = fold_angle_deg(mpa, height, radius, t, T3_YIELD_MPA)
    reach = max(hinge_lever_mm(mpa, t, T3_YIELD_MPA), radius)
    box = (RAW["press"]["box"][0] * MM_PER_IN, RAW["press"]["box"][1] * MM_PER_IN)
    legs = press_legs(p, mpa, height, t, T3_YIELD_MPA)
    fits = fits_box(p.piece.die_outline, box, 1.0 * MM_PER_IN)  # the 1 in default wall clearance (specs/README.md)
    verdict = press_verdict([a for _, a in legs], fits)
    head = (f"press         {mpa:.2f} MPa ({psi:.0f} psi) over the box; {top:.2f} MPa on the die top; setting the "
            f"flanges on the die radius needs {needed:.2f} MPa ({needed * MM_PER_IN**2 / N_PER_LBF:.0f} psi); ")
    fold = f"the perimeter flange reaches about {angle:.0f}°, pressed to R {reach:.2f} mm"
    if fits:
        assert press.strip() == head + fold + f" → {verdict.upper()}"
    else:  # a die the box cannot take: the fold the pressure would give is no promise
        assert press.strip().startswith(head) and press.strip().endswith(f" → {verdict.upper()}")
    assert p.press.die_top_pressure_mpa == pytest.approx(top, rel=1e-9)
    life = field(block, "die life")
    assert "about 100 parts" in life and die_life_text(RAW["die"]["material"]) == "about 100 parts"
    blank = p.blank
    cuts = [Polygon(c) for c in blank.inner] + [Point(c.x, c.y).buffer(c.d / 2, quad_segs=64)
                                                for c in blank.cut_circles + blank.drill_circles]
    net = Polygon(blank.outer).difference(unary_union(cuts)).area
    line = field(block, "blank")
    assert number_after(line, r"blank\s+(\d+) mm²") == pytest.approx(net, abs=0.5)
    assert number_after(line, r"perimeter (\d+) mm") == pytest.approx(Polygon(blank.outer).length, abs=0.5)


@pytest.mark.parametrize("name", PIECES)
def test_warnings_listed(rib, blocks, name: str) -> None:
    p = rib.pieces[PIECES.index(name)]
    listed = [line.strip()[len("warning"):].strip() for line in blocks[name].splitlines()
              if line.strip().startswith("warning ")]
    assert listed == [f"{p.piece.part_id}: {w.message}" for w in p.warnings] and listed


def test_footer_names_every_model_and_the_safety_cautions(rib, report) -> None:
    footer = footer_text()
    assert report == rib_text(rib, footer=False) + "\n\n" + footer
    assert "Models behind" not in rib_text(rib, footer=False) and "Safety" not in rib_text(rib, footer=False)
    for name, text in MODELS.items():
        assert f"  {name.replace('_', ' ')}: {text}" in footer
    assert footer.endswith("Safety: " + SAFETY)


def test_piece_text_is_the_block(rib, blocks) -> None:
    for p in rib.pieces:
        assert blocks[p.piece.name].rstrip("\n") == piece_text(rib, p)


def test_millimetre_spec_shows_no_inches() -> None:
    from diegen import api

    rib = api.analyse(parse_spec(MM_RIB.format(force="220 kN"), "m1.yaml"))
    text = rib_text(rib)
    assert " in)" not in text
    assert text.splitlines()[0] == f"diegen {__version__} — rib M1"  # no title, no colon
    assert "chord 1000.0 mm, 2024-T3 0.600 mm" in text
    for p in rib.pieces:
        assert f"height {p.die_height_mm:.1f} mm ({p.die_layers} layer(s) of stock)" in text
