"""The STL check every die file passes before it is kept (``diegen.die.occ.validate.stl_problems``).

References: the binary STL layout (80-byte header, triangle count, 50-byte records) as the format's originators
published it, and for the closed-mesh rule the definition of a 2-manifold closed surface (every edge shared by
exactly two triangles, walked in opposite directions by them); numpy's own ``unique`` over rows is the reference
for which points are the same.
"""

from __future__ import annotations

import numpy as np
import pytest

from diegen.die.occ.validate import _vertex_ids, stl_problems

CUBE = np.array([[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]], float)
# the twelve triangles of the unit cube, counter-clockwise seen from outside
FACES = [(0, 2, 1), (0, 3, 2), (4, 5, 6), (4, 6, 7), (0, 1, 5), (0, 5, 4), (1, 2, 6), (1, 6, 5), (2, 3, 7),
         (2, 7, 6), (3, 0, 4), (3, 4, 7)]


def write_stl(path, triangles: np.ndarray) -> None:
    record = np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("attr", "<u2")])
    rows = np.zeros(len(triangles), dtype=record)
    rows["v"] = triangles
    path.write_bytes(b"test".ljust(80, b" ") + np.uint32(len(rows)).tobytes() + rows.tobytes())


def cube(faces=FACES) -> np.ndarray:
    return np.array([[CUBE[i] for i in face] for face in faces], dtype=np.float32)


def test_closed_cube_is_good(tmp_path) -> None:
    write_stl(tmp_path / "c.stl", cube())
    assert stl_problems(tmp_path / "c.stl") == []


def test_a_missing_triangle_opens_the_mesh(tmp_path) -> None:
    write_stl(tmp_path / "c.stl", cube(FACES[:-1]))
    problems = stl_problems(tmp_path / "c.stl")
    assert len(problems) == 1 and "3 edges are not shared by exactly two triangles" in problems[0]


def test_a_flipped_triangle_is_inconsistent_winding(tmp_path) -> None:
    a, b, c = FACES[0]
    write_stl(tmp_path / "c.stl", cube([(a, c, b), *FACES[1:]]))
    assert any("inconsistent winding" in p for p in stl_problems(tmp_path / "c.stl"))


def test_negative_zero_is_the_same_point(tmp_path) -> None:
    triangles = cube()
    triangles[triangles == 0.0] = -0.0  # some corners written with a negative zero, their neighbours without
    triangles[::2][triangles[::2] == 0.0] = 0.0
    write_stl(tmp_path / "c.stl", triangles)
    assert stl_problems(tmp_path / "c.stl") == []


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_point_numbers_match_numpys_unique_rows(seed) -> None:
    rng = np.random.default_rng(seed)
    pool = rng.normal(size=(500, 3)).astype(np.float32)
    points = pool[rng.integers(0, len(pool), size=5000)]
    ids = _vertex_ids(points)
    _, reference = np.unique(points, axis=0, return_inverse=True)
    reference = reference.ravel()
    # the same partition: equal ids exactly where numpy's are equal, as many distinct ids
    assert len(np.unique(ids)) == len(np.unique(reference))
    pairs = np.unique(np.column_stack([ids, reference]), axis=0)
    assert len(pairs) == len(np.unique(ids))
