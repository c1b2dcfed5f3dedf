"""Content hashes taken from the domain data: what a rib is computed from, and what a piece's files are made from.

Hashes are over the analysed values themselves (frozen dataclasses of floats and tuples, whose ``repr`` is exact),
not over a report's text, so a change of report wording rebuilds nothing.  The diegen version is part of every
hash: a new version rebuilds.
"""

from __future__ import annotations

import hashlib
from dataclasses import fields, replace
from typing import Any

import numpy as np

from diegen import __version__
from diegen.analysis import PieceAnalysis, RibAnalysis
from diegen.spec.model import RibSpec


def _digest(*parts: Any) -> str:
    h = hashlib.sha256(__version__.encode())
    for part in parts:
        h.update(b"\0")
        h.update(part if isinstance(part, bytes) else repr(part).encode())
    return h.hexdigest()[:24]


def rib_input_hash(rib: RibSpec, section: np.ndarray | None) -> str:
    """Hash of what a rib is computed from (the spec's file location left out)."""
    return _digest(replace(rib, file=""), b"" if section is None else np.round(np.asarray(section), 12).tobytes())


def piece_hash(rib: RibAnalysis, piece: PieceAnalysis) -> str:
    """Hash of everything a piece's files are made from: the piece's analysed values and the parts of the rib's
    spec its writers read (not the whole spec: moving the rear spar leaves the nose piece alone).

    The findings enter without the spec file's path (like :func:`rib_input_hash`); the strain profiles (numpy
    arrays, whose ``repr`` abbreviates) enter through their bytes.
    """
    spec, shared = rib.spec, rib.spec.shared
    read_by_writers = (spec.id, spec.title, spec.units, spec.airfoil, spec.chord_mm, rib.geometry.chord_mm,
                       shared.die, shared.sheet, shared.flange, shared.press, shared.relief)
    values = [getattr(piece, f.name) for f in fields(piece) if f.name not in ("runs", "warnings")]
    values.append([replace(w, file="") for w in piece.warnings])  # where the spec file lies is not content
    profiles = [(r.run_index, r.s_offset_mm, r.shrink_runs, r.stretch_runs,
                 np.asarray(r.profile.strain, float).tobytes()) for r in piece.runs]
    return _digest(*read_by_writers, *values, *profiles)


__all__ = ["piece_hash", "rib_input_hash"]
