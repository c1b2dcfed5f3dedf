"""The die model in plain numbers: its checked outline model, sections and insets (pure 2D, no kernel).

Conventions: rib plane X–Y, the die's top face at z = 0, the block extends to z = −height_mm; lengths in mm,
angles in degrees.  The outline is the die's mold line (see :mod:`diegen.die.die_input` and
:mod:`diegen.geometry.die_wall`).  The kernel layer (:mod:`diegen.die.occ`) turns this model into a solid.
"""

from __future__ import annotations

from diegen.die.die_input import DieInput
from diegen.die.outline import OffsetPiece, OutlineModel
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.errors import GeometryError
from diegen.geometry import die_wall

MAX_UNDERCUT_DEG = 30.0  # beyond this the wall is no longer a small over-bend (design choice)


def check_die_numbers(die: DieInput) -> None:
    """Raise :class:`GeometryError` for sizes a die cannot have (before any geometry is made)."""
    if not die.part_id.strip():
        raise GeometryError("die part_id is empty: give the part a name")
    if not die.height_mm > 0:
        raise GeometryError(f"die {die.part_id}: height {die.height_mm} mm must be positive")
    if not die.top_radius_mm > 0:
        raise GeometryError(f"die {die.part_id}: top radius {die.top_radius_mm} mm must be positive")
    if not 0.0 <= die.undercut_deg <= MAX_UNDERCUT_DEG:
        raise GeometryError(
            f"die {die.part_id}: undercut {die.undercut_deg}° must lie between 0 and {MAX_UNDERCUT_DEG:g}°"
        )
    if not die.cutter_radius_mm > 0:
        raise GeometryError(f"die {die.part_id}: {die.inside_limit_text} must be positive")
    arc_depth = die_wall.fillet_end_depth_mm(die.top_radius_mm, die.undercut_deg)
    if arc_depth >= die.height_mm - 0.05:
        raise GeometryError(
            f"die {die.part_id}: the top-edge radius {die.top_radius_mm} mm reaches {arc_depth:.2f} mm down, "
            f"which leaves no straight wall in a {die.height_mm} mm block: use thicker stock or a smaller radius"
        )
    if die.bore_radius_mm <= 0:
        raise GeometryError(f"die {die.part_id}: bore top radius {die.bore_radius_mm} mm must be positive")


def largest_inset_mm(die: DieInput) -> float:
    """The largest inset of any section: the top setback or the bottom inset (mm)."""
    return die_wall.largest_inset_mm(die.top_radius_mm, die.undercut_deg, die.height_mm)


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
    try:
        return OutlineModel(die.outline, die.cutter_radius_mm, largest_inset_mm(die),
                            sample_tol_mm=settings.outline_tol_mm, max_spacing_mm=settings.max_spacing_mm,
                            flutes=die.flutes, limit_text=die.inside_limit_text, min_land_mm=die.min_land_mm,
                            flute_length_mm=die.flute_length_mm)
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



def top_face_inset_mm(die: DieInput) -> float:
    """Inset of the flat top face's edge from the outline: the top setback (mm)."""
    return die_wall.top_setback_mm(die.top_radius_mm, die.undercut_deg)


def bottom_inset_mm(die: DieInput) -> float:
    """Inset of the bottom face's edge from the outline, ``H·tan α`` (mm)."""
    return die_wall.wall_inset_mm(die.height_mm, die.undercut_deg)


__all__ = ["MAX_UNDERCUT_DEG", "bottom_inset_mm", "check_die_numbers", "flute_lengths", "flute_scale",
           "largest_inset_mm", "loft_sections", "outline_model", "section", "top_face_inset_mm"]
