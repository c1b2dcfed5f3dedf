"""Bend allowance, setback and the developed width of one formed flange.

Methods: FAA-H-8083-31, *Aviation Maintenance Technician Handbook -- Airframe*,
ch. 4 (sheet-metal layout and forming: bend allowance, setback, the worked
U-channel).  All lengths are in millimetres and angles in degrees; the angle is
the angle bent *through* (90 deg for a square flange), not the included angle.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from diegen.errors import FormingError

#: Empirical aviation bend-allowance coefficients, per degree of bend
#: (FAA-H-8083-31 ch. 4; the same formula is in the NAVEDTRA aviation
#: structural mechanic manual).  The first is close to pi/180 (0.99867 of it);
#: together they equal the K-factor form with k = 0.0078 / 0.01743 ~ 0.447.
AVIATION_RADIUS_COEFF = 0.01743
AVIATION_THICKNESS_COEFF = 0.0078


def _check_bend(radius: float, thickness: float, angle_deg: float, *, max_angle: float = 180.0) -> None:
    if not math.isfinite(radius) or radius < 0.0:
        raise FormingError(f"bend radius must be a finite length >= 0 mm, got {radius!r}")
    if not math.isfinite(thickness) or thickness <= 0.0:
        raise FormingError(f"sheet thickness must be a finite length > 0 mm, got {thickness!r}")
    if not math.isfinite(angle_deg) or not 0.0 < angle_deg <= max_angle:
        raise FormingError(f"bend angle must lie in (0, {max_angle:g}] degrees, got {angle_deg!r}")


def _check_k(k: float) -> None:
    if not math.isfinite(k) or not 0.0 <= k <= 0.5:
        raise FormingError(
            f"K-factor (neutral line from the inside surface, / thickness) must lie in [0, 0.5], got {k!r}"
        )


def bend_allowance(radius: float, thickness: float, angle_deg: float, k: float) -> float:
    """Length of the neutral line through one bend, K-factor form, in mm.

    ``BA = theta * (R + k*T)``, theta in radians, R the inside radius (mm), T the
    thickness (mm), k the neutral-line position from the inside surface as a
    fraction of T.  FAA-H-8083-31 ch. 4 gives the 90 deg case with the neutral
    line at mid-thickness (k = 0.5).
    """
    _check_bend(radius, thickness, angle_deg)
    _check_k(k)
    return math.radians(angle_deg) * (radius + k * thickness)


def bend_allowance_aviation(radius: float, thickness: float, angle_deg: float) -> float:
    """Empirical aviation bend allowance ``(0.01743*R + 0.0078*T) * N``.

    FAA-H-8083-31 ch. 4 (bend allowance formula for any bend of 1 to 180
    degrees).  R and T in any one length unit (the formula is linear), N the
    bend angle in degrees; the result is in the same unit (mm here).
    """
    _check_bend(radius, thickness, angle_deg)
    return (AVIATION_RADIUS_COEFF * radius + AVIATION_THICKNESS_COEFF * thickness) * angle_deg


def setback_factor(angle_deg: float) -> float:
    """The setback "K" of FAA-H-8083-31 ch. 4 (its K-chart): ``tan(angle/2)``.

    K = 1 at 90 deg.  The chart's values are the tangent of half the bend
    angle (standard geometry of the outside mold-line corner).  Dimensionless.
    """
    if not math.isfinite(angle_deg) or not 0.0 < angle_deg < 180.0:
        raise FormingError(f"setback needs a bend angle in (0, 180) degrees, got {angle_deg!r}")
    return math.tan(math.radians(angle_deg) / 2.0)


def setback(radius: float, thickness: float, angle_deg: float) -> float:
    """Setback ``SB = K*(R + T)`` from the mold-line corner to the bend tangent line, in mm.

    FAA-H-8083-31 ch. 4 ("Bending a U-channel"), K from :func:`setback_factor`.
    """
    _check_bend(radius, thickness, angle_deg, max_angle=179.999999)
    return setback_factor(angle_deg) * (radius + thickness)


def bend_deduction(radius: float, thickness: float, angle_deg: float, k: float) -> float:
    """Bend deduction ``BD = 2*SB - BA`` in mm (K-factor bend allowance).

    FAA-H-8083-31 ch. 4: the flat pattern is the sum of the mold-line legs less
    one bend deduction per bend.
    """
    return 2.0 * setback(radius, thickness, angle_deg) - bend_allowance(radius, thickness, angle_deg, k)


@dataclass(frozen=True)
class FlangeLayout:
    """Flat-pattern numbers for one flange bent off a web over the die's top edge.

    All lengths in mm.  ``developed_width_mm`` is measured in the flat blank
    from the bend tangent line on the web; ``blank_offset_mm`` from the die wall
    outline (the flange's inner mold line at the die's top face) out to the
    blank edge.
    """

    height_mm: float  # mold-line height of the flange
    radius_mm: float  # inside bend radius (die top-edge radius)
    thickness_mm: float
    angle_deg: float  # angle bent through
    k_factor: float
    bend_allowance_mm: float  # K-factor form, used for the developed width
    bend_allowance_aviation_mm: float  # empirical aviation form, for comparison
    setback_mm: float
    flat_leg_mm: float  # straight part of the flange below the bend
    developed_width_mm: float  # bend allowance + flat leg
    blank_offset_mm: float  # die wall outline -> blank edge


def flange_layout(height: float, radius: float, thickness: float, k: float, angle_deg: float = 90.0) -> FlangeLayout:
    """Develop one flange of mold-line ``height`` (mm) bent ``angle_deg`` over radius ``radius`` (mm).

    FAA-H-8083-31 ch. 4: flat leg = mold-line length - setback; developed width
    = bend allowance + flat leg.  The web's bend tangent line lies ``R*K``
    inside the die wall outline (the sharp corner of the die's top face and
    wall), which is ``R`` for a 90 deg flange, so the blank edge lies
    ``developed width - R*K`` outside the die wall outline (standard geometry).

    Raises :class:`FormingError` when the flange is too short to hold the bend
    (flat leg <= 0).
    """
    if not math.isfinite(height) or height <= 0.0:
        raise FormingError(f"flange height must be a finite length > 0 mm, got {height!r}")
    ba = bend_allowance(radius, thickness, angle_deg, k)
    ba_aviation = bend_allowance_aviation(radius, thickness, angle_deg)
    sb = setback(radius, thickness, angle_deg)
    flat = height - sb
    if flat <= 0.0:
        raise FormingError(
            f"flange of {height:.3f} mm (mold line) is too short for a {angle_deg:g} deg bend of "
            f"radius {radius:.3f} mm in {thickness:.3f} mm sheet: the setback is {sb:.3f} mm, "
            f"leaving a flat leg of {flat:.3f} mm; raise the flange or lower the bend radius"
        )
    developed = ba + flat
    inner_setback = radius * setback_factor(angle_deg)
    return FlangeLayout(
        height_mm=height,
        radius_mm=radius,
        thickness_mm=thickness,
        angle_deg=angle_deg,
        k_factor=k,
        bend_allowance_mm=ba,
        bend_allowance_aviation_mm=ba_aviation,
        setback_mm=sb,
        flat_leg_mm=flat,
        developed_width_mm=developed,
        blank_offset_mm=developed - inner_setback,
    )
