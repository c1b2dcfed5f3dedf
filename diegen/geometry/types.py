"""Plain data produced by the geometry layer (mm, rib plane X–Y, X aft from the leading edge, Y up).

Point sequences are tuples of ``(x, y)`` so values can be hashed and compared;
numpy arrays stay inside the functions that compute them.
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass
from typing import Literal

from diegen.findings import Finding
from diegen.geometry.loops import loop_length, polyline_length, signed_area

__all__ = ["Hole", "Joggle", "PieceGeometry", "Pin", "Point", "Points", "RibGeometry", "Run"]

Point = tuple[float, float]
Points = tuple[Point, ...]


@dataclass(frozen=True)
class Run:
    """A stretch of a die outline: a smooth contour or a straight end face.

    ``flanged`` is False for a cut end (the tail's aft end) that gets no flange.  ``flange_height_mm`` is the
    run's own mold-line flange height (a drawn part's flange run of its own height); None for the spec's
    ``flange.height`` (every rib run).  ``bend_radius_mm`` and ``angle_deg`` are likewise the run's own inside bend
    radius and the angle its flange is bent through from the web (None: the spec's ``flange.bend_radius``, 90°);
    ``flange_key`` the spec key of the flange run it comes from (``flanges[2]``; "" for a rib's run).
    Consecutive runs share their end points; all runs of a piece form one closed
    counter-clockwise loop.
    """

    kind: Literal["curve", "line"]
    points: Points
    flanged: bool = True
    flange_height_mm: float | None = None
    bend_radius_mm: float | None = None
    angle_deg: float | None = None
    flange_key: str = ""

    def height_mm(self, spec_height_mm: float) -> float:
        """The run's flange height (mm): its own, or the spec's ``spec_height_mm``."""
        return spec_height_mm if self.flange_height_mm is None else self.flange_height_mm

    def radius_mm(self, spec_radius_mm: float) -> float:
        """The run's inside bend radius (mm): its own, or the spec's ``spec_radius_mm``."""
        return spec_radius_mm if self.bend_radius_mm is None else self.bend_radius_mm

    def angle(self) -> float:
        """The angle the run's flange is bent through from the web (degrees): its own, or 90."""
        return 90.0 if self.angle_deg is None else self.angle_deg


@dataclass(frozen=True)
class Joggle:
    """A recess of the die wall where the flange laps a spar cap (a rib) or a passing member (a drawn part).

    A rib's joggle is placed by chord position on its upper or lower wall; a drawn part's (``surface`` "outline")
    by ``path``, the recessed stretch of the die outline, run-outs included (``spar`` is then its index in the
    spec's ``joggles``, and the x fields are unused).
    """

    spar: int  # index into the spec's spars (a part: into its joggles)
    surface: Literal["upper", "lower", "outline"]
    x_start_mm: float  # full-depth zone, along the chord
    x_end_mm: float
    depth_mm: float
    ramp_mm: float  # run-out length at each open end of the zone
    path: Points = ()


@dataclass(frozen=True)
class Hole:
    """A lightening hole: ``d`` is the hole's diameter at the web (the die bore when flanged)."""

    x: float
    y: float
    d: float
    flanged: bool
    flange_height: float


@dataclass(frozen=True)
class Pin:
    """A tooling-pin (dowel) spot shared by the die and the blank."""

    x: float
    y: float
    d: float


def _loop(runs: tuple[Run, ...]) -> Points:
    """Consecutive runs as one closed point loop (each run's last point is the next one's first; no repeated
    closing point)."""
    return tuple(p for run in runs for p in run.points[:-1])


@dataclass(frozen=True)
class PieceGeometry:
    """One rib piece's die outline and web features."""

    name: str  # nose | center | tail
    part_id: str
    x_range_mm: tuple[float, float]
    runs: tuple[Run, ...]
    joggles: tuple[Joggle, ...]
    holes: tuple[Hole, ...]
    pins: tuple[Pin, ...]
    relief_points: Points  # corners where a flanged contour meets a flanged end face
    depth_range_mm: tuple[float, float]
    # The same outline without joggle recesses: contoured-flange strain is judged on it,
    # since a joggle's short S-ramp is a local offset, not a plan curve the flange shrinks or stretches over.
    plain_runs: tuple[Run, ...] = ()
    # Inner contours of a drawn part that are not round holes: cut from the blank, nothing on the die (CW loops).
    cutouts: tuple[Points, ...] = ()
    # The die's own outline where it runs on past a cut end of the piece (a rib tail's aft end), so the blank's end
    # lies on the die's flat top instead of over its rounded top edge; () when the die's outline is the piece's.
    die_runs: tuple[Run, ...] = ()
    die_overrun_mm: float = 0.0  # how far the die runs on past the piece's cut end (0: not at all)

    @property
    def outline(self) -> Points:
        """The piece's closed outline (the flange's inner mold line, the web's edge) as one point loop (no repeated
        closing point): the die's, except where the die runs on past a cut end (:attr:`die_outline`)."""
        return _loop(self.runs)

    @property
    def die_outline(self) -> Points:
        """The die's closed outline (no repeated closing point): the piece's, run on past a cut end where
        :attr:`die_runs` says so."""
        return _loop(self.die_runs or self.runs)

    @property
    def length_mm(self) -> float:
        return loop_length(self.outline)

    @property
    def die_area_mm2(self) -> float:
        """The area inside the die's outline (mm²)."""
        return signed_area(self.die_outline)

    @property
    def die_length_mm(self) -> float:
        """The length of the die's outline (mm)."""
        return loop_length(self.die_outline)

    @property
    def area_mm2(self) -> float:
        return signed_area(self.outline)

    def run_starts_mm(self) -> list[float]:
        """Where each run starts along the outline (mm, from its first point)."""
        starts, s = [], 0.0
        for run in self.runs:
            starts.append(s)
            s += polyline_length(run.points)
        return starts

    def run_at(self, s_mm: float) -> Run:
        """The run ``s_mm`` along the outline (mm, from its first point) lies on."""
        return self.runs[max(bisect.bisect_right(self.run_starts_mm(), s_mm) - 1, 0)]

    def flange_height_at(self, s_mm: float, spec_height_mm: float) -> float:
        """The flange height (mm) of the run ``s_mm`` along the outline lies on: the run's own, or the spec's
        ``spec_height_mm``."""
        return self.run_at(s_mm).height_mm(spec_height_mm)


@dataclass(frozen=True)
class RibGeometry:
    """Everything the 2D layer knows about one rib at one station."""

    rib_id: str
    chord_mm: float
    section: Points  # the airfoil scaled to the chord
    oml: Points  # outer mold line: section offset inward by the skin
    die_outline: Points  # inner mold line of the flange: OML offset inward by the rib sheet
    pieces: tuple[PieceGeometry, ...]
    warnings: tuple[Finding, ...] = ()
