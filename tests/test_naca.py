"""NACA 4- and 5-digit sections against published ordinates and an independent generator.

Sources named beside each check:
* PDAS: the Public Domain Aeronautical Software recomputation of the tables of
  Abbott & von Doenhoff, *Theory of Wing Sections*, Appendices I and III
  (docs "profiles" and "sections45"); values in percent of chord.
* NACA Report 824 / *Theory of Wing Sections* ch. 6 for the equations and the
  leading-edge radius rt = 1.1019 t^2.
* aerosandbox (PyPI), an independent open aerodynamics library: its NACA
  4-digit generator and its bundled coordinate files (NACA 230xx).
* Thin-aerofoil theory (*Theory of Wing Sections*, ch. 4) for the 5-digit mean
  lines' design lift and pitching moment.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
import shapely
from scipy.integrate import quad

from diegen.errors import AirfoilError
from diegen.geometry.loops import signed_area
from diegen.geometry.naca import (
    cosine_stations,
    leading_edge_radius,
    naca4_camber,
    naca4_thickness,
    naca5_camber,
    naca_section,
    naca_surfaces,
    parse_designation,
)

# PDAS table values are printed to 4 decimals of percent chord.
PDAS_TOL_PERCENT = 0.6e-4


# --- thickness form -------------------------------------------------------------


@pytest.mark.parametrize(
    ("x", "yt_percent"),
    [  # PDAS recomputation of Theory of Wing Sections App. I, NACA 0012, yt in % c.
        (0.0125, 1.8939),
        (0.025, 2.6147),
        (0.05, 3.5547),
        (0.10, 4.6828),
        (0.20, 5.7375),
        (0.30, 6.0017),
        (0.40, 5.8030),
        (0.50, 5.2940),
        (0.60, 4.5634),
        (0.80, 2.6231),
        (0.90, 1.4477),
        (0.95, 0.8066),
        (1.00, 0.1260),
    ],
)
def test_naca0012_thickness_matches_pdas_table(x: float, yt_percent: float) -> None:
    assert naca4_thickness(x, 0.12) * 100.0 == pytest.approx(yt_percent, abs=PDAS_TOL_PERCENT)


def test_closed_trailing_edge_variant() -> None:
    # Closed-TE modification (-0.1036 last coefficient; common practice, not Report 824):
    # the other four coefficients sum to 0.1036, so yt(1) = 0; at x = 0.3 it gives
    # 6.0007 % c for t = 0.12 (derived from the equation).
    assert naca4_thickness(1.0, 0.12, closed_te=True) == pytest.approx(0.0, abs=1e-15)
    assert naca4_thickness(0.3, 0.12, closed_te=True) * 100.0 == pytest.approx(6.0007, abs=PDAS_TOL_PERCENT)
    # Report 824 open TE: 5 t * 0.0021 = 0.126 % c for t = 0.12.
    assert naca4_thickness(1.0, 0.12) == pytest.approx(0.00126, abs=1e-12)


# --- 4-digit cambered sections ----------------------------------------------------


@pytest.mark.parametrize(
    ("x", "upper", "lower"),
    [  # PDAS recomputation of Theory of Wing Sections App. III, NACA 2412, % c.
        (0.30, (29.8500, 7.8749), (30.1500, -4.1249)),
        (0.40, (40.0000, 7.8030), (40.0000, -3.8030)),
        (1.00, (100.0084, 0.1257), (99.9916, -0.1257)),
    ],
)
def test_naca2412_surface_points_match_pdas_table(
    x: float, upper: tuple[float, float], lower: tuple[float, float]
) -> None:
    u, lo = naca_surfaces(parse_designation("2412"), [x], [x])
    assert u[0] * 100.0 == pytest.approx(upper, abs=PDAS_TOL_PERCENT)
    assert lo[0] * 100.0 == pytest.approx(lower, abs=PDAS_TOL_PERCENT)


def test_naca4_mean_line_values() -> None:
    # Report 824 mean line: yc(p) = m, slope 0 at p, yc(0) = yc(1) = 0.
    yc, slope = naca4_camber([0.0, 0.4, 1.0], 0.02, 0.4)
    assert yc == pytest.approx([0.0, 0.02, 0.0], abs=1e-15)
    assert slope[1] == pytest.approx(0.0, abs=1e-15)
    assert slope[0] == pytest.approx(2 * 0.02 / 0.4, rel=1e-12)  # dyc/dx(0) = 2m/p
    yc0, s0 = naca4_camber(np.linspace(0, 1, 5), 0.0, 0.0)
    assert np.all(yc0 == 0.0) and np.all(s0 == 0.0)


# --- leading-edge radius ------------------------------------------------------------


def test_leading_edge_radius_formula() -> None:
    # PDAS NACA 0012 "L.E. radius = 1.587 percent chord"; 0010 -> 1.102, 0015 -> 2.479
    # (rt = 1.1019 t^2, Theory of Wing Sections ch. 6).
    assert leading_edge_radius(0.12) * 100 == pytest.approx(1.587, abs=5e-4)
    assert leading_edge_radius(0.10) * 100 == pytest.approx(1.102, abs=5e-4)
    assert leading_edge_radius(0.15) * 100 == pytest.approx(2.479, abs=5e-4)


@pytest.mark.parametrize("t", [0.06, 0.12, 0.21])
def test_leading_edge_radius_from_the_outline(t: float) -> None:
    # Geometric check of rt = 1.1019 t^2 (Theory of Wing Sections ch. 6): the circle
    # through the LE and its two neighbours on a very dense outline, and a
    # least-squares circle through the nose points, both give the radius.
    loop = naca_section(f"00{round(t * 100):02d}", n_points=40001)
    i = len(loop) // 2
    (x1, y1), (x0, y0) = loop[i - 1], loop[i]
    assert (x0, y0) == (0.0, 0.0)
    circum = (x1**2 + y1**2) / (2 * x1)  # centre (c, 0) equidistant from LE and (x1, +-y1)
    assert circum == pytest.approx(1.1019 * t * t, rel=2e-3)
    nose = loop[np.abs(loop[:, 0]) < 2e-7]
    a = np.column_stack((2 * nose[:, 0], 2 * nose[:, 1], np.ones(len(nose))))
    cx, cy, c = np.linalg.lstsq(a, (nose**2).sum(axis=1), rcond=None)[0]
    assert np.sqrt(c + cx**2 + cy**2) == pytest.approx(1.1019 * t * t, rel=2e-3)


# --- comparison with an independent generator -----------------------------------------


def _split_at_le(coords: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Split a TE->upper->LE->lower->TE list at its minimum-x point; both LE->TE."""
    i = int(np.argmin(coords[:, 0]))
    return coords[: i + 1][::-1], coords[i:]


