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
from diegen.blank.drawing import BlankDrawing
from diegen.die.plan import DiePlan, with_die_plan
from diegen.errors import FormingError, keyed
from diegen.findings import Finding
from diegen.forming import press as press_model
from diegen.forming import relief as relief_model
from diegen.forming.bend import FlangeLayout, flange_layout
from diegen.forming.springback import BendSheet, PowerLaw, Springback, Trial, die_for_part, die_from_trial
from diegen.forming.strain import StrainProfile, pilot_diameter, strain_along
from diegen.geometry import die_wall
from diegen.geometry.rib import rib_geometry
from diegen.geometry.types import PieceGeometry, RibGeometry, Run
from diegen.sources.geometry import part_geometry
from diegen.spec.model import RibSpec

# The die stands at least this much taller than the flange so the rubber can wrap it (common practice, no source).
STOCK_CLEARANCE_MM = 3.0
# Grain across the chordwise bend lines (common practice, no source: bend across the grain where possible).
GRAIN_ANGLE_DEG = 90.0

MODELS = {
    "bend_allowance": "K-factor form BA = θ(R + kT), FAA-H-8083-31 ch. 4; aviation form (0.01743R + 0.0078T)N "
                      "beside it",
    "setback": "SB = tan(θ/2)(R + T), FAA-H-8083-31 ch. 4",
    "springback": "pure bending about the neutral surface, plane strain, elastic unloading 1/ρf = 1/ρi − 12M/(E't³) "
                  "(Marciniak, Duncan & Hu 2002, ch. 6; equals ρi/ρf = 4X³ − 3X + 1, Gardiner 1957, without "
                  "hardening); power-law hardening through the typical yield and ultimate (Considère); a trial part "
                  "in the spec overrides it",
    "flange_strain": "contoured flange e = −w/(ρ + w) shrink, w/(ρ − w) stretch, ρ from the turning angle over "
                     "one flange width (windowing: model of our own); a flange bent through θ under 90° moves its "
                     "edge in by only w(1 − cos θ), which takes w's place in the numerator",
    "shrink_limit": "catalogue shrink limit at h/t = 20, scaled by (20t/h)² as the plastic buckling strain of a "
                    "flange with a free edge (Stowell, NACA TN 1556; model of our own)",
    "residual_shrink": "edge shrink left in each flange-width window after the flutes or notches in it take up "
                       "their length (model of our own)",
    "hole_strain": "hole flange edge stretch (d + t)/pilot − 1, the pilot from the flange's developed length",
    "relief": "excess edge length above the shrink limit gathered by flutes (placed by the local excess) / removed "
              "by V-notches (model of our own)",
    "press": "box pressure F/A; plastic hinge lever a = t√(σy'/2p): folding starts at a = L, the flange sets on "
             "the die radius at a = R; part-way angle calibrated to a fact of the trade (model of our own)",
}

@dataclass(frozen=True)
class FlangeRun:
    """Strain along one flanged contour run of a piece."""

    run_index: int
    s_offset_mm: float  # where the run starts along the whole outline
    profile: StrainProfile = field(compare=False)
    shrink_runs: tuple[relief_model.ShrinkRun, ...]
    stretch_runs: tuple[relief_model.StretchRun, ...]
    height_mm: float = 0.0  # the run's mold-line flange height
    shrink_limit: float = 0.0  # the wrinkle limit of a flange of that height


@dataclass(frozen=True)
class RunShape:
    """The flanged runs of a piece that share one flange shape (height, bend radius, angle): their die (springback:
    die radius and over-bent angle), developed width and wrinkle limit."""

    height_mm: float
    layout: FlangeLayout
    shrink_limit: float
    run_indexes: tuple[int, ...]  # into the piece's runs
    springback: Springback | None = None  # None: the piece's own (``PieceAnalysis.springback``)
    keys: tuple[str, ...] = ()  # the spec keys of the flange runs of this shape (``flanges[2]``)

    @property
    def bend_radius_mm(self) -> float:
        return self.layout.radius_mm

    @property
    def angle_deg(self) -> float:
        return self.layout.angle_deg

    def die(self, piece_springback: Springback) -> Springback:
        """This shape's die radius and angle (the piece's when it has none of its own)."""
        return piece_springback if self.springback is None else self.springback

    def tangent_inset_mm(self, piece_springback: Springback) -> float:
        """How far inside the die outline the web's bend line lies: the die radius's tangent length
        R_die·tan(θ_die/2) (mm)."""
        die = self.die(piece_springback)
        return die.die_radius_mm * math.tan(math.radians(die.die_angle_deg) / 2)


