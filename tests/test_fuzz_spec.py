"""Property-based and mutation fuzzing of the spec loader (YAML -> validated spec).

The property (the project's error-handling rule, no outside source): whatever the
bytes of a spec file, loading it ends either in a valid spec or in a
:class:`~diegen.errors.SpecError` whose every problem names the file, says what
is wrong and points at a line or a key path; no other exception, no internal
representation (``YNode(``) in a message, and oversized or alias-bomb files are
refused quickly with bounded memory.  For specs that validate, the geometry and
forming analysis either succeeds or raises a :class:`~diegen.errors.DiegenError`.

Inputs are mutations of the demo rib and wing specs (seeded ``random.Random``
for the big runs, hypothesis for the structured ones): deleted keys, swapped
types, extreme, negative and non-finite numbers, wrong units and malformed
fractions, unicode, anchors and aliases, an alias bomb, huge strings and lists,
deep nesting, binary junk, truncation, tabs and duplicate keys.

The tests marked ``slow`` run thousands of cases and print the counts by outcome;
the unmarked ones are small versions that run in a few seconds.
"""

from __future__ import annotations

import contextlib
import copy
import math
import os
import random
import re
import subprocess
import sys
import time
import traceback
from collections import Counter
from pathlib import Path
from typing import Any

import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from testing import report, timed_with_peak

from diegen import units
from diegen.errors import DiegenError, SpecError
from diegen.spec import load_spec, parse_spec
from diegen.spec.model import RibSpec, WingSpec
from diegen.spec.yamltree import MAX_DEPTH, MAX_FILE_BYTES, MAX_NODES

ROOT = Path(__file__).resolve().parents[1]
SPECS = ROOT / "specs"
AIRFOILS = Path(__file__).resolve().parent / "data" / "airfoils"
DEMO_RIB_TEXT = (SPECS / "demo-rib.yaml").read_text(encoding="utf-8")
DEMO_WING_TEXT = (SPECS / "demo-wing.yaml").read_text(encoding="utf-8")
DEMO_RIB = yaml.safe_load(DEMO_RIB_TEXT)
DEMO_WING = yaml.safe_load(DEMO_WING_TEXT)

# Safety bounds (project limits, not benchmarks): refusing a hostile file must be quick and small.
REFUSE_SECONDS = 2.0
REFUSE_PEAK_BYTES = 200 * 2**20
# Messages about the whole file, which have neither a line nor a key.
WHOLE_FILE_MESSAGES = ("spec file larger than", "file is ", "file not found", "not UTF-8", "YAML error",
                       "is a folder", "cannot read file")

# ----------------------------------------------------------------------------- outcome of one case


class Escape(AssertionError):
    """A case that ended in an exception other than SpecError (or in a malformed SpecError)."""


def check_spec_error(error: SpecError, file: str, text: str | None = None) -> None:
    """Every problem names ``file``, has a message and a line or key path; nothing internal leaks."""
    assert error.problems, "SpecError without problems"
    # YAML 1.1 (which PyYAML reads) breaks lines at CR LF, CR, LF and also NEL, LS and PS (its "b-char" set)
    lines = None if text is None else len(re.findall("\r\n|[\r\n\x85\u2028\u2029]", text)) + 2
    for p in error.problems:
        assert p.file == file, p
        assert p.message.strip(), p
        assert p.line is not None or p.key or p.message.startswith(WHOLE_FILE_MESSAGES), p
        if p.line is not None:
            assert p.line >= 1 and (lines is None or p.line <= lines), p
        if p.column is not None:
            assert p.column >= 1, p
        assert "YNode(" not in p.message and "Traceback" not in p.message, p
        assert len(p.message) < 2_000, f"message of {len(p.message)} characters: {p.message[:200]}..."
    str(error)  # printable


def outcome(text: str, file: str = "fuzz.yaml", spec_dir: Path = SPECS) -> tuple[str, Any]:
    """Classify ``text``: ('valid', spec) or ('SpecError', error); anything else raises :class:`Escape`."""
    try:
        spec = parse_spec(text, file, spec_dir)
    except SpecError as error:
        try:
            check_spec_error(error, file, text)
        except AssertionError as bad:
            raise Escape(f"malformed SpecError: {bad}") from error
        return "SpecError", error
    except Exception as error:  # the property under test
        raise Escape(f"{type(error).__name__}: {error}") from error
    assert isinstance(spec, (RibSpec, WingSpec))
    return "valid", spec


def first_problem_kind(error: SpecError) -> str:
    """A short label of the first problem (for the printed counts)."""
    m = error.problems[0].message
    for label in ("YAML syntax error", "not a text file", "duplicate key", "unknown key", "missing required key",
                  "expected a finite", "expected a mapping", "expected a list", "expected one of", "expected a value",
                  "expected a length", "expected a force", "expected a number", "expected a whole number",
                  "expected text", "unknown length unit", "unknown force unit", "divides by zero", "too large",
                  "nested deeper", "cannot read value", "expected true or false", "spec file larger", "empty",
                  "expected spars in order", "expected 'naca'", "expected 4 or 5 digits", "expected an id"):
        if label in m:
            return label
    return m[:40]


# ----------------------------------------------------------------------------- mutation of the demo specs

MALFORMED_QUANTITIES = [
    "3 furlong", "3/0 in", "3//32 in", "1 1/2 in", "1 1/2", "½ in", "0x10 mm", "1,5 mm", "1e400 mm", "-0 mm",
    "-1/2 in", "3/16 inches", "2 cm", "0.5 m", "1 ft", "25 ton", "178 kN", "-5 kN", "1e-320 mm", "nan mm",
    "inf in", " 3 mm ", "mm", "", " ", "3 mm mm", '3"', '3 "', "1/1e3 in", "3 /16 in", "3/ 16in", "03/016 in",
    "1 1/0 in", "10 tonnes", "10 kgf", "5 lbf", "5 N", "5 n", "5 KN", "3 in\t", "3\u00a0mm", "٣ mm", "3 ｍｍ",  # noqa: RUF001 - look-alike input on purpose
    "1" + "0" * 80 + " mm", "1/" + "0" * 70 + "1 in", "9" * 30 + "/1 in", "1 " + " " * 200 + "in",
    "3 inchesinches", "3.2.1 mm", "+4 mm", ".5 in", "5. in", "1e3", "1E-3 m", "0 mm", "0.000001 mm",
]
UNICODE_TEXT = ["Ünïcödé", "翼肋", "ребро", "\u202eevil",  # noqa: RUF001 - look-alike input on purpose
                "tab\there", "emoji \U0001F6E9", "a\u0301",
                "\ufeffbom", "line\nbreak", "\\x00", "\u2028sep", "'quoted'", '"dq"', "#hash", "key: value", "- dash",
                "&anchor", "*alias", "!tag", "%percent", "@at", "`tick`", "{brace}", "[bracket]", "|pipe", ">fold"]
