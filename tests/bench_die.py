"""Benchmark of the die builder (not collected as a test): run ``python tests/bench_die.py``.

Prints, per piece (NACA 2412 nose piece, 1016 mm chord, 12.7 mm block,
2.2 mm top radius, 4.5° undercut; the outline of ``tests/test_solid.py``):

* the floor: a bare CadQuery extrude of the same outline (as a polyline) with
  the top edge filleted, exported to STEP and STL;
* the plain die (lofted body, no features) with the same exports, and the
  ratio to the floor (target ≤ 2.0×);
* the full die (pins, a bore, two flutes, engraving) with the same exports;
* an STL tolerance sweep (time, triangles, size, volume error);
* peak memory of the process (resource.getrusage).
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


def _timed(fn, repeat: int = REPEAT) -> tuple[float, float]:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), min(times)


def main() -> None:
    t0 = time.perf_counter()
    import cadquery as cq

    print(f"import cadquery: {time.perf_counter() - t0:.2f} s (once per process)")

    from test_solid import BORES, FLUTE_LENGTH, FLUTES, PINS, H, R, UNDERCUT, CUTTER, nose_outline

    from diegen.solid import DieInput, build_die
    from diegen.solid.export import STL_ANGULAR_TOLERANCE_DEG, STL_TOLERANCE_MM, write_step, write_stl
    from diegen.solid.validate import volume_mm3

    outline = nose_outline()
    plain = DieInput("BENCH-N1", outline, H, R, UNDERCUT, CUTTER)
    full = replace(plain, pins=PINS, bores=BORES, flutes=FLUTES, flute_length_mm=FLUTE_LENGTH,
                   engraving=("BENCH-N1", "NOSE 2412"))
    tol, ang = STL_TOLERANCE_MM, STL_ANGULAR_TOLERANCE_DEG
    out = Path(tempfile.mkdtemp(prefix="diegen-bench-"))
    poly = [p for r in outline for p in r.points[:-1]]
    print(f"outline: {len(poly)} vertices; STL tolerance {tol} mm, angular {ang}°; median of {REPEAT} runs")

    curve = outline[0].points
    keep = [curve[round(i * (len(curve) - 1) / 98)] for i in range(99)]
    poly100 = keep  # ~100 vertices, as in the design notes' floor measurement

    def floor_of(points):
        def run() -> None:
            wp = cq.Workplane("XY").polyline(points).close().extrude(-H).faces(">Z").edges().fillet(R)
            shape = wp.val()
            shape.exportStep(str(out / "floor.step"))
            shape.exportStl(str(out / "floor.stl"), tol, math.radians(ang), relative=False)
        return run

    floor = floor_of(poly)

    def die_run(die: DieInput, name: str):
        def run() -> None:
            solid = build_die(die)
            write_step(solid, out / f"{name}.step")
            write_stl(solid, out / f"{name}.stl", tol, ang)
        return run

    floor()  # warm up fonts, kernel caches
    die_run(full, "full")()
    f_med, f_min = _timed(floor)
    p_med, p_min = _timed(die_run(plain, "plain"))
    u_med, u_min = _timed(die_run(full, "full"))
    g_med, g_min = _timed(floor_of(poly100))
    print(f"floor  (extrude + fillet + STEP + STL), {len(poly)} vertices: median {f_med:.3f} s, min {f_min:.3f} s")
    print(f"floor  (same), {len(poly100)} vertices: median {g_med:.3f} s, min {g_min:.3f} s")
    print(f"plain die (loft + STEP + STL, checked): median {p_med:.3f} s, min {p_min:.3f} s, "
          f"ratio {p_med / f_med:.2f}× (target ≤ 2.0×)")
    print(f"plain die ratio to the {len(poly100)}-vertex floor: {p_med / g_med:.2f}×")
    print(f"full die (+ 2 pins, bore, 2 flutes, engraving): median {u_med:.3f} s, min {u_min:.3f} s, "
          f"ratio {u_med / f_med:.2f}× ({u_med / g_med:.2f}× the {len(poly100)}-vertex floor)")

    # stage breakdown of the full die
    solid = build_die(full)
    for label, fn in [
        ("  build plain body", lambda: build_die(plain)),
        ("  build full die", lambda: build_die(full)),
        ("  write_step (incl. re-read check)", lambda: write_step(solid, out / "s.step")),
        ("  write_stl (incl. watertight check)", lambda: write_stl(solid, out / "s.stl", tol, ang)),
    ]:
        med, _ = _timed(fn, 3)
        print(f"{label}: {med:.3f} s")

    print("STL sweep on the plain die (tolerance mm, angle °: time s, triangles, MB, volume error %):")
    body = build_die(plain)
    exact = volume_mm3(body)
    import numpy as np

    from diegen.solid.validate import read_stl_triangles

    for t, a in [(0.01, 5.0), (0.02, 10.0), (0.05, 10.0), (0.05, 15.0), (0.05, 30.0), (0.1, 15.0), (0.1, 30.0)]:
        path = out / f"sweep-{t}-{a}.stl"
        med, _ = _timed(lambda: write_stl(body, path, t, a), 3)
        tri = read_stl_triangles(path)
        v = tri.astype(float)
        vol = float((v[:, 0] * np.cross(v[:, 1], v[:, 2])).sum() / 6.0)
        print(f"  {t:5.2f}, {a:4.0f}: {med:6.3f} s, {len(tri):7d}, {path.stat().st_size / 1e6:6.2f}, "
              f"{100 * (vol - exact) / exact:+.4f}")
    demo_rib(out)
    peak_kb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(f"peak memory (max RSS): {peak_kb / 1024:.0f} MB")


def floor_seconds(points, height_mm: float, radius_mm: float, out: Path, repeat: int = REPEAT) -> float:
    """Median time of the floor: bare extrude of ``points`` + top fillet + STEP + STL (same STL settings)."""
    import cadquery as cq

    from diegen.solid.export import STL_ANGULAR_TOLERANCE_DEG, STL_TOLERANCE_MM

    def run() -> None:
        shape = cq.Workplane("XY").polyline(points).close().extrude(-height_mm).faces(">Z").edges().fillet(radius_mm).val()
        shape.exportStep(str(out / "floor.step"))
        shape.exportStl(str(out / "floor.stl"), STL_TOLERANCE_MM, math.radians(STL_ANGULAR_TOLERANCE_DEG), relative=False)

    run()
    return _timed(run, repeat)[0]


def demo_rib(out: Path) -> None:
    """Per piece of specs/demo-rib.yaml: full die (all features) + STEP + STL against the floor of the same outline."""
    from diegen import api
    from diegen.solid import build_die
    from diegen.solid.export import write_step, write_stl
    from diegen.solid.from_piece import die_input

    rib = api.analyse(api.load(Path(__file__).resolve().parents[1] / "specs" / "demo-rib.yaml"))
    print("demo rib (specs/demo-rib.yaml), full die with every feature + STEP + STL vs the floor:")
    for piece in rib.pieces:
        die = die_input(rib, piece)

        def run() -> None:
            solid = build_die(die)
            write_step(solid, out / "demo.step")
            write_stl(solid, out / "demo.stl", rib.spec.shared.die.stl_tolerance_mm)

        run()
        full = _timed(run, 3)[0]
        floor = floor_seconds(list(piece.piece.outline), die.height_mm, die.top_radius_mm, out, 3)
        print(f"  {piece.piece.part_id:10s} {len(piece.piece.outline):4d} vertices, {len(die.flutes)} flutes, "
              f"{len(die.bores)} bores, {len(die.pins)} pins: {full:.2f} s, floor {floor:.2f} s, "
              f"ratio {full / floor:.2f}x (target <= 2.0x)")


if __name__ == "__main__":
    main()
