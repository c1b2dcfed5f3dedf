"""The one exception family of diegen.

Every error raised on purpose derives from :class:`DiegenError` and from the
matching built-in, so callers may catch either.  The CLI turns any
``DiegenError`` into a clear message and a non-zero exit, never a traceback.
"""

from __future__ import annotations

from dataclasses import dataclass


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
    """Root of every error diegen raises on purpose."""


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


class SolidError(DiegenError, RuntimeError):
    """The solid-modelling kernel refused or produced an invalid die."""


class OutputError(DiegenError, OSError):
    """An output that must not or cannot be written."""


class DrawingError(GeometryError):
    """A drawing (DXF file, SVG path, point list) that cannot be read as a part outline.

    The message names the source (file, entity handle, path position or spec key) and the place in the
    drawing's own units.
    """
