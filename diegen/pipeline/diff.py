"""Which pieces change between two specs, and by how much, without building anything."""

from __future__ import annotations

from diegen.geometry.polygon import outline_deviation_mm
from diegen.pipeline.hashing import piece_hash
from diegen.pipeline.jobs import Spec, analyse_spec, rib_analyses


def diff_specs(old: Spec, new: Spec) -> str:
    """Which pieces change between two specs, by the largest die-outline deviation (no solids)."""

    def pieces(spec: Spec):
        return {p.piece.part_id: (rib, p) for rib in rib_analyses(analyse_spec(spec)) for p in rib.pieces}

    before, after = pieces(old), pieces(new)
    lines = []
    for part in sorted(set(before) | set(after), key=lambda k: (k not in after, k)):
        if part not in before:
            lines.append(f"  new        {part}")
        elif part not in after:
            lines.append(f"  removed    {part}")
        else:
            (rib_a, a), (rib_b, b) = before[part], after[part]
            deviation = outline_deviation_mm(a.piece.outline, b.piece.outline)
            if piece_hash(rib_a, a) == piece_hash(rib_b, b):
                lines.append(f"  identical  {part}")
            elif deviation > 0:
                lines.append(f"  changed    {part}: die outline moves up to {deviation:.3f} mm")
            else:
                lines.append(f"  changed    {part}: same die outline, other numbers differ")
    changed = sum(1 for line in lines if not line.strip().startswith("identical"))
    head = f"{changed} of {len(lines)} piece(s) differ between {old.file or old.id} and {new.file or new.id}"
    return "\n".join([head, *lines])


__all__ = ["diff_specs"]
