"""A rib at one station: mold-line offsets, pieces at the spars, joggles, holes and pins.

Pure numpy/shapely: nothing here imports the solid kernel (``diegen check`` runs on this alone).
"""

from __future__ import annotations

import re
from functools import lru_cache

import numpy as np
from shapely.geometry import Polygon

from diegen.errors import GeometryError, keyed
from diegen.findings import Finding
from diegen.geometry import holes as hole_rules
from diegen.geometry import pins as pin_rules
from diegen.geometry.pieces import (
    MIN_END_FACE_MM,
    SparCut,
    depth_at,
    joggles_for,
    monotone_surfaces,
    piece_runs,
    relief_points,
    tail_end,
)
from diegen.geometry.polygon import QUAD_SEGS, as_points, inscribed_diameter, offset_inward, vertical_extents
from diegen.geometry.tooling import tooling
from diegen.geometry.types import Hole, PieceGeometry, RibGeometry
from diegen.spec.model import AirfoilSource, RibSpec

__all__ = ["CUT_END_OVERRUN_MM", "CUT_END_OVERRUN_PER_RADIUS", "DEPTH_SAMPLES", "FAIR_MARGIN_MM", "die_overrun_mm",
           "joggle_fair_radius", "load_section", "min_tail_depth", "raw_section",
           "rib_geometry", "section_surfaces", "unit_findings"]

DEPTH_SAMPLES = 64
CUT_END_OVERRUN_PER_RADIUS = 1.5  # design choice: the die's run past a cut end, per mm of bend radius ...
CUT_END_OVERRUN_MM = 3.0  # ... plus this much (a 3/32 in bend radius: 6.6 mm)
FAIR_MARGIN_MM = 0.5  # joggle ramps bend this much rounder than the die wall's inset (design choice: room for sampling)


@lru_cache(maxsize=64)
def raw_section(source: AirfoilSource) -> np.ndarray:
    """The unit-chord section loop of ``source`` as generated or read (CCW, LE at the origin)."""
    from diegen.geometry.coordfile import read_coordinates
    from diegen.geometry.naca import naca_section

    if source.naca:
        raw = naca_section(source.naca, n_points=801, closed_te=source.closed_te)
    else:
        raw = read_coordinates(source.file)
    raw.setflags(write=False)
    return raw


@lru_cache(maxsize=64)
def section_surfaces(source: AirfoilSource, n_points: int) -> tuple[np.ndarray, np.ndarray]:
    """The upper and lower surfaces of ``source`` re-sampled for ``n_points`` (see
    :func:`diegen.geometry.section.resample_surfaces`), read-only: the same for every station of a wing."""
    from diegen.geometry.section import resample_surfaces

    surfaces = resample_surfaces(raw_section(source), n_points)
    for surface in surfaces:
        surface.setflags(write=False)
    return surfaces


@lru_cache(maxsize=64)
def load_section(source: AirfoilSource) -> np.ndarray:
    """The section of ``source`` smoothly re-sampled to ``source.points`` points for machining."""
    from diegen.geometry.section import resample

    section = resample(raw_section(source), source.points)
    section.setflags(write=False)
    return section


def min_tail_depth(spec: RibSpec) -> float:
    """Depth where the tail piece ends (mm): the spec's value, else 2 × flange height + 10 mm."""
    flange = spec.shared.flange
    return flange.min_tail_depth_mm if flange.min_tail_depth_mm is not None else 2 * flange.height_mm + 10.0


def unit_findings(spec: RibSpec) -> list[Finding]:
    """The spec's numbers that look written in the other unit (:mod:`diegen.spec.plausible`), as findings."""
    return [Finding("units-suspect", w.message, rib_id=spec.id, key=w.key, file=w.file, line=w.line,
                    column=w.column) for w in spec.unit_warnings]


def joggle_fair_radius(spec: RibSpec, die_inset_mm: float) -> float:
    """The radius (mm) a joggle's run-outs must bend no tighter than: the cutter's (a printed die: the printer's
    smallest inside radius), and the die wall's largest inset ``die_inset_mm`` plus ``FAIR_MARGIN_MM``."""
    die = spec.shared.die
    inside = tooling(die.material, die.cutter_diameter_mm).inside_radius_mm
    return max(inside, die_inset_mm + FAIR_MARGIN_MM if die_inset_mm > 0 else 0.0)


