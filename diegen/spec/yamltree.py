"""Safe YAML loading that keeps the line and column of every key and value.

Only ``yaml.SafeLoader`` is used (no arbitrary object construction).  The node
graph is converted into :class:`YNode` values with their positions so that every
validation message can point at the exact place in the file.  Alias bombs and
deep nesting are refused quickly by a node budget and a depth limit.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml

from diegen.errors import Problem, SpecError

MAX_FILE_BYTES = 1_000_000
MAX_NODES = 200_000  # after alias expansion
MAX_DEPTH = 40


@dataclass
class YNode:
    """A YAML value with its 1-based position; mappings and sequences hold YNodes."""

    value: Any
    line: int
    column: int
    keys: dict[str, tuple[int, int]] = field(default_factory=dict)  # mapping key -> its position

    @property
    def is_map(self) -> bool:
        return isinstance(self.value, dict)

    @property
    def is_list(self) -> bool:
        return isinstance(self.value, list)

    def plain(self) -> Any:
        """The value with all positions stripped (plain dicts, lists and scalars)."""
        if self.is_map:
            return {k: v.plain() for k, v in self.value.items()}
        if self.is_list:
            return [v.plain() for v in self.value]
        return self.value


def _mark(node: yaml.Node) -> tuple[int, int]:
    return node.start_mark.line + 1, node.start_mark.column + 1


class _Converter:
    def __init__(self, file: str):
        self.file = file
        self.budget = MAX_NODES
        self.constructor = yaml.SafeLoader("")

    def fail(self, node: yaml.Node, message: str) -> SpecError:
        line, column = _mark(node)
        return SpecError(Problem(message, self.file, line, column))

    def convert(self, node: yaml.Node, depth: int = 0) -> YNode:
        self.budget -= 1
        if self.budget < 0:
            raise self.fail(node, f"spec too large: more than {MAX_NODES} values after expanding anchors and aliases")
        if depth > MAX_DEPTH:
            raise self.fail(node, f"spec nested deeper than {MAX_DEPTH} levels")
        line, column = _mark(node)
        if isinstance(node, yaml.MappingNode):
            result = YNode({}, line, column)
            for key_node, value_node in node.value:
                if key_node.tag == "tag:yaml.org,2002:merge":
                    raise self.fail(key_node, "YAML merge keys ('<<') are not supported: write the keys out")
                if not isinstance(key_node, yaml.ScalarNode):
                    raise self.fail(key_node, "expected a plain key, found a mapping or list used as a key")
                key = str(self.constructor.construct_object(key_node))
                if key in result.value:
                    raise self.fail(key_node, f"duplicate key {key!r} (first at line {result.keys[key][0]})")
                result.keys[key] = _mark(key_node)
                result.value[key] = self.convert(value_node, depth + 1)
            return result
        if isinstance(node, yaml.SequenceNode):
            return YNode([self.convert(item, depth + 1) for item in node.value], line, column)
        return YNode(self.constructor.construct_object(node), line, column)


def load_text(text: str, file: str = "<spec>") -> YNode:
    """Parse YAML ``text`` into a :class:`YNode` tree; raise :class:`SpecError` with position on failure."""
    if len(text.encode("utf-8", "surrogatepass")) > MAX_FILE_BYTES:
        raise SpecError(Problem(f"spec file larger than {MAX_FILE_BYTES // 1000} kB: not a spec", file))
    try:
        root = yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line, column = (mark.line + 1, mark.column + 1) if mark else (None, None)
        raise SpecError(Problem(f"YAML syntax error: {exc.problem or exc}", file, line, column)) from None
    except yaml.YAMLError as exc:
        raise SpecError(Problem(f"YAML error: {exc}", file)) from None
    if root is None:
        raise SpecError(Problem("the spec is empty", file, 1, 1))
    try:
        return _Converter(file).convert(root)
    except yaml.constructor.ConstructorError as exc:
        mark = exc.problem_mark
        raise SpecError(Problem(f"cannot read value: {exc.problem}", file, mark.line + 1 if mark else None)) from None
    except RecursionError:
        raise SpecError(Problem("spec nested too deeply", file)) from None


def load_file(path: str | Path) -> YNode:
    """Read and parse the spec file at ``path``."""
    path = Path(path)
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise SpecError(Problem(f"file is {size} bytes: larger than {MAX_FILE_BYTES // 1000} kB, not a spec", str(path)))
        raw = path.read_bytes()
    except FileNotFoundError:
        raise SpecError(Problem("file not found", str(path))) from None
    except IsADirectoryError:
        raise SpecError(Problem("is a folder, expected a YAML spec file", str(path))) from None
    except OSError as exc:
        raise SpecError(Problem(f"cannot read file: {exc.strerror}", str(path))) from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise SpecError(Problem(f"not UTF-8 text (byte {exc.start})", str(path))) from None
    return load_text(text, str(path))
