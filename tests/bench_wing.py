"""Benchmark of whole-wing builds (prints numbers; not a test).

    .venv/bin/python tests/bench_wing.py [SPEC]

Prints: the cold full build time of the wing with --jobs 1 and --jobs 2 and their
ratio, the no-change rebuild time (files checked by size and modification time),
the same after touching every file (so every file is read and its SHA-256
compared with the manifest's), the check-only time, and the ratio of the
per-piece build time to the solid-kernel floor (a bare extrude of the same
outline + top fillet + STEP and STL export, measured in this run).
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).resolve().parent))
DIEGEN = [sys.executable, "-m", "diegen.cli"]


def timed(command: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(command, check=True, capture_output=True)
    return time.perf_counter() - start


def floor_seconds(spec_path: Path) -> float:
    """The kernel floor for the spec's first piece (see bench_die.floor_seconds)."""
    from bench_die import floor_seconds as floor_of

    from diegen import api

    analysis = api.analyse(api.load(spec_path))
    piece = (analysis.ribs[0] if hasattr(analysis, "ribs") else analysis).pieces[0]
    with tempfile.TemporaryDirectory() as tmp:
        return floor_of(list(piece.piece.outline), piece.die_height_mm, piece.springback.die_radius_mm, Path(tmp),
                        repeat=3)


def main() -> None:
    spec = Path(sys.argv[1]) if len(sys.argv) > 1 else ROOT / "specs" / "demo-wing.yaml"
    from diegen import api

    pieces = sum(len(r.pieces) for r in api.analyse(api.load(spec)).ribs)
    with tempfile.TemporaryDirectory() as tmp:
        one = timed([*DIEGEN, "build", str(spec), "-o", f"{tmp}/j1", "-j", "1", "-q"])
        two = timed([*DIEGEN, "build", str(spec), "-o", f"{tmp}/j2", "-j", "2", "-q"])
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
    print(f"cold full build --jobs 1: {one:8.1f} s  ({per_piece:.2f} s per piece)")
    print(f"cold full build --jobs 2: {two:8.1f} s  (speed-up {one / two:.2f}x)")
    print(f"no-change rebuild:        {again:8.2f} s  (target < 1 s; includes interpreter start-up)")
    print(f"  every file re-hashed:   {statistics.median(hashed):8.2f} s  ({len(files)} files, {megabytes:.0f} MB)")
    print(f"check only (whole wing):  {check:8.2f} s  (target < 1 s; includes interpreter start-up)")
    print(f"kernel floor per piece:   {floor:8.2f} s  → per-piece build / floor = {per_piece / floor:.2f}x")


if __name__ == "__main__":
    main()
