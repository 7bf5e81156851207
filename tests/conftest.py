"""Fixtures shared by the test files."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from workbench.presets import preset_path

# Environment variables that change how Textual draws (colours, theme, animations): a snapshot
# taken with any of them set would differ from one taken on a plain CI machine.
RENDERING_VARIABLES = ("NO_COLOR", "FORCE_COLOR", "TEXTUAL_COLOR_SYSTEM", "TEXTUAL_THEME",
                       "TEXTUAL_ANIMATIONS", "COLORTERM")


@pytest.fixture
def plain_environment(monkeypatch):
    """None of RENDERING_VARIABLES set, for SVG snapshots that match on any machine."""
    for name in RENDERING_VARIABLES:
        monkeypatch.delenv(name, raising=False)


@pytest.fixture
def press_file(tmp_path) -> Path:
    """A copy of the cam-press preset to edit and save."""
    path = tmp_path / "press.toml"
    shutil.copy(preset_path("cam-press"), path)
    return path


@pytest.fixture
def unlaid_press(press_file):
    """The cam-press project with its stamp cam following an axis that is not there: a cam that
    cannot be laid out."""
    from dataclasses import replace

    from workbench.projectfile import load_project

    project = load_project(press_file)
    cams = project.parts["cam"]
    return replace(project, parts={**project.parts, "cam": [replace(cams[0], axis="gone")] + cams[1:]})
