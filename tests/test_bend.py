"""Bend allowance, setback and flange development against FAA-H-8083-31, ch. 4.

Check values: the handbook's worked U-channel (0.040 in 2024-T3 sheet, inside
radius 0.16 in, mold-line legs 1.00 / 2.00 / 1.00 in, two 90 deg bends).  The
setback and flats are the handbook's; the bend allowances and total developed
lengths are derived from its formulas (the handbook's own printed rounding was
not checked).  Computed in mm: 1 in = 25.4 mm exactly (NIST SP 811).
"""

from __future__ import annotations

import math

import pytest

from diegen.errors import FormingError
from diegen.forming.bend import (
    bend_allowance,
    bend_allowance_aviation,
    bend_deduction,
    flange_layout,
    setback,
    setback_factor,
)

IN = 25.4  # mm per inch, exact (NIST SP 811)
T = 0.040 * IN
R = 0.16 * IN
LEGS = (1.00 * IN, 2.00 * IN, 1.00 * IN)  # mold-line lengths


def test_u_channel_setback_and_flats() -> None:
    # FAA-H-8083-31 ch. 4, "Bending a U-channel": SB = K(R + T) = 1 x 0.2 in; flats 0.8 / 1.6 / 0.8 in.
    sb = setback(R, T, 90.0)
    assert sb / IN == pytest.approx(0.2, abs=1e-12)
    flats = (LEGS[0] - sb, LEGS[1] - 2.0 * sb, LEGS[2] - sb)
    assert [f / IN for f in flats] == pytest.approx([0.8, 1.6, 0.8], abs=1e-12)
    assert flange_layout(LEGS[0], R, T, 0.5).flat_leg_mm / IN == pytest.approx(0.8, abs=1e-12)


def test_u_channel_aviation_bend_allowance() -> None:
    # FAA-H-8083-31 ch. 4 formula BA = (0.01743 R + 0.0078 T) N; derived: BA 0.27907 in, TDL 3.7581 in.
    ba = bend_allowance_aviation(R, T, 90.0)
    assert ba / IN == pytest.approx(0.27907, abs=5e-6)
    tdl = 0.8 + 1.6 + 0.8 + 2.0 * ba / IN
    assert tdl == pytest.approx(3.7581, abs=5e-5)


def test_u_channel_k_half_bend_allowance() -> None:
    # FAA-H-8083-31 ch. 4, 90 deg form BA = 2 pi (R + T/2) / 4 (k = 0.5); derived: BA 0.28274, TDL 3.7655 in.
    ba = bend_allowance(R, T, 90.0, 0.5)
    assert ba / IN == pytest.approx(0.28274, abs=5e-6)
    assert ba == pytest.approx(2.0 * math.pi * (R + T / 2.0) / 4.0, rel=1e-14)
    assert 0.8 + 1.6 + 0.8 + 2.0 * ba / IN == pytest.approx(3.7655, abs=5e-5)


def test_u_channel_bend_deduction_gives_same_flat_pattern() -> None:
    # FAA-H-8083-31 ch. 4: flat pattern = sum of mold-line legs - one bend deduction per bend.
    bd = bend_deduction(R, T, 90.0, 0.5)
    assert (sum(LEGS) - 2.0 * bd) / IN == pytest.approx(3.7655, abs=5e-5)


@pytest.mark.parametrize(
    ("angle", "k_expected"),
    [(30, 0.26795), (45, 0.41421), (60, 0.57735), (90, 1.00000), (120, 1.73205), (135, 2.41421)],
    ids=str,
)
def test_setback_k_chart(angle: float, k_expected: float) -> None:
    # FAA-H-8083-31 ch. 4 K-chart; K = tan(angle/2) (derived, standard geometry).
    assert setback_factor(angle) == pytest.approx(k_expected, abs=5e-6)
    assert setback(R, T, angle) == pytest.approx(k_expected * (R + T), abs=5e-6 * (R + T))


@pytest.mark.parametrize("angle", [15.0, 45.0, 90.0, 135.0, 180.0])
@pytest.mark.parametrize(("r_in", "t_in"), [(0.0625, 0.032), (0.16, 0.040), (0.25, 0.063), (0.5, 0.125)])
def test_aviation_formula_is_k_factor_form_with_k_0447(angle: float, r_in: float, t_in: float) -> None:
    # Derived from FAA-H-8083-31's coefficients: 0.01743 ~ pi/180 and 0.0078/(pi/180) = 0.447.
    aviation = bend_allowance_aviation(r_in * IN, t_in * IN, angle)
    k_form = bend_allowance(r_in * IN, t_in * IN, angle, 0.447)
    assert aviation == pytest.approx(k_form, rel=2e-3)


def test_aviation_formula_is_unit_free() -> None:
    # The FAA formula is linear in R and T, so inches x 25.4 equal millimetres.
    in_inches = bend_allowance_aviation(0.16, 0.040, 90.0)
    assert in_inches * IN == pytest.approx(bend_allowance_aviation(R, T, 90.0), rel=1e-14)


def test_flange_layout_fields() -> None:
    # FAA-H-8083-31 ch. 4: developed width = BA + flat; the web tangent line lies R inside the die wall (90 deg).
    lay = flange_layout(LEGS[0], R, T, 0.5)
    assert lay.bend_allowance_mm / IN == pytest.approx(0.28274, abs=5e-6)
    assert lay.bend_allowance_aviation_mm / IN == pytest.approx(0.27907, abs=5e-6)
    assert lay.setback_mm / IN == pytest.approx(0.2, abs=1e-12)
    assert lay.developed_width_mm / IN == pytest.approx(0.28274 + 0.8, abs=5e-6)
    assert lay.blank_offset_mm / IN == pytest.approx(0.28274 + 0.8 - 0.16, abs=5e-6)


def test_flange_layout_undercut_uses_inner_setback() -> None:
    # Standard geometry: for a 95 deg bend the web tangent line is R tan(47.5 deg) inside the die outline.
    lay = flange_layout(12.0, 2.5, 0.8, 0.45, 95.0)
    assert lay.setback_mm == pytest.approx(math.tan(math.radians(47.5)) * 3.3, rel=1e-12)
    assert lay.blank_offset_mm == pytest.approx(lay.developed_width_mm - 2.5 * math.tan(math.radians(47.5)), rel=1e-12)


def test_flange_too_short_raises_with_numbers() -> None:
    with pytest.raises(FormingError, match=r"3\.000 mm.*setback is 3\.300 mm"):
        flange_layout(3.0, 2.5, 0.8, 0.5)


@pytest.mark.parametrize(
    "args",
    [
        (-1.0, 1.0, 90.0, 0.5),
        (1.0, 0.0, 90.0, 0.5),
        (1.0, 1.0, 0.0, 0.5),
        (1.0, 1.0, 181.0, 0.5),
        (1.0, 1.0, 90.0, 0.6),
    ],
    ids=["neg-radius", "zero-thickness", "zero-angle", "over-180", "k-above-half"],
)
def test_bad_input_raises_forming_error(args: tuple[float, float, float, float]) -> None:
    with pytest.raises(FormingError):
        bend_allowance(*args)
    with pytest.raises(ValueError):  # FormingError is also a ValueError
        bend_allowance(*args)
