"""Laminated dies (``diegen.die.laminate``) of the demo rib's pieces, in 2D, without the kernel.

The references are independent: each layer's outline is compared with shapely's
``buffer`` of the die's mold line, inward by the wall's inset at that depth,
``depth · tan(undercut)`` (plane geometry of a wall leaning by the undercut;
mitred joins, since an inward offset only trims convex corners), and flutes are
counted as the separate pieces shapely finds between a plain and a fluted layer.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import replace

import pytest
from shapely.geometry import Polygon

from diegen.die.die_input import DieInput, DieRun
from diegen.die.laminate import laminate_layers
from diegen.errors import GeometryError

# Mean distance (mm) between a layer's outline and the reference: symmetric-difference area over the perimeter.
# The layers are sampled every 1 mm and the reference polygon through the analysis's points; their chordal error
# on the tightest demo curve (the nose, plan radius about 16 mm) is 1²/(8·16) ≈ 0.008 mm.
MEAN_GAP_TOL_MM = 0.02


def polygon(runs: tuple[DieRun, ...]) -> Polygon:
    """The closed loop of consecutive runs (each run's last point is the next one's first)."""
    points = [p for run in runs for p in run.points[:-1]]
    return Polygon(points)


def reference(die: DieInput, depth_mm: float) -> Polygon:
    """The die's section ``depth_mm`` below the top face: the mold line offset inward by depth · tan(undercut)."""
    inset = depth_mm * math.tan(math.radians(die.undercut_deg))
    mold = polygon(die.outline)
    return mold if inset == 0 else mold.buffer(-inset, join_style="mitre", mitre_limit=10.0)


def mean_gap(a: Polygon, b: Polygon) -> float:
    return a.symmetric_difference(b).area / a.length


@pytest.fixture(scope="module")
def plain_dies(dies) -> dict[str, DieInput]:
    return {name: replace(d, flutes=()) for name, d in dies.items()}


@pytest.mark.parametrize("stock_mm", [12.7, 10.0, 30.0])
def test_layer_count_and_thicknesses(dies, stock_mm: float) -> None:
    """⌈H / t⌉ layers, each of the stock's thickness but the last, trimmed to reach the die's bottom."""
    die = dies["tail"]
    layers = laminate_layers(die, stock_mm)
    count = math.ceil(die.height_mm / stock_mm)
    assert [layer.index for layer in layers] == list(range(count))
    assert layers[0].z_top_mm == 0.0 and layers[-1].z_bottom_mm == pytest.approx(-die.height_mm, abs=1e-12)
    for upper, lower in itertools.pairwise(layers):
        assert lower.z_top_mm == pytest.approx(upper.z_bottom_mm, abs=1e-12)
        assert upper.thickness_mm == pytest.approx(stock_mm, abs=1e-12)
    assert layers[-1].thickness_mm == pytest.approx(die.height_mm - (count - 1) * stock_mm, abs=1e-9)
    assert sum(layer.thickness_mm for layer in layers) == pytest.approx(die.height_mm, abs=1e-9)


def test_demo_stock_gives_the_analysis_layer_count(analysis, dies) -> None:
    """The shop sheet's layer count (from the analysis) is the laminate's."""
    stock = analysis.spec.shared.die.stock_thickness_mm
    for p in analysis.pieces:
        assert len(laminate_layers(dies[p.piece.name], stock)) == p.die_layers


@pytest.mark.parametrize("name", ["nose", "center", "tail"])
def test_layer_outlines_match_shapely_buffer(plain_dies, name: str) -> None:
    """Each layer's cut outline is the wall at its bottom face; its top outline the wall at its top face."""
    die = plain_dies[name]
    for layer in laminate_layers(die, 10.0):
        cut, top = polygon(layer.outline), polygon(layer.top_outline)
        assert cut.is_valid and top.is_valid, layer.index
        assert mean_gap(cut, reference(die, -layer.z_bottom_mm)) < MEAN_GAP_TOL_MM, layer.index
        assert mean_gap(top, reference(die, -layer.z_top_mm)) < MEAN_GAP_TOL_MM, layer.index
        # the wall leans inward going down: the square-cut edge never stands proud of the wall above it
        assert cut.area < top.area
        assert top.buffer(1e-6).contains(cut)


def test_top_layer_reaches_the_mold_line(plain_dies) -> None:
    die = plain_dies["center"]
    first = laminate_layers(die, 12.7)[0]
    assert mean_gap(polygon(first.top_outline), polygon(die.outline)) < MEAN_GAP_TOL_MM


def test_layer_areas_shrink_by_the_undercut(plain_dies) -> None:
    """Area of an inward offset by u of a smooth convex-cornered loop: A − P·u + (turning)·u²/2 (Steiner's
    formula, exact for a convex loop; a first-order check here, the u² term is under 0.1 mm² per mm of inset)."""
    die = plain_dies["tail"]
    mold = polygon(die.outline)
    tan_a = math.tan(math.radians(die.undercut_deg))
    for layer in laminate_layers(die, 5.0):
        u = -layer.z_bottom_mm * tan_a
        expected = mold.area - mold.length * u
        assert polygon(layer.outline).area == pytest.approx(expected, abs=0.5 + 2 * math.pi * u * u)


def segment_area(width_mm: float, depth_mm: float) -> float:
    """Area of a circular segment of chord ``width_mm`` and height ``depth_mm``: r²(2φ − sin 2φ)/2 with
    r = (w²/4 + h²)/2h and sin φ = w/2r (plane geometry; h ≤ w/2 here)."""
    r = (width_mm**2 / 4 + depth_mm**2) / (2 * depth_mm)
    phi = math.asin(width_mm / (2 * r))
    return r * r * (2 * phi - math.sin(2 * phi)) / 2


def test_flutes_cut_each_layer_below_the_top(dies, plain_dies) -> None:
    """The nose die's flutes: absent at the top face, one separate groove each in every lower outline, the
    fluted outline inside the plain one, and the area they take growing with their taper."""
    fluted, plain = dies["nose"], plain_dies["nose"]
    assert fluted.flutes, "the demo nose piece has flutes"
    full = sum(segment_area(f.width_mm, f.depth_mm) for f in fluted.flutes)
    a_layers, b_layers = laminate_layers(plain, 4.0), laminate_layers(fluted, 4.0)
    assert mean_gap(polygon(a_layers[0].top_outline), polygon(b_layers[0].top_outline)) < 1e-3
    previous = 0.0
    for a, b in zip(a_layers, b_layers):
        whole, grooved = polygon(a.outline), polygon(b.outline)
        assert whole.buffer(MEAN_GAP_TOL_MM).contains(grooved), b.index
        lost = whole.difference(grooved)
        grooves = [g for g in getattr(lost, "geoms", [lost]) if g.area > 0.5]
        assert len(grooves) == len(fluted.flutes), b.index
        scale = min(-b.z_bottom_mm / fluted.flute_length_mm, 1.0)  # 0 at the top face, 1 from the flange edge down
        # The grooves are laid along the normals of a wall curving at about 12-20 mm plan radius where the nose's
        # flutes crowd (they are placed by the local excess, densest at the leading edge), which takes about
        # (centroid depth 1.3 mm) / 12 mm ≈ 11 % off the flat segments' area, and up to about 16 % where
        # neighbouring grooves fan in together (measured).
        assert 0.80 * scale * full < lost.area <= scale * full, b.index
        if scale < 1.0:
            assert lost.area > previous, b.index
        previous = lost.area


def test_zero_stock_is_refused(dies) -> None:
    with pytest.raises(GeometryError, match="stock thickness"):
        laminate_layers(dies["tail"], 0.0)
