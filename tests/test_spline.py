"""The section layer's own not-a-knot cubic spline against scipy's CubicSpline (registry reference library)."""

import numpy as np
import pytest
from scipy.interpolate import CubicSpline

from diegen.geometry.section import cubic_spline


@pytest.mark.parametrize("seed", range(5))
def test_matches_scipy_not_a_knot(seed):
    rng = np.random.default_rng(seed)
    x = np.sort(rng.random(40 + 20 * seed)) * 10.0
    y = np.column_stack([np.sin(x), np.cos(2 * x), x**3 / 100])
    at = np.linspace(x[0], x[-1], 3001)
    assert np.abs(cubic_spline(x, y)(at) - CubicSpline(x, y, axis=0, bc_type="not-a-knot")(at)).max() < 1e-12


def test_reproduces_a_cubic_exactly():
    # not-a-knot end conditions make the spline exact for any cubic (de Boor, A Practical Guide to Splines, ch. IV)
    x = np.array([0.0, 0.3, 1.1, 1.7, 2.9, 4.0])
    y = (2 * x**3 - x**2 + 0.5 * x - 3)[:, None]
    at = np.linspace(0, 4, 101)
    assert cubic_spline(x, y)(at)[:, 0] == pytest.approx(2 * at**3 - at**2 + 0.5 * at - 3, abs=1e-12)
