"""SVG snapshots of the main screens at 80×24 and 120×40.

State is asserted before each picture (the picture alone would not say what
is wrong).  Stable in CI: Textual is pinned in pyproject, environment
variables that change rendering are cleared, the worker is waited for, and
the input cursor does not blink.  Review a changed picture in the report
before `pytest --snapshot-update`.
"""

from __future__ import annotations

import pytest
from textual.widgets import Input

from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.views.axes import AxesView
from workbench.tui.widgets.segment_table import SegmentTable

from tests.tui_pilot import settle


@pytest.fixture(autouse=True)
def _plain(plain_environment):
    """Every test here is a snapshot: none of the rendering variables set (conftest.py)."""


def workbench(preset: str = "tray-lidder") -> Workbench:
    return Workbench(load_project(preset_path(preset)))


async def settled(pilot) -> None:
    """Settled, and no cursor blinking in a field (a blink would differ between runs)."""
    await settle(pilot)
    for field in pilot.app.screen.query(Input):
        field.cursor_blink = False
    await pilot.pause()


def test_axes_80x24(snap_compare):
    app = workbench()

    async def check(pilot):
        await settled(pilot)
        assert app.query_one("#peaks").rows["jerk"]["verdict"] == "✗ OVER"

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_axes_120x40_all_four_plots(snap_compare):
    app = workbench()

    async def check(pilot):
        await settled(pilot)
        assert app.query_one("#plots").has_class("-grid")

    assert snap_compare(app, terminal_size=(120, 40), run_before=check)


def test_axes_join_warnings_80x24(snap_compare):
    app = workbench("carton-indexer")

    async def check(pilot):
        await settled(pilot)
        await pilot.press("full_stop", "full_stop")  # flap-folder: harmonic next to dwells
        await settled(pilot)
        assert app.query_one("#axes").axis_name == "flap-folder"

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_span_refused_80x24(snap_compare):
    app = workbench()

    async def check(pilot):
        await settled(pilot)
        app.query_one(SegmentTable).move_cursor(row=0, column=2)
        await pilot.press("enter", "1", "2", "x")  # typed over the span cell, in place
        await settled(pilot)
        view = app.query_one(AxesView)
        assert view.editing and view.editor.text == "12x" and "is not a number" in view.editor.error

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_law_list_80x24(snap_compare):
    app = workbench()

    async def check(pilot):
        await settled(pilot)
        await pilot.press("l")
        await settled(pilot)

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_timing_120x40(snap_compare):
    app = workbench("label-arm")

    async def check(pilot):
        await settled(pilot)
        await pilot.press("2", *["right"] * 12)
        await settled(pilot)
        assert app.query_one("#timing").angle == 60.0

    assert snap_compare(app, terminal_size=(120, 40), run_before=check)


def test_timing_80x24(snap_compare):
    app = workbench()

    async def check(pilot):
        await settled(pilot)
        await pilot.press("2")
        await settled(pilot)

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_help_120x40(snap_compare):
    app = workbench()

    async def check(pilot):
        await settled(pilot)
        await pilot.press("f1")
        await settled(pilot)

    assert snap_compare(app, terminal_size=(120, 40), run_before=check)


def test_cam_view_not_yet_80x24(snap_compare):
    app = workbench()

    async def check(pilot):
        await settled(pilot)
        await pilot.press("4")
        await settled(pilot)

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)
