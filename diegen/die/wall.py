"""A die wall whose profile changes along the outline: a drawn part's flange runs of their own bend radius or angle.

Each flanged run's wall has its own profile (:class:`~diegen.geometry.die_wall.WallProfile`: the die radius and the
signed lean, die angle − 90°).  The die is still lofted through sections (:mod:`diegen.die.model`), one per *loft
level*: a fraction of the way along the top-edge arc (0 at the top face, 1 where the arc meets the wall), or a depth
down the straight wall.  At one level each profile gives its own inset and depth (:func:`level_point`); along a run
of one profile both are constant, so a die of one profile has plane sections exactly as before.  Between two
profiles the inset and depth of every level go from one profile's to the other's with the quintic run-out
``w(x) = 10x³ − 15x⁴ + 6x⁵`` the joggles use (:func:`diegen.geometry.pieces.joggle_inset`): zero slope and
curvature at both ends, so the wall stays smooth where a blend begins and ends.  An arc level's section then
climbs or sinks along the blend (it is not plane); a depth level stays plane.

Where a blend goes (design choices):

* between two flanged runs across cut edges: centred in the longest of those cut edges (no flange is formed on a
  blended wall there);
* between two flanged runs that meet smoothly (no corner): centred on the junction;
* between two flanged runs that meet at a corner: inside the longer of the two, ending clear of the corner (the
  sections' corner point must have one depth).

The flange formed over a blend (the last two cases) is formed on a wall between the two profiles: the analysis
says where (finding ``profile-blend``).  A blend's length is ``max(BLEND_MIN_MM, BLEND_PER_MM × Δ)``, Δ the largest
change of inset or depth of any level between the two profiles, so the wall turns along the outline at most
15/16 as fast as it changes (the quintic's steepest slope is 15/8 of its mean).  A blend that does not fit —
longer than its run less the corner margins, or overlapping another — is refused, naming the runs.
Lengths in mm along the outline model's parameter (the chord length along each run's points), angles in degrees.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from diegen.die.die_input import DieInput, DieRun
from diegen.errors import GeometryError
from diegen.geometry import die_wall
from diegen.geometry.die_wall import WallProfile, WallSection
from diegen.geometry.loops import FloatArray, polyline_length

__all__ = ["BLEND_MIN_MM", "BLEND_PER_MM", "CORNER_DEG", "Blend", "LoftLevel", "WallPlan", "level_point", "quintic",
           "wall_plan"]

BLEND_MIN_MM = 10.0  # project limit: the shortest stretch a wall changes its profile over
BLEND_PER_MM = 2.0  # project limit: blend length per mm of change of inset or depth (slope at most 15/16)
CORNER_DEG = 1.0  # runs meeting at a turn of this much or more meet at a corner (project limit)
_LEVEL_SAMPLES = 11  # arc fractions compared when sizing a blend


@dataclass(frozen=True)
class LoftLevel:
    """A loft level: ``fraction`` of the top-edge arc (0: the top face, 1: the arc's end) or, with ``fraction``
    None, the plane ``depth_mm`` below the top face."""

    fraction: float | None = None
    depth_mm: float = 0.0
    on_wall_line: bool = False  # a plane level on the straight wall's line extended up (a laminate layer's outline)


def level_point(profile: WallProfile, level: LoftLevel) -> WallSection:
    """Inset and depth (mm) of ``profile``'s wall at ``level``."""
    if level.fraction is not None:
        return die_wall.arc_fraction_point(profile, level.fraction)
    if level.on_wall_line:
        return WallSection(die_wall.wall_inset_mm(level.depth_mm, profile.lean_deg), level.depth_mm)
    return WallSection(die_wall.inset_at_depth(profile, level.depth_mm), level.depth_mm)


def quintic(x: FloatArray) -> tuple[FloatArray, FloatArray]:
    """The run-out ``w = 10x³ − 15x⁴ + 6x⁵`` on [0, 1] (clipped outside) and its slope dw/dx."""
    x = np.clip(x, 0.0, 1.0)
    return x**3 * (10.0 - 15.0 * x + 6.0 * x * x), 30.0 * x * x * (1.0 - x) ** 2


@dataclass(frozen=True)
class Blend:
    """The wall changing from ``before`` to ``after`` over ``length_mm`` from ``start_mm`` along the outline;
    ``on_flange``: the blend lies on a flange (two flanged runs meet there), ``runs`` the names of the runs,
    ``inside`` the one it lies in (a cut edge's, or at a smooth junction the later run's); ``flange_mm`` the stretch
    (start, length) of flange formed off its own profile: the blend, and at a corner the margin between it and the
    corner, where the wall keeps the other run's profile."""

    start_mm: float
    length_mm: float
    before: WallProfile
    after: WallProfile
    on_flange: bool
    runs: tuple[str, str]
    inside: str = ""
    flange_mm: tuple[float, float] = (0.0, 0.0)


@dataclass(frozen=True)
class WallPlan:
    """The wall profile along the whole outline: constant between blends, each blend going from the profile before
    it to the profile after it (the one before the next blend)."""

    perimeter_mm: float
    blends: tuple[Blend, ...]  # in order along the outline, the first starting at or after 0

    @property
    def profiles(self) -> tuple[WallProfile, ...]:
        return tuple(dict.fromkeys(p for b in self.blends for p in (b.before, b.after)))

    @property
    def varying_mm(self) -> tuple[tuple[float, float], ...]:
        """The stretches (start, end) along the outline where the wall changes (an end past the perimeter wraps)."""
        return tuple((b.start_mm, b.start_mm + b.length_mm) for b in self.blends)

    def values(self, at_mm: FloatArray, level: LoftLevel) -> tuple[FloatArray, FloatArray, FloatArray]:
        """(inset, d inset / d s, depth) of the section at ``level`` at each position ``at_mm`` along the outline."""
        s = np.asarray(at_mm, dtype=float) % self.perimeter_mm
        since = np.stack([(s - b.start_mm) % self.perimeter_mm for b in self.blends])
        latest = np.argmin(since, axis=0)  # the last blend begun at or before each position
        inset, slope, depth = np.zeros(s.shape), np.zeros(s.shape), np.zeros(s.shape)
        for i, blend in enumerate(self.blends):
            a, b = level_point(blend.before, level), level_point(blend.after, level)
            mine = latest == i
            x = since[i][mine] / blend.length_mm
            w, dw = quintic(x)
            inset[mine] = a.inset_mm + w * (b.inset_mm - a.inset_mm)
            slope[mine] = np.where(x < 1.0, dw * (b.inset_mm - a.inset_mm) / blend.length_mm, 0.0)
            depth[mine] = a.depth_mm + w * (b.depth_mm - a.depth_mm)
        return inset, slope, depth


def _turn_deg(before: DieRun, after: DieRun) -> float:
    a, b, c = (np.asarray(p, dtype=float) for p in (before.points[-2], before.points[-1], after.points[1]))
    u, v = b - a, c - b
    return abs(math.degrees(math.atan2(u[0] * v[1] - u[1] * v[0], float(u @ v))))


def blend_length_mm(a: WallProfile, b: WallProfile, height_mm: float) -> float:
    """How long the wall takes to change from ``a`` to ``b`` (mm): see the module docstring."""
    levels = [LoftLevel(f) for f in np.linspace(0.0, 1.0, _LEVEL_SAMPLES)] + [LoftLevel(None, height_mm)]
    change = max(max(abs(level_point(a, v).inset_mm - level_point(b, v).inset_mm),
                     abs(level_point(a, v).depth_mm - level_point(b, v).depth_mm)) for v in levels)
    return max(BLEND_MIN_MM, BLEND_PER_MM * change)


def corner_margin_mm(profiles: Sequence[WallProfile], height_mm: float, turn_deg: float) -> float:
    """How far a blend keeps from a corner that turns ``turn_deg`` (mm): the largest inward inset of any section
    times tan(turn/2) (each section's offset edges are trimmed back from the corner by that much: plane geometry of
    two lines offset inward), plus 1 mm; a turn is taken as at least 90° and at most 150° (project limit)."""
    inward = max(max(die_wall.largest_inset_mm(p.radius_mm, p.lean_deg, height_mm), 0.0) for p in profiles)
    return inward * math.tan(math.radians(min(max(turn_deg, 90.0), 150.0)) / 2.0) + 1.0


def wall_plan(die: DieInput) -> WallPlan | None:
    """The wall along ``die``'s outline, or None for a die of one profile (``die.profiles`` None, or every flanged
    run's alike: the die's ``top_radius_mm`` and ``undercut_deg``).  Raises :class:`GeometryError` for a blend
    that has no room."""
    if die.profiles is None:
        return None
    runs = die.outline
    profiles = die.profiles
    if len(profiles) != len(runs):
        raise GeometryError(f"die {die.part_id}: {len(profiles)} wall profiles for {len(runs)} outline runs")
    flanged = [i for i, p in enumerate(profiles) if p is not None]
    if len({profiles[i] for i in flanged}) <= 1:
        return None
    names = die.run_names or tuple(f"outline run {i + 1}" for i in range(len(runs)))
    lengths = [polyline_length(r.points) for r in runs]
    starts = np.concatenate([[0.0], np.cumsum(lengths)])
    perimeter = float(starts[-1])
    used = [p for p in profiles if p is not None]
    turns = [_turn_deg(runs[i - 1], runs[i]) for i in range(len(runs))]  # at the start of each run

    def margin(index: int) -> float:
        """The margin a blend in run ``index`` keeps from its ends (its corners')."""
        turn = max(turns[index], turns[(index + 1) % len(runs)])
        return corner_margin_mm(used, die.height_mm, turn) if turn >= CORNER_DEG else 0.0

    blends: list[Blend] = []
    for k, a in enumerate(flanged):
        b = flanged[(k + 1) % len(flanged)]
        pa, pb = profiles[a], profiles[b]
        assert pa is not None and pb is not None
        if pa == pb:
            continue
        need = blend_length_mm(pa, pb, die.height_mm)
        between = [(a + j) % len(runs) for j in range(1, (b - a) % len(runs))]
        what = f"the die wall changes from {names[a]}'s profile to {names[b]}'s over {need:.1f} mm"
        if between:
            c = max(between, key=lambda i: lengths[i])
            room = lengths[c] - 2.0 * margin(c)
            if room < need:
                raise GeometryError(
                    f"die {die.part_id}: {what} (its radius and lean change there), but the longest cut edge "
                    f"between them is {lengths[c]:.1f} mm long, {room:.1f} mm clear of its corners: make that cut "
                    "edge longer, give the two runs closer bend radii and angles, or make them one flange run")
            blends.append(Blend(float(starts[c] + (lengths[c] - need) / 2.0), need, pa, pb, False,
                                (names[a], names[b]), names[c]))
            continue
        junction = float(starts[b]) if b else perimeter
        if _turn_deg(runs[a], runs[b]) < CORNER_DEG:
            room = min(lengths[a] - margin(a), lengths[b] - margin(b))
            if room < need / 2.0:
                shorter = names[a] if lengths[a] < lengths[b] else names[b]
                raise GeometryError(
                    f"die {die.part_id}: {what} (centred where they meet), but {shorter} is only "
                    f"{min(lengths[a], lengths[b]):.1f} mm long: give the two runs closer bend radii and angles, or "
                    "make them one flange run")
            start = (junction - need / 2.0) % perimeter
            blends.append(Blend(start, need, pa, pb, True, (names[a], names[b]), "", (start, need)))
            continue
        longer = a if lengths[a] >= lengths[b] else b
        room = lengths[longer] - 2.0 * margin(longer)
        if room < need:
            raise GeometryError(
                f"die {die.part_id}: {what} at the corner where they meet (inside the longer, {names[longer]}, "
                f"clear of its corners), but it is {lengths[longer]:.1f} mm long, {room:.1f} mm clear of its "
                "corners: put a cut edge between the two runs, give them closer bend radii and angles, or make "
                "the part in two pressings")
        gap = margin(longer)
        start = junction - gap - need if longer == a else junction + gap
        formed = (start, need + gap) if longer == a else (junction, need + gap)
        blends.append(Blend(start % perimeter, need, pa, pb, True, (names[a], names[b]), names[longer],
                            (formed[0] % perimeter, formed[1])))
    blends.sort(key=lambda bl: bl.start_mm)
    for one, two in zip(blends, blends[1:] + blends[:1]):
        if one is two:
            continue
        gap = (two.start_mm - one.start_mm) % perimeter - one.length_mm
        if gap < 0.0:
            raise GeometryError(
                f"die {die.part_id}: the die wall's change of profile between {one.runs[0]} and {one.runs[1]} "
                f"overlaps the change between {two.runs[0]} and {two.runs[1]} ({-gap:.1f} mm): a run between them "
                "is too short for its own profile; give neighbouring runs closer bend radii and angles")
    return WallPlan(perimeter, tuple(blends))