def rib_geometry(spec: RibSpec, section: np.ndarray | None = None, die_inset_mm: float = 0.0, *,
                 stretch_limit: float) -> RibGeometry:
    """Compute the rib's 2D geometry; ``section`` (unit chord) defaults to the spec's airfoil.

    ``die_inset_mm`` is the largest inset of the die's wall from its outline
    (top-edge setback or bottom inset, mm): the joggle ramps bend no tighter
    than it (plus ``FAIR_MARGIN_MM``) where they turn convex, so the die's
    offset sections stay smooth, and no tighter than the cutter radius (for a
    printed die, the printer's smallest inside radius).
    ``stretch_limit`` is the sheet alloy's largest edge stretch (fraction): it
    sizes the flanges of lightening holes placed automatically.
    """
    shared = spec.shared
    unit = load_section(spec.airfoil) if section is None else np.asarray(section, float)
    scaled = unit * spec.chord_mm
    airfoil = Polygon(scaled)
    if not airfoil.is_valid:
        raise GeometryError(f"the {spec.section_label} section is not a simple outline at {spec.chord_mm:.0f} mm chord "
                            "(it crosses or touches itself): check the airfoil's coordinates", key="airfoil")
    skin, sheet_t = shared.skin_thickness_mm, shared.sheet.thickness_mm
    with keyed("skin_thickness"):
        oml = offset_inward(airfoil, skin, f"offsetting the section inward by the skin ({skin:.3f} mm)")
    with keyed("sheet.thickness"):
        die = offset_inward(oml, sheet_t, f"offsetting the outer mold line inward by the rib sheet ({sheet_t:.3f} mm)")
    upper, lower = monotone_surfaces(np.asarray(as_points(die)))
    spars = [SparCut(s.at * spec.chord_mm, s.web_mm, s.cap_thickness_mm, s.cap_width_mm) for s in spec.spars]
    warnings: list[Finding] = unit_findings(spec)
    pieces = []
    fair_radius = joggle_fair_radius(spec, die_inset_mm)
    for name, x0, x1, aft_flanged in _piece_ranges(spec, spars, upper, lower, warnings):
        pieces.append(_piece(spec, name, x0, x1, aft_flanged, upper, lower, spars, fair_radius, stretch_limit,
                             warnings))
    if not pieces:
        raise GeometryError(f"rib {spec.id} has no piece left to make: "
                            f"{'; '.join(w.message for w in warnings if w.code == 'tail-piece-dropped')}",
                            key="flange.min_tail_depth")
    return RibGeometry(spec.id, spec.chord_mm, _tuple(scaled), as_points(oml), as_points(die), tuple(pieces),
                       tuple(warnings))


def _piece_ranges(spec: RibSpec, spars: list[SparCut], upper: np.ndarray, lower: np.ndarray,
                  warnings: list[Finding]) -> list[tuple[str, float | None, float, bool]]:
    t = spec.shared.sheet.thickness_mm
    ranges: list[tuple[str, float | None, float, bool]] = []
    for name in spec.shared.pieces:
        if name == "nose":
            ranges.append((name, None, spars[0].x_front_mm - t, True))
        elif name == "center":
            ranges.append((name, spars[0].x_aft_mm + t, spars[1].x_front_mm - t, True))
        else:
            start = spars[-1].x_aft_mm + t
            limit = min_tail_depth(spec)
            end = tail_end(upper, lower, start, limit)
            shortest = 2 * spec.shared.flange.height_mm
            if end is None or end - start < shortest:
                depth = depth_at(upper, lower, start)
                where = (f"already below the minimum tail depth of {limit:.1f} mm" if end is None else
                         f"and it falls below the minimum tail depth of {limit:.1f} mm within {end - start:.1f} mm; "
                         f"a tail piece needs at least {shortest:.1f} mm (2 × flange height) of length")
                warnings.append(Finding(
                    "tail-piece-dropped", f"no tail piece: the die depth aft of the rear spar is {depth:.1f} mm, "
                    f"{where} (set flange.min_tail_depth to change this)", key="flange.min_tail_depth",
                ).about("", spec.positions, rib_id=spec.id))
                continue
            ranges.append((name, start, end, False))
    return ranges


