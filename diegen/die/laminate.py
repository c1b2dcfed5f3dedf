"""Layers for a die laminated from sheet stock thinner than the die (no kernel).

The die (height H, top face at z = 0) is made of ⌈H / t⌉ layers of stock t,
layer 0 on top.  Each layer is cut square-edged along ``outline``: the wall at
the layer's bottom face, which is the smallest section of the layer because
the wall leans inward going down, so a square cut never stands proud of the
die's wall; the rubber pushes the flange into the small steps.  ``top_outline``
is the wall (extended up to the mold line for the top layer) at the layer's
top face, for a shop that bevels each layer.  The top layer's edge still needs
its radius (a round-over cutter).  The last layer is trimmed to reach z = −H.
Both outlines carry the flutes as deep as they are at that face.  All lengths in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from diegen.die.die_input import DieInput, DieRun
from diegen.die.model import depth_level, flute_scale, level_section, outline_model
from diegen.die.outline import OffsetPiece, OutlineModel
from diegen.errors import GeometryError
from diegen.geometry import die_wall

__all__ = ["LaminateLayer", "laminate_layers"]


MAX_LAYERS = 40  # project limit: more glued layers than this is not a die a shop would make


@dataclass(frozen=True)
class LaminateLayer:
    """One sheet of a laminated die: its z range (mm) and outlines (mm, counter-clockwise)."""

    index: int
    z_top_mm: float
    z_bottom_mm: float
    outline: tuple[DieRun, ...]
    top_outline: tuple[DieRun, ...]

    @property
    def thickness_mm(self) -> float:
        """Finished thickness of this layer (mm)."""
        return self.z_top_mm - self.z_bottom_mm


def _runs(pieces: list[OffsetPiece]) -> tuple[DieRun, ...]:
    return tuple(DieRun(p.kind, p.points) for p in pieces)


def laminate_layers(die: DieInput, stock_thickness_mm: float, spacing_mm: float = 1.0) -> list[LaminateLayer]:
    """The layers of ``die`` laminated from stock ``stock_thickness_mm`` thick; curves sampled every ``spacing_mm``."""
    return layer_outlines(die, outline_model(die), stock_thickness_mm, spacing_mm)


def layer_outlines(die: DieInput, model: OutlineModel, stock_thickness_mm: float,
                   spacing_mm: float = 1.0) -> list[LaminateLayer]:
    """:func:`laminate_layers` from the die's checked outline model."""
    if not stock_thickness_mm > 0:
        raise GeometryError(f"stock thickness {stock_thickness_mm} mm must be positive")
    count = max(1, math.ceil(die.height_mm / stock_thickness_mm - 1e-9))
    if count > MAX_LAYERS:
        raise GeometryError(
            f"die {die.part_id}: a {die.height_mm:g} mm die from {stock_thickness_mm:g} mm stock is {count} layers, "
            f"more than the {MAX_LAYERS} a die can sensibly be glued from: use thicker stock (die.stock_thickness)")
    layers = []
    for i in range(count):
        z_top = -i * stock_thickness_mm
        z_bottom = max(-(i + 1) * stock_thickness_mm, -die.height_mm)
        try:
            if die.profiles is not None:  # each run's wall line: the sections' insets change along the outline
                bottom = level_section(die, model, depth_level(die, -z_bottom, True), spacing_mm=spacing_mm)
                top = level_section(die, model, depth_level(die, -z_top, True), spacing_mm=spacing_mm)
                layers.append(LaminateLayer(i, z_top, z_bottom, _runs(bottom), _runs(top)))
                continue
            bottom = model.offset(die_wall.wall_inset_mm(-z_bottom, die.undercut_deg), spacing_mm=spacing_mm,
                                  flute_scale=flute_scale(die, -z_bottom))
            top = model.offset(die_wall.wall_inset_mm(-z_top, die.undercut_deg), spacing_mm=spacing_mm,
                               flute_scale=flute_scale(die, -z_top))
        except GeometryError as exc:
            raise GeometryError(f"die {die.part_id}: layer {i + 1} of {count}: {exc}") from None
        layers.append(LaminateLayer(i, z_top, z_bottom, _runs(bottom), _runs(top)))
    return layers
