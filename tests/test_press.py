"""Press check: box pressure, the plastic-hinge fold model, flange angles, verdicts, die-top load.

Unit conversions exact per NIST SP 811: 1 lbf = 4.4482216152605 N, 1 in = 25.4 mm, 1 ksi = 6.894757 MPa.
Check values:

* A 20-short-ton press over an 11 in x 11 in box gives about 333 psi, the pressure a home box reaches (fact of
  the trade, no source).
* At about 330 psi a home box folds 0.025 in 2024-T3 rib flanges only part way, as little as about 30 degrees,
  and they are finished by hand (fact of the trade, no source).
* Setting a 0.025 in 2024-T3 flange on its ~3/32 in die radius takes about 2,000 psi and more; rubber-pad
  practice runs at roughly 1,000-2,000 psi and more (from memory, unverified).
* Gent's relation of Young's modulus to Shore A hardness (A. N. Gent, Trans. IRI 34, 1958, as commonly quoted):
  E = 0.0981(56 + 7.62336 S)/(0.137505(254 - 2.54 S)) MPa; the formula is evaluated here by hand for S = 50.
"""

from __future__ import annotations

import math

import pytest

from diegen.errors import FormingError
from diegen.forming.press import (
    DieFootprint,
    FlangeLeg,
    PressSetup,
    box_pressure,
    durometer_advice,
    fold,
    hinge_lever_mm,
    hinge_pressure,
    press_check,
    rubber_modulus_mpa,
)

LBF = 4.4482216152605  # N (NIST SP 811)
IN = 25.4  # mm (NIST SP 811)
PSI = LBF / IN**2  # MPa per psi
KSI = 6.894757  # MPa (NIST SP 811)
T3_YIELD = 50 * KSI  # 2024-T3 typical yield (Kutz, Handbook of Materials Selection, 2002, Table 5, p. 101)


def test_unit_constants() -> None:
    assert PSI == pytest.approx(6.894757e-3, rel=1e-7)  # NIST SP 811: 1 psi = 6.894757 kPa
    assert 1000.0 * PSI == pytest.approx(KSI, rel=1e-7)


def test_twenty_ton_press_over_eleven_inch_box() -> None:
    # Fact of the trade, no source: 40,000 lbf over 11 in x 11 in gives about 333 psi = 2.30 MPa.
    p = box_pressure(40_000 * LBF, 11 * IN, 11 * IN)
    assert p == pytest.approx(40_000 / 121 * PSI, rel=1e-14)  # exact: 330.58 psi
    assert p / PSI == pytest.approx(333.0, rel=0.01)


def test_hinge_pressure_and_lever_are_inverse() -> None:
    # Plastic hinge in plane strain: p = (2/sqrt 3) Sy t^2 / (2 a^2); a(p) inverts it.
    p = hinge_pressure(0.5 * IN, 0.032 * IN, 11 * KSI)
    assert p == pytest.approx(2 / math.sqrt(3) * 11 * KSI * (0.032 * IN) ** 2 / (2 * (0.5 * IN) ** 2), rel=1e-14)
    assert hinge_lever_mm(p, 0.032 * IN, 11 * KSI) == pytest.approx(0.5 * IN, rel=1e-12)
    assert hinge_pressure(0.125 * IN, 0.032 * IN, 11 * KSI) == pytest.approx(16 * p, rel=1e-12)


def test_setting_a_t3_flange_on_its_die_radius_needs_about_2000_psi() -> None:
    # From memory, unverified: rubber-pad practice 1,000-2,000 psi and more; the lever near the die radius.
    full = hinge_pressure(0.085 * IN, 0.025 * IN, T3_YIELD)
    assert 1_500 * PSI < full < 3_000 * PSI


def test_home_box_folds_a_t3_rib_flange_only_part_way() -> None:
    # Fact of the trade, no source: about 330 psi folds 0.025 in 2024-T3 flanges only part way, ~30 degrees.
    leg = FlangeLeg("perimeter flange", "perimeter", 0.5 * IN, 0.085 * IN)
    home = fold(leg, 330 * PSI, 0.025 * IN, T3_YIELD)
    assert 15.0 < home.angle_deg < 45.0
    assert home.reachable_radius_mm > leg.radius_mm
    # the fold grows with pressure and reaches 90 degrees exactly when the hinge lever reaches the die radius
    angles = [fold(leg, p * PSI, 0.025 * IN, T3_YIELD).angle_deg for p in (200, 330, 600, 1200, 2000)]
    assert angles == sorted(angles)
    assert fold(leg, home.full_mpa * 1.0001, 0.025 * IN, T3_YIELD).angle_deg == 90.0
    assert fold(leg, home.full_mpa * 0.99, 0.025 * IN, T3_YIELD).angle_deg < 90.0
    assert fold(leg, home.start_mpa * 0.99, 0.025 * IN, T3_YIELD).angle_deg == 0.0


