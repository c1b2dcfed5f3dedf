"""Reading part outlines from SVG path data (diegen.sources.svg), checked against closed forms: areas of
rounded rectangles, circles and ellipses, Archimedes' parabolic segment, Green's theorem integrated exactly
with numpy's polynomials, and the SVG 1.1 rules for arcs (appendix F.6) and reflected control points (8.3.6).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely
from numpy.polynomial import Polynomial
from shapely.geometry import LineString, Polygon

from diegen.errors import DrawingError
from diegen.sources import CHORD_TOL_MM, read_svg_path

MM_PER_IN = 25.4  # NIST SP 811
PX_PER_IN = 96.0  # CSS Values and Units, absolute lengths


def rounded_rect_path(w: float, h: float, r: float) -> str:
    """A w × h rectangle with corner radius r, clockwise on screen (y down), arcs drawn with A."""
    return (f"M {r} 0 H {w - r} A {r} {r} 0 0 1 {w} {r} V {h - r} A {r} {r} 0 0 1 {w - r} {h} "
            f"H {r} A {r} {r} 0 0 1 0 {h - r} V {r} A {r} {r} 0 0 1 {r} 0 Z")


def only(path: str, units: str = "mm"):
    (contour,) = read_svg_path(path, units).contours
    return contour


def test_rounded_rectangle_path_has_the_closed_form_area_with_arcs_kept():
    w, h, r = 120.0, 80.0, 10.0
    contour = only(rounded_rect_path(w, h, r))
    assert [e.kind for e in contour.edges].count("arc") == 4
    # closed form w·h − (4 − π)·r², perimeter 2(w + h) − 8r + 2πr; each arc r·π/2
    assert abs(contour.area) == pytest.approx(w * h - (4 - math.pi) * r**2, rel=1e-12)
    assert contour.length == pytest.approx(2 * (w + h) - 8 * r + 2 * math.pi * r, rel=1e-12)
    assert all(e.length == pytest.approx(r * math.pi / 2) for e in contour.edges if e.kind == "arc")
    # SVG's y points down: the model's y is its negative, so the part spans y from −h to 0
    _, miny, _, maxy = Polygon(contour.points).bounds
    assert (miny, maxy) == pytest.approx((-h, 0.0))


def test_relative_commands_draw_the_same_outline_as_absolute_ones():
    w, h, r = 90.0, 40.0, 8.0
    absolute = only(rounded_rect_path(w, h, r))
    relative = only(f"m {r} 0 h {w - 2 * r} a {r} {r} 0 0 1 {r} {r} v {h - 2 * r} a {r} {r} 0 0 1 {-r} {r} "
                    f"h {-(w - 2 * r)} a {r} {r} 0 0 1 {-r} {-r} v {-(h - 2 * r)} a {r} {r} 0 0 1 {r} {-r} z")
    assert LineString(absolute.points).hausdorff_distance(LineString(relative.points)) <= 1e-9  # shapely
    assert relative.area == pytest.approx(absolute.area, rel=1e-12)


def test_implicit_linetos_after_moveto_and_compact_numbers():
    square = only("M0,0 10,0 10-10L0-10z")  # pairs after M are linetos; "10-10" is two numbers
    assert abs(square.area) == pytest.approx(100.0)
    compact = only("m0 0h10v10h-10z")
    assert abs(compact.area) == pytest.approx(100.0)


def test_circle_from_two_arcs_is_round_and_flags_are_read_without_separators():
    contour = only("M 30 50 a20 20 0 1 0 40 0 a20,20 0 1,0 -40,0 Z")
    cx, cy, d = contour.circle
    assert (cx, cy, d) == pytest.approx((50.0, -50.0, 40.0))
    assert abs(contour.area) == pytest.approx(math.pi * 20**2, rel=1e-12)
    packed = only("M30 50a20 20 0 1040 0a20 20 0 10-40 0z")  # flags "10" then number 40 (SVG 1.1 grammar)
    assert packed.circle == pytest.approx((50.0, -50.0, 40.0))


def test_arc_sweep_flag_follows_svg_turning_sense():
    # from (0,0) to (20,0) with sweep-flag 1 turns "positive-angle" in SVG's y-down frame, i.e. through
    # (10, −10) on screen, which is (10, 10) in the model's y-up frame
    contour = only("M 0 0 A 10 10 0 0 1 20 0 Z")
    arc = next(e for e in contour.edges if e.kind == "arc")
    assert max(p[1] for p in arc.points) == pytest.approx(10.0)
    assert abs(contour.area) == pytest.approx(math.pi * 100 / 2, rel=1e-12)


def test_radii_too_small_are_scaled_up_to_reach():
    # SVG 1.1 F.6.6: radius 1 cannot span 20, so it is scaled to exactly half the chord: a half circle of 10
    contour = only("M 0 0 A 1 1 0 0 1 20 0 Z")
    arc = next(e for e in contour.edges if e.kind == "arc")
    assert arc.radius == pytest.approx(10.0)
    assert abs(arc.sweep) == pytest.approx(math.pi)


def test_elliptical_arcs_lie_on_their_ellipse_and_enclose_pi_a_b():
    a, b = 50.0, 20.0
    contour = only(f"M {-a} 0 A {a} {b} 0 0 1 {a} 0 A {a} {b} 0 0 1 {-a} 0 Z")
    p = np.asarray(contour.points)
    assert (p[:, 0] / a) ** 2 + (p[:, 1] / b) ** 2 == pytest.approx(1.0, abs=1e-12)
    # closed form π·a·b; the inscribed polygon falls short by at most tolerance × perimeter
    assert 0.0 <= math.pi * a * b - abs(contour.area) <= CHORD_TOL_MM * contour.length


def test_rotated_elliptical_arc_lies_on_the_rotated_ellipse():
    a, b, phi = 40.0, 15.0, math.radians(30.0)
    ux, uy = math.cos(phi), math.sin(phi)
    start, end = (-a * ux, -a * uy), (a * ux, a * uy)  # the ends of the major axis, rotated 30°
    contour = only(f"M {start[0]} {start[1]} A {a} {b} 30 0 1 {end[0]} {end[1]} Z")
    pts = np.asarray([q for e in contour.edges if e.kind == "curve" for q in e.points])
    x, y = pts[:, 0], -pts[:, 1]  # back to SVG's frame
    along, across = x * ux + y * uy, -x * uy + y * ux
    assert (along / a) ** 2 + (across / b) ** 2 == pytest.approx(1.0, abs=1e-12)
    assert abs(abs(contour.area) - math.pi * a * b / 2) <= CHORD_TOL_MM * contour.length


def test_quadratic_segment_encloses_archimedes_two_thirds_of_its_triangle():
    p0, p1, p2 = (0.0, 0.0), (30.0, -60.0), (80.0, 0.0)
    contour = only(f"M {p0[0]} {p0[1]} Q {p1[0]} {p1[1]} {p2[0]} {p2[1]} Z")
    triangle = 0.5 * abs((p1[0] - p0[0]) * (p2[1] - p0[1]) - (p2[0] - p0[0]) * (p1[1] - p0[1]))
    # Archimedes, Quadrature of the Parabola: the segment is 4/3 of its inscribed triangle, whose apex is the
    # curve's midpoint; for a quadratic Bézier that is 2/3 of the control triangle
    assert abs(abs(contour.area) - 2 / 3 * triangle) <= CHORD_TOL_MM * contour.length


def _bernstein_cubic(control: np.ndarray) -> tuple[Polynomial, Polynomial]:
    """x(t), y(t) of a cubic Bézier as numpy polynomials (Bernstein form expanded)."""
    t = Polynomial([0.0, 1.0])
    basis = [(1 - t) ** 3, 3 * t * (1 - t) ** 2, 3 * t**2 * (1 - t), t**3]
    x = sum((c[0] * bb for c, bb in zip(control, basis)), Polynomial([0.0]))
    y = sum((c[1] * bb for c, bb in zip(control, basis)), Polynomial([0.0]))
    return x, y


def test_cubic_segment_area_and_chordal_error_against_exact_polynomials():
    control = np.array([[0.0, 0.0], [10.0, -70.0], [90.0, -70.0], [100.0, 0.0]])
    contour = only("M 0 0 C 10 -70 90 -70 100 0 Z")
    x, y = _bernstein_cubic(control * [1.0, -1.0])  # in the model's frame (y up)
    # Green's theorem: ½∮(x dy − y dx), the curve integrated exactly, the closing chord lies on y = 0
    green = (x * y.deriv() - y * x.deriv()).integ()
    exact = 0.5 * (green(1.0) - green(0.0))
    assert abs(contour.area - exact) <= CHORD_TOL_MM * contour.length
    # every point of the curve (evaluated from the expanded polynomials) is within tolerance of the polyline
    t = np.linspace(0.0, 1.0, 20001)
    curve = shapely.points(np.column_stack([x(t), y(t)]))
    edge = next(e for e in contour.edges if e.kind == "curve")
    assert shapely.distance(curve, LineString(edge.points)).max() <= CHORD_TOL_MM


def test_smooth_commands_reflect_the_previous_control_point():
    # SVG 1.1 8.3.6/8.3.7: S and T take the reflection of the previous control point in the current point
    smooth = only("M 0 0 C 0 -30 40 -30 40 0 S 80 30 80 0 V 40 H 0 Z")
    explicit = only("M 0 0 C 0 -30 40 -30 40 0 C 40 30 80 30 80 0 V 40 H 0 Z")
    assert LineString(smooth.points).hausdorff_distance(LineString(explicit.points)) <= 1e-9
    smooth_q = only("M 0 0 Q 20 -40 40 0 T 80 0 V 40 H 0 Z")
    explicit_q = only("M 0 0 Q 20 -40 40 0 Q 60 40 80 0 V 40 H 0 Z")
    assert LineString(smooth_q.points).hausdorff_distance(LineString(explicit_q.points)) <= 1e-9
    # with no previous curve, S's first control point is the current point
    assert only("M 0 0 S 40 -30 40 0 Z").area == pytest.approx(only("M 0 0 C 0 0 40 -30 40 0 Z").area)


def test_units_scale_the_path_to_millimetres():
    inch = only("M 0 0 H 4 V 2 H 0 Z", units="in")
    assert abs(inch.area) == pytest.approx(8 * MM_PER_IN**2)
    pixels = only("M 0 0 H 96 V 96 H 0 Z", units="px")
    assert abs(pixels.area) == pytest.approx((96 / PX_PER_IN * MM_PER_IN) ** 2)
    with pytest.raises(DrawingError, match=r"svg path: units: unknown unit 'em'"):
        read_svg_path("M 0 0 H 4 V 2 H 0 Z", "em")


def test_several_subpaths_are_several_contours():
    drawing = read_svg_path("M 0 0 H 100 V 60 H 0 Z M 40 20 a 10 10 0 0 0 20 0 a 10 10 0 0 0 -20 0 Z", "mm")
    assert len(drawing.contours) == 2
    assert sorted(abs(c.area) for c in drawing.contours) == pytest.approx([math.pi * 100, 6000.0])


@pytest.mark.parametrize("path, message", [
    ("M 0 0 L 10 x", r"svg path at character 12: expected number 2 of 2 for command 'L', found 'x'"),
    ("M 0 0 K 10 0", r"svg path at character 7: expected a command letter .*found 'K 10 0'"),
    ("10 0 L 5 5", r"svg path at character 1: expected a command letter \(M to begin\)"),
    ("M 0 0 A 5 5 0 2 1 10 0 Z", r"character 15: expected the large-arc flag \(0 or 1\) of command 'A', found '2"),
    ("M 0 0 H 50 V 20", (r"the subpath starting at character 1 is not closed: it ends at \(50\.000, 20\.000\) mm, "
                         r"53\.852 mm from where it starts, \(0\.000, 0\.000\) mm; end it with Z")),
    ("M 0 0 L 50 20 L 50 0 L 0 20 Z", r"subpath 1 \[.*\] crosses or touches itself at \(25\.000, 10\.000\) mm"),
    ("M 0 0 H 40 H 0 Z", r"encloses no area"),
    ("", r"svg path: the path draws nothing"),
])
def test_bad_paths_are_refused_with_the_place(path, message):
    with pytest.raises(DrawingError, match=message):
        read_svg_path(path, "mm")
