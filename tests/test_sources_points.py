"""Reading part outlines from point lists with DXF bulges (diegen.sources.points), checked against ezdxf's
bulge helpers (ezdxf.math.bulge_to_arc, arc_to_bulge) and closed-form arc lengths and areas.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from ezdxf.math import arc_to_bulge, bulge_to_arc

from diegen.errors import DrawingError, SpecError
from diegen.sources import CHORD_TOL_MM, bulge_arc, points_with_bulges, read_points

QUARTER = math.tan(math.radians(90.0) / 4.0)  # bulge of a quarter circle (DXF: tan(θ/4))


@pytest.mark.parametrize("bulge", [QUARTER, -QUARTER, 1.0, -1.0, 0.2, -3.5, 40.0])
def test_bulge_arc_matches_ezdxf_bulge_to_arc(bulge):
    a, b = (3.0, -2.0), (41.0, 17.0)
    centre, radius, sweep = bulge_arc(a, b, bulge)
    ez_centre, start, end, ez_radius = bulge_to_arc(a, b, bulge)  # ezdxf.math
    assert centre == pytest.approx((ez_centre.x, ez_centre.y), abs=1e-9)
    assert radius == pytest.approx(ez_radius, rel=1e-12)
    # ezdxf gives the arc counter-clockwise from start to end angle; our sweep carries the sign
    assert abs(sweep) == pytest.approx((end - start) % (2 * math.pi), rel=1e-12)
    assert math.copysign(1.0, sweep) == math.copysign(1.0, bulge)


def test_ezdxf_arc_to_bulge_round_trips_through_our_arc():
    start_p, end_p, bulge = arc_to_bulge((10.0, 5.0), math.radians(20.0), math.radians(130.0), 25.0)  # ezdxf.math
    centre, radius, sweep = bulge_arc(start_p, end_p, bulge)
    assert centre == pytest.approx((10.0, 5.0), abs=1e-9)
    assert radius == pytest.approx(25.0, rel=1e-12)
    assert sweep == pytest.approx(math.radians(110.0), rel=1e-12)


def test_rounded_rectangle_from_points_with_quarter_bulges():
    w, h, r = 140.0, 70.0, 9.0
    rows = [[r, 0], [w - r, 0, QUARTER], [w, r], [w, h - r, QUARTER], [w - r, h], [r, h, QUARTER], [0, h - r],
            [0, r, QUARTER]]
    (contour,) = read_points(rows).contours
    # closed forms: area w·h − (4 − π)r², each fillet r·π/2 long, perimeter 2(w + h) − 8r + 2πr
    assert contour.area == pytest.approx(w * h - (4 - math.pi) * r**2, rel=1e-12)
    assert [round(e.length, 9) for e in contour.edges if e.kind == "arc"] == [round(r * math.pi / 2, 9)] * 4
    assert contour.length == pytest.approx(2 * (w + h) - 8 * r + 2 * math.pi * r, rel=1e-12)
    for arc in (e for e in contour.edges if e.kind == "arc"):
        p = np.asarray(arc.points)
        centre, _, _, radius = bulge_to_arc(arc.start, arc.end, arc.bulge)  # ezdxf.math
        assert np.hypot(*(p - (centre.x, centre.y)).T) == pytest.approx(radius, abs=1e-9)
        mid = 0.5 * (p[1:] + p[:-1])
        assert (radius - np.hypot(*(mid - (centre.x, centre.y)).T)).max() <= CHORD_TOL_MM


def test_two_points_joined_by_half_circles_make_a_disc():
    (contour,) = read_points([[0, 0, 1], [30, 0, 1]]).contours
    assert contour.circle == pytest.approx((15.0, 0.0, 30.0), abs=1e-9)
    assert contour.area == pytest.approx(math.pi * 15.0**2, rel=1e-12)


def test_arc_length_is_r_theta_for_any_bulge():
    for degrees in (10.0, 60.0, 135.0, 200.0, 300.0):
        theta = math.radians(degrees)
        (contour,) = read_points([[0, 0, math.tan(theta / 4)], [50, 0], [25, 80]]).contours
        arc = contour.edges[0]
        radius = 50.0 / (2 * math.sin(theta / 2))  # chord = 2r·sin(θ/2)
        assert arc.length == pytest.approx(radius * theta, rel=1e-12)


def test_units_a_repeated_closing_point_and_the_round_trip():
    rows = [[0, 0], [4, 0, QUARTER], [5, 1], [5, 3], [0, 3], [0, 0]]
    (contour,) = read_points(rows, mm_per_unit=25.4, unit="in").contours
    assert len(contour.edges) == 5  # the repeated first point is dropped
    again = read_points(points_with_bulges(contour)).contours[0]
    assert again.area == pytest.approx(contour.area, rel=1e-12)
    # a 5 × 3 in rectangle less a ½ in² corner triangle, plus the quarter circle's segment r²/2·(θ − sin θ), r = 1 in
    assert contour.area == pytest.approx(25.4**2 * (15 - 0.5 + 0.5 * (math.pi / 2 - 1)), rel=1e-12)


@pytest.mark.parametrize("points, key, message", [
    ("M 0 0", "outline.points", r"expected a list of points \[x, y\] or \[x, y, bulge\], found str"),
    ([[0, 0], [1, 0], [1]], r"outline.points\[2\]", r"expected a point \[x, y\] or \[x, y, bulge\], found a list"),
    ([[0, 0], [1, "a"], [1, 1]], r"outline.points\[1\]", r"expected y as a finite number, found str 'a'"),
    ([[0, 0], [1, 0, True], [1, 1]], r"outline.points\[1\]", r"expected a bulge as a finite number, found a boolean"),
    ([[0, 0], [10, 0]], "outline.points", r"expected at least 3 points"),
    ([[0, 0], [10, 0], [10, 0], [0, 10]], r"outline.points\[1\]", r"point 1 repeats the next one"),
])
def test_bad_point_lists_name_the_key(points, key, message):
    with pytest.raises(SpecError, match=rf"part.yaml: {key}: {message}"):
        read_points(points, file="part.yaml")


def test_a_crossing_point_list_is_a_drawing_error():
    with pytest.raises(DrawingError, match=r"outline.points: the outline \[outline.points\[0\], .*\] crosses or "
                                           r"touches itself at \(5\.000, 5\.000\) mm"):
        read_points([[0, 0], [10, 10], [10, 0], [0, 10]])


def test_points_far_from_the_origin_are_refused():
    with pytest.raises(DrawingError, match=r"^outline.points\[0\]: a point at \(1e\+300, 0\) mm lies more than "
                                           r"1000000 mm from the origin"):
        read_points([[0, 0], [1e300, 0], [0, 10, 1]])
