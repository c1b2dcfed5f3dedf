"""Springback of a bent flange and the die radius / angle that compensate it.

Method: pure bending of a wide sheet (plane strain) about its neutral surface, then elastic unloading
(Marciniak, Duncan & Hu, *Mechanics of Sheet Metal Forming*, 2002, ch. 6, bending of sheet and springback).
While the sheet is held at neutral-surface radius ``ρi`` the fibre ``y`` from the neutral surface carries the
strain ``y/ρi``; the bending moment per unit width is ``M = 2∫σ(y/ρi)·y dy`` over ``0 … t/2``; releasing it
springs the curvature back elastically by ``M/(E'I)``, ``E' = E/(1 − ν²)``, ``I = t³/12``::

    1/ρf = 1/ρi − 12·M/(E'·t³)

For an elastic–perfectly-plastic sheet this is the closed form ``ρi/ρf = 4X³ − 3X + 1``,
``X = ρi·σy'/(E'·t)`` (Gardiner 1957, as quoted in Marciniak, Duncan & Hu), which the tests use as their check.
The radii are those of the neutral surface, ``R + t/2`` for an inside radius ``R``: the relation is derived for
it, and applying it at the inside radius under-predicts springback.

Strain hardening: the flow stress follows a power law ``σ = K·εⁿ`` fitted through the sheet's typical yield
and ultimate strengths: Considère's necking condition puts the true uniform strain at ``n`` (Dieter,
*Mechanical Metallurgy*, 3rd ed., 1986, §8.3), so ``σu = K·nⁿ·e⁻ⁿ``, and the 0.2 % offset yield gives
``σy = K·(0.002)ⁿ``.  Hardening raises the stress in the outer fibres, so it *raises* the moment and with it
the springback.  Plane strain (von Mises): stresses × 2/√3, strains × √3/2.

A trial part overrides the model: the measured ratio of part angle to die angle (and of radii, when given)
sets the die directly (:func:`die_from_trial`).

Units: lengths in mm, stresses in MPa, angles in degrees (angle bent through).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from diegen.errors import FormingError

#: X at which the outer fibre only just reaches yield: the bend is elastic and
#: springs back flat (4X^3 - 3X + 1 = (X + 1)(2X - 1)^2 vanishes there).
ELASTIC_X = 0.5
#: Poisson's ratio of aluminium alloys, 0.33 (Aluminum Association typical value; from memory, unverified).
POISSON = 0.33
#: The offset of the conventional yield strength, 0.2 % (ASTM E8/E8M, offset method).
YIELD_OFFSET = 0.002
PLANE_STRAIN = 2.0 / math.sqrt(3.0)

_BISECTION_STEPS = 200
_REL_TOL = 1e-13
_FIBRES = 4001  # Simpson points across the half thickness


@dataclass(frozen=True)
class PowerLaw:
    """Flow stress ``σ = K·εⁿ`` (MPa, true strain), uniaxial."""

    k_mpa: float
    n: float

    @classmethod
    def through(cls, yield_mpa: float, ultimate_mpa: float) -> PowerLaw:
        """The power law through the 0.2 % yield and the ultimate strength (Considère: uniform strain = n)."""
        if not 0.0 < yield_mpa < ultimate_mpa:
            return cls(yield_mpa, 0.0)
        ratio = math.log(yield_mpa / ultimate_mpa)

        def gap(n: float) -> float:  # ln(σy/σu) − n·ln(0.002·e/n), rising through 0 in n
            return ratio - n * math.log(YIELD_OFFSET * math.e / n)

        lo, hi = 1e-9, 1.0
        for _ in range(_BISECTION_STEPS):
            mid = 0.5 * (lo + hi)
            lo, hi = (mid, hi) if gap(mid) < 0.0 else (lo, mid)
        n = 0.5 * (lo + hi)
        return cls(ultimate_mpa * (math.e / n) ** n, n)


@dataclass(frozen=True)
class BendSheet:
    """What springback depends on: thickness (mm), yield and modulus (MPa), and the hardening (None: none)."""

    thickness_mm: float
    yield_mpa: float
    youngs_mpa: float
    hardening: PowerLaw | None = None
    poisson: float = POISSON

    @property
    def plane_modulus_mpa(self) -> float:
        """E' = E/(1 − ν²), the modulus of a wide sheet in bending (MPa)."""
        return self.youngs_mpa / (1.0 - self.poisson**2)

    @property
    def plane_yield_mpa(self) -> float:
        """Yield stress in plane strain, 2/√3·σy (MPa)."""
        return PLANE_STRAIN * self.yield_mpa

    def stress(self, strain: np.ndarray) -> np.ndarray:
        """Plane-strain bending stress (MPa) at fibre strain ``strain``: elastic, then yield or hardening."""
        elastic = self.plane_modulus_mpa * strain
        flow = np.full_like(strain, self.plane_yield_mpa)
        if self.hardening is not None and self.hardening.n > 0.0:
            equivalent = PLANE_STRAIN * strain
            flow = np.maximum(flow, PLANE_STRAIN * self.hardening.k_mpa * equivalent**self.hardening.n)
        return np.minimum(elastic, flow)

    def moment(self, neutral_radius_mm: float) -> float:
        """Bending moment per unit width (N·mm/mm) at neutral-surface radius ``neutral_radius_mm``."""
        y = np.linspace(0.0, self.thickness_mm / 2.0, _FIBRES)
        f = self.stress(y / neutral_radius_mm) * y
        h = y[1] - y[0]
        return float(2.0 * h / 3.0 * (f[0] + f[-1] + 4.0 * f[1:-1:2].sum() + 2.0 * f[2:-1:2].sum()))

    def released_radius(self, neutral_radius_mm: float) -> float:
        """Neutral-surface radius (mm) after release from ``neutral_radius_mm`` (inf: springs back flat)."""
        t = self.thickness_mm
        curvature = 1.0 / neutral_radius_mm - 12.0 * self.moment(neutral_radius_mm) / (self.plane_modulus_mpa * t**3)
        return math.inf if curvature <= 0.0 else 1.0 / curvature

    @property
    def elastic_radius_mm(self) -> float:
        """Neutral radius (mm) at which the outer fibre only reaches yield: any gentler bend springs back flat."""
        return self.thickness_mm * self.plane_modulus_mpa / (2.0 * self.plane_yield_mpa)