def _y_on_surface(surface: np.ndarray, x: np.ndarray) -> np.ndarray:
    """y at x on a dense LE->TE surface, from its min-x point on (single-valued there)."""
    s = surface[int(np.argmin(surface[:, 0])) :]
    return np.interp(x, s[:, 0], s[:, 1])


@pytest.mark.parametrize(
    ("designation", "source"),
    [  # aerosandbox 4-digit generator (open TE, 0.1015); for 5-digit sections
        # aerosandbox has no generator and loads its bundled coordinate file.
        ("2412", "generator"),
        ("0012", "generator"),
        ("4415", "generator"),
        ("23012", "database file"),
        ("23024", "database file"),
        pytest.param(
            "23015",
            "database file",
            marks=pytest.mark.xfail(
                strict=True,
                reason="aerosandbox's bundled naca23015.dat (made by a third-party program, thickness laid off "
                "vertically) carries a mean line about 0.68 x the Report 824 230 line; its 23012 and 23024 "
                "files agree with ours to 3e-5 c and the 230 line gives the design CL 0.3 (test below)",
            ),
        ),
    ],
)
def test_matches_aerosandbox(designation: str, source: str) -> None:
    asb = pytest.importorskip("aerosandbox")
    theirs = np.asarray(asb.Airfoil(f"naca{designation}").coordinates, dtype=float)
    params = parse_designation(designation)
    stations = cosine_stations(8001)
    ours_u, ours_l = naca_surfaces(params, stations, stations, closed_te=False)
    # 1e-4 c for all; the 5-digit file is printed to 5 decimals and PDAS notes a
    # 0.001 % c camber spread between tabulations, so >= 2e-5 c is the floor.
    tol = 1e-4
    th_u, th_l = _split_at_le(theirs)
    worst = 0.0
    for th, ours in ((th_u, ours_u), (th_l, ours_l)):
        keep = th[:, 0] >= 0.002  # single-valued part of each surface
        if source == "database file":
            # The 23024 file sets its end points to (1, 0), closing the TE by fiat,
            # while its other points follow the open Report 824 form: compare those.
            keep &= th[:, 0] <= 0.99
        dy = np.abs(_y_on_surface(ours, th[keep, 0]) - th[keep, 1])
        worst = max(worst, float(dy.max()))
    assert worst <= tol, f"{designation} ({source}): max |dy| = {worst:.2e} c"
    ring = shapely.LinearRing(np.vstack((ours_u[::-1], ours_l[1:])))
    distance = max(ring.distance(shapely.Point(p)) for p in theirs)  # whole outline, nose included
    assert distance <= tol


# --- 5-digit mean lines vs thin-aerofoil theory -------------------------------------------


