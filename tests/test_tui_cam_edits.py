"""A cam's turning (`t`) and limits (`L`) edited in the Cam view, as a user does it.

The numbers on screen are checked against outside references, by the
helpers of tests/test_editing_parts.py: the textbook translating-roller
form tan φ = (s' ∓ e)/(√(Rp² − e²) + s) (DESIGN §5; machine-design texts,
e.g. Norton, *Design of Machinery*, cam chapter, from memory) and the
instant-centre construction of an oscillating roller's pressure angle
(Kennedy's theorem; the same chapter, from memory).  Their peaks are sought
on a 0.01° grid.
"""

from __future__ import annotations

import difflib

import numpy as np
from textual.widgets import Input, Static

from test_editing_parts import GRID, instant_centre_pressure_angles, textbook_pressure_angle
from workbench.app import Workbench
from workbench.axisreport import fmt
from workbench.camfile import CamLimitsSpec, find_cam
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.screens.fields_dialog import FieldsDialog
from workbench.tui.views.cam import CamView
from workbench.tui.widgets.cam_verdicts import CamVerdicts

from tests.tui_pilot import settle

SIZE = (100, 30)


async def cam_view(pilot, cams_on: int = 0) -> CamView:
    """The Cam view on view, `cams_on` cams after the first."""
    await settle(pilot)
    await pilot.press("4", *["full_stop"] * cams_on)
    await settle(pilot)
    return pilot.app.query_one(CamView)


def rows(app) -> dict:
    return {r["check"]: r for r in app.query_one(CamVerdicts).rows}


def bar(app) -> str:
    return str(app.query_one("#cam-bar", Static).content)


async def open_limits(pilot) -> FieldsDialog:
    await pilot.press("L")
    await pilot.pause()
    assert isinstance(pilot.app.screen, FieldsDialog)
    return pilot.app.screen


async def type_limits(pilot, **typed: str) -> None:
    for key, text in typed.items():
        pilot.app.screen.query_one(f"#{key}", Input).value = text
    await pilot.pause()


def feedback(dialog: FieldsDialog) -> str:
    return str(dialog.query_one("#feedback", Static).content)


# --- turning ---------------------------------------------------------------------------------


