"""The app's floor plan: no import circle inside fieldlog/app, and screens never import the App.

Screens read the running app through :class:`fieldlog.app.host.Host` and ask for actions with
messages (:mod:`fieldlog.app.messages`); the App imports the screens, never the other way round.
The graph is read from the source with ``ast`` (not from ``sys.modules``), so it also holds the
imports that never run at start: those under ``TYPE_CHECKING``, inside functions, and the
lazily imported view modules (``importlib.import_module`` / ``lazy_screen`` with a literal name).

The cycle finder is a plain depth-first search; networkx (the test extra) is the outside
reference it is checked against, on the real graph and on a planted circle.
"""

from __future__ import annotations

import ast
from collections.abc import Mapping
from pathlib import Path

import networkx as nx

import fieldlog

ROOT = Path(fieldlog.__file__).resolve().parent.parent
APP = "fieldlog.app"
LAZY_IMPORTERS = {"import_module", "lazy_screen"}
"""Calls whose first argument, a literal module name, is an import made later."""


def module_name(path: Path, root: Path) -> str:
    """``fieldlog/app/screens/base.py`` -> ``fieldlog.app.screens.base`` (a package: its name)."""
    parts = list(path.relative_to(root).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def imported_names(tree: ast.AST, module: str, is_package: bool) -> set[str]:
    """Every module name ``tree`` imports, anywhere in the file, relative ones resolved.

    ``from a import b`` yields ``a`` and ``a.b`` (``b`` may be a submodule); the caller keeps
    only the names that are modules of the package.
    """
    package = module if is_package else module.rpartition(".")[0]
    out: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                parts = package.split(".")
                base_parts = parts[: len(parts) - (node.level - 1)]
                base = ".".join(base_parts + ([node.module] if node.module else []))
            else:
                base = node.module or ""
            out.add(base)
            out.update(f"{base}.{alias.name}" for alias in node.names)
        elif isinstance(node, ast.Call) and node.args:
            func = node.func
            name = func.attr if isinstance(func, ast.Attribute) else getattr(func, "id", "")
            first = node.args[0]
            if name in LAZY_IMPORTERS and isinstance(first, ast.Constant):
                out.add(str(first.value))
    return out


def import_graph(root: Path, package: str) -> dict[str, set[str]]:
    """Module -> the modules of ``package`` it imports (the package's own modules only)."""
    folder = root.joinpath(*package.split("."))
    files = {module_name(p, root): p for p in sorted(folder.rglob("*.py"))}
    graph: dict[str, set[str]] = {}
    for name, path in files.items():
        tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
        found = imported_names(tree, name, path.name == "__init__.py")
        graph[name] = {m for m in found if m in files and m != name}
    return graph


def find_cycle(graph: Mapping[str, set[str]]) -> list[str] | None:
    """One import circle as a path ``[a, b, ..., a]``, or None (depth-first, three colours)."""
    state: dict[str, int] = {}  # 1: on the current path, 2: done
    path: list[str] = []

    def visit(node: str) -> list[str] | None:
        state[node] = 1
        path.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                return path[path.index(nxt) :] + [nxt]
            if nxt not in state:
                found = visit(nxt)
                if found is not None:
                    return found
        path.pop()
        state[node] = 2
        return None

    for start in sorted(graph):
        if start not in state:
            found = visit(start)
            if found is not None:
                return found
    return None


def as_networkx(graph: Mapping[str, set[str]]) -> nx.DiGraph:
    g = nx.DiGraph()
    g.add_nodes_from(graph)
    g.add_edges_from((a, b) for a, targets in graph.items() for b in targets)
    return g


def test_the_graph_sees_every_kind_of_import() -> None:
    """The reader is not blind: the App's edges, a lazy view, function-level imports."""
    graph = import_graph(ROOT, APP)
    assert "fieldlog.app.screens.base" in graph["fieldlog.app.app"]
    assert "fieldlog.app.screens.lookahead" in graph["fieldlog.app.app"]  # lazy_screen(...)
    assert "fieldlog.app.keymap" in graph["fieldlog.app.app"]  # inside run_key
    assert "fieldlog.app.screens.find" in graph["fieldlog.app.screens.record_keys"]  # in a method
    assert "fieldlog.app.host" in graph["fieldlog.app.screens.base"]


def test_no_import_circle_in_the_app() -> None:
    graph = import_graph(ROOT, APP)
    cycle = find_cycle(graph)
    assert cycle is None, "import circle in fieldlog/app: " + " -> ".join(cycle or [])
    # networkx as the outside reference on the same graph
    assert nx.is_directed_acyclic_graph(as_networkx(graph))


def test_screens_and_widgets_never_import_the_app() -> None:
    graph = import_graph(ROOT, APP)
    inner = [m for m in graph if m.startswith(("fieldlog.app.screens", "fieldlog.app.widgets"))]
    assert len(inner) > 10
    offenders = sorted(m for m in inner if "fieldlog.app.app" in graph[m])
    assert not offenders, f"import fieldlog.app.app (use fieldlog.app.host.Host): {offenders}"


def write(root: Path, rel: str, text: str) -> None:
    path = root / rel
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")


def test_a_planted_circle_is_found_and_named(tmp_path: Path) -> None:
    """A circle closed only by a relative import under TYPE_CHECKING and one in a function."""
    write(tmp_path, "pkg/__init__.py", "")
    write(tmp_path, "pkg/top.py", "from pkg.views import one\n")
    write(tmp_path, "pkg/views/__init__.py", "")
    write(
        tmp_path,
        "pkg/views/one.py",
        "from typing import TYPE_CHECKING\nif TYPE_CHECKING:\n    from . import two\n",
    )
    write(tmp_path, "pkg/views/two.py", "def f():\n    from ..top import x\n")
    graph = import_graph(tmp_path, "pkg")
    cycle = find_cycle(graph)
    assert cycle == ["pkg.top", "pkg.views.one", "pkg.views.two", "pkg.top"]
    reference = {frozenset(c) for c in nx.simple_cycles(as_networkx(graph))}
    assert reference == {frozenset(cycle)}
    write(tmp_path, "pkg/views/two.py", "def f():\n    from ..views import one\n")
    assert find_cycle(import_graph(tmp_path, "pkg")) == [
        "pkg.views.one",
        "pkg.views.two",
        "pkg.views.one",
    ]


def test_screens_use_only_textuals_app_and_the_host() -> None:
    """What screens and widgets touch on ``self.app`` is Textual's own App (switch_mode,
    push_screen, call_from_thread...); what they read of fieldlog's is on ``self.host``."""
    from textual.app import App

    from fieldlog.app.host import Host

    host_members = {n for n in vars(Host) if not n.startswith("_")}
    seen: dict[str, set[str]] = {"app": set(), "host": set()}
    for path in sorted((ROOT / "fieldlog" / "app").glob("*/*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            inner = node.value if isinstance(node, ast.Attribute) else None
            if (
                isinstance(inner, ast.Attribute)
                and isinstance(inner.value, ast.Name)
                and inner.value.id == "self"
                and inner.attr in seen
            ):
                assert isinstance(node, ast.Attribute)
                seen[inner.attr].add(node.attr)
    assert "push_screen" in seen["app"] and "snapshot" in seen["host"]
    bare = App()  # Textual's App, not fieldlog's: instance attributes (console) count too
    reached = sorted(a for a in seen["app"] if not (hasattr(App, a) or a in vars(bare)))
    assert not reached, f"screens reach fieldlog's App through self.app: {reached}"
    assert seen["host"] <= host_members
