"""Plain-text airfoil coordinate files, read into a normalised section loop.

Two common layouts are read (both described, e.g., in the public airfoil
coordinate collections and the file-format notes of several open aerodynamics
codes):

* one loop: an optional title line, then x y rows from the trailing edge over
  one surface to the leading edge and back along the other (upper-first or
  lower-first; the direction is found from the signed area);
* surfaces listed separately: a title line, a line with the two point counts
  (often written as floats, ``43.  41.``), then the upper surface LE -> TE and
  the lower surface LE -> TE.

Lines before the first ``x y`` row (title, notes) and free text after the last
row (notes) are skipped; a line that is not two numbers *between* rows is an
error.  Comments start with ``#``; blank lines are ignored; numbers may be
separated by spaces, tabs, commas or semicolons.  Data in percent of chord (any value above
1.5) is divided by 100.  The result follows the loop convention of
:mod:`diegen.geometry.section` (chord 1, LE at (0, 0), counter-clockwise Selig
order).  Every rejection of the content is an :class:`~diegen.errors.AirfoilError`
whose message starts with ``file:line:``; a path that is not a plain file of at
most :data:`MAX_FILE_BYTES` (missing, a folder, a named pipe, a device, too
large, unreadable) is refused as ``file: what it is, what was expected``,
without opening a pipe or device.
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from diegen.errors import AirfoilError
from diegen.fileio import UnusableInput, read_plain_file
from diegen.geometry.loops import FloatArray, IntArray
from diegen.geometry.section import (
    MIN_POINTS,
    first_x_reversal,
    normalise_with_index,
    self_intersection_index,
    validate,
)

__all__ = [
    "MAX_ABS_COORDINATE",
    "MAX_FILE_BYTES",
    "MAX_POINTS",
    "PERCENT_THRESHOLD",
    "X_REVERSAL_TOL",
    "parse_coordinates",
    "read_coordinates",
]

MAX_FILE_BYTES = 5 * 1024 * 1024  # size guard: refuse larger files unread
EXPECTED = "a plain-text airfoil coordinate file"
MAX_POINTS = 100_000  # size guard: refuse files with more coordinate rows
PERCENT_THRESHOLD = 1.5  # any |value| above this means the data is in percent of chord
X_REVERSAL_TOL = 1e-3  # a surface may step back in x by at most this (fraction of chord)
MAX_ABS_COORDINATE = 1e9  # size guard: no coordinate file (fractions, percent or mm) holds a larger number

_SEPARATORS = re.compile(r"[\s,;]+")


@dataclass(frozen=True)
class _Rows:
    """Numeric rows of a file with their 1-based line numbers."""

    values: FloatArray  # shape (N, 2)
    lines: IntArray  # shape (N,)
    last_line: int


def _number(token: str) -> float | None:
    try:
        return float(token)
    except ValueError:
        try:  # Fortran-style exponent, 1.0D-03
            return float(token.replace("d", "e").replace("D", "E"))
        except ValueError:
            return None


def _read_rows(text: str, name: str) -> _Rows:
    """Collect the 'x y' rows.

    Lines before the first row are the header (title, notes, counts of other
    layouts' extra fields) and lines after the last row are trailing notes; a
    line that is not two numbers between rows is an error.
    """
    values: list[tuple[float, float]] = []
    lines: list[int] = []
    last_line = 1
    stray: tuple[int, str] | None = None  # first non-row line after the rows began
    for line_no, raw in enumerate(text.splitlines(), start=1):
        content = raw.split("#", 1)[0].strip()
        if not content:
            continue
        tokens = [t for t in _SEPARATORS.split(content) if t]
        numbers = [_number(t) for t in tokens] if len(tokens) == 2 else []
        if len(numbers) != 2 or any(v is None for v in numbers):
            if values and stray is None:
                stray = (line_no, content)
            continue
        if stray is not None:
            shown = stray[1] if len(stray[1]) <= 60 else stray[1][:57] + "..."
            raise AirfoilError(f"{name}:{stray[0]}: expected two numbers 'x y', found {shown!r}")
        x, y = float(numbers[0]), float(numbers[1])  # type: ignore[arg-type]
        if not (np.isfinite(x) and np.isfinite(y)):
            raise AirfoilError(f"{name}:{line_no}: coordinates must be finite numbers, found {content[:60]!r}")
        if max(abs(x), abs(y)) > MAX_ABS_COORDINATE:
            raise AirfoilError(f"{name}:{line_no}: coordinate larger than {MAX_ABS_COORDINATE:g}, "
                               f"found {content[:60]!r}")
        values.append((x, y))
        lines.append(line_no)
        last_line = line_no
        if len(values) > MAX_POINTS + 1:
            raise AirfoilError(f"{name}:{line_no}: more than {MAX_POINTS} coordinate rows; refusing so large a file")
    if not values:
        raise AirfoilError(f"{name}:1: no coordinate rows ('x y') found")
    return _Rows(np.array(values, dtype=float), np.array(lines, dtype=np.intp), last_line)


def _is_count(v: float) -> bool:
    return 2.0 <= v <= MAX_POINTS and abs(v - round(v)) < 1e-9


def _build_chain(rows: _Rows, name: str) -> tuple[FloatArray, IntArray]:
    """Arrange the rows as one chain from one TE end to the other; keep line numbers."""
    data, lines = rows.values, rows.lines
    first = data[0]
    if _is_count(first[0]) and _is_count(first[1]):
        n_upper, n_lower = round(float(first[0])), round(float(first[1]))
        rest, rest_lines = data[1:], lines[1:]
        if n_upper + n_lower == len(rest):
            rest = rest / 100.0 if np.abs(rest).max() > PERCENT_THRESHOLD else rest
            upper, lower = rest[:n_upper], rest[n_upper:]
            chain = np.vstack((upper[::-1], lower))
            chain_lines = np.concatenate((rest_lines[:n_upper][::-1], rest_lines[n_upper:]))
            return chain, chain_lines
        if len(rest) and np.abs(rest).max() <= PERCENT_THRESHOLD:
            raise AirfoilError(
                f"{name}:{lines[0]}: point counts {n_upper} + {n_lower} = {n_upper + n_lower} "
                f"do not match the {len(rest)} coordinate rows that follow"
            )
    chain = data / 100.0 if np.abs(data).max() > PERCENT_THRESHOLD else data
    return chain, lines


def offending_point(loop: FloatArray, point_lines: IntArray, near: int) -> int:
    """The point (loop index) to blame for a loop that crosses itself: of the points on the crossing edges, the
    one written first in the file whose removal leaves the outline simple; else the point ``near`` the crossing.

    A mistyped coordinate moves one point across the other surface: both edges to it cross that surface, and
    leaving it out mends the outline, so it is the one named (not the far surface's points it crosses).
    """
    import shapely

    n = len(loop)
    edges = shapely.linestrings(np.stack([loop, np.roll(loop, -1, axis=0)], axis=1))
    tree = shapely.STRtree(edges)
    pairs = tree.query(edges, predicate="intersects")
    candidates: set[int] = set()
    for a, b in zip(*pairs):
        if a < b and (b - a) % n not in (1, n - 1):  # neighbouring edges always meet at their shared point
            candidates.update({int(a), (int(a) + 1) % n, int(b), (int(b) + 1) % n})
    for i in sorted(candidates, key=lambda k: point_lines[k]):
        rest = np.delete(loop, i, axis=0)
        if len(rest) >= 3 and shapely.Polygon(rest).is_valid:
            return i
    return min(candidates, key=lambda k: point_lines[k]) if candidates else near


def parse_coordinates(text: str, name: str = "<text>") -> FloatArray:
    """Parse the text of an airfoil coordinate file into a normalised loop (N, 2).

    ``name`` (usually the file path) prefixes every error message as
    ``name:line:``.  Coordinates come back as fractions of chord.
    """
    if len(text) > MAX_FILE_BYTES:
        raise AirfoilError(f"{name}:1: {len(text)} characters, over the {MAX_FILE_BYTES // 2**20} MB limit")
    rows = _read_rows(text, name)
    if len(rows.values) < MIN_POINTS:
        raise AirfoilError(
            f"{name}:{rows.last_line}: only {len(rows.values)} coordinate rows, at least {MIN_POINTS} needed"
        )
    chain, lines = _build_chain(rows, name)
    loop, index = normalise_with_index(chain, name=f"{name}:{lines[0]}")
    point_lines = lines[index]
    if len(loop) < MIN_POINTS:
        raise AirfoilError(
            f"{name}:{rows.last_line}: only {len(loop)} distinct points, at least {MIN_POINTS} needed"
        )
    i = self_intersection_index(loop)
    if i is not None:
        i = offending_point(loop, point_lines, i)
        raise AirfoilError(f"{name}:{point_lines[i]}: the outline crosses or touches itself at this point "
                           f"({loop[i, 0]:.6g}, {loop[i, 1]:.6g}): check its coordinates")
    i = first_x_reversal(loop, X_REVERSAL_TOL)
    if i is not None:
        raise AirfoilError(
            f"{name}:{point_lines[i]}: a surface doubles back in x here "
            "(each surface must run from the leading edge to the trailing edge)"
        )
    validate(loop, f"{name}:{lines[0]}")
    return loop


def read_coordinates(path: str | os.PathLike[str]) -> FloatArray:
    """Read an airfoil coordinate file (either layout) into a normalised loop (N, 2)."""
    p = Path(path)
    try:
        raw = read_plain_file(p, MAX_FILE_BYTES, EXPECTED)
    except UnusableInput as error:
        raise AirfoilError(str(error)) from None
    return parse_coordinates(raw.decode("utf-8", errors="replace"), name=str(p))
