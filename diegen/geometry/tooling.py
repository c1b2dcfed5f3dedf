"""What limits the shapes a die can have: the router cutter of a routed die, the printer of a printed one (mm).

A routed (or machined) die's outline is cut by a cutter of the spec's diameter, so no concave curve of it may be
tighter than the cutter's radius.  A printed die is laid down by a nozzle instead: its concave curves can be as
tight as half a printed line, and its thinnest wall (a land between two flutes) is one line.  The line width is
that of the usual 0.4 mm nozzle (from memory, unverified: common nozzles are 0.4 mm and print lines 0.4–0.45 mm
wide).
"""

from __future__ import annotations

from dataclasses import dataclass

from diegen import materials

PRINT_LINE_WIDTH_MM = 0.4  # from memory, unverified: the usual nozzle's printed line
PRINT_MIN_RADIUS_MM = PRINT_LINE_WIDTH_MM / 2  # an inside curve rounder than half a line prints as drawn


@dataclass(frozen=True)
class Tooling:
    """How a die is made: its smallest inside radius and thinnest wall, and how to name that limit (mm)."""

    printed: bool
    inside_radius_mm: float  # no concave curve of the outline tighter than this
    thinnest_wall_mm: float  # least land the die may have between two grooves (0: no rule beyond the model's own)

    @property
    def limit_text(self) -> str:
        """The limit as a message names it, such as 'the router cutter radius 3 mm'."""
        if self.printed:
            return (f"the printer's smallest inside radius {self.inside_radius_mm:g} mm (half a "
                    f"{PRINT_LINE_WIDTH_MM:g} mm printed line)")
        return f"the router cutter radius {self.inside_radius_mm:g} mm"


def tooling(die_material: str, cutter_diameter_mm: float) -> Tooling:
    """The tooling limits of a die of ``die_material`` cut with a cutter of ``cutter_diameter_mm`` (if routed)."""
    if materials.die_material(die_material).printed:
        return Tooling(True, PRINT_MIN_RADIUS_MM, PRINT_LINE_WIDTH_MM)
    return Tooling(False, cutter_diameter_mm / 2.0, 0.0)


__all__ = ["PRINT_LINE_WIDTH_MM", "PRINT_MIN_RADIUS_MM", "Tooling", "tooling"]
