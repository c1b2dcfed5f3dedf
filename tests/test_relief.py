"""Shrink-flange relief (flutes, V-notches) and stretch-flange warnings.

The excess length checks come from plan geometry (derived): a shrink flange of
width w round a full convex circle has a blank edge 2 pi (rho + w) long that
must close to 2 pi rho, an excess of exactly 2 pi w; with a strain limit L the
excess beyond the limit is integral (|e| - L) ds_edge = 2 pi (w - L (rho + w)).
The flute and notch sizing rules are models of our own (no source); the tests
check their own arithmetic and the requirement that relief takes up the excess.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from diegen.errors import FormingError
from diegen.forming.relief import (
    FLUTE_LAND_MM,
    flute_arc_radius,
    flute_gather,
    flute_size,
    flutes,
    notch_depth,
    notches,
    shrink_limit_width,
    shrink_runs,
    stretch_limit_width,
    stretch_runs,
)
from diegen.forming.strain import flange_edge_strain, strain_along


def _circle(radius: float, n: int = 1500) -> np.ndarray:
    th = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False)
    return np.column_stack((radius * np.cos(th), radius * np.sin(th)))


def _arc(radius: float, length: float, n: int = 600, ccw: bool = True) -> np.ndarray:
    sweep = length / radius
    th = np.linspace(0.0, sweep, n) if ccw else np.linspace(sweep, 0.0, n)
    return np.column_stack((radius * np.cos(th), radius * np.sin(th)))


def test_full_circle_excess_without_limit_is_two_pi_w() -> None:
    # Derived: blank edge 2 pi (rho + w) minus formed edge 2 pi rho.
    prof = strain_along(_circle(100.0), 10.0, closed=True)
    (run,) = shrink_runs(prof, 0.0)
    assert run.length_mm == pytest.approx(prof.length_mm, rel=1e-12)
    assert run.excess_mm == pytest.approx(2.0 * math.pi * 10.0, rel=2e-6)
    assert run.peak_strain == pytest.approx(-10.0 / 110.0, rel=2e-6)


@pytest.mark.parametrize("limit", [0.02, 0.05, 0.08])
def test_full_circle_excess_beyond_limit(limit: float) -> None:
    # Derived: 2 pi (w - L (rho + w)).
    prof = strain_along(_circle(100.0), 10.0, closed=True)
    (run,) = shrink_runs(prof, limit)
    assert run.excess_mm == pytest.approx(2.0 * math.pi * (10.0 - limit * 110.0), rel=1e-5)


def test_circle_under_limit_needs_nothing() -> None:
    prof = strain_along(_circle(100.0), 10.0, closed=True)
    assert shrink_runs(prof, 0.1) == ()  # |e| = 0.0909 < 0.1


def test_straight_edge_needs_no_relief() -> None:
    pts = np.column_stack((np.linspace(0.0, 300.0, 31), np.zeros(31)))
    prof = strain_along(pts, 12.0, closed=False)
    assert shrink_runs(prof, 0.0) == ()
    assert stretch_runs(prof, 0.0) == ()


def test_counts_grow_with_curvature() -> None:
    # Same 300 mm run of outline, tighter plan radius -> more excess -> more flutes and notches.
    w, t, r, limit = 12.0, 0.8, 2.5, 0.03
    flute_counts, notch_counts = [], []
    for rho in (800.0, 300.0, 150.0, 75.0, 40.0):
        prof = strain_along(_arc(rho, 300.0), w, closed=False)
        runs = shrink_runs(prof, limit)
        excess = sum(run.excess_mm for run in runs)
        flute_counts.append(sum(len(flutes(run, w, t, r).flutes) for run in runs))
        notch_counts.append(sum(len(notches(run, w, t, r).notches) for run in runs))
        if rho == 800.0:
            assert excess == 0.0  # 12/812 = 1.5 % < 3 %
    assert flute_counts == sorted(flute_counts) and flute_counts[0] == 0 and flute_counts[-1] > flute_counts[1]
    assert notch_counts == sorted(notch_counts) and notch_counts[0] == 0 and notch_counts[-1] > notch_counts[1]


@pytest.mark.parametrize("profile", ["arc", "vee"])
def test_flutes_gather_at_least_the_excess(profile: str) -> None:
    prof = strain_along(_arc(60.0, 150.0), 12.0, closed=False)
    (run,) = shrink_runs(prof, 0.02)
    fs = flutes(run, 12.0, 0.8, 2.5, profile=profile)  # type: ignore[arg-type]
    assert fs.gathered_mm >= run.excess_mm > 0.0
    assert fs.gathered_mm - fs.flutes[0].gather_mm < run.excess_mm  # one fewer would not do
    s = np.array([f.s_mm for f in fs.flutes])
    width = fs.flutes[0].width_mm
    clear = min(width, (run.length_mm - len(s) * width) / 2)  # a flute width kept clear at each end
    assert clear > 0
    pitch = (run.length_mm - 2 * clear) / len(s)
    assert np.diff(s) == pytest.approx(np.full(len(s) - 1, pitch), rel=1e-12)  # evenly spaced
    assert s[0] - run.s_start_mm == pytest.approx(clear + pitch / 2, rel=1e-12)
    assert run.s_start_mm + run.length_mm - s[-1] == pytest.approx(clear + pitch / 2, rel=1e-12)


def test_crowded_flutes_are_narrowed_to_fit_with_a_land_between() -> None:
    # a tight shrink run: the flutes asked for (width 2(R + 2T)) would not fit side by side, so they share the
    # run, each narrowed to leave FLUTE_LAND_MM of wall between neighbours; the note and `fits` say so
    prof = strain_along(_arc(20.0, 40.0), 12.0, closed=False)
    (run,) = shrink_runs(prof, 0.02)
    asked = flutes(run, 12.0, 0.8, 2.5, width=8.0)
    assert not asked.fits
    count = len(asked.flutes)
    width = run.length_mm / count - FLUTE_LAND_MM
    assert all(f.width_mm == pytest.approx(width, rel=1e-12) and f.depth_mm <= width / 2 for f in asked.flutes)
    s = np.array([f.s_mm for f in asked.flutes])
    assert np.diff(s) - width == pytest.approx(np.full(count - 1, FLUTE_LAND_MM), rel=1e-9)
    assert asked.gathered_mm < run.excess_mm and "narrowed" in asked.note
    assert count * (8.0 + FLUTE_LAND_MM) > run.length_mm


def test_notches_remove_exactly_the_excess() -> None:
    prof = strain_along(_arc(60.0, 150.0), 12.0, closed=False)
    (run,) = shrink_runs(prof, 0.02)
    ns = notches(run, 12.0, 0.8, 2.5)
    assert sum(n.opening_mm for n in ns.notches) == pytest.approx(run.excess_mm, rel=1e-12)
    assert all(n.opening_mm <= ns.max_opening_mm for n in ns.notches)
    assert len(ns.notches) == math.ceil(run.excess_mm / ns.max_opening_mm)
    # our own default: a 30 deg V over the notch depth, which stops T + R short of the bend line
    assert ns.notches[0].depth_mm == pytest.approx(12.0 - 3.3)
    assert ns.max_opening_mm == pytest.approx(2.0 * 8.7 * math.tan(math.radians(15.0)))


def test_flute_gather_geometry() -> None:
    # Semicircle of diameter b: arc pi b / 2, gather b (pi/2 - 1); right-angle V: b (sqrt 2 - 1).
    assert flute_gather(8.0, 4.0, "arc") == pytest.approx(8.0 * (math.pi / 2.0 - 1.0), rel=1e-12)
    assert flute_gather(8.0, 4.0, "vee") == pytest.approx(8.0 * (math.sqrt(2.0) - 1.0), rel=1e-12)
    # shallow circular segment, chord 8, sagitta 1: radius 8.5, half angle asin(4/8.5)
    assert flute_gather(8.0, 1.0, "arc") == pytest.approx(2.0 * 8.5 * math.asin(4.0 / 8.5) - 8.0, rel=1e-12)
    assert flute_gather(8.0, 0.0) == 0.0
    with pytest.raises(FormingError):
        flute_gather(8.0, 5.0)
    with pytest.raises(FormingError):
        flute_gather(8.0, 1.0, "square")  # type: ignore[arg-type]


def test_flute_arc_radius() -> None:
    # circular segment, chord 8: sagitta 4 is the semicircle of radius 4, sagitta 1 the arc of radius 8.5
    assert flute_arc_radius(8.0, 4.0) == pytest.approx(4.0, rel=1e-12)
    assert flute_arc_radius(8.0, 1.0) == pytest.approx(8.5, rel=1e-12)
    with pytest.raises(FormingError):
        flute_arc_radius(8.0, 4.5)


def test_flute_size_rule() -> None:
    # Our own rule: width 2 (R + 2T); depth <= a quarter of the flange height and <= width / 2.
    assert flute_size(12.0, 0.8, 2.5) == pytest.approx((8.2, 3.0))
    assert flute_size(40.0, 0.8, 2.5) == pytest.approx((8.2, 4.1))


def test_run_wrapping_through_start_of_closed_outline() -> None:
    # Rectangle from (0, 0): the corner at s = 0 gives one run that wraps through s = 0.
    rect = np.array([[0.0, 0.0], [400.0, 0.0], [400.0, 200.0], [0.0, 200.0]])
    prof = strain_along(rect, 10.0, closed=True)
    runs = shrink_runs(prof, 0.05)
    assert len(runs) == 4
    lengths = [run.length_mm for run in runs]
    assert lengths == pytest.approx([lengths[0]] * 4, rel=1e-9)
    wrap = [run for run in runs if run.s_end_mm < run.s_start_mm]
    assert len(wrap) == 1 and wrap[0].s_start_mm > 1100.0 and wrap[0].s_end_mm < 100.0
    # relief is centred on the corner, positions wrap into [0, perimeter)
    fs = flutes(wrap[0], 10.0, 0.8, 2.5)
    s = sorted(f.s_mm for f in fs.flutes)
    assert all(0.0 <= v < 1200.0 for v in s)
    centre = wrap[0].position(0.5)
    assert min(abs(centre - 0.0), abs(centre - 1200.0)) < 1e-9
    # the corner turns 90 deg: without a limit the excess is w pi/2 (derived, as for the circle)
    (run0,) = [r for r in shrink_runs(prof, 0.0) if r.s_end_mm < r.s_start_mm]
    assert run0.excess_mm == pytest.approx(10.0 * math.pi / 2.0, rel=1e-9)


@pytest.mark.parametrize(("rho", "limit"), [(50.0, 0.05), (120.0, 0.10), (30.0, 0.20)])
def test_limit_widths_invert_the_strain_formulas(rho: float, limit: float) -> None:
    w = stretch_limit_width(rho, limit)
    assert flange_edge_strain(rho, w, convex=False) == pytest.approx(limit, rel=1e-12)
    w = shrink_limit_width(rho, limit)
    assert -flange_edge_strain(rho, w, convex=True) == pytest.approx(limit, rel=1e-12)
    assert stretch_limit_width(math.inf, limit) == math.inf


def test_stretch_runs_report_allowed_width() -> None:
    rho, w = 80.0, 10.0
    prof = strain_along(_arc(rho, 200.0, ccw=False), w, closed=False)
    (run,) = stretch_runs(prof, 0.1)  # e = 10/70 = 14.3 % > 10 %
    assert run.peak_strain == pytest.approx(w / (rho - w), rel=2e-5)
    assert run.min_radius_mm == pytest.approx(rho, rel=2e-5)
    assert run.allowed_width_mm == pytest.approx(0.1 * rho / 1.1, rel=2e-5)
    assert run.formable
    assert stretch_runs(prof, 0.15) == ()


def test_notches_need_room() -> None:
    with pytest.raises(FormingError, match="no room"):
        notch_depth(3.0, 0.8, 2.5)


def test_narrowed_flutes_that_gather_the_excess_do_not_say_they_fall_short() -> None:
    # a 3 mm shrink run just past the limit (the demo rib's nose in NACA 6409 at 16 in chord has two such): one
    # flute, narrowed to fit the run, gathers far more than the 0.01 mm to take up
    from diegen.forming.relief import ShrinkRun

    run = ShrinkRun(s_start_mm=10.0, s_end_mm=13.0, length_mm=3.0, outline_length_mm=100.0, closed=False,
                    excess_mm=0.01, peak_strain=-0.045, limit=0.04)
    found = flutes(run, 12.7, 0.635, 2.26)
    assert len(found.flutes) == 1 and found.fits and found.gathered_mm > 10 * found.excess_mm
    assert "narrowed" in found.note
    assert "less than the excess" not in found.note, found.note
