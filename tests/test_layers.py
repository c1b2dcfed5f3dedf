"""The package's layers, read from its source with the standard library's ``ast``.

Every ``import`` and ``from ... import`` of every module under ``diegen/`` is
an edge: module level, inside functions, and under ``if TYPE_CHECKING:``
(those are marked, so a message can say which edges only a type checker
follows).  Granularity is the module (``diegen.x.y``; a package's
``__init__.py`` is the module ``diegen.x``).  ``from a.b import c`` is an edge to
``a.b.c`` when that is a module of the package, else to ``a.b``; parent
packages a statement does not name are not edges, as in most import-graph
tools (common practice, no source).

What is proved: no import cycle; the solid kernel (``cadquery``, ``OCP``) is
imported only under ``diegen/die/occ/``; the leaf writers in ``diegen/export/``
do not import the analysis, the reports, the API, the build pipeline or the
CLI; no module takes another module's private (underscore) name; and
``diegen check`` of the demo rib, run in a fresh interpreter, loads neither the
kernel nor matplotlib.  Each walker and checker is first shown to find a
planted violation, so none of these tests can pass vacuously.
"""

from __future__ import annotations

import ast
import itertools
import json
import subprocess
import sys
import textwrap
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from pathlib import Path

import pytest
from testing import DEMO_RIB, ROOT

PACKAGE_DIR = ROOT / "diegen"
KERNEL_ROOTS = ("cadquery", "OCP")
KERNEL_PACKAGE = "diegen.die.occ"
EXPORT_PACKAGE = "diegen.export"
# What a leaf writer must not know about: the composers and orchestration above it.
ABOVE_EXPORT = ("diegen.analysis", "diegen.reports", "diegen.api", "diegen.pipeline", "diegen.cli")


@dataclass(frozen=True)
class Edge:
    """One imported name (or module) of one import statement."""

    importer: str  # the importing module, e.g. "diegen.api"
    target: str  # the module imported, resolved: "diegen.pipeline.build", "OCP.gp", "numpy"
    name: str | None  # the name taken from ``target`` by ``from target import name``; None for ``import target``
    line: int
    in_function: bool
    type_checking: bool

    def where(self) -> str:
        flags = [f for f, on in (("in a function", self.in_function), ("TYPE_CHECKING only", self.type_checking)) if on]
        what = f"from {self.target} import {self.name}" if self.name else f"import {self.target}"
        return f"{self.importer}:{self.line}: {what}" + (f" ({', '.join(flags)})" if flags else "")


def module_name(path: Path, package_dir: Path) -> str:
    """``diegen/x/y.py`` → ``diegen.x.y``; ``diegen/x/__init__.py`` → ``diegen.x``."""
    parts = list(path.relative_to(package_dir.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def package_modules(package_dir: Path = PACKAGE_DIR) -> dict[str, Path]:
    return {module_name(p, package_dir): p for p in sorted(package_dir.rglob("*.py"))}


def _is_type_checking(test: ast.expr) -> bool:
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def _statements(tree: ast.AST) -> Iterator[tuple[ast.Import | ast.ImportFrom, bool, bool]]:
    """Every import statement with (inside a function, under ``if TYPE_CHECKING:``)."""

    def walk(node: ast.AST, in_function: bool, type_checking: bool) -> Iterator:
        if isinstance(node, (ast.Import, ast.ImportFrom)):
            yield node, in_function, type_checking
            return
        if isinstance(node, ast.If) and _is_type_checking(node.test):
            for child in node.body:
                yield from walk(child, in_function, True)
            for child in node.orelse:
                yield from walk(child, in_function, type_checking)
            return
        inner = in_function or isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda))
        for child in ast.iter_child_nodes(node):
            yield from walk(child, inner, type_checking)

    yield from walk(tree, False, False)


def _absolute(importer: str, is_package: bool, module: str | None, level: int) -> str:
    """The absolute module a (possibly relative) ``from`` statement names."""
    if level == 0:
        return module or ""
    parts = importer.split(".") if is_package else importer.split(".")[:-1]
    base = parts[: len(parts) - (level - 1)]
    return ".".join(base + ([module] if module else []))


def module_edges(importer: str, source: str, is_package: bool, modules: Iterable[str]) -> list[Edge]:
    """The edges of one module's source text (``modules``: every module of the package, to resolve submodules)."""
    known = set(modules)
    edges = []
    for node, in_function, type_checking in _statements(ast.parse(source)):
        if isinstance(node, ast.Import):
            edges += [Edge(importer, alias.name, None, node.lineno, in_function, type_checking) for alias in node.names]
            continue
        base = _absolute(importer, is_package, node.module, node.level)
        for alias in node.names:
            sub = f"{base}.{alias.name}"
            if sub in known:  # ``from diegen import api``: the module diegen.api
                edges.append(Edge(importer, sub, None, node.lineno, in_function, type_checking))
            else:
                edges.append(Edge(importer, base, alias.name, node.lineno, in_function, type_checking))
    return edges


