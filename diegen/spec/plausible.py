"""Numbers that look written in the other unit: a 0.024 mm skin in a ``units: mm`` spec, a 12 in flange in an inch one.

Only bare numbers are judged (a value written with its unit, such as ``"0.8 mm"``, says what it means).  A value
draws a warning when it lies outside the range a home-built rib's part usually has and the same number read in
the other unit lies inside it.  The ranges are wide on purpose (common practice, no source): they catch a number
off by a factor of 25.4, not an unusual design.
"""

from __future__ import annotations

import re
from collections.abc import Iterator

from diegen.errors import Problem
from diegen.spec.yamltree import YNode
from diegen.units import MM_PER_IN

# key path (list indices as [], the prefix of overrides and of a set's drawings removed) -> the usual range, mm
# (common practice, no source)
USUAL_MM: dict[str, tuple[float, float]] = {
    "chord": (100.0, 5000.0),
    "planform.root_chord": (100.0, 5000.0),
    "planform.tip_chord": (50.0, 5000.0),
    "planform.span": (150.0, 30000.0),
    "skin_thickness": (0.2, 5.0),
    "sheet.thickness": (0.2, 5.0),
    "flange.height": (3.0, 100.0),
    "flanges[].height": (3.0, 100.0),  # a drawn part's flange run of its own height
    "flange.bend_radius": (0.25, 30.0),
    "flange.min_tail_depth": (5.0, 300.0),
    "spars[].web": (0.3, 40.0),
    "spars[].cap_thickness": (0.3, 20.0),
    "spars[].cap_width": (4.0, 150.0),
    "lightening_holes[].d": (8.0, 600.0),
    "lightening_holes[].flange_height": (1.0, 40.0),
    "hole_rules.edge_margin": (1.0, 60.0),
    "hole_rules.ligament": (2.0, 100.0),
    "hole_rules.min_diameter": (5.0, 300.0),
    "hole_rules.flange_height": (1.0, 40.0),
    "dowel_diameter": (1.0, 20.0),
    "die.stock_thickness": (3.0, 200.0),
    "die.cutter_diameter": (1.0, 40.0),
    "press.box[]": (100.0, 3000.0),
    "press.rubber.thickness": (5.0, 400.0),
    "press.wall_clearance": (3.0, 300.0),
}
WORDS = {"in": "inches", "mm": "millimetres"}
_INDEX = re.compile(r"\[\d+\]")
_OVERRIDE = re.compile(r"^(overrides\[\d+\]|drawings)\.")  # a wing's overrides, a set's drawings: the same keys


def unit_warnings(tree: YNode, units: str, file: str) -> list[Problem]:
    """A warning (as a located :class:`Problem`) for every bare number that looks written in the other unit."""
    other = "mm" if units == "in" else "in"
    to_mm = MM_PER_IN if units == "in" else 1.0
    other_to_mm = MM_PER_IN if other == "in" else 1.0
    found = []
    for path, node in _leaves(tree, ""):
        usual = USUAL_MM.get(_INDEX.sub("[]", _OVERRIDE.sub("", path)))
        value = node.value
        if usual is None or isinstance(value, bool) or not isinstance(value, (int, float)) or value <= 0:
            continue
        low, high = usual
        as_written, as_other = value * to_mm, value * other_to_mm
        if not low <= as_written <= high and low <= as_other <= high:
            written = f"{value:g} mm" if units == "mm" else f"{value:g} in ({as_written:.4g} mm)"
            found.append(Problem(
                f"{written} is outside the usual {low:g}–{high:g} mm for this value and looks like {WORDS[other]}: "
                f"{value:g} {other} would be {as_other:.4g} mm; write the unit with the number (\"{value:g} {other}\") "
                "if that is what is meant", file, node.line, node.column, path))
    return found


def _leaves(node: YNode, path: str) -> Iterator[tuple[str, YNode]]:
    if node.is_map:
        for key, child in node.value.items():
            yield from _leaves(child, f"{path}.{key}" if path else str(key))
    elif node.is_list:
        for i, child in enumerate(node.value):
            yield from _leaves(child, f"{path}[{i}]")
    else:
        yield path, node


__all__ = ["USUAL_MM", "unit_warnings"]
