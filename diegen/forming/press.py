"""Press check: the pressure the rubber puts on each flange, how far it folds, and whether die and rubber survive.

Model (of our own, derived here and calibrated against facts of the trade; trial parts decide):

* Once the rubber has flowed it is a confined, nearly incompressible fluid: the pressure on the blank is the
  press force over the box's inside area, ``p = F/A`` (common practice).
* A flange leg is a cantilever loaded by ``p`` that folds about a plastic hinge.  The fully plastic moment per
  unit width in plane strain is ``σy'·t²/4`` (``σy' = 2/√3·σy``); a uniform load ``p`` over a lever ``a``
  gives ``p·a²/2``.  The hinge forms where these meet: ``a(p) = t·√(σy'/(2p))``.  Folding starts when
  ``a`` reaches the leg length ``L`` (``p_start = σy'·t²/(2L²)``) and the sheet is pressed onto the die radius
  ``R`` only when ``a ≤ R`` (``p_full = σy'·t²/(2R²)``, about 2,000 psi for a 0.025 in 2024-T3 flange on a
  3/32 in radius).  ``reachable_radius_mm`` is ``max(a, R)``: the tightest radius the sheet is pressed to.
* Between the two the flange stands part way: ``angle = 90°·u^m``, ``u = (L − a)/(L − R)``, with the exponent
  ``m = 2.5`` calibrated to the fact of the trade that a home box at about 330 psi folds 0.025 in 2024-T3 rib
  flanges (1/2 in, 3/32 in radius) only part way, as little as about 30° (fact of the trade, no source).
  ``full`` therefore means every flange reaches 90° at its die radius, so the over-bend is actually reached.
* Die top: the rubber over the die is compressed by the die's height more than the rubber beside it; the die top
  carries the box pressure plus that extra compression, ``p + E_r·h/T`` (rubber modulus ``E_r`` from its Shore A
  hardness by Gent's relation, as commonly quoted: A. N. Gent, Trans. Inst. Rubber Ind. 34 (1958) 46).  Early in
  the stroke the press force is only what the rubber's compression gives, never the whole rating over the top.

Safety: a shop press stores a great deal of energy; the rubber, the blank or a split die or box can be ejected.
Guard the press, keep hands clear, follow the press maker's rating and local codes and licensed practice.

Units: forces in N, lengths in mm, areas in mm^2, pressures in MPa, angles in degrees.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from diegen.errors import FormingError
from diegen.findings import Finding
from diegen.units import MM_PER_IN, N_PER_LBF

Verdict = Literal["full", "partial", "insufficient"]
LegKind = Literal["perimeter", "hole", "flute"]

#: Clearance (mm) between the die footprint and each wall of the rubber box
#: (common practice, no source).
WALL_CLEARANCE_MM = 25.0
#: Rubber at least this many times the die height (from memory, unverified:
#: pad thickness is often quoted as 1.5 to 3 times the form-block height).
RUBBER_TO_DIE_HEIGHT = 1.5
#: Usual pad hardness range, Shore A (common practice, no source).
DUROMETER_RANGE_SHORE_A = (40.0, 60.0)
#: A home box: a 20-short-ton press (40,000 lbf) over an 11 in x 11 in box gives about 333 psi, the pressure a
#: home rubber box reaches (fact of the trade, no source); computed exactly here, 330.6 psi = 2.279 MPa.
USUAL_MIN_PRESSURE_MPA = 40_000 * N_PER_LBF / (11 * MM_PER_IN) ** 2
#: Exponent of the part-way fold, calibrated to the fact of the trade above (see the module's docstring).
FOLD_EXPONENT = 2.5
PLANE_STRAIN = 2.0 / math.sqrt(3.0)

PRESS_CAUTION = (
    "A press stores a great deal of energy: rubber, blank, a split die or box can be ejected. "
    "Guard the press, keep hands clear, stay within its rated load, and follow local codes and "
    "licensed practice."
)

MODELS: tuple[tuple[str, str], ...] = (
    ("pressure_mpa", "press force / box inside area: rubber confined and flowed (hydrostatic)"),
    ("die_top_pressure_mpa", "box pressure + the extra compression of the rubber over the die, E_r*h/T; E_r from "
                             "Shore A by Gent's relation (model of our own)"),
    ("needed_mpa", "pressure to press every flange onto its die radius, sigma_y'*t^2/(2*R^2), plastic hinge with the "
                   "lever at the die radius (model of our own)"),
    ("flange_angle_deg", "90 deg * ((L - a)/(L - R))^2.5, a = t*sqrt(sigma_y'/(2p)) the hinge lever the pressure "
                         "reaches; calibrated to a 330 psi box folding 0.025 in 2024-T3 to about 30 deg (fact of the "
                         "trade, no source)"),
    ("fits_box", "die footprint + the wall clearance each side within the box (common practice, no source)"),
    ("rubber_ok", f"rubber >= {RUBBER_TO_DIE_HEIGHT:g} x die height (from memory, unverified)"),
    ("die_crush_ok", "die top pressure <= die compressive strength"),
)


@dataclass(frozen=True)
class PressSetup:
    """The press and its rubber box: force (N), box inside size (mm), rubber (mm, Shore A), wall clearance (mm)."""

    force_n: float
    box_w_mm: float
    box_l_mm: float
    rubber_thickness_mm: float
    rubber_durometer: float
    wall_clearance_mm: float = WALL_CLEARANCE_MM


@dataclass(frozen=True)
class DieFootprint:
    """The die in the box: plan bounding box, top area, height (mm); its stock's strength (MPa) and life."""

    length_mm: float
    width_mm: float
    top_area_mm2: float
    height_mm: float
    compressive_mpa: float
    life_parts: int


