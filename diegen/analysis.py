"""Forming analysis of every rib piece: bend, springback, flange strain and relief, holes, press, blank.

Pure functions over plain data (no solid kernel).  Each number in the report
says which model it comes from (``models``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from diegen import materials
from diegen.blank.develop import develop_blank, notch_polygon
from diegen.errors import FormingError
from diegen.blank.drawing import BlankDrawing
from diegen.findings import Finding
from diegen.forming import press as press_model
from diegen.forming import relief as relief_model
from diegen.forming.bend import FlangeLayout, flange_layout
from diegen.forming.springback import Springback, die_for_part
from diegen.forming.strain import StrainProfile, hole_flange_strain, pilot_diameter, strain_along
from diegen.geometry import die_wall
from diegen.geometry.rib import rib_geometry
from diegen.geometry.types import PieceGeometry, RibGeometry
from diegen.spec.model import RibSpec

# The die stands at least this much taller than the flange so the rubber can wrap it (common practice, no source).
STOCK_CLEARANCE_MM = 3.0
# Grain across the chordwise bend lines (common practice, no source: bend across the grain where possible).
GRAIN_ANGLE_DEG = 90.0

MODELS = {
    "bend_allowance": "K-factor form BA = θ(R + kT), FAA-H-8083-31 ch. 4; aviation form (0.01743R + 0.0078T)N beside it",
    "setback": "SB = tan(θ/2)(R + T), FAA-H-8083-31 ch. 4",
    "springback": "elastic–perfectly-plastic bending Ri/Rf = 4X³ − 3X + 1 (Gardiner 1957, as commonly quoted); "
                  "angle from constant neutral-line length",
    "flange_strain": "contoured flange e = −w/(ρ + w) shrink, w/(ρ − w) stretch, ρ from the turning angle over "
                     "one flange width (windowing: model of our own)",
    "hole_strain": "hole flange stretch h/(R − h)",
    "relief": "excess edge length above the shrink limit gathered by flutes / removed by V-notches (model of our own)",
    "press": "box pressure F/A; early contact F/A_die; fold pressure σy·t²/(2L²) plastic hinge (model of our own)",
}


@dataclass(frozen=True)
class FlangeRun:
    """Strain along one flanged contour run of a piece."""

    run_index: int
    s_offset_mm: float  # where the run starts along the whole outline
    profile: StrainProfile = field(compare=False)
    shrink_runs: tuple[relief_model.ShrinkRun, ...]
    stretch_runs: tuple[relief_model.StretchRun, ...]


@dataclass(frozen=True)
class HoleCheck:
    stretch_strain: float
    pilot_d_mm: float
    ok: bool


@dataclass(frozen=True)
class PieceAnalysis:
    piece: PieceGeometry
    alloy: materials.SheetAlloy
    min_radius: materials.MinRadius
    springback: Springback
    layout: FlangeLayout
    runs: tuple[FlangeRun, ...]
    flange_names: tuple[str, ...]  # what each press.needed_by_flange entry is
    flutes: tuple[relief_model.Flute, ...]
    notches: tuple[relief_model.Notch, ...]
    relief_notes: tuple[str, ...]
    holes: tuple[HoleCheck, ...]
    press: press_model.PressCheck
    blank: BlankDrawing
    die_height_mm: float
    die_layers: int
    warnings: tuple[Finding, ...]

    @property
    def max_shrink(self) -> float:
        return max((r.profile.max_shrink for r in self.runs), default=0.0)

    @property
    def max_stretch(self) -> float:
        return max((r.profile.max_stretch for r in self.runs), default=0.0)


@dataclass(frozen=True)
class RibAnalysis:
    spec: RibSpec
    geometry: RibGeometry
    pieces: tuple[PieceAnalysis, ...]

    @property
    def warnings(self) -> tuple[Finding, ...]:
        return self.geometry.warnings + tuple(w for p in self.pieces for w in p.warnings)


def die_layers(stock_mm: float, flange_height_mm: float) -> int:
    """How many layers of stock make a die tall enough for the flange plus clearance."""
    return max(1, math.ceil((flange_height_mm + STOCK_CLEARANCE_MM) / stock_mm - 1e-9))


def die_build_up(spec: RibSpec) -> tuple[int, float]:
    """(layers of stock, die height in mm) of the spec's die.

    A routed or machined die is stacked from whole layers of stock, enough for the flange plus clearance.  A
    printed die is one piece, printed to ``die.stock_thickness`` high, or to the flange height plus clearance
    (rounded up to a whole millimetre) where that is more.
    """
    die, flange = spec.shared.die, spec.shared.flange.height_mm
    if materials.die_making(die.material, die.print_bed_mm) == "printed":
        return 1, max(die.stock_thickness_mm, float(math.ceil(flange + STOCK_CLEARANCE_MM - 1e-9)))
    layers = die_layers(die.stock_thickness_mm, flange)
    return layers, layers * die.stock_thickness_mm


def die_inset_mm(spec: RibSpec, springback: Springback) -> float:
    """The largest inset of the die's wall from its outline (mm): the top-edge setback or the bottom inset."""
    height = die_build_up(spec)[1]
    return die_wall.largest_inset_mm(springback.die_radius_mm, springback.overbend_deg, height)


