"""Domain asserts and measurements shared by the geometry, analysis, blank, wing and report tests.

Everything here measures with general-purpose tools (shapely, numpy) rather
than with diegen's own helpers, so the tests compare diegen against an
independent computation.  Lengths in mm, angles in radians unless a name says
otherwise.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from pathlib import Path

import numpy as np
import pytest
import shapely
from shapely.geometry import LinearRing, LineString, Point, Polygon

ROOT = Path(__file__).resolve().parent.parent
SPECS = ROOT / "specs"
DEMO_RIB = SPECS / "demo-rib.yaml"
DEMO_WING = SPECS / "demo-wing.yaml"



def cache_bytecode() -> None:
    """Compile diegen's modules to their cached bytecode files, as its first run on a user's machine does.

    For benchmarks that time new processes: where the environment says not to write bytecode
    (``PYTHONDONTWRITEBYTECODE``), every new process would compile the package again (about 0.1 s), which no
    user's second run pays.
    """
    import compileall

    compileall.compile_dir(ROOT / "diegen", quiet=1)


MM_PER_IN = 25.4  # NIST SP 811 App. B: 1 in = 25.4 mm exactly
N_PER_LBF = 4.4482216152605  # NIST SP 811 App. B: 1 lbf in N, exact by definition

# The demo rib in millimetres (an invented rib), for what the reports do by the spec's units; the press force is
# the test's own choice.
MM_RIB = """\
diegen: 1
kind: rib
id: M1
units: mm
airfoil: naca 2412
chord: 1000
skin_thickness: 0.6
sheet: {{alloy: 2024-T3, thickness: 0.6}}
flange: {{height: 12, bend_radius: 2.5}}
spars:
  - {{at: 0.25, web: 1.6, cap_thickness: 1.6, cap_width: 19}}
  - {{at: 0.70, web: 1.3, cap_thickness: 1.3, cap_width: 16}}
pieces: [nose, tail]
die: {{material: solid-surface, stock_thickness: 20, cutter_diameter: 6}}
press: {{force: {force}, box: [300, 250], rubber: {{durometer: 55, thickness: 60}}}}
"""

#: The one length tolerance for "the same outline" (mm); looser ones are named where they are used.
OUTLINE_TOL_MM = 0.01


def stretch_limit(spec) -> float:
    """The stretch limit of the spec's sheet alloy, read from the catalogue as the analysis passes it to
    ``rib_geometry``."""
    from diegen import materials

    return materials.sheet_alloy(spec.shared.sheet.alloy).stretch_limit


def as_array(points: Sequence[Sequence[float]]) -> np.ndarray:
    return np.asarray(points, dtype=float).reshape(-1, 2)


def signed_area(points: Sequence[Sequence[float]]) -> float:
    """Shoelace area of a closed loop (mm², positive when counter-clockwise)."""
    x, y = as_array(points).T
    return float(0.5 * np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def distances_to(points: Sequence[Sequence[float]], target: shapely.Geometry) -> np.ndarray:
    """Euclidean distance (mm) from each point to ``target`` (shapely), as an array."""
    pts = shapely.points(as_array(points))
    return np.asarray(shapely.distance(pts, target), dtype=float)


def loop_distance(a: Sequence[Sequence[float]], b: Sequence[Sequence[float]], step_mm: float = 1.0) -> float:
    """Symmetric Hausdorff distance (mm) between two closed loops: every vertex of each, plus points every
    ``step_mm`` along its edges, measured to the other loop."""
    ra, rb = LinearRing(as_array(a)), LinearRing(as_array(b))
    da = shapely.segmentize(ra, step_mm)
    db = shapely.segmentize(rb, step_mm)
    return float(max(distances_to(shapely.get_coordinates(da), rb).max(),
                     distances_to(shapely.get_coordinates(db), ra).max()))


def assert_outlines_close(a: Sequence[Sequence[float]], b: Sequence[Sequence[float]],
                          tol: float = OUTLINE_TOL_MM) -> None:
    """Two closed loops describe the same curve within ``tol`` mm (start point and vertex count may differ)."""
    gap = loop_distance(a, b)
    assert gap <= tol, f"outlines differ by {gap:.4f} mm (allowed {tol} mm)"


def assert_valid_ccw_outline(points: Sequence[Sequence[float]], what: str = "outline") -> None:
    """A simple (non self-touching), valid, counter-clockwise closed loop with no repeated closing point."""
    p = as_array(points)
    assert len(p) >= 3, f"{what}: {len(p)} points"
    assert not np.allclose(p[0], p[-1]), f"{what}: the closing point is repeated"
    ring = LinearRing(p)
    assert ring.is_simple, f"{what}: the loop crosses or touches itself"
    assert Polygon(p).is_valid, f"{what}: {shapely.is_valid_reason(Polygon(p))}"
    assert signed_area(p) > 0.0, f"{what}: not counter-clockwise"


def turning_angles(points: Sequence[Sequence[float]]) -> np.ndarray:
    """Signed exterior angle at each vertex of a closed loop (rad, + = left turn = convex for a CCW loop)."""
    p = as_array(points)
    e = np.roll(p, -1, axis=0) - p
    heading = np.arctan2(e[:, 1], e[:, 0])
    return (heading - np.roll(heading, 1) + np.pi) % (2 * np.pi) - np.pi


def three_point_radii(points: Sequence[Sequence[float]]) -> tuple[np.ndarray, np.ndarray]:
    """Radius (mm) of the circle through each vertex and its two neighbours, and whether the vertex is concave.

    For a CCW loop a concave vertex turns right (negative cross product).
    """
    p = as_array(points)
    a, c = np.roll(p, 1, axis=0), np.roll(p, -1, axis=0)
    u, v = p - a, c - p
    cross = u[:, 0] * v[:, 1] - u[:, 1] * v[:, 0]
    la, lb, lc = np.hypot(*u.T), np.hypot(*v.T), np.hypot(*(c - a).T)
    with np.errstate(divide="ignore"):
        radius = np.where(cross != 0.0, la * lb * lc / (2.0 * np.abs(cross)), np.inf)
    return radius, cross < 0.0


def nearest_index(points: Sequence[Sequence[float]], point: Sequence[float]) -> int:
    p = as_array(points)
    return int(np.argmin(np.hypot(*(p - np.asarray(point, float)).T)))


def vertical_chord(polygon: Polygon, x: float) -> float:
    """Length (mm) of the polygon's cut by the vertical line at ``x`` (the local depth of a simple shape)."""
    _minx, miny, _maxx, maxy = polygon.bounds
    return float(polygon.intersection(LineString([(x, miny - 10), (x, maxy + 10)])).length)


