"""Benchmark of whole-wing builds (prints numbers; not a test).

    .venv/bin/python tests/bench_wing.py [SPEC]

Prints: the cold full build time of the wing with --jobs 1 and --jobs 2 (wall and CPU time,
the CPU time summed over the build and its workers) and their ratio, with what bounds that ratio on
this machine (--jobs 1 already runs the kernel's parallel steps on several threads, so --jobs 2 cannot
beat its own CPU time shared among the cores), the peak resident memory of
each process of the --jobs 2 build (the main process and each worker; target ≤ 600 MB per worker),
the no-change rebuild time (files checked by size and modification time), the same after touching
every file (so every file is read and its SHA-256 compared with the manifest's), the check-only
time, and the ratio of the per-piece build time to the solid-kernel floor (a bare extrude of the
same outline + top fillet + STEP and STL export, measured in this run).

Peak memory is read from Linux's /proc (``VmHWM`` of each process, sampled every 20 ms while the
build runs, the last sample of each process kept): a worker's peak is its own, not the sum.
"""

from __future__ import annotations

import contextlib
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).resolve().parent))
DIEGEN = [sys.executable, "-m", "diegen.cli"]


RSS_TARGET_MB = 600
JOBS2_TARGET_S = 25.0
SPEEDUP_TARGET = 1.7


def timed(command: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(command, check=True, capture_output=True)
    return time.perf_counter() - start


def _children(pid: int) -> list[int]:
    found = []
    for task in Path(f"/proc/{pid}/task").glob("*"):
        with contextlib.suppress(OSError):
            found += [int(c) for c in (task / "children").read_text().split()]
    return found


def _peak_mb(pid: int) -> tuple[float, str] | None:
    """(VmHWM in MB, the command line) of a process, or None once it is gone."""
    try:
        status = Path(f"/proc/{pid}/status").read_text()
        command = Path(f"/proc/{pid}/cmdline").read_bytes().replace(b"\0", b" ").decode(errors="replace")
    except OSError:
        return None
    for line in status.splitlines():
        if line.startswith("VmHWM:"):
            return int(line.split()[1]) / 1024, command
    return None


def watched(command: list[str]) -> tuple[float, float, dict[int, tuple[float, str]]]:
    """Wall and CPU seconds (the command and its descendants) of one run, and each process's peak resident
    memory (MB) with its command line, sampled from /proc while it runs."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    process = subprocess.Popen(command, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    peaks: dict[int, tuple[float, str]] = {}
    while process.poll() is None:
        stack = [process.pid]
        while stack:
            pid = stack.pop()
            seen = _peak_mb(pid)
            if seen is not None:
                peaks[pid] = seen
            stack += _children(pid)
        time.sleep(0.02)
    wall = time.perf_counter() - start
    if process.returncode != 0:
        raise SystemExit(f"{' '.join(command)} failed: {process.stderr.read().decode() if process.stderr else ''}")
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime), peaks


def floor_seconds(spec_path: Path) -> float:
    """The kernel floor for the spec's first piece (see bench_die.floor_seconds)."""
    from bench_die import floor_seconds as floor_of

    from diegen import api

    analysis = api.analyse(api.load(spec_path))
    piece = (analysis.ribs[0] if hasattr(analysis, "ribs") else analysis).pieces[0]
    with tempfile.TemporaryDirectory() as tmp:
        return floor_of(list(piece.piece.die_outline), piece.die_height_mm, piece.springback.die_radius_mm, Path(tmp),
                        repeat=3)


def main() -> None:
    spec = Path(sys.argv[1]) if len(sys.argv) > 1 else ROOT / "specs" / "demo-wing.yaml"
    from testing import cache_bytecode

    cache_bytecode()
    from diegen import api

    pieces = sum(len(r.pieces) for r in api.analyse(api.load(spec)).ribs)
    with tempfile.TemporaryDirectory() as tmp:
        one, one_cpu, one_peaks = watched([*DIEGEN, "build", str(spec), "-o", f"{tmp}/j1", "-j", "1", "-q"])
        two, two_cpu, two_peaks = watched([*DIEGEN, "build", str(spec), "-o", f"{tmp}/j2", "-j", "2", "-q"])
        again = statistics.median(timed([*DIEGEN, "build", str(spec), "-o", f"{tmp}/j2", "-q"]) for _ in range(3))
        files = [p for p in Path(tmp, "j2").rglob("*-*.*") if p.is_file()]
        megabytes = sum(p.stat().st_size for p in files) / 1e6
        hashed = []
        for _ in range(3):
            for path in files:  # a new modification time, the same content: every file is read and hashed
                path.touch()
            hashed.append(timed([*DIEGEN, "build", str(spec), "-o", f"{tmp}/j2", "-q"]))
    check = statistics.median(timed([*DIEGEN, "check", str(spec)]) for _ in range(3))
    floor = floor_seconds(spec)
    per_piece = one / pieces
    print(f"spec: {spec.name}, {pieces} pieces")
    print(f"cold full build --jobs 1: {one:8.1f} s wall ({one_cpu:.1f} s CPU; {per_piece:.2f} s per piece); "
          f"peak memory {max(mb for mb, _ in one_peaks.values()):.0f} MB")
    verdict = "meets" if two <= JOBS2_TARGET_S and one / two >= SPEEDUP_TARGET else "misses"
    print(f"cold full build --jobs 2: {two:8.1f} s wall ({two_cpu:.1f} s CPU; speed-up {one / two:.2f}x)  "
          f"target ≤ {JOBS2_TARGET_S:.0f} s and ≥ {SPEEDUP_TARGET}x: {verdict}")
    cores = os.cpu_count() or 1
    print(f"  for reading the speed-up: --jobs 1 already keeps {one_cpu / one:.2f} cores busy (the kernel meshes and "
          f"checks each die on several threads), so on {cores} cores --jobs 2 can take no less than its CPU time / "
          f"{cores} = {two_cpu / cores:.1f} s: ceiling of the speed-up {one / (two_cpu / cores):.2f}x; the pool's "
          f"use of the cores {two_cpu / (cores * two):.0%}; --jobs 2 against --jobs 1's CPU time (the work as one "
          f"thread would do it) {one_cpu / two:.2f}x")
    main_pid = min(two_peaks)
    workers = {pid: mb for pid, (mb, command) in two_peaks.items() if "spawn_main" in command}
    print(f"  peak resident memory, main process: {two_peaks[main_pid][0]:6.0f} MB")
    for number, pid in enumerate(sorted(workers), 1):
        verdict = "meets" if workers[pid] <= RSS_TARGET_MB else "misses"
        print(f"  peak resident memory, worker {number}:     {workers[pid]:6.0f} MB  "
              f"target ≤ {RSS_TARGET_MB} MB: {verdict}")
    if not workers:
        print("  (no worker process seen)")
    print(f"no-change rebuild:        {again:8.2f} s  (target < 1 s; includes interpreter start-up)")
    print(f"  every file re-hashed:   {statistics.median(hashed):8.2f} s  ({len(files)} files, {megabytes:.0f} MB)")
    print(f"check only (whole wing):  {check:8.2f} s  (target < 1 s; includes interpreter start-up)")
    print(f"kernel floor per piece:   {floor:8.2f} s  → per-piece build / floor = {per_piece / floor:.2f}x")


if __name__ == "__main__":
    main()
