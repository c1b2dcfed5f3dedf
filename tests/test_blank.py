"""Flat blanks of the demo rib's pieces: DXF round trip, flange band area, reliefs, holes and pins.

Band area (blank minus die outline).  Steiner's formula for the parallel body of
a convex region K at distance w (J. Steiner 1840; e.g. L. A. Santaló, *Integral
Geometry and Geometric Probability*, 1976, ch. 1 — citation from memory,
unverified; the formula itself is re-derived below for polygons):

    A(K ⊕ wB) = A(K) + L·w + π·w²                                  (round corners)

so the band is L·w + π·w², the π·w² being (total turning 2π)/2 · w².  The blank
is offset with *mitred* corners instead: at a vertex turning by θ the round
sector (θ/2)·w² becomes a kite of area w²·tan(θ/2), so for a polygonal outline
whose offset does not fold over itself (w below every concave radius; concave
vertices enter with negative θ):

    band = L·w + w²·Σ tan(θᵢ/2)      (plane geometry, derived; Σ θᵢ = 2π)

which tends to Steiner's L·w + π·w² as the vertices get dense.  At a relief
corner the kite (the overlapping corner square) is cut away, so that vertex
drops out of the sum; where a cut end (the tail's aft face) clips the band, the
end segment's strip loses the triangle ½·w²·tan α beyond the cut (α: tilt of
the outline's normal past the cut line).
"""

from __future__ import annotations

import math
from pathlib import Path

import ezdxf
import numpy as np
import pytest
import shapely
from shapely.geometry import LinearRing, LineString, Polygon
from testing import DEMO_RIB, as_array, circle_points, nearest_index, point, signed_area, turning_angles

from diegen import api
from diegen.analysis import PieceAnalysis, RibAnalysis
from diegen.blank.develop import develop_blank, flange_band_area, relief_hole_diameter
from diegen.export.dxf import read_dxf_outline, write_dxf
from diegen.geometry.types import PieceGeometry, Run

IN = 25.4


@pytest.fixture(scope="module")
def analysis() -> RibAnalysis:
    result = api.analyse(api.load(DEMO_RIB))
    assert isinstance(result, RibAnalysis)
    return result


def tangent_inset(p: PieceAnalysis) -> float:
    """Die outline (mold line) → the web's bend tangent line on the die (mm): Ri·tan(θi/2) for a bend
    through the die angle θi (the inside setback of a bend, FAA-H-8083-31 ch. 4 with K = tan(θ/2))."""
    return p.springback.die_radius_mm * math.tan(math.radians(p.springback.die_angle_deg) / 2)


def offset_of(p: PieceAnalysis) -> float:
    """Die outline → blank edge (mm): developed flange width less the tangent-line inset on the die."""
    return p.layout.developed_width_mm - tangent_inset(p)


def _right_normal(v: np.ndarray) -> np.ndarray:
    v = v / np.linalg.norm(v)
    return np.array([v[1], -v[0]])  # outward for a CCW loop


PIECES = ["nose", "center", "tail"]


def get(analysis: RibAnalysis, name: str) -> PieceAnalysis:
    return next(p for p in analysis.pieces if p.piece.name == name)


# --------------------------------------------------------------------------- DXF