SPECIAL_FLOATS = [math.nan, math.inf, -math.inf, 0.0, -0.0, 1e308, -1e308, 5e-324, 1e-12, -1e-12, 1e15, 2.0**53]


def junk_value(rng: random.Random, depth: int = 0) -> Any:
    """A value of a random type (number, string, list, mapping, bool, null), often extreme."""
    kind = rng.randrange(16 if depth < 3 else 9)
    if kind == 0:
        return None
    if kind == 1:
        return rng.choice([True, False])
    if kind == 2:
        return rng.choice([0, 1, -1, 2, 7, 13, 41, 200, 201, 4001, -10**6, 10**9, 2**63, -(2**64)])
    if kind == 3:
        return rng.choice(SPECIAL_FLOATS)
    if kind == 4:
        return 10 ** rng.randint(20, 400) * rng.choice([1, -1])
    if kind == 5:
        return rng.choice(MALFORMED_QUANTITIES)
    if kind == 6:
        return rng.choice(UNICODE_TEXT)
    if kind == 7:
        return rng.uniform(-1e4, 1e4)
    if kind == 8:
        return rng.choice(["auto", "none", "no", "off", "yes", "on", "null", "~", "true", "rib", "wing", "in", "mm",
                           "naca 2412", "naca 0012", "naca 23012", "naca 99999", "naca 123", "2024-T3", "centre"])
    if kind == 9:
        return [junk_value(rng, depth + 1) for _ in range(rng.randrange(6))]
    if kind == 10:
        return {rng.choice(["at", "x", "d", "y", "web", "count", "pitch", "root", "tip", "naca", "file", "ribs",
                            rng.choice(UNICODE_TEXT)]): junk_value(rng, depth + 1) for _ in range(rng.randrange(5))}
    if kind == 11:
        return "x" * rng.choice([100, 1_000, 20_000, 100_000])
    if kind == 12:
        return list(range(rng.choice([50, 500, 5_000, 25_000])))
    if kind == 13:
        value: Any = 1
        for _ in range(rng.randint(MAX_DEPTH - 5, MAX_DEPTH + 20)):
            value = [value] if rng.random() < 0.5 else {"k": value}
        return value
    if kind == 14:
        return bytes(rng.randrange(256) for _ in range(rng.randrange(1, 40)))  # dumped as !!binary
    return rng.choice(["2001-01-01", "2001-13-45", "12:30:00", "0o17", "0x1F", "0b101", "1_000", "1:20", ".inf",
                       "-.inf", ".nan", "0012", "+12", "1e3", "1E-3"])


def _paths(tree: Any, prefix: tuple = ()) -> list[tuple]:
    """Key paths in a plain YAML tree (dict keys and list indexes), not into deep, long or recursive parts."""
    out: list[tuple] = []
    if len(prefix) > 6:
        return out
    if isinstance(tree, dict):
        for k, v in tree.items():
            out.append((*prefix, k))
            if v is not tree:
                out.extend(_paths(v, (*prefix, k)))
    elif isinstance(tree, list) and len(tree) <= 50:
        for i, v in enumerate(tree):
            out.append((*prefix, i))
            if v is not tree:
                out.extend(_paths(v, (*prefix, i)))
    return out


def _parent(tree: Any, path: tuple) -> Any:
    for k in path[:-1]:
        tree = tree[k]
    return tree


def _numbers(tree: Any) -> list[tuple]:
    return [p for p in _paths(tree) if isinstance(_parent(tree, p)[p[-1]], (int, float))
            and not isinstance(_parent(tree, p)[p[-1]], bool)]


TYPO_KEYS = ["cord", "chrod", "sheeet", "flang", "spar", "piece", "relif", "dies", "pres", "skin-thickness",
             "Units", "KIND", "airfoils", "planfrom", "overide", "bend radius", "thicknes", "cap_widht"]


def mutate_tree(tree: Any, rng: random.Random) -> tuple[Any, str]:
    """Apply one tree-level mutation in place; return the tree and the mutation's name."""
    paths = _paths(tree)
    op = rng.choice(["delete", "swap_type", "swap_type", "number", "number", "quantity", "unknown_key", "typo",
                     "alias", "unit_system", "kind", "list_dup", "list_shuffle", "huge_list", "deep", "unicode",
                     "recursive_alias"])
    if op == "delete" and paths:
        p = rng.choice(paths)
        parent = _parent(tree, p)
        del parent[p[-1]]
    elif op == "swap_type" and paths:
        p = rng.choice(paths)
        _parent(tree, p)[p[-1]] = junk_value(rng)
    elif op == "number" and _numbers(tree):
        p = rng.choice(_numbers(tree))
        parent = _parent(tree, p)
        factor = rng.choice([0, 1e-9, 1e-3, 0.5, 2, 10, 1e3, 1e9, 1e300])
        try:
            scaled = parent[p[-1]] * factor
        except OverflowError:  # an integer already too large for a float
            scaled = parent[p[-1]] * 10
        parent[p[-1]] = rng.choice([-parent[p[-1]], scaled, rng.choice(SPECIAL_FLOATS)])
    elif op == "quantity" and _numbers(tree):
        p = rng.choice(_numbers(tree))
        parent = _parent(tree, p)
        parent[p[-1]] = rng.choice([f"{parent[p[-1]]} {rng.choice(['mm', 'in', 'furlong', 'ton', 'kN', 'm'])}",
                                    rng.choice(MALFORMED_QUANTITIES)])
    elif op == "unknown_key":
        targets = [tree] + [_parent(tree, p)[p[-1]] for p in paths if isinstance(_parent(tree, p)[p[-1]], dict)]
        rng.choice(targets)[rng.choice(UNICODE_TEXT + TYPO_KEYS)] = junk_value(rng)
    elif op == "typo":
        keys = [p for p in paths if isinstance(p[-1], str)]
        if keys:
            p = rng.choice(keys)
            parent = _parent(tree, p)
            parent[rng.choice(TYPO_KEYS)] = parent.pop(p[-1])
    elif op == "alias" and len(paths) >= 2:
        a, b = rng.sample(paths, 2)
        shared = _parent(tree, a)[a[-1]]
        if not isinstance(shared, (dict, list)):
            shared = [shared]
        with contextlib.suppress(KeyError, IndexError, TypeError):
            _parent(tree, b)[b[-1]] = shared  # dumped as an anchor and an alias
    elif op == "unit_system":
        tree["units"] = rng.choice(["mm", "in", "cm", "MM", "", None, 25.4])
    elif op == "kind":
        tree["kind"] = rng.choice(["rib", "wing", "Rib", "spar", None, 1])
    elif op == "list_dup":
        lists = [p for p in paths if isinstance(_parent(tree, p)[p[-1]], list)]
        if lists:
            seq = _parent(tree, (p := rng.choice(lists)))[p[-1]]
            seq.extend(copy.deepcopy(seq) * rng.randint(1, 3))
    elif op == "list_shuffle":
        lists = [p for p in paths if isinstance(_parent(tree, p)[p[-1]], list)]
        if lists:
            rng.shuffle(_parent(tree, (p := rng.choice(lists)))[p[-1]])
    elif op == "huge_list" and paths:
        p = rng.choice(paths)
        _parent(tree, p)[p[-1]] = [copy.deepcopy(_parent(tree, p)[p[-1]])] * rng.choice([10, 300, 3_000])
    elif op == "deep" and paths:
        p = rng.choice(paths)
        value: Any = _parent(tree, p)[p[-1]]
        for _ in range(rng.randint(MAX_DEPTH - 3, MAX_DEPTH + 10)):
            value = {"k": value}
        _parent(tree, p)[p[-1]] = value
    elif op == "unicode" and paths:
        p = rng.choice(paths)
        _parent(tree, p)[p[-1]] = rng.choice(UNICODE_TEXT)
    elif op == "recursive_alias" and paths:
        p = rng.choice(paths)
        loop: list[Any] = []
        loop.append(loop)
        _parent(tree, p)[p[-1]] = loop
    return tree, op


