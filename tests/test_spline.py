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


@pytest.mark.parametrize("n", [2, 3, 4, 7, 60])
def test_derivatives_match_scipy(n):
    # scipy's make_interp_spline of degree min(3, n − 1), not-a-knot ends (registry reference library)
    from scipy.interpolate import make_interp_spline

    from diegen.geometry.section import Cubic

    rng = np.random.default_rng(n)
    x = np.concatenate([[0.0], np.sort(rng.random(n - 1)) * 10.0 + 0.1])
    y = np.column_stack([np.sin(x), np.cos(2 * x)])
    at = np.linspace(-0.2, x[-1] + 0.2, 2001)  # a little beyond the ends too: both extrapolate the end pieces
    k = min(3, n - 1)
    reference = make_interp_spline(x, y, k=k)
    spline = Cubic(x, y)
    for nu in range(min(k, 2) + 1):
        expected = reference.derivative(nu)(at)
        assert np.abs(spline(at, nu) - expected).max() < 1e-9 * (1.0 + np.abs(expected).max())  # rounding only


def test_periodic_matches_scipy():
    # scipy's periodic cubic (bc_type="periodic", registry reference library), evaluated past both ends
    from scipy.interpolate import make_interp_spline

    from diegen.geometry.section import Cubic

    rng = np.random.default_rng(7)
    t = np.linspace(0.0, 2 * np.pi, 50)
    t[1:-1] += rng.random(48) * 0.05
    y = np.column_stack([np.cos(t), np.sin(2 * t)])
    y[-1] = y[0]
    reference = make_interp_spline(t, y, k=3, bc_type="periodic")
    spline = Cubic(t, y, periodic=True)
    at = np.linspace(-1.0, 8.0, 3001)
    for nu in range(3):
        assert np.abs(spline(at, nu) - reference.derivative(nu)(at)).max() < 1e-10
