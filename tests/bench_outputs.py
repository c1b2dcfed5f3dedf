"""Benchmark of the per-piece outputs and the whole-rib build (prints numbers; not a test).

    .venv/bin/python tests/bench_outputs.py [--repeat N]

Prints, all measured in this one run, as wall time and CPU time (the CPU figure is the steadier one on a busy
machine; every command here is single-threaded, so on an idle machine the two agree):

* for each piece of ``specs/demo-rib.yaml``, the median time of each writer — the 1:1 blank PDF, the preview PNG
  of a build, the geometry PNG of ``check --plot``, the DXF, the SVG, the report JSON and the shop sheet — and, for
  the two PNGs, the first call in this process, which also imports the plotting library and sets up the figure;
* the full build of the demo rib (``diegen build -j 1`` in a new process, so interpreter start and the kernel
  import included) against the kernel's own share — the import of the kernel in a new process
  (``python -c "import cadquery"``, start and exit included) plus the floor of each piece (a bare extrude of its
  outline, top fillet, STEP and STL, as in ``bench_die.py``) — as a ratio; target ≤ 1.25×;
* the same build against the import of OCP alone (``python -c "import OCP"``) + the floor, for reading: diegen
  makes its dies with OCP's classes and never imports CadQuery, whose import (the kernel import above) also loads
  a visualisation toolkit, so a build may take less than that import + floor;
* per piece, everything a build does after the imports — the die built and checked, every file of the piece
  written and checked (``write_piece`` with the kernel's die writer, in this process, warm) — against that
  piece's floor; target ≤ 2.0×;
* ``diegen check --plot`` of the demo rib in a new process; target ≤ 1.5 s;
* for reading the gap: a bare interpreter start and ``diegen check`` of the demo rib (start, spec, analysis).

The commands in new processes are run in turn, round after round, so that load from elsewhere falls on all of
them alike; each figure is the median of the rounds.
"""

from __future__ import annotations

import argparse
import json
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(ROOT))

DEMO_RIB = ROOT / "specs" / "demo-rib.yaml"
BUILD_RATIO_TARGET = 1.25
PIECE_RATIO_TARGET = 2.0
CHECK_PLOT_TARGET_S = 1.5


def timed(fn: Callable[[], object], repeat: int) -> tuple[float, float]:
    """Median wall and CPU seconds of ``fn`` over ``repeat`` calls (no warm-up: call it once before if needed)."""
    wall, cpu = [], []
    for _ in range(repeat):
        w0, c0 = time.perf_counter(), time.process_time()
        fn()
        wall.append(time.perf_counter() - w0)
        cpu.append(time.process_time() - c0)
    return statistics.median(wall), statistics.median(cpu)


def once(fn: Callable[[], object]) -> tuple[float, float]:
    return timed(fn, 1)


def child(command: list[str]) -> tuple[float, float]:
    """Wall and CPU seconds (user + system) of one command run to the end in a new process."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    subprocess.run(command, check=True, capture_output=True, cwd=ROOT)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def ms(pair: tuple[float, float]) -> str:
    return f"{1000 * pair[0]:7.1f} ({1000 * pair[1]:6.1f})"


def writers(repeat: int, out: Path) -> None:
    """Per piece and writer: median wall (CPU) ms; the PNG writers' first call in this process beside them."""
    from diegen import api
    from diegen.export.dxf import write_dxf
    from diegen.export.pdf import write_pdf
    from diegen.export.plot import piece_plot, preview_plot
    from diegen.export.svg import write_svg
    from diegen.fileio import write_text
    from diegen.reports.document import piece_json
    from diegen.reports.sheet import shop_sheet

    rib = api.analyse(api.load(DEMO_RIB))
    paper = "letter" if rib.spec.units == "in" else "a4"
    first = {
        "png preview (build)": once(lambda: preview_plot(rib, rib.pieces[0], out / "first-preview.png")),
        "png geometry (check --plot)": once(lambda: piece_plot(rib, rib.pieces[0], out / "first-geometry.png")),
    }
    cases: dict[str, Callable[[object], object]] = {
        "pdf 1:1 blank": lambda p: write_pdf(p.blank, out / "blank.pdf", paper=paper),
        "png preview (build)": lambda p: preview_plot(rib, p, out / "preview.png"),
        "png geometry (check --plot)": lambda p: piece_plot(rib, p, out / "geometry.png"),
        "dxf": lambda p: write_dxf(p.blank, out / "blank.dxf"),
        "svg": lambda p: write_svg(p.blank, out / "blank.svg"),
        "report json": lambda p: write_text(out / "report.json", json.dumps(piece_json(rib, p), indent=2)),
        "shop sheet": lambda p: write_text(out / "sheet.md", shop_sheet(rib, p)),
    }
    names = [p.piece.part_id for p in rib.pieces]
    print(f"writers, per demo-rib piece: median of {repeat} calls after one, wall ms (CPU ms)")
    print(f"  {'writer':28s}" + "".join(f"{n:>18s}" for n in names) + f"{'first call':>18s}")
    for name, fn in cases.items():
        cells = []
        for piece in rib.pieces:
            fn(piece)
            cells.append(ms(timed(lambda fn=fn, piece=piece: fn(piece), repeat)))
        extra = ms(first[name]) if name in first else ""
        print(f"  {name:28s}" + "".join(f"{c:>18s}" for c in cells) + f"{extra:>18s}")


