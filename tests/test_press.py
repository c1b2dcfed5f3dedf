"""Press check: box pressure, die contact pressure, flange fold pressure, verdicts.

Unit conversions exact per NIST SP 811: 1 lbf = 4.4482216152605 N, 1 in =
25.4 mm, 1 ksi = 6.894757 MPa.  A 20-short-ton press over an 11 in x 11 in
box gives about 333 psi (fact of the trade, no source).  The flange fold
pressure p = Sy t^2 / (2 L^2) is a plastic-hinge model of our own (derived,
not published); its 2024-O example (Sy 11 ksi, t 0.032 in, L 0.5 in ->
22.5 psi) is derived from the same formula.
"""

from __future__ import annotations

import pytest

from diegen.errors import FormingError
from diegen.forming.press import (
    box_pressure,
    die_contact_pressure,
    durometer_advice,
    flange_fold_pressure,
    press_check,
)

LBF = 4.4482216152605  # N (NIST SP 811)
IN = 25.4  # mm (NIST SP 811)
PSI = LBF / IN**2  # MPa per psi
KSI = 6.894757  # MPa (NIST SP 811)


def test_unit_constants() -> None:
    assert PSI == pytest.approx(6.894757e-3, rel=1e-7)  # NIST SP 811: 1 psi = 6.894757 kPa
    assert 1000.0 * PSI == pytest.approx(KSI, rel=1e-7)


def test_twenty_ton_press_over_eleven_inch_box() -> None:
    # Fact of the trade, no source: 40,000 lbf over 11 in x 11 in gives about 333 psi = 2.30 MPa.
    p = box_pressure(40_000 * LBF, 11 * IN, 11 * IN)
    assert p == pytest.approx(40_000 / 121 * PSI, rel=1e-14)  # exact: 330.58 psi
    assert p / PSI == pytest.approx(333.0, rel=0.01)
    assert p == pytest.approx(2.30, rel=0.01)


def test_die_contact_pressure() -> None:
    assert die_contact_pressure(40_000 * LBF, 40 * IN**2) == pytest.approx(1000.0 * PSI, rel=1e-14)


def test_flange_fold_pressure_example() -> None:
    # Model of our own: 11 ksi x 0.032^2 / (2 x 0.5^2) = 22.528 psi.
    p = flange_fold_pressure(0.5 * IN, 0.032 * IN, 11 * KSI)
    assert p / PSI == pytest.approx(11_000 * 0.032**2 / (2 * 0.5**2), rel=1e-6)
    assert p / PSI == pytest.approx(22.5, abs=0.05)
    # shorter legs need much more: quarter the leg -> sixteen times the pressure
    assert flange_fold_pressure(0.125 * IN, 0.032 * IN, 11 * KSI) == pytest.approx(16 * p, rel=1e-12)


def _check(**over: object):
    args: dict[str, object] = dict(
        force_n=40_000 * LBF,
        box_w_mm=11 * IN,
        box_l_mm=11 * IN,
        die_length_mm=200.0,
        die_width_mm=80.0,
        die_top_area_mm2=12_000.0,
        die_height_mm=20.0,
        flange_legs_mm=[12.0, 10.0],
        thickness_mm=0.8,
        yield_mpa=11 * KSI,
        rubber_thickness_mm=50.0,
        rubber_durometer=50.0,
        die_compressive_mpa=70.0,
        die_life_parts=100,
    )
    args.update(over)
    return press_check(**args)  # type: ignore[arg-type]


def test_verdict_full_partial_insufficient() -> None:
    # Fold-pressure threshold at 2.279 MPa, t 0.8, Sy 75.8 MPa: L* = t sqrt(Sy / 2p) = 3.26 mm.
    full = _check()
    assert full.verdict == "full" and full.formable_flanges == (0, 1) and full.unformable_flanges == ()
    partial = _check(flange_legs_mm=[12.0, 2.0, 3.0])
    assert partial.verdict == "partial"
    assert partial.formable_flanges == (0,) and partial.unformable_flanges == (1, 2)
    assert partial.needed_mpa == pytest.approx(75.8423 * 0.64 / 8.0, rel=1e-5)
    assert not any(w.code == "press-folds-part-way" for w in partial.warnings)  # the analysis names the flanges
    none = _check(flange_legs_mm=[2.0, 1.5])
    assert none.verdict == "insufficient" and none.formable_flanges == ()