@dataclass(frozen=True)
class HoleCheck:
    """A lightening hole as formed: its clear diameter, die bore and pilot (mm), edge stretch and limit."""

    d_mm: float  # clear hole inside the flange
    bore_d_mm: float  # the die's bore, d + 2t for a flanged hole
    pilot_d_mm: float  # the hole cut in the blank
    flange_height_mm: float
    stretch_strain: float
    ok: bool


@dataclass(frozen=True)
class FlangeJudgement:
    """Whether the perimeter flange forms: residual shrink after relief against the wrinkle limit, stretch."""

    shrink_limit: float  # the wrinkle limit for this flange (positive fraction)
    residual_shrink: float  # worst window after relief
    residual_at_mm: float | None  # where along the outline
    verdict: relief_model.FlangeVerdict
    remedies: tuple[str, ...]
    # the residual shrink along each flange run, sample by sample (for pictures; numbers above are what counts)
    residual_profiles: tuple[np.ndarray, ...] = field(default=(), compare=False, repr=False)


@dataclass(frozen=True)
class PieceAnalysis:
    piece: PieceGeometry
    alloy: materials.SheetAlloy
    min_radius: materials.MinRadius
    springback: Springback
    layout: FlangeLayout
    runs: tuple[FlangeRun, ...]
    flutes: tuple[relief_model.Flute, ...]
    notches: tuple[relief_model.Notch, ...]
    relief_notes: tuple[str, ...]
    flange: FlangeJudgement
    holes: tuple[HoleCheck, ...]
    press: press_model.PressCheck
    blank: BlankDrawing
    die_height_mm: float
    die_layers: int
    warnings: tuple[Finding, ...]
    die: DiePlan | None = None  # the die the builder will make, or why it cannot (diegen.die.plan)
    # one entry per flange shape (height, bend radius, angle) of the piece's flanged runs, lowest first (several
    # for a part whose flange runs have shapes of their own; ``layout`` is the spec's flange)
    shapes: tuple[RunShape, ...] = ()

    @property
    def mixed_heights(self) -> bool:
        """Whether the piece's flanged runs have shapes of their own: heights, bend radii or angles that differ, or
        all differ from the spec's ``flange`` (the reports then state each run's shape)."""
        return len(self.shapes) > 1 or any(
            (h.height_mm, h.bend_radius_mm, h.angle_deg) != (self.layout.height_mm, self.layout.radius_mm, 90.0)
            for h in self.shapes)

    @property
    def mixed_bends(self) -> bool:
        """Whether some flanged run has a bend radius or angle of its own (its own die radius and over-bend)."""
        return any((h.bend_radius_mm, h.angle_deg) != (self.layout.radius_mm, 90.0) for h in self.shapes)

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


def tallest_flange_mm(spec: RibSpec) -> float:
    """The tallest flange the die forms (mm): the spec's ``flange.height``, or for a part whose flange runs have
    heights of their own, the tallest run."""
    if spec.drawn is None or not spec.drawn.part.runs:
        return spec.shared.flange.height_mm
    return max(run.flange.height_mm for run in spec.drawn.part.runs)


def die_build_up(spec: RibSpec) -> tuple[int, float]:
    """(layers of stock, die height in mm) of the spec's die.

    A routed or machined die is stacked from whole layers of stock, enough for the tallest flange plus clearance.
    A printed die is one piece, printed to ``die.stock_thickness`` high, or to the tallest flange plus clearance
    (rounded up to a whole millimetre) where that is more.
    """
    die, flange = spec.shared.die, tallest_flange_mm(spec)
    if materials.die_making(die.material, die.print_bed_mm) == "printed":
        return 1, max(die.stock_thickness_mm, float(math.ceil(flange + STOCK_CLEARANCE_MM - 1e-9)))
    layers = die_layers(die.stock_thickness_mm, flange)
    return layers, layers * die.stock_thickness_mm


def die_inset_mm(spec: RibSpec, springback: Springback, others: tuple[Springback, ...] = ()) -> float:
    """The largest inset of the die's wall from its outline (mm): the top-edge setback or the bottom inset, over
    the die of every flange shape (``others``: the dies of a part's runs of their own bend radius or angle)."""
    height = die_build_up(spec)[1]
    return max(die_wall.largest_inset_mm(sb.die_radius_mm, wall_lean_deg(sb), height)
               for sb in (springback, *others))


def wall_lean_deg(springback: Springback) -> float:
    """The die wall's signed lean from the vertical, die angle − 90° (degrees): the over-bend of a square flange,
    negative (the wall leaning out going down) for a flange bent through less than 90° (see
    :mod:`diegen.geometry.die_wall`)."""
    return springback.die_angle_deg - 90.0


