"""Fitting a die to its piece before refusing it (pure 2D, no kernel).

Two things the analysis asks of a die can be more than its piece can hold:

* **The wall.**  Every horizontal section of the die is its outline offset inward: by the top-edge arc's setback
  ``R·(1 + sin α)/cos α`` near the top and by ``H·tan α`` at the bottom (R: die radius, α: undercut, H: height;
  see :mod:`diegen.geometry.die_wall`).  Where the piece is rounder or thinner than that inset (a sharp nose), the
  offset crosses itself.  The largest inset the outline takes is found (by bisection on the offset), then the
  undercut and, if still needed, the die radius are lowered to fit, each with a finding that names what it costs
  (a flange that springs back open, a tighter part radius).  A radius that would bend the part tighter than the
  table's minimum is not used: the piece is refused instead.
* **The flutes.**  A flute sinks the wall further, along the outline's normals, by up to its depth.  Each flute is
  made no deeper than the room its place leaves: the distance along the normal to where the normals of the far
  side meet it (the medial axis), less the wall's inset at each depth (scaled by the flute's taper) and
  ``ROOM_MARGIN_MM``.  Flutes too shallow to matter, or that crowd each other or a corner once the outline model
  has placed them, are left out.  If the flutes that are left gather less than the relief model asked, a
  ``relief-short`` finding says by how much.

Design choices (project limits, no source): ``ROOM_MARGIN_MM``, ``MIN_FLUTE_DEPTH_MM``, ``WALL_MARGIN_MM``.
Lengths in mm, angles in degrees.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from diegen.die.die_input import DieFlute, DieInput
from diegen.die.model import flute_lengths, flute_scale, largest_inset_mm
from diegen.die.model import profiles as model_profiles
from diegen.die.outline import CurveSegment, OutlineModel, flute_taper_ratio
from diegen.die.rules import die_refusal
from diegen.die.settings import DEFAULT_SETTINGS, BuildSettings
from diegen.errors import DiegenError, GeometryError
from diegen.findings import Finding
from diegen.geometry import die_wall
from diegen.numbers import without_negative_zeros

ROOM_MARGIN_MM = 0.1  # flutes stop this short of where the wall's offsets would meet
MIN_FLUTE_DEPTH_MM = 0.3  # a shallower flute gathers too little to be worth cutting: it is left out
WALL_MARGIN_MM = 0.05  # a fitted wall stops this short of the largest inset the outline takes
ROOM_SAMPLE_MM = 0.05  # the outline is sampled this finely to find the room for a flute
_POINT = re.compile(r"\[\s*([-+0-9.eE]+)\s+([-+0-9.eE]+)\s*\]")


@dataclass(frozen=True)
class Fitted:
    """A die fitted to its piece: the die, what fitting changed (findings), or why it cannot be (a refusal)."""

    die: DieInput
    findings: tuple[Finding, ...] = ()
    refusal: str | None = None
    checked: bool = False  # the die passed every rule as it stands (nothing needed fitting)


def fit_die(die: DieInput, piece: Any, spec: Any, settings: BuildSettings = DEFAULT_SETTINGS) -> Fitted:
    """``die`` (as the analysed ``piece`` asks for it) fitted to the piece: the wall first, then the flutes."""
    if die_refusal(die, settings) is None:
        return Fitted(die, checked=True)
    findings: list[Finding] = []
    plain = replace(die, flutes=())
    try:
        walled, wall_findings = _fit_wall(plain, piece, spec, settings)
    except _Refused as refused:
        return Fitted(die, (), refused.message)
    findings += wall_findings
    fitted = replace(walled, flutes=die.flutes)
    if die.flutes:
        fitted, flute_findings = _fit_flutes(fitted, piece, spec, settings)
        findings += flute_findings
    return Fitted(fitted, tuple(findings))


class _Refused(Exception):
    def __init__(self, message: str):
        super().__init__(message)
        self.message = message


# -- the wall ------------------------------------------------------------------------------------------------
def _plain_model(die: DieInput, settings: BuildSettings) -> OutlineModel | None:
    """The die's outline model without flutes and without the wall-inset check (None: the outline itself fails)."""
    try:
        return OutlineModel(die.outline, die.cutter_radius_mm, 0.0, sample_tol_mm=settings.outline_tol_mm,
                            max_spacing_mm=settings.max_spacing_mm, limit_text=die.inside_limit_text)
    except GeometryError:
        return None


