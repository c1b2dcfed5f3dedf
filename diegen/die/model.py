"""The die model in plain numbers: its checked outline model, sections and insets (pure 2D, no kernel).

Conventions: rib plane X–Y, the die's top face at z = 0, the block extends to z = −height_mm; lengths in mm,
angles in degrees.  The outline is the die's mold line (see :mod:`diegen.die.die_input` and
:mod:`diegen.geometry.die_wall`).  The kernel layer (:mod:`diegen.die.occ`) turns this model into a solid.
"""

from __future__ import annotations

from diegen.die.die_input import DieInput
from diegen.die.outline import OffsetPiece, OutlineModel
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.die.wall import LoftLevel, WallPlan, level_point, wall_plan
from diegen.errors import GeometryError
from diegen.geometry import die_wall
from diegen.geometry.die_wall import WallProfile

MAX_UNDERCUT_DEG = 30.0  # beyond this the wall is no longer a small over-bend (design choice)
# A wall leaning out under a flange bent through less than 90° (design choice: the spec's least run angle, 30°,
# bent a little further by the over-bend, leans out about 60°; more is no form block wall but a table)
MIN_LEAN_DEG = -65.0

#: A section the die is lofted through: an inset and depth (a die of one profile: a plane section), or a loft level
#: (a die whose profile changes along the outline: see diegen.die.wall)
Level = die_wall.WallSection | LoftLevel


def check_die_numbers(die: DieInput) -> None:
    """Raise :class:`GeometryError` for sizes a die cannot have (before any geometry is made)."""
    if not die.part_id.strip():
        raise GeometryError("die part_id is empty: give the part a name")
    if not die.height_mm > 0:
        raise GeometryError(f"die {die.part_id}: height {die.height_mm} mm must be positive")
    if not die.cutter_radius_mm > 0:
        raise GeometryError(f"die {die.part_id}: {die.inside_limit_text} must be positive")
    for profile in profiles(die):
        radius, lean = profile.radius_mm, profile.lean_deg
        if not radius > 0:
            raise GeometryError(f"die {die.part_id}: top radius {radius} mm must be positive")
        if not MIN_LEAN_DEG <= lean <= MAX_UNDERCUT_DEG:
            raise GeometryError(
                f"die {die.part_id}: undercut {lean}° must lie between {MIN_LEAN_DEG:g}° (a wall leaning out, under "
                f"a flange bent through less than 90°) and {MAX_UNDERCUT_DEG:g}°"
            )
        arc_depth = die_wall.fillet_end_depth_mm(radius, lean)
        if arc_depth >= die.height_mm - 0.05:
            raise GeometryError(
                f"die {die.part_id}: the top-edge radius {radius} mm reaches {arc_depth:.2f} mm down, "
                f"which leaves no straight wall in a {die.height_mm} mm block: use thicker stock or a smaller radius"
            )
    if die.bore_radius_mm <= 0:
        raise GeometryError(f"die {die.part_id}: bore top radius {die.bore_radius_mm} mm must be positive")


def profiles(die: DieInput) -> tuple[WallProfile, ...]:
    """The die's wall profiles: its one (``top_radius_mm``, ``undercut_deg``), or each of its flange runs' own."""
    if die.profiles is None:
        return (WallProfile(die.top_radius_mm, die.undercut_deg),)
    return tuple(dict.fromkeys(p for p in die.profiles if p is not None))


def varying_wall(die: DieInput) -> WallPlan | None:
    """The wall along ``die``'s outline where its flange runs have profiles of their own (None: one profile)."""
    try:
        return wall_plan(die)
    except GeometryError as exc:
        raise GeometryError(str(exc)) from None


def largest_inset_mm(die: DieInput) -> float:
    """The largest inset of any section: the top setback or the bottom inset (mm)."""
    if die.profiles is None:
        return die_wall.largest_inset_mm(die.top_radius_mm, die.undercut_deg, die.height_mm)
    return max(die_wall.largest_inset_mm(p.radius_mm, p.lean_deg, die.height_mm) for p in profiles(die))