def _piece(spec: RibSpec, name: str, x0: float | None, x1: float, aft_flanged: bool, upper: np.ndarray,
           lower: np.ndarray, spars: list[SparCut], fair_radius: float, stretch_limit: float,
           warnings: list[Finding]) -> PieceGeometry:
    shared = spec.shared
    part_id = f"{spec.id}-{name}"
    lo = float(upper[0, 0]) if x0 is None else float(x0)
    x1 = float(x1)
    if x1 - lo < 1.0:
        why = (f"; the skin and sheet offsets put the die's leading edge at x = {lo:.1f} mm, behind the spar"
               if x0 is None else "")
        raise GeometryError(f"the {name} piece of rib {spec.id} has no length (from x = {lo:.1f} to {x1:.1f} mm; "
                            f"at least 1.0 mm needed){why}: move the spar aft, use a thinner skin, or leave the piece "
                            "out (pieces)", key="skin_thickness" if x0 is None else "spars[1].at")
    joggles = joggles_for(lo, x1, spars, shared.joggle_runout, fair_radius)
    try:
        runs = piece_runs(upper, lower, x0, x1, joggles, aft_flanged)
    except GeometryError as error:
        face = re.search(r"x = ([-0-9.]+) mm", str(error))
        at = float(face[1]) if face else x1
        nearest = min(range(len(spars)), key=lambda i: min(abs(spars[i].x_front_mm - at), abs(spars[i].x_aft_mm - at)))
        raise GeometryError(f"the {name} piece of rib {spec.id}: {error}: move the spar where the section is deeper, "
                            "or leave the piece out (pieces)", key=f"spars[{nearest}].at") from None
    points = [p for run in runs for p in run.points[:-1]]
    polygon = Polygon(points)
    if not polygon.is_valid or polygon.area <= 0:
        raise GeometryError(f"the {name} piece of rib {spec.id} is not a simple outline (joggles deeper than the "
                            "section?): use thinner spar caps or move the spars", key="spars")
    radius = shared.flange.bend_radius_mm
    if polygon.buffer(-radius, quad_segs=QUAD_SEGS).is_empty:
        deepest = inscribed_diameter(polygon)
        raise GeometryError(
            f"the {name} piece of rib {spec.id} has no flat web between its flange bends: its die outline is only "
            f"{deepest:.2f} mm deep at its deepest, and the bend radius of {radius:.2f} mm on each side needs more "
            f"than {2 * radius:.2f} mm (the flange bends would overlap): use a smaller bend radius or leave the "
            "piece out (pieces)", key="flange.bend_radius")
    with keyed("lightening_holes"):
        holes = _holes(spec, name, polygon, (lo, x1), radius, stretch_limit)
    with keyed("pins"):
        holes, pins = _pins_and_holes(spec, name, polygon, (lo, x1), radius, holes, warnings)
    plain = piece_runs(upper, lower, x0, x1, (), aft_flanged) if joggles else runs
    overrun = 0.0 if aft_flanged else die_overrun_mm(upper, lower, x1, radius)
    die_runs = piece_runs(upper, lower, x0, x1 + overrun, joggles, aft_flanged) if overrun else ()
    return PieceGeometry(name, part_id, (lo, x1), runs, tuple(joggles), holes, pins, relief_points(runs),
                         _depth_range(polygon, lo, x1, name), plain, die_runs=die_runs, die_overrun_mm=overrun)


