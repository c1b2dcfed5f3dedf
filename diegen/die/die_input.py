"""Plain-data input of the die (form block) builder.

Conventions (all lengths in mm, all angles in degrees):

* Rib plane X–Y: X along the chord from the leading edge, Y up.
* The die's top face (the face the blank is pinned to) lies at z = 0 and the
  block extends downwards to z = −height_mm.
* The outline is the die's *mold line*: the line where the plane of the top
  face meets the (extended) plane of the side wall.  The wall leans inward by
  ``undercut_deg`` going down, so the bottom outline is the outline offset
  inward by ``height_mm·tan(undercut)``.  The top edge is rounded by
  ``top_radius_mm``, tangent to the top face and to the leaning wall, so the
  flat part of the top face ends at the outline offset inward by the setback
  ``top_radius·(1 + sin α)/cos α`` (see :mod:`diegen.geometry.die_wall`).

Nothing here imports the solid-modelling kernel.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from diegen.geometry.die_wall import WallProfile

__all__ = ["RUN_KINDS", "DieBore", "DieFlute", "DieInput", "DiePin", "DieRun", "RunKind"]

RunKind = Literal["curve", "line"]
RUN_KINDS: tuple[RunKind, ...] = ("curve", "line")


@dataclass(frozen=True)
class DieRun:
    """A piece of the die's top-face outline (mold line), in mm.

    ``kind`` "curve" is a smooth contour (airfoil, joggle ramps), interpolated
    smoothly through ``points``; "line" is a straight end face (at a spar),
    one straight edge between each pair of consecutive points.  Consecutive
    runs share end points; all runs together form one closed counter-clockwise
    loop.
    """

    kind: RunKind
    points: tuple[tuple[float, float], ...]


@dataclass(frozen=True)
class DieFlute:
    """A relief groove in the die wall.

    ``s_mm`` is the arc length along the whole outline, measured from its first
    point, of the groove's centre; ``width_mm`` the groove's width at the wall
    where it is deepest; ``depth_mm`` its full depth into the wall; ``length_mm`` how far down the wall it tapers
    to that depth (its own flange's height; 0: the die's ``flute_length_mm``).
    """

    s_mm: float
    width_mm: float
    depth_mm: float
    length_mm: float = 0.0


@dataclass(frozen=True)
class DieBore:
    """A through bore for a flanged lightening hole; ``d`` is the hole flange's outside diameter (mm)."""

    x: float
    y: float
    d: float


@dataclass(frozen=True)
class DiePin:
    """A dowel (tooling pin) hole of diameter ``d`` drilled ``depth`` deep from the top face (mm)."""

    x: float
    y: float
    d: float
    depth: float


@dataclass(frozen=True)
class DieInput:
    """Everything the die builder needs, in mm and degrees (see the module docstring)."""

    part_id: str
    outline: tuple[DieRun, ...]
    height_mm: float  # stock thickness
    top_radius_mm: float  # springback-compensated die radius on the top edge
    undercut_deg: float  # side walls lean inward going down by this angle (over-bend)
    cutter_radius_mm: float  # no internal concave corner tighter than this (a printed die: the printer's limit)
    # grooves in the wall, depth tapering from 0 at the top (bend line) to full at flange-edge depth
    flutes: tuple[DieFlute, ...] = ()
    flute_length_mm: float = 0.0  # how far down the wall the flutes taper (the flange height; the longest flute's)
    bores: tuple[DieBore, ...] = ()
    pins: tuple[DiePin, ...] = ()
    engraving: tuple[str, ...] = ()  # lines engraved on the BOTTOM face, plus an orientation arrow
    # x of the joints of a die printed in tiles: the marks keep clear of them and each tile is numbered
    tile_joints_x_mm: tuple[float, ...] = ()
    bore_top_radius_mm: float | None = None  # defaults to top_radius_mm
    printed: bool = False  # printed, not routed: ``cutter_radius_mm`` is the printer's smallest inside radius
    min_land_mm: float = 0.0  # least wall between two flutes beyond the outline model's own rule (a printed line)
    layer_mm: float | None = None  # laminated from stock this thick (None: one block)
    print_bed_mm: tuple[float, float] | None = None  # printed in tiles that fit this bed (None: in one piece)
    # the wall profile under each outline run, where a drawn part's runs have bend radii or angles of their own
    # (None: every run takes ``top_radius_mm`` and ``undercut_deg``); an entry None is a cut edge, whose wall only
    # joins its neighbours' (see :mod:`diegen.die.wall`); ``run_names`` names each run in messages (``flanges[2]``)
    profiles: tuple[WallProfile | None, ...] | None = None
    run_names: tuple[str, ...] = ()

    @property
    def inside_limit_text(self) -> str:
        """What limits the die's inside curves, as messages name it."""
        if self.printed:
            return f"the printer's smallest inside radius {self.cutter_radius_mm:g} mm"
        return f"the router cutter radius {self.cutter_radius_mm:g} mm"

    @property
    def bore_radius_mm(self) -> float:
        """Radius on the top edge of every bore (mm)."""
        return self.top_radius_mm if self.bore_top_radius_mm is None else self.bore_top_radius_mm
