"""Single-stroke lettering for the die's bottom face (pure 2D, no kernel).

The die is marked with its part id, the sheet and an arrow.  The letters are
drawn as straight strokes, the way a router engraves with a V or ball bit
following a centre line; each stroke is a groove of one width, so the marks
are polygons with straight sides only (cheap for the kernel and for the STL).

Glyphs are drawn on a grid 4 units wide and 6 units tall (the cap height);
the advance is 6 units.  Round letters and digits are drawn square, as on a
segment display: every corner costs the solid two faces.  Lower-case letters are engraved as capitals;
characters outside the alphabet below are engraved as "?".  All lengths in mm
unless stated in grid units.
"""

from __future__ import annotations

from shapely.geometry import LineString, MultiPolygon, Polygon
from shapely.ops import unary_union

Stroke = tuple[tuple[float, float], ...]

CAP_UNITS = 6.0  # cap height in grid units
ADVANCE_UNITS = 6.0  # from one letter to the next
WIDTH_UNITS = 4.0  # width of a letter
STROKE_FRACTION = 0.125  # groove width as a fraction of the cap height (design choice)

_O = ((0, 0), (0, 6), (4, 6), (4, 0), (0, 0))
_P = ((0, 0), (0, 6), (4, 6), (4, 3), (0, 3))

GLYPHS: dict[str, tuple[Stroke, ...]] = {
    " ": (),
    "A": (((0, 0), (0, 4), (2, 6), (4, 4), (4, 0)), ((0, 3), (4, 3))),
    "B": (((0, 0), (0, 6), (3, 6), (4, 5), (4, 4), (3, 3), (0, 3)), ((3, 3), (4, 2), (4, 1), (3, 0), (0, 0))),
    "C": (((4, 6), (0, 6), (0, 0), (4, 0)),),
    "D": (((0, 0), (0, 6), (2, 6), (4, 4), (4, 2), (2, 0), (0, 0)),),
    "E": (((4, 6), (0, 6), (0, 0), (4, 0)), ((0, 3), (3, 3))),
    "F": (((4, 6), (0, 6), (0, 0)), ((0, 3), (3, 3))),
    "G": (((4, 6), (0, 6), (0, 0), (4, 0), (4, 3), (2, 3)),),
    "H": (((0, 0), (0, 6)), ((4, 0), (4, 6)), ((0, 3), (4, 3))),
    "I": (((1, 6), (3, 6)), ((2, 6), (2, 0)), ((1, 0), (3, 0))),
    "J": (((4, 6), (4, 0), (0, 0), (0, 2)),),
    "K": (((0, 0), (0, 6)), ((4, 6), (0, 2)), ((1, 3), (4, 0))),
    "L": (((0, 6), (0, 0), (4, 0)),),
    "M": (((0, 0), (0, 6), (2, 3), (4, 6), (4, 0)),),
    "N": (((0, 0), (0, 6), (4, 0), (4, 6)),),
    "O": (_O,),
    "P": (_P,),
    "Q": (_O, ((2, 2), (4, 0))),
    "R": (_P, ((2, 3), (4, 0))),
    "S": (((4, 5), (3, 6), (1, 6), (0, 5), (0, 4), (1, 3), (3, 3), (4, 2), (4, 1), (3, 0), (1, 0), (0, 1)),),
    "T": (((0, 6), (4, 6)), ((2, 6), (2, 0))),
    "U": (((0, 6), (0, 0), (4, 0), (4, 6)),),
    "V": (((0, 6), (2, 0), (4, 6)),),
    "W": (((0, 6), (1, 0), (2, 3), (3, 0), (4, 6)),),
    "X": (((0, 6), (4, 0)), ((0, 0), (4, 6))),
    "Y": (((0, 6), (2, 3), (4, 6)), ((2, 3), (2, 0))),
    "Z": (((0, 6), (4, 6), (0, 0), (4, 0)),),
    "0": (_O, ((0, 0), (4, 6))),  # slashed, unlike the letter O
    "1": (((1, 5), (2, 6), (2, 0)), ((1, 0), (3, 0))),
    "2": (((0, 6), (4, 6), (4, 3), (0, 3), (0, 0), (4, 0)),),
    "3": (((0, 6), (4, 6), (4, 0), (0, 0)), ((1, 3), (4, 3))),
    "4": (((3, 0), (3, 6), (0, 2), (4, 2)),),
    "5": (((4, 6), (0, 6), (0, 3), (3, 3), (4, 2), (4, 1), (3, 0), (1, 0), (0, 1)),),
    "6": (((4, 6), (0, 6), (0, 0), (4, 0), (4, 3), (0, 3)),),
    "7": (((0, 6), (4, 6), (1, 0)),),
    "8": (_O, ((0, 3), (4, 3))),
    "9": (((0, 0), (4, 0), (4, 6), (0, 6), (0, 3), (4, 3)),),
    "-": (((1, 3), (3, 3)),),
    "_": (((0, 0), (4, 0)),),
    ".": (((2, 0), (2, 0.5)),),
    ",": (((2, 0.5), (1.5, -1)),),
    "/": (((0, 0), (4, 6)),),
    "+": (((0, 3), (4, 3)), ((2, 1), (2, 5))),
    "=": (((0, 2), (4, 2)), ((0, 4), (4, 4))),
    ":": (((2, 1), (2, 1.5)), ((2, 4), (2, 4.5))),
    "(": (((3, 6), (2, 5), (2, 1), (3, 0)),),
    ")": (((1, 6), (2, 5), (2, 1), (1, 0)),),
    "#": (((1, 0), (1, 6)), ((3, 0), (3, 6)), ((0, 2), (4, 2)), ((0, 4), (4, 4))),
    "°": (((1, 6), (2, 6), (2, 5), (1, 5), (1, 6)),),
    "?": (((0, 5), (1, 6), (3, 6), (4, 5), (4, 4), (2, 3), (2, 2)), ((2, 0), (2, 0.5))),
}


def engraved_text(line: str) -> str:
    """The text as it will be engraved: capitals, unknown characters as "?"."""
    return "".join(c if c in GLYPHS else "?" for c in line.upper())


def line_width_units(line: str) -> float:
    """Width of the engraved line in grid units (letters and the gaps between them)."""
    n = len(engraved_text(line))
    return 0.0 if n == 0 else (n - 1) * ADVANCE_UNITS + WIDTH_UNITS


def line_strokes(line: str) -> list[Stroke]:
    """The strokes of a line in grid units, the first letter's lower left corner at the origin."""
    strokes: list[Stroke] = []
    for i, char in enumerate(engraved_text(line)):
        dx = i * ADVANCE_UNITS
        strokes += [tuple((x + dx, y) for x, y in stroke) for stroke in GLYPHS[char]]
    return strokes


def stroke_polygons(strokes: list[Stroke], width: float) -> list[Polygon]:
    """The grooves of ``strokes`` ``width`` wide (same units), merged where they touch; straight sides only."""
    shapes = [LineString(s).buffer(width / 2.0, cap_style="square", join_style="mitre", mitre_limit=2.0)
              for s in strokes if len(s) >= 2]
    if not shapes:
        return []
    merged = unary_union(shapes).simplify(width * 1e-3)
    parts = list(merged.geoms) if isinstance(merged, MultiPolygon) else [merged]
    return [p for p in parts if isinstance(p, Polygon) and not p.is_empty]


__all__ = ["ADVANCE_UNITS", "CAP_UNITS", "GLYPHS", "STROKE_FRACTION", "WIDTH_UNITS", "Stroke", "engraved_text",
           "line_strokes", "line_width_units", "stroke_polygons"]
