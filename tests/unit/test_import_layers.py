"""The package's import graph: no circles and no module importing from a higher floor.

Floors (DEVELOPERS.md, "Import floors"), lowest first; a module may import from its own floor or
lower ones only. Imports inside functions count too: they are still dependencies.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[2] / "src" / "quenchwise"

#: floor of each top-level module or subpackage of quenchwise (lowest first)
FLOORS = {
    # 0: leaves every layer may use
    "errors": 0, "cautions": 0, "units": 0, "version": 0, "tomltext": 0, "csvmeta": 0, "formatting": 0, "interpolation": 0,
    # 1: steel chemistry and critical temperatures
    "steel": 1,
    # 2: the science layers and their data holders
    "thermal": 2, "kinetics": 2, "hardness": 2, "case": 2, "part_case": 2, "results": 2, "results_rz": 2, "sanity": 2, "quick": 2,
    "measured": 2,
    # 3: the questions asked of the science
    "workflows": 3,
    # 4: presentation: figures, sheet, text, publishing of the output folder
    "plots": 4, "steel_figures": 4, "quenchant_figures": 4, "tank_figures": 4, "part_maps": 4, "report": 4, "text_output": 4, "publish": 4,
    "figure_files": 4, "side_by_side": 4,
    # 5: entry points (the package's public API facade included)
    "cli": 5, "cli_support": 5, "__main__": 5, "__init__": 5, "api": 5,
}



def module_names() -> dict[str, Path]:
    names = {}
    for path in PACKAGE.rglob("*.py"):
        parts = list(path.relative_to(PACKAGE).with_suffix("").parts)
        if parts[-1] == "__init__" and len(parts) > 1:
            parts = parts[:-1]
        names[".".join(parts)] = path
    return names


def imports_of(name: str, path: Path, known: set[str]) -> set[str]:
    """Modules of the package that `name` imports (anywhere in the file), as dotted names."""
    package = name.split(".") if path.name == "__init__.py" and name != "__init__" else name.split(".")[:-1]
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        targets = []
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = package[: len(package) - (node.level - 1)]
            elif (node.module or "").startswith("quenchwise"):
                base = []
                node = ast.ImportFrom(module=node.module[len("quenchwise"):].lstrip("."), names=node.names, level=1)
            else:
                continue
            stem = base + (node.module.split(".") if node.module else [])
            for alias in node.names:
                full = ".".join(stem + [alias.name])
                targets.append(full if full in known else ".".join(stem) or "__init__")
        elif isinstance(node, ast.Import):
            for alias in node.names:
                if alias.name.startswith("quenchwise."):
                    targets.append(alias.name[len("quenchwise."):])
        found.update(t for t in targets if t != name)
    return found


def graph() -> dict[str, set[str]]:
    names = module_names()
    return {name: imports_of(name, path, set(names)) for name, path in names.items()}


def floor(name: str) -> int:
    return FLOORS[name.split(".")[0]]


def test_every_module_has_a_floor():
    assert sorted({n.split(".")[0] for n in module_names()} - set(FLOORS)) == []


def test_no_module_imports_from_a_higher_floor():
    upward = sorted((a, b) for a, deps in graph().items() for b in deps if floor(b) > floor(a))
    assert upward == []


def test_no_import_circles():
    edges = graph()
    circles, state = [], {}

    def visit(node, path):
        state[node] = "open"
        for nxt in sorted(edges.get(node, ())):
            if state.get(nxt) == "open":
                circles.append(path[path.index(nxt):] + [nxt])
            elif nxt not in state:
                visit(nxt, path + [nxt])
        state[node] = "done"

    for start in sorted(edges):
        if start not in state:
            visit(start, [start])
    assert circles == []


def test_the_walker_sees_a_circle_and_an_upward_import(tmp_path, monkeypatch):
    # the checks above could pass by seeing nothing: a made-up package with both faults
    pkg = tmp_path / "quenchwise"
    (pkg / "steel").mkdir(parents=True)
    (pkg / "steel" / "__init__.py").write_text("from ..workflows import x\n")
    (pkg / "workflows.py").write_text("def f():\n    from .steel import y\n")
    monkeypatch.setattr(sys.modules[__name__], "PACKAGE", pkg)
    g = graph()
    assert g == {"steel": {"workflows"}, "workflows": {"steel"}}


@pytest.mark.parametrize("module", ["quenchwise", "quenchwise.case"])
def test_light_imports_load_no_fipy_nor_matplotlib(module):
    code = f"import sys, {module}; print(sorted(m for m in ('fipy', 'matplotlib') if m in sys.modules))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "[]"


#: Longest module, in lines (issue 16: modules one reader can hold in mind).
MAX_LINES = 450

def test_no_module_is_over_450_lines():
    long = {p.relative_to(PACKAGE).as_posix(): len(p.read_text(encoding="utf-8").splitlines())
            for p in PACKAGE.rglob("*.py")}
    assert {p: n for p, n in long.items() if n > MAX_LINES} == {}
