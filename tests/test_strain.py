"""Contoured-flange edge strain.

Formulas (standard plan geometry of a 90 deg flange, derived): convex contour
(shrink) e = -w/(rho + w); concave (stretch) e = w/(rho - w).  The check
table is the derived one for rho / h = 2.0/0.5, 5.0/0.5, 1.0/0.5 (any unit).
The hole-flange example (2.0 in hole, 0.15 in flange -> 17.6 %) is derived
the same way.  1 in = 25.4 mm (NIST SP 811).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from diegen.errors import FormingError
from diegen.forming.strain import (
    flange_edge_strain,
    hole_flange_strain,
    pilot_diameter,
    strain_along,
)

IN = 25.4


@pytest.mark.parametrize(
    ("rho", "h", "shrink", "stretch"),
    [(2.0, 0.5, -0.200, 0.333), (5.0, 0.5, -0.0909, 0.111), (1.0, 0.5, -0.333, 1.000)],
    ids=["R2", "R5", "R1"],
)
def test_check_table(rho: float, h: float, shrink: float, stretch: float) -> None:
    assert flange_edge_strain(rho, h, convex=True) == pytest.approx(shrink, abs=5e-4)
    assert flange_edge_strain(rho, h, convex=False) == pytest.approx(stretch, abs=5e-4)
    # the formula is dimensionless: the same in mm
    assert flange_edge_strain(rho * IN, h * IN, convex=True) == pytest.approx(-h / (rho + h), rel=1e-14)


def test_stretch_at_or_inside_width_is_not_formable() -> None:
    # rho <= w: the free edge would have to come from a radius <= 0 (derived).
    assert flange_edge_strain(10.0, 10.0, convex=False) == math.inf
    assert flange_edge_strain(5.0, 10.0, convex=False) == math.inf
    assert flange_edge_strain(math.inf, 10.0, convex=True) == 0.0


def _circle(radius: float, n: int, ccw: bool = True) -> np.ndarray:
    th = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False)
    pts = np.column_stack((radius * np.cos(th), radius * np.sin(th)))
    return pts if ccw else pts[::-1]


@pytest.mark.parametrize("window", [None, 7.3, 25.0])
def test_circle_gives_shrink_formula_everywhere(window: float | None) -> None:
    # Convex circle rho = 100 mm, w = 10 mm: e = -w/(rho + w) at every sample.
    # A 2000-gon's perimeter is short of the circle's by (pi/N)^2/6 = 4e-7 relative: tol 2e-6.
    prof = strain_along(_circle(100.0, 2000), 10.0, closed=True, window=window)
    assert prof.strain == pytest.approx(np.full(prof.strain.shape, -10.0 / 110.0), rel=2e-6)
    assert prof.plan_radius_mm == pytest.approx(np.full(prof.strain.shape, 100.0), rel=2e-6)
    assert prof.length_mm == pytest.approx(2.0 * np.pi * 100.0, rel=2e-6)
    assert prof.formable.all()
    assert prof.max_shrink == pytest.approx(10.0 / 110.0, rel=2e-6)
    assert prof.max_stretch == 0.0


def test_circle_with_repeated_closing_point() -> None:
    pts = _circle(60.0, 500)
    prof = strain_along(np.vstack((pts, pts[:1])), 8.0, closed=True)
    assert prof.strain == pytest.approx(np.full(prof.strain.shape, -8.0 / 68.0), rel=1e-5)


def test_straight_edge_has_zero_strain() -> None:
    pts = np.column_stack((np.linspace(0.0, 300.0, 31), np.zeros(31)))
    prof = strain_along(pts, 12.0, closed=False)
    assert np.all(prof.strain == 0.0)
    assert np.all(np.isinf(prof.plan_radius_mm))
    assert prof.s_mm[-1] == pytest.approx(300.0)


def test_concave_arc_gives_stretch_formula() -> None:
    # An arc turning right (flange on its outside of travel = inside of the curve): stretch w/(rho - w).
    rho, w = 80.0, 10.0
    th = np.linspace(np.pi / 2.0, -np.pi / 2.0, 400)  # clockwise half circle
    pts = np.column_stack((rho * np.cos(th), rho * np.sin(th)))
    prof = strain_along(pts, w, closed=False)
    inner = (prof.s_mm > w) & (prof.s_mm < prof.length_mm - w)  # away from the window's clipped ends
    assert inner.sum() > 100
    assert prof.strain[inner] == pytest.approx(np.full(inner.sum(), w / (rho - w)), rel=2e-5)
    assert prof.curvature_per_mm[inner] == pytest.approx(np.full(inner.sum(), -1.0 / rho), rel=2e-5)


def test_tight_concave_arc_is_flagged_not_formable() -> None:
    th = np.linspace(np.pi / 2.0, -np.pi / 2.0, 200)
    pts = np.column_stack((5.0 * np.cos(th), 5.0 * np.sin(th)))
    prof = strain_along(pts, 10.0, closed=False, window=4.0)
    assert not prof.formable.all()
    assert np.isinf(prof.strain[~prof.formable]).all()
    assert prof.max_stretch == math.inf


def test_sharp_corner_turns_over_one_window() -> None:
    # Model of our own: a sharp plan corner turns its 90 deg over one window W, so at the corner
    # rho = W/(pi/2) and e = -w/(rho + w).
    rect = np.array([[0.0, 0.0], [400.0, 0.0], [400.0, 200.0], [0.0, 200.0]])
    prof = strain_along(rect, 10.0, closed=True)
    rho = 10.0 / (np.pi / 2.0)
    at_corner = np.isin(prof.s_mm, [0.0, 400.0, 600.0, 1000.0])
    assert at_corner.sum() == 4
    assert prof.strain[at_corner] == pytest.approx(np.full(4, -10.0 / (rho + 10.0)), rel=1e-12)
    mid = np.abs(prof.s_mm - 200.0) < 1e-9
    assert prof.strain[mid] == pytest.approx([0.0], abs=1e-15)


def test_clockwise_closed_outline_raises() -> None:
    with pytest.raises(FormingError, match="clockwise"):
        strain_along(_circle(50.0, 100, ccw=False), 5.0, closed=True)


@pytest.mark.parametrize(
    ("points", "width", "closed"),
    [(np.zeros((2, 2)), 5.0, False), (np.zeros((5, 3)), 5.0, True), (np.array([[0.0, 0.0], [1.0, 0.0]]), 0.0, False)],
    ids=["degenerate", "bad-shape", "zero-width"],
)
def test_bad_outline_raises(points: np.ndarray, width: float, closed: bool) -> None:
    with pytest.raises(FormingError):
        strain_along(points, width, closed)


def test_hole_flange_example() -> None:
    # Derived (a hole flange is a stretch flange on the hole radius): 2.0 in hole, 0.15 in flange
    # -> 0.15 / 0.85 = 17.6 %.
    assert hole_flange_strain(2.0 * IN, 0.15 * IN) == pytest.approx(0.15 / 0.85, rel=1e-12)
    assert hole_flange_strain(2.0 * IN, 0.15 * IN) == pytest.approx(0.176, abs=5e-4)
    with pytest.raises(FormingError):
        hole_flange_strain(10.0, 5.0)


def test_pilot_diameter_model() -> None:
    # Flat-pattern development (FAA-H-8083-31 ch. 4 formulas) of the hole flange, written out here:
    # tangent line at D/2 + T + R, developed width BA + (h - SB) inward of it.
    d, h, t, r, k = 2.0 * IN, 0.15 * IN, 0.032 * IN, 0.06 * IN, 0.45
    ba = math.pi / 2.0 * (r + k * t)
    expected_r = d / 2.0 + t + r - (ba + h - (r + t))
    assert pilot_diameter(d, h, t, r, k) == pytest.approx(2.0 * expected_r, rel=1e-12)
    # thin sheet and a sharp bend: back to the simple hole-radius-minus-height model
    assert pilot_diameter(d, h, 1e-9, 0.0, 0.5) == pytest.approx(d - 2.0 * h, rel=1e-8)
    assert pilot_diameter(d, h, t, r, k) < d