def mutate_text(text: str, rng: random.Random) -> tuple[str, str]:
    """Apply one text-level mutation; return the text and the mutation's name."""
    lines = text.splitlines(keepends=True)
    op = rng.choice(["truncate", "tab", "dup_line", "drop_line", "swap_lines", "junk_chars", "indent", "crlf",
                     "bom", "anchor_text", "merge_key", "flow_break", "doc_markers", "tag", "control"])
    if op == "truncate":
        return text[: rng.randrange(len(text) + 1)], op
    if op == "tab":
        i = rng.randrange(len(text) + 1)
        return text[:i] + "\t" + text[i:], op
    if op == "dup_line" and lines:
        i = rng.randrange(len(lines))
        lines.insert(rng.randrange(len(lines) + 1), lines[i])
    elif op == "drop_line" and lines:
        del lines[rng.randrange(len(lines))]
    elif op == "swap_lines" and len(lines) > 1:
        i, j = rng.sample(range(len(lines)), 2)
        lines[i], lines[j] = lines[j], lines[i]
    elif op == "junk_chars":
        i = rng.randrange(len(text) + 1)
        alphabet = ":-[]{},&*!|>'\"%@`#?\\ \n\t\x85\u2028\ufeff\x7f\x1b"
        junk = "".join(rng.choice(alphabet) for _ in range(rng.randint(1, 8)))
        return text[:i] + junk + text[i:], op
    elif op == "indent" and lines:
        i = rng.randrange(len(lines))
        lines[i] = " " * rng.choice([1, 2, 3, 7]) + lines[i]
    elif op == "crlf":
        return text.replace("\n", rng.choice(["\r\n", "\r"])), op
    elif op == "bom":
        return "\ufeff" + text, op
    elif op == "anchor_text":
        return text.replace("sheet: {", "sheet: &s {", 1) + rng.choice(["\nextra: *s\n", "\nskin_thickness: *s\n",
                                                                     "\nflange: *s\n", "\nx: *nothing\n"]), op
    elif op == "merge_key":
        return text.replace("sheet: {", "sheet: &s {", 1).replace("die: {", "die: {<<: *s, ", 1), op
    elif op == "flow_break" and lines:
        i = rng.randrange(len(lines))
        lines[i] = lines[i].replace("}", "", 1).replace("]", "", 1)
    elif op == "doc_markers":
        return rng.choice(["---\n" + text + "---\nkind: rib\n", "%YAML 1.1\n---\n" + text, text + "\n...\n",
                           "%YAML 9.9\n---\n" + text, "%TAG ! tag:x,2000:\n---\n" + text]), op
    elif op == "tag":
        return text.replace("chord: ", rng.choice(["chord: !!str ", "chord: !!python/object:os.system ",
                                                   "chord: !custom ", "chord: !!float ", "chord: !!binary "]), 1), op
    elif op == "control":
        i = rng.randrange(len(text) + 1)
        return text[:i] + chr(rng.choice([0, 1, 7, 8, 0x0B, 0x0C, 0x1F, 0xD800, 0xFFFE, 0xFFFF])) + text[i:], op
    return "".join(lines), op


def dump(tree: Any) -> str:
    return yaml.safe_dump(tree, allow_unicode=True, sort_keys=False, width=100)


def mutated_spec(rng: random.Random) -> tuple[str, str]:
    """One mutated demo spec: 1-3 tree mutations, then maybe a text mutation; returns (text, label)."""
    base = rng.choice([DEMO_RIB, DEMO_WING])
    if rng.random() < 0.25:  # the original text (comments, flow style) with text mutations only
        text = DEMO_RIB_TEXT if base is DEMO_RIB else DEMO_WING_TEXT
        ops = []
        for _ in range(rng.randint(1, 3)):
            text, op = mutate_text(text, rng)
            ops.append(op)
        return text, "text:" + "+".join(ops)
    tree = copy.deepcopy(base)
    ops = []
    for _ in range(rng.randint(1, 3)):
        tree, op = mutate_tree(tree, rng)
        ops.append(op)
    try:
        text = dump(tree)
    except (yaml.YAMLError, RecursionError, ValueError):
        text, ops = DEMO_RIB_TEXT, [*ops, "undumpable"]
    if rng.random() < 0.3:
        text, op = mutate_text(text, rng)
        ops.append(op)
    return text, "+".join(ops)


# ----------------------------------------------------------------------------- in-range random specs (mostly valid)

NACA = ["0006", "0009", "0012", "0015", "0018", "0021", "2412", "2415", "4412", "4415", "6409", "1408", "23012",
        "23015", "23018", "23021", "43012"]


