"""Everything the die builder can refuse, decided without the kernel; and the die each analysed piece gets.

One set of rules for ``diegen check`` and ``diegen build``: :func:`check_die` runs every check the die builder
makes before it calls the kernel — the die's numbers, the outline (loop, inside curves against the router cutter
or the printer, outside curves against the wall's inset), the flutes' placement, every horizontal section the
kernel lofts (none may cross itself), the holes, pins and their walls, the laminate layers' outlines and the
print-bed tiles — and :func:`diegen.die.occ.form_block.build_die` calls it first, so the kernel is only asked for
dies that pass.

:func:`plan_die` is what the analysis calls for each piece: the die as the piece asks for it, fitted where it
can be (flutes the wall can hold, a wall the piece can hold: :mod:`diegen.die.fitting`), with a finding for each
change, and the refusal that is left, if any, with its remedy.  Lengths in mm, angles in degrees.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

from diegen.die.die_input import DieInput
from diegen.die.from_analysis import asked_die_input
from diegen.die.laminate import layer_outlines
from diegen.die.model import loft_sections, outline_model, section
from diegen.die.outline import OutlineModel
from diegen.die.placement import check_placement
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.die.tiling import TilePlan, plan_tiles
from diegen.errors import GeometryError
from diegen.findings import Finding


def check_die(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS) -> OutlineModel:
    """The checked outline model of ``die``; :class:`GeometryError` for the first thing the builder would refuse."""
    model = outline_model(die, settings)
    arc, wall = loft_sections(die, settings)
    for s in arc + wall[1:]:
        section(die, model, s.inset_mm, s.depth_mm)
    check_placement(die, model, settings)
    if die.layer_mm:
        layer_outlines(die, model, die.layer_mm)
    if die.print_bed_mm:
        plan_tiles(die, model, die.print_bed_mm, settings)
    return model


def die_refusal(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS) -> str | None:
    """Why the die builder would refuse ``die`` (a message with its remedy), or None when it would build it."""
    try:
        check_die(die, settings)
    except GeometryError as exc:
        return str(exc)
    return None


def tile_plan(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS) -> TilePlan | None:
    """The print-bed tiles of a die :func:`check_die` passed (None: no print bed)."""
    if not die.print_bed_mm:
        return None
    return plan_tiles(die, outline_model(die, settings), die.print_bed_mm, settings)


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
    from diegen.die.fitting import fit_die

    asked = asked_die_input(spec, piece)
    fitted = fit_die(asked, piece, spec, settings)
    refusal = fitted.refusal if fitted.refusal is not None or fitted.checked else die_refusal(fitted.die, settings)
    return DiePlan(fitted.die, refusal, fitted.findings, asked)


def with_die_plan(spec: Any, piece: Any, settings: BuildSettings = DEFAULT_SETTINGS) -> Any:
    """``piece`` (a PieceAnalysis) with its die plan, the flutes the die really carries, and the plan's findings."""
    from diegen.forming.relief import Flute as ReliefFlute
    from diegen.forming.relief import flute_gather

    plan = plan_die(spec, piece, settings)
    findings = tuple(f.about(piece.piece.part_id, spec.positions) for f in plan.findings)
    changes: dict[str, Any] = {"die": plan, "warnings": piece.warnings + findings}
    if [(f.s_mm, f.width_mm, f.depth_mm) for f in plan.die.flutes] != \
            [(f.s_mm, f.width_mm, f.depth_mm) for f in piece.flutes]:
        changes["flutes"] = tuple(ReliefFlute(f.s_mm, f.width_mm, f.depth_mm, flute_gather(f.width_mm, f.depth_mm))
                                  for f in plan.die.flutes)
    return replace(piece, **changes)


__all__ = ["DiePlan", "check_die", "die_refusal", "plan_die", "tile_plan", "with_die_plan"]