def check_radius(spec: RibSpec) -> materials.MinRadius:
    """The table minimum for the sheet; :class:`FormingError` when the part radius is below it."""
    sheet, flange = spec.shared.sheet, spec.shared.flange
    minimum = materials.min_bend_radius(sheet.alloy, sheet.thickness_mm, flange.radius_table)
    if flange.bend_radius_mm < minimum.radius_mm - 1e-9:
        raise FormingError(
            f"{spec.file or spec.id}: rib {spec.id}: flange.bend_radius: {flange.bend_radius_mm:.3f} mm is below the minimum inside "
            f"bend radius {minimum.radius_mm:.3f} mm for {sheet.alloy} at {sheet.thickness_mm:.3f} mm "
            f"({minimum.citation})")
    return minimum


def analyse_rib(spec: RibSpec, section: np.ndarray | None = None) -> RibAnalysis:
    """Geometry and forming analysis of every piece of one rib."""
    minimum = check_radius(spec)
    alloy = materials.sheet_alloy(spec.shared.sheet.alloy)
    t = spec.shared.sheet.thickness_mm
    flange = spec.shared.flange
    springback = die_for_part(flange.bend_radius_mm, t, alloy.yield_mpa, alloy.youngs_modulus_mpa)
    geometry = rib_geometry(spec, section, die_inset_mm=die_inset_mm(spec, springback))
    layout = flange_layout(flange.height_mm, flange.bend_radius_mm, t, alloy.k_factor)
    pieces = tuple(_analyse_piece(spec, piece, alloy, minimum, springback, layout) for piece in geometry.pieces)
    return RibAnalysis(spec, geometry, pieces)


def _run_offsets(piece: PieceGeometry) -> list[float]:
    offsets, s = [], 0.0
    for run in piece.runs:
        offsets.append(s)
        pts = np.asarray(run.points)
        s += float(np.sum(np.hypot(*np.diff(pts, axis=0).T)))
    return offsets


