"""Reading and validating spec files (YAML) into plain data in mm / N / MPa."""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import replace
from pathlib import Path

from diegen.errors import Problem, SpecError
from diegen.spec.model import RibSpec, SetSpec, Spec, SpecPositions, WingSpec
from diegen.spec.plausible import unit_warnings
from diegen.spec.reader import Reader
from diegen.spec.schema import read_rib, read_wing
from diegen.spec.yamltree import YNode, load_file, load_text
from diegen.units import SPEC_UNITS

SPEC_KINDS = ("rib", "wing", "part", "set")

__all__ = ["SPEC_KINDS", "RibSpec", "SetSpec", "Spec", "SpecError", "WingSpec", "load_spec", "parse_spec"]


def _validate(tree: YNode, file: str, spec_dir: Path, in_set: bool = False) -> Spec:
    if not tree.is_map:
        raise SpecError(Problem("expected a mapping of keys at the top of the spec", file, tree.line, tree.column))
    root = tree.value
    pre = Reader(file)
    units_name = pre.choice(root.get("units"), "units", SPEC_UNITS) if "units" in root else None
    kind = pre.choice(root.get("kind"), "kind", SPEC_KINDS) if "kind" in root else None
    for key, choices in (("units", "in or mm"), ("kind", "rib, wing, part or set")):
        if key not in root:
            pre.problem(tree, key, f"missing required key {key!r} ({choices})")
    if pre.problems and kind is None:
        raise SpecError(pre.problems)
    reader = Reader(file, units_name or "mm")
    reader.problems.extend(pre.problems)
    # read here, not at import: the part and set readers use the drawing readers, which use this package's model
    from diegen.spec.part import read_part
    from diegen.spec.set import read_set

    if kind == "set":
        if in_set:
            raise SpecError(Problem("a set holds parts and ribs, not another set", file, root["kind"].line,
                                    root["kind"].column, "kind"))
        spec = read_set(reader, root, spec_dir, _member)
    else:
        spec = {"rib": read_rib, "wing": read_wing, "part": read_part}[kind](reader, root, spec_dir)
    if reader.problems:
        raise SpecError(sorted(reader.problems, key=lambda p: (p.file != file, p.file, p.line or 0, p.column or 0)))
    positions = SpecPositions(file, tuple(_key_positions(tree, "")))
    warnings = tuple(unit_warnings(tree, reader.units, file))
    if isinstance(spec, SetSpec):  # a part drawn by the set's `drawings` section finds its keys and warnings there
        drawn = replace(positions, prefixes=("drawings.", ""))
        own = tuple(w for w in warnings if w.key.startswith("drawings."))
        spec = replace(spec, members=tuple(replace(m, positions=drawn, unit_warnings=own) if m.file == file else m
                                           for m in spec.members))
    return replace(spec, positions=positions, unit_warnings=warnings)


def _member(path: Path) -> Spec:
    """A spec file a set lists, loaded as it would load alone (but not another set)."""
    return _validate(load_file(path), str(path), path.resolve().parent, in_set=True)


def _key_positions(node: YNode, path: str) -> Iterator[tuple[str, int, int]]:
    """Every key path under ``node`` with the line and column of its key (of the item, in a list)."""
    if node.is_map:
        for key, child in node.value.items():
            child_path = f"{path}.{key}" if path else str(key)
            yield (child_path, *node.keys.get(key, (child.line, child.column)))
            yield from _key_positions(child, child_path)
    elif node.is_list:
        for i, child in enumerate(node.value):
            yield f"{path}[{i}]", child.line, child.column
            yield from _key_positions(child, f"{path}[{i}]")


def load_spec(path: str | Path) -> Spec:
    """Load and validate the spec file at ``path``; raise :class:`SpecError` listing every problem."""
    path = Path(path)
    return _validate(load_file(path), str(path), path.resolve().parent)


def parse_spec(text: str, file: str = "<spec>", spec_dir: str | Path = ".") -> Spec:
    """Validate spec ``text`` (relative airfoil files are found from ``spec_dir``)."""
    return _validate(load_text(text, file), file, Path(spec_dir).resolve())
