"""Validity checks of die solids and their exported files.

A solid counts as good only if OCCT's ``BRepCheck_Analyzer`` finds it valid,
it is exactly one solid, every shell is closed and its volume is positive.
An STL counts as good only if every edge is shared by exactly two triangles
running in opposite directions (watertight, consistently wound).
"""

from __future__ import annotations

import os
from typing import Any

import numpy as np

from diegen.die.occ.shapes import quiet_kernel, raw
from diegen.die.occ.threads import parallel_ok
from diegen.die.settings import VOLUME_EPS
from diegen.errors import SolidError

__all__ = [
    "check_solid",
    "check_step_file",
    "check_stl_file",
    "quick_volume_mm3",
    "read_step",
    "read_stl_triangles",
    "solid_problems",
    "step_file_problems",
    "stl_problems",
    "volume_mm3",
]


def volume_mm3(shape: Any) -> float:
    """Volume of a kernel shape (mm³), by adaptive integration (see ``VOLUME_EPS``)."""
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(_wrapped(shape), props, VOLUME_EPS)
    return float(props.Mass())


def quick_volume_mm3(shape: Any) -> float:
    """Volume by OCCT's default Gauss rule (mm³): fast, repeatable, but up to a few per cent off on lofts.

    Good for signs and for comparing a shape with its own STEP round trip, not as a measurement.
    """
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(_wrapped(shape), props)
    return float(props.Mass())


def _wrapped(shape: Any) -> Any:
    return raw(shape)


def solid_problems(shape: Any) -> list[str]:
    """Everything wrong with ``shape`` as a die solid; an empty list when it is good."""
    from OCP.BRep import BRep_Tool
    from OCP.BRepCheck import BRepCheck_Analyzer
    from OCP.TopAbs import TopAbs_SHELL, TopAbs_SOLID
    from OCP.TopExp import TopExp_Explorer

    raw = _wrapped(shape)
    problems = []
    if raw is None or raw.IsNull():
        return ["the kernel returned no shape"]
    if not BRepCheck_Analyzer(raw, True, parallel_ok()).IsValid():  # geometric controls on, parallel where safe
        problems.append("the kernel's shape check (BRepCheck_Analyzer) finds it invalid")
    solids = 0
    exp = TopExp_Explorer(raw, TopAbs_SOLID)
    while exp.More():
        solids += 1
        exp.Next()
    if solids != 1:
        problems.append(f"it has {solids} solids, not exactly one")
    exp = TopExp_Explorer(raw, TopAbs_SHELL)
    while exp.More():
        if not BRep_Tool.IsClosed_s(exp.Current()):
            problems.append("a shell is open (not watertight)")
            break
        exp.Next()
    if not problems and quick_volume_mm3(raw) <= 0.0:
        problems.append("its volume is not positive")
    return problems


def check_solid(shape: Any, what: str, hint: str = "") -> None:
    """Raise :class:`SolidError` naming ``what`` and ``hint`` unless ``shape`` is one valid closed solid."""
    problems = solid_problems(shape)
    if problems:
        tail = f" {hint}" if hint else ""
        raise SolidError(f"{what}: {'; '.join(problems)}.{tail}")


def read_step(path: str | os.PathLike[str]) -> Any:
    """Read a STEP file into one OCP shape; raise :class:`SolidError` if it cannot be read."""
    from OCP.IFSelect import IFSelect_RetDone
    from OCP.STEPControl import STEPControl_Reader

    quiet_kernel()
    reader = STEPControl_Reader()
    if reader.ReadFile(os.fspath(path)) != IFSelect_RetDone:
        raise SolidError(f"STEP file {os.fspath(path)!r} cannot be read back")
    reader.TransferRoots()
    return reader.OneShape()


def check_step_file(path: str | os.PathLike[str], expected_volume_mm3: float | None = None,
                    rel_tol: float = 1e-6) -> None:
    """Re-read a STEP file and check it holds one valid closed solid.

    ``expected_volume_mm3``, if given, is compared with the file's
    :func:`quick_volume_mm3` (so pass the original's quick volume).
    """
    shape = read_step(path)
    check_solid(shape, f"STEP file {os.fspath(path)!r} read back")
    if expected_volume_mm3 is not None:
        vol = quick_volume_mm3(shape)
        if abs(vol - expected_volume_mm3) > rel_tol * abs(expected_volume_mm3):
            raise SolidError(
                f"STEP file {os.fspath(path)!r} read back with volume {vol:.1f} mm³, "
                f"expected {expected_volume_mm3:.1f} mm³"
            )


