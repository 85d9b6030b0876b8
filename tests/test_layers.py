"""The package's layers, read from the source: imports only go downward, and no cycles.

Layer order (bottom first): core < kernel < language < analysis < report < run < cli.
A module may import its own layer and the layers below it. The rule is read from the
code's own import statements with :mod:`ast` (nothing is imported or run).
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest
from conftest import REPO

PACKAGE = REPO / "checker" / "plantlint"
LAYERS = ("core", "kernel", "language", "analysis", "report", "run", "cli")


def _module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _layer(module: str) -> str | None:
    parts = module.split(".")
    if parts[0] != "plantlint" or len(parts) < 2:
        return None
    return parts[1] if parts[1] in LAYERS else None


def _imports(path: Path) -> list[tuple[str, int]]:
    """Every plantlint module imported by ``path`` (absolute or relative), with its line."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    here = _module_name(path).split(".")
    package = here if path.name == "__init__.py" else here[:-1]
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found += [(alias.name, node.lineno) for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package[: len(package) - node.level + 1]
                target = ".".join([*base, node.module] if node.module else base)
            else:
                target = node.module or ""
            found.append((target, node.lineno))
            found += [(f"{target}.{alias.name}", node.lineno) for alias in node.names]
    return [(name, line) for name, line in found if name.startswith("plantlint")]


def _graph() -> dict[str, set[str]]:
    modules = {_module_name(p): p for p in PACKAGE.rglob("*.py")}
    graph: dict[str, set[str]] = {}
    for name, path in modules.items():
        graph[name] = {target for target, _ in _imports(path) if target in modules and target != name}
    return graph


def test_every_module_lives_in_a_layer() -> None:
    loose = [name for name in _graph() if _layer(name) is None
             and name not in ("plantlint", "plantlint.__main__")]
    assert loose == []


def test_imports_only_go_down() -> None:
    upward = []
    for path in PACKAGE.rglob("*.py"):
        mine = _layer(_module_name(path))
        if mine is None:
            continue
        for target, line in _imports(path):
            theirs = _layer(target)
            if theirs is not None and LAYERS.index(theirs) > LAYERS.index(mine):
                upward.append(f"{path.relative_to(PACKAGE)}:{line} ({mine}) imports {target} ({theirs})")
    assert upward == []


def test_no_import_cycles() -> None:
    graph = _graph()
    cycles: list[list[str]] = []
    state: dict[str, int] = {}
    stack: list[str] = []

    def visit(node: str) -> None:
        state[node] = 1
        stack.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                cycles.append(stack[stack.index(nxt):] + [nxt])
            elif nxt not in state:
                visit(nxt)
        stack.pop()
        state[node] = 2

    for node in sorted(graph):
        if node not in state:
            visit(node)
    assert cycles == []


@pytest.mark.parametrize("layer", ["core", "kernel", "language"])
def test_lower_layers_do_not_load_the_terminal_library(layer: str) -> None:
    """rich is for presentation: model reading and the kernel never pull it in."""
    offenders = [str(p.relative_to(PACKAGE)) for p in (PACKAGE / layer).rglob("*.py")
                 if any(t.startswith("rich") for t, _ in _imports_any(p))]
    assert offenders == []


def _imports_any(path: Path) -> list[tuple[str, int]]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out += [(a.name, node.lineno) for a in node.names]
        elif isinstance(node, ast.ImportFrom) and not node.level and node.module:
            out.append((node.module, node.lineno))
    return out
