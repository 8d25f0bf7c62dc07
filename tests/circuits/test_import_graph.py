"""The circuits app's imports run one way (DEVELOPERS.md: sizing <- findings <- rules <-
system report <- views): no module of circuits/ imports, directly or through others, a
module that imports it back. Imports inside functions count too: a lazy import only hides
a loop."""

from __future__ import annotations

import ast
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
PACKAGE = "circuits"


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    return {
        _module_name(path): path
        for path in (ROOT / PACKAGE).rglob("*.py")
        if "migrations" not in path.parts
    }


def _resolve(name: str, modules: dict[str, Path]) -> str | None:
    """The circuits module an imported name lives in (a package's name counts as its
    __init__), or None for anything outside the app."""
    while name:
        if name in modules:
            return name
        name = name.rpartition(".")[0]
    return None


def _imports(module: str, path: Path, modules: dict[str, Path]) -> set[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    package = module if path.name == "__init__.py" else module.rpartition(".")[0]
    found: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = package.split(".")
                anchor = anchor[: len(anchor) - (node.level - 1)]
                base = ".".join([*anchor, base] if base else anchor)
            # "from package import module" imports the module, not only the package.
            names = [f"{base}.{alias.name}" for alias in node.names] + [base]
        else:
            continue
        for name in names:
            target = _resolve(name, modules)
            if target is not None and target != module:
                found.add(target)
    return found


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    cycles, state, stack = [], {}, []

    def visit(node: str) -> None:
        state[node] = "open"
        stack.append(node)
        for other in sorted(graph[node]):
            if state.get(other) == "open":
                cycles.append([*stack[stack.index(other) :], other])
            elif other not in state:
                visit(other)
        stack.pop()
        state[node] = "done"

    for node in sorted(graph):
        if node not in state:
            visit(node)
    return cycles


def test_no_module_of_the_circuits_app_imports_itself_back():
    modules = _modules()
    graph = {name: _imports(name, path, modules) for name, path in modules.items()}
    # A package importing its own submodules (its __init__ re-exporting them) is how a
    # package is built, not a loop: leave those edges out.
    for name in graph:
        graph[name] = {t for t in graph[name] if not t.startswith(name + ".")}
    assert [" -> ".join(cycle) for cycle in _cycles(graph)] == []


def test_the_rules_take_the_shared_types_from_the_findings_module():
    modules = _modules()
    rules = [name for name in modules if name.startswith("circuits.rules")]
    assert rules
    for name in rules:
        assert "circuits.system" not in _imports(name, modules[name], modules), name
