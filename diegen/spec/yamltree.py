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
from diegen.fileio import UnusableInput, read_plain_file

__all__ = ["MAX_DEPTH", "MAX_FILE_BYTES", "MAX_NODES", "YNode", "load_file", "load_text"]

# A spec is a few kB (a 200-rib wing with an override per rib is under 50 kB);
# the pure-Python parser takes about a second per MB, so larger files are refused unread.
MAX_FILE_BYTES = 256_000
# Values (after alias expansion).  A large wing spec has a few thousand; the
# pure-Python parser takes tens of microseconds per value, so this also keeps
# the time to refuse an oversized file well under a second.
MAX_NODES = 20_000
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


def _shown(node: yaml.Node) -> str:
    text = str(node.value)
    return repr(text if len(text) <= 40 else text[:37] + "...")


def _mark(node: yaml.Node) -> tuple[int, int]:
    return node.start_mark.line + 1, node.start_mark.column + 1


class _Refused(Exception):
    """Raised inside the composer to stop reading an oversized or too deeply nested file."""

    def __init__(self, message: str, mark: yaml.Mark | None):
        super().__init__(message)
        self.message, self.mark = message, mark


class _BoundedLoader(yaml.SafeLoader):
    """The safe loader, stopping early at ``MAX_DEPTH`` levels or ``MAX_NODES`` values.

    PyYAML composes recursively (a deep file would exhaust the Python stack) and
    slowly (a huge list would take many seconds), so both limits are checked
    while composing, before the whole file has been parsed.
    """

    def __init__(self, stream: str):
        super().__init__(stream)
        self._depth = 0
        self._count = 0

    def compose_node(self, parent: yaml.Node | None, index: object) -> yaml.Node | None:  # type: ignore[override]
        self._count += 1
        if self._count > MAX_NODES:
            raise _Refused(f"spec too large: more than {MAX_NODES} values", self.peek_event().start_mark)
        if self._depth >= MAX_DEPTH:
            raise _Refused(f"spec nested deeper than {MAX_DEPTH} levels", self.peek_event().start_mark)
        self._depth += 1
        try:
            return super().compose_node(parent, index)
        finally:
            self._depth -= 1


def _expanded_size(node: yaml.Node, memo: dict[int, int], limit: int, depth: int = 0) -> int:
    """Number of values under ``node`` once aliases are expanded (capped just above ``limit``).

    Aliased nodes are shared in the composed graph, so a memo on ``id`` keeps
    this linear in the file's size however far the aliases would expand.
    Recursive aliases and alias chains deeper than ``MAX_DEPTH`` are counted as
    one value here; the converter refuses them as too deeply nested.
    """
    known = memo.get(id(node))
    if known is not None:
        return known
    if depth > MAX_DEPTH:
        return 1
    memo[id(node)] = 1  # reached again while being counted: a recursive alias
    total = 1
    if isinstance(node, yaml.MappingNode):
        children = [n for pair in node.value for n in pair]
    elif isinstance(node, yaml.SequenceNode):
        children = list(node.value)
    else:
        children = []
    for child in children:
        total += _expanded_size(child, memo, limit, depth + 1)
        if total > limit:
            break
    memo[id(node)] = min(total, limit + 1)
    return memo[id(node)]


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
                key = str(self.construct(key_node))
                if key in result.value:
                    raise self.fail(key_node, f"duplicate key {key!r} (first at line {result.keys[key][0]})")
                result.keys[key] = _mark(key_node)
                result.value[key] = self.convert(value_node, depth + 1)
            return result
        if isinstance(node, yaml.SequenceNode):
            return YNode([self.convert(item, depth + 1) for item in node.value], line, column)
        return YNode(self.construct(node), line, column)

    def construct(self, node: yaml.Node) -> Any:
        """A scalar's value; a malformed one (a date of month 13, an integer of 5000 digits) is a problem."""
        try:
            return self.constructor.construct_object(node)
        except (ValueError, OverflowError) as exc:
            raise self.fail(node, f"cannot read value {_shown(node)}: {exc}") from None


def load_text(text: str, file: str = "<spec>") -> YNode:
    """Parse YAML ``text`` into a :class:`YNode` tree; raise :class:`SpecError` with position on failure."""
    if len(text.encode("utf-8", "surrogatepass")) > MAX_FILE_BYTES:
        raise SpecError(Problem(f"spec file larger than {MAX_FILE_BYTES // 1000} kB: not a spec", file))
    loader: _BoundedLoader | None = None
    try:
        loader = _BoundedLoader(text)
        root = loader.get_single_node()
    except _Refused as exc:
        line, column = (exc.mark.line + 1, exc.mark.column + 1) if exc.mark else (None, None)
        raise SpecError(Problem(exc.message, file, line, column)) from None
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line, column = (mark.line + 1, mark.column + 1) if mark else (None, None)
        raise SpecError(Problem(f"YAML syntax error: {exc.problem or exc}", file, line, column)) from None
    except yaml.reader.ReaderError as exc:  # a character YAML does not allow (control bytes, lone surrogates)
        line = text.count("\n", 0, exc.position) + 1
        shown = f"#x{exc.character:04x}" if isinstance(exc.character, int) else repr(exc.character)
        raise SpecError(Problem(f"not a text file: character {shown} is not allowed in YAML", file, line)) from None
    except yaml.YAMLError as exc:
        raise SpecError(Problem(f"YAML error: {exc}", file)) from None
    finally:
        if loader is not None:
            loader.dispose()
    if root is None:
        raise SpecError(Problem("the spec is empty", file, 1, 1))
    if _expanded_size(root, {}, MAX_NODES) > MAX_NODES:
        line, column = _mark(root)
        raise SpecError(Problem(f"spec too large: more than {MAX_NODES} values after expanding anchors and aliases",
                                file, line, column))
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
        raw = read_plain_file(path, MAX_FILE_BYTES, "a YAML spec file")
    except UnusableInput as error:
        raise SpecError(Problem(error.problem, str(path))) from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise SpecError(Problem(f"not UTF-8 text (byte {exc.start})", str(path))) from None
    return load_text(text, str(path))