def _analyse_piece(spec: RibSpec, piece: PieceGeometry, alloy: materials.SheetAlloy, minimum: materials.MinRadius,
                   springback: Springback, layout: FlangeLayout) -> PieceAnalysis:
    shared = spec.shared
    t = shared.sheet.thickness_mm
    width = layout.developed_width_mm
    warnings: list[Finding] = []
    runs = []
    for index, (run, offset) in enumerate(zip(piece.plain_runs, _run_offsets(piece))):
        if run.kind != "curve" or not run.flanged:
            continue
        profile = strain_along(np.asarray(run.points), width, closed=False)
        runs.append(FlangeRun(index, offset, profile, relief_model.shrink_runs(profile, alloy.shrink_limit),
                              relief_model.stretch_runs(profile, alloy.stretch_limit)))
    flutes, notches, notes, relief_warnings = _relief(spec, piece, runs, layout, springback)
    warnings += relief_warnings
    for run in runs:
        for stretch in run.stretch_runs:
            where = run.s_offset_mm + stretch.s_start_mm
            warnings.append(Finding(
                "stretch-over-limit", f"stretch flange {stretch.peak_strain:.3f} above the {alloy.name} limit "
                f"{alloy.stretch_limit:.3f} at {where:.0f} mm along the outline (plan radius "
                f"{stretch.min_radius_mm:.1f} mm); a flange of {stretch.allowed_width_mm:.1f} mm developed width would "
                "pass", key="flange.height", s_mm=where))
    if shared.relief == "none":
        for run in runs:
            for shrink in run.shrink_runs:
                where = run.s_offset_mm + shrink.s_start_mm
                warnings.append(Finding(
                    "shrink-without-relief", f"shrink {-shrink.peak_strain:.3f} above the limit "
                    f"{alloy.shrink_limit:.3f} over {shrink.length_mm:.0f} mm from {where:.0f} mm along the outline "
                    "and relief is 'none': expect wrinkles", key="relief", s_mm=where))
    holes = []
    for hole in piece.holes:
        if not hole.flanged:
            holes.append(HoleCheck(0.0, hole.d, True))
            continue
        strain = hole_flange_strain(hole.d, hole.flange_height)
        pilot = pilot_diameter(hole.d, hole.flange_height, t, shared.flange.bend_radius_mm, alloy.k_factor)
        ok = strain <= alloy.stretch_limit
        if not ok:
            warnings.append(Finding("hole-flange-stretch", f"hole at x = {hole.x:.0f} mm: flange stretch {strain:.3f} "
                                    f"above the limit {alloy.stretch_limit:.3f}", key="lightening_holes"))
        holes.append(HoleCheck(strain, pilot, ok))
    die = materials.die_material(shared.die.material)
    layers, height = die_build_up(spec)
    minx, miny, maxx, maxy = _bounds(piece)
    flanged_holes = [h for h in piece.holes if h.flanged]
    legs = [shared.flange.height_mm] * len(runs) + [h.flange_height for h in flanged_holes]
    leg_names = ["perimeter flange"] * len(runs) + [f"hole flange at x = {h.x:.0f} mm" for h in flanged_holes]
    press = press_model.press_check(
        shared.press.force_n, *shared.press.box_mm, maxx - minx, maxy - miny, piece.area_mm2,
        height,
        legs, t, alloy.yield_mpa, shared.press.rubber.thickness_mm, shared.press.rubber.durometer,
        die.compressive_strength_mpa, die.life_parts if die.life_parts is not None else 10**9,
        wall_clearance_mm=shared.press.wall_clearance_mm)
    warnings.extend(press.warnings)
    if press.unformable_flanges:
        names = sorted({leg_names[i] for i in press.unformable_flanges})
        warnings.append(Finding(
            "press-folds-part-way", f"the press gives {press.pressure_mpa:.2f} MPa but {', '.join(names)} need(s) up "
            f"to {press.needed_mpa:.2f} MPa to fold (plastic-hinge estimate): form what the press can, then finish "
            "these by hand over the die", key="press.force"))
    if height > shared.die.stock_thickness_mm + 1e-9 and layers == 1:
        warnings.append(Finding(
            "print-height-raised", f"die.stock_thickness {shared.die.stock_thickness_mm:.1f} mm is lower than the "
            f"flange height {shared.flange.height_mm:.1f} mm + {STOCK_CLEARANCE_MM:.0f} mm clearance: the die is "
            f"printed {height:.0f} mm high", key="die.stock_thickness"))
    if layers > 1:
        warnings.append(Finding(
            "die-laminated", f"die stock {shared.die.stock_thickness_mm:.1f} mm is thinner than the flange height "
            f"{shared.flange.height_mm:.1f} mm + {STOCK_CLEARANCE_MM:.0f} mm clearance: laminate {layers} layers "
            f"({layers * shared.die.stock_thickness_mm:.1f} mm)", key="die.stock_thickness"))
    tangent_inset = springback.die_radius_mm * math.tan(math.radians(springback.die_angle_deg) / 2)
    offset = layout.developed_width_mm - tangent_inset
    cuts = [notch_polygon(piece, n.s_mm, n.opening_mm, n.depth_mm, offset) for n in notches]
    blank = develop_blank(piece, offset_mm=offset, die_radius_mm=springback.die_radius_mm,
                          tangent_inset_mm=tangent_inset, thickness_mm=t,
                          material=f"{alloy.name}, {t:.3f} mm", pilot_diameters=[h.pilot_d_mm for h in holes],
                          notch_cuts=cuts)
    blank = replace(blank, grain_angle_deg=GRAIN_ANGLE_DEG)
    return PieceAnalysis(piece, alloy, minimum, springback, layout, tuple(runs), tuple(leg_names), flutes, notches, notes,
                         tuple(holes), press, blank, height, layers,
                         tuple(w.about(piece.part_id, spec.positions, rib_id=spec.id) for w in warnings))


def _bounds(piece: PieceGeometry) -> tuple[float, float, float, float]:
    pts = np.asarray(piece.outline)
    return float(pts[:, 0].min()), float(pts[:, 1].min()), float(pts[:, 0].max()), float(pts[:, 1].max())


def _relief(spec: RibSpec, piece: PieceGeometry, runs: list[FlangeRun], layout: FlangeLayout,
            springback: Springback) -> tuple[tuple, tuple, tuple[str, ...], list[Finding]]:
    """Flutes, notches, their notes, and warnings for relief that falls short."""
    shared = spec.shared
    t = shared.sheet.thickness_mm
    flutes: list[relief_model.Flute] = []
    notches: list[relief_model.Notch] = []
    notes: list[str] = []
    warnings: list[Finding] = []
    for run in runs:
        for shrink in run.shrink_runs:
            if shared.relief == "flutes":
                found = relief_model.flutes(shrink, shared.flange.height_mm, t, springback.die_radius_mm)
                flutes.extend(_shift(f, run.s_offset_mm) for f in found.flutes)
                notes.append(found.note)
                if not found.fits:
                    warnings.append(Finding("relief-short", found.note, key="relief",
                                            s_mm=run.s_offset_mm + shrink.s_start_mm))
            elif shared.relief == "notches":
                found_n = relief_model.notches(shrink, layout.developed_width_mm, t, shared.flange.bend_radius_mm)
                notches.extend(_shift(n, run.s_offset_mm) for n in found_n.notches)
                notes.append(found_n.note)
    return tuple(flutes), tuple(notches), tuple(notes), warnings


def _shift(item, offset: float):
    return replace(item, s_mm=item.s_mm + offset)
