"""A built piece's die outputs as a builder hands them on: the die drawing beside the solids, a shop sheet that
follows the way the die is made, and the tiles of a printed die.

References outside the project: ezdxf (its auditor, ``ezdxf.math.area``), trimesh (the tiles' meshes: watertight,
their bounds), the ISO 10303-21 text of the STEP files.
"""

from __future__ import annotations

import itertools
import json
from pathlib import Path

import ezdxf
import pytest
from ezdxf.math import Vec2, area
from testing import DEMO_RIB, DEMO_WING

from diegen import api
from diegen.reports.sheet import shop_sheet

AREA_TOL = 0.01  # project limit: the drawing's top outline encloses the report's die area within 1 %
FIT_TOL_MM = 0.05  # project limit: a tile's mesh may stand proud of its box by the STL tolerance


def _demo_with_die(tmp_path: Path, die: str) -> Path:
    routed = "die: {material: solid-surface, stock_thickness: 0.5, cutter_diameter: 0.25}"
    text = DEMO_RIB.read_text()
    assert routed in text
    path = tmp_path / "rib.yaml"
    path.write_text(text.replace(routed, f"die: {die}"))
    return path


def _printed_spec(tmp_path: Path) -> Path:
    return _demo_with_die(tmp_path, "{material: pla, stock_thickness: 1, cutter_diameter: 0.25, print_bed: [220, 220]}")


def test_the_sheet_follows_the_way_the_die_is_made(tmp_path: Path) -> None:
    routed = api.analyse(api.load(DEMO_RIB))
    sheet = shop_sheet(routed, routed.pieces[0])
    assert "## 2. Router set-ups" in sheet and "`BOTTOM-OUTLINE`" in sheet and "`TOP-FLAT`" in sheet
    printed = api.analyse(api.load(_printed_spec(tmp_path)))
    sheet = shop_sheet(printed, printed.pieces[1])
    for absent in ("Router set-ups", "Stock to cut", "Laminate", "round-over bit"):
        assert absent not in sheet
    for present in ("## 1. Printing the die", "Print orientation: top face up", "| tile |", "Alignment dowels Ø5 mm",
                    "2 mm from its edges"):
        assert present in sheet
    aluminium = api.analyse(api.load(_demo_with_die(tmp_path, "{material: aluminium, stock_thickness: 1, "
                                                              "cutter_diameter: 0.25}")))
    sheet = shop_sheet(aluminium, aluminium.pieces[0])
    assert "## 2. Machining set-ups" in sheet and "corner-rounding end mill" in sheet and "Deburr" in sheet
    for router_tool in ("round-over bit", "tapered bit", "straight bit", "ball-nose bit", "Router set-ups"):
        assert router_tool not in sheet


def test_forming_steps_are_numbered_without_gaps() -> None:
    rib = api.analyse(api.load(DEMO_RIB))
    for piece in rib.pieces:
        sheet = shop_sheet(rib, piece)
        forming = sheet.split("Forming\n\n")[1].split("\n\n")[0].splitlines()
        assert [int(line.split(".")[0]) for line in forming] == list(range(1, len(forming) + 1))


def test_the_report_lists_a_printed_dies_tiles(tmp_path: Path) -> None:
    report = api.report_json(api.analyse(api.load(_printed_spec(tmp_path))))
    for part in report["parts"]:
        die = part["die"]
        assert die["making"] == "printed" and die["layers"] == 1
        usable = 220 - 2 * die["print"]["bed_margin_mm"]
        x0, x1 = part["x_range_mm"]
        spans = [t["x_range_mm"] for t in die["tiles"]]
        assert spans[0][0] <= x0 + 1.0 and spans[-1][1] >= x1 - 1.0  # the tiles cover the piece
        assert all(a[1] == b[0] for a, b in itertools.pairwise(spans))  # and meet at the joints
        for tile in die["tiles"]:
            length, width, _ = tile["size_mm"]
            assert length <= usable + 1e-9 and width <= usable + 1e-9
        assert [round(x, 3) for x in die["print"]["joints_x_mm"]] == [s[1] for s in spans[:-1]]
    routed = api.report_json(api.analyse(api.load(DEMO_RIB)))
    assert all(p["die"]["making"] == "routed" and p["die"]["tiles"] == [] for p in routed["parts"])


def test_the_wing_report_names_each_ribs_blend() -> None:
    report = api.report_json(api.analyse(api.load(DEMO_WING)))
    tip = [p for p in report["parts"] if p["rib"].endswith("-R13")]
    assert tip and all(p["airfoil"] == "NACA 23012" for p in tip)
    mid = [p for p in report["parts"] if p["rib"].endswith("-R07")]
    assert mid and all(p["airfoil"] == "50 % NACA 23015 + 50 % NACA 23012" for p in mid)  # 6/12 of the span


@pytest.mark.slow
@pytest.mark.solid
def test_printed_demo_rib_builds_tiles_drawing_and_sheet(tmp_path: Path) -> None:
    trimesh = pytest.importorskip("trimesh")
    spec = api.load(_printed_spec(tmp_path))
    result = api.build(spec, tmp_path / "out", jobs=2)
    assert not result.failed, [o.error for o in result.failed]
    for outcome in result.outcomes:
        folder = tmp_path / "out" / spec.id / outcome.part_id
        report = json.loads((folder / f"{outcome.part_id}-report.json").read_text())
        sheet = (folder / f"{outcome.part_id}-sheet.md").read_text()
        assert "Router set-ups" not in sheet and "Printing the die" in sheet
        doc = ezdxf.readfile(folder / f"{outcome.part_id}-die.dxf")
        assert not doc.audit().has_errors
        (top,) = [e for e in doc.modelspace().query('LWPOLYLINE[layer=="TOP-OUTLINE"]') if e.closed]
        assert area([Vec2(p) for p in top.get_points("xy")]) == pytest.approx(report["die"]["area_mm2"], rel=AREA_TOL)
        step = (folder / f"{outcome.part_id}-die.step").read_text()
        assert f"PRODUCT('{outcome.part_id}'" in step
        tiles = report["die"]["tiles"]
        for tile in tiles:
            assert all((folder / name).is_file() for name in tile["files"])
            mesh = trimesh.load(folder / tile["files"][1])
            assert mesh.is_watertight
            (mx0, my0, _), (mx1, my1, _) = mesh.bounds
            (x0, x1), (y0, y1) = tile["x_range_mm"], tile["y_range_mm"]
            assert x0 - FIT_TOL_MM <= mx0 and mx1 <= x1 + FIT_TOL_MM
            assert y0 - FIT_TOL_MM <= my0 and my1 <= y1 + FIT_TOL_MM
        if len(tiles) > 1:
            assert f"PRODUCT('{outcome.part_id}-tile1'" in (folder / tiles[0]["files"][0]).read_text()
            assert "no joint cuts a letter" in sheet