def _tightest_convex(model: OutlineModel) -> tuple[float, tuple[float, float]]:
    """The smallest outside (convex) curve radius of the outline (mm) and where it is."""
    best, where = math.inf, (0.0, 0.0)
    for seg in model.segments:
        if not isinstance(seg, CurveSegment):
            continue
        s = np.linspace(0.0, seg.length, max(16, int(seg.length / 0.2) + 1))
        k = seg.curvature(s)
        i = int(np.argmax(k))
        if k[i] > 0 and 1.0 / k[i] < best:
            best, where = 1.0 / float(k[i]), tuple(float(v) for v in seg.base(s[i]))
    return best, where  # type: ignore[return-value]


def _offset_fails(model: OutlineModel, inset: float) -> str | None:
    try:
        model.offset(inset)
    except GeometryError as exc:
        return str(exc)
    return None


def largest_wall_inset(model: OutlineModel) -> tuple[float, tuple[float, float] | None]:
    """The largest inset (mm) the outline's offset takes without crossing itself, and where it first fails."""
    rho, at = _tightest_convex(model)
    hi = rho - 0.05 - 1e-6 if math.isfinite(rho) else 1e3
    where: tuple[float, float] | None = at if math.isfinite(rho) else None
    failure = _offset_fails(model, hi)
    if failure is None:
        return hi, where
    lo = 0.0
    for _ in range(14):
        mid = 0.5 * (lo + hi)
        message = _offset_fails(model, mid)
        if message is None:
            lo = mid
        else:
            hi, failure = mid, message
    found = _POINT.search(failure or "")
    return lo, (float(found[1]), float(found[2])) if found else where


def _fit_wall(die: DieInput, piece: Any, spec: Any, settings: BuildSettings) -> tuple[DieInput, list[Finding]]:
    """The flute-free ``die`` with an undercut and top radius its outline can take (findings for each change).

    A wall whose profile changes along the outline (a part's runs of their own bend radius or angle) is not fitted:
    each run's profile is what its flange needs, and a die that cannot have it is refused (:mod:`diegen.die.rules`).
    """
    if die.profiles is not None:
        return die, []
    model = _plain_model(die, settings)
    if model is None:
        return die, []
    needed = largest_inset_mm(die)
    arc, wall = _section_insets(die)
    if all(_offset_fails(model, u) is None for u in [u for u, _ in arc] + [u for u, _ in wall]) \
            and needed < _tightest_convex(model)[0] - 0.05:
        return die, []
    room, where = largest_wall_inset(model)
    target = room - WALL_MARGIN_MM
    spot = without_negative_zeros(f" at ({where[0]:.1f}, {where[1]:.1f}) mm") if where else ""
    if target <= 0.0:
        raise _Refused(
            f"die {die.part_id}: the die outline has no room for any wall{spot}: it comes to a point there; give "
            "the rib a section with a rounder nose, less skin and sheet offset, or leave this piece out (pieces)")
    radius, undercut = die.top_radius_mm, die.undercut_deg
    findings: list[Finding] = []
    sheet_t = spec.shared.sheet.thickness_mm
    alloy = piece.alloy
    if die_wall.wall_inset_mm(die.height_mm, undercut) > target:
        undercut = math.degrees(math.atan(target / die.height_mm))
    if die_wall.top_setback_mm(radius, undercut) > target:
        a = math.radians(undercut)
        radius = target * math.cos(a) / (1.0 + math.sin(a))
    from diegen.forming.springback import BendSheet, PowerLaw, springback_forward

    try:
        sheet = BendSheet(sheet_t, alloy.yield_mpa, alloy.youngs_modulus_mpa,
                          PowerLaw.through(alloy.yield_mpa, alloy.ultimate_mpa))
        part_radius, part_angle = springback_forward(radius, sheet, 90.0 + undercut)
    except DiegenError:
        part_radius, part_angle = math.nan, math.nan
    minimum = piece.min_radius.radius_mm
    if radius < die.top_radius_mm - 1e-9 and not part_radius >= minimum - 1e-9:
        raise _Refused(
            f"die {die.part_id}: the piece is too thin for its die wall{spot}: its outline takes an inset of only "
            f"{room:.2f} mm there, but the die's top-edge arc sets the wall {largest_inset_mm(die):.2f} mm in; a "
            f"top radius small enough ({radius:.2f} mm) would bend the part to about {part_radius:.2f} mm, below "
            f"the {minimum:.2f} mm minimum bend radius; give the rib a section with a rounder nose, less skin and "
            "sheet offset, or leave this piece out (pieces)")
    if undercut < die.undercut_deg - 1e-9:
        findings.append(Finding(
            "die-undercut-lowered",
            f"the die wall leans in {undercut:.2f}° instead of {die.undercut_deg:.2f}°: the piece is too thin{spot} "
            f"for the full over-bend's {die_wall.wall_inset_mm(die.height_mm, die.undercut_deg):.2f} mm inset at "
            f"the {die.height_mm:.1f} mm die's bottom (its outline takes {room:.2f} mm); the flange springs back to "
            f"about {part_angle:.1f}° instead of 90°: bend it the rest of the way by hand, or use lower die stock",
            key="die.stock_thickness"))
    if radius < die.top_radius_mm - 1e-9:
        findings.append(Finding(
            "die-radius-lowered",
            f"the die's top-edge radius is {radius:.2f} mm instead of {die.top_radius_mm:.2f} mm: the piece is too "
            f"thin{spot} for the arc's {die_wall.top_setback_mm(die.top_radius_mm, die.undercut_deg):.2f} mm "
            f"setback (its outline takes {room:.2f} mm); the part's bend radius comes out about {part_radius:.2f} mm "
            f"instead of {piece.springback.part_radius_mm:.2f} mm (the minimum is {minimum:.2f} mm; the blank is laid "
            "out for the radius asked)",
            key="flange.bend_radius"))
    return replace(die, top_radius_mm=radius, undercut_deg=undercut, bore_top_radius_mm=die.bore_radius_mm), findings


