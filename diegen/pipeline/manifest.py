"""``manifest.json``: what was built, from which inputs, into which files — typed records, saved as JSON.

The manifest vouches for the content of every file it lists: its size and SHA-256 as written.  A rebuild that
would call a piece unchanged first checks its files against them; a file missing, replaced or changed on disk
since it was written makes the piece be rebuilt, and says so.  To keep that cheap, a file whose size and
modification time (ns) are as recorded is not read again, unless that time lies within :data:`RACY_NS` of the
moment the file was last hashed (a change in the same clock tick would leave the time unchanged).
"""

from __future__ import annotations

import hashlib
import json
import os
import stat
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

from diegen import __version__
from diegen.fileio import write_text

MANIFEST = "manifest.json"
RACY_NS = 2_000_000_000  # 2 s: the coarsest modification-time step of common file systems (FAT)

PieceStatus = Literal["built", "failed", "building", "left"]
"""``left``: no longer in the spec, its folder kept because it holds files diegen did not write."""


@dataclass
class FileStamp:
    """One file as written: size (bytes), SHA-256 (hex), modification time and the time it was hashed (ns)."""

    size: int
    sha256: str
    mtime_ns: int
    hashed_ns: int

    @classmethod
    def of(cls, path: Path) -> FileStamp:
        """Stamp the plain file at ``path`` (read without following a link)."""
        before = time.time_ns()
        digest, st = _sha256(path)
        return cls(st.st_size, digest, st.st_mtime_ns, before)

    def check(self, path: Path) -> str:
        """Why ``path`` is not the file stamped ('' when it is); may refresh the stamp's times after hashing."""
        try:
            st = os.lstat(path)
        except FileNotFoundError:
            return f"{path.name} is missing"
        except OSError as error:
            return f"{path.name} cannot be read ({error.strerror or error})"
        if not stat.S_ISREG(st.st_mode):
            from diegen.fileio import kind_of

            return f"{path.name} is now {kind_of(st.st_mode)}, not the file diegen wrote"
        if st.st_size != self.size:
            return f"{path.name} changed on disk since it was written: {st.st_size} bytes, {self.size} when written"
        if st.st_mtime_ns == self.mtime_ns and self.mtime_ns + RACY_NS < self.hashed_ns:
            return ""
        before = time.time_ns()
        try:
            digest, st = _sha256(path)
        except OSError as error:
            return f"{path.name} cannot be read ({error.strerror or error})"
        if digest != self.sha256 or st.st_size != self.size:
            return f"{path.name} changed on disk since it was written: its SHA-256 differs from the one recorded"
        self.mtime_ns, self.hashed_ns = st.st_mtime_ns, before
        return ""


def _sha256(path: Path) -> tuple[str, os.stat_result]:
    fd = os.open(path, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_NONBLOCK", 0) | os.O_CLOEXEC)
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode):
            raise OSError(0, "not a plain file")
        h = hashlib.sha256()
        while chunk := os.read(fd, 1 << 20):
            h.update(chunk)
        return h.hexdigest(), os.fstat(fd)
    finally:
        os.close(fd)


@dataclass
class PieceRecord:
    """One piece as last built: its hash, status, files, die outline (mm) and headline numbers.

    A failed piece lists no files (its earlier ones are removed); its ``hash`` is kept when the failure follows from
    its inputs alone (the next build with the same inputs reports it failed without trying again), and ``note``
    names the plain-text note diegen left in its folder saying why it failed.
    """

    rib: str = ""
    piece: str = ""
    hash: str = ""
    status: PieceStatus = "building"
    error: str = ""
    files: list[str] = field(default_factory=list)
    stamps: dict[str, FileStamp] = field(default_factory=dict)  # by file name: size and SHA-256 as written
    outline: list[list[float]] = field(default_factory=list)
    numbers: dict[str, Any] = field(default_factory=dict)
    warnings: list[dict[str, Any]] = field(default_factory=list)  # findings, as in the report
    note: str = ""  # the failure note diegen wrote into the piece folder ('' when none)


