"""Property tests of the drawn-outline readers (the project's error-handling rule, no outside source): whatever
SVG path data or point list comes in, reading it, laying flanges on it and making its piece end either in a
result or in a :class:`~diegen.errors.DiegenError`, never another exception.  Small runs (a few seconds).
"""

from __future__ import annotations

import contextlib

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from diegen.errors import DiegenError
from diegen.sources import AllEdges, Between, Flange, FlangeRunSpec, drawn_part, drawn_piece, read_points, read_svg_path

TOKENS = ["M", "m", "L", "l", "H", "h", "V", "v", "C", "c", "S", "s", "Q", "q", "T", "t", "A", "a", "Z", "z",
          "0", "1", "-3.5", "20", "-20", "1e3", "1e400", ".5", "-.5e-2", "nan", ",", " ", "x", "1e7"]
NUMBERS = st.sampled_from([0.0, 10.0, -10.0, 50.0, 1e-9, 33.3, 1e300, float("nan"), 1e7]) | st.floats(-100, 100)


def _through(drawing, flanges, outline_is):
    part = drawn_part(drawing, flanges, outline_is)
    drawn_piece(part, part_id="Z", sheet_thickness_mm=0.5, pin_diameter_mm=3.0, auto_pins=False)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.sampled_from(TOKENS), max_size=30), st.sampled_from(["mm", "in", "px"]),
       st.sampled_from(["die", "mold-line"]))
def test_any_svg_path_is_read_or_refused(tokens, units, outline_is):
    with contextlib.suppress(DiegenError):
        _through(read_svg_path(" ".join(tokens), units), (FlangeRunSpec(AllEdges(), Flange(5.0, 1.0)),), outline_is)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.lists(NUMBERS, min_size=2, max_size=3), max_size=7), st.booleans(),
       st.sampled_from(["die", "mold-line"]))
def test_any_point_list_is_read_or_refused(points, between, outline_is):
    edges = Between((0.0, 0.0), (10.0, 0.0)) if between else AllEdges()
    with contextlib.suppress(DiegenError):
        _through(read_points(points), (FlangeRunSpec(edges, Flange(5.0, 1.0)),), outline_is)
