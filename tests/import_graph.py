"""The project's import graph, read from the source with the standard library's ``ast``.

Every import counts: at module level, inside functions (imported when needed) and under
``TYPE_CHECKING``, because each one says that a file needs the other to be read first.
``from package import name`` is an edge to ``package.name`` when that is a module, else to
the package itself.
"""

from __future__ import annotations

import ast
from pathlib import Path

import networkx as nx

PACKAGES = ("gui", "model", "convergence", "units_of_measure")


def module_files(root: Path) -> dict[str, Path]:
    """``{dotted module name: file}`` for every module of the project's packages."""
    modules = {}
    for package in PACKAGES:
        for path in sorted((root / package).rglob("*.py")):
            parts = list(path.relative_to(root).with_suffix("").parts)
            if parts[-1] == "__init__":
                parts.pop()
            modules[".".join(parts)] = path
    return modules


def _imported(node: ast.AST, modules: dict[str, Path], here: str) -> list[str]:
    if isinstance(node, ast.Import):
        return [alias.name for alias in node.names]
    if not isinstance(node, ast.ImportFrom):
        return []
    if node.level:  # relative import: resolve against this module's package
        package = here.split(".")
        if not modules[here].name == "__init__.py":
            package = package[:-1]
        package = package[: len(package) - node.level + 1]
        base = ".".join(package + ([node.module] if node.module else []))
    else:
        base = node.module or ""
    names = [f"{base}.{alias.name}" for alias in node.names]
    return [name if name in modules else base for name in names]


def import_graph(root: Path) -> nx.DiGraph:
    """Directed graph: an edge a → b when module a imports module b (project modules only)."""
    modules = module_files(root)
    graph = nx.DiGraph()
    graph.add_nodes_from(modules)
    for name, path in modules.items():
        tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
        for node in ast.walk(tree):
            for target in _imported(node, modules, name):
                if target in modules and target != name:
                    graph.add_edge(name, target)
    return graph


def import_circles(root: Path) -> list[list[str]]:
    """Every strongly connected group of modules larger than one: each is an import circle."""
    graph = import_graph(root)
    return sorted(sorted(part) for part in nx.strongly_connected_components(graph) if len(part) > 1)
