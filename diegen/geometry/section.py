"""Airfoil section loops: normalise, validate, split, re-sample and blend.

Loop convention (the whole project): an ``np.ndarray`` of shape (N, 2), chord 1
along +X, leading edge at (0, 0), trailing edge near (1, 0), points in Selig
order: upper TE -> upper surface -> LE -> lower surface -> lower TE, which is
counter-clockwise (positive signed area) with X right and Y up.  The closing
segment (last -> first point) is implicit and no point repeats; a closed
(sharp) trailing edge is one point, listed first.

All lengths are fractions of the chord.
"""

from __future__ import annotations

import re
from typing import Any

import numpy as np
import shapely
import shapely.validation
from numpy.typing import ArrayLike

from diegen.errors import AirfoilError
from diegen.geometry.loops import FloatArray, IntArray, is_counter_clockwise, signed_area

__all__ = [
    "DUPLICATE_TOL",
    "MAX_TE_GAP",
    "MIN_POINTS",
    "blend",
    "blend_surfaces",
    "cubic_spline",
    "first_x_reversal",
    "leading_edge_index",
    "normalise",
    "normalise_with_index",
    "resample",
    "resample_surfaces",
    "self_intersection_index",
    "split_surfaces",
    "surface_fractions",
    "thickness_at",
    "validate",
]

MIN_POINTS = 10
# Two points closer than this (fraction of the outline's size) are the same point.
DUPLICATE_TOL = 1e-9
# A closing segment within this angle of the last surface segment continues the
# surface into a single (closed) trailing-edge point; an open trailing edge has
# a base roughly square to the surface (degrees).
_CLOSED_TE_ANGLE = 45.0
# A closed TE's closing segment (last point -> the TE point) is at most this many times as long as
# the segments beside it; a longer one means the file stops part-way along a surface (truncated).
_CLOSED_TE_SEGMENT_RATIO = 5.0
_CLOSED_TE_MIN_SHORTFALL = 0.02  # ... and longer than this fraction of the chord (a shorter one changes nothing)
# An open TE's base (the gap between the two trailing-edge ends) is at most this fraction of the chord
# (common practice, no source: real trailing edges are a few per cent thick at most).
MAX_TE_GAP = 0.1
# Two re-sampled TE points closer than this (fraction of chord) are one point.
_TE_MERGE_TOL = 1e-9
# Samples of the spline per input segment used to measure its arc length.
_ARC_SAMPLES_PER_SEGMENT = 16


def _as_points(points: ArrayLike, name: str) -> FloatArray:
    try:
        p = np.array(points, dtype=float)
    except (TypeError, ValueError) as exc:
        raise AirfoilError(f"{name}: points are not numbers ({exc})") from None
    if p.ndim != 2 or p.shape[1] != 2:
        raise AirfoilError(f"{name}: points must have shape (N, 2), got {p.shape}")
    if not np.all(np.isfinite(p)):
        raise AirfoilError(f"{name}: points contain NaN or infinite values")
    return p


def _te_is_closed(chain: FloatArray) -> bool:
    """True if the chain's first point is a single (closed) trailing-edge point.

    The chain runs from one TE end to the other.  For an open TE the closing
    segment (last -> first) is the TE base, roughly square to the surface; for a
    closed TE listed once, it is the last surface segment into the TE point and
    so points along the preceding segment.
    """
    closing = chain[0] - chain[-1]
    before = chain[-1] - chain[-2]
    norms = np.linalg.norm(closing) * np.linalg.norm(before)
    if norms == 0.0:
        return True
    cos_angle = float(np.dot(closing, before)) / norms
    return cos_angle > np.cos(np.radians(_CLOSED_TE_ANGLE))


def _drop_duplicates(chain: FloatArray, index: IntArray) -> tuple[FloatArray, IntArray]:
    """Drop consecutive repeated points and a last point that repeats the first."""
    scale = float(np.ptp(chain, axis=0).max()) if len(chain) else 0.0
    tol = DUPLICATE_TOL * max(scale, 1e-300)
    keep = np.ones(len(chain), dtype=bool)
    keep[1:] = np.linalg.norm(np.diff(chain, axis=0), axis=1) > tol
    chain, index = chain[keep], index[keep]
    while len(chain) > 1 and np.linalg.norm(chain[-1] - chain[0]) <= tol:
        chain, index = chain[:-1], index[:-1]
    return chain, index