def random_rib(rng: random.Random) -> dict[str, Any]:
    """A rib spec with every value drawn from a plausible range (most validate; many cannot be formed)."""
    units_name = rng.choice(["in", "mm"])
    k = 1.0 if units_name == "in" else 25.4
    n_spars = rng.choice([0, 1, 2, 2, 2, 3, 4])
    ats = sorted(rng.sample([round(0.08 + 0.02 * i, 2) for i in range(40)], n_spars))
    pieces = [p for p in ("nose", "center", "tail") if rng.random() < 0.8] or ["nose"]
    if rng.random() < 0.9:  # mostly only the pieces the spars can bound
        pieces = [p for p in pieces if n_spars >= {"nose": 1, "tail": 1, "center": 2}[p]] or ["nose"]
    spec: dict[str, Any] = {
        "diegen": 1, "kind": "rib", "id": f"F{rng.randrange(10**6)}", "units": units_name,
        "airfoil": rng.choice([f"naca {rng.choice(NACA)}", {"naca": rng.choice(NACA), "closed_te": rng.random() < 0.5,
                                                              "points": rng.choice([41, 121, 241, 401])},
                               {"file": str(AIRFOILS / rng.choice(["naca2412_selig.dat", "naca2412_lednicer.dat"]))}]),
        "chord": round(rng.uniform(4, 80) * k, 3),
        "skin_thickness": round(rng.uniform(0.016, 0.063) * k, 4),
        "sheet": {"alloy": rng.choice(["2024-O", "2024-T3", "3003-H14", "5052-H32", "6061-T6", "6061-O"]),
                  "thickness": round(rng.uniform(0.016, 0.08) * k, 4)},
        "flange": {"height": round(rng.uniform(0.2, 1.5) * k, 3), "bend_radius": round(rng.uniform(0.02, 0.3) * k, 4),
                   "radius_table": rng.choice(["aa", "aerospace"])},
        "spars": [{"at": at, "web": round(rng.uniform(0.02, 0.2) * k, 4),
                   "cap_thickness": rng.choice([0, round(rng.uniform(0.02, 0.1) * k, 4)]),
                   "cap_width": round(rng.uniform(0, 1.5) * k, 3)} for at in ats],
        "pieces": pieces,
        "lightening_holes": rng.choice(["auto", "none", [{"x": round(rng.uniform(0, 40) * k, 2),
                                                          "d": round(rng.uniform(0.2, 4) * k, 2)}
                                                         for _ in range(rng.randint(1, 3))]]),
        "pins": rng.choice(["auto", [{"x": round(rng.uniform(0, 40) * k, 2)} for _ in range(rng.randint(2, 3))]]),
        "relief": rng.choice(["flutes", "notches", "none"]),
        "die": {"material": rng.choice(["fibreboard", "solid-surface", "aluminium", "hdpe", "pla", "petg"]),
                "stock_thickness": round(rng.uniform(0.25, 3) * k, 3),
                "cutter_diameter": round(rng.uniform(0.06, 1) * k, 3)},
        "press": {"force": f"{rng.choice([5, 10, 25, 50, 100, 500])} ton",
                  "box": [round(rng.uniform(4, 48) * k, 1), round(rng.uniform(4, 96) * k, 1)],
                  "rubber": {"durometer": rng.randint(20, 95), "thickness": round(rng.uniform(0.5, 4) * k, 2)}},
    }
    if rng.random() < 0.3:
        spec["hole_rules"] = {"edge_margin": round(rng.uniform(0, 0.5) * k, 3), "flanged": rng.random() < 0.5}
    if rng.random() < 0.2:
        spec["die"]["print_bed"] = [rng.choice([120, 220, 350]), rng.choice([120, 220, 350])]
    if rng.random() < 0.2:
        spec["joggle_runout"] = rng.choice([1, 2, 4, 10, 20])
    return spec


def random_wing(rng: random.Random, max_stations: int = 4) -> dict[str, Any]:
    """A small wing spec (at most ``max_stations`` ribs so analysing it stays quick)."""
    rib = random_rib(rng)
    k = 1.0 if rib["units"] == "in" else 25.4
    spars = [{"root_at": s["at"], "tip_at": round(min(0.95, max(0.05, s["at"] + rng.uniform(-0.05, 0.05))), 3),
              **{key: s[key] for key in ("web", "cap_thickness", "cap_width")}} for s in rib["spars"]]
    spars = [s for i, s in enumerate(spars) if i == 0 or s["tip_at"] > spars[i - 1]["tip_at"]]
    rib["spars"] = spars
    rib["pieces"] = [p for p in rib["pieces"] if len(spars) >= {"nose": 1, "tail": 1, "center": 2}[p]] or ["nose"]
    wing = {key: value for key, value in rib.items() if key not in ("chord", "airfoil")}
    wing["kind"] = "wing"
    span = round(rng.uniform(10, 200) * k, 1)
    wing["planform"] = {"root_chord": round(rng.uniform(10, 80) * k, 2), "tip_chord": round(rng.uniform(4, 80) * k, 2),
                        "span": span, "sweep": round(rng.uniform(-30, 30), 1), "sweep_line": rng.choice([0, 0.25, 1]),
                        "stations": rng.choice([{"count": rng.randint(2, max_stations)},
                                                sorted({round(rng.uniform(0, span), 1) for _ in range(max_stations)})]),
                        "rib_orientation": rng.choice(["streamwise", "normal-to-spar"])}
    wing["airfoil"] = rng.choice([rib["airfoil"],
                                  {"root": f"naca {rng.choice(NACA)}", "tip": f"naca {rng.choice(NACA)}"}])
    if rng.random() < 0.5:
        wing["overrides"] = [{"ribs": [1], "sheet": {"thickness": round(rng.uniform(0.02, 0.08) * k, 4)}},
                             {"ribs": [2], "lightening_holes": "none", "relief": "notches"}]
    return wing