def run_shape_keys(spec: RibSpec) -> dict[tuple[float, float], tuple[str, ...]]:
    """A part's (bend radius, angle) pairs of its own (not the spec's flange), each with the spec keys of its runs."""
    found: dict[tuple[float, float], tuple[str, ...]] = {}
    if spec.drawn is None:
        return found
    flange = spec.shared.flange
    for run in spec.drawn.part.runs:
        bend = (run.flange.bend_radius_mm, run.flange.angle_deg)
        if bend != (flange.bend_radius_mm, 90.0):
            found[bend] = (*found.get(bend, ()), run.label)
    return found


def uses_spec_bend(spec: RibSpec) -> bool:
    """Whether some flanged edge takes the spec's ``flange`` bend radius square to the web (every rib's do)."""
    if spec.drawn is None or not spec.drawn.part.runs:
        return True
    flange = spec.shared.flange
    return any((r.flange.bend_radius_mm, r.flange.angle_deg) == (flange.bend_radius_mm, 90.0)
               for r in spec.drawn.part.runs)


def bend_sheet(spec: RibSpec, alloy: materials.SheetAlloy) -> BendSheet:
    """The sheet as springback sees it: thickness, yield, modulus, hardening through yield and ultimate."""
    return BendSheet(spec.shared.sheet.thickness_mm, alloy.yield_mpa, alloy.youngs_modulus_mpa,
                     PowerLaw.through(alloy.yield_mpa, alloy.ultimate_mpa))


def springback_for(spec: RibSpec, alloy: materials.SheetAlloy, radius_mm: float | None = None,
                   angle_deg: float = 90.0) -> Springback:
    """The die radius and angle for the spec's part (or a run of ``radius_mm`` bent through ``angle_deg``): the
    model's, or a trial part's when the spec gives one.

    A trial part measures the springback of the ``flange`` section's bend radius: it sets the die of every run of
    that radius (the ratio of part to die angle, ρi/ρf, does not depend on the angle bent through); a run of
    another radius takes the model's die.
    """
    flange = spec.shared.flange
    radius = flange.bend_radius_mm if radius_mm is None else radius_mm
    modelled = die_for_part(radius, bend_sheet(spec, alloy), angle_deg)
    if flange.trial is None or radius != flange.bend_radius_mm:
        return modelled
    trial = flange.trial
    return die_from_trial(Trial(trial.die_angle_deg, trial.part_angle_deg, trial.die_radius_mm, trial.part_radius_mm),
                          modelled)


def check_radius(spec: RibSpec, springback: Springback, key: str = "flange.bend_radius") -> materials.MinRadius:
    """The table minimum for the sheet; :class:`FormingError` when the die radius the metal is bent to is below it.

    The refusal names both radii, the table, and the smallest part radius whose die radius passes; ``key`` is the
    spec key of the radius (a part's run of its own: ``flanges[2].bend_radius``).
    """
    sheet, flange = spec.shared.sheet, spec.shared.flange
    minimum = materials.min_bend_radius(sheet.alloy, sheet.thickness_mm, flange.radius_table)
    if springback.die_radius_mm < minimum.radius_mm - 1e-9:
        wanted = _part_radius_for_die(spec, minimum.radius_mm)
        raise FormingError(
            f"{spec.kind} {spec.id}: the die bends the metal to {springback.die_radius_mm:.3f} mm "
            f"(to spring back to the part's {springback.part_radius_mm:.3f} mm), below the {minimum.radius_mm:.3f} mm "
            f"minimum for {sheet.thickness_mm:.3f} mm {sheet.alloy} ({minimum.table} table: {minimum.citation}); "
            f"use a part radius of at least {wanted:.3f} mm, or a softer temper", key=key
        )
    return minimum


def run_springbacks(spec: RibSpec, alloy: materials.SheetAlloy) -> dict[tuple[float, float], Springback]:
    """The die of each (bend radius, angle) of a part's runs of their own, each radius checked against the table
    (the refusal at the first run of it: ``flanges[i].bend_radius``)."""
    dies = {}
    for (radius, angle), keys in run_shape_keys(spec).items():
        key = join_key(keys[0], "bend_radius" if radius != spec.shared.flange.bend_radius_mm else "angle")
        with keyed(key):
            dies[(radius, angle)] = springback_for(spec, alloy, radius, angle)
        check_radius(spec, dies[(radius, angle)], join_key(keys[0], "bend_radius")
                     if radius != spec.shared.flange.bend_radius_mm else "flange.bend_radius")
    return dies