def _check_ends(chain: FloatArray, closed: bool, chord: float, name: str) -> None:
    """Refuse a chain whose two ends do not meet at a trailing edge (a truncated file, most often)."""
    closing = float(np.linalg.norm(chain[0] - chain[-1]))
    if closed:
        beside = max(float(np.linalg.norm(chain[1] - chain[0])), float(np.linalg.norm(chain[-1] - chain[-2])))
        if closing > max(_CLOSED_TE_SEGMENT_RATIO * beside, _CLOSED_TE_MIN_SHORTFALL * chord):
            raise AirfoilError(f"{name}: the outline stops {closing / chord:.3f} chord short of the trailing edge "
                               "(is the file truncated?); list the points from the trailing edge round the leading "
                               "edge and back to the trailing edge")
    elif closing > MAX_TE_GAP * chord:
        raise AirfoilError(f"{name}: the two ends of the outline are {closing / chord:.3f} chord apart, more than "
                           f"the {MAX_TE_GAP:g} chord a trailing edge may be thick (is the file truncated?); list the "
                           "points from the trailing edge round the leading edge and back to the trailing edge")


def normalise_with_index(points: ArrayLike, name: str = "<points>") -> tuple[FloatArray, IntArray]:
    """Like :func:`normalise`, also returning, for each loop point, its row in ``points``."""
    chain = _as_points(points, name)
    chain, index = _drop_duplicates(chain, np.arange(len(chain)))
    if len(chain) < 3:
        raise AirfoilError(f"{name}: only {len(chain)} distinct points, at least {MIN_POINTS} needed")
    closed = _te_is_closed(chain)
    if not closed and _te_is_closed(chain[::-1]):  # the single TE point listed last: move it to the front
        chain, index = np.roll(chain, 1, axis=0), np.roll(index, 1)
        closed = True
    te = chain[0].copy() if closed else 0.5 * (chain[0] + chain[-1])
    distance = np.linalg.norm(chain - te, axis=1)
    i_le = int(np.argmax(distance))
    chord = float(distance[i_le])
    if chord <= 0.0:
        raise AirfoilError(f"{name}: all points coincide, the section has no chord")
    _check_ends(chain, closed, chord, name)
    le = chain[i_le].copy()
    cos_a, sin_a = (te - le) / chord
    rotate = np.array([[cos_a, -sin_a], [sin_a, cos_a]])  # row-vector form: p @ rotate
    loop = (chain - le) @ rotate / chord
    loop[i_le] = (0.0, 0.0)
    if signed_area(loop) < 0.0:
        order = np.concatenate(([0], np.arange(len(loop) - 1, 0, -1))) if closed else np.arange(len(loop))[::-1]
        loop, index = loop[order], index[order]
    return loop, index


def normalise(points: ArrayLike) -> FloatArray:
    """Put a section outline in the project's loop convention.

    ``points`` (shape (N, 2), any units) run from one trailing-edge end to the
    other, in either direction, as listed in a coordinate file.  The trailing
    edge is the midpoint of the two end points (or the single TE point of a
    closed TE, listed at one end or at both); the leading edge is the point
    farthest from it.  The result is translated to put the LE at (0, 0),
    rotated so the TE lies on +X, scaled to chord 1, cleared of repeated
    points and ordered counter-clockwise from the upper TE.
    """
    return normalise_with_index(points)[0]


def leading_edge_index(loop: ArrayLike) -> int:
    """Index of the loop's leading-edge point (the vertex nearest (0, 0))."""
    p = np.asarray(loop, dtype=float)
    return int(np.argmin(np.einsum("ij,ij->i", p, p)))


