"""NACA 4-digit and 5-digit wing sections from their defining equations.

Sources:

* Abbott, von Doenhoff and Stivers, *Summary of Airfoil Data*, NACA Report 824
  (1945), and Abbott & von Doenhoff, *Theory of Wing Sections* (1959), ch. 6
  (families of wing sections) and Appendices I-II: thickness distribution, mean
  lines, designation digits and the way the surfaces are laid off perpendicular
  to the mean line.
* Ladson, Brooks, Hill and Sproles, *Computer Program To Obtain Ordinates for
  NACA Airfoils*, NASA TM 4741 (1996): the constants (m, k1) of the standard
  5-digit mean lines, as tabulated for a design lift coefficient of 0.3.

All lengths are fractions of the chord (chord = 1).  The section is returned in
the NACA frame: the chord line runs from the nominal leading edge (the origin of
the mean line, at (0, 0)) to x = 1.  For a cambered section the true minimum-x
point of the outline lies a few 1e-4 chord ahead of that origin, because the
surface is laid off perpendicular to the sloping mean line;
:func:`diegen.geometry.section.normalise` re-frames such an outline on its
geometric leading edge if that is wanted.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from diegen.errors import AirfoilError
from diegen.geometry.loops import FloatArray
from diegen.geometry.section import MIN_POINTS

__all__ = [
    "NacaParameters",
    "cosine_stations",
    "leading_edge_radius",
    "naca4_camber",
    "naca4_thickness",
    "naca5_camber",
    "naca_section",
    "naca_surfaces",
    "parse_designation",
]

# Thickness-distribution coefficients, NACA Report 824 / Theory of Wing Sections
# ch. 6: yt = 5 t (0.29690 sqrt(x) - 0.12600 x - 0.35160 x^2 + 0.28430 x^3 - 0.10150 x^4).
_A0, _A1, _A2, _A3, _A4 = 0.2969, -0.1260, -0.3516, 0.2843, -0.1015
# Closed trailing edge: the last coefficient becomes -0.1036, because the first
# four sum to exactly 0.1036 so that yt(1) = 0.  This is a common modification,
# not part of Report 824.
_A4_CLOSED = -0.1036

# Leading-edge radius of the 4-digit thickness form, Theory of Wing Sections
# ch. 6: rt = 1.1019 t^2 (it equals (5 * 0.2969)^2 / 2, the limit of y^2 / 2x at the nose).
_LE_RADIUS_FACTOR = 1.1019



@dataclass(frozen=True)
class _MeanLine5:
    """Constants of one 5-digit mean line at design lift coefficient 0.3."""

    m: float  # chordwise end of the cubic part (fraction of chord)
    k1: float
    k2_over_k1: float | None = None  # reflexed lines only


# Standard (non-reflexed) 5-digit mean lines, design CL = 0.3: NASA TM 4741,
# after Theory of Wing Sections ch. 6 (p = position of maximum camber).
_STANDARD_MEAN_LINES: dict[int, _MeanLine5] = {
    1: _MeanLine5(m=0.0580, k1=361.400),  # 210, p = 0.05
    2: _MeanLine5(m=0.1260, k1=51.640),  # 220, p = 0.10
    3: _MeanLine5(m=0.2025, k1=15.957),  # 230, p = 0.15
    4: _MeanLine5(m=0.2900, k1=6.643),  # 240, p = 0.20
    5: _MeanLine5(m=0.3910, k1=3.230),  # 250, p = 0.25
}

# Reflexed 5-digit mean lines (third digit 1), design CL = 0.3, in the NASA TM
# 4741 form.  Values from memory, unverified against the printed table; the tests
# check them against thin-aerofoil theory (zero slope at p, zero pitching moment
# about the quarter chord, ideal lift coefficient 0.3).
_REFLEXED_MEAN_LINES: dict[int, _MeanLine5] = {
    2: _MeanLine5(m=0.1300, k1=51.990, k2_over_k1=0.000764),  # 221
    3: _MeanLine5(m=0.2170, k1=15.793, k2_over_k1=0.00677),  # 231
    4: _MeanLine5(m=0.3180, k1=6.520, k2_over_k1=0.0303),  # 241
    5: _MeanLine5(m=0.4410, k1=3.191, k2_over_k1=0.1355),  # 251
}


def _as_array(x: ArrayLike) -> FloatArray:
    return np.asarray(x, dtype=float)


def naca4_thickness(x: ArrayLike, t: float, closed_te: bool = False) -> FloatArray:
    """Half-thickness yt of the NACA 4-digit thickness form (Report 824).

    ``x`` is the chord fraction (0..1), ``t`` the maximum thickness as a fraction
    of chord.  With ``closed_te`` the last coefficient is -0.1036 instead of
    -0.1015 so that yt(1) = 0 (a common modification, not Report 824).
    Returns yt as a fraction of chord.
    """
    xa = np.clip(_as_array(x), 0.0, None)
    a4 = _A4_CLOSED if closed_te else _A4
    return 5.0 * t * (_A0 * np.sqrt(xa) + xa * (_A1 + xa * (_A2 + xa * (_A3 + xa * a4))))


def naca4_camber(x: ArrayLike, m: float, p: float) -> tuple[FloatArray, FloatArray]:
    """NACA 4-digit mean line (Report 824): ordinate yc and slope dyc/dx.

    ``m`` is the maximum camber and ``p`` its chordwise position, both fractions
    of chord.  Ahead of p: yc = m/p^2 (2 p x - x^2); behind: yc = m/(1-p)^2
    ((1 - 2p) + 2 p x - x^2).  A zero ``m`` gives the symmetric (flat) line.
    """
    xa = _as_array(x)
    if m == 0.0:
        return np.zeros_like(xa), np.zeros_like(xa)
    if not 0.0 < p < 1.0:
        raise AirfoilError(f"NACA 4-digit camber position p = {p} must lie strictly between 0 and 1")
    front = xa < p
    aft = m / (1.0 - p) ** 2 * ((1.0 - 2.0 * p) + 2.0 * p * xa - xa**2)
    yc = np.where(front, m / p**2 * (2.0 * p * xa - xa**2), aft)
    slope = np.where(front, 2.0 * m / p**2 * (p - xa), 2.0 * m / (1.0 - p) ** 2 * (p - xa))
    return yc, slope


def _mean_line_5(mean_line: str | int) -> tuple[_MeanLine5, float]:
    """Look up a 3-digit 5-digit-series mean-line code; return its constants and CL scale."""
    code = str(mean_line).strip()
    if not re.fullmatch(r"\d{3}", code):
        raise AirfoilError(f"5-digit mean line {mean_line!r} must be three digits such as '230' or '231'")
    lift_digit, pos_digit, reflex_digit = (int(c) for c in code)
    if lift_digit == 0:
        raise AirfoilError(f"5-digit mean line {code}: the first digit (design lift coefficient x 20/3) must not be 0")
    table = {0: _STANDARD_MEAN_LINES, 1: _REFLEXED_MEAN_LINES}.get(reflex_digit)
    if table is None:
        raise AirfoilError(f"5-digit mean line {code}: the third digit must be 0 (standard) or 1 (reflexed)")
    constants = table.get(pos_digit)
    if constants is None:
        valid = ", ".join(f"{lift_digit}{k}{reflex_digit}" for k in sorted(table))
        raise AirfoilError(f"5-digit mean line {code} is not tabulated; available: {valid}")
    # The tabulated constants are for design CL = 0.3 (first digit 2).  Thin-aerofoil
    # theory makes the ideal lift linear in the mean-line ordinates, so another first
    # digit (design CL = 0.15 x digit, Report 824) scales the ordinates by digit / 2.
    return constants, lift_digit / 2.0


def naca5_camber(x: ArrayLike, mean_line: str | int) -> tuple[FloatArray, FloatArray]:
    """NACA 5-digit mean line: ordinate yc and slope dyc/dx (fractions of chord).

    ``mean_line`` is the first three digits of the designation: "210" .. "250"
    (standard, Theory of Wing Sections ch. 6 / NASA TM 4741) or "221" .. "251"
    (reflexed).  Standard: yc = k1/6 (x^3 - 3 m x^2 + m^2 (3 - m) x) ahead of m and
    k1 m^3 / 6 (1 - x) behind.
    """
    xa = _as_array(x)
    c, scale = _mean_line_5(mean_line)
    m, k1 = c.m, c.k1 * scale
    front = xa < m
    if c.k2_over_k1 is None:
        yc = np.where(front, k1 / 6.0 * (xa**3 - 3.0 * m * xa**2 + m**2 * (3.0 - m) * xa), k1 * m**3 / 6.0 * (1.0 - xa))
        slope = np.where(front, k1 / 6.0 * (3.0 * xa**2 - 6.0 * m * xa + m**2 * (3.0 - m)), -k1 * m**3 / 6.0)
        return yc, slope
    r = c.k2_over_k1
    tail = r * (1.0 - m) ** 3 * xa + m**3 * xa - m**3
    yc = np.where(front, k1 / 6.0 * ((xa - m) ** 3 - tail), k1 / 6.0 * (r * (xa - m) ** 3 - tail))
    base = r * (1.0 - m) ** 3 + m**3
    slope = np.where(front, k1 / 6.0 * (3.0 * (xa - m) ** 2 - base), k1 / 6.0 * (3.0 * r * (xa - m) ** 2 - base))
    return yc, slope


def leading_edge_radius(t: float) -> float:
    """Leading-edge radius of a NACA 4-/5-digit thickness form, fraction of chord.

    r = 1.1019 t^2 (Theory of Wing Sections ch. 6); ``t`` is thickness / chord.
    """
    return _LE_RADIUS_FACTOR * t * t


@dataclass(frozen=True)
class NacaParameters:
    """A parsed NACA designation: thickness and mean line, fractions of chord."""

    designation: str  # digits only, e.g. "2412"
    thickness: float
    series: int  # 4 or 5
    m: float = 0.0  # 4-digit: maximum camber
    p: float = 0.0  # 4-digit: position of maximum camber
    mean_line: str = ""  # 5-digit: first three digits

    def camber(self, x: ArrayLike) -> tuple[FloatArray, FloatArray]:
        """Mean-line ordinate and slope at chord fractions ``x``."""
        if self.series == 4:
            return naca4_camber(x, self.m, self.p)
        return naca5_camber(x, self.mean_line)


def parse_designation(designation: str) -> NacaParameters:
    """Parse "2412", "naca 23012", "NACA0012", "NACA-4415" into :class:`NacaParameters`.

    Digit meanings follow Report 824: 4-digit MPTT = camber M %, position P/10,
    thickness TT %; 5-digit LPQTT = design CL 0.15 L, camber position P/20,
    Q = 0 standard / 1 reflexed mean line, thickness TT %.
    """
    if not isinstance(designation, str):
        raise AirfoilError(f"NACA designation must be text such as '2412', not {designation!r}")
    digits = re.sub(r"[\s_\-]+", "", designation.strip().lower())
    if digits.startswith("naca"):
        digits = digits[4:]
    if not re.fullmatch(r"\d{4}|\d{5}", digits):
        raise AirfoilError(
            f"unknown NACA designation {designation!r}: expected 4 digits (e.g. '2412') or 5 digits (e.g. '23012')"
        )
    thickness = int(digits[-2:]) / 100.0
    if thickness <= 0.0:
        raise AirfoilError(f"NACA designation {designation!r}: the thickness digits are 00")
    if len(digits) == 4:
        m, p = int(digits[0]) / 100.0, int(digits[1]) / 10.0
        if m > 0.0 and p == 0.0:
            raise AirfoilError(f"NACA designation {designation!r}: cambered section needs a camber position digit 1-9")
        if m == 0.0:
            p = 0.0
        return NacaParameters(designation=digits, thickness=thickness, series=4, m=m, p=p)
    _mean_line_5(digits[:3])  # validates, raises AirfoilError with the valid choices
    return NacaParameters(designation=digits, thickness=thickness, series=5, mean_line=digits[:3])


def _surface_counts(n_points: int, closed_te: bool) -> tuple[int, int]:
    """Stations on the upper and lower surface (each counting the LE and TE stations)."""
    total = n_points + (2 if closed_te else 1)  # LE shared; closed TE shared too
    n_upper = (total + 1) // 2
    return n_upper, total - n_upper


def naca_surfaces(
    params: NacaParameters, x_upper: ArrayLike, x_lower: ArrayLike, closed_te: bool = False
) -> tuple[FloatArray, FloatArray]:
    """Upper and lower surface points, shape (N, 2), at mean-line stations x.

    The thickness is laid off perpendicular to the mean line (Report 824):
    xu = x - yt sin(theta), yu = yc + yt cos(theta), xl = x + yt sin(theta),
    yl = yc - yt cos(theta), theta = atan(dyc/dx).
    """
    out = []
    for x, sign in ((_as_array(x_upper), 1.0), (_as_array(x_lower), -1.0)):
        yt = naca4_thickness(x, params.thickness, closed_te)
        yc, slope = params.camber(x)
        theta = np.arctan(slope)
        out.append(np.column_stack((x - sign * yt * np.sin(theta), yc + sign * yt * np.cos(theta))))
    return out[0], out[1]


def cosine_stations(n: int) -> FloatArray:
    """``n`` chord stations from 0 to 1 with cosine spacing, x = (1 - cos beta) / 2."""
    beta = np.linspace(0.0, np.pi, n)
    x = 0.5 * (1.0 - np.cos(beta))
    x[0], x[-1] = 0.0, 1.0
    return x


def naca_section(designation: str, n_points: int = 161, closed_te: bool = False) -> FloatArray:
    """Outline of a NACA 4- or 5-digit section as a loop of shape (n_points, 2).

    Chord 1 along +X from (0, 0); Selig order (upper TE -> LE -> lower TE),
    counter-clockwise, no repeated points.  Stations are cosine spaced on each
    surface.  With ``closed_te`` (a common modification, not Report 824) the two
    surfaces meet in one TE point at (1, 0), listed first.
    """
    params = parse_designation(designation)
    if isinstance(n_points, bool) or not isinstance(n_points, (int, np.integer)) or n_points < MIN_POINTS:
        raise AirfoilError(f"n_points must be an integer of at least {MIN_POINTS}, got {n_points!r}")
    n_upper, n_lower = _surface_counts(int(n_points), closed_te)
    upper, lower = naca_surfaces(params, cosine_stations(n_upper), cosine_stations(n_lower), closed_te)
    if closed_te:
        upper[-1] = (1.0, 0.0)
        lower = lower[:-1]
    loop = np.vstack((upper[::-1], lower[1:]))
    loop[n_upper - 1] = (0.0, 0.0)
    return loop
