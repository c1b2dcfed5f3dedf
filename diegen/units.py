"""Unit conversion: the one place where numbers enter or leave millimetres and newtons.

Exact definitions (NIST Special Publication 811, 2008 ed., Appendix B):

* 1 in = 25.4 mm exactly;
* 1 lbf = 4.4482216152605 N exactly;
* 1 short ton-force = 2000 lbf;
* 1 psi = 1 lbf / in² = 6894.757... Pa (derived from the two above).

Spec values are either bare numbers in the spec's ``units`` (``in`` or ``mm``)
or strings with a unit: ``"0.8 mm"``, ``"0.032 in"``, ``"3/16 in"``,
``"1 1/2 in"``, ``"20 ton"``, ``"178 kN"``, ``"40000 lbf"``.
"""

from __future__ import annotations

import math
import re
from fractions import Fraction

__all__ = [
    "FORCE_UNITS",
    "LBF_PER_SHORT_TON",
    "LENGTH_UNITS",
    "MAX_QUANTITY_CHARS",
    "MM_PER_IN",
    "MPA_PER_KSI",
    "MPA_PER_PSI",
    "N_PER_LBF",
    "N_PER_SHORT_TON",
    "SPEC_UNITS",
    "UnitError",
    "force_n",
    "in_to_mm",
    "length_mm",
    "mm_to_in",
    "mpa_to_psi",
]

MM_PER_IN = 25.4
N_PER_LBF = 4.4482216152605
LBF_PER_SHORT_TON = 2000.0
N_PER_SHORT_TON = N_PER_LBF * LBF_PER_SHORT_TON
MPA_PER_PSI = N_PER_LBF / MM_PER_IN**2
MPA_PER_KSI = 1000.0 * MPA_PER_PSI

LENGTH_UNITS: dict[str, float] = {
    "mm": 1.0,
    "cm": 10.0,
    "m": 1000.0,
    "in": MM_PER_IN,
    "inch": MM_PER_IN,
    "inches": MM_PER_IN,
    '"': MM_PER_IN,
    "ft": 12 * MM_PER_IN,
}
FORCE_UNITS: dict[str, float] = {
    "n": 1.0,
    "kn": 1000.0,
    "lbf": N_PER_LBF,
    "lb": N_PER_LBF,
    "ton": N_PER_SHORT_TON,  # short ton-force, the rating of shop presses
    "tons": N_PER_SHORT_TON,
    "short ton": N_PER_SHORT_TON,
    "t": 1000.0 * 9.80665,  # the metric tonne's symbol: a press rated "20 t" is rated in tonnes-force
    "tonne": 1000.0 * 9.80665,  # metric ton-force, standard gravity (NIST SP 811)
    "tonnes": 1000.0 * 9.80665,
    "kgf": 9.80665,
}
FORCE_UNIT_NAMES: dict[str, str] = {
    "n": "newtons",
    "kn": "kilonewtons",
    "lbf": "pounds-force",
    "lb": "pounds-force",
    "ton": "short tons-force (2,000 lbf)",
    "tons": "short tons-force (2,000 lbf)",
    "short ton": "short tons-force (2,000 lbf)",
    "t": "metric tonnes-force (1,000 kgf)",
    "tonne": "metric tonnes-force (1,000 kgf)",
    "tonnes": "metric tonnes-force (1,000 kgf)",
    "kgf": "kilograms-force",
}
SPEC_UNITS = ("in", "mm")

_NUMBER = r"[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?"
_QUANTITY = re.compile(
    rf"^\s*(?P<num>(?:\d+\s+)?\d+\s*/\s*\d+|{_NUMBER})\s*(?P<unit>[A-Za-z\"][A-Za-z ]*)?\s*$"
)


MAX_QUANTITY_CHARS = 64  # a quantity is short; longer strings are refused before matching


class UnitError(ValueError):
    """A quantity that cannot be read; the message says what was expected."""


def in_to_mm(value: float) -> float:
    """Inches to millimetres."""
    return value * MM_PER_IN


def mm_to_in(value: float) -> float:
    """Millimetres to inches."""
    return value / MM_PER_IN


def mpa_to_psi(value: float) -> float:
    """MPa to pounds-force per square inch."""
    return value / MPA_PER_PSI


_FRACTION = re.compile(r"^(?:(?P<whole>\d+)\s+)?(?P<num>\d+)\s*/\s*(?P<den>\d+)$")


def _number(text: str) -> float:
    fraction = _FRACTION.match(text.strip())
    if not fraction:
        return float(text)
    if int(fraction["den"]) == 0:
        raise UnitError(f"fraction {text.strip()!r} divides by zero")
    return float(int(fraction["whole"] or 0) + Fraction(int(fraction["num"]), int(fraction["den"])))


def _parse(value: object, table: dict[str, float], default_unit: str | None, what: str, example: str) -> float:
    if isinstance(value, bool):
        raise UnitError(f"expected a {what} such as {example}, found a boolean ({value})")
    if isinstance(value, (int, float)):
        if default_unit is None:
            raise UnitError(f"expected a {what} with a unit such as {example}, found a bare number {value}")
        try:
            number, unit = float(value), default_unit
        except OverflowError:
            raise UnitError(f"expected a finite {what}, found a {len(str(value))}-digit number") from None
    elif isinstance(value, str):
        if len(value) > MAX_QUANTITY_CHARS:
            raise UnitError(f"expected a {what} such as {example}, found a {len(value)}-character string")
        match = _QUANTITY.match(value)
        if not match:
            raise UnitError(f"expected a {what} such as {example}, found {value!r}")
        number = _number(match["num"])
        unit = (match["unit"] or "").strip().lower() or default_unit
        if unit is None:
            raise UnitError(f"expected a {what} with a unit such as {example}, found {value!r}")
    elif isinstance(value, (dict, list)):
        kind = "a mapping" if isinstance(value, dict) else "a list"
        raise UnitError(f"expected a {what} such as {example}, found {kind}")
    else:
        raise UnitError(f"expected a {what} such as {example}, found {type(value).__name__} {value!r}")
    if unit not in table:
        known = ", ".join(sorted({k for k in table if k.isalpha()}))
        raise UnitError(f"unknown {what} unit {unit!r} (known: {known})")
    result = number * table[unit]
    if not math.isfinite(result):
        raise UnitError(f"expected a finite {what}, found {value!r}")
    return result


def length_mm(value: object, spec_units: str) -> float:
    """A length from a spec value: bare number in ``spec_units`` or a string with a unit; returns mm."""
    return _parse(value, LENGTH_UNITS, spec_units, "length", '0.032, "0.8 mm" or "3/16 in"')


def force_n(value: object) -> float:
    """A force from a spec value (``"20 ton"`` short tons, ``"20 t"`` metric tonnes, ``"178 kN"``,
    ``"40000 lbf"``); returns N."""
    return _parse(value, FORCE_UNITS, None, "force", '"20 ton", "20 t", "178 kN" or "40000 lbf"')


def force_reading(value: object) -> str:
    """How a force value was read, for the report: ``'20 t: 20 metric tonnes-force (1,000 kgf) = 196.1 kN'``."""
    newtons = force_n(value)
    match = _QUANTITY.match(str(value))
    unit = (match["unit"] or "").strip().lower() if match else ""
    number = _number(match["num"]) if match else newtons
    return f"{str(value).strip()}: {number:g} {FORCE_UNIT_NAMES.get(unit, unit)} = {newtons / 1000.0:.1f} kN"