def _check(setup: dict | None = None, die: dict | None = None, legs: list[float] | None = None,
           thickness: float = 0.025 * IN, yield_mpa: float = T3_YIELD, **kw: object):
    s = dict(force_n=40_000 * LBF, box_w_mm=11 * IN, box_l_mm=11 * IN, rubber_thickness_mm=50.0,
             rubber_durometer=50.0)
    s.update(setup or {})
    d = dict(length_mm=200.0, width_mm=80.0, top_area_mm2=12_000.0, height_mm=20.0, compressive_mpa=70.0,
             life_parts=100)
    d.update(die or {})
    flange_legs = [FlangeLeg(f"leg {i}", "perimeter", h, 2.2) for i, h in enumerate(legs or [12.7])]
    return press_check(PressSetup(**s), DieFootprint(**d), flange_legs, thickness, yield_mpa, **kw)  # type: ignore[arg-type]


def test_verdicts_follow_the_pressure() -> None:
    # About 330 psi (fact of the trade): partial.  About 2,800 psi: full.  Far below the fold start: insufficient.
    assert _check().verdict == "partial"
    assert _check({"force_n": 2_800 * PSI * (11 * IN) ** 2}).verdict == "full"
    assert _check({"force_n": 2 * PSI * (11 * IN) ** 2}).verdict == "insufficient"
    partial = _check()
    assert 0.0 < partial.flange_angle_deg < 90.0 and partial.short_legs


def test_fits_box_with_clearance() -> None:
    # Default 25 mm each side (common practice, no source): 279.4 - 50 = 229.4 mm usable.
    assert _check(die={"length_mm": 229.4, "width_mm": 100.0}).fits_box
    outside = _check(die={"length_mm": 229.5, "width_mm": 100.0})
    assert not outside.fits_box and outside.verdict == "insufficient"
    assert any(w.code == "die-too-big-for-box" for w in outside.warnings)
    assert _check({"box_w_mm": 300.0, "box_l_mm": 150.0}, {"length_mm": 90.0, "width_mm": 240.0}).fits_box
    assert _check({"wall_clearance_mm": 20.0}, {"length_mm": 229.5, "width_mm": 100.0}).fits_box


def test_gent_rubber_modulus() -> None:
    # Gent 1958 (as commonly quoted), by hand for Shore 50A: 0.0981*(56 + 381.168)/(0.137505*(254 - 127)) MPa.
    assert rubber_modulus_mpa(50.0) == pytest.approx(0.0981 * 437.168 / (0.137505 * 127.0), rel=1e-12)
    assert 2.0 < rubber_modulus_mpa(50.0) < 3.0  # about 2.5 MPa for a 50A rubber
    assert rubber_modulus_mpa(40.0) < rubber_modulus_mpa(60.0)


def test_die_top_load_comes_from_the_rubber_not_the_press_rating() -> None:
    # A small die top no longer looks crushed: the top carries the rubber's pressure, not the whole force.
    small = _check(die={"top_area_mm2": 2_000.0})
    expected = 40_000 * LBF / (11 * IN) ** 2 + rubber_modulus_mpa(50.0) * 20.0 / 50.0
    assert small.die_top_pressure_mpa == pytest.approx(expected, rel=1e-12)
    assert small.die_crush_ok and not any(w.code == "die-may-crush" for w in small.warnings)
    weak = _check(die={"compressive_mpa": 3.0})  # a stock weaker than the rubber pressure does crush
    assert not weak.die_crush_ok and any(w.code == "die-may-crush" for w in weak.warnings)


def test_rubber_and_life() -> None:
    # Rubber >= 1.5 x die height (from memory, unverified).
    assert _check({"rubber_thickness_mm": 30.0}).rubber_ok
    thin = _check({"rubber_thickness_mm": 29.9})
    assert not thin.rubber_ok and any(w.code == "rubber-too-thin" for w in thin.warnings)
    assert not _check(die={"life_parts": 12}, parts_wanted=20).die_life_ok


def test_low_pressure_warning_and_models() -> None:
    ok = _check()
    assert not any(w.code == "press-below-usual" for w in ok.warnings)  # the reference press itself passes
    low = _check({"force_n": 20_000 * LBF})
    assert any(w.code == "press-below-usual" for w in low.warnings)
    for name in ("pressure_mpa", "die_top_pressure_mpa", "needed_mpa", "flange_angle_deg", "fits_box", "rubber_ok",
                 "die_crush_ok"):
        assert ok.model_of(name)
    assert "model of our own" in ok.model_of("needed_mpa")
    assert "local codes" in ok.caution


def test_durometer_advice() -> None:
    # Shore 40A-60A usual; harder is crisper but needs more pressure (common practice, no source).
    assert "usual" in durometer_advice(50.0)
    assert "harder" in durometer_advice(70.0) and "more pressure" in durometer_advice(70.0)
    assert "softer" in durometer_advice(30.0)


@pytest.mark.parametrize(
    "setup, die, legs",
    [({"force_n": 0.0}, {}, None), ({"box_w_mm": -1.0}, {}, None), ({}, {"top_area_mm2": float("nan")}, None),
     ({}, {"height_mm": 0.0}, None)],
    ids=["no-force", "neg-box", "nan-area", "flat-die"],
)
def test_bad_input_raises(setup: dict, die: dict, legs: list[float] | None) -> None:
    with pytest.raises(FormingError):
        _check(setup, die, legs)


def test_no_legs_is_an_error() -> None:
    with pytest.raises(FormingError):
        press_check(PressSetup(1e5, 300.0, 250.0, 50.0, 50.0), DieFootprint(100.0, 50.0, 5000.0, 20.0, 50.0, 10), [],
                    0.8, 200.0)
