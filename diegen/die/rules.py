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

from diegen.die.die_input import DieInput
from diegen.die.laminate import layer_outlines
from diegen.die.model import level_section, loft_levels, outline_model
from diegen.die.outline import OutlineModel
from diegen.die.placement import check_placement
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.die.tiles import die_tile_layout
from diegen.errors import GeometryError


def check_die(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS, model: OutlineModel | None = None
              ) -> OutlineModel:
    """The checked outline model of ``die``; :class:`GeometryError` for the first thing the builder would refuse.

    ``model``: the die's outline model when the caller has made it already (its sections are kept, so the solid
    and the drawings made from it afterwards reuse the ones checked here)."""
    model = outline_model(die, settings) if model is None else model
    arc, wall = loft_levels(die, settings)
    for level in arc + wall[1:]:
        level_section(die, model, level)
    check_placement(die, model, settings)
    if die.layer_mm:
        layer_outlines(die, model, die.layer_mm)
    if die.print_bed_mm:
        die_tile_layout(die, die.print_bed_mm, model)
    return model


def die_refusal(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS) -> str | None:
    """Why the die builder would refuse ``die`` (a message with its remedy), or None when it would build it."""
    try:
        check_die(die, settings)
    except GeometryError as exc:
        return str(exc)
    return None


__all__ = ["check_die", "die_refusal"]
