"""Typed reading of a :class:`~diegen.spec.yamltree.YNode` tree, collecting located problems.

Readers never stop at the first mistake: each records a :class:`Problem`
(file, line, column, key path, expected vs found) and returns ``None``, so one
run of ``diegen check`` lists every mistake in a spec.
"""

from __future__ import annotations

import difflib
import math
import os
from collections.abc import Callable, Iterable
from pathlib import Path
from typing import Any, TypeVar

from diegen import units
from diegen.errors import Problem
from diegen.spec.yamltree import YNode

__all__ = ["MIN_LENGTH_MM", "Reader", "describe", "join", "suggest"]

T = TypeVar("T")
MIN_LENGTH_MM = 0.001


def describe(value: Any) -> str:
    """How a found value is shown in a message."""
    if isinstance(value, YNode):
        value = value.value
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    if value is None:
        return "nothing (null)"
    if isinstance(value, bool):
        return f"a boolean ({str(value).lower()})"
    shown = repr(value)
    if len(shown) > 60:
        shown = shown[:57] + "..."
    return f"{type(value).__name__} {shown}"


def suggest(word: str, choices: Iterable[str]) -> str:
    """A ' (did you mean ...?)' hint, or ''."""
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f" (did you mean {close[0]!r}?)" if close else ""


