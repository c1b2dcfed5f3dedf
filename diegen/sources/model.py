"""Plain frozen data of a drawn part (mm, degrees; X–Y plane of the drawing, Y up).

A reader turns a drawing into a :class:`Drawing` (closed contours and pin spots, as drawn);
:func:`diegen.sources.part.drawn_part` picks the outline and holes and lays the flange runs on it
(:class:`DrawnPart`); :func:`diegen.sources.part.drawn_piece` makes the die outline and fills the
geometry layer's :class:`~diegen.geometry.types.PieceGeometry` (:class:`DrawnPiece`).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from diegen.geometry.types import PieceGeometry, Point, Points
from diegen.sources.contour import Contour, Place

OutlineIs = Literal["mold-line", "die"]
OUTLINE_IS: tuple[str, ...] = ("mold-line", "die")
Direction = Literal["up", "down"]
DIRECTIONS: tuple[str, ...] = ("up", "down")


@dataclass(frozen=True)
class DrawnPin:
    """A tooling-pin spot from the drawing (mm) and where it came from (``POINT #3C``)."""

    x: float
    y: float
    origin: str = ""


@dataclass(frozen=True)
class Drawing:
    """What a reader found: closed contours (as drawn, in mm) and pin spots."""

    contours: tuple[Contour, ...]
    pins: tuple[DrawnPin, ...]
    place: Place  # the source's name and the unit its messages show coordinates in

    @property
    def source(self) -> str:
        return self.place.source


@dataclass(frozen=True)
class Flange:
    """One flange's shape: mold-line height and inside bend radius (mm), which way it bends, its angle (deg).

    ``down`` bends away from the person looking at the drawing (into the page), ``up`` towards them.
    ``angle_deg`` is the angle the flange turns through from the web: 90 for a square flange, less for an
    open one (45 for a flange standing at 45° to the web's plane).
    """

    height_mm: float
    bend_radius_mm: float
    direction: Direction = "down"
    angle_deg: float = 90.0


@dataclass(frozen=True)
class AllEdges:
    """Every edge of the outline."""


@dataclass(frozen=True)
class OnLayer:
    """The outline's edges drawn on ``layer`` (DXF layer names compare without regard to case)."""

    layer: str


@dataclass(frozen=True)
class Between:
    """The stretch of the outline from the point nearest ``start`` to the point nearest ``end``, going
    counter-clockwise (the part's inside on the left) as the part is drawn."""

    start: Point
    end: Point


EdgeChoice = AllEdges | OnLayer | Between


@dataclass(frozen=True)
class FlangeRunSpec:
    """A request for a flange along some edges; ``label`` names it in messages (``flanges[1]``)."""

    edges: EdgeChoice
    flange: Flange
    label: str = ""


@dataclass(frozen=True)
class FlangeRun:
    """A flange laid on the outline: edges ``first_edge`` up to (not including) ``stop_edge`` of
    :attr:`DrawnPart.outline` (the outline starts at a run boundary, so no run wraps round)."""

    first_edge: int
    stop_edge: int
    flange: Flange
    label: str = ""


@dataclass(frozen=True)
class DrawnHole:
    """An inner contour; ``circle`` is (centre x, centre y, diameter) in mm when it is round."""

    contour: Contour  # clockwise (material on its left, as an inner ring)
    circle: tuple[float, float, float] | None


@dataclass(frozen=True)
class DrawnPart:
    """A part drawn as an outline, with flanges on some of its edges (mm).

    ``outline`` is counter-clockwise and split at every flange-run boundary; edges in no run are plain
    cut edges.  ``outline_is`` says whether the outline is the finished part's mold line (the die is it
    offset inward by the sheet thickness along its flanged edges) or the die outline itself.
    """

    outline: Contour
    outline_is: OutlineIs
    runs: tuple[FlangeRun, ...]
    holes: tuple[DrawnHole, ...]
    pins: tuple[DrawnPin, ...]
    source: str
    place: Place

    def edge_flanges(self) -> tuple[Flange | None, ...]:
        """The flange on each edge of the outline (None for a cut edge)."""
        flanges: list[Flange | None] = [None] * len(self.outline.edges)
        for run in self.runs:
            for i in range(run.first_edge, run.stop_edge):
                flanges[i] = run.flange
        return tuple(flanges)

    def edge_keys(self) -> tuple[str, ...]:
        """The spec key of the flange run on each edge of the outline ("" for a cut edge)."""
        keys = [""] * len(self.outline.edges)
        for run in self.runs:
            for i in range(run.first_edge, run.stop_edge):
                keys[i] = run.label
        return tuple(keys)


@dataclass(frozen=True)
class DrawnPiece:
    """A drawn part as the geometry layer's piece, with what :class:`PieceGeometry` cannot hold yet.

    ``run_flanges`` gives the flange of each of ``geometry.runs`` (None for a cut edge); ``mirrored`` is
    True when every flange bends up in the drawing, so the die and blank are the drawing's mirror image
    (x → −x) for the flanges to fold down over the die; ``cutouts`` are inner contours that are not round
    (die coordinates), which ``PieceGeometry.holes`` (round holes only) cannot carry.
    """

    geometry: PieceGeometry
    run_flanges: tuple[Flange | None, ...]
    mirrored: bool
    cutouts: tuple[Points, ...] = ()
    rounded_corners: Points = ()  # concave corners of cut edges rounded on the die and blank (drawing's frame, mm)
    rounded_radius_mm: float = 0.0  # their radius
