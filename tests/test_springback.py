"""Springback of an elastic--perfectly-plastic sheet and the compensating die.

Method: Ri/Rf = 4X^3 - 3X + 1, X = Ri*Sy/(E*t) (Gardiner 1957, as given in
Marciniak, Duncan & Hu and in Kalpakjian -- attributions as commonly quoted,
not checked against the originals) with a neutral line of constant length at
mid-thickness.  No published numeric example was found: the check table below
is derived from the formula with Aluminum Association typical properties
(Kutz, *Handbook of Materials Selection*, Wiley 2002, Table 5 "Typical
Mechanical Properties of Wrought Aluminum Alloys", p. 101, for the 2024 and
3003 tempers; the 5052-H32 and 6061-T6 values are the same Association's
typical values from memory, unverified), bend through 90 deg.  Units
converted with 1 in = 25.4 mm and 1 ksi = 6.894757 MPa (NIST SP 811).
"""

from __future__ import annotations

import pytest

from diegen.errors import FormingError
from diegen.forming.springback import die_for_part, radius_ratio, springback_forward

IN = 25.4  # mm per inch (NIST SP 811, exact)
KSI = 6.894757  # MPa per ksi (NIST SP 811)

# (id, t in, Ri in, Sy ksi, E ksi, X, Ri/Rf, Rf in, part angle deg) -- derived from the formula above.
TABLE = [
    ("2024-T3 .040", 0.040, 0.16, 50, 10_600, 0.018868, 0.943423, 0.16960, 85.445),
    ("2024-T3 .063", 0.063, 0.25, 50, 10_600, 0.018718, 0.943872, 0.26487, 85.485),
    ("6061-T6 .063", 0.063, 0.25, 40, 10_000, 0.015873, 0.952397, 0.26250, 86.175),
    ("5052-H32 .040", 0.040, 0.125, 28, 10_200, 0.008578, 0.974267, 0.12830, 87.996),
    ("3003-H14 .032", 0.032, 0.0625, 21, 10_000, 0.004102, 0.987696, 0.06328, 89.116),
    ("2024-O .032", 0.032, 0.0625, 11, 10_600, 0.002027, 0.993920, 0.06288, 89.564),
]
COLUMNS = ("t", "ri", "sy", "e", "x", "ratio", "rf", "af")
ROWS = [r[1:] for r in TABLE]
IDS = [r[0] for r in TABLE]


@pytest.mark.parametrize(COLUMNS, ROWS, ids=IDS)
def test_forward_matches_derived_table(
    t: float, ri: float, sy: float, e: float, x: float, ratio: float, rf: float, af: float
) -> None:
    assert radius_ratio(x) == pytest.approx(ratio, abs=2e-6)
    part_r, part_a = springback_forward(ri * IN, t * IN, sy * KSI, e * KSI, 90.0)
    assert part_r / IN == pytest.approx(rf, abs=6e-6)
    assert part_a == pytest.approx(af, abs=6e-4)


@pytest.mark.parametrize(COLUMNS, ROWS, ids=IDS)
def test_die_for_part_inverts_the_table(
    t: float, ri: float, sy: float, e: float, x: float, ratio: float, rf: float, af: float
) -> None:
    # Same derived table, read backwards: the part (Rf, af) needs the die (Ri, 90 deg).
    part_r, part_a = springback_forward(ri * IN, t * IN, sy * KSI, e * KSI, 90.0)
    sb = die_for_part(part_r, t * IN, sy * KSI, e * KSI, part_a)
    assert sb.die_radius_mm == pytest.approx(ri * IN, rel=1e-10)
    assert sb.die_angle_deg == pytest.approx(90.0, rel=1e-10)
    assert sb.x_ratio == pytest.approx(x, abs=1e-6)
    assert sb.overbend_deg == pytest.approx(90.0 - af, abs=6e-4)


def test_first_row_overbend() -> None:
    # Derived table: 2024-T3 .040 at Ri .16 bends back 4.555 deg from 90 deg.
    part_r, part_a = springback_forward(0.16 * IN, 0.040 * IN, 50 * KSI, 10_600 * KSI, 90.0)
    assert 90.0 - part_a == pytest.approx(4.555, abs=6e-4)


@pytest.mark.parametrize("angle", [45.0, 90.0, 120.0])
@pytest.mark.parametrize("rf_mm", [0.8, 2.5, 6.0, 20.0])
def test_round_trip(rf_mm: float, angle: float) -> None:
    # forward(inverse(part)) == part, to solver precision.
    sb = die_for_part(rf_mm, 0.8, 324.0, 71_000.0, angle)
    assert sb.die_radius_mm < rf_mm
    r, a = springback_forward(sb.die_radius_mm, 0.8, 324.0, 71_000.0, sb.die_angle_deg)
    assert r == pytest.approx(rf_mm, rel=1e-10)
    assert a == pytest.approx(angle, rel=1e-10)


def test_stiff_sheet_has_no_springback() -> None:
    # X -> 0 (E >> Sy): Ri/Rf -> 1, so no over-bend is needed.
    sb = die_for_part(3.0, 1.0, 100.0, 1e12, 90.0)
    assert sb.x_ratio < 1e-9
    assert sb.die_radius_mm == pytest.approx(3.0, rel=1e-8)
    assert sb.overbend_deg == pytest.approx(0.0, abs=1e-6)


def test_harder_temper_springs_back_more() -> None:
    # Same t and R: the higher Sy/E, the larger X and the over-bend (2024-T3 > 6061-T6 > 2024-O),
    # Aluminum Association typical properties (Kutz, Table 5, p. 101; 6061-T6 from memory, unverified).
    t, rf = 0.040 * IN, 0.16 * IN
    t3 = die_for_part(rf, t, 50 * KSI, 10_600 * KSI).overbend_deg
    t6 = die_for_part(rf, t, 40 * KSI, 10_000 * KSI).overbend_deg
    o = die_for_part(rf, t, 11 * KSI, 10_600 * KSI).overbend_deg
    assert t3 > t6 > o > 0.0


def test_elastic_bend_raises() -> None:
    # X >= 0.5: the outer fibre never yields and the part springs back flat (derived from the model).
    t, sy, e = 1.0, 300.0, 70_000.0
    r_elastic = 0.5 * e * t / sy
    with pytest.raises(FormingError, match="stays elastic"):
        springback_forward(r_elastic, t, sy, e, 90.0)
    with pytest.raises(FormingError, match="elastic range"):
        die_for_part(r_elastic * 1.01, t, sy, e, 90.0)
    springback_forward(r_elastic * 0.99, t, sy, e, 90.0)  # just plastic: allowed


@pytest.mark.parametrize(
    "args",
    [
        (0.0, 1.0, 300.0, 70_000.0, 90.0),
        (2.0, -1.0, 300.0, 70_000.0, 90.0),
        (2.0, 1.0, 0.0, 70_000.0, 90.0),
        (2.0, 1.0, 300.0, 200.0, 90.0),
        (2.0, 1.0, 300.0, 70_000.0, 0.0),
    ],
    ids=["zero-radius", "neg-thickness", "zero-yield", "E-below-yield", "zero-angle"],
)
def test_bad_input_raises(args: tuple[float, float, float, float, float]) -> None:
    with pytest.raises(FormingError):
        die_for_part(*args)
    with pytest.raises(FormingError):
        springback_forward(*args)
