"""Wing planform → rib stations → rib specs and sections (diegen.wing).

Expectations are plane geometry written out here (straight taper, straight
spar lines, a rib line square to a swept spar intersected with the leading- and
trailing-edge lines by shapely), and the rib a spec builds when given alone.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from shapely.geometry import LineString
from testing import DEMO_WING, assert_outlines_close, distances_to, stretch_limit

from diegen import api
from diegen.geometry.naca import naca_section
from diegen.geometry.rib import load_section, raw_section, rib_geometry
from diegen.geometry.section import blend, resample
from diegen.spec import parse_spec
from diegen.spec.model import RibSpec, Stations, WingSpec
from diegen.wing import chord_at, rib_spec, section_at, station_positions, stations

IN = 25.4

SHARED = """\
skin_thickness: 0.025
sheet: {alloy: 2024-T3, thickness: 0.025}
flange: {height: 0.5, bend_radius: "3/32 in"}
pieces: [nose, center, tail]
lightening_holes: auto
pins: auto
relief: flutes
die: {material: solid-surface, stock_thickness: 0.75, cutter_diameter: 0.25}
press: {force: 50 ton, box: [24, 12], rubber: {durometer: 55, thickness: 2}}
"""

SPARS = [(0.25, 0.063, 0.063, 0.75), (0.70, 0.050, 0.050, 0.625)]  # at, web, cap thickness, cap width (in)


def wing_text(root: str = "naca 2412", tip: str = "naca 2412", root_chord: float = 48, tip_chord: float = 36,
              sweep: float = 0.0, sweep_line: float = 0.25, orientation: str = "streamwise",
              spars: str | None = None, stations_yaml: str = "{count: 7}") -> str:
    spar_yaml = spars or "\n".join(f"  - {{at: {a}, web: {w}, cap_thickness: {ct}, cap_width: {cw}}}"
                                   for a, w, ct, cw in SPARS)
    return f"""diegen: 1
kind: wing
id: W
units: in
planform:
  root_chord: {root_chord}
  tip_chord: {tip_chord}
  span: 120
  sweep: {sweep}
  sweep_line: {sweep_line}
  stations: {stations_yaml}
  rib_orientation: {orientation}
airfoil: {{root: {root}, tip: {tip}}}
spars:
{spar_yaml}
{SHARED}"""


def rib_text(chord_in: float, fractions: tuple[float, ...], airfoil: str = "naca 2412") -> str:
    spar_yaml = "\n".join(f"  - {{at: {f!r}, web: {w}, cap_thickness: {ct}, cap_width: {cw}}}"
                          for f, (_, w, ct, cw) in zip(fractions, SPARS))
    return f"""diegen: 1