def die_overrun_mm(upper: np.ndarray, lower: np.ndarray, x_cut: float, bend_radius_mm: float) -> float:
    """How far (mm) a tail piece's die runs on aft past the piece's cut end, following the section: far enough that
    the blank's end, flush with the cut, lies on the die's flat top with room to spare
    (:data:`CUT_END_OVERRUN_PER_RADIUS` × bend radius + :data:`CUT_END_OVERRUN_MM`); the top-edge round sets the flat
    top back by about the die radius, which springback makes smaller than the bend radius.  Less where the section
    ends sooner, and 0 where it leaves less than half of that (the shop sheet then asks for a square top edge
    there)."""
    wanted = CUT_END_OVERRUN_PER_RADIUS * bend_radius_mm + CUT_END_OVERRUN_MM
    room = min(float(upper[-1, 0]), float(lower[-1, 0])) - x_cut
    while room > 0.0 and depth_at(upper, lower, x_cut + min(wanted, room)) < 2.0 * MIN_END_FACE_MM:
        room -= 0.5  # a die end face needs some depth
    overrun = min(wanted, room)
    return overrun if overrun >= 0.5 * wanted else 0.0


def _holes(spec: RibSpec, name: str, polygon: Polygon, x_range: tuple[float, float], radius: float,
           stretch_limit: float) -> tuple[Hole, ...]:
    holes = spec.shared.holes
    if holes.mode == "none":
        return ()
    if holes.mode == "list":
        return hole_rules.explicit_holes(polygon, x_range, radius, holes.rules, holes.explicit, name)
    # a hole flange needs a straight leg beyond its bend: at least R + T + 1 mm high
    shortest = radius + spec.shared.sheet.thickness_mm + 1.0
    return hole_rules.auto_holes(polygon, radius, holes.rules, stretch_limit, shortest)


def _pins_and_holes(spec: RibSpec, name: str, polygon: Polygon, x_range: tuple[float, float], radius: float,
                    holes: tuple[Hole, ...], warnings: list[Finding]) -> tuple[tuple[Hole, ...], tuple]:
    """The piece's holes and pins: where automatic holes leave no web for automatic pins, the holes nearest the
    piece's ends are left out, one at a time, until the pins fit (a finding says which)."""
    try:
        return holes, _pins(spec, name, polygon, x_range, radius, holes)
    except GeometryError:
        if not (spec.shared.holes.mode == "auto" and spec.shared.pins.mode == "auto" and holes):
            raise
    kept = list(holes)
    for hole in sorted(holes, key=lambda h: min(h.x - x_range[0], x_range[1] - h.x)):
        kept.remove(hole)
        try:
            pins = _pins(spec, name, polygon, x_range, radius, tuple(kept))
        except GeometryError:
            continue
        dropped = [h for h in holes if h not in kept]
        warnings.append(Finding(
            "holes-left-out-for-pins", f"the {name} piece: {len(dropped)} automatic lightening hole(s) left out "
            f"(at x = {', '.join(f'{h.x:.0f}' for h in dropped)} mm) so the tooling pins have web to stand in",
            key="lightening_holes").about(spec.id, spec.positions))
        return tuple(kept), pins
    return holes, _pins(spec, name, polygon, x_range, radius, holes)  # no hole left out helps: say why


def _pins(spec: RibSpec, name: str, polygon: Polygon, x_range: tuple[float, float], radius: float,
          holes: tuple[Hole, ...]) -> tuple:
    pins = spec.shared.pins
    margin = spec.shared.holes.rules.edge_margin_mm
    if pins.mode == "list":
        return pin_rules.explicit_pins(polygon, x_range, radius, margin, pins.diameter_mm, holes, pins.explicit, name)
    return pin_rules.auto_pins(polygon, radius, margin, pins.diameter_mm, holes, name)


def _depth_range(polygon: Polygon, x0: float, x1: float, name: str) -> tuple[float, float]:
    """Smallest and largest web depth (mm); the nose is sampled from a tenth of its length (its tip has none)."""
    start = x0 + (0.1 * (x1 - x0) if name == "nose" else 1e-6)
    extents = vertical_extents(polygon, np.linspace(start, x1 - 1e-6, DEPTH_SAMPLES))
    depths = extents[:, 1] - extents[:, 0]
    depths = depths[np.isfinite(depths)]
    return (round(float(depths.min()), 3), round(float(depths.max()), 3)) if depths.size else (0.0, 0.0)


def _tuple(points: np.ndarray):
    return tuple((float(x), float(y)) for x, y in points)