def circle_points(radius: float, n: int, centre: tuple[float, float] = (0.0, 0.0), start: float = 0.0) -> np.ndarray:
    """``n`` CCW points of a regular polygon inscribed in a circle (mm)."""
    a = start + np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    return np.column_stack([centre[0] + radius * np.cos(a), centre[1] + radius * np.sin(a)])


def point(p: Sequence[float]) -> Point:
    return Point(float(p[0]), float(p[1]))


def timed_with_peak(function, *args):
    """Call ``function(*args)``: (result, seconds, peak traced memory in bytes).

    The peak comes from a second call, since tracing slows Python several times over.
    """
    import time
    import tracemalloc

    start = time.perf_counter()
    result = function(*args)
    seconds = time.perf_counter() - start
    tracemalloc.start()
    try:
        function(*args)
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    return result, seconds, peak


REPORTED: list[str] = []


def report(*parts: object) -> None:
    """A line for the end of the test run (counts of fuzz cases, database sweeps): shown even under -q."""
    REPORTED.append(" ".join(str(p) for p in parts))


# --- the forming models the reports print, written out again from their stated formulas -------------------------
# Units: mm, MPa, degrees.  Each carries its source; the press model and the wrinkle limit are the project's own
# (specs/README.md, "What the report says"), so these check that the report prints what the model says, worked
# out here from the spec's own inputs.

#: Plane-strain flow stress over the uniaxial one, 2/√3 (the von Mises criterion in plane strain, as commonly
#: quoted; from memory, unverified).
PLANE_STRAIN = 2.0 / math.sqrt(3.0)


def set_on_radius_mpa(yield_mpa: float, thickness_mm: float, radius_mm: float) -> float:
    """Pressure that presses a flange onto a die radius ``R``: the plastic hinge moment per unit width,
    (2/√3)·σy·t²/4, equal to a uniform pressure's moment over a lever R, p·R²/2, so p = (2/√3)·σy·t²/(2R²)
    (model of our own, no source)."""
    return PLANE_STRAIN * yield_mpa * thickness_mm**2 / (2.0 * radius_mm**2)


def hinge_lever_mm(pressure_mpa: float, thickness_mm: float, yield_mpa: float) -> float:
    """The lever a pressure bends to a plastic hinge: the same balance solved for the lever,
    a = t·√((2/√3)·σy/(2p)) (model of our own, no source)."""
    return thickness_mm * math.sqrt(PLANE_STRAIN * yield_mpa / (2.0 * pressure_mpa))


def fold_angle_deg(pressure_mpa: float, leg_mm: float, radius_mm: float, thickness_mm: float,
                   yield_mpa: float) -> float:
    """How far a pressure folds a flange leg of height L onto a die radius R: 90° once the lever a is at most R,
    nothing while a is at least L, between them 90°·((L − a)/(L − R))^2.5 (model of our own; the exponent
    calibrated to a home box at about 330 psi folding 0.025 in 2024-T3 rib flanges to about 30°, a fact of the
    trade, no source)."""
    a = hinge_lever_mm(pressure_mpa, thickness_mm, yield_mpa)
    if a <= radius_mm:
        return 90.0
    if a >= leg_mm:
        return 0.0
    return 90.0 * ((leg_mm - a) / (leg_mm - radius_mm)) ** 2.5