def _fourier(mean_line: str, n: int) -> float:
    """A_n = (2/pi) * integral_0^pi dyc/dx cos(n theta) dtheta, x = (1 - cos theta)/2."""

    def integrand(theta: float) -> float:
        return float(naca5_camber((1.0 - np.cos(theta)) / 2.0, mean_line)[1]) * np.cos(n * theta)

    breaks = np.linspace(0.0, np.pi, 9)
    return 2.0 / np.pi * sum(quad(integrand, a, b, limit=200)[0] for a, b in itertools.pairwise(breaks))


@pytest.mark.parametrize(
    ("mean_line", "p"),
    [("210", 0.05), ("220", 0.10), ("230", 0.15), ("240", 0.20), ("250", 0.25),
     ("221", 0.10), ("231", 0.15), ("241", 0.20), ("251", 0.25)],
)  # fmt: skip
def test_five_digit_mean_lines_thin_aerofoil_theory(mean_line: str, p: float) -> None:
    # Report 824 designation: design CL = 0.15 * first digit = 0.3, maximum camber
    # at p = second digit / 20.  Thin-aerofoil theory (Theory of Wing Sections ch. 4):
    # ideal lift CL_i = pi * A1, moment about c/4 = pi/4 (A2 - A1).
    yc, slope = naca5_camber([0.0, p, 1.0], mean_line)
    assert yc[0] == pytest.approx(0.0, abs=1e-12) and yc[2] == pytest.approx(0.0, abs=1e-12)
    assert slope[1] == pytest.approx(0.0, abs=3e-4)  # tabulated constants are rounded
    a1, a2 = _fourier(mean_line, 1), _fourier(mean_line, 2)
    assert np.pi * a1 == pytest.approx(0.3, abs=0.01)
    cm = np.pi / 4.0 * (a2 - a1)
    if mean_line.endswith("1"):  # reflexed lines are designed for zero moment
        assert abs(cm) < 0.002
    else:
        assert cm < -0.003


def test_five_digit_design_lift_digit_scales_camber() -> None:
    # Thin-aerofoil theory: ideal lift is linear in the mean-line ordinates, so the
    # 430 line (design CL 0.6, Report 824 designation) is twice the 230 line.
    x = np.linspace(0.0, 1.0, 11)
    assert naca5_camber(x, "430")[0] == pytest.approx(2.0 * naca5_camber(x, "230")[0], rel=1e-12)


# --- designations and the loop convention --------------------------------------------------


@pytest.mark.parametrize("text", ["2412", "naca 2412", "NACA2412", " NACA-2412 ", "naca_2412"])
def test_designation_spellings(text: str) -> None:
    assert np.array_equal(naca_section(text), naca_section("2412"))


@pytest.mark.parametrize(
    "bad", ["", "12", "abcd", "241", "123456", "2400", "2012", "03012", "26012", "21112", "23212", "NACA 24x2"]
)
def test_bad_designations_raise_airfoil_error(bad: str) -> None:
    with pytest.raises(AirfoilError, match=r"NACA|mean line"):
        naca_section(bad)


@pytest.mark.parametrize("bad", [0, 9, 2.5, True])
def test_bad_point_counts(bad: object) -> None:
    with pytest.raises(AirfoilError, match="n_points"):
        naca_section("0012", n_points=bad)  # type: ignore[arg-type]


@pytest.mark.parametrize("designation", ["0012", "2412", "23012", "23112", "4415"])
@pytest.mark.parametrize("n_points", [10, 11, 160, 161, 1000])
@pytest.mark.parametrize("closed_te", [False, True])
def test_section_follows_loop_convention(designation: str, n_points: int, closed_te: bool) -> None:
    loop = naca_section(designation, n_points=n_points, closed_te=closed_te)
    assert loop.shape == (n_points, 2)
    assert len(np.unique(loop, axis=0)) == n_points  # no repeated point
    assert signed_area(loop) > 0.0  # counter-clockwise
    assert shapely.LinearRing(loop).is_simple
    le = np.nonzero((loop == 0.0).all(axis=1))[0]
    assert len(le) == 1
    if closed_te:
        assert tuple(loop[0]) == (1.0, 0.0)
    else:
        # Upper TE first, lower TE last; their midpoint is (1, 0) (Report 824 layoff).
        assert loop[0, 1] > loop[-1, 1]
        assert (loop[0] + loop[-1]) / 2 == pytest.approx((1.0, 0.0), abs=1e-12)
    # Points before the LE are on the upper surface (above the mean line).
    params = parse_designation(designation)
    yc = params.camber(loop[:, 0].clip(0, 1))[0]
    assert np.all(loop[1 : le[0], 1] > yc[1 : le[0]] - 1e-9)