kind: rib
id: W
units: in
airfoil: {airfoil}
chord: {chord_in!r}
spars:
{spar_yaml}
{SHARED}"""


def wing(**kwargs: object) -> WingSpec:
    spec = parse_spec(wing_text(**kwargs), "wing.yaml")  # type: ignore[arg-type]
    assert isinstance(spec, WingSpec)
    return spec


# --------------------------------------------------------------------------- stations and chords


def test_demo_wing_chords_follow_the_straight_taper() -> None:
    spec = api.load(DEMO_WING)
    assert isinstance(spec, WingSpec)
    c_root, c_tip, span = 48 * IN, 36 * IN, 120 * IN
    found = stations(spec)
    assert [s.y_mm for s in found] == pytest.approx(list(np.linspace(0.0, span, 13)), abs=1e-9)
    for s in found:
        assert s.chord_mm == pytest.approx(c_root + (c_tip - c_root) * s.y_mm / span, abs=1e-9)
        assert chord_at(spec, s.y_mm) == pytest.approx(s.chord_mm)
        assert s.spar_fractions == pytest.approx((0.25, 0.70), abs=1e-12)  # constant-fraction spars
        assert s.oblique_deg == 0.0
    assert [s.number for s in found] == list(range(1, 14))


def test_station_pitch_and_positions() -> None:
    spec = wing()
    span = 120 * IN
    by_pitch = replace(spec, stations=Stations(pitch_mm=500.0))
    assert station_positions(by_pitch) == pytest.approx((0.0, 500.0, 1000.0, 1500.0, 2000.0, 2500.0, 3000.0, span))
    listed = replace(spec, stations=Stations(positions_mm=(0.0, 777.0, span)))
    assert [s.chord_mm for s in stations(listed)] == pytest.approx(
        [48 * IN, 48 * IN - 12 * IN * 777.0 / span, 36 * IN])


# --------------------------------------------------------------------------- ribs of a wing vs ribs alone


def test_streamwise_rib_equals_the_rib_spec_built_alone() -> None:
    # Zero sweep, one section from root to tip: the rib at a station is just that section at the station's
    # chord, so it must equal a rib spec written by hand for that chord (die outline within 0.01 mm).
    spec = wing()
    for station in stations(spec)[::3]:
        from_wing = rib_geometry(rib_spec(spec, station), section_at(spec, station), stretch_limit=stretch_limit(spec))
        alone_spec = parse_spec(rib_text(station.chord_mm / IN, station.spar_fractions), "rib.yaml")
        assert isinstance(alone_spec, RibSpec)
        alone = rib_geometry(alone_spec, stretch_limit=stretch_limit(alone_spec))
        assert from_wing.chord_mm == pytest.approx(alone.chord_mm, abs=1e-9)
        assert_outlines_close(from_wing.die_outline, alone.die_outline)
        assert [p.name for p in from_wing.pieces] == [p.name for p in alone.pieces]
        for a, b in zip(from_wing.pieces, alone.pieces):
            assert_outlines_close(a.outline, b.outline)
            assert a.x_range_mm == pytest.approx(b.x_range_mm, abs=1e-6)


def test_blending_reproduces_root_and_tip_sections_exactly() -> None:
    spec = api.load(DEMO_WING)
    assert isinstance(spec, WingSpec)
    root, tip = raw_section(spec.root_airfoil), raw_section(spec.tip_airfoil)
    n = spec.root_airfoil.points
    assert np.array_equal(blend(root, tip, 0.0, n), resample(root, n))
    assert np.array_equal(blend(root, tip, 1.0, n), resample(tip, n))
    first, last = stations(spec)[0], stations(spec)[-1]
    assert np.array_equal(section_at(spec, first), load_section(spec.root_airfoil))
    assert np.array_equal(section_at(spec, last), load_section(spec.tip_airfoil))
    # and the re-sampled root lies on the NACA 23015 surface (Report 824 equations, 801-point reference
    # polyline; its chordal sag is below 1e-5 c)
    loop = naca_section("23015", n_points=801, closed_te=True)
    reference = LineString(np.vstack([loop, loop[:1]]))
    assert distances_to(section_at(spec, first), reference).max() < 1e-5


def test_blend_half_way_between_two_thicknesses() -> None:
    # NACA 00xx ordinates scale with t (Report 824), so the mid blend of 0012 and 0016 is close to a 0014:
    # max thickness 0.14 c (points are paired by arc-length fraction, not by x: allow 0.3 %).
    a, b = naca_section("0012", n_points=801, closed_te=True), naca_section("0016", n_points=801, closed_te=True)
    mid = blend(a, b, 0.5, 241)
    assert np.ptp(mid[:, 1]) == pytest.approx(0.14, rel=3e-3)


# --------------------------------------------------------------------------- spar lines


def test_spar_fractions_of_straight_spar_lines_on_a_swept_tapered_wing() -> None:
    spars = ("  - {root_at: 0.22, tip_at: 0.30, web: 0.063, cap_thickness: 0.063, cap_width: 0.75}\n"
             "  - {at: 0.70, web: 0.050, cap_thickness: 0.050, cap_width: 0.625}")
    spec = wing(sweep=5.0, sweep_line=0.25, spars=spars)
    c_root, c_tip, span = 48 * IN, 36 * IN, 120 * IN
    tan = math.tan(math.radians(5.0))

    def chord(y: float) -> float:
        return c_root + (c_tip - c_root) * y / span

    def x_le(y: float) -> float:  # the quarter-chord line is swept 5°; the root leading edge is at x = 0
        return 0.25 * c_root + y * tan - 0.25 * chord(y)

    for station in stations(spec):
        y = station.y_mm
        assert station.x_le_mm == pytest.approx(x_le(y), abs=1e-9)
        for (root_at, tip_at), fraction in zip(((0.22, 0.30), (0.70, 0.70)), station.spar_fractions):
            a, b = (x_le(0.0) + root_at * c_root, 0.0), (x_le(span) + tip_at * c_tip, span)
            x_spar = a[0] + (b[0] - a[0]) * y / span  # straight in plan between root and tip points
            assert fraction == pytest.approx((x_spar - x_le(y)) / chord(y), abs=1e-12)
    assert stations(spec)[0].spar_fractions[0] == pytest.approx(0.22)
    assert stations(spec)[-1].spar_fractions[0] == pytest.approx(0.30)


def test_normal_to_spar_rib_spans_the_wing_square_to_the_spar() -> None:
    # Plan geometry: untapered wing, leading edge, spar and trailing edge all swept by Λ.  A rib square to the
    # spar through the spar point at station y meets the leading- and trailing-edge lines a distance c·cos Λ
    # apart (intersected here with shapely); the depth at each chord fraction is the streamwise one, so the
    # rib's section is the streamwise one shortened by cos Λ (the same t/c growth by 1/cos Λ as simple sweep
    # theory's normal section: from memory, unverified; the geometry here stands on its own).
    sweep = 20.0
    spec = wing(root_chord=40, tip_chord=40, sweep=sweep, orientation="normal-to-spar")
    streamwise = wing(root_chord=40, tip_chord=40, sweep=sweep)
    c, span = 40 * IN, 120 * IN
    lam = math.radians(sweep)
    station = stations(spec)[3]
    y = station.y_mm
    assert station.oblique_deg == pytest.approx(sweep)
    x_le = y * math.tan(lam)
    spar_point = np.array([x_le + 0.25 * c, y])
    direction = np.array([math.cos(lam), -math.sin(lam)])  # square to the spar line (tan Λ, 1)
    rib_line = LineString([spar_point - 5 * c * direction, spar_point + 5 * c * direction])
    le_line = LineString([(-span * math.tan(lam), -span), (2 * span * math.tan(lam), 2 * span)])
    te_line = LineString([(c - span * math.tan(lam), -span), (c + 2 * span * math.tan(lam), 2 * span)])
    length = rib_line.intersection(le_line).distance(rib_line.intersection(te_line))
    assert length == pytest.approx(c * math.cos(lam), rel=1e-12)

    normal = rib_spec(spec, station)
    assert normal.chord_mm == pytest.approx(length, rel=1e-9)
    # the rib crosses the webs square: web and cap widths as given
    for spar, (_, web, cap_t, cap_w) in zip(normal.spars, SPARS):
        assert spar.web_mm == pytest.approx(web * IN) and spar.cap_width_mm == pytest.approx(cap_w * IN)
        assert spar.cap_thickness_mm == pytest.approx(cap_t * IN)
    # same depth as the streamwise rib at the same chord fraction
    section = section_at(spec, station) * normal.chord_mm
    plain = section_at(streamwise, stations(streamwise)[3]) * c
    assert np.ptp(section[:, 1]) == pytest.approx(np.ptp(plain[:, 1]), rel=1e-9)
    assert np.ptp(section[:, 0]) == pytest.approx(np.ptp(plain[:, 0]) * math.cos(lam), rel=1e-9)
    geometry = rib_geometry(normal, section_at(spec, station), stretch_limit=stretch_limit(normal))
    assert geometry.chord_mm == pytest.approx(length, rel=1e-9)


# --------------------------------------------------------------------------- section labels
def test_each_rib_names_the_blend_it_is_cut_from() -> None:
    # The demo wing blends NACA 23015 at the root into NACA 23012 at the tip over 13 evenly spaced ribs: rib k
    # holds (k - 1)/12 of the tip section (span fraction, numpy's linspace of the planform as the reference).
    spec = api.load(DEMO_WING)
    assert isinstance(spec, WingSpec)
    ribs = [rib_spec(spec, s) for s in stations(spec)]
    fractions = np.linspace(0.0, 1.0, 13)
    assert ribs[0].section_label == "NACA 23015"
    assert ribs[-1].section_label == "NACA 23012"  # the tip rib is the tip section alone
    for rib, f in zip(ribs[1:-1], fractions[1:-1]):
        assert rib.section_label == f"{100 * (1 - f):.0f} % NACA 23015 + {100 * f:.0f} % NACA 23012"
    assert ribs[7].section_label == "42 % NACA 23015 + 58 % NACA 23012"  # 7/12 = 0.583 of the tip section


def test_a_wing_of_one_section_names_it_without_a_blend() -> None:
    spec = wing()
    assert {rib_spec(spec, s).section_label for s in stations(spec)} == {"NACA 2412"}