@dataclass(frozen=True)
class Springback:
    """Die radius and angle that give a wanted part radius and angle (mm, degrees)."""

    part_radius_mm: float  # wanted inside radius after springback
    part_angle_deg: float  # wanted angle bent through after springback
    die_radius_mm: float  # inside radius while loaded: the die's top-edge radius
    die_angle_deg: float  # angle bent through while loaded
    overbend_deg: float  # die_angle - part_angle: the die wall's undercut for a 90 deg flange
    x_ratio: float  # X = ρi·σy'/(E'·t) at the die's neutral radius (dimensionless)
    model: str = ""  # which model (or trial) set the die


def radius_ratio(x: float) -> float:
    """``ρi/ρf = 4*X**3 - 3*X + 1`` (elastic–perfectly-plastic bending, Gardiner 1957, as commonly quoted)."""
    return 4.0 * x**3 - 3.0 * x + 1.0


def _check(radius: float, sheet: BendSheet, angle_deg: float, what: str) -> None:
    if not math.isfinite(radius) or radius <= 0.0:
        raise FormingError(f"{what} radius must be a finite length > 0 mm, got {radius!r}")
    if not math.isfinite(sheet.thickness_mm) or sheet.thickness_mm <= 0.0:
        raise FormingError(f"sheet thickness must be a finite length > 0 mm, got {sheet.thickness_mm!r}")
    if not math.isfinite(sheet.yield_mpa) or sheet.yield_mpa <= 0.0:
        raise FormingError(f"yield strength must be > 0 MPa, got {sheet.yield_mpa!r}")
    if not math.isfinite(sheet.youngs_mpa) or sheet.youngs_mpa <= sheet.yield_mpa:
        raise FormingError(f"elastic modulus must be > the yield strength (MPa), got E = {sheet.youngs_mpa!r}")
    if not math.isfinite(angle_deg) or not 0.0 < angle_deg <= 180.0:
        raise FormingError(f"{what} angle must lie in (0, 180] degrees, got {angle_deg!r}")


def model_name(sheet: BendSheet) -> str:
    """The springback model's name, as the report gives it."""
    base = ("neutral-surface pure bending, plane strain, elastic unloading (Marciniak, Duncan & Hu 2002, ch. 6)")
    if sheet.hardening is None or sheet.hardening.n == 0.0:
        return base + "; elastic–perfectly-plastic"
    h = sheet.hardening
    return (base + f"; power-law hardening K = {h.k_mpa:.0f} MPa, n = {h.n:.3f} through the typical yield and "
            "ultimate strengths (Considère)")


def springback_forward(die_radius: float, sheet: BendSheet, die_angle_deg: float) -> tuple[float, float]:
    """Part inside radius (mm) and angle (deg) after springback from a die bend of inside radius ``die_radius``.

    Raises :class:`FormingError` when the bend stays elastic (the part springs back flat).
    """
    _check(die_radius, sheet, die_angle_deg, "die")
    half_t = sheet.thickness_mm / 2.0
    rho_i = die_radius + half_t
    rho_f = sheet.released_radius(rho_i)
    if not math.isfinite(rho_f) or rho_i >= sheet.elastic_radius_mm:
        raise FormingError(
            f"a {die_radius:.3f} mm bend in {sheet.thickness_mm:.3f} mm sheet (yield {sheet.yield_mpa:.0f} MPa, "
            f"E {sheet.youngs_mpa:.0f} MPa) stays elastic: the part would spring back flat"
        )
    return rho_f - half_t, die_angle_deg * rho_i / rho_f