def read_stl_triangles(path: str | os.PathLike[str]) -> np.ndarray:
    """Triangles of an STL file (binary or ASCII) as an (n, 3, 3) float32 array (file units)."""
    with open(path, "rb") as file:
        data = file.read()
    if len(data) >= 84:
        count = int.from_bytes(data[80:84], "little")
        if len(data) == 84 + 50 * count:
            rec = np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("attr", "<u2")])
            return np.frombuffer(data, dtype=rec, offset=84, count=count)["v"].copy()
    words = data.decode("ascii", errors="replace").split()
    coords = [tuple(float(v) for v in words[i + 1:i + 4]) for i, w in enumerate(words) if w == "vertex"]
    return np.asarray(coords, dtype=np.float32).reshape(-1, 3, 3)


def step_file_problems(path: str | os.PathLike[str]) -> list[str]:
    """What is structurally wrong with a STEP file written for one die; an empty list when it looks whole.

    Checks the ISO 10303-21 frame (header to end marker) and that the data
    holds exactly one solid bounded by one closed shell.  It does not re-read
    the geometry (see :func:`check_step_file` for that).
    """
    with open(path, "rb") as f:
        text = f.read()
    problems = []
    if not text.lstrip().startswith(b"ISO-10303-21;"):
        problems.append("it does not start with the ISO-10303-21 header")
    if not text.rstrip().endswith(b"END-ISO-10303-21;"):
        problems.append("it does not end with END-ISO-10303-21 (cut short)")
    for entity in (b"MANIFOLD_SOLID_BREP(", b"CLOSED_SHELL("):
        count = text.count(entity)
        if count != 1:
            problems.append(f"it holds {count} {entity[:-1].decode().lower()} entities, not one")
    return problems


def _vertex_ids(points: np.ndarray) -> np.ndarray:
    """One number per distinct point of ``points`` (n, 3) float32, equal where the coordinates are equal bit for
    bit after turning −0 into +0: the points sorted on their bits (as two 64-bit keys, which sort some twice as
    fast as 12-byte records) and numbered at each change."""
    bits = np.ascontiguousarray(points + np.float32(0.0)).view(np.uint32).astype(np.uint64)
    high, low = (bits[:, 0] << np.uint64(32)) | bits[:, 1], bits[:, 2]
    order = np.lexsort((low, high))
    high, low = high[order], low[order]
    new = np.ones(len(order), dtype=bool)
    new[1:] = (high[1:] != high[:-1]) | (low[1:] != low[:-1])
    ids = np.empty(len(order), dtype=np.int64)
    ids[order] = np.cumsum(new) - 1
    return ids


def stl_problems(path: str | os.PathLike[str]) -> list[str]:
    """Everything wrong with an STL as a printable closed mesh; an empty list when it is good.

    Vertices are the same point when their coordinates are equal (compared bit
    for bit after turning −0 into +0: the writer prints a shared vertex identically).
    """
    tri = read_stl_triangles(path)
    if len(tri) == 0:
        return ["it holds no triangles"]
    index = _vertex_ids(tri.reshape(-1, 3))
    faces = index.reshape(-1, 3)
    keep = (faces[:, 0] != faces[:, 1]) & (faces[:, 1] != faces[:, 2]) & (faces[:, 0] != faces[:, 2])
    faces = faces[keep]
    start = faces.ravel()
    end = faces[:, [1, 2, 0]].ravel()
    n = int(index.max()) + 1
    problems = []
    _, counts = np.unique(start * n + end, return_counts=True)
    if np.any(counts > 1):
        problems.append(f"{int(np.sum(counts > 1))} edges run the same way in two triangles (inconsistent winding)")
    _, ucounts = np.unique(np.minimum(start, end) * n + np.maximum(start, end), return_counts=True)
    if np.any(ucounts != 2):
        problems.append(f"{int(np.sum(ucounts != 2))} edges are not shared by exactly two triangles (not watertight)")
    return problems


def check_stl_file(path: str | os.PathLike[str]) -> None:
    """Raise :class:`SolidError` unless the STL is watertight and consistently wound."""
    problems = stl_problems(path)
    if problems:
        raise SolidError(f"STL file {os.fspath(path)!r}: {'; '.join(problems)}")