def _section_insets(die: DieInput, arc_samples: int = 31, wall_samples: int = 9
                    ) -> tuple[list[tuple[float, float]], list[tuple[float, float]]]:
    """(inset, flute scale) along the top-edge arc and down the straight wall, finely enough to hold for every
    section the builder, the laminate layers and the tiles use."""
    if die.profiles is not None:  # every profile's, at every level (the flutes must fit them all)
        arc, wall = [], []
        for profile in model_profiles(die):
            r, a = profile.radius_mm, profile.lean_deg
            for theta in np.linspace(0.0, 90.0 + a, arc_samples):
                p = die_wall.fillet_point(r, a, float(theta))
                arc.append((p.inset_mm, flute_scale(die, p.depth_mm)))
            top = die_wall.fillet_end_depth_mm(r, a)
            for d in [*np.linspace(top, die.height_mm, wall_samples),
                      *(length for length in flute_lengths(die) if top < length < die.height_mm)]:
                wall.append((die_wall.wall_inset_mm(float(d), a), flute_scale(die, float(d))))
        return arc, wall
    r, a = die.top_radius_mm, die.undercut_deg
    arc = []
    for theta in np.linspace(0.0, 90.0 + a, arc_samples):
        p = die_wall.fillet_point(r, a, float(theta))
        arc.append((p.inset_mm, flute_scale(die, p.depth_mm)))
    top = die_wall.fillet_end_depth_mm(r, a)
    depths = list(np.linspace(top, die.height_mm, wall_samples))
    depths += [length for length in flute_lengths(die) if top < length < die.height_mm]
    wall = [(die_wall.wall_inset_mm(float(d), a), flute_scale(die, float(d))) for d in depths]
    return arc, wall


# -- the flutes ----------------------------------------------------------------------------------------------
def _room_along(model: OutlineModel, s_values: np.ndarray, h_max: float) -> np.ndarray:
    """For each arc length in ``s_values``: how far (mm) the wall can sink along the outline's inward normal there
    before it meets the sunk wall of another place (the distance to the outline's medial axis, up to ``h_max``)."""
    ring = model.dense_base(ROOM_SAMPLE_MM)
    points, normals = zip(*(model.locate(float(s)) for s in s_values))
    p, n = np.asarray(points), np.asarray(normals)
    centre = p.mean(axis=0)
    near = ring[np.linalg.norm(ring - centre, axis=1) <= 2.5 * h_max + np.ptp(p, axis=0).max() + 1.0]
    lo, hi = np.zeros(len(p)), np.full(len(p), h_max)
    tol = ROOM_SAMPLE_MM
    for _ in range(30):
        mid = 0.5 * (lo + hi)
        q = p + mid[:, None] * n
        d = np.sqrt(((q[:, None, :] - near[None, :, :]) ** 2).sum(axis=2)).min(axis=1)
        ok = d >= mid - tol
        lo, hi = np.where(ok, mid, lo), np.where(ok, hi, mid)
    return lo