@dataclass
class RibRecord:
    """One rib: the hash of its inputs (empty when a piece failed: re-analyse next time), its pieces and the
    findings about the whole rib."""

    input_hash: str
    pieces: list[str]
    complete: bool = False
    warnings: list[dict[str, Any]] = field(default_factory=list)  # findings about the rib, as in the report


@dataclass
class Manifest:
    """The manifest of one spec's output folder; ``load`` starts afresh on a missing, unreadable or older one."""

    path: Path
    spec: str = ""
    kind: str = ""
    ribs: dict[str, RibRecord] = field(default_factory=dict)
    pieces: dict[str, PieceRecord] = field(default_factory=dict)
    dirty: bool = False  # a file stamp was refreshed since loading: worth saving

    @classmethod
    def load(cls, path: Path) -> Manifest:
        try:
            data = json.loads(path.read_text())
            if data.get("diegen_version") != __version__:
                return cls(path)
            ribs = {k: RibRecord(**v) for k, v in data.get("ribs", {}).items()}
            pieces = {k: PieceRecord(**v) for k, v in data.get("pieces", {}).items()}
            for record in pieces.values():
                record.stamps = {name: FileStamp(**s) for name, s in dict(record.stamps).items()}
        except (OSError, ValueError, TypeError, AttributeError):
            return cls(path)
        return cls(path, data.get("spec", ""), data.get("kind", ""), ribs, pieces)

    def save(self) -> None:
        """Write the manifest: a record a line, so saving after every piece of a wing stays cheap (the compact
        encoder, no deep copies) and the file stays readable."""
        head = {"diegen_version": __version__, "kind": self.kind, "spec": self.spec}
        lines = [f" {json.dumps(key)}: {json.dumps(value)}," for key, value in sorted(head.items())]
        for name, table in (("pieces", self.pieces), ("ribs", self.ribs)):
            rows = ",\n".join(f"  {json.dumps(key)}: {_record_json(table[key])}" for key in sorted(table))
            lines.append(f" {json.dumps(name)}: {{\n{rows}\n }},")
        write_text(self.path, "{\n" + "\n".join(lines).rstrip(",") + "\n}\n")
        self.dirty = False

    def piece(self, part_id: str) -> PieceRecord | None:
        return self.pieces.get(part_id)

    def stale(self, folder: Path, part_id: str) -> str:
        """Why the piece's files are not as it was built ('' when they are): not built, a file missing, or a
        file changed on disk since it was written (checked against its recorded size and SHA-256)."""
        from diegen.errors import OutputError
        from diegen.fileio import inside

        entry = self.piece(part_id)
        if entry is None:
            return "new"
        try:
            inside(folder / part_id)  # a piece folder swapped for a link that leads out is not the one written
        except OutputError as error:
            return str(error)
        if entry.status != "built":
            return {"building": "not finished last time", "failed": "failed last time"}.get(entry.status, "new")
        for name in entry.files:
            stamp = entry.stamps.get(name)
            if stamp is None:
                return f"{name} has no recorded size and SHA-256"
            times = stamp.mtime_ns, stamp.hashed_ns
            problem = stamp.check(folder / part_id / name)
            self.dirty |= times != (stamp.mtime_ns, stamp.hashed_ns)
            if problem:
                return problem
        return ""

    def part_order(self) -> dict[str, int]:
        """Position of each part in rib order, then piece order."""
        return {p: i for i, p in enumerate(p for r in self.ribs.values() for p in r.pieces)}


def _record_json(record: PieceRecord | RibRecord) -> str:
    """One record as compact JSON, keys sorted (its lists and mappings are plain JSON data already)."""
    data = dict(vars(record))
    if isinstance(record, PieceRecord):
        data["stamps"] = {name: vars(stamp) for name, stamp in record.stamps.items()}
    return json.dumps(data, sort_keys=True)


__all__ = ["MANIFEST", "RACY_NS", "FileStamp", "Manifest", "PieceRecord", "PieceStatus", "RibRecord"]