def largest_outset_mm(die: DieInput) -> float:
    """How far outside the outline the die reaches at its foot, where its wall leans out (mm; 0: it does not)."""
    return max(die_wall.largest_outset_mm(p.radius_mm, p.lean_deg, die.height_mm) for p in profiles(die))


def outline_model(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS) -> OutlineModel:
    """The checked outline model of ``die`` (raises :class:`GeometryError` for unusable outlines)."""
    check_die_numbers(die)
    for length in flute_lengths(die):
        if not 0 < length <= die.height_mm:
            raise GeometryError(
                f"die {die.part_id}: flute length {length:g} mm must be positive and no more than the "
                f"block height {die.height_mm:g} mm (set it to the flange height)"
            )
    if die.flutes and max(flute_lengths(die)) > die.flute_length_mm:
        raise GeometryError(
            f"die {die.part_id}: a flute tapers over {max(flute_lengths(die)):g} mm, more than the die's flute "
            f"length {die.flute_length_mm:g} mm: set the die's flute length to the longest flute's (its tallest "
            "fluted flange)")
    plan = varying_wall(die)
    try:
        return OutlineModel(die.outline, die.cutter_radius_mm, largest_inset_mm(die),
                            sample_tol_mm=settings.outline_tol_mm, max_spacing_mm=settings.max_spacing_mm,
                            flutes=die.flutes, limit_text=die.inside_limit_text, min_land_mm=die.min_land_mm,
                            flute_length_mm=die.flute_length_mm, max_outset_mm=largest_outset_mm(die),
                            varying_mm=() if plan is None else plan.varying_mm)
    except GeometryError as exc:
        raise GeometryError(f"die {die.part_id}: {exc}") from exc


def flute_scale(die: DieInput, depth_mm: float) -> float:
    """Fraction of the flutes' full depth at ``depth_mm`` below the top face: 0 at the top, 1 from the flange edge
    down."""
    if not die.flutes:
        return 0.0
    return min(max(depth_mm, 0.0) / die.flute_length_mm, 1.0)


def flute_lengths(die: DieInput) -> list[float]:
    """Every depth (mm) where a flute's taper reaches full depth, shallowest first: the die's flute length, and
    each flute's own where it has one."""
    if not die.flutes:
        return []
    return sorted({die.flute_length_mm, *(f.length_mm for f in die.flutes if f.length_mm > 0.0)})


def section(die: DieInput, model: OutlineModel, inset_mm: float, depth_mm: float) -> list[OffsetPiece]:
    """The die's horizontal section at ``depth_mm`` below the top face, for a wall inset ``inset_mm`` (mm)."""
    try:
        return model.offset(inset_mm, flute_scale=flute_scale(die, depth_mm))
    except GeometryError as exc:
        raise GeometryError(f"die {die.part_id}: {exc}") from None


def loft_sections(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS
                  ) -> tuple[tuple[die_wall.WallSection, ...], tuple[die_wall.WallSection, ...]]:
    """The sections the kernel lofts the wall through: across the top-edge arc, and down the straight wall.

    The arc's sections are evenly spaced in arc angle; the wall's run from the arc's end to the bottom face, with
    one more where the flutes reach full depth (the ruled loft needs it there).
    """
    arc = die_wall.fillet_sections(die.top_radius_mm, die.undercut_deg, settings.fillet_sections)
    depths = [arc[-1].depth_mm]
    for length in flute_lengths(die):
        if arc[-1].depth_mm + 0.05 < length < die.height_mm - 0.05:
            depths.append(length)  # a flute's taper ends here: the ruled wall needs a section
    depths.append(die.height_mm)
    wall = (arc[-1], *tuple(die_wall.WallSection(die_wall.wall_inset_mm(d, die.undercut_deg), d) for d in depths[1:]))
    return arc, wall