def split_surfaces(loop: ArrayLike) -> tuple[FloatArray, FloatArray]:
    """Upper and lower surfaces of a loop, each running LE -> TE (fractions of chord).

    Both start with the LE point; with a closed trailing edge both end with
    the shared TE point.
    """
    p = np.asarray(loop, dtype=float)
    i_le = leading_edge_index(p)
    upper = p[: i_le + 1][::-1].copy()
    lower = p[i_le:].copy()
    if _te_is_closed(p):
        lower = np.vstack((lower, p[:1]))
    return upper, lower


def first_x_reversal(loop: ArrayLike, tol: float = 1e-3) -> int | None:
    """Index of the first loop point where a surface turns back in x, or None.

    Along each surface from the LE to the TE, x may not fall by more than
    ``tol`` (fraction of chord) below the largest x reached so far.
    """
    p = np.asarray(loop, dtype=float)
    i_le = leading_edge_index(p)
    upper_x = p[: i_le + 1, 0][::-1]  # LE -> TE, loop indices i_le .. 0
    lower_x = p[i_le:, 0]  # LE -> TE, loop indices i_le .. N-1
    hits: list[int] = []
    for xs, to_loop in ((upper_x, lambda k: i_le - k), (lower_x, lambda k: i_le + k)):
        drop = np.maximum.accumulate(xs) - xs
        bad = np.nonzero(drop > tol)[0]
        if len(bad):
            hits.append(int(to_loop(int(bad[0]))))
    return min(hits) if hits else None


_POINT_IN_MESSAGE = re.compile(r"\[\s*([-+0-9.eE]+)\s+([-+0-9.eE]+)")


def self_intersection_index(loop: ArrayLike) -> int | None:
    """Index of a loop point next to where the closed outline crosses itself, or None."""
    p = np.asarray(loop, dtype=float)
    ring = shapely.LinearRing(p)
    if ring.is_simple and shapely.Polygon(ring).is_valid:
        return None
    reason = shapely.validation.explain_validity(shapely.Polygon(ring))
    match = _POINT_IN_MESSAGE.search(reason)
    if match is None:
        return 0
    where = np.array([float(match.group(1)), float(match.group(2))])
    return int(np.argmin(np.linalg.norm(p - where, axis=1)))


def validate(loop: ArrayLike, name: str = "<section>") -> None:
    """Raise :class:`AirfoilError` unless ``loop`` is a usable section outline.

    Checks: shape (N, 2) of finite numbers, at least 10 points, a simple
    polygon (no self-intersection or touching), counter-clockwise.
    """
    p = _as_points(loop, name)
    if len(p) < MIN_POINTS:
        raise AirfoilError(f"{name}: only {len(p)} points, at least {MIN_POINTS} needed")
    i = self_intersection_index(p)
    if i is not None:
        raise AirfoilError(f"{name}: the outline crosses or touches itself near point {i} {tuple(p[i].round(6))}")
    if not is_counter_clockwise(p):
        raise AirfoilError(f"{name}: the outline is not counter-clockwise (Selig order) or has no area")


# --------------------------------------------------------------------------- resample


def _surface_sample_counts(n_points: int) -> tuple[int, int]:
    """Points on the upper and lower surface, each counting the LE and the TE."""
    if isinstance(n_points, bool) or not isinstance(n_points, (int, np.integer)) or n_points < MIN_POINTS:
        raise AirfoilError(f"n_points must be an integer of at least {MIN_POINTS}, got {n_points!r}")
    n_upper = int(n_points) // 2 + 1
    return n_upper, int(n_points) + 1 - n_upper


def surface_fractions(n: int) -> FloatArray:
    """Cosine distribution of ``n`` arc-length fractions from the LE (0) to the TE (1).

    Dense at the nose (and, less so, at the TE): s_k = (1 - cos(pi k / (n - 1))) / 2.
    """
    s = 0.5 * (1.0 - np.cos(np.linspace(0.0, np.pi, n)))
    s[0], s[-1] = 0.0, 1.0
    return s


def cubic_spline(x: ArrayLike, y: ArrayLike):
    """Not-a-knot interpolating cubic spline through ``y`` (N, d) at increasing ``x``; returns f(x).

    See :class:`Cubic`; plain numpy, so reading a section needs no interpolation library.
    """
    spline = Cubic(x, y)
    return spline.__call__