def package_edges(package_dir: Path = PACKAGE_DIR) -> list[Edge]:
    modules = package_modules(package_dir)
    edges = []
    for name, path in modules.items():
        edges += module_edges(name, path.read_text(encoding="utf-8"), path.name == "__init__.py", modules)
    return edges


def find_cycle(graph: dict[str, set[str]]) -> list[str] | None:
    """One cycle of the directed graph as a path ``[a, b, ..., a]``, or None (depth-first search, three colours)."""
    state: dict[str, int] = {}  # 1 on the current path, 2 finished
    path: list[str] = []

    def visit(node: str) -> list[str] | None:
        state[node] = 1
        path.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                return [*path[path.index(nxt):], nxt]
            if nxt not in state and (found := visit(nxt)):
                return found
        path.pop()
        state[node] = 2
        return None

    for start in sorted(graph):
        if start not in state and (found := visit(start)):
            return found
    return None


def strongly_connected(graph: dict[str, set[str]]) -> list[set[str]]:
    """The strongly connected components of the graph (Tarjan's algorithm)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    components: list[set[str]] = []

    def visit(node: str) -> None:
        index[node] = low[node] = len(index)
        stack.append(node)
        on_stack.add(node)
        for nxt in sorted(graph.get(node, ())):
            if nxt not in index:
                visit(nxt)
                low[node] = min(low[node], low[nxt])
            elif nxt in on_stack:
                low[node] = min(low[node], index[nxt])
        if low[node] == index[node]:
            component = set()
            while True:
                member = stack.pop()
                on_stack.discard(member)
                component.add(member)
                if member == node:
                    break
            components.append(component)

    for start in sorted(graph):
        if start not in index:
            visit(start)
    return components


def all_cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """One cycle through each group of modules that import each other (each strongly connected component that
    has a cycle), so a failure names every tangle at once."""
    cycles = []
    for component in strongly_connected(graph):
        sub = {m: graph.get(m, set()) & component for m in component}
        if len(component) > 1 or any(m in sub[m] for m in component):
            cycles.append(find_cycle(sub))
    return sorted(c for c in cycles if c)


def internal_graph(edges: Iterable[Edge], modules: Iterable[str]) -> dict[str, set[str]]:
    known = set(modules)
    graph: dict[str, set[str]] = {m: set() for m in known}
    for e in edges:
        if e.target in known:
            graph[e.importer].add(e.target)
    return graph


def _under(module: str, package: str) -> bool:
    return module == package or module.startswith(package + ".")


def _private(name: str) -> bool:
    return name.startswith("_") and not (name.startswith("__") and name.endswith("__"))


def kernel_violations(edges: Iterable[Edge]) -> list[Edge]:
    return [e for e in edges if e.target.split(".")[0] in KERNEL_ROOTS and not _under(e.importer, KERNEL_PACKAGE)]


def export_violations(edges: Iterable[Edge]) -> list[Edge]:
    return [e for e in edges if _under(e.importer, EXPORT_PACKAGE)
            and any(_under(e.target, above) for above in ABOVE_EXPORT)]


def private_violations(edges: Iterable[Edge], package_dir: Path = PACKAGE_DIR) -> list[str]:
    """``from m import _x`` or ``import a._b`` of another module of the package, and ``m._x`` on a module a
    module imported (the same reach into a private name, written as an attribute)."""
    modules = package_modules(package_dir)
    found = []
    for e in edges:
        if not _under(e.target, "diegen") or e.target == e.importer:
            continue
        private_parts = [p for p in e.target.split(".") if _private(p)]
        if private_parts or (e.name is not None and _private(e.name)):
            found.append(e.where())
    for name, path in modules.items():
        tree = ast.parse(path.read_text(encoding="utf-8"))
        bound: dict[str, str] = {}  # local name → imported module of the package
        for node, _, _ in _statements(tree):
            if isinstance(node, ast.Import):
                for alias in node.names:
                    if alias.name in modules and alias.asname:
                        bound[alias.asname] = alias.name
            else:
                base = _absolute(name, path.name == "__init__.py", node.module, node.level)
                for alias in node.names:
                    if f"{base}.{alias.name}" in modules:
                        bound[alias.asname or alias.name] = f"{base}.{alias.name}"
        for node in ast.walk(tree):
            if (isinstance(node, ast.Attribute) and _private(node.attr) and isinstance(node.value, ast.Name)
                    and node.value.id in bound and bound[node.value.id] != name):
                found.append(f"{name}:{node.lineno}: {node.value.id}.{node.attr} ({bound[node.value.id]})")
    return found


@pytest.fixture(scope="module")
def modules() -> dict[str, Path]:
    return package_modules()


@pytest.fixture(scope="module")
def edges() -> list[Edge]:
    return package_edges()


# ---------------------------------------------------------------- the walker and the checkers can fail
PLANTED = textwrap.dedent("""
    from __future__ import annotations
    from typing import TYPE_CHECKING
    import numpy as np
    from diegen import api
    from diegen.analysis import _private_helper, PieceAnalysis
    from . import settings
    from .occ import files
    if TYPE_CHECKING:
        from diegen.pipeline.build import BuildResult
    else:
        import json

    def build():
        import cadquery as cq
        from OCP.gp import gp_Pnt
        return api._hidden, settings