def press_legs(piece, pressure_mpa: float, flange_height_mm: float, thickness_mm: float,
               yield_mpa: float) -> list[tuple[str, float]]:
    """Each flange the press folds, named as the report names it, with the angle it reaches: the perimeter flange
    (the flange height, on the die radius), the flutes (the same height, on the radius their lips are rounded to)
    and each flanged hole (its flange height, on the die radius)."""
    radius = piece.springback.die_radius_mm
    legs = [("perimeter flange", flange_height_mm, radius)]
    if piece.flutes:
        legs.append(("flutes", flange_height_mm, min(f.lip_radius_mm or radius for f in piece.flutes)))
    legs += [(f"hole flange Ø{h.d:.0f} mm", h.flange_height, radius) for h in piece.piece.holes if h.flanged]
    return [(name, fold_angle_deg(pressure_mpa, leg, r, thickness_mm, yield_mpa)) for name, leg, r in legs]


def fits_box(outline: Sequence[Sequence[float]], box_mm: tuple[float, float], clearance_mm: float) -> bool:
    """The die's plan extents (shapely bounds) plus the clearance at each wall within the box, either way round."""
    x0, y0, x1, y1 = Polygon(outline).bounds
    need = 2.0 * clearance_mm
    return any(a + need <= box_mm[0] and b + need <= box_mm[1] for a, b in ((x1 - x0, y1 - y0), (y1 - y0, x1 - x0)))


def press_verdict(angles: Sequence[float], fits: bool) -> str:
    """specs/README.md: ``full`` only when every flange reaches 90°; ``insufficient`` when nothing folds or the die
    does not fit the box; else ``partial``."""
    if not fits or all(a <= 0.0 for a in angles):
        return "insufficient"
    return "full" if all(a >= 90.0 for a in angles) else "partial"


def gent_modulus_mpa(shore_a: float) -> float:
    """Young's modulus of rubber from its Shore A hardness, Gent's relation (A. N. Gent, Trans. IRI 34, 1958, as
    commonly quoted): E = 0.0981(56 + 7.62336 S)/(0.137505(254 − 2.54 S)) MPa."""
    return 0.0981 * (56.0 + 7.62336 * shore_a) / (0.137505 * (254.0 - 2.54 * shore_a))


def wrinkle_limit(catalogue_limit: float, flange_height_mm: float, thickness_mm: float) -> float:
    """The shrink a flange of height h in sheet t takes before it wrinkles: the catalogue's limit at h/t = 20,
    scaled by (20·t/h)² (the plastic buckling strain of a plate with a free edge goes with (t/h)²: E. Z. Stowell,
    NACA TN 1556, 1948), kept within 0.25 and 2 times the catalogue value (model of our own, specs/README.md)."""
    return catalogue_limit * min(max((20.0 * thickness_mm / flange_height_mm) ** 2, 0.25), 2.0)


def pilot_diameter_mm(hole_d_mm: float, flange_height_mm: float, thickness_mm: float, radius_mm: float,
                      k_factor: float) -> float:
    """The hole to cut in the blank for a 90° flanged hole of clear diameter d and mold-line height h: the web's
    bend tangent lies at d/2 + t + R from the axis and the flange develops to BA + h − SB inward of it, with
    BA = (π/2)(R + k·t) (K-factor form, common practice, no source) and SB = R + t (FAA-H-8083-31, ch. 4, setback
    at 90°)."""
    developed = math.pi / 2.0 * (radius_mm + k_factor * thickness_mm) + flange_height_mm - (radius_mm + thickness_mm)
    return 2.0 * (hole_d_mm / 2.0 + thickness_mm + radius_mm - developed)


def assert_flange_verdict_consistent(piece) -> None:
    """The flange verdict agrees with the residual shrink and the limits it is judged by (specs/README.md):
    ``formable`` exactly when the residual is within the wrinkle limit and nothing stretches past its limit;
    ``hand-finish`` only for a residual within twice the limit (the share left for a shrinker: common practice, no
    source); remedies exactly when it is not formable.  Relief only takes shrink away, and with none in the piece
    the residual is the largest shrink itself."""
    flange = piece.flange
    assert 0.0 <= flange.residual_shrink <= piece.max_shrink + 1e-12
    if not piece.flutes and not piece.notches:
        assert flange.residual_shrink == pytest.approx(piece.max_shrink, abs=1e-12)
    else:
        assert flange.residual_shrink < piece.max_shrink
    stretch_bad = piece.max_stretch > piece.alloy.stretch_limit or any(
        h.stretch_strain > piece.alloy.stretch_limit for h in piece.holes)
    within = flange.residual_shrink <= flange.shrink_limit
    assert (flange.verdict == "formable") == (within and not stretch_bad)
    if flange.verdict == "hand-finish":
        assert not stretch_bad and flange.residual_shrink <= 2.0 * flange.shrink_limit
    assert flange.verdict in ("formable", "hand-finish", "not-formable")
    assert bool(flange.remedies) == (flange.verdict != "formable")
