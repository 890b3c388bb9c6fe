"""The package's layout rules: no import cycles."""

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "pourbaix"


def _module_name(path):
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _imports(path):
    """Every pourbaix module a file imports (at module level or inside functions), with names."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("pourbaix"):
            found.append((node.module, [a.name for a in node.names]))
        elif isinstance(node, ast.Import):
            for a in node.names:
                if a.name.startswith("pourbaix"):
                    found.append((a.name, []))
    return found


def _graph():
    modules = {_module_name(p): p for p in PACKAGE.rglob("*.py")}
    graph = {}
    for name, path in modules.items():
        deps = set()
        for target, names in _imports(path):
            for n in names:  # "from pourbaix.maps import systems" imports a module
                if f"{target}.{n}" in modules:
                    deps.add(f"{target}.{n}")
            if target in modules:
                deps.add(target)
        # a package __init__ is not a dependency of its own submodules' import order
        graph[name] = {d for d in deps if d != name and not name.startswith(d + ".")}
    return graph


def test_the_import_graph_has_no_cycle():
    graph = _graph()
    state = {}
    stack = []

    def visit(node):
        state[node] = "open"
        stack.append(node)
        for dep in sorted(graph.get(node, ())):
            if state.get(dep) == "open":
                cycle = stack[stack.index(dep) :] + [dep]
                pytest.fail("import cycle: " + " -> ".join(cycle))
            if dep not in state:
                visit(dep)
        stack.pop()
        state[node] = "done"

    for node in sorted(graph):
        if node not in state:
            visit(node)
def test_no_module_imports_another_modules_private_names():
    offenders = []
    for path in PACKAGE.rglob("*.py"):
        for target, names in _imports(path):
            if target == _module_name(path):
                continue
            offenders += [
                f"{path.relative_to(PACKAGE.parent)} imports {target}.{n}"
                for n in names
                if n.startswith("_") and not n.startswith("__")
            ]
    assert not offenders, "\n".join(offenders)


def test_analyses_compute_only():
    # computing is kept apart from drawing (code layout of the project): no module under
    # pourbaix/analyses/ imports matplotlib or pourbaix.plot, at module level or in a function
    offenders = []
    for path in (PACKAGE / "analyses").rglob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom):
                targets = [node.module or ""]
                if node.module == "pourbaix":
                    targets += [f"pourbaix.{a.name}" for a in node.names]
            elif isinstance(node, ast.Import):
                targets = [a.name for a in node.names]
            else:
                continue
            offenders += [
                f"{path.relative_to(PACKAGE.parent)}:{node.lineno} imports {t}"
                for t in targets
                if t.split(".")[0] == "matplotlib" or t == "pourbaix.plot" or t.startswith("pourbaix.plot.")
            ]
    assert not offenders, "\n".join(offenders)