def test_verdict_follows_force() -> None:
    # Leg 3 mm needs 75.84 x 0.64 / 18 = 2.697 MPa: the 11 in box needs > 210,000 N for it.
    need = flange_fold_pressure(3.0, 0.8, 11 * KSI)
    area = (11 * IN) ** 2
    assert _check(flange_legs_mm=[3.0], force_n=need * area * 0.999).verdict == "insufficient"
    assert _check(flange_legs_mm=[3.0], force_n=need * area * 1.001).verdict == "full"


def test_fits_box_with_clearance() -> None:
    # Default 25 mm each side (common practice, no source): 279.4 - 50 = 229.4 mm usable.
    assert _check(die_length_mm=229.4, die_width_mm=100.0).fits_box
    assert not _check(die_length_mm=229.5, die_width_mm=100.0).fits_box
    assert _check(box_w_mm=300.0, box_l_mm=150.0, die_length_mm=90.0, die_width_mm=240.0).fits_box  # turned
    assert _check(die_length_mm=229.5, die_width_mm=100.0, wall_clearance_mm=20.0).fits_box
    assert any("does not fit" in str(w) for w in _check(die_length_mm=229.5, die_width_mm=100.0).warnings)


def test_rubber_crush_and_life() -> None:
    # Rubber >= 1.5 x die height (from memory, unverified).
    assert _check(rubber_thickness_mm=30.0, die_height_mm=20.0).rubber_ok
    thin = _check(rubber_thickness_mm=29.9, die_height_mm=20.0)
    assert not thin.rubber_ok and any("rubber" in w for w in map(str, thin.warnings))
    # Early stroke: 177,929 N on 2,000 mm^2 = 89 MPa > 70 MPa.
    crush = _check(die_top_area_mm2=2_000.0)
    assert crush.die_contact_pressure_mpa == pytest.approx(40_000 * LBF / 2_000.0, rel=1e-14)
    assert not crush.die_crush_ok
    assert _check().die_crush_ok
    assert not _check(die_life_parts=12, parts_wanted=20).die_life_ok


def test_low_pressure_warning_and_models() -> None:
    ok = _check()
    assert not any("minimum" in w for w in map(str, ok.warnings))  # the reference press itself passes
    low = _check(force_n=20_000 * LBF)
    assert any("minimum" in w for w in map(str, low.warnings))
    for name in ("pressure_mpa", "die_contact_pressure_mpa", "needed_mpa", "fits_box", "rubber_ok", "die_crush_ok"):
        assert ok.model_of(name)
    assert "model of our own" in ok.model_of("needed_mpa")
    assert "local codes" in ok.caution


def test_durometer_advice() -> None:
    # Shore 40A-60A usual; harder is crisper but needs more pressure (common practice, no source).
    assert "usual" in durometer_advice(50.0)
    assert "harder" in durometer_advice(70.0) and "more pressure" in durometer_advice(70.0)
    assert "softer" in durometer_advice(30.0)


@pytest.mark.parametrize(
    "over",
    [
        {"force_n": 0.0},
        {"box_w_mm": -1.0},
        {"flange_legs_mm": []},
        {"thickness_mm": float("nan")},
        {"die_top_area_mm2": "big"},
    ],
    ids=["no-force", "neg-box", "no-flanges", "nan-thickness", "text-area"],
)
def test_bad_input_raises(over: dict[str, object]) -> None:
    with pytest.raises(FormingError):
        _check(**over)


def test_die_that_does_not_fit_the_box_is_insufficient():
    # common practice, no source: a die must sit in the box with clearance to every wall
    from diegen.forming.press import press_check

    check = press_check(177_929.0, 305.0, 254.0, 454.0, 120.0, 47_000.0, 25.4, [12.7], 0.635, 345.0, 63.5, 55.0,
                        100.0, 100)
    assert not check.fits_box
    assert check.verdict == "insufficient"
    assert any("does not fit" in w for w in map(str, check.warnings))
