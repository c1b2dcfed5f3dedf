"""Round trip of a real build: the die's dowel holes and the blank's DRILL circles coincide.

The STEP file is read back with OCP (STEPControl_Reader); each cylindrical face
of the dowel radius gives a hole axis.  The blank DXF is read back with ezdxf.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest

from diegen import api

ROOT = Path(__file__).resolve().parents[1]
TOL_MM = 0.01


def _pin_axes(step_path: Path, radius_mm: float) -> list[tuple[float, float]]:
    from OCP.BRepAdaptor import BRepAdaptor_Surface
    from OCP.GeomAbs import GeomAbs_Cylinder
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    from diegen.die.occ.validate import read_step

    shape = read_step(step_path)
    axes = []
    explorer = TopExp_Explorer(shape, TopAbs_FACE)
    while explorer.More():
        surface = BRepAdaptor_Surface(TopoDS.Face_s(explorer.Current()))
        if surface.GetType() == GeomAbs_Cylinder:
            cylinder = surface.Cylinder()
            if abs(cylinder.Radius() - radius_mm) < 0.05:
                location = cylinder.Axis().Location()
                axes.append((location.X(), location.Y()))
        explorer.Next()
    return axes


@pytest.mark.slow
@pytest.mark.solid
def test_pins_in_die_and_blank_coincide(tmp_path):
    from diegen.die.from_analysis import PIN_INTERFERENCE_MM
    from diegen.export.dxf import read_dxf_outline

    spec = api.load(ROOT / "specs" / "demo-rib.yaml")
    spec = replace(spec, shared=replace(spec.shared, pieces=("nose",)))
    result = api.build(spec, tmp_path, jobs=1)
    assert not result.failed, result.summary()
    folder = tmp_path / "T1" / "T1-nose"
    drawing = read_dxf_outline(folder / "T1-nose-blank.dxf")
    blank_pins = sorted((c.x, c.y) for c in drawing.drill_circles)
    dowel = spec.shared.pins.diameter_mm
    die_pins = sorted(_pin_axes(folder / "T1-nose-die.step", (dowel - PIN_INTERFERENCE_MM) / 2))
    assert len(blank_pins) >= 2 and len(die_pins) == len(blank_pins)
    for (xb, yb), (xd, yd) in zip(blank_pins, die_pins):
        assert abs(xb - xd) < TOL_MM and abs(yb - yd) < TOL_MM