# Values at or next to the bounds the schema accepts (mm unless a unit is given; see specs/README.md).
EDGE_VALUES: dict[tuple, list[Any]] = {
    ("chord",): ["0.01 mm", "1e-300 mm", 5e-324, "1 mm", "20000 mm", "10 mm"],
    ("skin_thickness",): ["0.001 mm", "1e-300 mm", 5e-324, "12.7 mm", "5 mm"],
    ("sheet", "thickness"): ["0.001 mm", "1e-300 mm", 5e-324, "12.7 mm", "6 mm"],
    ("flange", "height"): ["0.001 mm", "1e-300 mm", 5e-324, "200 mm", "0.5 mm"],
    ("flange", "bend_radius"): ["0.0001 mm", "1e-300 mm", 5e-324, "100 mm", "30 mm"],
    ("flange", "min_tail_depth"): ["0.001 mm", "1e-300 mm", 5e-324, "99999 mm", "1 mm"],
    ("spars", 0, "at"): [1e-9, 0.5, 0.999999, 0.01],
    ("spars", 0, "web"): ["0.001 mm", "1e-300 mm", 5e-324, "50 mm"],
    ("spars", 0, "cap_thickness"): [0, "25 mm", "0.001 mm", "1e-300 mm", 5e-324],
    ("spars", 0, "cap_width"): [0, "200 mm", "0.001 mm", "1e-300 mm", 5e-324],
    ("lightening_holes",): [[{"x": "0.001 mm", "d": "0.001 mm"}], [{"x": "1e-300 mm", "d": 5e-324}],
                            [{"x": "99999 mm", "d": "99999 mm"}],
                            [{"x": "100 mm", "d": "50 mm", "y": "-99999 mm"}],
                            [{"x": "100 mm", "d": "20 mm", "flange_height": "99999 mm"}],
                            [{"x": "100 mm", "d": "20 mm"}, {"x": "100 mm", "d": "20 mm"}]],
    ("pins",): [[{"x": "0.001 mm"}, {"x": "99999 mm"}], [{"x": 5e-324}, {"x": "1e-300 mm"}],
                [{"x": "50 mm", "y": "-99999 mm"}, {"x": "60 mm"}],
                [{"x": "100 mm"}, {"x": "100 mm"}]],
    ("hole_rules",): [{"edge_margin": 0, "ligament": "0.001 mm", "min_diameter": "0.001 mm"},
                      {"ligament": 5e-324, "min_diameter": "1e-300 mm"},
                      {"edge_margin": "99999 mm"}, {"min_diameter": "99999 mm"}, {"flange_height": "99999 mm"}],
    ("dowel_diameter",): ["0.001 mm", "1e-300 mm", 5e-324, "25.4 mm"],
    ("joggle_runout",): [1, 20],
    ("die", "stock_thickness"): ["0.001 mm", "1e-300 mm", 5e-324, "300 mm"],
    ("die", "cutter_diameter"): ["0.001 mm", "1e-300 mm", 5e-324, "50 mm"],
    ("die", "print_bed"): [[0.001, 0.001], [1, 99999], [10, 10]],
    ("die", "stl_tolerance"): ["0.000001 mm", "1 mm"],
    ("press", "force"): ["0.001 N", "1e8 N", "1 lbf"],
    ("press", "box"): [["0.001 mm", "0.001 mm"], ["1e-300 mm", 5e-324], ["99999 mm", "99999 mm"], ["10 mm", "10 mm"]],
    ("press", "wall_clearance"): [0, "99999 mm"],
    ("press", "rubber", "thickness"): ["0.001 mm", "1e-300 mm", 5e-324, "500 mm"],
    ("press", "rubber", "durometer"): [20, 95],
    ("airfoil",): ["naca 0001", "naca 9999", "naca 0099", "naca 00001", "naca 99999", "naca 23099", "naca 00100",
                   {"naca": "2412", "points": 41}, {"naca": "0006", "points": 4001, "closed_te": False}],
    ("planform", "span"): ["0.001 mm", "1e-300 mm", 5e-324, "100000 mm"],
    ("planform", "tip_chord"): ["0.001 mm", "1e-300 mm", 5e-324, "20000 mm"],
    ("planform", "root_chord"): ["0.001 mm", "1e-300 mm", 5e-324],
    ("planform", "sweep"): [-60, 60],
    ("planform", "sweep_line"): [0, 1],
    ("planform", "stations"): [{"pitch": "0.001 mm"}, {"pitch": "1e-300 mm"}, {"pitch": "99999 mm"}, {"count": 2},
                               [0, "0.001 mm"], [0, 5e-324]],
}


def edge_spec(rng: random.Random) -> dict[str, Any]:
    """A random in-range rib or small wing with one to three values moved to the edge of what validates."""
    spec = random_rib(rng) if rng.random() < 0.75 else random_wing(rng, max_stations=3)
    wing = spec["kind"] == "wing"
    for _ in range(rng.randint(1, 3)):
        path = rng.choice([p for p in EDGE_VALUES if (p[0] == "planform") == wing or p[0] not in ("planform", "chord")])
        if wing and path == ("spars", 0, "at"):
            path = ("spars", 0, rng.choice(["root_at", "tip_at"]))
        node: Any = spec
        try:
            for key in path[:-1]:
                node = node.setdefault(key, {}) if isinstance(key, str) else node[key]
            node[path[-1]] = copy.deepcopy(rng.choice(EDGE_VALUES[tuple(k if k not in ("root_at", "tip_at") else "at"
                                                                         for k in path)]))
        except (IndexError, KeyError, TypeError):
            pass
    return spec


# ----------------------------------------------------------------------------- the loops


def run_mutations(count: int, seed: int) -> tuple[Counter, list[str], list[tuple[str, str, str]]]:
    """Load ``count`` mutated demo specs; return (outcome counts, valid texts, escapes as (label, text, trace))."""
    rng = random.Random(seed)
    counts: Counter = Counter()
    valid: list[str] = []
    escapes: list[tuple[str, str, str]] = []
    for _ in range(count):
        text, label = mutated_spec(rng)
        try:
            kind, result = outcome(text)
        except Escape as error:
            escapes.append((label, text, "".join(traceback.format_exception(error.__cause__ or error))))
            counts["ESCAPE"] += 1
            continue
        counts[kind] += 1
        if kind == "valid":
            valid.append(text)
        else:
            counts[f"  SpecError: {first_problem_kind(result)}"] += 1
    return counts, valid, escapes


def print_counts(title: str, counts: Counter) -> None:
    report(title)
    for key, n in sorted(counts.items(), key=lambda kv: (kv[0].startswith(" "), -kv[1])):
        report(f"  {key:<55} {n:6d}")


def assert_no_escapes(escapes: list[tuple[str, str, str]]) -> None:
    if escapes:
        label, text, trace = escapes[0]
        shown = text if len(text) < 3_000 else text[:3_000] + "\n[...]"
        pytest.fail(f"{len(escapes)} escape(s); first after mutation {label}:\n{trace}\n--- spec ---\n{shown}")


def analyse_outcome(spec: Any) -> str:
    """'ok' or the DiegenError subclass name; any other exception propagates."""
    from diegen import api

    try:
        api.analyse(spec)
    except DiegenError as error:
        return type(error).__name__
    return "ok"


def run_random_analyses(ribs: int, wings: int, seed: int, edges: int = 0) -> tuple[Counter, list[tuple[str, str]]]:
    """Validate and analyse in-range random specs (and ``edges`` specs at the schema's bounds).

    Returns (counts, escapes as (spec text, traceback)).
    """
    rng = random.Random(seed)
    counts: Counter = Counter()
    escapes: list[tuple[str, str]] = []
    for i in range(ribs + wings + edges):
        text = dump(random_rib(rng) if i < ribs else random_wing(rng) if i < ribs + wings else edge_spec(rng))
        kind, result = outcome(text)
        if kind != "valid":
            counts[f"spec rejected: {first_problem_kind(result)}"] += 1
            continue
        analyse_and_count(result, text, counts, escapes)
    return counts, escapes


