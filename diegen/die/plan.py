"""The die an analysed piece gets: fitted to the piece (:mod:`~diegen.die.fitting`), then checked by the same
rules the kernel step obeys (:mod:`~diegen.die.rules`), so ``check`` says exactly what ``build`` will make."""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

from diegen.die.die_input import DieInput
from diegen.die.fitting import fit_die
from diegen.die.from_analysis import asked_die_input
from diegen.die.rules import die_refusal
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.die.wall import wall_plan
from diegen.findings import Finding
from diegen.forming.relief import Flute as ReliefFlute
from diegen.forming.relief import flute_gather


@dataclass(frozen=True)
class DiePlan:
    """The die an analysed piece gets: what the builder will make, or why it cannot."""

    die: DieInput  # after fitting: what ``build`` makes
    refusal: str | None = None  # what ``build`` would refuse, with the remedy (None: buildable)
    findings: tuple[Finding, ...] = ()  # what fitting changed, and what that costs
    asked: DieInput | None = None  # the die as the piece asked for it, before fitting

    @property
    def buildable(self) -> bool:
        return self.refusal is None


def plan_die(spec: Any, piece: Any, settings: BuildSettings = DEFAULT_SETTINGS) -> DiePlan:
    """The die of one analysed piece (``spec``: RibSpec, ``piece``: PieceAnalysis), fitted and checked."""
    asked = asked_die_input(spec, piece)
    fitted = fit_die(asked, piece, spec, settings)
    refusal = fitted.refusal if fitted.refusal is not None or fitted.checked else die_refusal(fitted.die, settings)
    findings = fitted.findings + (blend_findings(fitted.die) if refusal is None else ())
    return DiePlan(fitted.die, refusal, findings, asked)


def blend_findings(die: DieInput) -> tuple[Finding, ...]:
    """A ``profile-blend`` finding for each stretch of flange formed where the die's wall changes from one flange
    run's profile to another's (:mod:`diegen.die.wall`): the flange there comes out between the two."""
    plan = wall_plan(die)
    if plan is None:
        return ()
    found = []
    for blend in plan.blends:
        if not blend.on_flange:
            continue
        a, b = blend.before, blend.after
        start, length = blend.flange_mm
        where = f"{blend.inside}'s flange" if blend.inside else \
            f"the flange where {blend.runs[0]} meets {blend.runs[1]}"
        found.append(Finding(
            "profile-blend",
            f"the die wall changes from {blend.runs[0]}'s profile (die radius {a.radius_mm:.2f} mm, die angle "
            f"{a.die_angle_deg:.1f}°) to {blend.runs[1]}'s ({b.radius_mm:.2f} mm, {b.die_angle_deg:.1f}°) over "
            f"{blend.length_mm:.0f} mm: {length:.0f} mm of {where} from {start:.0f} mm along the outline is formed "
            "off its own profile and comes out between the two; finish it by hand, or put a cut edge (with relief) "
            "between the runs", key=_angle_key(blend.inside or blend.runs[1]), s_mm=start))
    return tuple(found)


def _angle_key(run: str) -> str:
    """The spec key a blend on ``run``'s flange is about: its angle (``flanges[2].angle``)."""
    return f"{run}.angle" if run.startswith("flanges[") else "flanges"


def with_die_plan(spec: Any, piece: Any, settings: BuildSettings = DEFAULT_SETTINGS) -> Any:
    """``piece`` (a PieceAnalysis) with its die plan, the flutes the die really carries, and the plan's findings."""
    plan = plan_die(spec, piece, settings)
    findings = tuple(f.about(piece.piece.part_id, spec.positions, rib_id=spec.id) for f in plan.findings)
    changes: dict[str, Any] = {"die": plan, "warnings": piece.warnings + findings}
    if [(f.s_mm, f.width_mm, f.depth_mm) for f in plan.die.flutes] != \
            [(f.s_mm, f.width_mm, f.depth_mm) for f in piece.flutes]:
        changes["flutes"] = tuple(ReliefFlute(f.s_mm, f.width_mm, f.depth_mm, flute_gather(f.width_mm, f.depth_mm))
                                  for f in plan.die.flutes)
    if any(f.code == "profile-blend" for f in findings) and piece.flange.verdict == "formable":
        # a stretch of flange formed on a wall between two runs' profiles comes out at neither angle: the press does
        # not finish it, the hand does
        changes["flange"] = replace(piece.flange, verdict="hand-finish", remedies=(
            "finish the flange by hand where the die wall changes between two runs' profiles (profile-blend)",
            *piece.flange.remedies))
    return replace(piece, **changes)


__all__ = ["DiePlan", "plan_die", "with_die_plan"]
