"""Interrupted builds lose nothing: kill a wing build part-way (SIGINT and SIGKILL), check every file, rebuild.

After the kill every file at its final name is complete and valid (written
atomically: temporary, validate, rename), the manifest is consistent with the
files, and the next build finishes only what is missing.
"""

from __future__ import annotations

import json
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

SPEC = """\
diegen: 1
kind: wing
id: K
units: mm
planform: {root_chord: 700, tip_chord: 600, span: 800, stations: {count: 4}}
airfoil: naca 2412
spars:
  - {at: 0.3, web: 1.6, cap_thickness: 1.6, cap_width: 16}
skin_thickness: 0.6
sheet: {alloy: 6061-T6, thickness: 0.8}
flange: {height: 10, bend_radius: 2.5}
pieces: [nose]
lightening_holes: none
relief: flutes
die: {material: hdpe, stock_thickness: 19, cutter_diameter: 6}
press: {force: 20 ton, box: [300, 250], rubber: {durometer: 55, thickness: 50}}
"""


def _run(spec: Path, out: Path) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-m", "diegen.cli", "build", str(spec), "-o", str(out), "-j", "1", "-q"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def _built(manifest: Path) -> list[str]:
    try:
        data = json.loads(manifest.read_text())
    except (OSError, ValueError):
        return []
    return [p for p, e in data.get("pieces", {}).items() if e.get("status") == "built"]


def _check_file(path: Path) -> None:
    suffix = path.suffix
    if suffix == ".step":
        from diegen.die.occ.validate import check_step_file

        check_step_file(path)  # OCP BRepCheck_Analyzer: valid, one closed solid
    elif suffix == ".stl":
        import trimesh

        mesh = trimesh.load(path)
        assert mesh.is_watertight and mesh.is_winding_consistent, path
    elif suffix == ".json":
        json.loads(path.read_text())
    elif suffix == ".pdf":
        data = path.read_bytes()
        assert data.startswith(b"%PDF") and b"%%EOF" in data[-64:], path
    elif suffix == ".dxf":
        import ezdxf

        assert not ezdxf.readfile(path).audit().has_errors, path
    elif suffix == ".png":
        assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n", path


def _interrupt_and_check(tmp_path: Path, sig: int) -> None:
    spec = tmp_path / "k.yaml"
    spec.write_text(SPEC)
    out = tmp_path / "out"
    manifest = out / "K" / "manifest.json"
    process = _run(spec, out)
    deadline = time.monotonic() + 240
    while not _built(manifest) and process.poll() is None and time.monotonic() < deadline:
        time.sleep(0.2)
    time.sleep(0.5)  # land somewhere inside the next piece
    process.send_signal(sig)
    _, stderr = process.communicate(timeout=120)
    assert "Traceback" not in stderr
    if sig == signal.SIGINT and process.returncode != 0:
        assert process.returncode == 130, stderr
    finished = set(_built(manifest))
    assert finished, "the build was stopped before any piece finished"
    for path in (out / "K").rglob("*"):
        if path.is_file() and not path.name.startswith("."):
            _check_file(path)
    data = json.loads(manifest.read_text())
    for part in finished:
        for name in data["pieces"][part]["files"]:
            assert (out / "K" / part / name).is_file()
    rerun = subprocess.run([sys.executable, "-m", "diegen.cli", "build", str(spec), "-o", str(out), "-j", "1", "-q"],
                           capture_output=True, text=True, timeout=600, check=False)
    assert rerun.returncode == 0, rerun.stderr
    rebuilt = {line.split()[1] for line in rerun.stdout.splitlines() if line.strip().startswith("built")}
    assert rebuilt == {f"K-R{n:02d}-nose" for n in range(1, 5)} - finished
    assert not list((out / "K").rglob(".*.part*")), "temporaries left after the rebuild"


@pytest.mark.slow
@pytest.mark.solid
@pytest.mark.parametrize("sig", [signal.SIGINT, signal.SIGKILL], ids=["SIGINT", "SIGKILL"])
def test_killed_build_loses_nothing(tmp_path, sig):
    _interrupt_and_check(tmp_path, sig)