def loft_levels(die: DieInput, settings: BuildSettings = DEFAULT_SETTINGS
                ) -> tuple[tuple[Level, ...], tuple[Level, ...]]:
    """The sections the kernel lofts the wall through, as :func:`level_section` takes them: a die of one profile's
    (:func:`loft_sections`), or for a die whose profile changes along the outline its loft levels — the top-edge
    arc at even fractions of each profile's arc, then down the wall, plane, from below the deepest arc's end: where
    the flutes reach full depth and at the bottom face."""
    if die.profiles is None:
        return loft_sections(die, settings)
    count = settings.fillet_sections
    arc = tuple(LoftLevel(i / (count - 1)) for i in range(count))
    deepest = max(die_wall.fillet_end_depth_mm(p.radius_mm, p.lean_deg) for p in profiles(die))
    depths = [length for length in flute_lengths(die) if deepest + 0.05 < length < die.height_mm - 0.05]
    return arc, (arc[-1], *(LoftLevel(None, d) for d in (*depths, die.height_mm)))


def level_depth_mm(level: Level) -> float:
    """The nominal depth of a section (the plane's; an arc level's depth changes along the outline: 0 here)."""
    return level.depth_mm


def level_section(die: DieInput, model: OutlineModel, level: Level, spacing_mm: float | None = None
                  ) -> list[OffsetPiece]:
    """The die's section at ``level`` (:func:`loft_levels`); a die whose profile changes along the outline gives
    each point its own depth (``OffsetPiece.depths``)."""
    if isinstance(level, die_wall.WallSection):
        if spacing_mm is None:
            return section(die, model, level.inset_mm, level.depth_mm)
        return model.offset(level.inset_mm, spacing_mm=spacing_mm, flute_scale=flute_scale(die, level.depth_mm))
    plan = varying_wall(die)
    assert plan is not None, "loft levels belong to a die whose profile changes along the outline"
    try:
        return model.offset_along(lambda at: plan.values(at, level), key=level, spacing_mm=spacing_mm,
                                  flute_length_mm=die.flute_length_mm if die.flutes else 0.0)
    except GeometryError as exc:
        raise GeometryError(f"die {die.part_id}: {exc}") from None


def top_level(die: DieInput) -> Level:
    """The flat top face's edge: the top setback, at the top face."""
    if die.profiles is None:
        return die_wall.WallSection(top_face_inset_mm(die), 0.0)
    return LoftLevel(0.0)


def depth_level(die: DieInput, depth_mm: float, on_wall_line: bool = False) -> Level:
    """The plane section ``depth_mm`` down: on the die's wall (the top-edge arc where it reaches that deep), or,
    ``on_wall_line``, on the straight wall's line extended to the top face (a laminate layer's outline)."""
    if die.profiles is None:
        inset = die_wall.wall_inset_mm(depth_mm, die.undercut_deg)
        return die_wall.WallSection(inset, depth_mm)
    return LoftLevel(None, depth_mm, on_wall_line)


def level_insets(die: DieInput) -> list[tuple[float, float]]:
    """(inset, depth) of every profile of the die at every level it is lofted through (mm)."""
    arc, wall = loft_levels(die)
    found = []
    for level in (*arc, *wall):
        if isinstance(level, die_wall.WallSection):
            found.append((level.inset_mm, level.depth_mm))
        else:
            found += [(q.inset_mm, q.depth_mm) for q in (level_point(p, level) for p in profiles(die))]
    return found


def top_face_inset_mm(die: DieInput) -> float:
    """Inset of the flat top face's edge from the outline: the top setback (mm)."""
    return die_wall.top_setback_mm(die.top_radius_mm, die.undercut_deg)


def bottom_inset_mm(die: DieInput) -> float:
    """Inset of the bottom face's edge from the outline, ``H·tan α`` (mm)."""
    return die_wall.wall_inset_mm(die.height_mm, die.undercut_deg)


__all__ = ["MAX_UNDERCUT_DEG", "MIN_LEAN_DEG", "Level", "bottom_inset_mm", "check_die_numbers", "depth_level",
           "flute_lengths", "flute_scale", "largest_inset_mm", "largest_outset_mm", "level_depth_mm", "level_insets",
           "level_section", "loft_levels", "loft_sections", "outline_model", "profiles", "section", "top_face_inset_mm",
           "top_level", "varying_wall"]
