"""Springback of a bent flange and the die radius / angle that compensate it.

Method: pure bending of an elastic--perfectly-plastic sheet, as commonly quoted
(Gardiner 1957; given in Marciniak, Duncan & Hu, *Mechanics of Sheet Metal
Forming*, and in Kalpakjian's manufacturing texts -- attributions as commonly
quoted, the original pages not checked here)::

    Ri/Rf = 4*X**3 - 3*X + 1,   X = Ri*Sy/(E*t)

Ri is the loaded (die) inside radius, Rf the unloaded (part) inside radius.
The bend angle follows from a neutral line of constant length at mid-thickness:
``ai*(Ri + t/2) = af*(Rf + t/2)``.

The model ignores work hardening, so real springback is usually somewhat
smaller than predicted; O tempers, which harden strongly, spring back a little
more than their low yield suggests.  Trial parts decide the final die.

Units: lengths in mm, stresses in MPa, angles in degrees (angle bent through).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from diegen.errors import FormingError

#: X at which the outer fibre only just reaches yield: the bend is elastic and
#: springs back flat (4X^3 - 3X + 1 = (X + 1)(2X - 1)^2 vanishes there).
ELASTIC_X = 0.5

_BISECTION_STEPS = 200
_REL_TOL = 1e-14


@dataclass(frozen=True)
class Springback:
    """Die radius and angle that give a wanted part radius and angle (mm, degrees)."""

    part_radius_mm: float  # wanted inside radius after springback
    part_angle_deg: float  # wanted angle bent through after springback
    die_radius_mm: float  # inside radius while loaded: the die's top-edge radius
    die_angle_deg: float  # angle bent through while loaded
    overbend_deg: float  # die_angle - part_angle: the die wall's undercut for a 90 deg flange
    x_ratio: float  # X = Ri*Sy/(E*t) at the die radius (dimensionless)


def radius_ratio(x: float) -> float:
    """``Ri/Rf = 4*X**3 - 3*X + 1`` (elastic--perfectly-plastic bending, as commonly quoted)."""
    return 4.0 * x**3 - 3.0 * x + 1.0


def _check(radius: float, thickness: float, yield_mpa: float, e_mpa: float, angle_deg: float, what: str) -> None:
    if not math.isfinite(radius) or radius <= 0.0:
        raise FormingError(f"{what} radius must be a finite length > 0 mm, got {radius!r}")
    if not math.isfinite(thickness) or thickness <= 0.0:
        raise FormingError(f"sheet thickness must be a finite length > 0 mm, got {thickness!r}")
    if not math.isfinite(yield_mpa) or yield_mpa <= 0.0:
        raise FormingError(f"yield strength must be > 0 MPa, got {yield_mpa!r}")
    if not math.isfinite(e_mpa) or e_mpa <= yield_mpa:
        raise FormingError(f"elastic modulus must be > the yield strength (MPa), got E = {e_mpa!r}")
    if not math.isfinite(angle_deg) or not 0.0 < angle_deg <= 180.0:
        raise FormingError(f"{what} angle must lie in (0, 180] degrees, got {angle_deg!r}")


def springback_forward(
    die_radius: float, thickness: float, yield_mpa: float, E_mpa: float, die_angle_deg: float
) -> tuple[float, float]:
    """Part inside radius (mm) and angle (deg) after springback from a die bend.

    Elastic--perfectly-plastic pure bending (Gardiner 1957, as commonly quoted):
    ``Rf = Ri / (4X^3 - 3X + 1)``, ``af = ai*(Ri + t/2)/(Rf + t/2)``.
    Raises :class:`FormingError` when X >= 0.5: the sheet never yields and the
    part springs back flat.
    """
    _check(die_radius, thickness, yield_mpa, E_mpa, die_angle_deg, "die")
    x = die_radius * yield_mpa / (E_mpa * thickness)
    if x >= ELASTIC_X:
        raise FormingError(
            f"a {die_radius:.3f} mm bend in {thickness:.3f} mm sheet (yield {yield_mpa:.0f} MPa, "
            f"E {E_mpa:.0f} MPa) stays elastic (X = {x:.3f} >= 0.5): the part would spring back flat"
        )
    part_radius = die_radius / radius_ratio(x)
    half_t = thickness / 2.0
    part_angle = die_angle_deg * (die_radius + half_t) / (part_radius + half_t)
    return part_radius, part_angle


def die_for_part(
    part_radius: float, thickness: float, yield_mpa: float, E_mpa: float, part_angle_deg: float = 90.0
) -> Springback:
    """Die radius and angle that spring back to ``part_radius`` (mm) and ``part_angle_deg``.

    Solves ``Ri/Rf = 4X^3 - 3X + 1`` for Ri by bisection, then
    ``ai = af*(Rf + t/2)/(Ri + t/2)`` (elastic--perfectly-plastic bending,
    Gardiner 1957, as commonly quoted).  The root is bracketed on
    (0, min(Rf, R at X = 0.5)), where ``Ri - Rf*(4X^3 - 3X + 1)`` rises
    monotonically from -Rf to a positive value, so it is unique.

    Raises :class:`FormingError` when the part radius itself lies in the
    elastic range (X at Rf >= 0.5: a sheet bent to it would spring back flat,
    so this is a gentle curve, not a flange bend the model covers), or when
    no root is found.
    """
    _check(part_radius, thickness, yield_mpa, E_mpa, part_angle_deg, "part")
    strain_ratio = yield_mpa / (E_mpa * thickness)  # X per mm of radius
    x_part = part_radius * strain_ratio
    if x_part >= ELASTIC_X:
        raise FormingError(
            f"a {part_radius:.3f} mm part radius in {thickness:.3f} mm sheet (yield {yield_mpa:.0f} MPa, "
            f"E {E_mpa:.0f} MPa) is in the elastic range (X = {x_part:.3f} >= 0.5): "
            "the springback model does not cover it; use a tighter radius or form it by stretching"
        )

    def residual(ri: float) -> float:
        return ri - part_radius * radius_ratio(ri * strain_ratio)

    lo, hi = 0.0, min(part_radius, ELASTIC_X / strain_ratio)
    if not (residual(lo) < 0.0 < residual(hi)):
        raise FormingError(f"no die radius found for a {part_radius:.3f} mm part radius")
    for _ in range(_BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        if residual(mid) < 0.0:
            lo = mid
        else:
            hi = mid
        if hi - lo <= _REL_TOL * part_radius:
            break
    die_radius = 0.5 * (lo + hi)
    x_die = die_radius * strain_ratio
    if x_die >= ELASTIC_X:  # cannot happen with the bracket above; kept as a guard
        raise FormingError(f"die radius {die_radius:.3f} mm would bend elastically (X = {x_die:.3f})")
    half_t = thickness / 2.0
    die_angle = part_angle_deg * (part_radius + half_t) / (die_radius + half_t)
    return Springback(
        part_radius_mm=part_radius,
        part_angle_deg=part_angle_deg,
        die_radius_mm=die_radius,
        die_angle_deg=die_angle,
        overbend_deg=die_angle - part_angle_deg,
        x_ratio=x_die,
    )
