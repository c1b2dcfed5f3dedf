"""Print-bed tiles (``diegen.die.occ.tiles``) of the demo rib's center die, measured with trimesh and the kernel.

The die is 454 mm long: a bed shorter than that splits it.  The tiles are
written as STL and read back with trimesh, which gives their extents, their
volumes, and (with ``trimesh.intersections.mesh_plane`` and shapely's
``polygonize``) their sections next to each joint, where the alignment dowel
holes show as round holes in the section.  The dowel count is found there,
independently of the tiler, and the tiles' volumes must add up to the die's less
that many dowel holes, each a cylinder π r² long twice the dowel depth.
"""

from __future__ import annotations

import itertools
import math
from pathlib import Path

import numpy as np
import pytest

pytestmark = [pytest.mark.slow, pytest.mark.solid]

trimesh = pytest.importorskip("trimesh")

DOWEL_D = 5.0  # mm, tile_for_bed's defaults
DOWEL_DEPTH = 10.0
MARGIN = 2.0
MIN_WALL = 2.0
STL_TOL = 0.05  # mm: write_stl's default chordal tolerance; every triangle lies within it of the true surface
# Relative tolerance of the kernel's volumes: the die layer asks its integration for 1e-7 (VOLUME_EPS); 1e-5 of
# the die's volume is about 8 mm³, against 393 mm³ for one dowel hole, so a miscounted dowel cannot pass.
VOLUME_REL = 1e-5
BOX_SLACK = 0.5  # mm: how much looser than the mesh's extents the kernel's bounding box may be (seen: 0.22 mm)


@pytest.fixture(scope="module")
def center_die(spec):
    from diegen import api
    from diegen.die.from_analysis import die_input
    from diegen.die.occ.form_block import build_die

    rib = api.analyse(spec)
    return build_die(die_input(rib, rib.pieces[1]))


@pytest.fixture(scope="module")
def die_mesh(center_die, tmp_path_factory):
    from diegen.die.occ.export import write_stl

    path = tmp_path_factory.mktemp("die") / "die.stl"
    write_stl(center_die, path)
    return trimesh.load(path)


def tile_meshes(tiles, folder: Path):
    from diegen.die.occ.export import write_stl

    meshes = []
    for tile in tiles:
        path = folder / f"tile{tile.index + 1}.stl"
        write_stl(tile.shape, path)
        meshes.append(trimesh.load(path))
    return meshes


def round_holes(mesh, x: float) -> list[tuple[float, float, float, float]]:
    """Each hole lying wholly inside the mesh's section by the plane at ``x``: its centre (y, z), its
    equivalent diameter sqrt(4A/π), and the least distance from that centre to the section's outer edge (mm)."""
    from shapely.geometry import MultiLineString, Polygon
    from shapely.ops import polygonize, unary_union

    segments = trimesh.intersections.mesh_plane(mesh, plane_normal=[1, 0, 0], plane_origin=[x, 0, 0])
    lines = MultiLineString([[(round(a[1], 6), round(a[2], 6)), (round(b[1], 6), round(b[2], 6))] for a, b in segments])
    holes = []
    for section in polygonize(unary_union(lines)):
        for ring in section.interiors:
            disc = Polygon(ring)
            centre = disc.centroid
            holes.append((centre.x, centre.y, math.sqrt(4 * disc.area / math.pi), section.exterior.distance(centre)))
    return holes


