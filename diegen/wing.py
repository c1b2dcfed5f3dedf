"""Whole wings: planform → rib stations → one rib spec and section per station.

Planform conventions: Y runs along the span from the root rib (y = 0) to the tip
rib (y = span); chord varies linearly (straight taper); the sweep is that of the
line at ``sweep_line`` × chord; the root leading edge is at x = 0.  Spar lines
are straight in plan between their root and tip positions, so their chord
fraction varies between stations when they are not on a constant-fraction line.

``normal-to-spar`` ribs stand square to the first spar: on a spar swept by φ the
rib crosses the wing between leading and trailing edge over c·cos(φ) (exact when
both edges are parallel to the spar, an approximation on a tapered wing) while
the depth stays the same, so the section is shortened along the rib by cos(φ);
the rib crosses the webs square, so web and cap widths are not changed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from diegen.errors import GeometryError
from diegen.spec.model import RibSpec, Spar, WingSpec

__all__ = ["RibStation", "chord_at", "leading_edge_at", "rib_spec", "section_at", "station_positions", "stations"]


@dataclass(frozen=True)
class RibStation:
    number: int  # 1-based from the root
    y_mm: float  # spanwise distance from the root rib
    chord_mm: float  # streamwise chord
    x_le_mm: float  # leading edge in plan
    spar_fractions: tuple[float, ...]  # chord fraction of each spar's forward face at this station
    oblique_deg: float  # angle between the rib and the streamwise direction (0 for streamwise ribs)


def station_positions(spec: WingSpec) -> tuple[float, ...]:
    """Spanwise rib positions (mm from the root rib)."""
    stations = spec.stations
    if stations.positions_mm:
        return stations.positions_mm
    if stations.count is not None:
        return tuple(float(y) for y in np.linspace(0.0, spec.span_mm, stations.count))
    pitch = stations.pitch_mm
    ys = list(np.arange(0.0, spec.span_mm - 1e-6, pitch))
    return (*(float(y) for y in ys), spec.span_mm)


def chord_at(spec: WingSpec, y: float) -> float:
    """Straight taper: c(y) = c_root + (c_tip − c_root)·y/span (mm)."""
    return spec.root_chord_mm + (spec.tip_chord_mm - spec.root_chord_mm) * y / spec.span_mm


def leading_edge_at(spec: WingSpec, y: float) -> float:
    """x of the leading edge in plan (mm), from the sweep of the reference line."""
    line_root = spec.sweep_line * spec.root_chord_mm
    return line_root + y * math.tan(math.radians(spec.sweep_deg)) - spec.sweep_line * chord_at(spec, y)


def stations(spec: WingSpec) -> tuple[RibStation, ...]:
    result = []
    tip_le = leading_edge_at(spec, spec.span_mm)
    for number, y in enumerate(station_positions(spec), start=1):
        c, x_le = chord_at(spec, y), leading_edge_at(spec, y)
        fractions = []
        for spar in spec.spars:
            root_x = spar.root_at * spec.root_chord_mm
            tip_x = tip_le + spar.tip_at * spec.tip_chord_mm
            x = root_x + (tip_x - root_x) * y / spec.span_mm
            fractions.append((x - x_le) / c)
        oblique = 0.0
        if spec.rib_orientation == "normal-to-spar" and spec.spars:
            s = spec.spars[0]
            dx = (tip_le + s.tip_at * spec.tip_chord_mm) - s.root_at * spec.root_chord_mm
            oblique = math.degrees(math.atan2(dx, spec.span_mm))
        result.append(RibStation(number, y, c, x_le, tuple(fractions), oblique))
    return tuple(result)


def rib_spec(spec: WingSpec, station: RibStation) -> RibSpec:
    """The rib spec of one station, with the wing's per-rib overrides applied."""
    shared = spec.shared
    for override in spec.overrides:
        if station.number in override.ribs:
            shared = replace(shared, **override.changes)
    stretch = math.cos(math.radians(station.oblique_deg))  # rib length / streamwise chord
    spars = []
    for spar, fraction in zip(spec.spars, station.spar_fractions):
        if not 0.0 < fraction < 1.0:
            raise GeometryError(f"{spec.file}: spar line leaves the chord at rib {station.number} "
                                f"(chord fraction {fraction:.3f})")
        spars.append(Spar(fraction, spar.web_mm, spar.cap_thickness_mm, spar.cap_width_mm))
    applied = [f"overrides[{i}]." for i, o in enumerate(spec.overrides) if station.number in o.ribs]
    positions = replace(spec.positions, prefixes=(*reversed(applied), ""))  # the last override wins
    warnings = tuple(w for w in spec.unit_warnings
                     if not w.key.startswith("overrides[") or any(w.key.startswith(a) for a in applied))
    return RibSpec(id=f"{spec.id}-R{station.number:02d}", units=spec.units, airfoil=spec.root_airfoil,
                   chord_mm=station.chord_mm * stretch, spars=tuple(spars), shared=shared, file=spec.file,
                   title=f"rib {station.number} at {station.y_mm:.0f} mm from the root", positions=positions,
                   unit_warnings=warnings, section=section_label_at(spec, station), paper=spec.paper)


def blend_fraction(spec: WingSpec, station: RibStation) -> float:
    """How much of the tip section a station's section holds: its span fraction, 0 at the root rib, 1 at the tip."""
    return station.y_mm / spec.span_mm


def section_label_at(spec: WingSpec, station: RibStation) -> str:
    """The section of a station as the builder reads it: "NACA 23015" where root and tip are one section, else
    the blend by span fraction, "62 % NACA 23015 + 38 % NACA 23012", and the oblique cut of a rib square to the spar."""
    root, tip = spec.root_airfoil.label, spec.tip_airfoil.label
    fraction = blend_fraction(spec, station)
    if spec.root_airfoil == spec.tip_airfoil or fraction <= 0.0:
        label = root
    elif fraction >= 1.0:
        label = tip
    else:
        tip_pc = 100.0 * fraction
        digits = 0 if 0.5 <= tip_pc <= 99.5 else 1  # never "100 % A + 0 % B" for a true blend
        label = f"{100.0 - tip_pc:.{digits}f} % {root} + {tip_pc:.{digits}f} % {tip}"
    if station.oblique_deg:
        label += f", cut square to the spar ({station.oblique_deg:.1f}° to the stream)"
    return label


def section_at(spec: WingSpec, station: RibStation) -> np.ndarray:
    """The unit-chord section at a station: root and tip blended by span fraction, oblique cut applied."""
    from diegen.geometry.rib import section_surfaces
    from diegen.geometry.section import blend_surfaces

    n = max(spec.root_airfoil.points, spec.tip_airfoil.points)
    fraction = blend_fraction(spec, station)
    section = blend_surfaces(section_surfaces(spec.root_airfoil, n), section_surfaces(spec.tip_airfoil, n), fraction)
    if station.oblique_deg:
        section[:, 1] /= math.cos(math.radians(station.oblique_deg))  # depth kept while the chord shrinks by cos
    return section
