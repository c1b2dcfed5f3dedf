"""Springback about the neutral surface, with strain hardening, and its correction from a trial part.

Check values from outside the project:

* Elastic–perfectly-plastic pure bending: ρi/ρf = 4X³ − 3X + 1, X = ρi·σy/(E·t), ρ the neutral-surface radius
  (Gardiner 1957, as given in Marciniak, Duncan & Hu, *Mechanics of Sheet Metal Forming*, 2002, ch. 6 — the
  attribution as commonly quoted).  The project's moment integral, with hardening off, must reproduce it.
* Power-law constants K and n of aluminium alloys: 2024-T4 K = 690 MPa, n = 0.16; 6061-T6 K = 410 MPa,
  n = 0.05; 6061-O K = 205 MPa, n = 0.20 (Kalpakjian & Schmid, *Manufacturing Engineering and Technology*,
  table of K and n at room temperature — from memory, unverified).  The fit through yield and ultimate must
  land near them.
* Typical properties (Kutz, *Handbook of Materials Selection*, Wiley 2002, Table 5, p. 101, for 2024; 6061 from
  memory, unverified); units per NIST SP 811.
"""

from __future__ import annotations

import pytest

from diegen.errors import FormingError
from diegen.forming.springback import (
    BendSheet,
    PowerLaw,
    Trial,
    die_for_part,
    die_from_trial,
    radius_ratio,
    springback_forward,
)

IN = 25.4  # mm per inch (NIST SP 811, exact)
KSI = 6.894757  # MPa per ksi (NIST SP 811)


@pytest.mark.parametrize("t, rho, sy, e", [(1.0, 10.0, 300.0, 70_000.0), (0.635, 2.5, 345.0, 73_000.0),
                                           (1.6, 4.0, 76.0, 73_000.0), (0.8, 30.0, 276.0, 68_900.0)])
def test_moment_integral_reproduces_the_closed_form(t: float, rho: float, sy: float, e: float) -> None:
    sheet = BendSheet(t, sy, e)
    x = rho * sheet.plane_yield_mpa / (sheet.plane_modulus_mpa * t)
    assert rho / sheet.released_radius(rho) == pytest.approx(radius_ratio(x), rel=1e-8)


@pytest.mark.parametrize("alloy, sy, su, k, n, k_tol, n_tol", [
    ("2024-T3 vs T4", 50 * KSI, 70 * KSI, 690.0, 0.16, 0.10, 0.06),
    ("6061-T6", 40 * KSI, 45 * KSI, 410.0, 0.05, 0.15, 0.02),
    ("6061-O", 8 * KSI, 18 * KSI, 205.0, 0.20, 0.20, 0.08),
])
def test_power_law_through_yield_and_ultimate(alloy: str, sy: float, su: float, k: float, n: float,
                                              k_tol: float, n_tol: float) -> None:
    fit = PowerLaw.through(sy, su)
    assert fit.k_mpa == pytest.approx(k, rel=k_tol), alloy
    assert fit.n == pytest.approx(n, abs=n_tol), alloy
    # the fit passes through both points it was made from (Considère: true uniform strain = n)
    assert fit.k_mpa * 0.002**fit.n == pytest.approx(sy, rel=1e-6)


def test_neutral_surface_springs_back_more_than_the_inside_radius_form() -> None:
    # Applying the closed form at the inside radius under-predicts springback: the neutral radius is larger.
    t, r, sy, e = 0.040 * IN, 0.16 * IN, 50 * KSI, 10_600 * KSI
    sheet = BendSheet(t, sy, e)
    _, angle_neutral = springback_forward(r, sheet, 90.0)
    x_inside = r * sheet.plane_yield_mpa / (sheet.plane_modulus_mpa * t)
    rf_inside = r / radius_ratio(x_inside)
    angle_inside = 90.0 * (r + t / 2) / (rf_inside + t / 2)
    assert angle_neutral < angle_inside


def test_hardening_raises_springback() -> None:
    # Hardening raises the outer fibres' stress, hence the moment, hence the springback.
    t, rf, sy, su, e = 0.025 * IN, 3 / 32 * IN, 50 * KSI, 70 * KSI, 10_600 * KSI
    plain = die_for_part(rf, BendSheet(t, sy, e))
    hard = die_for_part(rf, BendSheet(t, sy, e, PowerLaw.through(sy, su)))
    assert hard.overbend_deg > plain.overbend_deg > 0.0
    assert hard.die_radius_mm < plain.die_radius_mm < rf
    assert "hardening" in hard.model and "perfectly-plastic" in plain.model