def _innermost_diegen_function(error: BaseException) -> str:
    frames = [f for f in traceback.extract_tb(error.__traceback__) if f"{os.sep}diegen{os.sep}" in f.filename]
    return frames[-1].name if frames else "?"


def analyse_and_count(spec: Any, text: str, counts: Counter, escapes: list[tuple[str, str]]) -> None:
    """Analyse one valid spec; count the outcome; an escape is counted and listed."""
    try:
        counts[f"analyse: {analyse_outcome(spec)}"] += 1
    except Exception as error:  # noqa: BLE001 - the property under test
        counts[f"analyse ESCAPE: {type(error).__name__} in {_innermost_diegen_function(error)}"] += 1
        escapes.append((text, "".join(traceback.format_exception(error))))


# Inputs that once validated and then escaped from the analysis as raw exceptions; lengths under a
# micrometre are now refused by the loader with the limit.
TINY_LENGTHS = {
    "denormal die stock": (DEMO_RIB_TEXT.replace("stock_thickness: 0.5", "stock_thickness: 5e-324"),
                           "die.stock_thickness"),
    "rubber box area underflows to 0": (DEMO_RIB_TEXT.replace("box: [12, 10]", "box: [1e-200, 1e-200]"),
                                        "press.box[0]"),
    "tip chord rounds the tip rib to 0": (DEMO_WING_TEXT.replace("tip_chord: 36", "tip_chord: 1e-300"),
                                          "planform.tip_chord"),
}


@pytest.mark.parametrize("name", list(TINY_LENGTHS))
def test_tiny_lengths_are_refused_with_the_limit(name):
    text, key = TINY_LENGTHS[name]
    kind, error = outcome(text)
    assert kind == "SpecError"
    assert any(p.key == key and "at least 0.001 mm" in p.message for p in error.problems), str(error)


def _rib(old: str, new: str) -> str:
    assert old in DEMO_RIB_TEXT, old
    return DEMO_RIB_TEXT.replace(old, new, 1)


def _wing(old: str, new: str) -> str:
    assert old in DEMO_WING_TEXT, old
    return DEMO_WING_TEXT.replace(old, new, 1)


# Inputs that once escaped as a raw exception or were accepted wrongly: (text, key path, message fragment).
LOADER_REGRESSIONS = {
    "integer beyond float range": (_rib("chord: 40", "chord: 1" + "0" * 400), "chord", "finite"),
    "integer beyond float range (number)": (_rib("durometer: 55", "durometer: 1" + "0" * 400),
                                            "press.rubber.durometer", "finite"),
    "integer beyond float range (whole)": (_rib("airfoil: naca 2412", "airfoil: {naca: '2412', points: 1"
                                                + "0" * 400 + "}"), "airfoil.points", "finite"),
    "integer over the digit limit": (_rib("chord: 40", "chord: 1" + "0" * 5_000), "", "cannot read value"),
    "month 13": (_rib("chord: 40", "chord: 2001-13-45"), "", "cannot read value"),
    "stations with an unknown key only": (_wing("{count: 13}", "{bend: 13}"), "planform.stations",
                                          "exactly one of 'count' or 'pitch'"),
    "pitch giving a million ribs": (_wing("{count: 13}", '{pitch: "0.001 mm"}'), "planform.stations", "at most 200"),
    "bad holes with overrides": (_wing("lightening_holes: auto", "lightening_holes: bogus"), "lightening_holes",
                                 "expected one of"),
    "bad pins with overrides": (_wing("pins: auto", "pins: bogus"), "pins", "expected one of"),
    "centre listed twice": (_rib("[nose, center, tail]", "[centre, center, tail]"), "pieces[1]", "twice"),
    "octal naca": (_rib("airfoil: naca 2412", "airfoil: {naca: 0012}"), "airfoil.naca", "in quotes"),
    "naca as a list": (_rib("airfoil: naca 2412", "airfoil: {naca: [2412]}"), "airfoil.naca", "4 or 5 digits"),
    "file name too long": (_rib("airfoil: naca 2412", "airfoil: {file: " + "a" * 5_000 + "}"), "airfoil.file",
                           "file name"),
    "file name with NUL": (_rib("airfoil: naca 2412", 'airfoil: {file: "a\\0b"}'), "airfoil.file", "file name"),
    "length as a list of aliases": (_rib("chord: 40", "chord: &c [40, 41]\nx: *c"), "chord", "found a list"),
    "quantity of 100 000 spaces": (_rib('"3/32 in"', '"3/32' + " " * 100_000 + '!"'), "flange.bend_radius",
                                   "character string"),
    "naca of 100 000 spaces": (_rib("airfoil: naca 2412", 'airfoil: "naca' + " " * 100_000 + 'x"'), "airfoil",
                               "expected 'naca'"),
    "control character": (_rib("id: T1", "id: T\x071"), "", "not a text file"),
}


@pytest.mark.parametrize("name", list(LOADER_REGRESSIONS))
def test_loader_regressions(name):
    text, key, fragment = LOADER_REGRESSIONS[name]
    start = time.perf_counter()
    kind, error = outcome(text)
    assert time.perf_counter() - start < REFUSE_SECONDS
    assert kind == "SpecError"
    assert any(fragment in p.message and p.key.startswith(key) for p in error.problems), error


# ----------------------------------------------------------------------------- quick tier


def test_mutated_specs_quick():
    counts, _valid, escapes = run_mutations(150, seed=1)
    print_counts("mutated specs (quick)", counts)
    assert_no_escapes(escapes)
    assert counts["valid"] + counts["SpecError"] == 150


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.text(alphabet=st.characters(blacklist_categories=("Cs",)), max_size=300))
def test_arbitrary_text(text):
    """Any text at all: a spec or a located SpecError."""
    outcome(text)


YAML_SCALARS = st.one_of(st.none(), st.booleans(), st.integers(), st.floats(allow_nan=True, allow_infinity=True),
                         st.text(max_size=30), st.sampled_from(MALFORMED_QUANTITIES))
YAML_TREES = st.recursive(
    YAML_SCALARS,
    lambda inner: st.one_of(st.lists(inner, max_size=5), st.dictionaries(st.text(max_size=12), inner, max_size=5)),
    max_leaves=20)
DEMO_KEYS = sorted({p[-1] for base in (DEMO_RIB, DEMO_WING) for p in _paths(base) if isinstance(p[-1], str)})