""")


def test_walker_finds_every_kind_of_import_statement() -> None:
    """A planted module (as if it were ``diegen/die/planted.py``): every statement is found and resolved."""
    known = ["diegen", "diegen.api", "diegen.analysis", "diegen.die", "diegen.die.settings", "diegen.die.occ",
             "diegen.die.occ.files", "diegen.pipeline.build"]
    got = {(e.target, e.name, e.in_function, e.type_checking) for e in module_edges("diegen.die.planted", PLANTED,
                                                                                      False, known)}
    assert got == {
        ("__future__", "annotations", False, False), ("typing", "TYPE_CHECKING", False, False),
        ("numpy", None, False, False), ("diegen.api", None, False, False),
        ("diegen.analysis", "_private_helper", False, False), ("diegen.analysis", "PieceAnalysis", False, False),
        ("diegen.die.settings", None, False, False), ("diegen.die.occ.files", None, False, False),
        ("diegen.pipeline.build", "BuildResult", False, True), ("json", None, False, False),
        ("cadquery", None, True, False), ("OCP.gp", "gp_Pnt", True, False),
    }


def test_checkers_catch_planted_violations() -> None:
    known = ["diegen.export.plot", "diegen.analysis", "diegen.api"]
    planted = module_edges("diegen.export.plot", PLANTED, False, known)
    assert {e.target for e in kernel_violations(planted)} == {"cadquery", "OCP.gp"}
    assert {e.target for e in export_violations(planted)} == {"diegen.analysis", "diegen.api",
                                                               "diegen.pipeline.build"}
    assert [e.name for e in planted if e.name and _private(e.name)] == ["_private_helper"]
    assert find_cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == ["a", "b", "c", "a"]
    assert find_cycle({"a": {"a"}}) == ["a", "a"]
    assert find_cycle({"a": {"b", "c"}, "b": {"c"}, "c": set()}) is None


def test_private_checker_catches_a_planted_package(tmp_path: Path) -> None:
    package = tmp_path / "diegen"
    (package / "sub").mkdir(parents=True)
    (package / "__init__.py").write_text("")
    (package / "sub" / "__init__.py").write_text("")
    (package / "sub" / "a.py").write_text("def _secret():\n    return 1\n\ndef public():\n    return _secret()\n")
    (package / "sub" / "b.py").write_text("from diegen.sub import a\n\ndef use():\n    return a._secret()\n")
    (package / "c.py").write_text("from diegen.sub.a import _secret, public\n")
    found = private_violations(package_edges(package), package)
    assert found == ["diegen.c:1: from diegen.sub.a import _secret", "diegen.sub.b:4: a._secret (diegen.sub.a)"]


def test_walker_sees_the_package(modules: dict[str, Path], edges: list[Edge]) -> None:
    """Known edges of the real package are found: a module-level one, a function-level one and a TYPE_CHECKING one."""
    assert {"diegen", "diegen.api", "diegen.cli", "diegen.die.occ", "diegen.die.occ.tiles",
            "diegen.reports.sheet"} <= set(modules)
    seen = {(e.importer, e.target, e.in_function, e.type_checking) for e in edges}
    assert ("diegen.reports.sheet", "diegen.analysis", False, False) in seen
    assert ("diegen.api", "diegen.die.occ.files", True, False) in seen
    assert ("diegen.api", "diegen.pipeline.build", False, True) in seen
    assert ("diegen.die.occ.tiles", "OCP.BRepAlgoAPI", True, False) in seen


def test_kernel_is_used_without_cadquery(edges: list[Edge]) -> None:
    """The dies are made with OCP's own classes (diegen/die/occ/shapes.py): importing CadQuery on top of OCP
    costs about a second and 170 MB per process for a visualisation toolkit the dies never use."""
    assert [f"{e.importer} -> {e.target}" for e in edges if e.target.split(".")[0] == "cadquery"] == []


# ---------------------------------------------------------------- (a) no cycle
def _describe_cycles(cycles: list[list[str]], edges: list[Edge]) -> str:
    lines = []
    for cycle in cycles:
        lines.append("import cycle " + " → ".join(cycle))
        for a, b in itertools.pairwise(cycle):
            lines += ["    " + e.where() for e in edges if e.importer == a and e.target == b]
    return "\n".join(lines)


def test_no_import_cycle(modules: dict[str, Path], edges: list[Edge]) -> None:
    """Every edge counts, TYPE_CHECKING and function-level ones too."""
    cycles = all_cycles(internal_graph(edges, modules))
    assert not cycles, _describe_cycles(cycles, edges)


def test_cycle_finder_names_every_tangle() -> None:
    graph = {"a": {"b"}, "b": {"a", "c"}, "c": {"d"}, "d": {"c"}, "e": {"e"}, "f": {"a"}}
    assert all_cycles(graph) == [["a", "b", "a"], ["c", "d", "c"], ["e", "e"]]
    assert all_cycles({"a": {"b"}, "b": set()}) == []


# ---------------------------------------------------------------- (b) the kernel stays in its package
def test_kernel_imported_only_under_die_occ(edges: list[Edge]) -> None:
    bad = kernel_violations(edges)
    assert not bad, "the solid kernel imported outside diegen/die/occ/:\n" + "\n".join(e.where() for e in bad)
    assert any(e.target.split(".")[0] in KERNEL_ROOTS for e in edges), "no kernel import found at all"


# ---------------------------------------------------------------- (c) the writers are leaves
def test_export_writers_do_not_import_the_layers_above(edges: list[Edge]) -> None:
    bad = export_violations(edges)
    assert not bad, "diegen/export/ imports a layer above it:\n" + "\n".join(e.where() for e in bad)


def test_export_writers_do_not_reach_the_layers_above_indirectly(modules: dict[str, Path], edges: list[Edge]) -> None:
    """The closure of each writer's imports holds none of the layers above it either."""
    graph = internal_graph(edges, modules)
    for writer in (m for m in modules if _under(m, EXPORT_PACKAGE)):
        reached, todo = set(), [writer]
        while todo:
            for nxt in graph[todo.pop()] - reached:
                reached.add(nxt)
                todo.append(nxt)
        above = sorted(m for m in reached if any(_under(m, a) for a in ABOVE_EXPORT))
        assert not above, f"{writer} reaches {above}"


