"""The motion core and the solver load without any UI; so do the workbench's numpy-only helpers.

Each import runs in a fresh interpreter, so nothing imported by other tests
can hide a stray `import textual` (common practice, after import-linter's
"forbidden" contracts).
"""

from __future__ import annotations

import ast
import json
import subprocess
import sys
from pathlib import Path

import pytest

UI = ("textual", "rich")


def loaded_after(statement: str) -> set[str]:
    code = f"{statement}\nimport json, sys\nprint(json.dumps(sorted(sys.modules)))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return {m.split(".")[0] for m in json.loads(out.stdout.strip().splitlines()[-1])}


def test_core_and_solver_load_no_ui_and_no_workbench():
    loaded = loaded_after("import motionlaws, solver")
    assert "motionlaws" in loaded and "solver" in loaded  # the check itself works
    for name in (*UI, "workbench"):
        assert name not in loaded, f"{name} was imported by motionlaws or solver"


@pytest.mark.parametrize("module", ["workbench.tui.sampling", "workbench.tui.widgets.braille"])
def test_ui_free_workbench_parts_load_no_ui(module):
    loaded = loaded_after(f"import {module}")
    for name in UI:
        assert name not in loaded, f"{name} was imported by {module}"


def test_the_check_would_see_textual():
    assert "textual" in loaded_after("import workbench.app")


def solver_imports(root: Path) -> list[tuple[str, str]]:
    """(file, module) for every `solver…` module the files under `root` import."""
    found = []
    for path in sorted(root.rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
                names = [node.module]
            elif isinstance(node, ast.Import):
                names = [alias.name for alias in node.names]
            else:
                continue
            found += [(str(path), n) for n in names if n == "solver" or n.startswith("solver.")]
    return found


def test_the_workbench_uses_the_solvers_public_packages_only():
    """The workbench reaches the solver through `solver.cam`, `solver.kinematics` and
    `solver.loads` (their `__init__` is the API), never a module inside them."""
    root = Path(__file__).resolve().parents[1] / "workbench"
    found = solver_imports(root)
    assert found  # the check itself sees imports
    deep = [(f, m) for f, m in found if m.count(".") > 1]
    assert not deep, f"solver internals imported: {deep}"


def test_the_workbench_imports_only_names_the_solver_packages_export():
    """`from solver.kinematics import newton` would reach inside too: every name the workbench
    takes from a solver package is in that package's `__all__`."""
    import importlib

    root = Path(__file__).resolve().parents[1] / "workbench"
    names = []
    for path in sorted(root.rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.level == 0 and (node.module or "").startswith("solver"):
                names += [(str(path), node.module, alias.name) for alias in node.names]
    assert names  # the check sees imports
    outside = [(f, m, n) for f, m, n in names if n not in getattr(importlib.import_module(m), "__all__", ())]
    assert not outside, f"names not in the solver packages' __all__: {outside}"