@dataclass(frozen=True)
class FlangeLeg:
    """One flange the press must fold: its height (mm), the radius it is pressed onto (mm) and the angle it is
    bent through from the web (degrees; 90 for a square flange)."""

    name: str
    kind: LegKind
    leg_mm: float
    radius_mm: float
    angle_deg: float = 90.0


@dataclass(frozen=True)
class LegResult:
    """How far the press folds one flange leg (MPa, mm, degrees)."""

    leg: FlangeLeg
    start_mpa: float
    full_mpa: float
    reachable_radius_mm: float
    angle_deg: float

    @property
    def full(self) -> bool:
        """Whether the press folds the leg all the way onto its die (to its own angle)."""
        return self.angle_deg >= self.leg.angle_deg


def box_pressure(force_n: float, box_w_mm: float, box_l_mm: float) -> float:
    """Rubber pressure (MPa) once the pad has flowed: force / box inside area (common practice)."""
    _positive(force_n=force_n, box_w_mm=box_w_mm, box_l_mm=box_l_mm)
    return force_n / (box_w_mm * box_l_mm)


def rubber_modulus_mpa(shore_a: float) -> float:
    """Young's modulus (MPa) of rubber of hardness ``shore_a``, Gent's relation (1958, as commonly quoted):
    ``E = 0.0981·(56 + 7.62336·S) / (0.137505·(254 − 2.54·S))``, valid for S below about 95."""
    if not 0.0 < shore_a < 95.0:
        raise FormingError(f"rubber hardness must lie between 0 and 95 Shore A, got {shore_a!r}")
    return 0.0981 * (56.0 + 7.62336 * shore_a) / (0.137505 * (254.0 - 2.54 * shore_a))


def hinge_pressure(lever_mm: float, thickness_mm: float, yield_mpa: float) -> float:
    """Pressure (MPa) that forms a plastic hinge in a sheet cantilever of lever ``lever_mm``: σy'·t²/(2a²)."""
    _positive(lever_mm=lever_mm, thickness_mm=thickness_mm, yield_mpa=yield_mpa)
    return PLANE_STRAIN * yield_mpa * thickness_mm**2 / (2.0 * lever_mm**2)


def hinge_lever_mm(pressure_mpa: float, thickness_mm: float, yield_mpa: float) -> float:
    """The lever (mm) at which pressure ``pressure_mpa`` forms a plastic hinge: t·√(σy'/(2p))."""
    return thickness_mm * math.sqrt(PLANE_STRAIN * yield_mpa / (2.0 * pressure_mpa))