def kernel_floor(repeat: int, out: Path) -> tuple[float, float]:
    """Sum over the demo rib's pieces of the floor's median wall and CPU seconds (kernel already imported); prints
    each piece's whole output (die and every file, warm) against its floor."""
    from bench_die import floor_run

    from diegen import api
    from diegen.die.from_analysis import die_input
    from diegen.die.occ.files import write_die_files
    from diegen.fileio import confined_to
    from diegen.pipeline.outputs import write_piece

    rib = api.analyse(api.load(DEMO_RIB))
    tolerance = rib.spec.shared.die.stl_tolerance_mm
    wall = cpu = 0.0
    print(f"per piece, after the imports: every file of the piece (die built, checked, written) against its floor; "
          f"medians of {repeat}, wall (CPU) s")
    for piece in rib.pieces:
        die = die_input(rib, piece)
        run = floor_run(list(piece.piece.die_outline), die.height_mm, die.top_radius_mm, out, tolerance)
        run()
        w, c = timed(run, repeat)
        wall, cpu = wall + w, cpu + c
        folder = out / "pieces" / piece.piece.part_id
        with confined_to(str(out)):
            write_piece(rib, piece, folder, write_die_files)
            all_files = timed(lambda piece=piece, folder=folder: write_piece(rib, piece, folder, write_die_files,
                                                                              claimed=True), repeat)
        ratio = all_files[0] / w
        verdict = "meets" if ratio <= PIECE_RATIO_TARGET else "misses"
        print(f"  {piece.piece.part_id:12s} all files {all_files[0]:5.2f} ({all_files[1]:5.2f}), floor {w:5.2f} "
              f"({c:5.2f}): {ratio:4.2f}x wall ({all_files[1] / c:4.2f}x CPU)  target ≤ {PIECE_RATIO_TARGET:.1f}x: "
              f"{verdict}")
    return wall, cpu


def commands(repeat: int, out: Path) -> dict[str, tuple[float, float]]:
    """Median wall and CPU seconds of each command in a new process, run in turn, ``repeat`` rounds."""
    py = sys.executable
    runs = {
        "python start": [py, "-c", "pass"],
        "kernel import": [py, "-c", "import cadquery"],
        "OCP import": [py, "-c", "import OCP"],
        "diegen check": [py, "-m", "diegen.cli", "check", str(DEMO_RIB)],
        "diegen check --plot": [py, "-m", "diegen.cli", "check", "--plot", str(DEMO_RIB), "-o", str(out / "plots")],
        "diegen build -j 1": [py, "-m", "diegen.cli", "build", str(DEMO_RIB), "-o", str(out / "build"), "--force",
                              "-j", "1", "-q"],
    }
    results: dict[str, list[tuple[float, float]]] = {name: [] for name in runs}
    for command in runs.values():  # one round not counted: file caches warm for every command alike
        child(command)
    for _ in range(repeat):
        for name, command in runs.items():
            results[name].append(child(command))
    return {name: (statistics.median(w for w, _ in r), statistics.median(c for _, c in r))
            for name, r in results.items()}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=7, help="calls per writer and rounds of commands (default 7)")
    args = parser.parse_args()
    out = Path(tempfile.mkdtemp(prefix="diegen-bench-outputs-"))
    from testing import cache_bytecode

    cache_bytecode()

    writers(args.repeat, out)
    runs = commands(args.repeat, out)
    import cadquery  # noqa: F401  (the floor below runs in this process)

    from diegen.die.occ.form_block import warm_up

    warm_up()

    floor = kernel_floor(args.repeat, out)

    def line(label: str, pair: tuple[float, float], note: str = "") -> None:
        print(f"  {label:58s} {pair[0]:6.2f} s wall ({pair[1]:5.2f} s CPU){note}")

    print(f"whole runs in new processes: medians of {args.repeat} rounds")
    line("python start (python -c pass)", runs["python start"])
    line("diegen check of the demo rib (start, spec, analysis)", runs["diegen check"])
    check_plot = runs["diegen check --plot"]
    verdict = "meets" if check_plot[0] <= CHECK_PLOT_TARGET_S else "misses"
    line("diegen check --plot of the demo rib", check_plot,
         f"  target ≤ {CHECK_PLOT_TARGET_S:.1f} s wall: {verdict}")
    build, kernel = runs["diegen build -j 1"], runs["kernel import"]
    line("diegen build -j 1 of the demo rib (3 pieces)", build)
    line("kernel import (python -c 'import cadquery')", kernel)
    line("kernel floor of the 3 pieces (extrude, fillet, STEP, STL)", floor)
    share = (kernel[0] + floor[0], kernel[1] + floor[1])
    line("kernel import + floor", share)
    ratio = (build[0] / share[0], build[1] / share[1])
    verdict = "meets" if ratio[0] <= BUILD_RATIO_TARGET else "misses"
    print(f"  {'full rib build / (kernel import + floor)':58s} {ratio[0]:6.2f} x wall ({ratio[1]:5.2f} x CPU)"
          f"  target ≤ {BUILD_RATIO_TARGET:.2f}x wall: {verdict}")
    print(f"  {'build time beyond the kernel import + floor':58s} {build[0] - share[0]:6.2f} s wall "
          f"({build[1] - share[1]:5.2f} s CPU)")
    ocp = runs["OCP import"]
    line("OCP import alone (python -c 'import OCP')", ocp)
    bare = (ocp[0] + floor[0], ocp[1] + floor[1])
    print(f"  {'full rib build / (OCP import + floor), for reading':58s} {build[0] / bare[0]:6.2f} x wall "
          f"({build[1] / bare[1]:5.2f} x CPU)")


if __name__ == "__main__":
    main()