class Cubic:
    """Interpolating cubic spline through ``y`` (N, d) at increasing ``x``, with its first two derivatives.

    The classical slope formulation (C. de Boor, *A Practical Guide to Splines*, ch. IV): one tridiagonal system
    for the knot slopes, solved by the Thomas algorithm; each interval is then a cubic Hermite polynomial.  End
    conditions: not-a-knot (the first and last rows impose a continuous third derivative at the second and
    last-but-one knots), or ``periodic`` (``y`` closes on itself: slope and curvature continuous across the
    ends; the cyclic system is solved directly).  Three points give their parabola and two their line, as the
    not-a-knot spline of so few points is.  Plain numpy.
    """

    def __init__(self, x: ArrayLike, y: ArrayLike, periodic: bool = False) -> None:
        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
        if y.ndim == 1:
            y = y[:, None]
        n = len(x)
        if n < 2 or (periodic and n < 4):
            raise AirfoilError(f"a cubic spline needs at least {4 if periodic else 2} points, got {n}")
        h = np.diff(x)
        delta = np.diff(y, axis=0) / h[:, None]
        if periodic:
            slopes = self._periodic_slopes(h, delta)
        elif n == 2:
            slopes = np.vstack([delta, delta])
        elif n == 3:  # the parabola through the three points
            curve = (delta[1] - delta[0]) / (x[2] - x[0])
            slopes = np.vstack([delta[0] - curve * h[0], delta[0] + curve * h[0], delta[1] + curve * h[1]])
        else:
            slopes = self._not_a_knot_slopes(x, h, delta)
        self.x, self.y, self.n, self.periodic = x, y, n, periodic
        self.slopes = slopes
        self.c2 = (3.0 * delta - 2.0 * slopes[:-1] - slopes[1:]) / h[:, None]
        self.c3 = (slopes[:-1] + slopes[1:] - 2.0 * delta) / h[:, None] ** 2

    @staticmethod
    def _not_a_knot_slopes(x: FloatArray, h: FloatArray, delta: FloatArray) -> FloatArray:
        n = len(x)
        sub, diag, sup = np.zeros(n), np.zeros(n), np.zeros(n)
        rhs = np.zeros((n, delta.shape[1]))
        diag[1:-1] = 2.0 * (h[:-1] + h[1:])
        sub[1:-1], sup[1:-1] = h[1:], h[:-1]
        rhs[1:-1] = 3.0 * (h[1:, None] * delta[:-1] + h[:-1, None] * delta[1:])
        d0, d1 = x[2] - x[0], x[-1] - x[-3]
        diag[0], sup[0] = h[1], d0
        rhs[0] = ((h[0] + 2.0 * d0) * h[1] * delta[0] + h[0] ** 2 * delta[1]) / d0
        diag[-1], sub[-1] = h[-2], d1
        rhs[-1] = (h[-1] ** 2 * delta[-2] + (2.0 * d1 + h[-1]) * h[-2] * delta[-1]) / d1
        # the Thomas algorithm on plain floats (numpy's scalar arithmetic is slower, and gives the same numbers)
        sub_, diag_, sup_, rows = sub.tolist(), diag.tolist(), sup.tolist(), rhs.tolist()
        c = [sup_[0] / diag_[0]]
        d = [[v / diag_[0] for v in rows[0]]]
        for i in range(1, n):
            pivot = diag_[i] - sub_[i] * c[i - 1]
            c.append(sup_[i] / pivot)
            d.append([(v - sub_[i] * w) / pivot for v, w in zip(rows[i], d[i - 1])])
        slopes = [d[-1]]
        for i in range(n - 2, -1, -1):
            slopes.append([v - c[i] * w for v, w in zip(d[i], slopes[-1])])
        return np.asarray(slopes[::-1], dtype=float)

    @staticmethod
    def _periodic_slopes(h: FloatArray, delta: FloatArray) -> FloatArray:
        m = len(h)  # distinct knots; knot m is knot 0 again
        a = np.zeros((m, m))
        rhs = np.zeros((m, delta.shape[1]))
        for i in range(m):
            before, after = h[i - 1], h[i]  # intervals ending and starting at knot i (cyclic)
            a[i, i - 1] += after
            a[i, i] += 2.0 * (before + after)
            a[i, (i + 1) % m] += before
            rhs[i] = 3.0 * (after * delta[i - 1] + before * delta[i])
        slopes = np.linalg.solve(a, rhs)
        return np.vstack([slopes, slopes[:1]])

    def _interval(self, at: ArrayLike) -> tuple[Any, Any]:
        """(interval index, offset into it) of each of ``at``; a periodic spline wraps ``at`` round."""
        at = np.asarray(at, dtype=float)
        x = self.x
        if self.periodic:
            at = x[0] + np.mod(at - x[0], x[-1] - x[0])
        i = np.minimum(np.maximum(np.searchsorted(x, at, side="right") - 1, 0), self.n - 2)  # np.clip, cheaper
        return i, (at - x[i])[..., None]

    def with_derivatives(self, at: ArrayLike) -> tuple[FloatArray, FloatArray, FloatArray]:
        """Values, first and second derivatives at ``at``, each as ``self(at, nu)`` gives it (one interval search)."""
        i, u = self._interval(at)
        b, c2, c3 = self.slopes[i], self.c2[i], self.c3[i]
        return (self.y[i] + u * (b + u * (c2 + u * c3)), b + u * (2.0 * c2 + 3.0 * u * c3),
                2.0 * c2 + 6.0 * u * c3)

    def __call__(self, at: ArrayLike, nu: int = 0) -> FloatArray:
        """Values (``nu`` = 0), first or second derivatives at ``at``; a periodic spline wraps ``at`` round."""
        i, u = self._interval(at)
        b, c2, c3 = self.slopes[i], self.c2[i], self.c3[i]
        if nu == 0:
            return self.y[i] + u * (b + u * (c2 + u * c3))
        if nu == 1:
            return b + u * (2.0 * c2 + 3.0 * u * c3)
        if nu == 2:
            return 2.0 * c2 + 6.0 * u * c3
        raise ValueError(f"derivative order {nu} is not 0, 1 or 2")


