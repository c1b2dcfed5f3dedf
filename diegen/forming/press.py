"""Press check: does the press deliver the pressure the flanges need, and do die and rubber survive it?

Simple force-over-area models, each named beside its number.  The flange
pressure is an estimate for the *start* of folding only; setting a flange
flat against the die, conforming to a small radius and forming flutes or beads
all need far more, so trial parts decide.

Safety: a shop press stores a great deal of energy; the rubber, the blank or
a split die or box can be ejected.  Guard the press, keep hands clear, follow
the press maker's rating and local codes and licensed practice.

Units: forces in N, lengths in mm, areas in mm^2, pressures in MPa.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from diegen.errors import FormingError
from diegen.findings import Finding

Verdict = Literal["full", "partial", "insufficient"]

#: Clearance (mm) between the die footprint and each wall of the rubber box
#: (common practice, no source).
WALL_CLEARANCE_MM = 25.0
#: Rubber at least this many times the die height (from memory, unverified:
#: pad thickness is often quoted as 1.5 to 3 times the form-block height).
RUBBER_TO_DIE_HEIGHT = 1.5
#: Usual pad hardness range, Shore A (common practice, no source).
DUROMETER_RANGE_SHORE_A = (40.0, 60.0)
#: Pressure usually taken as the minimum for rubber-pad forming of light-gauge
#: aluminium ribs: a 20-short-ton press (40,000 lbf) over an 11 in x 11 in box
#: gives about 333 psi (fact of the trade, no source); computed exactly here,
#: 330.6 psi = 2.279 MPa, so that press itself passes.  1 lbf = 4.4482216152605 N
#: and 1 in = 25.4 mm (NIST SP 811).
USUAL_MIN_PRESSURE_MPA = 40_000 * 4.4482216152605 / (11 * 25.4) ** 2

PRESS_CAUTION = (
    "A press stores a great deal of energy: rubber, blank, a split die or box can be ejected. "
    "Guard the press, keep hands clear, stay within its rated load, and follow local codes and "
    "licensed practice."
)

MODELS: tuple[tuple[str, str], ...] = (
    ("pressure_mpa", "press force / box inside area: rubber confined and flowed (hydrostatic)"),
    ("die_contact_pressure_mpa", "press force / die top area: early stroke, load carried by the die alone"),
    (
        "needed_mpa",
        "plastic hinge at the bend line under uniform pressure, p = Sy*t^2/(2*L^2) "
        "(model of our own; start of folding only, a lower bound)",
    ),
    ("fits_box", f"die footprint + {WALL_CLEARANCE_MM:g} mm each side within the box (common practice, no source)"),
    (
        "rubber_ok",
        f"rubber >= {RUBBER_TO_DIE_HEIGHT:g} x die height (from memory, unverified)",
    ),
    ("die_crush_ok", "die contact pressure <= die compressive strength"),
)


def box_pressure(force_n: float, box_w_mm: float, box_l_mm: float) -> float:
    """Rubber pressure (MPa) once the pad has flowed: force / box inside area (common practice)."""
    _positive(force_n=force_n, box_w_mm=box_w_mm, box_l_mm=box_l_mm)
    return force_n / (box_w_mm * box_l_mm)


def die_contact_pressure(force_n: float, die_top_area_mm2: float) -> float:
    """Pressure (MPa) on the die top early in the stroke, when the die carries the whole force."""
    _positive(force_n=force_n, die_top_area_mm2=die_top_area_mm2)
    return force_n / die_top_area_mm2


def flange_fold_pressure(leg_mm: float, thickness_mm: float, yield_mpa: float) -> float:
    """Rubber pressure (MPa) at which a flange leg ``leg_mm`` starts to fold.

    Model of our own (derived, not published): the leg is a cantilever under
    uniform pressure p with a plastic hinge at the bend line; the fully
    plastic moment per unit length ``Sy*t^2/4`` equals ``p*L^2/2``, so
    ``p = Sy*t^2/(2*L^2)``.  A lower bound only.
    """
    _positive(leg_mm=leg_mm, thickness_mm=thickness_mm, yield_mpa=yield_mpa)
    return yield_mpa * thickness_mm**2 / (2.0 * leg_mm**2)


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
    """Result of :func:`press_check`; pressures in MPa, lengths in mm."""

    pressure_mpa: float
    die_contact_pressure_mpa: float
    needed_mpa: float  # largest flange fold pressure
    needed_by_flange_mpa: tuple[float, ...]
    verdict: Verdict
    formable_flanges: tuple[int, ...]  # indices into the flange legs given
    unformable_flanges: tuple[int, ...]
    fits_box: bool
    rubber_ok: bool
    die_crush_ok: bool
    die_life_ok: bool
    durometer_advice: str
    warnings: tuple[Finding, ...]
    models: tuple[tuple[str, str], ...]
    caution: str

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


def press_check(
    force_n: float,
    box_w_mm: float,
    box_l_mm: float,
    die_length_mm: float,
    die_width_mm: float,
    die_top_area_mm2: float,
    die_height_mm: float,
    flange_legs_mm: Sequence[float],
    thickness_mm: float,
    yield_mpa: float,
    rubber_thickness_mm: float,
    rubber_durometer: float,
    die_compressive_mpa: float,
    die_life_parts: int,
    *,
    parts_wanted: int = 1,
    wall_clearance_mm: float = WALL_CLEARANCE_MM,
) -> PressCheck:
    """Check one die in one press.

    ``die_length_mm`` x ``die_width_mm`` is the die's plan bounding box (it
    may sit either way round in the box); ``die_top_area_mm2`` the area of
    its top face; ``flange_legs_mm`` the flange heights to fold;
    ``die_compressive_mpa`` the die material's compressive strength;
    ``die_life_parts`` how many parts the die material is expected to last,
    compared with ``parts_wanted``.

    Verdict: "full" when the box pressure reaches every flange's fold
    pressure, "partial" when it reaches some (listed by index), else
    "insufficient".
    """
    _positive(
        die_length_mm=die_length_mm,
        die_width_mm=die_width_mm,
        die_height_mm=die_height_mm,
        rubber_thickness_mm=rubber_thickness_mm,
        die_compressive_mpa=die_compressive_mpa,
    )
    if not math.isfinite(wall_clearance_mm) or wall_clearance_mm < 0.0:
        raise FormingError(f"wall clearance must be >= 0 mm, got {wall_clearance_mm!r}")
    if die_life_parts < 0 or parts_wanted < 0:
        raise FormingError("die life and parts wanted must be counts >= 0")
    legs = tuple(float(v) for v in flange_legs_mm)
    if not legs:
        raise FormingError("press check needs at least one flange leg")

    pressure = box_pressure(force_n, box_w_mm, box_l_mm)
    contact = die_contact_pressure(force_n, die_top_area_mm2)
    needed = tuple(flange_fold_pressure(leg, thickness_mm, yield_mpa) for leg in legs)
    ok = tuple(i for i, p in enumerate(needed) if p <= pressure)
    bad = tuple(i for i, p in enumerate(needed) if p > pressure)
    need = 2.0 * wall_clearance_mm
    fits = any(
        a + need <= box_w_mm and b + need <= box_l_mm
        for a, b in ((die_length_mm, die_width_mm), (die_width_mm, die_length_mm))
    )
    # a die that does not fit the box cannot be pressed in it at all
    verdict: Verdict = "insufficient" if not fits or not ok else ("full" if not bad else "partial")
    rubber_ok = rubber_thickness_mm >= RUBBER_TO_DIE_HEIGHT * die_height_mm
    crush_ok = contact <= die_compressive_mpa
    life_ok = die_life_parts >= parts_wanted

    warnings: list[Finding] = []
    if pressure < USUAL_MIN_PRESSURE_MPA:
        warnings.append(Finding(
            "press-below-usual", f"box pressure {pressure:.2f} MPa is below the about {USUAL_MIN_PRESSURE_MPA:.2f} MPa "
            "(about 330 psi) usually taken as the minimum for this work (common practice, no source)",
            key="press.force"))
    if not fits:
        warnings.append(Finding(
            "die-too-big-for-box", f"die {die_length_mm:.0f} x {die_width_mm:.0f} mm does not fit a {box_w_mm:.0f} x "
            f"{box_l_mm:.0f} mm box with {wall_clearance_mm:.0f} mm clearance each side", key="press.box"))
    if not rubber_ok:
        warnings.append(Finding(
            "rubber-too-thin", f"rubber {rubber_thickness_mm:.0f} mm is thinner than {RUBBER_TO_DIE_HEIGHT:g} x the "
            f"{die_height_mm:.0f} mm die height ({RUBBER_TO_DIE_HEIGHT * die_height_mm:.0f} mm): "
            "add a layer or lower the die", key="press.rubber.thickness"))
    if not crush_ok:
        warnings.append(Finding(
            "die-may-crush", f"early in the stroke the die top carries {contact:.1f} MPa, more than the die "
            f"material's {die_compressive_mpa:.1f} MPa compressive strength: it may crush or split",
            key="die.material"))
    if not life_ok:
        warnings.append(Finding(
            "die-life-short", f"the die material is expected to last about {die_life_parts} part(s); "
            f"{parts_wanted} are wanted: plan a second die or a harder material", key="die.material"))
    return PressCheck(
        pressure_mpa=pressure,
        die_contact_pressure_mpa=contact,
        needed_mpa=max(needed),
        needed_by_flange_mpa=needed,
        verdict=verdict,
        formable_flanges=ok,
        unformable_flanges=bad,
        fits_box=fits,
        rubber_ok=rubber_ok,
        die_crush_ok=crush_ok,
        die_life_ok=life_ok,
        durometer_advice=durometer_advice(rubber_durometer),
        warnings=tuple(warnings),
        models=MODELS,
        caution=PRESS_CAUTION,
    )