def join_key(run_key: str, field_name: str) -> str:
    """The spec key of one field of a flange run (``flanges[2]`` and ``angle``: ``flanges[2].angle``); a part
    flanged all round (``flanges``) keeps the ``flange`` section's key."""
    return f"{run_key}.{field_name}" if run_key.startswith("flanges[") else f"flange.{field_name}"


def _part_radius_for_die(spec: RibSpec, die_radius_mm: float) -> float:
    """The smallest part radius (mm) whose die radius is at least ``die_radius_mm``."""
    alloy = materials.sheet_alloy(spec.shared.sheet.alloy)
    sheet = bend_sheet(spec, alloy)
    lo, hi = die_radius_mm, die_radius_mm * 4.0
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        try:
            passes = die_for_part(mid, sheet).die_radius_mm >= die_radius_mm
        except FormingError:
            passes = True
        lo, hi = (lo, mid) if passes else (mid, hi)
    return hi


def analyse_rib(spec: RibSpec, section: np.ndarray | None = None) -> RibAnalysis:
    """Geometry and forming analysis of every piece of one rib."""
    alloy = materials.sheet_alloy(spec.shared.sheet.alloy)
    t = spec.shared.sheet.thickness_mm
    flange = spec.shared.flange
    springback = springback_for(spec, alloy)
    dies = run_springbacks(spec, alloy)
    minimum = check_radius(spec, springback) if uses_spec_bend(spec) else \
        materials.min_bend_radius(spec.shared.sheet.alloy, t, flange.radius_table)
    if spec.drawn is not None:
        geometry = part_geometry(spec, die_inset_mm=die_inset_mm(spec, springback, tuple(dies.values())))
    else:
        geometry = rib_geometry(spec, section, die_inset_mm=die_inset_mm(spec, springback),
                                stretch_limit=alloy.stretch_limit)
    layout = flange_layout(flange.height_mm, flange.bend_radius_mm, t, alloy.k_factor)
    pieces = tuple(_analyse_piece(spec, piece, alloy, minimum, springback, layout, dies) for piece in geometry.pieces)
    pieces = tuple(with_die_plan(spec, piece) for piece in pieces)
    return RibAnalysis(spec, geometry, pieces)


def _shape_key(spec: RibSpec, run: Run) -> tuple[float, float, float]:
    flange = spec.shared.flange
    return run.height_mm(flange.height_mm), run.radius_mm(flange.bend_radius_mm), run.angle()


def _run_shapes(spec: RibSpec, piece: PieceGeometry, alloy: materials.SheetAlloy, layout: FlangeLayout,
                dies: dict[tuple[float, float], Springback]) -> tuple[RunShape, ...]:
    """The piece's flanged runs grouped by flange shape (height, bend radius, angle), each shape with its own die,
    layout (FAA-H-8083-31 ch. 4 for its angle) and wrinkle limit."""
    flange, t = spec.shared.flange, spec.shared.sheet.thickness_mm
    by_shape: dict[tuple[float, float, float], list[int]] = {}
    for index, run in enumerate(piece.runs):
        if run.flanged:
            by_shape.setdefault(_shape_key(spec, run), []).append(index)
    if not by_shape:
        by_shape[(flange.height_mm, flange.bend_radius_mm, 90.0)] = []
    shapes = []
    for (h, radius, angle), indexes in sorted(by_shape.items()):
        keys = tuple(dict.fromkeys(piece.runs[i].flange_key for i in indexes if piece.runs[i].flange_key))
        with keyed(join_key(keys[0], "height") if keys else "flange.height"):
            own = layout if (h, radius, angle) == (flange.height_mm, flange.bend_radius_mm, 90.0) else \
                flange_layout(h, radius, t, alloy.k_factor, angle)
        shapes.append(RunShape(h, own, relief_model.wrinkle_limit(alloy.shrink_limit, h, t), tuple(indexes),
                               dies.get((radius, angle)), keys))
    return tuple(shapes)


def _shape_of(spec: RibSpec, shapes: tuple[RunShape, ...], run: Run) -> RunShape:
    key = _shape_key(spec, run)
    return next(h for h in shapes if (h.height_mm, h.bend_radius_mm, h.angle_deg) == key)


def _shape_at(spec: RibSpec, piece: PieceGeometry, shapes: tuple[RunShape, ...], s_mm: float) -> RunShape:
    """The shape of the flanged run ``s_mm`` along the outline lies on."""
    found = piece.run_at(s_mm)
    return _shape_of(spec, shapes, found) if found.flanged else shapes[-1]


