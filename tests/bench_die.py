"""Benchmark of the die builder (not collected as a test): run ``python tests/bench_die.py``.

Prints, measured in one run (medians of ``REPEAT`` runs):

* for each piece of ``specs/demo-rib.yaml``: the full die (flutes, bores, pins,
  engraving, checked) written to STEP and STL, the floor — a bare CadQuery
  extrude of the same outline (the geometry layer's polyline) with its top edge
  filleted to the die radius, written to STEP and STL with the same STL
  settings — and their ratio (target ≤ 2.0×), with a breakdown by stage;
* the same for the test outline of ``tests/test_solid.py`` (NACA 2412 nose
  piece, 1016 mm chord), plain and with every feature;
* an STL tolerance sweep on the plain test die (time, triangles, size, volume error);
* the peak memory of the process (resource.getrusage).
"""

from __future__ import annotations

import math
import resource
import statistics
import sys
import tempfile
import time
from dataclasses import replace
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

REPEAT = 5
TARGET = 2.0


def _timed(fn, repeat: int = REPEAT) -> float:
    """Median wall time of ``fn`` (s)."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def floor_run(points, height_mm: float, radius_mm: float, out: Path, tolerance_mm: float | None = None):
    """The floor as a callable: bare extrude of ``points`` + top fillet + STEP + STL (the die's STL settings)."""
    import cadquery as cq

    from diegen.die.occ.export import STL_ANGULAR_TOLERANCE_DEG, STL_TOLERANCE_MM

    tol = STL_TOLERANCE_MM if tolerance_mm is None else tolerance_mm

    def run() -> None:
        block = cq.Workplane("XY").polyline(points).close().extrude(-height_mm)
        shape = block.faces(">Z").edges().fillet(radius_mm).val()
        shape.exportStep(str(out / "floor.step"))
        shape.exportStl(str(out / "floor.stl"), tol, math.radians(STL_ANGULAR_TOLERANCE_DEG), relative=False)

    return run


def floor_seconds(points, height_mm: float, radius_mm: float, out: Path, tolerance_mm: float | None = None,
                  repeat: int = REPEAT) -> float:
    """Median time of the floor: bare extrude of ``points`` + top fillet + STEP + STL (the die's STL settings)."""
    run = floor_run(points, height_mm, radius_mm, out, tolerance_mm)
    run()
    return _timed(run, repeat)


def die_seconds(die, out: Path, tolerance_mm: float | None = None, repeat: int = REPEAT) -> float:
    """Median time of the full die: build (checked) + STEP + STL."""
    from diegen.die.occ.export import STL_TOLERANCE_MM, write_step, write_stl
    from diegen.die.occ.form_block import build_die

    def run() -> None:
        solid = build_die(die)
        write_step(solid, out / "die.step")
        write_stl(solid, out / "die.stl", STL_TOLERANCE_MM if tolerance_mm is None else tolerance_mm)

    run()
    return _timed(run, repeat)


def stages(die, out: Path, tolerance_mm: float) -> str:
    """Median time of each stage of one die, as text."""
    import cadquery as cq

    from diegen.die.model import outline_model
    from diegen.die.occ.export import write_step, write_stl
    from diegen.die.occ.form_block import build_body
    from diegen.die.occ.validate import solid_problems
    from diegen.die.placement import check_placement, engraving_marks
    from diegen.die.settings import DEFAULT_SETTINGS

    def layout():
        model = outline_model(die)
        check_placement(die, model, DEFAULT_SETTINGS)
        return model, engraving_marks(die, model, DEFAULT_SETTINGS)

    model, marks = layout()
    body = build_body(die, model, DEFAULT_SETTINGS, marks)
    parts = [
        ("2D layout", layout),
        ("sew the shell", lambda: build_body(die, model, DEFAULT_SETTINGS, marks)),
        ("kernel check", lambda: solid_problems(body)),
        ("STEP", lambda: write_step(body, out / "stage.step")),
        ("STL", lambda: write_stl(body, out / "stage.stl", tolerance_mm)),
    ]
    faces = len(cq.Shape.cast(body).Faces())
    return ", ".join(f"{name} {_timed(fn, 3):.3f}" for name, fn in parts) + f" s; {faces} faces"


def demo_rib(out: Path) -> None:
    """Per piece of specs/demo-rib.yaml: full die + STEP + STL against the floor of the same outline."""
    from diegen import api
    from diegen.die.from_analysis import die_input

    rib = api.analyse(api.load(Path(__file__).resolve().parents[1] / "specs" / "demo-rib.yaml"))
    tolerance = rib.spec.shared.die.stl_tolerance_mm
    print(f"demo rib (specs/demo-rib.yaml), full die + STEP + STL against the floor, STL tolerance {tolerance} mm:")
    for piece in rib.pieces:
        die = die_input(rib, piece)
        full = die_seconds(die, out, tolerance)
        floor = floor_seconds(list(piece.piece.die_outline), die.height_mm, die.top_radius_mm, out, tolerance)
        verdict = "meets" if full / floor <= TARGET else "misses"
        print(f"  {piece.piece.part_id:10s} {len(piece.piece.die_outline):4d} vertices, {len(die.flutes)} flutes, "
              f"{len(die.bores)} bores, {len(die.pins)} pins: die {full:.3f} s, floor {floor:.3f} s, "
              f"ratio {full / floor:.2f}x ({verdict} the {TARGET:.1f}x target)")
        print(f"    stages: {stages(die, out, tolerance)}")


def test_outline(out: Path) -> None:
    """The NACA 2412 nose piece of tests/test_solid.py, plain and with every feature."""
    from test_solid import BORES, CUTTER, FLUTE_LENGTH, FLUTES, PINS, UNDERCUT, H, R, nose_outline

    from diegen.die.die_input import DieInput

    outline = nose_outline()
    plain = DieInput("BENCH-N1", outline, H, R, UNDERCUT, CUTTER)
    full = replace(plain, pins=PINS, bores=BORES, flutes=FLUTES, flute_length_mm=FLUTE_LENGTH,
                   engraving=("BENCH-N1", "NOSE 2412"))
    points = [p for r in outline for p in r.points[:-1]]
    floor = floor_seconds(points, H, R, out)
    print(f"test outline (NACA 2412 nose, 1016 mm chord, {len(points)} vertices): floor {floor:.3f} s")
    for name, die in (("plain die", plain), ("full die (2 pins, bore, 2 flutes, engraving)", full)):
        t = die_seconds(die, out)
        print(f"  {name}: {t:.3f} s, ratio {t / floor:.2f}x")


def stl_sweep(out: Path) -> None:
    """STL tolerance against time, size and volume error on the plain test die."""
    import numpy as np
    from test_solid import CUTTER, UNDERCUT, H, R, nose_outline

    from diegen.die.die_input import DieInput
    from diegen.die.occ.export import write_stl
    from diegen.die.occ.form_block import build_die
    from diegen.die.occ.validate import read_stl_triangles, volume_mm3

    body = build_die(DieInput("BENCH-N1", nose_outline(), H, R, UNDERCUT, CUTTER))
    exact = volume_mm3(body)
    print("STL sweep on the plain test die (tolerance mm, angle °: time s, triangles, MB, volume error %):")
    for t, a in [(0.01, 5.0), (0.02, 10.0), (0.05, 10.0), (0.05, 15.0), (0.05, 30.0), (0.1, 15.0), (0.1, 30.0)]:
        path = out / f"sweep-{t}-{a}.stl"
        med = _timed(lambda path=path, t=t, a=a: write_stl(body, path, t, a), 3)
        v = read_stl_triangles(path).astype(float)
        vol = float((v[:, 0] * np.cross(v[:, 1], v[:, 2])).sum() / 6.0)
        print(f"  {t:5.2f}, {a:4.0f}: {med:6.3f} s, {len(v):7d}, {path.stat().st_size / 1e6:6.2f}, "
              f"{100 * (vol - exact) / exact:+.4f}")


def main() -> None:
    t0 = time.perf_counter()
    import cadquery  # noqa: F401

    print(f"import cadquery: {time.perf_counter() - t0:.2f} s (once per process); medians of {REPEAT} runs")
    out = Path(tempfile.mkdtemp(prefix="diegen-bench-"))
    demo_rib(out)
    test_outline(out)
    stl_sweep(out)
    peak_kb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(f"peak memory (max RSS): {peak_kb / 1024:.0f} MB")


if __name__ == "__main__":
    main()
