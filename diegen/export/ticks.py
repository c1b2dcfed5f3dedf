"""Axis ticks for the charts of our own (PNG and PDF): round steps and their labels."""

from __future__ import annotations

import math


def tick_values(low: float, high: float, most: int) -> tuple[list[float], float]:
    """Tick positions in [``low``, ``high``] and their step: the multiples of the smallest step of 1, 2, 2.5 or
    5 × 10^k that makes at most ``most`` intervals of the range, or of a smaller such step where that would leave
    fewer than two ticks inside."""
    span = high - low
    if not span > 0 or most < 1:
        return [low], 1.0
    raw = span / most
    power = 10.0 ** math.floor(math.log10(raw))
    steps = [f * power for f in (0.1, 0.2, 0.25, 0.5, 1, 2, 2.5, 5, 10)]
    chosen = next(i for i, step in enumerate(steps) if step >= raw * (1 - 1e-9))
    for step in steps[chosen::-1]:
        first, last = math.ceil(low / step - 1e-9), math.floor(high / step + 1e-9)
        if last > first:
            break
    return [k * step for k in range(first, last + 1)], step


def tick_label(value: float, step: float) -> str:
    """``value`` with as many decimals as ``step`` needs, a minus sign (U+2212) for negatives, never "−0"."""
    decimals = next((d for d in range(10) if abs(step * 10**d - round(step * 10**d)) < 1e-6), 10)
    text = f"{value:.{decimals}f}"
    if float(text) == 0.0:
        text = text.lstrip("-")
    return text.replace("-", "−")


__all__ = ["tick_label", "tick_values"]
