"""The die's wall profile, in the plane normal to the outline.

Coordinates of the profile: ``inset`` (mm) measured horizontally inward from
the outline (the mold line), ``depth`` (mm) measured down from the top face.
The wall is the straight line ``inset = depth·tan α`` (α = undercut); the top
edge is a circular arc of radius R tangent to the top face and to that wall.
The arc spans 90° + α.  Elementary plane geometry (a circle inscribed in the
corner between two lines) gives:

* setback of the tangent point on the top face: ``t = R·(1 + sin α)/cos α``
  (= R·cot((90° − α)/2));
* arc centre at ``(t, R)``; point at arc angle θ (0 at the top face):
  ``inset = t − R·sin θ``, ``depth = R·(1 − cos θ)``, θ ∈ [0, 90° + α];
* the arc meets the wall at depth ``R·(1 + sin α)``;
* bottom outline (depth H): inset ``H·tan α`` — the top radius changes only the
  top edge, not the bottom outline;
* widest point of the die: the arc's vertical tangent, inset ``t − R``.

For α = 0 this reduces to the familiar inset R·(1 − sin θ), depth R·(1 − cos θ).

The same relations hold for a signed lean: a flange bent through less than 90° (a die angle θd under 90°) sits on
a wall leaning *out* going down, α = θd − 90° < 0.  Then the top setback ``R·(1 + sin α)/cos α`` equals
``R·tan(θd/2)`` (the tangent length of an arc of angle θd: (1 + sin α)/cos α = (1 − cos θd)/sin θd = tan(θd/2)),
the arc spans θd = 90° + α, the wall inset ``depth·tan α`` is negative (the die grows outward going down), and the
widest point is the bottom.  :class:`WallProfile` is one such profile; a drawn part's runs may each have their own.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = [
    "WallProfile",
    "WallSection",
    "arc_fraction_point",
    "fillet_end_depth_mm",
    "fillet_point",
    "fillet_sections",
    "inset_at_depth",
    "largest_inset_mm",
    "largest_outset_mm",
    "top_setback_mm",
    "wall_inset_mm",
]


@dataclass(frozen=True)
class WallSection:
    """One section of the die loft: the outline offset inward by ``inset_mm`` at depth ``depth_mm``."""

    inset_mm: float
    depth_mm: float


@dataclass(frozen=True)
class WallProfile:
    """The wall profile of one flange run's die: the top-edge radius (mm) and the signed lean from the vertical,
    die angle − 90° (degrees; positive leans in going down, the over-bend of a square flange)."""

    radius_mm: float
    lean_deg: float

    @property
    def die_angle_deg(self) -> float:
        """The angle the die bends the flange through, 90° + lean."""
        return 90.0 + self.lean_deg


def arc_fraction_point(profile: WallProfile, fraction: float) -> WallSection:
    """The point of ``profile``'s top-edge arc ``fraction`` (0 to 1) of the way from the top face to the wall."""
    return fillet_point(profile.radius_mm, profile.lean_deg, (90.0 + profile.lean_deg) * fraction)


def inset_at_depth(profile: WallProfile, depth_mm: float) -> float:
    """The wall's inset (mm) at ``depth_mm`` below the top face: on the top-edge arc (centre at (t, R), its outer
    side: ``t − √(R² − (R − depth)²)``) down to where it meets the wall, then ``depth·tan α``."""
    r, a = profile.radius_mm, profile.lean_deg
    if depth_mm >= fillet_end_depth_mm(r, a):
        return wall_inset_mm(depth_mm, a)
    d = max(depth_mm, 0.0)
    return top_setback_mm(r, a) - math.sqrt(max(r * r - (r - d) ** 2, 0.0))


def top_setback_mm(radius_mm: float, undercut_deg: float) -> float:
    """Inset of the top-face tangent line from the outline, ``R·(1 + sin α)/cos α`` (mm)."""
    a = math.radians(undercut_deg)
    return radius_mm * (1.0 + math.sin(a)) / math.cos(a)


def fillet_end_depth_mm(radius_mm: float, undercut_deg: float) -> float:
    """Depth where the top-edge arc meets the straight wall, ``R·(1 + sin α)`` (mm)."""
    return radius_mm * (1.0 + math.sin(math.radians(undercut_deg)))


def wall_inset_mm(depth_mm: float, undercut_deg: float) -> float:
    """Inset of the straight wall at ``depth_mm`` below the top face, ``depth·tan α`` (mm)."""
    return depth_mm * math.tan(math.radians(undercut_deg))


def fillet_point(radius_mm: float, undercut_deg: float, theta_deg: float) -> WallSection:
    """Point of the top-edge arc at arc angle ``theta_deg`` (0 = on the top face, 90 + α = on the wall)."""
    t = top_setback_mm(radius_mm, undercut_deg)
    th = math.radians(theta_deg)
    return WallSection(t - radius_mm * math.sin(th), radius_mm * (1.0 - math.cos(th)))


def fillet_sections(radius_mm: float, undercut_deg: float, count: int) -> tuple[WallSection, ...]:
    """``count`` (>= 2) sections evenly spaced in arc angle over the whole top-edge arc."""
    if count < 2:
        raise ValueError("at least two fillet sections are needed")
    span = 90.0 + undercut_deg
    return tuple(fillet_point(radius_mm, undercut_deg, span * i / (count - 1)) for i in range(count))


def largest_inset_mm(radius_mm: float, undercut_deg: float, height_mm: float) -> float:
    """The largest inset of any section of a die ``height_mm`` tall: the top setback or the bottom inset (mm)."""
    return max(top_setback_mm(radius_mm, undercut_deg), wall_inset_mm(height_mm, undercut_deg))


def largest_outset_mm(radius_mm: float, undercut_deg: float, height_mm: float) -> float:
    """How far outside the outline any section of a die ``height_mm`` tall reaches (mm, 0 for a wall leaning in):
    the bottom of a wall leaning out, ``−H·tan α``."""
    return max(0.0, -wall_inset_mm(height_mm, undercut_deg))
