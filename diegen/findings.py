"""Findings: what the analysis warns a builder about, as one frozen, located type.

A finding has a stable ``code``, the rib and the part it concerns (a finding about a whole rib names no part), the
spec key at fault and that key's place in the spec file where there is one, the position along the die outline
where there is one, and the message.  The text form (``str``) is ``"<part id>: <message>"`` (a part id begins with
its rib's id), or ``"rib <rib id>: <message>"`` for a finding about a whole rib, as every report prints it.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from typing import Any

from diegen.spec.model import SpecPositions


@dataclass(frozen=True)
class Finding:
    """One warning about a part or a rib (lengths in mm)."""

    code: str
    message: str
    part_id: str = ""
    rib_id: str = ""
    key: str = ""  # spec key path at fault, such as ``flange.height``
    file: str = ""
    line: int | None = None  # 1-based, of the key's value in ``file``
    column: int | None = None
    s_mm: float | None = None  # position along the die outline, from its start

    def __str__(self) -> str:
        if self.part_id:
            return f"{self.part_id}: {self.message}"
        return f"rib {self.rib_id}: {self.message}" if self.rib_id else self.message

    def located(self) -> str:
        """``file:line:col: key: part: message`` (whatever of it is known)."""
        where = ":".join(str(v) for v in (self.file, self.line, self.column) if v not in ("", None))
        key = f" {self.key}:" if self.key else ""
        return f"{where}:{key} {self}" if where else f"{self.key + ': ' if self.key else ''}{self}"

    def as_json(self) -> dict[str, Any]:
        """The report's form: code, rib, part and message always; key, place and position when known."""
        data: dict[str, Any] = {"code": self.code, "rib": self.rib_id, "part": self.part_id, "message": self.message}
        for name in ("key", "file", "line", "column"):
            value = getattr(self, name)
            if value not in ("", None):
                data[name] = value
        if self.s_mm is not None:
            data["s_mm"] = round(self.s_mm, 1)
        return data

    @classmethod
    def from_json(cls, data: dict[str, Any]) -> Finding:
        """The finding :meth:`as_json` wrote."""
        names = {"part": "part_id", "rib": "rib_id"}
        return cls(**{names.get(k, k): v for k, v in data.items() if names.get(k, k) in cls.__dataclass_fields__})

    def about(self, part_id: str, positions: SpecPositions | None = None, rib_id: str = "") -> Finding:
        """The same finding for ``part_id`` (empty: the whole rib) of rib ``rib_id``, located in the spec through
        ``positions`` when it names a key."""
        found = replace(self, part_id=part_id, rib_id=rib_id or self.rib_id)
        if positions is not None and self.key:
            file, line, column = positions.where(self.key)
            found = replace(found, file=file, line=line, column=column)
        return found


def once(findings: Iterable[Finding]) -> list[Finding]:
    """Findings about the spec file itself once, though every rib of a wing reports them (other findings all)."""
    seen: set[tuple] = set()
    out = []
    for finding in findings:
        key = (finding.code, finding.key, finding.line, finding.column, finding.message)
        if finding.code == "units-suspect" and key in seen:
            continue
        seen.add(key)
        out.append(finding)
    return out


def tagged(findings: Sequence[Finding]) -> str:
    """The findings' codes with how often each occurs, most frequent first: ``relief-short ×2, units-suspect``."""
    counts: dict[str, int] = {}
    for finding in findings:
        counts[finding.code] = counts.get(finding.code, 0) + 1
    ordered = sorted(counts.items(), key=lambda item: (-item[1], item[0]))
    return ", ".join(code if n == 1 else f"{code} ×{n}" for code, n in ordered)


__all__ = ["Finding", "once", "tagged"]