def _flange_runs(spec: RibSpec, piece: PieceGeometry, alloy: materials.SheetAlloy,
                 shapes: tuple[RunShape, ...]) -> list[FlangeRun]:
    """Strain along every flanged curve of the piece (over its own flange's developed width, at its own angle),
    with its runs past its own flange's limits."""
    runs = []
    for index, (run, offset) in enumerate(zip(piece.plain_runs, piece.run_starts_mm(), strict=False)):
        if run.kind != "curve" or not run.flanged:
            continue
        own = _shape_of(spec, shapes, run)
        profile = strain_along(np.asarray(run.points), own.layout.developed_width_mm, closed=False,
                               angle_deg=own.angle_deg)
        runs.append(FlangeRun(index, offset, profile, relief_model.shrink_runs(profile, own.shrink_limit),
                              relief_model.stretch_runs(profile, alloy.stretch_limit), own.height_mm,
                              own.shrink_limit))
    return runs


def _height_key(spec: RibSpec, piece: PieceGeometry, run: FlangeRun) -> str:
    """The spec key of the height of the flange ``run`` stands on: its run's own (``flanges[2].height``), or the
    ``flange`` section's."""
    own = piece.plain_runs[run.run_index]
    if own.height_mm(spec.shared.flange.height_mm) == spec.shared.flange.height_mm:
        return "flange.height"
    return join_key(own.flange_key, "height")


def _stretch_findings(spec: RibSpec, runs: list[FlangeRun], alloy: materials.SheetAlloy,
                      piece: PieceGeometry) -> list[Finding]:
    found = []
    for run in runs:
        for stretch in run.stretch_runs:
            where = run.s_offset_mm + stretch.s_start_mm
            found.append(Finding(
                "stretch-over-limit", f"stretch flange {stretch.peak_strain:.3f} above the {alloy.name} limit "
                f"{alloy.stretch_limit:.3f} at {where:.0f} mm along the outline (plan radius "
                f"{stretch.min_radius_mm:.1f} mm); a flange of {stretch.allowed_width_mm:.1f} mm developed width would "
                "pass", key=_height_key(spec, piece, run), s_mm=where))
    return found


def _holes(spec: RibSpec, piece: PieceGeometry, alloy: materials.SheetAlloy) -> tuple[list[HoleCheck], list[Finding]]:
    """Each hole as formed: the die bore d + 2t for a flanged hole, the pilot from the flange's developed length,
    and the edge stretch from the pilot to the flange's mid-surface, (d + t)/pilot − 1."""
    t = spec.shared.sheet.thickness_mm
    checks, found = [], []
    for hole in piece.holes:
        if not hole.flanged:
            checks.append(HoleCheck(hole.d, hole.d, hole.d, 0.0, 0.0, True))
            continue
        pilot = pilot_diameter(hole.d, hole.flange_height, t, spec.shared.flange.bend_radius_mm, alloy.k_factor)
        stretch = (hole.d + t) / pilot - 1.0
        ok = stretch <= alloy.stretch_limit
        if not ok:
            found.append(Finding("hole-flange-stretch", f"hole at x = {hole.x:.0f} mm: flange edge stretch "
                                 f"{stretch:.3f} above the limit {alloy.stretch_limit:.3f}: lower its flange",
                                 key="lightening_holes"))
        checks.append(HoleCheck(hole.d, hole.d + 2.0 * t, pilot, hole.flange_height, stretch, ok))
    return checks, found