def resample_surfaces(loop: ArrayLike, n_points: int) -> tuple[FloatArray, FloatArray]:
    """Re-sampled upper and lower surfaces (LE -> TE), with fixed counts for ``n_points``.

    One cubic spline (:func:`cubic_spline`, not-a-knot ends) through the whole chain TE -> LE -> TE,
    on a cumulative chord-length parameter, keeps the curve smooth over the nose;
    the LE and both TE points are knots and are reproduced exactly.  Each
    surface is then sampled at cosine-spaced fractions of its own arc length.
    """
    n_upper, n_lower = _surface_sample_counts(n_points)
    upper, lower = split_surfaces(loop)
    if len(upper) < 2 or len(lower) < 2:
        raise AirfoilError("section has no point on one surface; cannot re-sample")
    chain = np.vstack((upper[::-1], lower[1:]))  # upper TE -> LE -> lower TE
    i_le = len(upper) - 1
    seg = np.linalg.norm(np.diff(chain, axis=0), axis=1)
    if np.any(seg <= 0.0):
        raise AirfoilError("section has repeated points; normalise it before re-sampling")
    t = np.concatenate(([0.0], np.cumsum(seg)))
    spline = cubic_spline(t, chain)

    out = []
    for t_end, end_point, count in ((t[0], chain[0], n_upper), (t[-1], chain[-1], n_lower)):
        n_fine = max(_ARC_SAMPLES_PER_SEGMENT * round(float(abs(t_end - t[i_le]) / np.mean(seg))), 200)
        tf = np.linspace(t[i_le], t_end, n_fine)
        pts = spline(tf)
        arc = np.concatenate(([0.0], np.cumsum(np.linalg.norm(np.diff(pts, axis=0), axis=1))))
        samples = spline(np.interp(surface_fractions(count), arc / arc[-1], tf))
        samples[0], samples[-1] = chain[i_le], end_point  # LE and TE kept exactly
        out.append(samples)
    return out[0], out[1]


