"""Edge strain of contoured flanges: shrink on convex plan curves, stretch on concave.

Geometry (standard, derived from the flange's plan shape): a 90 deg flange of
developed width ``w`` standing on a plan contour of radius ``rho`` has its free
edge at ``rho + w`` (convex, shrink flange) or ``rho - w`` (concave, stretch
flange) in the flat blank and at ``rho`` when formed, so the edge strain is::

    shrink:  e = -w / (rho + w)        stretch:  e = w / (rho - w)

A stretch flange with ``rho <= w`` cannot be formed as a plain flange.  With
the signed plan curvature ``kappa`` (+ convex, - concave) both read
``e = -w*kappa / (1 + w*kappa)``.

Lengths in mm; strains are engineering strains (dimensionless), negative =
shrink, positive = stretch.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from diegen.errors import FormingError
from diegen.forming.bend import flange_layout
from diegen.geometry.loops import FloatArray

#: Default sample spacing of :func:`strain_along`, as a fraction of the window.
DEFAULT_STEP_FRACTION = 0.1


def flange_edge_strain(radius: float, width: float, convex: bool) -> float:
    """Edge strain of a flange of width ``width`` (mm) on a plan radius ``radius`` (mm).

    ``-w/(rho + w)`` for a convex contour (shrink), ``w/(rho - w)`` for a
    concave one (stretch); ``inf`` when a stretch flange has ``rho <= w``
    (not formable).  ``radius = inf`` is a straight edge: 0.
    """
    if not radius > 0.0:
        raise FormingError(f"plan radius must be > 0 mm, got {radius!r}")
    if not math.isfinite(width) or width < 0.0:
        raise FormingError(f"flange width must be a finite length >= 0 mm, got {width!r}")
    if math.isinf(radius):
        return 0.0
    if convex:
        return -width / (radius + width)
    if radius <= width:
        return math.inf
    return width / (radius - width)


def reach_loss(angle_deg: float) -> float:
    """The fraction of a flange's width by which forming draws its free edge in (plan), ``1 − cos θ``.

    Derivation: a flange of developed width ``w`` bent through ``θ`` from the web leaves its free edge ``w·cos θ``
    outside the bend line in plan (its horizontal reach) and ``w·sin θ`` below the web.  In the blank the edge
    stood ``w`` outside it, so forming moves the edge in by ``w·(1 − cos θ)`` in plan; on a convex plan radius ρ
    its length goes from ``(ρ + w)·φ`` to ``(ρ + w·cos θ)·φ``: ``e = −w·(1 − cos θ)/(ρ + w)``, and on a concave
    one ``e = w·(1 − cos θ)/(ρ − w)``.  For a square flange (θ = 90°) this is the familiar ``∓w/(ρ ± w)``.
    The bend itself is taken at the bend line (its own radius is small beside ρ: standard approximation).
    """
    if not math.isfinite(angle_deg) or not 0.0 < angle_deg <= 180.0:
        raise FormingError(f"flange angle must lie in (0, 180] degrees, got {angle_deg!r}")
    return 1.0 if angle_deg == 90.0 else 1.0 - math.cos(math.radians(angle_deg))


def strain_from_curvature(curvature: ArrayLike, width: float, angle_deg: float = 90.0) -> FloatArray:
    """Edge strain for signed plan curvature(s) (1/mm, + convex), width (mm) and the flange's angle (degrees).

    ``e = -w*(1 - cos θ)*kappa/(1 + w*kappa)`` (:func:`reach_loss`); ``+inf`` where ``1 + w*kappa <= 0`` (a
    stretch flange at least as wide as its radius: its blank edge would have to lie beyond the centre).
    """
    kappa = np.asarray(curvature, dtype=float)
    denom = 1.0 + width * kappa
    loss = reach_loss(angle_deg)
    reach = width if loss == 1.0 else width * loss
    with np.errstate(divide="ignore", invalid="ignore"):
        e = np.where(denom > 0.0, -reach * kappa / np.where(denom > 0.0, denom, 1.0), np.inf)
    return np.asarray(e, dtype=float)


@dataclass(frozen=True, eq=False)
class StrainProfile:
    """Flange edge strain sampled along an outline (read-only arrays, one value per sample).

    ``s_mm`` is the arc length along the outline (the bend line) from its
    first point; ``curvature_per_mm`` the windowed signed plan curvature
    (+ convex: the flange shrinks); ``plan_radius_mm`` its inverse magnitude
    (inf on straight runs); ``strain`` the edge strain (negative = shrink,
    positive = stretch, +inf = not formable); ``formable`` is False where a
    stretch flange is at least as wide as its radius.
    """

    s_mm: FloatArray
    curvature_per_mm: FloatArray
    plan_radius_mm: FloatArray
    strain: FloatArray
    formable: NDArray[np.bool_]
    width_mm: float
    window_mm: float
    length_mm: float  # total length of the outline (perimeter if closed)
    closed: bool
    reach_loss: float = 1.0  # 1 − cos θ of the flange's angle θ (1: a square flange; see reach_loss)

    @property
    def max_shrink(self) -> float:
        """Largest shrink strain as a positive number (0 if none)."""
        return float(max(0.0, -np.min(self.strain))) if self.strain.size else 0.0

    @property
    def max_stretch(self) -> float:
        """Largest stretch strain (0 if none, inf if some part is not formable)."""
        return float(max(0.0, np.max(self.strain))) if self.strain.size else 0.0


def _clean_points(points: ArrayLike, closed: bool) -> FloatArray:
    pts = np.asarray(points, dtype=float)
    if pts.ndim != 2 or pts.shape[1] != 2:
        raise FormingError(f"outline points must be an (N, 2) array in mm, got shape {pts.shape}")
    if not np.all(np.isfinite(pts)):
        raise FormingError("outline points must all be finite")
    keep = np.ones(len(pts), dtype=bool)
    keep[1:] = np.hypot(*(pts[1:] - pts[:-1]).T) > 0.0
    pts = pts[keep]
    if closed and len(pts) > 1 and np.array_equal(pts[0], pts[-1]):
        pts = pts[:-1]
    need = 3 if closed else 2
    if len(pts) < need:
        raise FormingError(f"a{' closed' if closed else 'n open'} outline needs at least {need} distinct points")
    return pts


def _signed_area(pts: FloatArray) -> float:
    x, y = pts[:, 0], pts[:, 1]
    return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def _perimeter(pts: FloatArray) -> float:
    edges = np.roll(pts, -1, axis=0) - pts
    return float(np.sum(np.hypot(edges[:, 0], edges[:, 1])))


def _turning_knots(pts: FloatArray, closed: bool, window: float) -> tuple[FloatArray, FloatArray, float, float]:
    """Knots of the cumulative turning angle theta(s), piecewise linear in s.

    The turning at each vertex is spread evenly over the adjacent half edges,
    but no further than half a window each side: on a finely sampled curve the
    spread half edges join into an exactly uniform turning rate, while a sharp
    corner between long edges becomes a turn over one window length.  Returns
    (s knots, theta knots, total length, total turning).
    """
    edges = (np.roll(pts, -1, axis=0) - pts) if closed else (pts[1:] - pts[:-1])
    lengths = np.hypot(edges[:, 0], edges[:, 1])
    heading = np.arctan2(edges[:, 1], edges[:, 0])
    s_vertex = np.concatenate(([0.0], np.cumsum(lengths)))
    total = float(s_vertex[-1])
    if closed:
        turn = heading - np.roll(heading, 1)  # at vertex i, between edge i-1 and edge i
        before = np.roll(lengths, 1)
        after = lengths
        s_v = s_vertex[:-1]
    else:
        turn = heading[1:] - heading[:-1]  # at interior vertices 1..N-2
        before = lengths[:-1]
        after = lengths[1:]
        s_v = s_vertex[1:-1]
    turn = (turn + np.pi) % (2.0 * np.pi) - np.pi
    a = np.minimum(before, window) / 2.0
    b = np.minimum(after, window) / 2.0
    cum = np.concatenate(([0.0], np.cumsum(turn)))
    s_knots = np.column_stack((s_v - a, s_v + b)).ravel()
    th_knots = np.column_stack((cum[:-1], cum[1:])).ravel()
    total_turn = float(cum[-1])
    if closed:
        s_knots = np.concatenate((s_knots - total, s_knots, s_knots + total))
        th_knots = np.concatenate((th_knots - total_turn, th_knots, th_knots + total_turn))
    else:
        s_knots = np.concatenate(([0.0], s_knots, [total]))
        th_knots = np.concatenate(([0.0], th_knots, [total_turn]))
    return s_knots, th_knots, total, total_turn


def strain_along(
    points: ArrayLike,
    width: float,
    closed: bool,
    window: float | None = None,
    step: float | None = None,
    angle_deg: float = 90.0,
) -> StrainProfile:
    """Flange edge strain along a polyline outline (N, 2) in mm.

    The outline is the bend line; the flange stands on its right-hand side
    (outside a counter-clockwise closed loop).  At each sample the plan
    curvature is the turning angle accumulated over a window of arc length
    centred there, divided by the window length (``rho = s/dtheta``, exact on a
    circle), and the strain follows the contoured-flange formulas of
    :func:`flange_edge_strain`.  The windowing is a model of our own: it
    averages the strain over about one flange width, the length over which a
    flange can share out its excess material.

    ``window`` defaults to the flange width (mm); ``step`` (mm), the sample
    spacing, to a tenth of the window.  Samples are the outline's vertices plus
    a uniform grid.  Open outlines clip the window at their ends.  ``angle_deg`` is the angle the flange is bent
    through from the web: under 90° its edge moves in by only ``w·(1 − cos θ)`` (:func:`reach_loss`).  Raises
    :class:`FormingError` for a clockwise closed outline or bad input.
    """
    if not math.isfinite(width) or width <= 0.0:
        raise FormingError(f"flange width must be a finite length > 0 mm, got {width!r}")
    win = width if window is None else float(window)
    if not math.isfinite(win) or win <= 0.0:
        raise FormingError(f"strain window must be a finite length > 0 mm, got {window!r}")
    pts = _clean_points(points, closed)
    if closed and _signed_area(pts) <= 0.0:
        raise FormingError(
            "closed outline runs clockwise (or encloses no area): give it counter-clockwise "
            "so the flange stands outside"
        )
    if closed:
        win = min(win, _perimeter(pts))
    s_knots, th_knots, total, _ = _turning_knots(pts, closed, win)
    stp = win * DEFAULT_STEP_FRACTION if step is None else float(step)
    if not math.isfinite(stp) or stp <= 0.0:
        raise FormingError(f"sample step must be a finite length > 0 mm, got {step!r}")

    seg = (np.roll(pts, -1, axis=0) - pts) if closed else (pts[1:] - pts[:-1])
    s_vertex = np.concatenate(([0.0], np.cumsum(np.hypot(seg[:, 0], seg[:, 1]))))
    n_grid = max(math.ceil(total / stp), 1)
    grid = np.linspace(0.0, total, n_grid + 1)
    s = np.unique(np.concatenate((grid, s_vertex)))
    if closed:
        s = s[s < total]

    half = win / 2.0
    lo, hi = s - half, s + half
    if not closed:
        lo, hi = np.maximum(lo, 0.0), np.minimum(hi, total)
    dtheta = np.interp(hi, s_knots, th_knots) - np.interp(lo, s_knots, th_knots)
    kappa = dtheta / (hi - lo)
    kappa[np.abs(kappa) < 1e-12 / win] = 0.0  # round-off on straight runs
    with np.errstate(divide="ignore"):
        radius = np.where(kappa != 0.0, 1.0 / np.abs(kappa), np.inf)
    strain = strain_from_curvature(kappa, width, angle_deg)
    formable = np.isfinite(strain)
    for arr in (s, kappa, radius, strain, formable):
        arr.setflags(write=False)
    return StrainProfile(
        s_mm=s,
        curvature_per_mm=kappa,
        plan_radius_mm=radius,
        strain=strain,
        formable=formable,
        width_mm=float(width),
        window_mm=win,
        length_mm=total,
        closed=closed,
        reach_loss=reach_loss(angle_deg),
    )


def hole_flange_strain(hole_d: float, flange_height: float) -> float:
    """Edge stretch of a flanged lightening hole, ``h/(R - h)``, R = hole_d/2 (mm).

    A hole flange is a stretch flange on the hole radius: a pre-pierced hole of
    radius ``R - h`` is opened out to ``R`` (contoured-flange geometry as above,
    thin sheet, sharp bend).  Raises :class:`FormingError` when ``h >= R``.
    """
    if not math.isfinite(hole_d) or hole_d <= 0.0:
        raise FormingError(f"hole diameter must be a finite length > 0 mm, got {hole_d!r}")
    if not math.isfinite(flange_height) or flange_height < 0.0:
        raise FormingError(f"hole flange height must be a finite length >= 0 mm, got {flange_height!r}")
    r = hole_d / 2.0
    if flange_height >= r:
        raise FormingError(
            f"a {flange_height:.2f} mm flange cannot be turned in a {hole_d:.2f} mm hole: "
            "it needs at least the hole radius of material"
        )
    return flange_height / (r - flange_height)


def pilot_diameter(hole_d: float, flange_height: float, thickness: float, radius: float, k: float) -> float:
    """Diameter (mm) of the pre-pierced pilot hole for a flanged hole of clear diameter ``hole_d``.

    Model (flat-pattern development as in FAA-H-8083-31 ch. 4, applied to the
    hole flange; stretching thins the flange and is ignored): ``hole_d`` is the
    clear hole inside the finished flange, ``flange_height`` its mold-line
    height (mm), bent 90 deg with inside radius ``radius`` in sheet
    ``thickness``.  The web's bend tangent line lies at ``hole_d/2 + T + R``
    from the axis; the flange develops to ``BA + (h - SB)`` inward of it, so::

        pilot radius = hole_d/2 + T + R - (BA + h - (R + T))

    which reduces to ``hole_d/2 - h`` for thin sheet and a sharp bend.
    """
    if not math.isfinite(hole_d) or hole_d <= 0.0:
        raise FormingError(f"hole diameter must be a finite length > 0 mm, got {hole_d!r}")
    layout = flange_layout(flange_height, radius, thickness, k, 90.0)
    tangent_radius = hole_d / 2.0 + thickness + radius
    pilot_r = tangent_radius - layout.developed_width_mm
    if pilot_r <= 0.0:
        raise FormingError(
            f"a {flange_height:.2f} mm flange needs more material than a {hole_d:.2f} mm hole holds "
            f"(pilot radius {pilot_r:.2f} mm): lower the flange or enlarge the hole"
        )
    return 2.0 * pilot_r
