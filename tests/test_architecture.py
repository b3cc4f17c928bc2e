"""The package's shape: no import cycle, each stage imports only the stages before it, lean command modules.

The facts are read from the package's own source with :mod:`ast` (every import, at module level or
inside a function), so a lazy import cannot hide a cycle.  The stage order is the flow the
contributor guide draws: geometry -> meshes -> ratio (solvers) -> trains -> lathe (an application of the
solvers and trains) -> export -> cli.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "gearcad"

#: The shared base: input readers, validators and the error family.
BASE = {"errors", "lazy", "validate", "inputfiles", "profiles", "materials", "profile_data"}
#: What each stage folder may import besides the base (and itself).
ALLOWED = {
    "geometry": set(),
    "meshes": {"geometry"},
    "ratio": {"geometry", "meshes"},
    "trains": {"geometry", "meshes", "ratio"},
    "lathe": {"geometry", "meshes", "ratio", "trains"},
    "export": {"geometry", "meshes", "ratio", "trains", "lathe"},
    "cli": {"geometry", "meshes", "ratio", "trains", "lathe", "export"},
}


def _modules() -> dict[str, Path]:
    found = {}
    for path in PACKAGE.rglob("*.py"):
        parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        found[".".join(parts)] = path
    return found


def _imports(module: str, path: Path, modules: dict[str, Path]) -> set[str]:
    """The package's modules that ``module`` imports, anywhere in its source."""
    package = module.split(".") if path.name == "__init__.py" else module.split(".")[:-1]
    out = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = package[: len(package) - (node.level - 1)]
                name = ".".join(base + ([node.module] if node.module else []))
            else:
                name = node.module or ""
            candidates = [name] + [f"{name}.{alias.name}" for alias in node.names]
        elif isinstance(node, ast.Import):
            candidates = [alias.name for alias in node.names]
        else:
            continue
        for candidate in candidates:
            while candidate and candidate not in modules:
                candidate = candidate.rpartition(".")[0]
            if candidate and candidate not in (module, "gearcad"):
                out.add(candidate)
    return out


GRAPH = {name: _imports(name, path, _modules()) for name, path in _modules().items()}


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components of more than one module (Tarjan's algorithm, iterative)."""
    index, low, stack, on_stack, out, counter = {}, {}, [], set(), [], 0
    for root in graph:
        if root in index:
            continue
        work = [(root, iter(sorted(graph[root])))]
        index[root] = low[root] = counter
        counter += 1
        stack.append(root)
        on_stack.add(root)
        while work:
            node, children = work[-1]
            child = next(children, None)
            if child is not None:
                if child not in index:
                    index[child] = low[child] = counter
                    counter += 1
                    stack.append(child)
                    on_stack.add(child)
                    work.append((child, iter(sorted(graph.get(child, ())))))
                elif child in on_stack:
                    low[node] = min(low[node], index[child])
                continue
            work.pop()
            if work:
                low[work[-1][0]] = min(low[work[-1][0]], low[node])
            if low[node] == index[node]:
                component = []
                while True:
                    member = stack.pop()
                    on_stack.discard(member)
                    component.append(member)
                    if member == node:
                        break
                if len(component) > 1:
                    out.append(sorted(component))
    return out


def test_the_cycle_finder_finds_a_planted_cycle():
    # The finder itself, on a graph with one known three-module cycle and a tail.
    graph = {"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}
    assert _cycles(graph) == [["a", "b", "c"]]


def test_the_package_has_no_import_cycle():
    assert _cycles(GRAPH) == []


def _stage(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else "gearcad"


@pytest.mark.parametrize("stage", sorted(ALLOWED))
def test_each_stage_imports_only_the_stages_before_it(stage):
    wrong = sorted(f"{module} -> {target}" for module, targets in GRAPH.items() if _stage(module) == stage
                   for target in targets
                   if _stage(target) not in ALLOWED[stage] | BASE | {stage})
    assert wrong == []


def test_the_base_modules_import_only_the_base():
    wrong = sorted(f"{module} -> {target}" for module, targets in GRAPH.items() if _stage(module) in BASE
                   for target in targets if _stage(target) not in BASE)
    assert wrong == []


def test_no_command_module_takes_another_command_modules_private_names():
    wrong = []
    for module, path in _modules().items():
        if not module.startswith("gearcad.cli."):
            continue
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.module and node.level == 1 and not node.module.startswith("_"):
                wrong += [f"{module}: {node.module}.{a.name}" for a in node.names if a.name.startswith("_")]
    assert wrong == []


#: "Files stay under about 500 lines, each one topic" (the contributor guide): a little slack over 500 for
#: a docstring that grows, none for a second topic.  A file that needs more splits by topic (see the guide's
#: "A topic that outgrows a file").
MAX_MODULE_LINES = 510


def test_every_module_stays_under_the_size_of_one_topic():
    long = {name: n for name, path in _modules().items()
            if (n := len(path.read_text(encoding="utf-8").splitlines())) > MAX_MODULE_LINES}
    assert not long, f"modules over {MAX_MODULE_LINES} lines (split them by topic): {long}"