def _assemble(upper: FloatArray, lower: FloatArray) -> FloatArray:
    """Join LE -> TE surfaces into a Selig loop, merging coincident TE points."""
    if np.linalg.norm(upper[-1] - lower[-1]) <= _TE_MERGE_TOL:
        te = 0.5 * (upper[-1] + lower[-1])
        return np.vstack((te, upper[-2::-1], lower[1:-1]))
    return np.vstack((upper[::-1], lower[1:]))


def resample(loop: ArrayLike, n_points: int = 241) -> FloatArray:
    """Smoothly re-sample a section loop for machining.

    Returns ``n_points`` points for an open trailing edge, one fewer for a
    closed one (the two surfaces share the TE point).  The upper surface always
    gets ``n_points // 2 + 1`` points (counting LE and TE), so the LE index is
    ``n_points // 2`` for every section, and every section re-sampled with the
    same ``n_points`` has the same per-surface arc-length fractions: point k of
    one corresponds to point k of another (see :func:`blend`).
    """
    result = _assemble(*resample_surfaces(loop, n_points))
    validate(result, "re-sampled section")  # a spline through a very odd outline can overshoot into itself
    return result


def blend(root_loop: ArrayLike, tip_loop: ArrayLike, fraction: float, n_points: int = 241) -> FloatArray:
    """Section between ``root_loop`` (fraction 0) and ``tip_loop`` (fraction 1).

    Both are re-sampled identically (:func:`resample`) and interpolated point by
    point, surface by surface.  Fraction 0 and 1 reproduce the re-sampled root
    and tip exactly.
    """
    return blend_surfaces(resample_surfaces(root_loop, n_points), resample_surfaces(tip_loop, n_points), fraction)


def blend_surfaces(root: tuple[FloatArray, FloatArray], tip: tuple[FloatArray, FloatArray],
                   fraction: float) -> FloatArray:
    """:func:`blend` of surfaces already re-sampled alike (:func:`resample_surfaces` with one point count): a
    wing's root and tip are re-sampled once for all its stations."""
    f = float(fraction)
    if not np.isfinite(f):
        raise AirfoilError(f"blend fraction must be a finite number, got {fraction!r}")
    (ru, rl), (tu, tl) = root, tip
    if f == 0.0:
        return _assemble(ru, rl)
    if f == 1.0:
        return _assemble(tu, tl)
    return _assemble((1.0 - f) * ru + f * tu, (1.0 - f) * rl + f * tl)


def thickness_at(loop: ArrayLike, x: ArrayLike) -> FloatArray:
    """Local depth of the section (highest minus lowest outline point) at chord fractions ``x``.

    Vectorised over ``x``; zero where the vertical line misses the outline.
    """
    p = np.asarray(loop, dtype=float)
    xs = np.asarray(x, dtype=float).ravel()
    a, b = p, np.roll(p, -1, axis=0)  # segments a -> b, closing segment included
    lo, hi = np.minimum(a[:, 0], b[:, 0]), np.maximum(a[:, 0], b[:, 0])
    dx = b[:, 0] - a[:, 0]
    result = np.zeros(xs.shape)
    chunk = max(1, 2_000_000 // max(len(p), 1))
    for start in range(0, len(xs), chunk):
        xc = xs[start : start + chunk, None]
        hit = (xc >= lo) & (xc <= hi)
        with np.errstate(divide="ignore", invalid="ignore"):
            u = np.where(dx != 0.0, (xc - a[:, 0]) / np.where(dx != 0.0, dx, 1.0), 0.0)
        y = a[:, 1] + u * (b[:, 1] - a[:, 1])
        # Vertical segments (dx == 0) hit at both ends: include both ordinates.
        y_top = np.where(hit, np.where(dx == 0.0, np.maximum(a[:, 1], b[:, 1]), y), -np.inf)
        y_bot = np.where(hit, np.where(dx == 0.0, np.minimum(a[:, 1], b[:, 1]), y), np.inf)
        top, bot = y_top.max(axis=1), y_bot.min(axis=1)
        result[start : start + chunk] = np.where(np.isfinite(top) & np.isfinite(bot), top - bot, 0.0)
    return result.reshape(np.shape(x)) if np.ndim(x) else result.reshape(())
