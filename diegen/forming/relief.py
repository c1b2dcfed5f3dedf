"""Relief for contoured flanges: where the shrink passes its limit, flutes or V-notches.

A shrink flange has more material at its free edge than the formed edge can
hold.  Over a run of outline where the edge shrink ``|e|`` passes the limit,
the length to be taken up at the flange edge is::

    excess = integral of (|e| - limit)+ ds_edge

(``ds_edge = (1 + w*kappa) ds`` along the bend line, so that with no limit the
excess is exactly the blank-edge length minus the formed-edge length).  Two
ways to take it up:

* **flutes** -- grooves cut in the die wall, into which the rubber pushes the
  surplus sheet; each gathers its profile length minus its chord;
* **V-notches** -- wedges cut out of the blank flange that close up on forming.

The flute and notch sizing rules here are models of our own (common practice,
no source) unless a line says otherwise; trial parts decide.  Lengths in mm,
strains dimensionless.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Literal

import numpy as np

from diegen.errors import FormingError
from diegen.forming.strain import FloatArray, StrainProfile

FluteProfile = Literal["arc", "vee"]
FLUTE_PROFILES: tuple[str, ...] = ("arc", "vee")

#: Flute depth at most this fraction of the flange height (common practice, no source).
FLUTE_DEPTH_FRACTION = 0.25
#: Least wall (mm) left between neighbouring flutes at the flange edge (design choice); with rounded lips the
#: land is at least twice the lip radius, room for both roundings.
FLUTE_LAND_MM = 0.5
#: Included angle of the widest V-notch (model of our own, no source).
NOTCH_MAX_ANGLE_DEG = 30.0
#: Flange slenderness h/t at which the catalogue's shrink limit is taken to apply: a 1/2 in flange on 0.025 in
#: sheet, the usual light rib (model of our own; the catalogue limits are from memory, unverified).
WRINKLE_REFERENCE_SLENDERNESS = 20.0
#: The wrinkle limit moves with (t/h)² from that reference, within these bounds of the catalogue value.
WRINKLE_SCALE_BOUNDS = (0.25, 2.0)
#: Residual shrink up to this many times the limit is left for hand shrinking (shrinker or fluting pliers) after
#: the press (common practice, no source: a shrinker takes up a few per cent of flange edge).
HAND_FINISH_FACTOR = 2.0

FlangeVerdict = Literal["formable", "hand-finish", "not-formable"]


def wrinkle_limit(catalogue_limit: float, flange_height_mm: float, thickness_mm: float) -> float:
    """Largest edge shrink (positive fraction) a flange of height ``flange_height_mm`` in ``thickness_mm`` sheet
    takes without wrinkling, pressed against the die by the rubber.

    Model of our own: the free edge of a compressed flange buckles like a long plate with one free edge, whose
    critical strain in the plastic range goes with ``(t/h)²`` (the flange buckling coefficient 0.425 with the
    secant modulus: E. Z. Stowell, NACA TN 1556, 1948; Timoshenko & Gere, *Theory of Elastic Stability*, 1961,
    §9.2).  The rubber's support raises the level, not the scaling, so the catalogue limit (from memory,
    unverified) is taken to hold at ``h/t = 20`` and scaled by ``(20·t/h)²`` within
    :data:`WRINKLE_SCALE_BOUNDS`.  The contour radius enters through the strain itself.
    """
    _check_limit(catalogue_limit)
    if not (flange_height_mm > 0.0 and thickness_mm > 0.0):
        raise FormingError("flange height and thickness must be > 0 mm")
    scale = (WRINKLE_REFERENCE_SLENDERNESS * thickness_mm / flange_height_mm) ** 2
    lo, hi = WRINKLE_SCALE_BOUNDS
    return catalogue_limit * min(max(scale, lo), hi)


def residual_shrink(profile: StrainProfile, gathers: list[tuple[float, float, float]]) -> FloatArray:
    """Edge shrink (positive, per sample of ``profile``) left after relief, window by window.

    ``gathers``: ``(centre s, chord, length taken up)`` of each flute or notch, in the profile's arc length (mm).
    Over the window of one flange width centred on a sample (the window the strain itself is averaged over), the
    relief takes up its length in proportion to how much of its chord lies in the window; the residual is the
    sample's shrink less that length over the window.  With no relief it is the shrink itself.
    """
    shrink = np.maximum(-np.asarray(profile.strain, float), 0.0)
    shrink = np.where(np.isfinite(shrink), shrink, 0.0)
    if not gathers:
        return shrink
    half = profile.window_mm / 2.0
    lo, hi = profile.s_mm - half, profile.s_mm + half
    if not profile.closed:
        lo, hi = np.maximum(lo, 0.0), np.minimum(hi, profile.length_mm)
    taken = np.zeros_like(shrink)
    total = profile.length_mm
    for centre, chord, gathered in gathers:
        shifts = (-total, 0.0, total) if profile.closed else (0.0,)
        for shift in shifts:
            a, b = centre + shift - chord / 2.0, centre + shift + chord / 2.0
            overlap = np.clip(np.minimum(hi, b) - np.maximum(lo, a), 0.0, None)
            taken += gathered * overlap / chord
    return np.maximum(shrink - taken / np.maximum(hi - lo, 1e-12), 0.0)


@dataclass(frozen=True)
class OutlineRun:
    """A stretch of outline (bend line) between two arc-length positions, mm.

    On a closed outline the run may wrap through s = 0, then ``s_end_mm <
    s_start_mm``; ``length_mm`` is always the run's own length.
    """

    s_start_mm: float
    s_end_mm: float
    length_mm: float
    outline_length_mm: float
    closed: bool

    def position(self, fraction: float) -> float:
        """Arc-length position (mm) a ``fraction`` (0..1) of the way along the run."""
        s = self.s_start_mm + fraction * self.length_mm
        return s % self.outline_length_mm if self.closed else s


@dataclass(frozen=True, kw_only=True)
class ShrinkRun(OutlineRun):
    """A run whose edge shrink passes the limit, with the length to take up (mm)."""

    excess_mm: float
    peak_strain: float  # most negative edge strain in the run
    limit: float


@dataclass(frozen=True, kw_only=True)
class StretchRun(OutlineRun):
    """A run whose edge stretch passes the limit (or cannot be formed at all)."""

    peak_strain: float  # largest stretch, inf where not formable
    min_radius_mm: float  # tightest concave plan radius in the run
    formable: bool
    limit: float
    allowed_width_mm: float  # widest flange that passes the limit at min_radius


def _runs(s: FloatArray, g: FloatArray, total: float, closed: bool) -> list[tuple[float, float, list[int], float]]:
    """Maximal runs where ``g > 0``: (start, length, sample indices, integral of g+).

    ``g`` must vary linearly between samples for the end crossings (found by
    linear interpolation) and the trapezoid integral to be exact.
    """
    n = len(s)
    flag = g > 0.0
    if not flag.any():
        return []
    gaps = np.diff(s)
    if closed:
        gaps = np.append(gaps, total - s[-1] + s[0])

    def seg(j: int) -> float:  # segment j -> j+1 (cyclic on closed outlines)
        return float(gaps[j % len(gaps)])

    if closed and flag.all():
        area = sum(0.5 * (g[j] + g[(j + 1) % n]) * seg(j) for j in range(n))
        return [(0.0, total, list(range(n)), float(area))]

    starts = [i for i in range(n) if flag[i] and ((i == 0 and not closed) or not flag[i - 1])]
    out: list[tuple[float, float, list[int], float]] = []
    for i0 in starts:
        idx = [i0]
        j = i0
        while True:
            nxt = j + 1
            if closed:
                nxt %= n
            elif nxt >= n:
                break
            if not flag[nxt]:
                break
            idx.append(nxt)
            j = nxt
        area = sum(0.5 * (g[a] + g[b]) * seg(a) for a, b in itertools.pairwise(idx))
        length = sum(seg(a) for a in idx[:-1])
        start = float(s[i0])
        if closed or i0 > 0:  # lead-in crossing
            p = (i0 - 1) % n
            d = seg(p)
            x = g[i0] / (g[i0] - g[p])
            area += 0.5 * g[i0] * x * d
            start -= x * d
            length += x * d
        last = idx[-1]
        if closed or last < n - 1:  # lead-out crossing
            d = seg(last)
            x = g[last] / (g[last] - g[(last + 1) % n])
            area += 0.5 * g[last] * x * d
            length += x * d
        if closed:
            start %= total
        out.append((float(start), float(length), idx, float(area)))
    return out


def _check_limit(limit: float) -> None:
    if not math.isfinite(limit) or not 0.0 <= limit < 1.0:
        raise FormingError(f"strain limit must lie in [0, 1), got {limit!r}")


def shrink_runs(profile: StrainProfile, limit: float) -> tuple[ShrinkRun, ...]:
    """Runs of outline where the edge shrink passes ``limit`` (a positive strain, e.g. 0.04).

    In the shrink region ``(|e| - limit)*(1 + w*kappa) = w*kappa - limit*(1 + w*kappa)``,
    linear in the sampled curvature, so the excess integral and the run ends
    are found exactly on the profile's samples.  A flange bent through θ < 90° gathers only
    ``w*(1 - cos θ)*kappa`` of edge (``profile.reach_loss``).
    """
    _check_limit(limit)
    w = profile.width_mm
    kappa = profile.curvature_per_mm
    loss = profile.reach_loss
    g = (w * kappa if loss == 1.0 else w * loss * kappa) - limit * (1.0 + w * kappa)
    total = profile.length_mm
    runs = []
    for start, length, idx, area in _runs(profile.s_mm, g, total, profile.closed):
        end = (start + length) % total if profile.closed else start + length
        runs.append(
            ShrinkRun(
                s_start_mm=start,
                s_end_mm=end,
                length_mm=length,
                outline_length_mm=total,
                closed=profile.closed,
                excess_mm=area,
                peak_strain=float(np.min(profile.strain[idx])),
                limit=limit,
            )
        )
    return tuple(runs)


def stretch_limit_width(radius: float, limit: float, reach_loss: float = 1.0) -> float:
    """Widest flange (mm) whose edge stretch ``w/(rho - w)`` stays within ``limit`` on plan radius ``radius`` (mm).

    Inverse of the stretch-flange formula: ``w = limit*rho/(1 + limit)``; for a flange bent through θ < 90°, whose
    edge stretches ``w·(1 − cos θ)/(rho − w)`` (:func:`diegen.forming.strain.reach_loss`),
    ``w = limit*rho/((1 − cos θ) + limit)``.
    """
    _check_limit(limit)
    if not radius > 0.0:
        raise FormingError(f"plan radius must be > 0 mm, got {radius!r}")
    return math.inf if math.isinf(radius) else limit * radius / (reach_loss + limit)


def shrink_limit_width(radius: float, limit: float) -> float:
    """Widest flange (mm) whose edge shrink ``w/(rho + w)`` stays within ``limit`` on plan radius ``radius`` (mm).

    Inverse of the shrink-flange formula: ``w = limit*rho/(1 - limit)``.
    """
    _check_limit(limit)
    if not radius > 0.0:
        raise FormingError(f"plan radius must be > 0 mm, got {radius!r}")
    return math.inf if math.isinf(radius) else limit * radius / (1.0 - limit)


def stretch_runs(profile: StrainProfile, limit: float) -> tuple[StretchRun, ...]:
    """Runs of outline where the edge stretch passes ``limit`` (or the flange is not formable).

    ``e > limit`` on a concave contour is ``-w*kappa > limit/(1 + limit)``,
    again linear in the sampled curvature (``-w*kappa > limit/((1 - cos θ) + limit)`` for a flange bent through
    θ < 90°: ``profile.reach_loss``).  Each run carries the widest flange that would pass the limit at its tightest
    radius.
    """
    _check_limit(limit)
    w = profile.width_mm
    g = -w * profile.curvature_per_mm - limit / (profile.reach_loss + limit)
    total = profile.length_mm
    runs = []
    for start, length, idx, _ in _runs(profile.s_mm, g, total, profile.closed):
        end = (start + length) % total if profile.closed else start + length
        r_min = float(np.min(profile.plan_radius_mm[idx]))
        runs.append(
            StretchRun(
                s_start_mm=start,
                s_end_mm=end,
                length_mm=length,
                outline_length_mm=total,
                closed=profile.closed,
                peak_strain=float(np.max(profile.strain[idx])),
                min_radius_mm=r_min,
                formable=bool(np.all(profile.formable[idx])),
                limit=limit,
                allowed_width_mm=stretch_limit_width(r_min, limit, profile.reach_loss),
            )
        )
    return tuple(runs)


# --- flutes ---------------------------------------------------------------------


def flute_gather(width: float, depth: float, profile: FluteProfile = "arc") -> float:
    """Flange-edge length (mm) one flute of chord ``width`` and depth ``depth`` (mm) takes up.

    Model of our own: the sheet is pushed to the flute's profile, so it
    gathers the profile length minus the chord.  ``"arc"``: a circular segment
    (a semicircle when depth = width/2) of length ``2*a*(b/2)/sin(a)``, where
    ``a = 2*atan(2d/b)`` is half the angle it subtends; ``"vee"``: two straight
    flanks of total length ``2*sqrt((b/2)^2 + d^2)``.
    """
    if profile not in FLUTE_PROFILES:
        raise FormingError(f"flute profile must be one of {', '.join(FLUTE_PROFILES)}, got {profile!r}")
    if not (math.isfinite(width) and width > 0.0):
        raise FormingError(f"flute width must be > 0 mm, got {width!r}")
    if not (math.isfinite(depth) and 0.0 <= depth <= width / 2.0):
        raise FormingError(f"flute depth must lie in [0, width/2] = [0, {width / 2:.3f}] mm, got {depth!r}")
    if depth == 0.0:
        return 0.0
    half = width / 2.0
    if profile == "vee":
        return 2.0 * math.hypot(half, depth) - width
    alpha = 2.0 * math.atan(depth / half)  # half the angle the arc subtends
    return 2.0 * alpha * half / math.sin(alpha) - width


def flute_arc_radius(width: float, depth: float) -> float:
    """Radius (mm) of the ``"arc"`` flute's circular segment of chord ``width`` and depth ``depth`` (mm).

    Plane geometry of a circular segment: r = (b²/4 + d²)/(2d).
    """
    if not (width > 0.0 and 0.0 < depth <= width / 2.0):
        raise FormingError(f"flute depth must lie in (0, width/2] = (0, {width / 2:.3f}] mm, got {depth!r}")
    return (width**2 / 4.0 + depth**2) / (2.0 * depth)


def flute_size(flange_height: float, thickness: float, bend_radius: float) -> tuple[float, float]:
    """Default flute (width, depth) in mm at the flange edge.

    Common practice, no source (a model of our own): the width is
    ``2*(R + 2*T)``, room for the sheet to fold into the groove with at least
    the bend radius inside; the depth is at most a quarter of the flange
    height and at most half the width (a semicircle).  The flute tapers to
    zero depth at the bend line, where the flange has no excess.
    """
    for name, v in (("flange height", flange_height), ("thickness", thickness)):
        if not (math.isfinite(v) and v > 0.0):
            raise FormingError(f"{name} must be > 0 mm, got {v!r}")
    if not (math.isfinite(bend_radius) and bend_radius >= 0.0):
        raise FormingError(f"bend radius must be >= 0 mm, got {bend_radius!r}")
    width = 2.0 * (bend_radius + 2.0 * thickness)
    depth = min(width / 2.0, FLUTE_DEPTH_FRACTION * flange_height)
    return width, depth


@dataclass(frozen=True)
class Flute:
    """One flute in the die wall: centre position along the outline and size, mm."""

    s_mm: float
    width_mm: float  # chord at the flange edge
    depth_mm: float  # depth at the flange edge, tapering to 0 at the bend line
    gather_mm: float
    lip_radius_mm: float = 0.0  # the radius to round the flute's lips to (0: not set)


@dataclass(frozen=True)
class FluteSet:
    """Flutes for one shrink run."""

    run: ShrinkRun
    profile: FluteProfile
    flutes: tuple[Flute, ...]
    excess_mm: float
    gathered_mm: float  # sum of the flutes' gather, >= excess
    fits: bool  # False when the flutes, narrowed to fit side by side in the run, gather less than the excess
    note: str


def flutes(
    run: ShrinkRun,
    flange_height: float,
    thickness: float,
    bend_radius: float,
    *,
    width: float | None = None,
    depth: float | None = None,
    profile: FluteProfile = "arc",
    strain: StrainProfile | None = None,
    lip_radius: float = 0.0,
) -> FluteSet:
    """Flutes over ``run`` that gather its excess (mm), placed where the excess is.

    count = ceil(excess / gather per flute); sizes from :func:`flute_size` unless given.  With the run's
    ``strain`` profile, flute k sits where the run's cumulative excess reaches (k + ½)/count of the whole, so
    flutes crowd where the shrink is worst, kept at least a flute width and a land apart; without it they share
    the run evenly.  A flute width is kept clear at each end where there is room.  ``lip_radius`` (mm) is the
    radius the flutes' lips are rounded to (at least the alloy's minimum bend radius: a sharp lip cracks the
    sheet).  Model of our own (common practice, no source).
    """
    dw, dd = flute_size(flange_height, thickness, bend_radius)
    b = dw if width is None else float(width)
    d = min(dd, b / 2.0) if depth is None else float(depth)
    gather = flute_gather(b, d, profile)
    excess = run.excess_mm
    if excess <= 0.0:
        return FluteSet(run, profile, (), 0.0, 0.0, True, "no excess: no flutes needed")
    if gather <= 0.0:
        raise FormingError("flutes of zero depth gather nothing: give a depth > 0 mm")
    count = math.ceil(excess / gather - 1e-12)
    land = max(FLUTE_LAND_MM, 2.0 * lip_radius)  # room to round both lips of the land between two flutes
    fits = count * (b + land) <= run.length_mm
    wanted = b
    if not fits:  # narrow them to fit side by side, with a land of wall between each pair
        b = run.length_mm / count - land
        if b <= 0.0:
            return FluteSet(run, profile, (), excess, 0.0, False,
                            f"{count} flute(s) would be needed but the {run.length_mm:.0f} mm run has no room for "
                            "them: lower the flange or add notches")
        d = min(d, b / 2.0)
        gather = flute_gather(b, d, profile)
    # keep a flute width clear of the run's ends when there is room: a run often ends at a corner of the
    # outline, where the die's wall turns and the blank has its relief hole (common practice, no source)
    clear = min(b, max(0.0, (run.length_mm - count * (b + land)) / 2.0))
    span = run.length_mm - 2.0 * clear
    offsets = [clear + (i + 0.5) / count * span for i in range(count)]
    if strain is not None and not run.closed:
        offsets = _where_needed(run, strain, b, gather, b + land) or offsets
        count = len(offsets)
    items = tuple(Flute(run.position(o / run.length_mm), b, d, gather, lip_radius) for o in offsets)
    note = (
        f"{count} flute(s) {b:.1f} mm wide x {d:.1f} mm deep gather {count * gather:.1f} mm "
        f"of {excess:.1f} mm excess over {run.length_mm:.0f} mm of outline"
    )
    if not fits:
        note += f"; {wanted:.1f} mm flutes do not fit side by side, so they are narrowed to {b:.1f} mm"
        fits = count * gather >= excess - 1e-9
        if not fits:
            note += " and gather less than the excess: lower the flange or add notches"
    return FluteSet(run, profile, items, excess, count * gather, fits, note)


def _where_needed(run: ShrinkRun, strain: StrainProfile, chord: float, gather: float, pitch: float) -> list[float]:
    """Offsets from the run's start (mm) of flutes laid where the shrink needs them; [] when none is needed.

    Walking along the run, wherever the shrink left in a flange-width window (:func:`residual_shrink`) still
    passes the limit, a flute goes as far along as still takes from that window, at least ``pitch`` after the one
    before and inside the run.  Flutes therefore crowd where the excess is (up to one per ``pitch``) and none is
    spent where the run needs little; where even that cannot bring a window under the limit, the residual says so.
    """
    s = np.asarray(strain.s_mm, float)
    start, end = run.s_start_mm, run.s_start_mm + run.length_mm
    half = strain.window_mm / 2.0
    lo_c, hi_c = start + chord / 2.0, end - chord / 2.0
    if hi_c < lo_c:
        return []
    centres: list[float] = []
    scan = start
    for _ in range(int(run.length_mm / pitch) + 2):
        left = residual_shrink(strain, [(c, chord, gather) for c in centres])
        over = np.nonzero((left > run.limit + 1e-9) & (s >= scan) & (s <= end))[0]
        if not over.size:
            break
        at = float(s[over[0]])
        centre = min(at + half - chord / 2.0, hi_c)
        centre = max(centre, lo_c, (centres[-1] + pitch) if centres else lo_c)
        if centre > hi_c + 1e-9 or centre - chord / 2.0 > at + half:  # no room left, or too far to help here
            scan = at + half
            if scan > end:
                break
            continue
        centres.append(centre)
        scan = at
    return [c - start for c in centres]


# --- V-notches -------------------------------------------------------------------


@dataclass(frozen=True)
class Notch:
    """One V-notch cut in the blank flange: centre position along the outline and size, mm."""

    s_mm: float
    opening_mm: float  # width of the V at the flange edge
    depth_mm: float  # from the flange edge toward the bend line


@dataclass(frozen=True)
class NotchSet:
    """V-notches for one shrink run."""

    run: ShrinkRun
    notches: tuple[Notch, ...]
    excess_mm: float
    removed_mm: float  # sum of the openings = excess
    max_opening_mm: float
    fits: bool
    note: str


def notch_depth(flange_width: float, thickness: float, bend_radius: float) -> float:
    """Depth (mm) of a V-notch from the flange edge: stop ``T + R`` short of the bend tangent line.

    The set-back of a relief notch when none is specified is at least sheet
    thickness + bend radius (common practice, no source); applying it to
    flange V-notches is our own choice.
    """
    depth = flange_width - (thickness + bend_radius)
    if depth <= 0.0:
        raise FormingError(
            f"a {flange_width:.2f} mm flange leaves no room for V-notches (set-back T + R = "
            f"{thickness + bend_radius:.2f} mm): use flutes or a lower flange"
        )
    return depth


def notches(
    run: ShrinkRun,
    flange_width: float,
    thickness: float,
    bend_radius: float,
    *,
    max_opening: float | None = None,
) -> NotchSet:
    """V-notches evenly spaced over ``run`` that remove its excess.

    count = ceil(excess / max opening); each opening = excess / count.  The
    default widest opening is a V of 30 deg included angle over the notch
    depth (model of our own, no source).  ``flange_width`` is the developed
    flange width (mm).
    """
    depth = notch_depth(flange_width, thickness, bend_radius)
    b_max = 2.0 * depth * math.tan(math.radians(NOTCH_MAX_ANGLE_DEG) / 2.0) if max_opening is None else max_opening
    if not (math.isfinite(b_max) and b_max > 0.0):
        raise FormingError(f"largest notch opening must be > 0 mm, got {max_opening!r}")
    excess = run.excess_mm
    if excess <= 0.0:
        return NotchSet(run, (), 0.0, 0.0, b_max, True, "no excess: no notches needed")
    count = math.ceil(excess / b_max - 1e-12)
    opening = excess / count
    items = tuple(Notch(run.position((i + 0.5) / count), opening, depth) for i in range(count))
    fits = count * opening <= run.length_mm
    note = f"{count} V-notch(es) {opening:.2f} mm open x {depth:.1f} mm deep remove {excess:.1f} mm excess"
    return NotchSet(run, items, excess, excess, b_max, fits, note)