@pytest.mark.parametrize("name", PIECES)
def test_dxf_round_trip_is_clean_and_keeps_area_and_pins(analysis: RibAnalysis, name: str, tmp_path: Path) -> None:
    p = get(analysis, name)
    blank = p.blank
    path = write_dxf(blank, tmp_path / f"{p.piece.part_id}.dxf")
    doc = ezdxf.readfile(path)
    auditor = doc.audit()  # ezdxf's own DXF structure audit
    assert not auditor.has_errors, [str(e.message) for e in auditor.errors]
    assert not auditor.has_fixes, [str(f.message) for f in auditor.fixes]
    assert doc.header["$INSUNITS"] == 4  # millimetres (DXF Reference, HEADER section)
    # re-read with ezdxf directly, not through diegen's reader
    msp = doc.modelspace()
    contours = [[(float(x), float(y)) for x, y in e.get_points("xy")] for e in msp.query('LWPOLYLINE[layer=="CUT"]')
                if e.closed]
    assert len(contours) == 1 + len(blank.inner)
    outer = max(contours, key=lambda c: abs(signed_area(c)))
    assert abs(signed_area(outer)) == pytest.approx(Polygon(blank.outer).area, rel=1e-3)
    circles = [(e.dxf.center.x, e.dxf.center.y, 2 * e.dxf.radius) for e in msp.query('CIRCLE[layer=="CUT"]')]
    drills = [(e.dxf.center.x, e.dxf.center.y, 2 * e.dxf.radius) for e in msp.query('CIRCLE[layer=="DRILL"]')]
    cuts = [shapely.Point(x, y).buffer(d / 2, quad_segs=128) for x, y, d in circles + drills]
    net = Polygon(outer).difference(shapely.union_all(cuts)).area
    assert net == pytest.approx(blank.net_area(), rel=1e-3)
    # the pins drilled in the blank are the geometry's tooling pins, one for one
    assert np.allclose(sorted(drills), sorted((q.x, q.y, q.d) for q in p.piece.pins), rtol=0, atol=1e-9)
    assert [(c.x, c.y, c.d) for c in blank.drill_circles] == [(q.x, q.y, q.d) for q in p.piece.pins]
    # diegen's own reader agrees
    back = read_dxf_outline(path)
    assert back.insunits == 4
    assert abs(signed_area(back.outer)) == pytest.approx(Polygon(blank.outer).area, rel=1e-3)
    assert len(back.drill_circles) == len(p.piece.pins)


# --------------------------------------------------------------------------- band area


@pytest.mark.parametrize("name", PIECES)
def test_flange_band_area_is_the_mitred_parallel_band(analysis: RibAnalysis, name: str) -> None:
    p = get(analysis, name)
    g = p.piece
    w = offset_of(p)
    pts = as_array(g.outline)
    theta = turning_angles(pts)
    skip = {nearest_index(pts, c) for c in g.relief_points}
    length = g.length_mm
    correction = 0.0
    for run in g.runs:
        if run.kind == "line" and not run.flanged:  # the tail's cut end: no band along it, clipped strips beside it
            length -= math.dist(*run.points)
            bottom, top = nearest_index(pts, run.points[0]), nearest_index(pts, run.points[1])
            skip |= {bottom, top}
            n = len(pts)
            for normal in (_right_normal(pts[bottom] - pts[bottom - 1]), _right_normal(pts[(top + 1) % n] - pts[top])):
                correction -= 0.5 * w**2 * normal[0] / abs(normal[1])  # normal[0] > 0: tilted past the cut
    keep = np.array([i not in skip for i in range(len(pts))])
    expected = length * w + w**2 * float(np.sum(np.tan(theta[keep] / 2))) + correction
    band = flange_band_area(p.blank, g)
    assert band == pytest.approx(expected, rel=1e-4)
    # and the Steiner estimate L·w + (turning/2)·w² is within the curvature correction of it
    assert abs(band - length * w) < w**2 * (math.pi + 1.0)