def put_everywhere(base: str, key: str, value: Any) -> str:
    """The demo ``base`` spec with every occurrence of ``key`` set to ``value``, as YAML text."""
    tree = copy.deepcopy(DEMO_RIB if base == "rib" else DEMO_WING)

    def put(node: Any) -> None:
        if isinstance(node, dict):
            for k in node:
                if k == key:
                    node[k] = copy.deepcopy(value)
                else:
                    put(node[k])
        elif isinstance(node, list):
            for item in node:
                put(item)

    put(tree)
    return dump(tree)


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(base=st.sampled_from(["rib", "wing"]), key=st.sampled_from(DEMO_KEYS), value=YAML_TREES)
def test_any_value_for_any_key(base, key, value):
    """Every occurrence of one key of the demo specs set to an arbitrary YAML value."""
    outcome(put_everywhere(base, key, value))


@settings(max_examples=200, deadline=None)
@given(st.one_of(st.text(max_size=80), st.integers(), st.floats(), st.booleans(), st.none(),
                 st.from_regex(r"\A\s*\d{1,40}(\s+\d{1,40})?\s*/\s*\d{1,40}\s*[a-zA-Z\" ]{0,12}\Z"),
                 st.from_regex(r"\A\s*[-+]?\d{0,400}(\.\d{0,20})?([eE][-+]?\d{1,4})?\s*[a-z ]{0,8}\Z")))
def test_quantity_parser(value):
    """Lengths and forces: a finite float or a UnitError, never another exception."""
    for parse in (lambda v: units.length_mm(v, "in"), units.force_n):
        try:
            result = parse(value)
        except units.UnitError as error:
            assert str(error)
        else:
            assert math.isfinite(result)


def test_demo_specs_still_valid():
    assert outcome(DEMO_RIB_TEXT)[0] == "valid"
    assert outcome(DEMO_WING_TEXT)[0] == "valid"
    assert outcome(dump(DEMO_RIB))[0] == "valid"  # the dumped tree round-trips


def _bomb(levels: int = 9, width: int = 9) -> str:
    lines = ["a0: &a0 [" + ", ".join(["lol"] * width) + "]"]
    for i in range(1, levels):
        lines.append(f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * width) + "]")
    return "\n".join(lines) + "\nkind: rib\nunits: in\n"


def _many_values(n: int) -> str:
    return DEMO_RIB_TEXT + "extra: [" + ", ".join("1" for _ in range(n)) + "]\n"