async def test_t_reverses_an_oscillating_cam_in_one_undoable_edit(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        view = await cam_view(pilot, cams_on=1)
        assert view.cam_name == "feed-cam" and "turns cw ↻ (t)" in bar(app)
        before = app.project
        peak = {t: float(np.max(instant_centre_pressure_angles(before, t, GRID))) for t in ("cw", "ccw")}
        at = {t: float(GRID[np.argmax(instant_centre_pressure_angles(before, t, GRID))]) for t in ("cw", "ccw")}
        assert rows(app)["pressure angle"]["value"] == f"{fmt(peak['cw'])}°"
        assert rows(app)["pressure angle"]["at"] == f"{at['cw']:.1f}°"
        await pilot.press("t")
        await settle(pilot)
        assert find_cam(app.project, "feed-cam").turning == "ccw" and find_cam(before, "feed-cam").turning == "cw"
        assert app.status_text == "cam feed-cam: turning cw → ccw" and app.history.modified
        assert "turns ccw ↺ (t)" in bar(app)
        # the instant centre moves with the cam's turning: the worst spot moves to the return stroke
        assert rows(app)["pressure angle"]["value"] == f"{fmt(peak['ccw'])}°"
        assert rows(app)["pressure angle"]["at"] == f"{at['ccw']:.1f}°"
        assert view.entry.study.cam.sigma == 1
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert app.project is before and not app.history.modified
        assert app.status_text == "undid the edit “cam feed-cam: turning cw → ccw”"
        assert rows(app)["pressure angle"]["value"] == f"{fmt(peak['cw'])}°" and "turns cw ↻" in bar(app)


async def test_the_turning_shows_in_the_top_line_at_80_columns(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=(80, 24)) as pilot:
        await cam_view(pilot)
        line = bar(app)
        assert "✓ all checks pass · axis stamp · turns cw ↻ (t)" in line
        assert len(line) <= 78 and not line.endswith("…")  # whole pieces only, inside the padding


# --- limits ----------------------------------------------------------------------------------


async def test_limits_dialog_previews_refuses_and_applies(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await cam_view(pilot)
        before = app.project
        dialog = await open_limits(pilot)
        fields = {k: dialog.query_one(f"#{k}", Input) for k in ("pressure_angle", "curvature_ratio", "min_radius")}
        assert [f.value for f in fields.values()] == ["30", "", ""]  # as the file gives them
        # a blank field says what it means: common practice (rule of thumb) or no limit
        assert fields["curvature_ratio"].placeholder == "blank: 2 (common practice)"
        assert fields["min_radius"].placeholder == "blank: no limit"
        assert fields["pressure_angle"].placeholder == "blank: 30 (common practice)"
        assert feedback(dialog).startswith("✓ then: all checks pass — pressure angle 24.52° ≤ 30°")
        await pilot.press("9", "5")  # typed over the selected "30"
        assert fields["pressure_angle"].value == "95"
        assert dialog.error.startswith("pressure_angle: must be below 90 deg, got 95 deg")
        assert feedback(dialog) == f"✗ {dialog.error}"
        await pilot.press("enter")  # refused: the dialog stays, the model is unchanged
        await pilot.pause()
        assert app.screen is dialog and app.project is before
        await type_limits(pilot, pressure_angle="25", min_radius="-3")
        assert dialog.error == "min_radius: must be above 0, got -3 mm (blank: leave the limit out)"
        await type_limits(pilot, min_radius="ten")
        assert dialog.error == "min_radius: 'ten' is not a number"
        await type_limits(pilot, min_radius="10 mm")
        assert dialog.error is None
        assert feedback(dialog) == ("✓ then: all checks pass — pressure angle 24.52° ≤ 25°, curvature ratio "
                                    "3.70× ≥ 2×, profile radius 32.44 mm ≥ 10 mm")
        await pilot.press("enter")
        await settle(pilot)
        assert find_cam(app.project, "stamp-cam").limits == CamLimitsSpec(25.0, None, 10.0)
        assert app.status_text == "cam stamp-cam: limits pressure_angle 30° → 25°, min_radius none → 10 mm"
        shown = rows(app)
        assert shown["pressure angle"]["limit"] == "≤ 25° file"
        assert shown["curvature ratio"]["limit"] == "≥ 2× *"  # still common practice
        assert shown["profile radius"]["limit"] == "≥ 10 mm file"
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert app.project is before and "profile radius" not in rows(app)


async def test_escape_and_an_unchanged_enter_make_no_edit(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await cam_view(pilot)
        before = app.project
        await open_limits(pilot)
        await type_limits(pilot, pressure_angle="20")
        await pilot.press("escape")
        await settle(pilot)
        assert app.project is before and not app.history.can_undo
        await open_limits(pilot)
        await pilot.press("enter")
        await settle(pilot)
        assert app.project is before and not app.history.can_undo
        assert app.status_text == "cam stamp-cam: limits unchanged"


async def test_a_curvature_ratio_on_a_flat_face_is_refused_where_it_is_typed(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await cam_view(pilot, cams_on=2)
        before = app.project
        dialog = await open_limits(pilot)
        assert dialog.query_one("#min_radius", Input).value == "8"
        assert dialog.query_one("#curvature_ratio", Input).placeholder == \
            "blank (no ratio for a translating flat follower)"
        await type_limits(pilot, curvature_ratio="2")
        assert dialog.error.startswith("curvature_ratio: applies to roller followers only, not a translating "
                                       "flat follower")
        assert feedback(dialog).startswith("✗ curvature_ratio")
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is dialog and app.project is before
        await pilot.press("escape")
        await settle(pilot)
        assert app.project is before


async def test_limit_against_the_textbook_peak_and_the_follower_kept_in_place(press_file):
    """Stamp cam, e = 6 mm, Rp = 60 mm.  Its peak follows the form with s' − e; turned the other way
    with the follower kept where it stands (offset −6 mm in the file's convention, where a positive
    offset eases the rise) it follows the form with s' + e."""
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await cam_view(pilot)
        rising = float(np.max(np.abs(textbook_pressure_angle(app.project, "stamp", 6.0, 60.0, GRID))))
        other = float(np.max(np.abs(textbook_pressure_angle(app.project, "stamp", -6.0, 60.0, GRID))))
        assert rising + 0.5 < other
        assert rows(app)["pressure angle"]["value"] == f"{fmt(rising)}°"
        dialog = await open_limits(pilot)
        await type_limits(pilot, pressure_angle=f"{rising - 0.01:.2f}")  # just under the peak
        assert "then: ✗ fails pressure angle" in feedback(dialog)
        await type_limits(pilot, pressure_angle=f"{(rising + other) / 2:.2f}")  # between the two peaks
        assert "then: all checks pass" in feedback(dialog)
        await pilot.press("enter")
        await settle(pilot)
        assert rows(app)["pressure angle"]["verdict"] == "✓ within" and "✓ all checks pass" in bar(app)
        await pilot.press("t")  # reversed alone: the offset keeps to the rise's side, a mirror image
        await settle(pilot)
        assert app.status_text == "cam stamp-cam: turning cw → ccw (mirrored: offset on the rise's side)"
        assert rows(app)["pressure angle"]["value"] == f"{fmt(rising)}°"
        await pilot.press("s")
        await pilot.pause()
        await pilot.press("c")  # offset
        await pilot.pause()
        app.screen.query_one("#value", Input).value = "-6"
        await pilot.pause()
        await pilot.press("enter")
        await settle(pilot)
        assert find_cam(app.project, "stamp-cam").turning == "ccw"
        assert rows(app)["pressure angle"]["value"] == f"{fmt(other)}°"
        assert rows(app)["pressure angle"]["verdict"] == "✗ OVER" and "✗ CHECK FAILED" in bar(app)


# --- saving ----------------------------------------------------------------------------------


async def test_turning_and_limits_save_in_place_with_the_comments_kept(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await cam_view(pilot)
        await pilot.press("t")
        await settle(pilot)
        await open_limits(pilot)
        await type_limits(pilot, pressure_angle="28", curvature_ratio="2.5")
        await pilot.press("enter")
        await settle(pilot)
        await pilot.press("full_stop")  # the feed cam, which has no [cam.limits] table yet
        await settle(pilot)
        await open_limits(pilot)
        await type_limits(pilot, pressure_angle="40")
        await pilot.press("enter")
        await settle(pilot)
        edited = app.project
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert not app.history.modified
    old = preset_path("cam-press").read_text().splitlines()
    new = press_file.read_text().splitlines()
    diff = [line for line in difflib.ndiff(old, new) if line[:1] in "+-" and line[2:].strip()]
    assert diff == ['- turning = "cw"', '+ turning = "ccw"',  # the stamp cam's, the first
                    "- pressure_angle = 30.0       # deg", "+ pressure_angle = 28.0       # deg",
                    "+ curvature_ratio = 2.5",
                    "+ [cam.limits]", "+ pressure_angle = 40.0"]  # the feed cam's new table
    assert len(new) == len(old) + 4  # one line more for the ratio, three for the new table and its gap
    assert new.index('turning = "ccw"') < new.index('name = "feed-cam"') < new.index("pressure_angle = 40.0") \
        < new.index('name = "stripper-cam"')
    assert sum(line.startswith("#") or "  # " in line for line in new) == \
        sum(line.startswith("#") or "  # " in line for line in old)  # every comment kept
    reopened = load_project(press_file)
    for name in ("stamp-cam", "feed-cam", "stripper-cam"):
        assert find_cam(reopened, name) == find_cam(edited, name)
    assert find_cam(reopened, "stamp-cam").limits == CamLimitsSpec(28.0, 2.5, None)
    assert find_cam(reopened, "feed-cam").limits == CamLimitsSpec(40.0, None, None)


async def test_keys_typed_right_after_L_reach_the_dialog(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await cam_view(pilot)
        await pilot.press("L", "2", "8", "enter")  # a quick hand: the value and Enter behind the key
        await settle(pilot)
        assert find_cam(app.project, "stamp-cam").limits == CamLimitsSpec(pressure_angle=28.0)
        assert app.status_text == "cam stamp-cam: limits pressure_angle 30° → 28°"
        assert isinstance(app.current_view, CamView)  # "2" did not switch to the Timing view


async def test_a_cam_that_cannot_be_laid_out_refuses_its_edits_with_the_reason(unlaid_press):
    broken = unlaid_press
    app = Workbench(broken)
    async with app.run_test(size=SIZE) as pilot:
        await cam_view(pilot)
        await pilot.press("t")
        await settle(pilot)
        assert app.project is broken and not app.history.can_undo
        assert "refused — cam stamp-cam: turning = ccw: the cam cannot be laid out" in app.status_text
        assert "no axis 'gone'" in app.status_text
        dialog = await open_limits(pilot)
        assert dialog.error is None  # the limits as they are: no edit to refuse
        await type_limits(pilot, pressure_angle="25")
        assert dialog.error.startswith("pressure_angle 25: the cam cannot be laid out")
        assert "no axis 'gone'" in feedback(dialog)
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is dialog and app.project is broken