@pytest.mark.parametrize("angle", [45.0, 90.0, 120.0])
@pytest.mark.parametrize("rf_mm", [0.8, 2.5, 6.0, 20.0])
def test_round_trip(rf_mm: float, angle: float) -> None:
    sheet = BendSheet(0.8, 324.0, 71_000.0, PowerLaw.through(324.0, 470.0))
    sb = die_for_part(rf_mm, sheet, angle)
    assert sb.die_radius_mm < rf_mm
    r, a = springback_forward(sb.die_radius_mm, sheet, sb.die_angle_deg)
    assert r == pytest.approx(rf_mm, rel=1e-9)
    assert a == pytest.approx(angle, rel=1e-9)


def test_harder_temper_springs_back_more() -> None:
    # Same t and R: 2024-T3 > 6061-T6 > 2024-O (Kutz Table 5, p. 101; 6061 from memory, unverified).
    t, rf = 0.040 * IN, 0.16 * IN
    t3 = die_for_part(rf, BendSheet(t, 50 * KSI, 10_600 * KSI, PowerLaw.through(50 * KSI, 70 * KSI))).overbend_deg
    t6 = die_for_part(rf, BendSheet(t, 40 * KSI, 10_000 * KSI, PowerLaw.through(40 * KSI, 45 * KSI))).overbend_deg
    o = die_for_part(rf, BendSheet(t, 11 * KSI, 10_600 * KSI, PowerLaw.through(11 * KSI, 27 * KSI))).overbend_deg
    assert t3 > t6 > o > 0.0


def test_trial_part_sets_the_die() -> None:
    # A part measured at 91 deg off a 94 deg die: Ks = 91/94, so a 90 deg part needs 90 / Ks = 92.97 deg.
    modelled = die_for_part(2.4, BendSheet(0.635, 345.0, 73_000.0))
    trial = die_from_trial(Trial(94.0, 91.0), modelled)
    assert trial.die_angle_deg == pytest.approx(90.0 * 94.0 / 91.0, rel=1e-12)
    assert trial.overbend_deg == pytest.approx(90.0 * 94.0 / 91.0 - 90.0, rel=1e-12)
    assert trial.die_radius_mm == modelled.die_radius_mm and "trial" in trial.model
    # with both radii measured: a 2.0 mm die gave a 2.5 mm part, so a 2.4 mm part wants a 1.92 mm die
    measured = die_from_trial(Trial(94.0, 91.0, 2.0, 2.5), modelled)
    assert measured.die_radius_mm == pytest.approx(2.4 * 2.0 / 2.5, rel=1e-12)


def test_elastic_bend_raises() -> None:
    # Outer fibre below yield: the part springs back flat (derived from the model).
    sheet = BendSheet(1.0, 300.0, 70_000.0)
    r_elastic = sheet.elastic_radius_mm - 0.5
    with pytest.raises(FormingError, match="stays elastic"):
        springback_forward(r_elastic + 0.01, sheet, 90.0)
    with pytest.raises(FormingError, match="elastic range"):
        die_for_part(r_elastic * 1.01, sheet, 90.0)
    springback_forward(r_elastic * 0.99, sheet, 90.0)  # just plastic: allowed


@pytest.mark.parametrize(
    "radius, sheet, angle",
    [
        (0.0, BendSheet(1.0, 300.0, 70_000.0), 90.0),
        (2.0, BendSheet(-1.0, 300.0, 70_000.0), 90.0),
        (2.0, BendSheet(1.0, 0.0, 70_000.0), 90.0),
        (2.0, BendSheet(1.0, 300.0, 200.0), 90.0),
        (2.0, BendSheet(1.0, 300.0, 70_000.0), 0.0),
    ],
    ids=["zero-radius", "neg-thickness", "zero-yield", "E-below-yield", "zero-angle"],
)
def test_bad_input_raises(radius: float, sheet: BendSheet, angle: float) -> None:
    with pytest.raises(FormingError):
        die_for_part(radius, sheet, angle)
    with pytest.raises(FormingError):
        springback_forward(radius, sheet, angle)