def _deepest_flute(die: DieInput, model: OutlineModel, flute: DieFlute, insets: list[tuple[float, float]]) -> float:
    """The deepest this flute may be (mm) where it is: its room less every section's inset, scaled by its taper."""
    half = flute.width_mm / 2.0 + 0.3
    s = np.linspace(flute.s_mm - half, flute.s_mm + half, 15) % model.perimeter_mm
    h_max = max(u for u, _ in insets) + flute.depth_mm + 1.0
    room = float(_room_along(model, s, h_max).min()) - ROOM_MARGIN_MM
    deepest = flute.depth_mm
    ratio = flute_taper_ratio(die.flute_length_mm, flute)
    for inset, scale in insets:
        own = scale if ratio == 1.0 else min(scale * ratio, 1.0)  # the flute's own taper (its own flange's height)
        if own > 0:
            deepest = min(deepest, (room - inset) / own)
    return deepest


def _model_with(die: DieInput, flutes: tuple[DieFlute, ...], settings: BuildSettings) -> OutlineModel | None:
    from diegen.die.model import outline_model

    try:
        return outline_model(replace(die, flutes=flutes), settings)
    except GeometryError:
        return None


def _fit_flutes(die: DieInput, piece: Any, spec: Any, settings: BuildSettings) -> tuple[DieInput, list[Finding]]:
    """``die`` with flutes its wall can hold (and a ``relief-short`` finding when they gather less than asked)."""
    from diegen.forming.relief import flute_gather

    asked = die.flutes
    plain = _plain_model(die, settings)
    if plain is None:
        return die, []
    arc, wall = _section_insets(die)
    insets = arc + wall
    sized = []
    for flute in asked:
        depth = min(flute.depth_mm, _deepest_flute(die, plain, flute, insets))
        if depth >= MIN_FLUTE_DEPTH_MM:
            sized.append(replace(flute, depth_mm=depth))
    kept: tuple[DieFlute, ...] = tuple(sized)
    if _model_with(die, kept, settings) is None:  # crowded, or too wide for the wall between corners: fewer
        kept = ()
        for flute in sized:
            if _model_with(die, (*kept, flute), settings) is not None:
                kept += (flute,)
    fitted = replace(die, flutes=kept)
    for _ in range(4):  # the room is measured on samples: make sure, and shallower still where it was not enough
        if not fitted.flutes or die_refusal(fitted, settings) is None:
            break
        fitted = replace(fitted, flutes=tuple(f for f in (replace(f, depth_mm=0.7 * f.depth_mm) for f in fitted.flutes)
                                              if f.depth_mm >= MIN_FLUTE_DEPTH_MM))
    else:
        if die_refusal(fitted, settings) is not None and die_refusal(replace(fitted, flutes=()), settings) is None:
            fitted = replace(fitted, flutes=())
    if fitted.flutes == asked:
        return fitted, []
    gather_asked = sum(flute_gather(f.width_mm, min(f.depth_mm, f.width_mm / 2)) for f in asked)
    gather_now = sum(flute_gather(f.width_mm, f.depth_mm) for f in fitted.flutes)
    excess = sum(shrink.excess_mm for run in piece.runs for shrink in run.shrink_runs)
    changed = [a for a in asked if a not in fitted.flutes]
    by_place = {f.s_mm: f for f in fitted.flutes}
    shallower = [by_place[a.s_mm] for a in asked if a.s_mm in by_place and by_place[a.s_mm].depth_mm < a.depth_mm]
    dropped = len(asked) - len(fitted.flutes)
    parts = []
    if shallower:
        parts.append(f"{len(shallower)} made shallower (down to {min(f.depth_mm for f in shallower):.1f} mm of "
                     f"{max(a.depth_mm for a in asked):.1f} mm)")
    if dropped:
        parts.append(f"{dropped} left out")
    message = (f"of the {len(asked)} flutes the relief asked for, {' and '.join(parts)}: the piece is too thin or "
               f"too tightly curved there for the wall to hold them; the die's flutes gather {gather_now:.1f} mm of "
               f"the {excess:.1f} mm excess the flange has to lose")
    short = gather_now + 1e-6 < min(gather_asked, excess)
    if short:
        message += "; expect wrinkles there: use relief: notches, a lower flange, or a softer temper"
    code = "relief-short" if short else "flutes-fitted"
    return fitted, [Finding(code, message, key="relief", s_mm=changed[0].s_mm if changed else None)]


__all__ = ["MIN_FLUTE_DEPTH_MM", "ROOM_MARGIN_MM", "WALL_MARGIN_MM", "Fitted", "fit_die", "largest_wall_inset"]