HOSTILE = {
    # name: (text, fragment the first problem's message must contain)
    "alias bomb 9^9": (_bomb(), "after expanding anchors and aliases"),
    "alias bomb 20^6": (_bomb(6, 20), "after expanding anchors and aliases"),
    "recursive alias": ("kind: rib\nunits: in\na: &a [*a, *a, *a]\n", "nested deeper"),
    "alias chain": ("\n".join([f"a{i}: &a{i} [*a{i - 1}, *a{i - 1}]" if i else "a0: &a0 [1]" for i in range(60)]),
                    "after expanding"),
    "deep flow list": ("kind: rib\nunits: in\nx: " + "[" * 100_000 + "]" * 100_000, "nested deeper"),
    "deep flow map": ("kind: rib\nunits: in\nx: " + "{a: " * 30_000 + "1" + "}" * 30_000, "nested deeper"),
    "deep block": ("kind: rib\nunits: in\nx:\n" + "".join(" " * (i + 2) + "-\n" for i in range(0, 400, 2)),
                   "nested deeper"),
    "too many values": (_many_values(MAX_NODES + 10), "spec too large"),
    "many block items": ("kind: rib\nunits: in\nx:\n" + "- 1\n" * 60_000, "spec too large"),
    "over the size limit": ("a: " + "x" * (MAX_FILE_BYTES + 10), "larger than"),
    "huge plain string": (DEMO_RIB_TEXT + "title2: " + "x" * (MAX_FILE_BYTES - 2_000) + "\n", "unknown key"),
    "huge quoted string": (DEMO_RIB_TEXT.replace("title: ", "title: \"" + "\\x41" * ((MAX_FILE_BYTES - 2_000) // 4)
                                                 + "\" # ", 1), ""),
    "huge title": (DEMO_RIB_TEXT.replace("title: ", "title: " + "y" * (MAX_FILE_BYTES - 2_000) + " ", 1), ""),
    "huge quantity": (DEMO_RIB_TEXT.replace('"3/32 in"', '"3/32' + " " * (MAX_FILE_BYTES - 2_000) + '!"'),
                      "character string"),
    "huge naca": (DEMO_RIB_TEXT.replace("airfoil: naca 2412", "airfoil: \"naca" + " " * (MAX_FILE_BYTES - 2_000)
                                        + "x\""), "expected 'naca'"),
    "huge integer": (DEMO_RIB_TEXT.replace("chord: 40", "chord: 1" + "0" * 4_000), "finite"),
    "integer over the digit limit": (DEMO_RIB_TEXT.replace("chord: 40", "chord: 1" + "0" * 5_000), "cannot read value"),
    "huge fraction": (DEMO_RIB_TEXT.replace('"3/32 in"', '"' + "9" * 30 + "/1 in\""), "at most"),
    "long fraction": (DEMO_RIB_TEXT.replace('"3/32 in"', '"1/' + "0" * 5_000 + '3 in"'), "character string"),
    "many unknown keys": (DEMO_RIB_TEXT + "".join(f"k{i}: {i}\n" for i in range(MAX_NODES // 2 - 100)), "unknown key"),
    "many long unknown keys": (DEMO_RIB_TEXT + "".join(f"{'q' * 1000}{i}: 1\n" for i in range(200)), "unknown key"),
    "long comment lines": (DEMO_RIB_TEXT + ("#" + "c" * 998 + "\n") * 200, ""),
    "binary junk": ("".join(chr(c) for c in random.Random(3).choices(range(256), k=200_000)), ""),
}


# Near the size and value limits: each takes about a second (twice, once under tracemalloc).
SLOW_HOSTILE = {"deep flow list", "too many values", "many block items", "huge plain string", "huge quoted string",
                "huge title", "huge quantity", "huge naca", "many unknown keys", "many long unknown keys",
                "long comment lines"}


@pytest.mark.parametrize("name", [pytest.param(n, marks=pytest.mark.slow) if n in SLOW_HOSTILE else n for n in HOSTILE])
def test_hostile_input_refused_quickly(name):
    """Alias bombs, deep nesting and huge inputs: refused (or read) within the safety bounds."""
    text, fragment = HOSTILE[name]
    (kind, result), seconds, peak = timed_with_peak(outcome, text)
    report(f"{name}: {len(text)} characters, {seconds:.3f} s, peak {peak / 2**20:.1f} MB, {kind}")
    assert kind == "SpecError" or not fragment
    if fragment:
        assert fragment in result.problems[0].message, result
    assert seconds < REFUSE_SECONDS, f"{name}: {seconds:.2f} s"
    assert peak < REFUSE_PEAK_BYTES, f"{name}: peak {peak / 2**20:.0f} MB"


def test_bad_files_on_disk(tmp_path):
    """File-level failures of load_spec: binary, not UTF-8, empty, folder, missing, oversized (sparse)."""
    cases = {
        "binary.yaml": bytes(random.Random(5).randrange(256) for _ in range(5_000)),
        "latin1.yaml": DEMO_RIB_TEXT.replace("Brackenwold", "Brackenwöld").encode("latin-1"),
        "utf16.yaml": DEMO_RIB_TEXT.encode("utf-16"),
        "empty.yaml": b"",
        "bom.yaml": DEMO_RIB_TEXT.encode("utf-8-sig"),
        "nul.yaml": DEMO_RIB_TEXT.encode() + b"\x00",
    }
    for name, data in cases.items():
        (tmp_path / name).write_bytes(data)
    big = tmp_path / "sparse.yaml"
    with big.open("wb") as handle:
        handle.truncate(50 * 2**20)  # sparse: must be refused before reading
    (tmp_path / "folder.yaml").mkdir()
    for path in [*(tmp_path / n for n in cases), big, tmp_path / "folder.yaml", tmp_path / "missing.yaml"]:
        start = time.perf_counter()
        try:
            spec = load_spec(path)
        except SpecError as error:
            check_spec_error(error, str(path))
        else:
            assert path.name == "bom.yaml" and isinstance(spec, RibSpec)
        assert time.perf_counter() - start < REFUSE_SECONDS


def _cli(paths: list[Path], timeout: float = 300.0) -> list[tuple[Path, int, str, float]]:
    """Run ``diegen check`` on each path, two at a time; return (path, exit code, stderr, seconds)."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    env.pop("DIEGEN_DEBUG", None)
    results = []
    pending = list(paths)
    running: list[tuple[Path, subprocess.Popen, float]] = []
    while pending or running:
        while pending and len(running) < 2:
            path = pending.pop(0)
            proc = subprocess.Popen([sys.executable, "-m", "diegen.cli", "check", str(path)], cwd=ROOT, env=env,
                                    stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
            running.append((path, proc, time.perf_counter()))
        path, proc, start = running.pop(0)
        try:
            _, err = proc.communicate(timeout=timeout)
        except subprocess.TimeoutExpired:
            proc.kill()
            _, err = proc.communicate()
            err = f"TIMEOUT after {timeout} s\n{err}"
        results.append((path, proc.returncode, err, time.perf_counter() - start))
    return results


def _assert_cli_results(results: list[tuple[Path, int, str, float]]) -> Counter:
    counts: Counter = Counter()
    bad = []
    for path, code, err, seconds in results:
        counts[f"exit {code}"] += 1
        if code not in (0, 1, 2) or "Traceback" in err or "TIMEOUT" in err:  # 1: a die check refuses
            bad.append(f"{path.name}: exit {code} after {seconds:.1f} s\n{err[-2_000:]}\n{path.read_text()[:1_500]}")
    if bad:
        pytest.fail(f"{len(bad)} CLI run(s) failed:\n\n" + "\n\n".join(bad[:3]))
    return counts


def test_cli_check_quick(tmp_path):
    rng = random.Random(11)
    paths = []
    for i in range(2):
        text, _ = mutated_spec(rng)
        (path := tmp_path / f"m{i}.yaml").write_text(text, encoding="utf-8", errors="surrogatepass")
        paths.append(path)
    (path := tmp_path / "bomb.yaml").write_text(_bomb(), encoding="utf-8")
    paths.append(path)
    print_counts("diegen check (quick)", _assert_cli_results(_cli(paths)))


def test_random_specs_analyse_quick():
    counts, escapes = run_random_analyses(ribs=2, wings=1, seed=2)
    print_counts("in-range random specs, analysed (quick)", counts)
    if escapes:
        text, trace = escapes[0]
        pytest.fail(f"{len(escapes)} analysis escape(s); first:\n{trace}\n--- spec ---\n{text}")


# ----------------------------------------------------------------------------- slow tier


@pytest.mark.slow
def test_mutated_specs_many():
    total = 0
    all_counts: Counter = Counter()
    escapes_all = []
    for seed in range(100, 104):
        counts, _, escapes = run_mutations(500, seed=seed)
        all_counts.update(counts)
        escapes_all.extend(escapes)
        total += 500
    print_counts(f"mutated demo specs: {total} cases", all_counts)
    assert_no_escapes(escapes_all)
    assert total >= 2_000
    assert all_counts["valid"] + all_counts["SpecError"] == total


@pytest.mark.slow
@settings(max_examples=1_000, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(base=st.sampled_from(["rib", "wing"]), key=st.sampled_from(DEMO_KEYS), value=YAML_TREES)
def test_any_value_for_any_key_many(base, key, value):
    outcome(put_everywhere(base, key, value))


@pytest.mark.slow
def test_random_specs_analyse_many():
    """In-range random specs, specs at the schema's bounds and valid mutated demo specs: analysed."""
    counts, escapes = run_random_analyses(ribs=60, wings=10, seed=20, edges=200)
    _, valid, _ = run_mutations(800, seed=21)
    for text in valid[:50]:
        analyse_and_count(outcome(text)[1], text, counts, escapes)
    print_counts(f"specs analysed: 270 random and edge, {min(50, len(valid))} valid mutated", counts)
    if escapes:
        summary = Counter(trace.strip().splitlines()[-1] for _, trace in escapes)
        text, trace = escapes[0]
        pytest.fail(f"{len(escapes)} analysis escape(s): {dict(summary)}\nfirst:\n{trace}\n--- spec ---\n{text}")


@pytest.mark.slow
def test_cli_check_many(tmp_path):
    """``diegen check`` on 30 mutated files: exit 0, 1 (a die refused) or 2, no traceback, bounded time."""
    rng = random.Random(12)
    texts = [mutated_spec(rng)[0] for _ in range(20)]  # mostly rejected
    while len(texts) < 30:  # and ten that validate, so the analysis runs too
        text = dump(random_rib(rng) if len(texts) % 4 else random_wing(rng, max_stations=3))
        if outcome(text)[0] == "valid":
            texts.append(text)
    paths = []
    for i, text in enumerate(texts):
        (path := tmp_path / f"m{i:02d}.yaml").write_text(text, encoding="utf-8", errors="surrogatepass")
        paths.append(path)
    print_counts("diegen check on 30 mutated specs", _assert_cli_results(_cli(paths)))
