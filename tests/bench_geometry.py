"""Benchmark of the 2D layers (no solid kernel): prints numbers, asserts nothing.

Run as ``.venv/bin/python tests/bench_geometry.py [--profile]``.  Each figure is
the median of 20 runs after one warm-up run (5 for the whole wing), as wall
time and as this process's CPU time (the CPU figure is the steadier one on a
busy machine).  Targets: the demo rib's geometry (three pieces) < 50 ms, its
full forming analysis < 100 ms, ``check`` of the whole demo wing < 1 s.
"""

from __future__ import annotations

import argparse
import cProfile
import pstats
import statistics
import sys
import time
from collections.abc import Callable
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from diegen import api, materials  # noqa: E402
from diegen.analysis import analyse_rib  # noqa: E402
from diegen.geometry.rib import rib_geometry  # noqa: E402

DEMO_RIB = ROOT / "specs" / "demo-rib.yaml"
DEMO_WING = ROOT / "specs" / "demo-wing.yaml"


def timed(fn: Callable[[], object], runs: int) -> tuple[float, float]:
    """Median wall and CPU time of ``fn`` in ms, after one warm-up call."""
    fn()
    wall, cpu = [], []
    for _ in range(runs):
        w0, c0 = time.perf_counter(), time.process_time()
        fn()
        wall.append(time.perf_counter() - w0)
        cpu.append(time.process_time() - c0)
    return 1000 * statistics.median(wall), 1000 * statistics.median(cpu)


def check_wing() -> str:
    """What ``diegen check specs/demo-wing.yaml`` does: load, analyse every rib, render the report."""
    return api.report_text(api.analyse(api.load(DEMO_WING)))


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--profile", action="store_true", help="also print a cProfile of each case")
    args = parser.parse_args(argv)
    spec = api.load(DEMO_RIB)
    limit = materials.sheet_alloy(spec.shared.sheet.alloy).stretch_limit
    cases: list[tuple[str, Callable[[], object], int, float]] = [
        ("demo rib geometry, 3 pieces", lambda: rib_geometry(spec, stretch_limit=limit), 20, 50.0),
        ("demo rib forming analysis", lambda: analyse_rib(spec), 20, 100.0),
        ("check of the demo wing (13 ribs)", check_wing, 5, 1000.0),
    ]
    print(f"{'case':36s} {'wall ms':>9s} {'cpu ms':>9s} {'target':>9s}")
    for name, fn, runs, target in cases:
        wall, cpu = timed(fn, runs)
        verdict = "ok" if cpu < target else "MISSED"
        print(f"{name:36s} {wall:9.1f} {cpu:9.1f} {target:9.0f}  {verdict}")
    if args.profile:
        for name, fn, _, _ in cases:
            print(f"\n--- profile: {name}")
            profiler = cProfile.Profile()
            profiler.runcall(fn)
            pstats.Stats(profiler).sort_stats("cumulative").print_stats(20)
    return 0


if __name__ == "__main__":
    sys.exit(main())
