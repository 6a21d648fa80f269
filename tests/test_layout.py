"""The package's layout: no import circles, and typer and rich only where they belong.

Every import statement of every module under pqtriage/ is read with ``ast``: module-level
ones and those inside functions or ``if TYPE_CHECKING:`` blocks alike, since an import
hidden in a function still ties the two modules together. An edge goes from the importing
module to the module it names (``from a.b import c`` names ``a.b.c`` when that is a module,
else ``a.b``); the parent packages Python also initialises are not edges.

Rules (DEVELOPERS.md, "Architecture"):
- no circle between modules;
- typer (and click under it) only in pqtriage/cli/;
- rich only in pqtriage/cli/ and pqtriage/formats/ (formatters return inert renderables);
- nothing outside pqtriage/cli/ imports pqtriage.cli (only the CLI writes files, and it is
  the top of the flow).
"""

from __future__ import annotations

import ast
from dataclasses import dataclass
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
PACKAGE = "pqtriage"


@dataclass(frozen=True)
class Edge:
    """One import statement between two modules of the package."""

    source: str
    """The importing module."""
    target: str
    """The module it imports."""
    place: str
    """file:line of the statement."""


def _module_name(path: Path, root: Path) -> str:
    parts = list(path.relative_to(root).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def modules_of(root: Path, package: str) -> dict[str, Path]:
    """Every module of the package (dotted name -> file)."""
    return {_module_name(p, root): p for p in sorted((root / package).rglob("*.py"))}


def _absolute(module: str, is_package: bool, node: ast.ImportFrom) -> str:
    if not node.level:
        return node.module or ""
    base = module.split(".") if is_package else module.split(".")[:-1]
    base = base[: len(base) - (node.level - 1)]
    return ".".join(base + ([node.module] if node.module else []))


def imports_of(path: Path, module: str, known: set[str]) -> list[tuple[str, int]]:
    """Every module named by an import statement of the file, with its line (external ones too)."""
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    found: list[tuple[str, int]] = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found += [(alias.name, node.lineno) for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = _absolute(module, path.name == "__init__.py", node)
            for alias in node.names:
                candidate = f"{base}.{alias.name}"
                found.append((candidate if candidate in known else base, node.lineno))
    return list(dict.fromkeys(found))  # one per statement and module


def import_graph(root: Path, package: str) -> tuple[dict[str, list[Edge]], list[Edge]]:
    """(edges between the package's modules by source, every import statement as an edge)."""
    modules = modules_of(root, package)
    known = set(modules)
    graph: dict[str, list[Edge]] = {name: [] for name in modules}
    every: list[Edge] = []
    for name, path in modules.items():
        place = path.relative_to(root).as_posix()
        for target, line in imports_of(path, name, known):
            edge = Edge(name, target, f"{place}:{line}")
            every.append(edge)
            if target in known and target != name:
                graph[name].append(edge)
    return graph, every


def find_circles(graph: dict[str, list[Edge]]) -> list[list[Edge]]:
    """One circle of edges per strongly connected group of modules (Tarjan's algorithm)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    groups: list[list[str]] = []

    def visit(node: str) -> None:
        index[node] = low[node] = len(index)
        stack.append(node)
        on_stack.add(node)
        for edge in graph[node]:
            if edge.target not in index:
                visit(edge.target)
                low[node] = min(low[node], low[edge.target])
            elif edge.target in on_stack:
                low[node] = min(low[node], index[edge.target])
        if low[node] == index[node]:
            group = []
            while True:
                member = stack.pop()
                on_stack.discard(member)
                group.append(member)
                if member == node:
                    break
            if len(group) > 1:
                groups.append(sorted(group))

    for node in sorted(graph):
        if node not in index:
            visit(node)
    return [_circle_through(graph, group) for group in groups]


def _circle_through(graph: dict[str, list[Edge]], group: list[str]) -> list[Edge]:
    """The shortest chain of imports from the group's first module back to itself."""
    start = group[0]
    members = set(group)
    paths: dict[str, list[Edge]] = {start: []}
    queue = [start]
    while queue:
        node = queue.pop(0)
        for edge in graph[node]:
            if edge.target == start:
                return paths[node] + [edge]
            if edge.target in members and edge.target not in paths:
                paths[edge.target] = paths[node] + [edge]
                queue.append(edge.target)
    raise AssertionError(f"no circle through {group}")  # pragma: no cover


def describe(circle: list[Edge]) -> str:
    """'a -> b (file:line) -> a (file:line)'."""
    return circle[0].source + "".join(f" -> {e.target} ({e.place})" for e in circle)


def _inside(module: str, package: str) -> bool:
    return module == package or module.startswith(package + ".")


def misplaced_imports(every: list[Edge], package: str) -> list[str]:
    """Imports of typer, click, rich or the CLI where they do not belong, one line each."""
    cli = f"{package}.cli"
    formats = f"{package}.formats"
    found = []
    for edge in every:
        top = edge.target.split(".")[0]
        if top in ("typer", "click") and not _inside(edge.source, cli):
            found.append(f"{edge.place}: {edge.target} outside {cli}")
        elif top == "rich" and not (_inside(edge.source, cli) or _inside(edge.source, formats)):
            found.append(f"{edge.place}: {edge.target} outside {cli} and {formats}")
        elif _inside(edge.target, cli) and not _inside(edge.source, cli):
            found.append(f"{edge.place}: {edge.source} imports the CLI ({edge.target})")
    return found


def test_no_import_circle_between_modules() -> None:
    graph, _ = import_graph(ROOT, PACKAGE)
    circles = [describe(c) for c in find_circles(graph)]
    assert circles == [], "import circles:\n" + "\n".join(circles)


def test_typer_and_rich_only_where_they_belong() -> None:
    _, every = import_graph(ROOT, PACKAGE)
    found = misplaced_imports(every, PACKAGE)
    assert found == [], "imports where they do not belong:\n" + "\n".join(found)


def test_the_graph_sees_the_package() -> None:
    # The walk must find the real edges (function-level ones included), or it proves nothing.
    graph, every = import_graph(ROOT, PACKAGE)
    targets = {e.target for e in graph["pqtriage.cli.triage"]}
    assert {"pqtriage.cli.common", "pqtriage.pipeline", "pqtriage.formats.table.triage"} <= targets
    assert any(e.source == "pqtriage.cli.common" and e.target == "typer" for e in every)
    assert len(graph) > 100


def _plant(tmp_path: Path, files: dict[str, str]) -> Path:
    for name, text in files.items():
        path = tmp_path / "pkg" / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
    return tmp_path


@pytest.mark.parametrize(
    "files, chain",
    [
        (  # a circle through an import inside a function
            {
                "__init__.py": "",
                "a.py": "from pkg.b import thing\n",
                "b.py": "def thing():\n    from pkg import a\n    return a\n",
            },
            "pkg.a -> pkg.b (pkg/a.py:1) -> pkg.a (pkg/b.py:2)",
        ),
        (  # a circle of three through a relative import and a TYPE_CHECKING block
            {
                "__init__.py": "",
                "sub/__init__.py": "",
                "sub/a.py": "from .b import x\n",
                "sub/b.py": "import pkg.c\nx = 1\n",
                "c.py": "from typing import TYPE_CHECKING\nif TYPE_CHECKING:\n    from pkg.sub.a import x\n",
            },
            "pkg.c -> pkg.sub.a (pkg/c.py:3) -> pkg.sub.b (pkg/sub/a.py:1) -> pkg.c (pkg/sub/b.py:1)",
        ),
    ],
    ids=["function-level", "relative-and-type-checking"],
)
def test_a_planted_circle_is_caught_with_its_chain(
    tmp_path: Path, files: dict[str, str], chain: str
) -> None:
    graph, _ = import_graph(_plant(tmp_path, files), "pkg")
    assert [describe(c) for c in find_circles(graph)] == [chain]


def test_no_circle_is_reported_without_one(tmp_path: Path) -> None:
    root = _plant(tmp_path, {
        "__init__.py": "",
        "a.py": "from pkg import b\nimport json\n",
        "b.py": "def f():\n    from pkg.c import g\n",
        "c.py": "from . import d\ng = 1\n",
        "d.py": "",
    })  # fmt: skip
    graph, _ = import_graph(root, "pkg")
    assert find_circles(graph) == []
    assert [e.target for e in graph["pkg.c"]] == ["pkg.d"]


def test_planted_misplaced_imports_are_caught(tmp_path: Path) -> None:
    root = _plant(tmp_path, {
        "__init__.py": "",
        "cli/__init__.py": "import typer\nimport rich\n",
        "formats/view.py": "from rich.table import Table\n",
        "model.py": "def f():\n    import typer\n",
        "threat.py": "from rich.console import Console\nfrom pkg.cli import main\n",
    })  # fmt: skip
    _, every = import_graph(root, "pkg")
    assert misplaced_imports(every, "pkg") == [
        "pkg/model.py:2: typer outside pkg.cli",
        "pkg/threat.py:1: rich.console outside pkg.cli and pkg.formats",
        "pkg/threat.py:2: pkg.threat imports the CLI (pkg.cli)",
    ]