def die_for_part(part_radius: float, sheet: BendSheet, part_angle_deg: float = 90.0) -> Springback:
    """Die radius and angle that spring back to ``part_radius`` (mm, inside) and ``part_angle_deg``.

    Solves ``released_radius(ρi) = Rf + t/2`` for ρi by bisection (the released radius rises with ρi), then keeps
    the neutral-surface length: ``αi = αf·ρf/ρi``.  Raises :class:`FormingError` when the part radius itself is
    in the elastic range (a sheet bent to it would spring back flat: a gentle curve, not a flange bend).
    """
    _check(part_radius, sheet, part_angle_deg, "part")
    half_t = sheet.thickness_mm / 2.0
    rho_f = part_radius + half_t
    if rho_f >= sheet.elastic_radius_mm:
        x_part = rho_f * sheet.plane_yield_mpa / (sheet.plane_modulus_mpa * sheet.thickness_mm)
        raise FormingError(
            f"a {part_radius:.3f} mm part radius in {sheet.thickness_mm:.3f} mm sheet (yield {sheet.yield_mpa:.0f} "
            f"MPa, E {sheet.youngs_mpa:.0f} MPa) is in the elastic range (X = {x_part:.3f} >= 0.5): "
            "the springback model does not cover it; use a tighter radius or form it by stretching"
        )

    def residual(rho_i: float) -> float:
        return sheet.released_radius(rho_i) - rho_f

    lo, hi = half_t * 1e-6, rho_f
    if not (residual(lo) < 0.0 <= residual(hi)):
        raise FormingError(f"no die radius found for a {part_radius:.3f} mm part radius")
    for _ in range(_BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if residual(mid) < 0.0 else (lo, mid)
        if hi - lo <= _REL_TOL * rho_f:
            break
    rho_i = 0.5 * (lo + hi)
    if rho_i <= half_t:
        raise FormingError(
            f"a {part_radius:.3f} mm part radius in {sheet.thickness_mm:.3f} mm sheet would need a die radius of "
            "zero or less: the sheet springs back too far for this radius; choose a larger radius or a softer temper"
        )
    die_angle = part_angle_deg * rho_f / rho_i
    x_die = rho_i * sheet.plane_yield_mpa / (sheet.plane_modulus_mpa * sheet.thickness_mm)
    return Springback(part_radius, part_angle_deg, rho_i - half_t, die_angle, die_angle - part_angle_deg, x_die,
                      model_name(sheet))


@dataclass(frozen=True)
class Trial:
    """A trial part: the die angle it was formed on and the flange angle measured after release (degrees);
    optionally the die's inside radius and the part's measured inside radius (mm)."""

    die_angle_deg: float
    part_angle_deg: float
    die_radius_mm: float | None = None
    part_radius_mm: float | None = None


def die_from_trial(trial: Trial, modelled: Springback) -> Springback:
    """The die for a 90° (or the wanted) part from a trial's measured springback, replacing the model's numbers.

    The measured ratio ``Ks = part angle / die angle`` holds for the same sheet, radius and die material, so the
    die angle for the wanted angle is ``wanted / Ks``; with both radii measured, the die radius is the wanted part
    radius times ``die radius / part radius`` of the trial (else the model's die radius is kept).
    """
    if not (0.0 < trial.part_angle_deg <= 180.0 and 0.0 < trial.die_angle_deg <= 180.0):
        raise FormingError("trial angles must lie in (0, 180] degrees")
    ratio = trial.part_angle_deg / trial.die_angle_deg
    die_angle = modelled.part_angle_deg / ratio
    die_radius = modelled.die_radius_mm
    note = f"trial part: {trial.part_angle_deg:g}° measured after forming on a {trial.die_angle_deg:g}° die"
    if trial.die_radius_mm and trial.part_radius_mm:
        die_radius = modelled.part_radius_mm * trial.die_radius_mm / trial.part_radius_mm
        note += f", radius {trial.part_radius_mm:g} mm from a {trial.die_radius_mm:g} mm die"
    return Springback(modelled.part_radius_mm, modelled.part_angle_deg, die_radius, die_angle,
                      die_angle - modelled.part_angle_deg, modelled.x_ratio,
                      note + " (the measured springback overrides the model)")


__all__ = ["ELASTIC_X", "POISSON", "BendSheet", "PowerLaw", "Springback", "Trial", "die_for_part", "die_from_trial",
           "model_name", "radius_ratio", "springback_forward"]