def _circle_piece(radius: float, n: int) -> PieceGeometry:
    pts = [(float(x), float(y)) for x, y in circle_points(radius, n, start=math.pi / 2)]
    runs = (Run("curve", tuple(pts[: n // 2 + 1])), Run("curve", tuple(pts[n // 2:] + pts[:1])))
    return PieceGeometry("nose", "disc", (-radius, radius), runs, (), (), (), (), (0.0, 0.0), runs)


@pytest.mark.parametrize("n", [12, 720])
def test_blank_of_a_disc_follows_steiner(n: int) -> None:
    # regular n-gon inscribed in a circle of radius ρ, side s = 2ρ·sin(π/n): mitred band L·w + w²·n·tan(π/n);
    # as n grows that tends to Steiner's L·w + π·w² (n = 720: relative difference 6e-6).
    rho, w = 60.0, 11.5
    disc = _circle_piece(rho, n)
    blank = develop_blank(disc, offset_mm=w, die_radius_mm=2.0, tangent_inset_mm=2.0, thickness_mm=0.635,
                          material="test", pilot_diameters=[])
    length = n * 2 * rho * math.sin(math.pi / n)
    band = flange_band_area(blank, disc)
    assert band == pytest.approx(length * w + w**2 * n * math.tan(math.pi / n), rel=1e-9)
    if n == 720:
        assert band == pytest.approx(2 * math.pi * rho * w + math.pi * w**2, rel=1e-4)
    assert not blank.inner and not blank.cut_circles


# --------------------------------------------------------------------------- reliefs and edges


@pytest.mark.parametrize("name", PIECES)
def test_relief_corners_are_cut_and_drilled(analysis: RibAnalysis, name: str) -> None:
    # FAA-H-8083-31 ch. 4, "folding a box": cut away the overlapping corner, drill a relief hole at the
    # intersection of the inside bend tangent lines, at least 1/8 in for sheet up to 0.064 in.
    p = get(analysis, name)
    g, blank = p.piece, p.blank
    w, r_die = offset_of(p), p.springback.die_radius_mm
    shape = Polygon(blank.outer)
    assert not blank.inner  # no stray cut-outs inside the web
    assert shape.buffer(1e-6).contains(Polygon(g.outline))  # the whole web is in the blank
    t = 0.635
    relief_d = relief_hole_diameter(t, r_die)
    assert relief_d == pytest.approx(max(IN / 8, 2 * r_die))
    pts = as_array(g.outline)
    reliefs = blank.cut_circles[: len(g.relief_points)]
    for corner, hole in zip(g.relief_points, reliefs):
        i = nearest_index(pts, corner)
        c, before, after = pts[i], pts[i - 1], pts[(i + 1) % len(pts)]
        n_in, n_out = _right_normal(c - before), _right_normal(after - c)
        for a, b in ((1.0, 1.0), (0.5 * w, 0.5 * w), (w - 0.5, w - 0.5), (0.5, w - 0.5), (w - 0.5, 0.5)):
            assert not shape.contains(point(c + a * n_in + b * n_out)), (name, corner, a, b)
        # the two flanges themselves stay: half a flange out, a little back from the corner along each edge
        d_in, d_out = (c - before) / np.linalg.norm(c - before), (after - c) / np.linalg.norm(after - c)
        assert shape.contains(point(c + 0.5 * w * n_in - 1.0 * d_in))
        assert shape.contains(point(c + 0.5 * w * n_out + 1.0 * d_out))
        # the relief hole: diameter as above, centre on both bend tangent lines of the web
        assert hole.d == pytest.approx(relief_d)
        for a, b in ((before, c), (c, after)):
            assert LineString([a - 100 * (c - a), b + 100 * (b - a)]).distance(point((hole.x, hole.y))) == \
                pytest.approx(tangent_inset(p), abs=1e-6)


def test_tail_blank_stops_at_the_cut_end(analysis: RibAnalysis) -> None:
    p = get(analysis, "tail")
    x_end = p.piece.x_range_mm[1]
    xs = as_array(p.blank.outer)[:, 0]
    assert xs.max() == pytest.approx(x_end, abs=1e-9)
    # the aft edge of the blank is one vertical cut at x_end spanning the die's aft face and both flanges
    on_edge = as_array(p.blank.outer)[np.abs(xs - x_end) < 1e-9]
    face = p.piece.runs[-1].points
    assert on_edge[:, 1].min() < min(y for _, y in face) and on_edge[:, 1].max() > max(y for _, y in face)


@pytest.mark.parametrize("name", PIECES)
def test_blank_holes_are_pilots_for_flanged_holes_and_size_for_plain(analysis: RibAnalysis, name: str) -> None:
    p = get(analysis, name)
    holes = p.blank.cut_circles[len(p.piece.relief_points):]
    assert len(holes) == len(p.piece.holes)
    for hole, circle, check in zip(p.piece.holes, holes, p.holes):
        assert (circle.x, circle.y) == (hole.x, hole.y)
        assert circle.d == pytest.approx(check.pilot_d_mm if hole.flanged else hole.d)
        if hole.flanged:
            # Flat-pattern development (FAA-H-8083-31 ch. 4) of the hole flange, stretching ignored: the web's bend
            # tangent line lies at d/2 + T + R; the flange develops BA + (h − SB) inward of it, SB = R + T (90°),
            # BA = (π/2)(R + kT).  Thin sheet and a sharp bend give the familiar d − 2h.
            r, t, k = p.springback.part_radius_mm, analysis.spec.shared.sheet.thickness_mm, p.layout.k_factor
            developed = math.pi / 2 * (r + k * t) + hole.flange_height - (r + t)
            assert circle.d == pytest.approx(2 * (hole.d / 2 + t + r - developed), abs=1e-6)
            assert circle.d < hole.d


def test_blank_outline_is_a_valid_ccw_loop(analysis: RibAnalysis) -> None:
    for p in analysis.pieces:
        outer = as_array(p.blank.outer)
        assert LinearRing(outer).is_simple and Polygon(outer).is_valid
        assert signed_area(outer) > 0
