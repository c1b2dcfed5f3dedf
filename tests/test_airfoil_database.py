"""Read every coordinate file bundled with aerosandbox (an open dataset of public airfoil files).

The aerosandbox PyPI package ships a folder of plain-text airfoil coordinate
files in both common layouts, with the title lines, notes and quirks real files
have.  Every file must either parse into a valid single closed loop or be
refused with an AirfoilError (never another exception); at least 98 % must
parse.  Counts and timing are printed, not asserted (run with -s to see them).
"""

from __future__ import annotations

import os
import time
from pathlib import Path

import numpy as np
import pytest
from testing import report

from diegen.errors import AirfoilError
from diegen.geometry.coordfile import read_coordinates
from diegen.geometry.loops import signed_area
from diegen.geometry.section import leading_edge_index, validate


def _database_folder() -> Path:
    asb = pytest.importorskip("aerosandbox")
    folder = Path(os.path.dirname(asb.__file__)) / "geometry" / "airfoil" / "airfoil_database"
    if not folder.is_dir():
        pytest.skip(f"aerosandbox airfoil database not found at {folder}")
    return folder


@pytest.mark.slow
def test_parse_every_bundled_airfoil_file() -> None:
    files = sorted(_database_folder().glob("*.dat"))
    assert len(files) > 1000  # aerosandbox 4.2 ships about 2,170
    parsed, refused = 0, []
    start = time.perf_counter()
    for path in files:
        try:
            loop = read_coordinates(path)
        except AirfoilError as exc:  # any other exception fails the test
            refused.append(str(exc))
            continue
        validate(loop, path.name)
        assert signed_area(loop) > 0.0
        assert tuple(loop[leading_edge_index(loop)]) == (0.0, 0.0)
        te = loop[0] if np.allclose(loop[0], (1.0, 0.0), atol=1e-9) else 0.5 * (loop[0] + loop[-1])
        assert te == pytest.approx((1.0, 0.0), abs=1e-9), path.name
        parsed += 1
    elapsed = time.perf_counter() - start
    share = parsed / len(files)
    report(
        f"\nairfoil database: {len(files)} files, {parsed} parsed ({100 * share:.2f} %), "
        f"{len(refused)} refused with AirfoilError; {elapsed:.2f} s ({1000 * elapsed / len(files):.2f} ms/file)"
    )
    for message in refused:
        report("  refused:", message)
    assert share >= 0.98