def fold(leg: FlangeLeg, pressure_mpa: float, thickness_mm: float, yield_mpa: float) -> LegResult:
    """How far ``pressure_mpa`` folds ``leg`` (see the module's docstring)."""
    _positive(leg_mm=leg.leg_mm, radius_mm=leg.radius_mm)
    lever = hinge_lever_mm(pressure_mpa, thickness_mm, yield_mpa)
    start = hinge_pressure(leg.leg_mm, thickness_mm, yield_mpa)
    full = hinge_pressure(leg.radius_mm, thickness_mm, yield_mpa)
    if lever <= leg.radius_mm:
        angle = 90.0
    elif lever >= leg.leg_mm or leg.leg_mm <= leg.radius_mm:
        angle = 0.0
    else:
        angle = min(90.0, 90.0 * ((leg.leg_mm - lever) / (leg.leg_mm - leg.radius_mm)) ** FOLD_EXPONENT)
    # a flange bent through less than 90° is set on its die at the same hinge lever (the die radius): the fold angle
    # the model gives a square flange, capped at the leg's own angle
    return LegResult(leg, start, full, max(lever, leg.radius_mm), min(angle, leg.angle_deg))


def durometer_advice(shore_a: float) -> str:
    """Plain-language advice on the pad hardness (Shore A), common practice, no source."""
    lo, hi = DUROMETER_RANGE_SHORE_A
    if not math.isfinite(shore_a) or shore_a <= 0.0:
        raise FormingError(f"rubber hardness must be a Shore A number > 0, got {shore_a!r}")
    if shore_a < lo:
        return (
            f"Shore {shore_a:g}A is softer than the usual {lo:g}A-{hi:g}A: it flows easily but gives "
            "soft definition at the bend radius and may extrude past the die (common practice)"
        )
    if shore_a > hi:
        return (
            f"Shore {shore_a:g}A is harder than the usual {lo:g}A-{hi:g}A: crisper definition, but it "
            "needs more pressure to flow around the die (common practice)"
        )
    return (
        f"Shore {shore_a:g}A is in the usual {lo:g}A-{hi:g}A range; harder gives crisper definition "
        "but needs more pressure (common practice)"
    )


@dataclass(frozen=True)
class PressCheck:
    """Result of :func:`press_check`; pressures in MPa, lengths in mm, angles in degrees."""

    pressure_mpa: float
    die_top_pressure_mpa: float
    needed_mpa: float  # the pressure that presses every flange onto its die radius
    legs: tuple[LegResult, ...]
    verdict: Verdict
    fits_box: bool
    rubber_ok: bool
    die_crush_ok: bool
    die_life_ok: bool
    durometer_advice: str
    warnings: tuple[Finding, ...]
    models: tuple[tuple[str, str], ...]
    caution: str

    @property
    def flange_angle_deg(self) -> float:
        """The angle the press folds the part's perimeter flange to (else the least over all its legs)."""
        perimeter = [r for r in self.legs if r.leg.kind == "perimeter"] or list(self.legs)
        return min(r.angle_deg for r in perimeter)

    @property
    def reachable_radius_mm(self) -> float:
        """The tightest radius the press presses the sheet onto, over the perimeter flanges (else all legs)."""
        perimeter = [r for r in self.legs if r.leg.kind == "perimeter"] or list(self.legs)
        return max(r.reachable_radius_mm for r in perimeter)

    @property
    def short_legs(self) -> tuple[LegResult, ...]:
        """The legs the press does not fold to 90°."""
        return tuple(r for r in self.legs if not r.full)

    def model_of(self, name: str) -> str:
        """The model behind the number ``name`` (a field name)."""
        for key, text in self.models:
            if key == name:
                return text
        raise KeyError(name)


def _positive(**values: float) -> None:
    for name, v in values.items():
        try:
            f = float(v)
        except (TypeError, ValueError):
            raise FormingError(f"{name} must be a number, got {v!r}") from None
        if not (math.isfinite(f) and f > 0.0):
            raise FormingError(f"{name} must be a finite number > 0, got {v!r}")