def _judge_flange(spec: RibSpec, runs: list[FlangeRun], flutes: tuple[relief_model.Flute, ...],
                  notches: tuple[relief_model.Notch, ...], holes: list[HoleCheck], shrink_limit: float
                  ) -> tuple[FlangeJudgement, list[Finding]]:
    """Residual shrink window by window after relief, the verdict, and the remedies that apply, in order.

    Each run's residual is judged against its own flange's wrinkle limit (``shrink_limit`` is the piece's when all
    its flanges are of one height); the worst run is the one whose residual is the largest fraction of its limit.
    """
    worst, at, worst_ratio = 0.0, None, 0.0
    profiles = []
    for run in runs:
        local = [(f.s_mm - run.s_offset_mm, f.width_mm, f.gather_mm) for f in flutes]
        local += [(n.s_mm - run.s_offset_mm, n.opening_mm, n.opening_mm) for n in notches]
        left = relief_model.residual_shrink(run.profile, local)
        profiles.append(left)
        limit = run.shrink_limit or shrink_limit
        if left.size and float(left.max()) / limit > worst_ratio:
            worst, at = float(left.max()), run.s_offset_mm + float(run.profile.s_mm[int(left.argmax())])
            worst_ratio, shrink_limit = worst / limit, limit
    stretch_bad = any(r.stretch_runs for r in runs) or not all(h.ok for h in holes)
    relief = spec.shared.relief
    alloy = spec.shared.sheet.alloy
    remedies: list[str] = []
    if worst > shrink_limit:
        if relief != "notches":
            remedies.append("V-notches in the blank (relief: notches) where the shrink is worst")
        remedies.append("a lower flange, or one cut back where it shrinks most" +
                        (" (the leading edge of a nose)" if spec.drawn is None else ""))
        if not alloy.endswith(("-O", "-W")):
            remedies.append(f"form it in O or W temper and heat treat it to {alloy} afterwards, to the alloy's "
                            "heat-treatment specification")
        remedies.append("shrink the flange edge by hand after pressing (shrinker or fluting pliers)")
    if stretch_bad:
        remedies.append("a lower flange where it stretches, or a softer temper (O or W) heat treated afterwards")
    if stretch_bad or worst > relief_model.HAND_FINISH_FACTOR * shrink_limit:
        verdict: relief_model.FlangeVerdict = "not-formable"
    elif worst > shrink_limit:
        verdict = "hand-finish"
        remedies.insert(0, remedies.pop())  # hand shrinking finishes what the press leaves
    else:
        verdict = "formable"
    found = []
    if worst > shrink_limit:
        message = (f"edge shrink {worst:.3f} remains after relief at {at:.0f} mm along the outline, above the "
                   f"{shrink_limit:.3f} wrinkle limit: {verdict}; " + "; or ".join(remedies))
        if verdict == "not-formable" and alloy.endswith("-T3"):
            message += (" (aggressive shapes in a hard temper crack when pressed hard: fact of the trade, no "
                        "source)")
        found.append(Finding("shrink-residual", message, key="relief", s_mm=at))
    return FlangeJudgement(shrink_limit, worst, at, verdict, tuple(remedies), tuple(profiles)), found


def _leg_name(shape: RunShape, shapes: tuple[RunShape, ...]) -> str:
    """" 8 mm" (one bend, several heights), or " 8 mm, R 3 mm, 45°" where the bends differ too."""
    if len(shapes) == 1:
        return ""
    if len({(h.bend_radius_mm, h.angle_deg) for h in shapes}) == 1:
        return f" {shape.height_mm:g} mm"
    return f" {shape.height_mm:g} mm, R {shape.bend_radius_mm:g} mm, {shape.angle_deg:g}°"


def _press(spec: RibSpec, piece: PieceGeometry, springback: Springback, flutes: tuple[relief_model.Flute, ...],
           holes: list[HoleCheck], die_height_mm: float, shapes: tuple[RunShape, ...]) -> press_model.PressCheck:
    shared = spec.shared
    alloy = materials.sheet_alloy(shared.sheet.alloy)
    die = materials.die_material(shared.die.material)
    minx, miny, maxx, maxy = _bounds(piece)
    # a wall leaning out (a flange bent through less than 90°) makes the die's foot larger than its outline
    foot = max(0.0, *(-die_height_mm * math.tan(math.radians(wall_lean_deg(h.die(springback)))) for h in shapes))
    minx, miny, maxx, maxy = minx - foot, miny - foot, maxx + foot, maxy + foot
    radius = springback.die_radius_mm
    # one leg per flange shape (a part's flange runs of heights, radii or angles of their own), each pressed onto its
    # own die radius to its own angle; the flutes' per shape they stand in
    legs = [press_model.FlangeLeg("perimeter flange" + _leg_name(h, shapes), "perimeter", h.height_mm,
                                  h.die(springback).die_radius_mm, h.angle_deg) for h in shapes]
    flute_shapes = [_shape_at(spec, piece, shapes, f.s_mm) for f in flutes]
    fluted = sorted(set(flute_shapes), key=shapes.index)
    for h in fluted:
        lip = min(f.lip_radius_mm or h.die(springback).die_radius_mm for f, own in zip(flutes, flute_shapes)
                  if own == h)
        legs.append(press_model.FlangeLeg("flutes" + ("" if len(fluted) == 1 else _leg_name(h, shapes) or
                                                      f" {h.height_mm:g} mm"), "flute", h.height_mm, lip,
                                          h.angle_deg))
    legs += [press_model.FlangeLeg(f"hole flange Ø{h.d_mm:.0f} mm", "hole", h.flange_height_mm, radius)
             for h in holes if h.flange_height_mm > 0.0]
    press = shared.press
    return press_model.press_check(
        press_model.PressSetup(press.force_n, *press.box_mm, press.rubber.thickness_mm, press.rubber.durometer,
                               press.wall_clearance_mm),
        press_model.DieFootprint(maxx - minx, maxy - miny, piece.die_area_mm2, die_height_mm,
                                 die.compressive_strength_mpa,
                                 die.life_parts if die.life_parts is not None else 10**9),
        legs, shared.sheet.thickness_mm, alloy.yield_mpa)


