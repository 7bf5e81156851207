"""The motion core and the solver load without any UI; so do the workbench's numpy-only helpers.

Each import runs in a fresh interpreter, so nothing imported by other tests
can hide a stray `import textual` (common practice, after import-linter's
"forbidden" contracts).
"""

from __future__ import annotations

import json
import subprocess
import sys

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