# ---------------------------------------------------------------- (d) private names stay private
def test_no_module_takes_another_modules_private_name(edges: list[Edge]) -> None:
    found = private_violations(edges)
    assert not found, "private names used across modules:\n" + "\n".join(found)


# ---------------------------------------------------------------- (e) `diegen check` stays light
CHECK_PROBE = textwrap.dedent("""
    import contextlib, io, json, sys
    from diegen.cli import main
    with contextlib.redirect_stdout(io.StringIO()) as out:
        code = main(["check", sys.argv[1]])
    heavy = sorted(m for m in sys.modules if m.split(".")[0] in ("cadquery", "OCP", "matplotlib"))
    print(json.dumps({"exit": code, "report_chars": len(out.getvalue()), "heavy": heavy}))
""")


def test_check_loads_neither_kernel_nor_matplotlib(tmp_path: Path) -> None:
    run = subprocess.run([sys.executable, "-c", CHECK_PROBE, str(DEMO_RIB)], capture_output=True, text=True,
                         cwd=tmp_path, timeout=120, check=False)
    assert run.returncode == 0, run.stderr
    result = json.loads(run.stdout.strip().splitlines()[-1])
    assert result["exit"] == 0 and result["report_chars"] > 1000, result
    assert result["heavy"] == [], f"diegen check imported {result['heavy']}"


def test_probe_sees_a_heavy_import(tmp_path: Path) -> None:
    """The probe's module list is real: importing the plot writer's stack shows up in it."""
    probe = CHECK_PROBE.replace("from diegen.cli import main", "from diegen.cli import main\nimport matplotlib.figure")
    run = subprocess.run([sys.executable, "-c", probe, str(DEMO_RIB)], capture_output=True, text=True,
                         cwd=tmp_path, timeout=120, check=False)
    assert run.returncode == 0, run.stderr
    assert "matplotlib" in json.loads(run.stdout.strip().splitlines()[-1])["heavy"]