def _press_findings(check: press_model.PressCheck, springback: Springback) -> list[Finding]:
    found = list(check.warnings)
    short = check.short_legs
    if short and check.fits_box:
        folds = ", ".join(f"the {r.leg.name} to about {r.angle_deg:.0f}°" +
                          (f" of {r.leg.angle_deg:g}°" if r.leg.angle_deg != 90.0 else "") for r in short)
        radii = sorted({r.leg.radius_mm for r in short if r.leg.kind == "perimeter"}) or [springback.die_radius_mm]
        radius = f"{radii[0]:.2f} mm die radius" if len(radii) == 1 else \
            "die radii (" + ", ".join(f"{v:.2f}" for v in radii) + " mm)"
        found.append(Finding(
            "press-folds-part-way", f"the box gives {check.pressure_mpa:.2f} MPa but setting the flanges on the "
            f"{radius} needs {max(r.full_mpa for r in short):.2f} MPa: the press "
            f"folds {folds}; finish them on the die by hand (hand seamer, or a hardwood block and soft mallet), or use "
            "a bigger press or a smaller box", key="press.force"))
    return found


def _analyse_piece(spec: RibSpec, piece: PieceGeometry, alloy: materials.SheetAlloy, minimum: materials.MinRadius,
                   springback: Springback, layout: FlangeLayout,
                   dies: dict[tuple[float, float], Springback] | None = None) -> PieceAnalysis:
    shared = spec.shared
    t = shared.sheet.thickness_mm
    shapes = _run_shapes(spec, piece, alloy, layout, dies or {})
    several = len({h.height_mm for h in shapes}) > 1
    shrink_limit = min(h.shrink_limit for h in shapes)  # the lowest, for a piece without flanged curves
    runs = _flange_runs(spec, piece, alloy, shapes)
    flutes, notches, notes, warnings = _relief(spec, piece, runs, shapes, springback)
    warnings += _stretch_findings(spec, runs, alloy, piece)
    if shared.relief == "none":
        for run in runs:
            for shrink in run.shrink_runs:
                where = run.s_offset_mm + shrink.s_start_mm
                warnings.append(Finding(
                    "shrink-without-relief", f"shrink {-shrink.peak_strain:.3f} above the limit "
                    f"{run.shrink_limit:.3f} over {shrink.length_mm:.0f} mm from {where:.0f} mm along the outline "
                    "and relief is 'none': expect wrinkles", key="relief", s_mm=where))
    holes, hole_findings = _holes(spec, piece, alloy)
    warnings += hole_findings
    judgement, judged = _judge_flange(spec, runs, flutes, notches, holes, shrink_limit)
    warnings += judged
    layers, height = die_build_up(spec)
    press = _press(spec, piece, springback, flutes, holes, height, shapes)
    tallest = tallest_flange_mm(spec)
    warnings += _press_findings(press, springback)
    if height > shared.die.stock_thickness_mm + 1e-9 and layers == 1:
        warnings.append(Finding(
            "print-height-raised", f"die.stock_thickness {shared.die.stock_thickness_mm:.1f} mm is lower than the "
            f"{'tallest ' if several else ''}flange height {tallest:.1f} mm + {STOCK_CLEARANCE_MM:.0f} mm "
            f"clearance: the die is printed {height:.0f} mm high", key="die.stock_thickness"))
    if layers > 1:
        warnings.append(Finding(
            "die-laminated", f"die stock {shared.die.stock_thickness_mm:.1f} mm is thinner than the "
            f"{'tallest ' if several else ''}flange height {tallest:.1f} mm + {STOCK_CLEARANCE_MM:.0f} mm "
            f"clearance: laminate {layers} layers ({height:.1f} mm)", key="die.stock_thickness"))
    blank = _blank(spec, piece, springback, layout, notches, holes, alloy, t, shapes)
    return PieceAnalysis(piece, alloy, minimum, springback, layout, tuple(runs), flutes, notches, notes, judgement,
                         tuple(holes), press, blank, height, layers,
                         tuple(w.about(piece.part_id, spec.positions, rib_id=spec.id) for w in warnings),
                         shapes=shapes)


