"""The package's import graph reads top-down: no cycle, and no module imports from a floor above its own.

Every import counts, also one inside a function (a cycle hidden there still ties the two modules
together), and importing `a.b.c` also runs the packages `a.b` and `a` above it. A module missing
from FLOORS fails the test: a new module says which floor it lives on.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

LIB = Path(__file__).resolve().parent.parent / "lib"
PACKAGE = "timbersheets"

#: The floors from the top (the command line) to the bottom (errors and constants). A module may import
#: from its own floor and from the floors below it, never from one above. An entry names a module or a
#: package (then every module in it), relative to `timbersheets`; "" is the package's own __init__.
FLOORS: dict[str, tuple[str, ...]] = {
    "cli": ("cli",),
    "run": ("run",),
    "build": ("build",),
    "sheet": ("sheet",),
    "job": ("job",),
    "schedule": ("schedule",),
    "engineering": ("engineering",),
    "base": ("", "errors", "constants", "fileio", "lifetime", "kernel"),
}


def modules() -> dict[str, Path]:
    """Every module of the package by dotted name (a package by its own name)."""
    out = {}
    for path in sorted((LIB / PACKAGE).rglob("*.py")):
        parts = list(path.relative_to(LIB).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts.pop()
        out[".".join(parts)] = path
    return out


def _targets(name: str, is_package: bool, node: ast.Import | ast.ImportFrom, known: set[str]) -> list[str]:
    """The package's modules an import statement in module `name` names (outside modules are left out)."""
    if isinstance(node, ast.Import):
        return [a.name for a in node.names if a.name.split(".")[0] == PACKAGE]
    if node.level:
        base = name.split(".") if is_package else name.split(".")[:-1]
        base = base[:len(base) - (node.level - 1)]
        module = ".".join(base + ([node.module] if node.module else []))
    elif node.module and node.module.split(".")[0] == PACKAGE:
        module = node.module
    else:
        return []
    # `from . import x` names the module x when there is one, else a name inside the package
    return [f"{module}.{a.name}" if f"{module}.{a.name}" in known else module for a in node.names]


def import_graph() -> dict[str, set[str]]:
    """Module → the modules it imports (anywhere in its source), with the packages above each."""
    found = modules()
    known = set(found)
    graph: dict[str, set[str]] = {}
    for name, path in found.items():
        edges: set[str] = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"), str(path))):
            if not isinstance(node, (ast.Import, ast.ImportFrom)):
                continue
            for target in _targets(name, path.name == "__init__.py", node, known):
                while target not in known and "." in target:  # an attribute of a module: the module
                    target = target.rsplit(".", 1)[0]
                parts = target.split(".")
                # importing a.b.c runs a and a.b first, unless they already hold the importer
                for i in range(1, len(parts) + 1):
                    step = ".".join(parts[:i])
                    if step in known and step != name and not name.startswith(step + "."):
                        edges.add(step)
        graph[name] = edges
    return graph


def floor_of(name: str) -> str | None:
    """The floor of a dotted module name: the longest FLOORS entry that is it or a package holding it."""
    rel = name[len(PACKAGE) + 1:] if name != PACKAGE else ""
    best, length = None, -1
    for floor, entries in FLOORS.items():
        for entry in entries:
            if (rel == entry or (entry and rel.startswith(entry + "."))) and len(entry) > length:
                best, length = floor, len(entry)
    return best


def cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """The strongly connected groups of more than one module (Tarjan), each sorted."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    out: list[list[str]] = []

    def visit(v: str) -> None:
        index[v] = low[v] = len(index)
        stack.append(v)
        on_stack.add(v)
        for w in sorted(graph[v]):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            group = []
            while True:
                w = stack.pop()
                on_stack.discard(w)
                group.append(w)
                if w == v:
                    break
            if len(group) > 1:
                out.append(sorted(group))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def test_every_module_has_a_floor():
    missing = [name for name in modules() if floor_of(name) is None]
    assert not missing, f"add these modules to FLOORS in tests/test_layout.py: {missing}"


def test_the_import_graph_has_no_cycle():
    graph = import_graph()
    found = cycles(graph)
    detail = ["; ".join(f"{a} -> {b}" for a in group for b in sorted(graph[a]) if b in group) for group in found]
    assert not found, "import cycles: " + " | ".join(detail)


def test_no_module_imports_from_a_floor_above():
    order = list(FLOORS)
    upward = []
    for name, targets in import_graph().items():
        here = floor_of(name)
        for target in sorted(targets):
            there = floor_of(target)
            if here and there and order.index(there) < order.index(here):
                upward.append(f"{name} ({here}) imports {target} ({there})")
    assert not upward, "imports from a floor above: " + "; ".join(upward)


# -- the test's own reading of imports, on small sources (hand-made cases, each of which the test must catch)
@pytest.fixture
def toy(tmp_path, monkeypatch):
    """A throwaway package laid out like this one, read by the functions above."""
    def make(files: dict[str, str]) -> dict[str, set[str]]:
        for rel, source in files.items():
            path = tmp_path / PACKAGE / rel
            path.parent.mkdir(parents=True, exist_ok=True)
            path.write_text(source, encoding="utf-8")
        monkeypatch.setitem(globals(), "LIB", tmp_path)
        return import_graph()
    return make


def test_an_import_inside_a_function_closes_a_cycle(toy):
    graph = toy({"__init__.py": "", "a.py": "from .b import x\n", "b.py": "def f():\n    from . import a\n"})
    assert cycles(graph) == [[f"{PACKAGE}.a", f"{PACKAGE}.b"]]


def test_relative_and_absolute_imports_resolve_to_modules(toy):
    graph = toy({"__init__.py": "", "sub/__init__.py": "", "sub/c.py": "from ..a import y\nimport os\n",
                 "a.py": "import timbersheets.sub.c\n"})
    assert graph[f"{PACKAGE}.sub.c"] == {f"{PACKAGE}.a"}
    assert graph[f"{PACKAGE}.a"] == {f"{PACKAGE}.sub", f"{PACKAGE}.sub.c"}  # the package runs first


def test_floor_of_takes_the_longest_entry(monkeypatch):
    monkeypatch.setitem(globals(), "FLOORS", {"top": ("a.b",), "low": ("", "a")})
    assert floor_of(f"{PACKAGE}.a.b.c") == "top"  # inside a.b, the longer entry
    assert floor_of(f"{PACKAGE}.a.x") == "low"
    assert floor_of(PACKAGE) == "low"
    assert floor_of(f"{PACKAGE}.no_such_module") is None
