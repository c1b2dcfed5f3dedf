"""A compact fingerprint of a build's outputs, to prove that a change of code structure changes no output.

``snapshot(folder)`` reads a built spec folder (``<out>/<spec id>``) and returns, per part: the digest of its
report JSON (canonical form), of its shop sheet and SVG text, of each DXF's entities (type, layer and every
coordinate rounded to 1e-9 mm; handles and timestamps left out), and the volume of its STL die (mm³, by the
divergence theorem with numpy, independent of diegen).  PDFs, PNGs and STEP files carry dates or renderer
details, so they are compared through the numbers above instead.

Run as a script to (re)write the stored fingerprint of the demo rib and wing after an intended change:
``.venv/bin/python tests/snapshot.py OUT_FOLDER`` where OUT_FOLDER holds ``T1/`` and the wing's folder.
"""

from __future__ import annotations

import hashlib
import json
import sys
from pathlib import Path

import numpy as np

STORED = Path(__file__).resolve().parent / "data" / "golden" / "demo-outputs.json"
ROOT = Path(__file__).resolve().parents[1]


def _digest(text: str | bytes) -> str:
    return hashlib.sha256(text if isinstance(text, bytes) else text.encode()).hexdigest()[:20]


def _here_free(text: str) -> str:
    """``text`` with the checkout's own folder written as ``<root>``: reports name the spec file, and the
    fingerprint must not depend on where the project is checked out."""
    return text.replace(str(ROOT), "<root>")


def _report_digest(document: object) -> str:
    """Digest of a report document, with each finding's spec file named by its base name alone.

    The file is named as the spec was given (relative or absolute), so the fingerprint would otherwise depend on
    the folder the repository lies in and the folder the build ran from.
    """

    def plain(value: object) -> object:
        if isinstance(value, dict):
            return {k: Path(v).name if k == "file" and isinstance(v, str) else plain(v) for k, v in value.items()}
        if isinstance(value, list):
            return [plain(v) for v in value]
        return value

    return _digest(json.dumps(plain(document), sort_keys=True))


def _dxf_entities(path: Path) -> str:
    import ezdxf

    rows = []
    for entity in ezdxf.readfile(path).modelspace():
        values = []
        for name in ("start", "end", "center", "insert", "radius", "start_angle", "end_angle", "text", "height"):
            if entity.dxf.hasattr(name):
                value = entity.dxf.get(name)
                values.append(value if isinstance(value, str) else np.round(np.asarray(value, float), 9).tolist())
        if entity.dxftype() == "LWPOLYLINE":
            values.append(np.round(np.asarray(list(entity.get_points("xyb")), float), 9).tolist())
            values.append(bool(entity.closed))
        rows.append([entity.dxftype(), entity.dxf.layer, values])
    return _digest(json.dumps(rows))


def stl_volume_mm3(path: Path) -> float:
    """Enclosed volume of a binary or ASCII STL (mm³), by summing signed tetrahedra."""
    data = path.read_bytes()
    if data[:5] == b"solid" and b"facet" in data[:400]:
        numbers = [line.split()[1:] for line in data.decode().splitlines() if line.strip().startswith("vertex")]
        tri = np.asarray(numbers, float).reshape(-1, 3, 3)
    else:
        count = int(np.frombuffer(data[80:84], "<u4")[0])
        records = np.frombuffer(data[84 : 84 + 50 * count], dtype=np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)),
                                                                           ("a", "<u2")]))
        tri = records["v"].astype(float)
    return float(np.einsum("ij,ij->i", tri[:, 0], np.cross(tri[:, 1], tri[:, 2])).sum() / 6.0)


def snapshot(folder: Path) -> dict[str, dict[str, object]]:
    """Fingerprint of every part folder under ``folder`` (one built spec)."""
    parts: dict[str, dict[str, object]] = {}
    for part in sorted(p for p in folder.iterdir() if p.is_dir()):
        entry: dict[str, object] = {}
        for path in sorted(part.iterdir()):
            kind = path.name[len(part.name) + 1 :]
            if path.suffix == ".json":
                entry[kind] = _report_digest(json.loads(path.read_text()))
            elif path.suffix in (".md", ".svg"):
                entry[kind] = _digest(_here_free(path.read_text()))
            elif path.suffix == ".dxf":
                entry[kind] = _dxf_entities(path)
            elif path.suffix == ".stl":
                entry[kind] = round(stl_volume_mm3(path), 3)
        parts[part.name] = entry
    return parts


def check_digests() -> dict[str, str]:
    """Digest of ``check --json`` (the API's report document) for each demo spec."""
    from diegen import api

    specs = Path(__file__).resolve().parents[1] / "specs"
    return {name: _report_digest(api.report_json(api.analyse(api.load(specs / name))))
            for name in ("demo-rib.yaml", "demo-wing.yaml")}


def main(out: Path) -> None:
    data: dict[str, object] = {spec.name: snapshot(spec) for spec in sorted(out.iterdir()) if spec.is_dir()}
    data["check"] = check_digests()
    STORED.parent.mkdir(parents=True, exist_ok=True)
    STORED.write_text(json.dumps(data, indent=1, sort_keys=True) + "\n")
    print(f"wrote {STORED} ({sum(len(v) for v in data.values())} parts)")


if __name__ == "__main__":
    main(Path(sys.argv[1]))
