"""Which pieces change between two specs, and by how much, without building anything."""

from __future__ import annotations

from typing import Any

from diegen.geometry.polygon import outline_deviation_mm
from diegen.pipeline.hashing import piece_hash
from diegen.pipeline.jobs import Spec, analyse_spec, rib_analyses
from diegen.reports.document import piece_json

SHOWN_KEYS = 6  # changed numbers named on one line; more are counted


def changed_keys(old: Any, new: Any, prefix: str = "") -> list[str]:
    """The dotted keys (``press.pressure_mpa``) whose values differ between two report documents.

    Nested objects are compared key by key; a list (flutes, holes, findings) is one value, named by its key.
    """
    if isinstance(old, dict) and isinstance(new, dict):
        keys: list[str] = []
        for key in sorted(set(old) | set(new)):
            name = f"{prefix}.{key}" if prefix else str(key)
            if key not in old or key not in new:
                keys.append(name)
            else:
                keys += changed_keys(old[key], new[key], name)
        return keys
    return [] if old == new else [prefix or "(the whole document)"]


def keys_text(keys: list[str]) -> str:
    """``a, b, c`` — at most :data:`SHOWN_KEYS` of them, then how many more."""
    shown = ", ".join(keys[:SHOWN_KEYS])
    return shown + (f" and {len(keys) - SHOWN_KEYS} more" if len(keys) > SHOWN_KEYS else "")


def diff_specs(old: Spec, new: Spec) -> str:
    """Which pieces change between two specs: by the largest die-outline deviation, or (the outline the same) by
    the numbers of their reports that differ; no solids are built."""

    def pieces(spec: Spec):
        return {p.piece.part_id: (rib, p) for rib in rib_analyses(analyse_spec(spec)) for p in rib.pieces}

    before, after = pieces(old), pieces(new)
    lines = []
    changed = 0
    for part in sorted(set(before) | set(after), key=lambda k: (k not in after, k)):
        if part not in before:
            lines.append(f"  new        {part}")
        elif part not in after:
            lines.append(f"  removed    {part}")
        else:
            (rib_a, a), (rib_b, b) = before[part], after[part]
            if piece_hash(rib_a, a) == piece_hash(rib_b, b):
                lines.append(f"  unchanged  {part}")
                continue
            deviation = outline_deviation_mm(a.piece.outline, b.piece.outline)
            keys = changed_keys(piece_json(rib_a, a), piece_json(rib_b, b))
            if deviation > 0:
                lines.append(f"  changed    {part}: die outline moves up to {deviation:.3f} mm")
            elif keys:
                lines.append(f"  changed    {part}: same die outline; {keys_text(keys)} differ")
            else:
                lines.append(f"  unchanged  {part}: same die outline and the same numbers")
                continue
        changed += 1
    head = f"{changed} of {len(lines)} piece(s) differ between {old.file or old.id} and {new.file or new.id}"
    return "\n".join([head, *lines])


__all__ = ["SHOWN_KEYS", "changed_keys", "diff_specs", "keys_text"]
