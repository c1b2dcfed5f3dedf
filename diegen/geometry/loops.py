"""Closed point loops as numpy arrays: the one place for a loop's area, length and orientation, and for how much
an outline turns where two of its stretches meet.

A loop is a sequence of ``(x, y)`` points whose closing segment (last point to
first) is implicit; no point repeats.  Any unit: results are in the loop's
units (mm, mm², or fractions of the chord).  Pure numpy; imports nothing else
of the package.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["CORNER_TURN_DEG", "FloatArray", "IntArray", "is_corner", "is_counter_clockwise", "loop_array",
           "loop_length", "polyline_length", "signed_area", "turn_angle"]

CORNER_TURN_DEG = 10.0  # project limit: where an outline turns this much or more between two stretches, a corner

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.intp]


def loop_array(points: ArrayLike) -> FloatArray:
    """``points`` as a float array of shape (N, 2)."""
    return np.asarray(points, dtype=float).reshape(-1, 2)


def loop_length(points: ArrayLike) -> float:
    """Perimeter of the closed loop, closing segment included."""
    p = loop_array(points)
    return float(np.sum(np.hypot(*(np.roll(p, -1, axis=0) - p).T)))


def polyline_length(points: ArrayLike) -> float:
    """Length of the open polyline through ``points`` (no closing segment)."""
    p = loop_array(points)
    return float(np.sum(np.hypot(*np.diff(p, axis=0).T)))


def signed_area(points: ArrayLike) -> float:
    """Shoelace area of the closed loop: positive when counter-clockwise (X right, Y up), negative when clockwise."""
    x, y = loop_array(points).T
    return float(0.5 * np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def is_counter_clockwise(points: ArrayLike) -> bool:
    """True when the loop runs counter-clockwise and encloses some area."""
    return signed_area(points) > 0.0


def turn_angle(a: tuple[float, float], b: tuple[float, float]) -> float:
    """Signed angle (rad, + left) from direction ``a`` to direction ``b``."""
    return math.atan2(a[0] * b[1] - a[1] * b[0], a[0] * b[0] + a[1] * b[1])


def is_corner(a: tuple[float, float], b: tuple[float, float]) -> bool:
    """Whether going on from direction ``a`` in direction ``b`` turns by ``CORNER_TURN_DEG`` or more."""
    return abs(math.degrees(turn_angle(a, b))) >= CORNER_TURN_DEG
