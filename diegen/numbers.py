"""Numbers as people read them: no negative zero in any output.

A value that rounds to zero from below prints as "-0.0" with Python's formatting (IEEE 754 keeps the sign of
zero); a builder reads that as a mistake.  :func:`plain` drops the sign of a zero value, and
:func:`without_negative_zeros` drops it from every number in a finished text.
"""

from __future__ import annotations

import re

# "-0", "-0.0", "-0.000" standing alone: not after a letter, digit or point (so "R01-0" and "2024-0" are kept),
# not followed by another digit or point (so "-0.5" is kept)
_NEGATIVE_ZERO = re.compile(r"(?<![\w.])-(0(?:\.0+)?)(?![\d.])")


def plain(value: float) -> float:
    """``value`` as a float, a negative zero made positive."""
    return float(value) + 0.0


def without_negative_zeros(text: str) -> str:
    """``text`` with every printed negative zero ("-0", "-0.0", ...) written without its sign."""
    return _NEGATIVE_ZERO.sub(r"\1", text)


__all__ = ["plain", "without_negative_zeros"]