@pytest.mark.parametrize("bed", [(180.0, 160.0), (160.0, 180.0)], ids=["bed-x-long", "bed-y-long"])
def test_tiles_fit_the_bed_and_keep_the_volume(center_die, die_mesh, bed, tmp_path) -> None:
    from diegen.die.occ.tiles import tile_for_bed
    from diegen.die.occ.validate import volume_mm3

    tiles = tile_for_bed(center_die, bed)
    (x0, y0, z0), (x1, y1, z1) = die_mesh.bounds
    # The die's depth fits the bed's shorter side, so the tiles run along its longer side: the fewest tiles.
    assert y1 - y0 <= min(bed) - 2 * MARGIN
    length = max(bed) - 2 * MARGIN
    assert len(tiles) == math.ceil((x1 - x0) / length) == 3
    along_y = bed[1] > bed[0]
    assert all(t.along_bed_y == along_y for t in tiles)
    # equal tiles, end to end, covering the die; the ends come from the kernel's bounding box, which is not the
    # tightest box (OCCT's BRepBndLib enlarges it by tolerances and, on a meshed shape, by the mesh's deflection)
    assert x0 - BOX_SLACK <= tiles[0].x_min_mm <= x0 + STL_TOL
    assert x1 - STL_TOL <= tiles[-1].x_max_mm <= x1 + BOX_SLACK
    for a, b in itertools.pairwise(tiles):
        assert a.x_max_mm == b.x_min_mm
    assert np.ptp([t.x_max_mm - t.x_min_mm for t in tiles]) < 1e-6

    meshes = tile_meshes(tiles, tmp_path)
    long_side, short_side = (bed[1], bed[0]) if along_y else bed
    for tile, mesh in zip(tiles, meshes):
        assert mesh.is_watertight and mesh.is_winding_consistent and mesh.volume > 0
        (a0, b0, _), (a1, b1, _) = mesh.bounds
        assert a1 - a0 <= long_side - 2 * MARGIN + STL_TOL, tile.index
        assert b1 - b0 <= short_side - 2 * MARGIN + STL_TOL, tile.index
        assert a0 >= tile.x_min_mm - STL_TOL and a1 <= tile.x_max_mm + STL_TOL

    # dowel holes, seen in the sections 1 mm either side of each joint
    dowels = 0
    for left, right, tile in zip(meshes, meshes[1:], tiles):
        cut = tile.x_max_mm
        here = round_holes(left, cut - 1.0)
        there = round_holes(right, cut + 1.0)
        assert here and len(here) == len(there), cut
        for (ya, za, da, edge), (yb, zb, db, _) in zip(sorted(here), sorted(there)):
            assert (ya, za) == pytest.approx((yb, zb), abs=0.05)  # the two halves of one hole line up
            assert za == pytest.approx((z0 + z1) / 2, abs=BOX_SLACK)  # at mid-height (of the kernel's box)
            # a 24-sided polygon of a 5 mm circle (15° steps) has the area of a 4.97 mm one
            assert da == pytest.approx(DOWEL_D, abs=0.1) and db == pytest.approx(DOWEL_D, abs=0.1)
            assert edge - DOWEL_D / 2 >= MIN_WALL - STL_TOL  # material all round the dowel
        dowels += len(here)

    hole = math.pi * (DOWEL_D / 2) ** 2 * 2 * DOWEL_DEPTH
    die_volume = volume_mm3(center_die)
    assert sum(volume_mm3(t.shape) for t in tiles) == pytest.approx(die_volume - dowels * hole,
                                                                     abs=VOLUME_REL * die_volume)
    # Each mesh holds its solid's volume within its surface area × the chordal tolerance (every triangle lies
    # within the tolerance of the surface): a bound too loose to count dowels, which the kernel's volumes do above,
    # but it shows the written tiles are the tiles.
    for tile, mesh in zip(tiles, meshes):
        assert mesh.volume == pytest.approx(volume_mm3(tile.shape), abs=STL_TOL * mesh.area), tile.index
    assert die_mesh.volume == pytest.approx(die_volume, abs=STL_TOL * die_mesh.area)


def test_a_bed_longer_than_the_die_keeps_it_whole(center_die) -> None:
    import cadquery as cq

    from diegen.die.occ.tiles import tile_for_bed

    (tile,) = tile_for_bed(center_die, (500.0, 200.0))
    bb = cq.Shape.cast(center_die).BoundingBox()  # diegen hands out the kernel's shapes; CadQuery measures them
    assert tile.shape is center_die and (tile.x_min_mm, tile.x_max_mm) == (bb.xmin, bb.xmax)


def test_dowels_thicker_than_the_die_are_refused(center_die) -> None:
    from diegen.die.occ.tiles import tile_for_bed
    from diegen.errors import SolidError

    with pytest.raises(SolidError, match="too thin for 30 mm alignment dowels"):
        tile_for_bed(center_die, (180.0, 160.0), dowel_d_mm=30.0)
