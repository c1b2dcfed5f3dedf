"""Units a drawing may be given in, as millimetres per unit.

Lengths are those of :mod:`diegen.units` (NIST SP 811: 1 in = 25.4 mm exactly); an SVG path may also be
in CSS pixels or points (CSS Values and Units, absolute lengths: 1 in = 96 px = 72 pt).
"""

from __future__ import annotations

from diegen.errors import DrawingError
from diegen.spec.reader import suggest
from diegen.units import LENGTH_UNITS, MM_PER_IN

DRAWING_UNITS: dict[str, float] = {k: v for k, v in LENGTH_UNITS.items() if k.isalpha()}
SVG_UNITS: dict[str, float] = {**DRAWING_UNITS, "px": MM_PER_IN / 96.0, "pt": MM_PER_IN / 72.0}


def length_unit_mm(name: object, where: str, table: dict[str, float] = DRAWING_UNITS) -> float:
    """Millimetres per ``name`` unit; :class:`DrawingError` naming ``where`` for an unknown one."""
    key = name.strip().lower() if isinstance(name, str) else None
    if key not in table:
        found = repr(name) if isinstance(name, str) else f"{type(name).__name__} {name!r}"
        hint = suggest(key, table) if key else ""
        raise DrawingError(f"{where}: unknown unit {found}{hint} (known: {', '.join(sorted(table))})")
    return table[key]