def press_check(setup: PressSetup, die: DieFootprint, legs: Sequence[FlangeLeg], thickness_mm: float,
                yield_mpa: float, *, parts_wanted: int = 1) -> PressCheck:
    """Check one die in one press: how far each flange leg folds, and whether die and rubber survive.

    Verdict: ``full`` when every leg reaches 90° at its die radius (and the die fits the box), ``partial`` when
    the press folds some flange only part way (hand operations finish it), ``insufficient`` when it folds
    nothing at all or the die does not fit the box.
    """
    _positive(die_length_mm=die.length_mm, die_width_mm=die.width_mm, die_height_mm=die.height_mm,
              rubber_thickness_mm=setup.rubber_thickness_mm, die_compressive_mpa=die.compressive_mpa,
              die_top_area_mm2=die.top_area_mm2, thickness_mm=thickness_mm, yield_mpa=yield_mpa)
    if not math.isfinite(setup.wall_clearance_mm) or setup.wall_clearance_mm < 0.0:
        raise FormingError(f"wall clearance must be >= 0 mm, got {setup.wall_clearance_mm!r}")
    if die.life_parts < 0 or parts_wanted < 0:
        raise FormingError("die life and parts wanted must be counts >= 0")
    if not legs:
        raise FormingError("press check needs at least one flange leg")

    pressure = box_pressure(setup.force_n, setup.box_w_mm, setup.box_l_mm)
    results = tuple(fold(leg, pressure, thickness_mm, yield_mpa) for leg in legs)
    need = 2.0 * setup.wall_clearance_mm
    fits = any(a + need <= setup.box_w_mm and b + need <= setup.box_l_mm
               for a, b in ((die.length_mm, die.width_mm), (die.width_mm, die.length_mm)))
    # a die that does not fit the box cannot be pressed in it at all: nothing folds
    if not fits:
        results = tuple(LegResult(r.leg, r.start_mpa, r.full_mpa, r.leg.leg_mm, 0.0) for r in results)
    if not fits or all(r.angle_deg <= 0.0 for r in results):
        verdict: Verdict = "insufficient"
    else:
        verdict = "full" if all(r.full for r in results) else "partial"
    top = pressure + rubber_modulus_mpa(setup.rubber_durometer) * die.height_mm / setup.rubber_thickness_mm
    rubber_ok = setup.rubber_thickness_mm >= RUBBER_TO_DIE_HEIGHT * die.height_mm
    crush_ok = top <= die.compressive_mpa
    life_ok = die.life_parts >= parts_wanted

    warnings: list[Finding] = []
    if pressure < USUAL_MIN_PRESSURE_MPA:
        warnings.append(Finding(
            "press-below-usual", f"box pressure {pressure:.2f} MPa is below the about {USUAL_MIN_PRESSURE_MPA:.2f} "
            "MPa (about 330 psi) a home rubber box reaches (fact of the trade, no source)", key="press.force"))
    if not fits:
        warnings.append(Finding(
            "die-too-big-for-box", f"die {die.length_mm:.0f} x {die.width_mm:.0f} mm does not fit a "
            f"{setup.box_w_mm:.0f} x {setup.box_l_mm:.0f} mm box with {setup.wall_clearance_mm:.0f} mm clearance "
            "each side", key="press.box"))
    if not rubber_ok:
        warnings.append(Finding(
            "rubber-too-thin", f"rubber {setup.rubber_thickness_mm:.0f} mm is thinner than {RUBBER_TO_DIE_HEIGHT:g} x "
            f"the {die.height_mm:.0f} mm die height ({RUBBER_TO_DIE_HEIGHT * die.height_mm:.0f} mm): add a layer or "
            "lower the die", key="press.rubber.thickness"))
    if not crush_ok:
        warnings.append(Finding(
            "die-may-crush", f"the die top carries about {top:.1f} MPa under the rubber, more than the die "
            f"material's {die.compressive_mpa:.1f} MPa compressive strength: it may crush or split",
            key="die.material"))
    if not life_ok:
        warnings.append(Finding(
            "die-life-short", f"the die material is expected to last about {die.life_parts} part(s); "
            f"{parts_wanted} are wanted: plan a second die or a harder material", key="die.material"))
    return PressCheck(
        pressure_mpa=pressure,
        die_top_pressure_mpa=top,
        needed_mpa=max(r.full_mpa for r in results),
        legs=results,
        verdict=verdict,
        fits_box=fits,
        rubber_ok=rubber_ok,
        die_crush_ok=crush_ok,
        die_life_ok=life_ok,
        durometer_advice=durometer_advice(setup.rubber_durometer),
        warnings=tuple(warnings),
        models=MODELS,
        caution=PRESS_CAUTION,
    )


__all__ = ["DUROMETER_RANGE_SHORE_A", "FOLD_EXPONENT", "MODELS", "PRESS_CAUTION", "RUBBER_TO_DIE_HEIGHT",
           "USUAL_MIN_PRESSURE_MPA", "WALL_CLEARANCE_MM", "DieFootprint", "FlangeLeg", "LegResult", "PressCheck",
           "PressSetup", "Verdict", "box_pressure", "durometer_advice", "fold", "hinge_lever_mm", "hinge_pressure",
           "press_check", "rubber_modulus_mpa"]