class Reader:
    """Holds the file name, the spec's units and the problems found so far."""

    def __init__(self, file: str, units_name: str = "mm"):
        self.file = file
        self.units = units_name
        self.problems: list[Problem] = []

    # -- reporting -------------------------------------------------------
    def problem(self, node: YNode | None, path: str, message: str, at_key: tuple[int, int] | None = None) -> None:
        line, column = at_key or ((node.line, node.column) if node is not None else (None, None))
        self.problems.append(Problem(message, self.file, line, column, path))

    # -- mappings --------------------------------------------------------
    def mapping(self, node: YNode | None, path: str, allowed: Iterable[str],
                required: Iterable[str] = ()) -> dict[str, YNode] | None:
        """Check ``node`` is a mapping with only ``allowed`` keys and all ``required`` ones."""
        if node is None:
            return None
        if not node.is_map:
            self.problem(node, path, f"expected a mapping of keys, found {describe(node)}")
            return None
        allowed = list(allowed)
        for key in node.value:
            if key not in allowed:
                self.problem(node, join(path, key),
                             f"unknown key {key!r}{suggest(key, allowed)}; allowed: {', '.join(allowed)}",
                             at_key=node.keys[key])
        for key in required:
            if key not in node.value:
                self.problem(node, join(path, key), f"missing required key {key!r}")
        return node.value

    def top_level(self, root: dict[str, YNode], allowed: Iterable[str], required: Iterable[str] = ()) -> None:
        """Check the spec's top-level keys (``root``, the file's mapping) as :meth:`mapping` checks a section's."""
        self.mapping(YNode(root, 1, 1, {k: (v.line, v.column) for k, v in root.items()}), "", allowed, required)

    # -- scalars -----------------------------------------------------------
    def _finite(self, node: YNode, path: str, value: float) -> float | None:
        if not math.isfinite(value):
            self.problem(node, path, f"expected a finite number, found {describe(node)}")
            return None
        return value

    def number(self, node: YNode | None, path: str, low: float | None = None, high: float | None = None,
               low_open: bool = False, high_open: bool = False) -> float | None:
        """A plain number within bounds."""
        if node is None:
            return None
        value = node.value
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.problem(node, path, f"expected a number, found {describe(node)}")
            return None
        return self._bounded(node, path, self._finite(node, path, _as_float(value)), low, high, low_open, high_open, "")

    def _bounded(self, node: YNode, path: str, value: float | None, low: float | None, high: float | None,
                 low_open: bool, high_open: bool, unit: str) -> float | None:
        if value is None:
            return None
        shown = f"{value:g}{unit}"
        if low is not None and (value < low or (low_open and value == low)):
            word = "greater than" if low_open else "at least"
            self.problem(node, path, f"expected a value {word} {low:g}{unit}, found {shown}")
            return None
        if high is not None and (value > high or (high_open and value == high)):
            word = "less than" if high_open else "at most"
            self.problem(node, path, f"expected a value {word} {high:g}{unit}, found {shown}")
            return None
        return value

    def length(self, node: YNode | None, path: str, low: float = 0.0, low_open: bool = True,
               high: float | None = 100_000.0) -> float | None:
        """A length: bare number in the spec's units or a string with a unit; returns mm.

        A length that must be positive must also be at least :data:`MIN_LENGTH_MM`:
        nothing in a rib, a die or a press is thinner than a micrometre, and smaller
        values only underflow later arithmetic.
        """
        if node is None:
            return None
        try:
            value = units.length_mm(node.value, self.units)
        except units.UnitError as exc:
            self.problem(node, path, str(exc))
            return None
        if low == 0.0 and low_open and 0.0 < value < MIN_LENGTH_MM:
            self.problem(node, path, f"expected a length of at least {MIN_LENGTH_MM:g} mm, found {value:g} mm")
            return None
        return self._bounded(node, path, value, low, high, low_open, False, " mm")

    def force(self, node: YNode | None, path: str) -> float | None:
        """A force with a unit; returns N."""
        if node is None:
            return None
        try:
            value = units.force_n(node.value)
        except units.UnitError as exc:
            self.problem(node, path, str(exc))
            return None
        return self._bounded(node, path, value, 0.0, 1e8, True, False, " N")

    def integer(self, node: YNode | None, path: str, low: int | None = None, high: int | None = None) -> int | None:
        if node is None:
            return None
        if isinstance(node.value, bool) or not isinstance(node.value, int):
            self.problem(node, path, f"expected a whole number, found {describe(node)}")
            return None
        value = self._bounded(node, path, self._finite(node, path, _as_float(node.value)), low, high, False, False, "")
        return None if value is None else int(value)

    def boolean(self, node: YNode | None, path: str) -> bool | None:
        if node is None:
            return None
        if not isinstance(node.value, bool):
            self.problem(node, path, f"expected true or false, found {describe(node)}")
            return None
        return node.value

    def text(self, node: YNode | None, path: str, pattern: Callable[[str], str | None] | None = None) -> str | None:
        """A string; ``pattern`` may return an error message for a bad one."""
        if node is None:
            return None
        value = node.value
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            value = str(value)
        if not isinstance(value, str) or not value.strip():
            self.problem(node, path, f"expected text, found {describe(node)}")
            return None
        if pattern and (message := pattern(value)):
            self.problem(node, path, message)
            return None
        return value.strip()

    def choice(self, node: YNode | None, path: str, choices: Iterable[str]) -> str | None:
        """One of ``choices`` (the message lists them all)."""
        if node is None:
            return None
        choices = list(choices)
        value = node.value
        if value is False and "none" in choices:  # YAML reads a bare `no`/`off` as false
            return "none"
        if not isinstance(value, str) or value not in choices:
            hint = suggest(value, choices) if isinstance(value, str) else ""
            self.problem(node, path, f"expected one of {', '.join(choices)}, found {describe(node)}{hint}")
            return None
        return value

    def sequence(self, node: YNode | None, path: str, min_len: int = 0, max_len: int = 1000) -> list[YNode] | None:
        if node is None:
            return None
        if not node.is_list:
            self.problem(node, path, f"expected a list, found {describe(node)}")
            return None
        if not min_len <= len(node.value) <= max_len:
            self.problem(node, path, f"expected a list of {_how_many(min_len, max_len)}, found "
                                     f"{_items(len(node.value))}")
            return None
        return node.value

    def input_file(self, node: YNode, path: str, spec_dir: Path, what: str, max_bytes: int,
                   expected: str) -> Path | None:
        """The plain file ``node`` names (relative to ``spec_dir``), resolved; a located problem for a missing
        one, an unusable name, or anything but a plain file of at most ``max_bytes`` (``what`` names it)."""
        from diegen.fileio import UnusableInput, check_plain_file

        text = self.text(node, path)
        if text is None:
            return None
        try:
            file_path = (spec_dir / text).resolve()
            status = os.stat(file_path)
        except FileNotFoundError:
            self.problem(node, path, f"{what} not found: {file_path}")
            return None
        except (OSError, ValueError, RuntimeError) as exc:  # too long a name, a NUL character, a loop of links
            self.problem(node, path, f"not a usable file name ({getattr(exc, 'strerror', None) or exc})")
            return None
        try:
            check_plain_file(file_path, status, max_bytes, expected)
        except UnusableInput as error:
            self.problem(node, path, f"{what} {file_path}: {error.problem}")
            return None
        return file_path

    def length_pair(self, node: YNode | None, path: str) -> tuple[float, float] | None:
        """Two lengths ``[width, length]``."""
        items = self.sequence(node, path, 2, 2)
        if items is None:
            return None
        a, b = (self.length(item, f"{path}[{i}]") for i, item in enumerate(items))
        return None if a is None or b is None else (a, b)


def _items(count: int) -> str:
    return f"{count} item" + ("" if count == 1 else "s")


def _how_many(low: int, high: int) -> str:
    """'exactly 2 items', 'at most 4 items', 'at least 2 items' or '1 to 3 items'."""
    if low == high:
        return f"exactly {_items(low)}"
    if low == 0:
        return f"at most {_items(high)}"
    if high >= 1000:
        return f"at least {_items(low)}"
    return f"{low} to {_items(high)}"


def _as_float(value: int | float) -> float:
    """``float(value)``, with an integer too large for a float read as infinite (then refused as not finite)."""
    try:
        return float(value)
    except OverflowError:
        return math.inf if value > 0 else -math.inf


def join(path: str, key: str | int) -> str:
    """Key path join: ``join("spars", 1)`` → ``spars[1]``, ``join("die", "material")`` → ``die.material``."""
    if isinstance(key, int):
        return f"{path}[{key}]"
    return f"{path}.{key}" if path else key
