"""The one exception family of diegen.

Every error raised on purpose derives from :class:`DiegenError` and from the
matching built-in, so callers may catch either.  The CLI turns any
``DiegenError`` into a clear message and a non-zero exit, never a traceback.
"""

from __future__ import annotations

import re
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass

__all__ = [
    "AirfoilError",
    "DiegenError",
    "DrawingError",
    "FormingError",
    "GeometryError",
    "MaterialError",
    "NoRoomForMarks",
    "OutputError",
    "Problem",
    "SolidError",
    "SpecError",
]


@dataclass(frozen=True)
class Problem:
    """One located mistake: where it is, what was expected, what was found."""

    message: str
    file: str = ""
    line: int | None = None  # 1-based
    column: int | None = None  # 1-based
    key: str = ""  # key path such as ``spars[1].cap_width``

    def __str__(self) -> str:
        where = self.file or "<spec>"
        if self.line is not None:
            where += f":{self.line}"
            if self.column is not None:
                where += f":{self.column}"
        key = f" {self.key}:" if self.key else ""
        return f"{where}:{key} {self.message}"


class DiegenError(Exception):
    """Root of every error diegen raises on purpose.

    ``key``: the spec key at fault where the raiser knows it (``flange.bend_radius``); a refusal found after the
    schema is located in the spec file by it (see :mod:`diegen.locate`).
    """

    def __init__(self, *args: object, key: str = "") -> None:
        super().__init__(*args)
        self.key = key


class SpecError(DiegenError, ValueError):
    """A spec file that cannot be read or does not validate; holds every problem found."""

    def __init__(self, problems: list[Problem] | Problem):
        self.problems = [problems] if isinstance(problems, Problem) else list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))


class AirfoilError(DiegenError, ValueError):
    """An airfoil coordinate file or section definition that cannot be used."""


class GeometryError(DiegenError, ValueError):
    """Rib geometry that cannot be made (collapsed offset, no room for a hole, ...)."""


class NoRoomForMarks(GeometryError):
    """The die's bottom face has no room for the engraving asked for (the die itself can be made)."""


class FormingError(DiegenError, ValueError):
    """A part that cannot be formed as specified (radius below the minimum, ...)."""


class MaterialError(DiegenError, KeyError):
    """An alloy, die material or bend-radius table name that is not in the catalogue."""

    def __str__(self) -> str:  # KeyError would quote the message
        return str(self.args[0]) if self.args else ""


class SolidError(DiegenError, RuntimeError):
    """The solid-modelling kernel refused or produced an invalid die."""


class OutputError(DiegenError, OSError):
    """An output that must not or cannot be written."""


_INDEXED_KEY = re.compile(r"^([a-z_]+\[\d+\])[ :(]")


@contextmanager
def keyed(key: str) -> Iterator[None]:
    """Errors raised inside without a spec key get ``key`` (or the indexed key their message starts with, such as
    ``lightening_holes[1]``)."""
    try:
        yield
    except DiegenError as error:
        if not error.key and not isinstance(error, SpecError):
            found = _INDEXED_KEY.match(str(error))
            error.key = found[1] if found and found[1].startswith(key) else key
        raise
class DrawingError(GeometryError):
    """A drawing (DXF file, SVG path, point list) that cannot be read as a part outline.

    The message names the source (file, entity handle, path position or spec key) and the place in the
    drawing's own units.
    """
