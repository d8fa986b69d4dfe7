"""The frame: the package reads as the pipeline, with no cycles and no reaching into privates.

Checks of the code's own structure (not of physics), read with Python's ast module.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "orbviz"
# the pipeline's stages in order; a module may import from its own stage or earlier ones
STAGES = [
    "base",
    "states",
    "levels",
    "surface",
    "export",
    "figures",
    "models",
    "pages",
    "scenes",
    "top",
]
BASE = {
    "orbviz.codata",
    "orbviz._defaults",
    "orbviz.errors",
    "orbviz._options",
    "orbviz._interrupt",
    "orbviz._progress",
}
# the imports that run back up the pipeline, lazily: a mesh's convenience export() method, and
# the notebook display methods (_repr_html_, _repr_png_) of states, meshes and figures
ALLOWED_BACK = {
    ("orbviz.surface.mesh", "orbviz.export"),
    ("orbviz.states.orbital", "orbviz.pages"),
    ("orbviz.states.bond", "orbviz.pages"),
    ("orbviz.surface.mesh", "orbviz.pages"),
    ("orbviz.figures.figure", "orbviz.pages"),
}


def _allowed_back(module: str, target: str) -> bool:
    return (module, ".".join(target.split(".")[:2])) in ALLOWED_BACK


def _module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


MODULES = {_module_name(p): p for p in sorted(PACKAGE.rglob("*.py"))}


def _stage(module: str) -> int:
    if module in BASE:
        return 0
    parts = module.split(".")
    if len(parts) > 2 and parts[1] in STAGES:
        return STAGES.index(parts[1])
    if len(parts) == 2 and parts[1] in STAGES:
        return STAGES.index(parts[1])
    return len(STAGES) - 1  # orbviz, orbviz.api, orbviz.cli, orbviz.__main__


def _typing_only(tree: ast.AST) -> set[int]:
    """ids of import nodes under ``if TYPE_CHECKING:`` (they never run)."""
    skip = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.If) and getattr(node.test, "id", None) == "TYPE_CHECKING":
            skip |= {id(n) for stmt in node.body for n in ast.walk(stmt)}
    return skip


def _imports(module: str) -> list[tuple[str, list[str]]]:
    """(imported orbviz module, names) for every import that runs, lazy ones included."""
    tree = ast.parse(MODULES[module].read_text())
    skip = _typing_only(tree)
    out = []
    for node in ast.walk(tree):
        if id(node) in skip:
            continue
        if isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("orbviz"):
            out.append((node.module, [a.name for a in node.names]))
        elif isinstance(node, ast.Import):
            out += [(a.name, []) for a in node.names if a.name.startswith("orbviz")]
    return out


def _target(name: str, names: list[str]) -> list[str]:
    """Modules an import reaches: the module itself, or submodules named in a from-import."""
    found = [f"{name}.{n}" for n in names if f"{name}.{n}" in MODULES]
    return found or [name]


def test_no_import_cycles():
    # the allowed lazy imports back up the pipeline run inside methods, at call time, after
    # every module is loaded: they are left out of the graph
    graph = {
        m: {
            t
            for name, names in _imports(m)
            for t in _target(name, names)
            if t in MODULES and not _allowed_back(m, t)
        }
        for m in MODULES
    }
    state: dict[str, int] = {}  # 1: on the current path, 2: done

    def visit(node: str, path: list[str]) -> None:
        state[node] = 1
        for nxt in graph[node]:
            if nxt == node or nxt == "orbviz":
                continue
            if state.get(nxt) == 1:
                raise AssertionError("import cycle: " + " -> ".join([*path, node, nxt]))
            if nxt not in state:
                visit(nxt, [*path, node])
        state[node] = 2

    for module in MODULES:
        if module not in state:
            visit(module, [])


def test_imports_run_down_the_pipeline():
    back = []
    for module in MODULES:
        for name, names in _imports(module):
            for target in _target(name, names):
                if target == "orbviz" and names == ["__version__"]:
                    continue  # the version string lives on the package
                if _stage(target) > _stage(module) and not _allowed_back(module, target):
                    back.append(f"{module} imports {target}")
    assert back == []


def test_no_private_names_used_across_modules():
    crossing = [
        f"{module}: from {name} import {n}"
        for module in MODULES
        for name, names in _imports(module)
        for n in names
        if n.startswith("_")
        and n != "__version__"
        and name != module
        and name not in ("orbviz", "orbviz._options", "orbviz._defaults", "orbviz._interrupt")
    ]
    assert crossing == []


def test_modules_and_functions_stay_small():
    # house rule (common practice, no source): modules of 100-500 lines, functions under ~80
    long_modules = [m for m, p in MODULES.items() if len(p.read_text().splitlines()) > 500]
    long_functions = []
    for module, path in MODULES.items():
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                length = (node.end_lineno or node.lineno) - node.lineno + 1
                if length > 80:
                    long_functions.append(f"{module}.{node.name}: {length} lines")
    assert long_modules == [] and long_functions == []


def test_no_type_flags():
    # downstream code asks a state through its interface; it never probes for a kind
    import re

    probe = re.compile(r"getattr\([^)]*general|isinstance\([^)]*\b(Orbital|Bond)\b")
    offenders = [m for m, p in MODULES.items() if probe.search(p.read_text())]
    assert offenders == []


def test_package_map_lists_every_subpackage():
    import orbviz

    subpackages = sorted(p.parent.name for p in PACKAGE.glob("*/__init__.py"))
    for name in subpackages:
        assert f"``orbviz.{name}``" in (orbviz.__doc__ or ""), name


@pytest.mark.parametrize("heavy", ["vtkmodules", "pyvista", "trimesh", "matplotlib"])
def test_info_loads_no_rendering_or_mesh_library(heavy):
    code = (
        "import sys, io, contextlib\n"
        "from orbviz.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    assert main(['info', '3dz2']) == 0\n"
        f"print({heavy!r} in sys.modules)\n"
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    )
    assert result.stdout.strip() == "False"