def _blank(spec: RibSpec, piece: PieceGeometry, springback: Springback, layout: FlangeLayout,
           notches: tuple[relief_model.Notch, ...], holes: list[HoleCheck], alloy: materials.SheetAlloy, t: float,
           shapes: tuple[RunShape, ...]) -> BlankDrawing:
    """The blank: each flanged run's edge stands its own flange's developed width less its own die's tangent inset
    R_die·tan(θ_die/2) outside the die outline (the die's top edge to the web's bend line)."""
    tangent_inset = springback.die_radius_mm * math.tan(math.radians(springback.die_angle_deg) / 2)
    own = {h: h.layout.developed_width_mm - h.tangent_inset_mm(springback) for h in shapes}
    offset = own[shapes[0]] if len(shapes) == 1 else layout.developed_width_mm - tangent_inset
    run_offsets = run_insets = None
    if len(set(own.values())) > 1:
        run_offsets = tuple(own[_shape_of(spec, shapes, run)] if run.flanged else 0.0 for run in piece.runs)
    elif len(shapes) > 1:
        offset = next(iter(own.values()))
    if any(h.springback is not None for h in shapes):
        run_insets = tuple(_shape_of(spec, shapes, run).tangent_inset_mm(springback) if run.flanged else 0.0
                           for run in piece.runs)
        tangent_inset = _shape_at(spec, piece, shapes, 0.0).tangent_inset_mm(springback)
    cuts = [notch_polygon(piece, n.s_mm, n.opening_mm, n.depth_mm,
                          offset if run_offsets is None else own[_shape_at(spec, piece, shapes, n.s_mm)])
            for n in notches]
    die_radius = max(h.die(springback).die_radius_mm for h in shapes)
    blank = develop_blank(piece, offset_mm=offset, die_radius_mm=die_radius,
                          tangent_inset_mm=tangent_inset, thickness_mm=t,
                          material=f"{alloy.name}, {t:.3f} mm", pilot_diameters=[h.pilot_d_mm for h in holes],
                          notch_cuts=cuts, run_offsets_mm=run_offsets, run_tangent_insets_mm=run_insets)
    return replace(blank, grain_angle_deg=GRAIN_ANGLE_DEG)


def _bounds(piece: PieceGeometry) -> tuple[float, float, float, float]:
    """The die's extent (mm): its outline's least and greatest x and y."""
    pts = np.asarray(piece.die_outline)
    return float(pts[:, 0].min()), float(pts[:, 1].min()), float(pts[:, 0].max()), float(pts[:, 1].max())


def _relief(spec: RibSpec, piece: PieceGeometry, runs: list[FlangeRun], shapes: tuple[RunShape, ...],
            springback: Springback) -> tuple[tuple, tuple, tuple[str, ...], list[Finding]]:
    """Flutes (placed by the local excess, lips rounded to the run's own die radius), notches (sized for the run's
    own bend radius), their notes, and findings for relief that does not fit."""
    shared = spec.shared
    t = shared.sheet.thickness_mm
    flutes: list[relief_model.Flute] = []
    notches: list[relief_model.Notch] = []
    notes: list[str] = []
    warnings: list[Finding] = []
    for run in runs:
        own = _shape_of(spec, shapes, piece.plain_runs[run.run_index])
        die_radius = own.die(springback).die_radius_mm
        for shrink in run.shrink_runs:
            if shared.relief == "flutes":
                found = relief_model.flutes(shrink, run.height_mm, t, die_radius,
                                            strain=run.profile, lip_radius=die_radius)
                flutes.extend(_shift(f, run.s_offset_mm) for f in found.flutes)
                notes.append(found.note)
                if not found.fits:
                    warnings.append(Finding("relief-short", found.note, key="relief",
                                            s_mm=run.s_offset_mm + shrink.s_start_mm))
            elif shared.relief == "notches":
                width = own.layout.developed_width_mm
                found_n = relief_model.notches(shrink, width, t, own.bend_radius_mm)
                notches.extend(_shift(n, run.s_offset_mm) for n in found_n.notches)
                notes.append(found_n.note)
    return tuple(flutes), tuple(notches), tuple(notes), warnings


def _shift(item, offset: float):
    return replace(item, s_mm=item.s_mm + offset)


__all__ = ["GRAIN_ANGLE_DEG", "MODELS", "STOCK_CLEARANCE_MM", "FlangeJudgement", "FlangeRun", "HoleCheck",
           "PieceAnalysis", "RibAnalysis", "RunShape", "analyse_rib", "bend_sheet", "check_radius", "die_inset_mm",
           "die_layers", "join_key", "run_shape_keys", "run_springbacks", "springback_for", "tallest_flange_mm",
           "uses_spec_bend", "wall_lean_deg"]
