"""The layout is the architecture: floors, no import circles, nothing private shared.

Issue 10 asked that the folders read as the architecture and that it stay that way:
a module imports only from its own floor or below, no two modules import each other
(directly or round a longer circle, counting imports inside functions too), no private
name (``_name``) is imported from another module, and ``import gasdyn2d`` pulls in none of
the optional or slow libraries. These are checks of the source itself (the ``ast`` of
every module), so they hold for every future change.
"""

from __future__ import annotations

import ast
import pathlib
import subprocess
import sys

import pytest

PACKAGE = pathlib.Path(__file__).resolve().parents[1] / "gasdyn2d"

#: floor of each top-level part of the package (a module imports from its floor or below)
FLOORS = {"errors": 0, "numerics": 0, "boundary": 0, "relations": 1, "patterns": 2,
          "characteristics": 2, "design": 3, "plot": 4, "__init__": 5, "__main__": 5}


def _module_name(path):
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1]) if parts[-1] == "__init__" else ".".join(parts)


def _imports(path):
    """(imported module, imported names) of every ``from gasdyn2d... import`` in ``path``,
    resolved to absolute module names, at any depth of the file."""
    module = _module_name(path)
    package = module if path.name == "__init__.py" else module.rpartition(".")[0]
    tree = ast.parse(path.read_text())
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[:len(base) - (node.level - 1)]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            if target == "gasdyn2d" or target.startswith("gasdyn2d."):
                found.append((target, [(alias.name, alias.asname) for alias in node.names]))
    return module, found


MODULES = {}
for source in sorted(PACKAGE.rglob("*.py")):
    name, imports = _imports(source)
    MODULES[name] = imports


def _floor(module):
    part = module.split(".")[1] if module.count(".") else "__init__"
    return FLOORS[part]


def _resolve(target, name):
    """The module an imported name comes from: a submodule itself, or ``target``."""
    candidate = f"{target}.{name}"
    return candidate if candidate in MODULES else target


def test_every_module_imports_only_from_its_floor_or_below():
    offences = []
    for module, imports in MODULES.items():
        if module in ("gasdyn2d", "gasdyn2d.__main__"):
            continue
        for target, names in imports:
            for name, _ in names:
                source = _resolve(target, name)
                if source in MODULES and source != "gasdyn2d" and _floor(source) > _floor(module):
                    offences.append(f"{module} (floor {_floor(module)}) imports {source} "
                                    f"(floor {_floor(source)})")
    assert not offences, "\n".join(offences)


def test_no_private_name_crosses_a_module_boundary():
    offences = []
    for module, imports in MODULES.items():
        for target, names in imports:
            for name, _ in names:
                if name.startswith("_") and not name.startswith("__"):
                    offences.append(f"{module} imports the private {target}.{name}")
    assert not offences, "\n".join(offences)


def test_no_import_circles():
    graph = {m: set() for m in MODULES}
    for module, imports in MODULES.items():
        for target, names in imports:
            for name, _ in names:
                source = _resolve(target, name)
                if source in graph and source != module and not source.endswith("__init__"):
                    if source == "gasdyn2d" or (module.startswith(source + ".")):
                        continue  # a package's __init__ re-exports its own modules
                    graph[module].add(source)
    state, circle = {}, []

    def visit(node, path):
        state[node] = "open"
        for nxt in sorted(graph[node]):
            if state.get(nxt) == "open":
                circle.extend(path[path.index(nxt):] + [nxt] if nxt in path else [node, nxt])
                return True
            if nxt not in state and visit(nxt, path + [nxt]):
                return True
        state[node] = "done"
        return False

    for start in sorted(graph):
        if start not in state and visit(start, [start]):
            break
    assert not circle, "import circle: " + " -> ".join(circle)


def test_import_loads_none_of_the_optional_or_slow_libraries():
    code = ("import sys, gasdyn2d; print(' '.join(sorted(m for m in "
            "('pint', 'scipy', 'pandas', 'xarray', 'dask', 'matplotlib') if m in sys.modules)))")
    loaded = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                            check=True, cwd=PACKAGE.parent).stdout.split()
    assert loaded == []


@pytest.mark.parametrize("module", sorted(MODULES))
def test_modules_stay_below_the_house_size(module):
    # STYLE.md: a module that passes ~800 lines is asking to be split by topic
    path = PACKAGE.parent / (module.replace(".", "/") + ".py")
    if not path.exists():
        path = PACKAGE.parent / module.replace(".", "/") / "__init__.py"
    assert len(path.read_text().splitlines()) <= 850, f"{module} is over ~800 lines"
