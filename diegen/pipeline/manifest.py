"""``manifest.json``: what was built, from which inputs, into which files — typed records, saved as JSON."""

from __future__ import annotations

import json
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any, Literal

from diegen import __version__
from diegen.fileio import write_text

MANIFEST = "manifest.json"

PieceStatus = Literal["built", "failed", "building"]


@dataclass
class PieceRecord:
    """One piece as last built: its hash, status, files, die outline (mm) and headline numbers."""

    rib: str = ""
    piece: str = ""
    hash: str = ""
    status: PieceStatus = "building"
    error: str = ""
    files: list[str] = field(default_factory=list)
    outline: list[list[float]] = field(default_factory=list)
    numbers: dict[str, Any] = field(default_factory=dict)
    warnings: list[dict[str, Any]] = field(default_factory=list)  # findings, as in the report


@dataclass
class RibRecord:
    """One rib: the hash of its inputs (empty when a piece failed: re-analyse next time) and its pieces."""

    input_hash: str
    pieces: list[str]
    complete: bool = False


@dataclass
class Manifest:
    """The manifest of one spec's output folder; ``load`` starts afresh on a missing, unreadable or older one."""

    path: Path
    spec: str = ""
    kind: str = ""
    ribs: dict[str, RibRecord] = field(default_factory=dict)
    pieces: dict[str, PieceRecord] = field(default_factory=dict)

    @classmethod
    def load(cls, path: Path) -> Manifest:
        try:
            data = json.loads(path.read_text())
            if data.get("diegen_version") != __version__:
                return cls(path)
            ribs = {k: RibRecord(**v) for k, v in data.get("ribs", {}).items()}
            pieces = {k: PieceRecord(**v) for k, v in data.get("pieces", {}).items()}
        except (OSError, ValueError, TypeError, AttributeError):
            return cls(path)
        return cls(path, data.get("spec", ""), data.get("kind", ""), ribs, pieces)

    def save(self) -> None:
        data = {"diegen_version": __version__, "kind": self.kind, "spec": self.spec,
                "ribs": {k: asdict(v) for k, v in self.ribs.items()},
                "pieces": {k: asdict(v) for k, v in self.pieces.items()}}
        write_text(self.path, json.dumps(data, indent=1, sort_keys=True))

    def piece(self, part_id: str) -> PieceRecord | None:
        return self.pieces.get(part_id)

    def files_ok(self, folder: Path, part_id: str) -> bool:
        """The piece was built and every file it lists is on disk."""
        entry = self.piece(part_id)
        return bool(entry) and entry.status == "built" and all((folder / part_id / f).is_file() for f in entry.files)

    def part_order(self) -> dict[str, int]:
        """Position of each part in rib order, then piece order."""
        return {p: i for i, p in enumerate(p for r in self.ribs.values() for p in r.pieces)}


__all__ = ["MANIFEST", "Manifest", "PieceRecord", "PieceStatus", "RibRecord"]
