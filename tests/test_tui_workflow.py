"""The workbench as a user drives it: open, edit, refuse, undo, save, reopen, quit.

Each test drives the app with key presses (Textual's pilot) and asserts on
the model first, then on what the widgets show.  Expected peaks follow
DESIGN §3: a cycloidal rise of lift h over T seconds peaks at v = 2h/T and
j = 4π²·h/T³ (Cv = 2, Cj = 4π², handbook values from memory, Norton,
*Cam Design and Manufacturing Handbook*); T = (β/360)(60/N).
"""

from __future__ import annotations

import io
import math
import shutil

import pytest
from textual.widgets import DataTable, Input

from workbench.app import Workbench
from workbench.editing import law_ids
from workbench.presets import preset_path
from workbench.projectfile import dumps, load_project
from workbench.tui.screens.confirm import ChoiceDialog
from workbench.tui.screens.help import HelpScreen
from workbench.tui.screens.law_picker import LawPicker
from workbench.tui.views.axes import AxesView
from workbench.tui.widgets.cell_editor import CellEditor, CellField, EditNote, LineText
from workbench.tui.widgets.peaks_panel import PeaksPanel
from workbench.tui.widgets.segment_table import SegmentTable

from tests.tui_pilot import settle

LID = "lid-lift"
SIZE = (100, 30)


def cycloidal_peaks(lift_mm: float, span_deg: float, speed_cpm: float) -> tuple[float, float]:
    """(v, j) peaks of a cycloidal rise: 2h/T and 4π²h/T³ (handbook Cv, Cj)."""
    t = span_deg / 360.0 * 60.0 / speed_cpm
    return 2.0 * lift_mm / t, 4.0 * math.pi**2 * lift_mm / t**3


@pytest.fixture
def project_file(tmp_path):
    path = tmp_path / "lidder.toml"
    shutil.copy(preset_path("tray-lidder"), path)
    return path


async def open_cell(pilot, row: int, column: int) -> CellEditor:
    """Enter on a typed cell of the segment table: it opens in place, on the same screen."""
    table = pilot.app.query_one(SegmentTable)
    table.move_cursor(row=row, column=column)
    screen = pilot.app.screen
    await pilot.press("enter")
    await pilot.pause()
    view = pilot.app.query_one(AxesView)
    assert pilot.app.screen is screen and view.editing
    assert pilot.app.focused is table  # the keys keep going through the table
    return view.editor


async def open_span_cell(pilot) -> CellEditor:
    return await open_cell(pilot, 0, 2)  # segment 1, span


async def type_over(pilot, text: str) -> None:
    """Type over an open cell (it opens with its value selected: the first key replaces it)."""
    await pilot.press(*list(text))
    await pilot.pause()


async def type_value(pilot, text: str) -> None:
    """Type into a dialog's value field."""
    field = pilot.app.screen.query_one("#value", Input)
    field.value = ""
    await pilot.press(*list(text))
    await pilot.pause()


def note_text(app) -> str:
    return str(app.query_one(EditNote).content)


def footer_keys(app) -> list[str]:
    return [key.description for key in app.query("FooterKey")]


def peaks(app) -> dict:
    return app.query_one(PeaksPanel).rows


async def test_edit_span_in_place_changes_peaks(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        v, j = cycloidal_peaks(40.0, 90.0, 120.0)
        assert peaks(app)["velocity"]["value"] == f"{v:.0f} mm/s"  # 640 mm/s
        assert peaks(app)["jerk"]["verdict"] == "✗ OVER"
        editor = await open_span_cell(pilot)
        table = app.query_one(SegmentTable)
        field = app.query_one(CellField)
        # the typed value sits on the cell itself: the cell's column and row on screen
        assert field.region.y == table.region.y + 1  # header, then row 1
        assert field.region.x == table.region.x + sum(c.get_render_width(table) for c in table.ordered_columns[:2])
        await type_over(pilot, "120")
        assert editor.text == "120" and editor.error is None
        assert "90° → 120°" in note_text(app)  # the change, said before it is made
        await pilot.press("enter")
        await settle(pilot)
        assert not app.query_one(AxesView).editing and not field.display
        # model: segment 1 now 120°, the 30° came from the dwell after it
        assert [s.span for s in app.project.axis(LID).segments] == [120.0, 120.0, 120.0]
        assert app.history.modified
        # widgets: table cell, peaks, verdict
        table = app.query_one(SegmentTable)
        assert str(table.get_cell_at((0, 2))) == "120"
        v, j = cycloidal_peaks(40.0, 120.0, 120.0)
        assert peaks(app)["velocity"]["value"] == f"{v:.0f} mm/s"  # 480 mm/s
        # The axis jerk is now the modified-sine return's: Cj = 16π³/(4+π) (DESIGN §3, derived),
        # above the rise's 341,094 mm/s³ and below the 700,000 mm/s³ limit.
        t_return = 120.0 / 360.0 * 60.0 / 120.0
        j_return = 16 * math.pi**3 / (4 + math.pi) * 40.0 / t_return**3
        assert j < j_return
        assert peaks(app)["jerk"]["value"] == f"{j_return:,.0f} mm/s³"
        assert peaks(app)["jerk"]["verdict"] == "✓ within"
        assert app.status_text == "span of segment 1: 90° → 120° (segment 2 gave 30°)"
        # undo and redo of the edit made in place
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert app.status_text == "undid the edit “span of segment 1: 90° → 120° (segment 2 gave 30°)”"
        assert [s.span for s in app.project.axis(LID).segments] == [90.0, 150.0, 120.0]
        assert not app.history.modified
        assert str(table.get_cell_at((0, 2))) == "90"
        assert peaks(app)["velocity"]["value"] == "640 mm/s"
        await pilot.press("ctrl+y")
        await settle(pilot)
        assert [s.span for s in app.project.axis(LID).segments] == [120.0, 120.0, 120.0]
        assert peaks(app)["velocity"]["value"] == f"{v:.0f} mm/s"


@pytest.mark.parametrize("typed, reason", [
    ("abc", "'abc' is not a number"),
    ("-5", "must be above 0"),
    ("250", "cannot give"),  # the dwell has only 150° to give
])
async def test_bad_span_refused_where_typed(project_file, typed, reason):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        before = dumps(app.project)
        editor = await open_span_cell(pilot)
        await type_over(pilot, typed)
        assert reason in editor.error
        assert reason in note_text(app)  # the reason shows under the table, at every key
        await pilot.press("enter")  # refused: the cell stays open with what was typed
        await pilot.pause()
        assert app.query_one(AxesView).editing and editor.text == typed
        assert dumps(app.project) == before
        await pilot.press("escape")
        await settle(pilot)
        assert not app.query_one(AxesView).editing
        assert dumps(app.project) == before
        assert not app.history.modified and not app.history.can_undo
        assert str(app.query_one(SegmentTable).get_cell_at((0, 2))) == "90"


async def test_the_difference_goes_to_the_segment_picked_with_up_and_down(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        editor = await open_span_cell(pilot)
        assert "◂ nearest dwell that can ▸" in note_text(app)  # first: the dwell after it that can
        await type_over(pilot, "100")
        assert "segment 2 (dwell): 150° → 140°" in note_text(app)
        await pilot.press("down", "down")  # the dwell by name, then the return: it gives the 10°
        await pilot.pause()
        assert editor.choice == 2 and "3 modified-sine 120°" in note_text(app)
        await pilot.press("enter")
        await settle(pilot)
        # hand sum: 90 + 150 + 120 = 360; segment 1 takes 10° from segment 3
        assert [s.span for s in app.project.axis(LID).segments] == [100.0, 150.0, 110.0]
        assert str(app.query_one(SegmentTable).get_cell_at((2, 2))) == "110"


async def test_a_span_typed_bigger_than_the_next_dwell_takes_from_one_that_can(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("full_stop")  # tray-pusher: dwell 30, modified-trapezoid 120, dwell 60, poly345 150
        await settle(pilot)
        await type_in_a_bunch(pilot, "down", "down", "down", "right", "right", "enter", "1", "9", "0", "enter")
        assert [s.span for s in app.project.axis("tray-pusher").segments] == [30.0, 120.0, 20.0, 190.0]
        assert app.status_text == "span of segment 4: 150° → 190° (segment 3 gave 40°)"


async def test_end_position_and_time_are_typed_in_place(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        editor = await open_cell(pilot, 0, 3)  # segment 1's end position, 40 mm
        assert editor.text == "40"
        await type_over(pilot, "45")
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.axis(LID).segments[0].to == 45.0
        assert app.status_text == "end position of segment 1: 40 → 45 mm"
        v, _ = cycloidal_peaks(45.0, 90.0, 120.0)  # 720 mm/s
        assert peaks(app)["velocity"]["value"] == f"{v:.0f} mm/s"
        editor = await open_cell(pilot, 0, 4)  # segment 1's time, 125 ms at 120 cycles/min
        assert editor.text == "125"
        await type_over(pilot, "100")
        await pilot.press("enter")
        await settle(pilot)
        # 100 ms of a 500 ms cycle (120 cycles/min) is 72°; the dwell after it gives the 18°
        assert [s.span for s in app.project.axis(LID).segments] == [72.0, 168.0, 120.0]
        assert app.status_text == "time of segment 1: 125 → 100 ms (segment 2 took 18°)"
        assert str(app.query_one(SegmentTable).get_cell_at((0, 4))) == "100.0"
        await pilot.press("ctrl+z", "ctrl+z")
        await settle(pilot)
        assert not app.history.modified


async def test_enter_on_an_untouched_cell_changes_nothing(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        editor = await open_cell(pilot, 2, 4)  # the return's time: 120° of a 500 ms cycle, 166.67 ms
        assert editor.text == "166.7" and "no change" in note_text(app)  # shown rounded, stands for 120°
        await pilot.press("enter")
        await settle(pilot)
        assert not app.query_one(AxesView).editing
        assert [s.span for s in app.project.axis(LID).segments] == [90.0, 150.0, 120.0]
        assert not app.history.can_undo
        editor = await open_cell(pilot, 2, 4)
        await type_over(pilot, "166.8")  # 166.8 ms of a 500 ms cycle is 120.096°
        assert "120° → 120.096°" in note_text(app)
        await pilot.press("escape")


@pytest.mark.parametrize("keys, text, cursor", [
    (["7"], "7", 1),  # fresh, the value is selected: the first character replaces it
    (["backspace"], "", 0),  # ... and a delete key clears it
    (["end", "backspace"], "9", 1),
    (["left", "5"], "590", 1),  # left leaves the selection at the start
    (["home", "right", "5"], "950", 2),
    (["end", "left", "delete"], "9", 1),
    (["end", "ctrl+u"], "", 0),  # clears back to the start
    (["right", "right", "right"], "90", 2),  # never past the end
])
def test_typing_over_a_cell(keys, text, cursor):
    line = LineText("90")
    for key in keys:
        if len(key) == 1:
            line.insert(key)
        else:
            assert line.key(key)
    assert (line.text, line.cursor, line.selected) == (text, cursor, False)
    assert not line.key("f5")  # not an editing key


async def test_keys_typed_faster_than_the_screen_are_taken_in_turn(project_file):
    from textual import events

    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.query_one(SegmentTable).move_cursor(row=0, column=2)  # segment 1, span
        await pilot.pause()
        # all at once, as a terminal delivers a quick burst: open, type, apply, then 2 (Timing view)
        for key, character in [("enter", "\r"), ("1", "1"), ("2", "2"), ("0", "0"), ("enter", "\r"),
                               ("escape", None), ("2", "2")]:
            app.post_message(events.Key(key, character))
        await settle(pilot)
        assert [s.span for s in app.project.axis(LID).segments] == [120.0, 120.0, 120.0]
        assert app.query_one("#views").current == "timing"  # the 2 after Enter was a key again
        await pilot.press("1")
        await settle(pilot)
        for key, character in [("enter", "\r"), ("9", "9"), ("escape", None), ("enter", "\r")]:
            app.post_message(events.Key(key, character))  # escape, then Enter opens it afresh
        await settle(pilot)
        view = app.query_one(AxesView)
        assert view.editing and view.editor.text == "120"
        assert [s.span for s in app.project.axis(LID).segments] == [120.0, 120.0, 120.0]


async def test_a_dwell_has_no_end_position_to_type(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.query_one(SegmentTable).move_cursor(row=1, column=3)  # segment 2, a dwell
        await pilot.press("enter")
        await pilot.pause()
        assert not app.query_one(AxesView).editing
        assert "is a dwell" in app.status_text and app.status_text.startswith("✗")


async def test_editing_a_cell_by_keys_alone_at_80x24(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert "Edit" in footer_keys(app)
        await pilot.press("right", "right", "enter")  # from the law column of row 1 to its span
        await pilot.pause()
        view = app.query_one(AxesView)
        assert view.editing and view.editor.text == "90"
        await settle(pilot)
        assert footer_keys(app)[:2] == ["Apply", "Cancel"] and "Add" not in footer_keys(app)
        await pilot.press("end", "backspace", "5", "home", "2")  # "90" → "9" → "95" → "295"
        await pilot.pause()
        assert view.editor.text == "295" and "cannot give" in view.editor.error  # the dwell has 150°
        await pilot.press("home", "delete", "tab", "end", "a")  # "95", and tab does not take the keys away
        await pilot.pause()
        assert view.editor.text == "95a" and "is not a number" in view.editor.error
        await pilot.press("backspace", "enter")
        await settle(pilot)
        assert not view.editing and app.project.axis(LID).segments[0].span == 95.0
        assert "Edit" in footer_keys(app) and "Apply" not in footer_keys(app)
        assert app.focused is app.query_one(SegmentTable)


async def test_law_list_shows_coefficients_and_refuses_what_breaks_the_axis(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.query_one(SegmentTable).move_cursor(row=2, column=1)  # the return
        await pilot.press("l")
        await pilot.pause()
        picker = app.screen
        assert isinstance(picker, LawPicker)
        table = picker.query_one("#laws", DataTable)
        assert [str(k.value) for k in table.rows] == law_ids()
        cyc = table.get_row("cycloidal")
        assert [str(c) for c in cyc[1:3]] == ["2.000", "6.283"]  # Cv = 2, Ca = 2π (handbook)
        table.move_cursor(row=law_ids().index("dwell"))
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is picker and "not at its start" in picker.error
        table.move_cursor(row=law_ids().index("poly345"))
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.axis(LID).segments[2].law == "poly345"
        assert str(app.query_one(SegmentTable).get_cell_at((2, 1))) == "poly345"


async def test_undo_redo_every_edit(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        original = app.project
        app.query_one(SegmentTable).move_cursor(row=0, column=0)
        await pilot.press("s")  # split segment 1
        await settle(pilot)
        assert len(app.project.axis(LID).segments) == 4
        await pilot.press("d")  # delete the first half again
        await settle(pilot)
        assert len(app.project.axis(LID).segments) == 3
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert len(app.project.axis(LID).segments) == 4
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert app.project is original and not app.history.modified
        assert peaks(app)["velocity"]["value"] == "640 mm/s"
        await pilot.press("ctrl+y")
        await settle(pilot)
        assert [s.span for s in app.project.axis(LID).segments][:2] == [45.0, 45.0]
        assert app.query_one(SegmentTable).row_count == 4
        assert "redid the edit “split segment 1" in app.status_text


async def test_undoing_a_rename_keeps_the_axis_on_view(project_file):
    """The second axis renamed and the rename undone and redone: the view stays on it each time."""
    from workbench import editing
    from workbench.tui.messages import ProjectEdited

    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        view = app.query_one(AxesView)
        second = app.project.axes[1].name
        await pilot.press(".")
        await settle(pilot)
        assert view.axis_name == second
        app.post_message(ProjectEdited(editing.rename_axis(app.project, second, "pusher-2"), "rename"))
        await settle(pilot)
        assert view.axis_name == "pusher-2"
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert view.axis_name == second
        await pilot.press("ctrl+y")
        await settle(pilot)
        assert view.axis_name == "pusher-2"


async def test_reorder_add_speed_and_limits(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        table = app.query_one(SegmentTable)
        table.move_cursor(row=0, column=0)
        await pilot.press("right_square_bracket")  # rise one place later: dwell first
        await settle(pilot)
        assert [s.law for s in app.project.axis(LID).segments] == ["dwell", "cycloidal", "modified-sine"]
        assert table.cursor_coordinate.row == 1  # the cursor follows the segment
        await pilot.press("right_square_bracket")  # return before rise: refused
        await settle(pilot)
        assert [s.law for s in app.project.axis(LID).segments][1] == "cycloidal"
        assert app.status_text.startswith("✗ refused") and "not at its start" in app.status_text
        await pilot.press("a")  # add: the dialog proposes a 30° dwell taken from a dwell
        await pilot.pause()
        await pilot.press("down")  # focus is on the law drop-down: ↓ opens its list, escape closes it
        await pilot.pause()
        assert app.screen.query_one("#law").expanded
        await pilot.press("escape")
        await pilot.pause()
        await pilot.press("enter")  # and Enter adds, from the drop-down as from a typed field
        await settle(pilot)
        assert len(app.project.axis(LID).segments) == 4
        assert math.isclose(sum(s.span for s in app.project.axis(LID).segments), 360.0)
        await pilot.press("m")
        await pilot.pause()
        await type_value(pilot, "100")
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.speed == 100.0
        await pilot.press("L")
        await pilot.pause()
        app.screen.query_one("#jerk", Input).value = ""
        await pilot.pause()
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.axis(LID).limits.jerk is None
        assert peaks(app)["jerk"]["verdict"] == "· no limit"


async def open_file(pilot, path) -> None:
    """Open `path` as a user does: ctrl+o, the path, Enter; then let its numbers come."""
    await pilot.press("ctrl+o")
    await pilot.pause()
    pilot.app.screen.query_one("#path", Input).value = str(path)
    await pilot.press("enter")
    await settle(pilot)


async def test_save_reopen_and_compare_file(project_file, tmp_path):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await open_span_cell(pilot)
        await type_over(pilot, "100")
        await pilot.press("enter")
        await settle(pilot)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert not app.history.modified
        saved = project_file.read_text()
        assert saved == dumps(app.project)
        assert [s.span for s in load_project(project_file).axis(LID).segments] == [100.0, 140.0, 120.0]
        # save as, then reopen the first file from disk
        other = tmp_path / "copy.toml"
        await pilot.press("f2")
        await pilot.pause()
        app.screen.query_one("#path", Input).value = str(other)
        await pilot.press("enter")
        await settle(pilot)
        assert other.read_text() == saved and app.project.path == other
        # saving as an existing other file asks first
        await pilot.press("f2")
        await pilot.pause()
        app.screen.query_one("#path", Input).value = str(project_file)
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceDialog)
        await pilot.press("escape")
        await pilot.pause()
        assert app.project.path == other and app.status_text == f"not saved: {project_file} is left as it was"
        await open_file(pilot, project_file)
        assert app.project.path == project_file
        assert dumps(app.project) == saved
        assert not app.history.can_undo


async def test_after_save_as_every_edit_and_undo_stays_with_the_new_file(project_file, tmp_path):
    original = project_file.read_text()
    other = tmp_path / "renamed.toml"
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("m", *"80", "enter")
        await settle(pilot)
        await pilot.press("f2")
        await pilot.pause()
        app.screen.query_one("#path", Input).value = str(other)
        await pilot.press("enter")
        await settle(pilot)
        await pilot.press("m", *"90", "enter")  # an edit after the save as
        await settle(pilot)
        assert app.project.path == other and "renamed.toml" in str(app.query_one("#file-label").render())
        await pilot.press("ctrl+s")
        await settle(pilot)
        await pilot.press("u", "u")  # back past the save as: still the new file's project
        await settle(pilot)
        assert app.project.path == other and app.project.speed == load_project(project_file).speed
    assert project_file.read_text() == original  # the file it was opened from is untouched
    assert load_project(other).speed == 90.0


@pytest.mark.parametrize("answer, kept", [("o", "ours"), ("escape", "theirs")])
async def test_saving_over_a_file_changed_on_disk_asks_first(project_file, answer, kept):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("m", *"90", "enter")
        await settle(pilot)
        theirs = project_file.read_text() + "# a note written by another program\n"
        project_file.write_text(theirs)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert dialog_title(app) == "Changed on disk" and project_file.read_text() == theirs
        await pilot.press(answer)
        await settle(pilot)
        if kept == "ours":
            assert load_project(project_file).speed == 90.0 and not app.history.modified
            # saved over once by choice: the next save is not asked about again
            await pilot.press("m", *"95", "enter", "ctrl+s")
            await settle(pilot)
            assert dialog_title(app) == "" and load_project(project_file).speed == 95.0
        else:
            assert project_file.read_text() == theirs and app.history.modified
            assert "not saved" in app.status_text


async def test_open_refuses_an_invalid_file(project_file, tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(project_file.read_text().replace("span = 150.0", "span = 15.0"))
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+o")
        await pilot.pause()
        dialog = app.screen
        dialog.query_one("#path", Input).value = str(bad)
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is dialog and "spans sum to 225" in dialog.error
        await pilot.press("escape")
        assert app.project.path == project_file


async def test_quit_guard(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("s")
        await settle(pilot)
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceDialog)
        await pilot.press("escape")
        await pilot.pause()
        assert app.is_running and not isinstance(app.screen, ChoiceDialog)
        await pilot.press("ctrl+q")
        await pilot.pause()
        await pilot.press("s")  # save, then quit
        await pilot.pause()
    assert len(load_project(project_file).axis(LID).segments) == 4
    assert app.return_code == 0


async def test_quit_without_changes_does_not_ask(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert not app.is_running


async def test_help_is_built_from_live_bindings(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.set_keymap({"save": "ctrl+w"})
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        rows = {title: {d: k for k, d, _ in r} for title, r in app.screen.sections}
        assert rows["Everywhere"]["Save"] == "^w"  # the remapped key, not a written-down one
        assert "Split" in rows["Axes view"] and "Limits" in rows["Axes view"]
        assert "+5°" in rows["Timing view"]
        await pilot.press("escape")


async def test_palette_reaches_every_bound_action(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        names = {name for name, _, _ in app.command_entries()}
        for _, binding in app._bindings:
            if binding.description and not binding.system:
                assert binding.description in names
        for view in app.views:
            for _, binding in view._bindings:
                if binding.description:
                    assert f"{view.title}: {binding.description}" in names
        assert "Axis: seal-head" in names
        await pilot.press("ctrl+p")
        await pilot.pause()
        await pilot.press(*"Axes: Split")
        await pilot.pause(0.3)
        await pilot.press("enter")
        await settle(pilot)
        assert len(app.project.axis(LID).segments) == 4


async def test_a_segment_added_after_a_dwell_takes_the_dwells_span_and_enter_adds_from_any_field(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        before = [s.span for s in app.project.axis(LID).segments]  # rise, dwell, return
        await pilot.press("down", "a")  # after the dwell
        await pilot.pause()
        assert str(app.screen.query_one("#donor").value) == "1"  # segment 2, the dwell
        app.screen.query_one("#donor").focus()  # Enter on a drop-down adds, as on a typed field
        await pilot.pause()
        await pilot.press("enter")
        await settle(pilot)
        after = app.project.axis(LID).segments
        assert len(after) == 4 and after[2].law == "dwell" and after[2].span == 30.0
        assert [s.span for s in after] == [before[0], before[1] - 30.0, 30.0, before[2]]
        assert app.status_text == "new segment 3 (dwell, 30°); segment 2 gave its span"


async def test_a_new_segment_proposes_a_span_its_giver_can_spare():
    app = Workbench(load_project(preset_path("cam-press")))  # stamp: dwell 120, poly345 80, dwell 30, …
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("down", "down", "a")  # after the 30° dwell: it gives, 15° of it
        await settle(pilot)
        assert app.screen.query_one("#span", Input).value == "15"
        assert str(app.screen.query_one("#feedback").render()).startswith("✓")
        await pilot.press("enter")
        await settle(pilot)
        assert [s.span for s in app.project.axis("stamp").segments][2:4] == [15.0, 15.0]


async def test_the_palette_lists_each_action_once(project_file):
    from textual.command import CommandList

    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+p")
        await pilot.pause()
        await pilot.press(*"quit")
        await pilot.pause(0.3)
        found = app.screen.query_one(CommandList)
        prompts = [str(found.get_option_at_index(i).prompt) for i in range(found.option_count)]
        assert sum("Quit" in prompt for prompt in prompts) == 1, prompts


async def test_the_help_scrolls_with_the_keys_at_once(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("question_mark")
        await pilot.pause()
        body = app.screen.query_one("#help-body")
        assert body.max_scroll_y > 0  # more keys than fit at 80×24
        await pilot.press("pagedown")
        await pilot.pause()
        assert body.scroll_y > 0


async def test_axis_switch_and_timing_view(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("full_stop")
        await settle(pilot)
        axes = app.query_one("#axes")
        assert axes.axis_name == "tray-pusher"
        assert app.query_one(SegmentTable).row_count == 4
        await pilot.press("2")
        await pilot.pause()
        for _ in range(3):
            await pilot.press("right")
        await pilot.pause()
        timing = app.query_one("#timing")
        assert timing.angle == 15.0
        # the readout shows the lid-lift position at 15°: cycloidal y = x − sin(2πx)/2π, x = 15/90
        x = 15.0 / 90.0
        s = 40.0 * (x - math.sin(2 * math.pi * x) / (2 * math.pi))
        readout = app.query_one("#timing-readout")
        text = "".join(str(c) for c in readout.content.columns[2].cells)
        assert f"{s:.4g} mm" in text
        await pilot.press("3")
        await pilot.pause()
        from rich.console import Console

        console = Console(width=100, record=True, file=io.StringIO())
        console.print(app.query_one("#linkage").query_one("#lk-empty-text").content)
        message = console.export_text()
        assert "no [[linkage]] table" in message and "presets/slider-crank.toml" in message


async def test_the_timing_readout_shows_a_true_zero_as_0(project_file):
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("2", *["right"] * 9)  # master 45°: halfway through the lid's cycloidal rise
        await settle(pilot)
        readout = app.query_one("#timing-readout")
        velocity, acceleration = ([str(c) for c in readout.content.columns[i].cells] for i in (3, 4))
        # cycloidal rise at its middle: v = Cv·h/T with Cv = 2 (handbook value, from memory) and
        # a = 0 (a = 2πh/T² sin 2πx, x = 1/2); h = 40 mm, T = (90/360)(60/120) s
        t = 90.0 / 360.0 * 60.0 / 120.0
        assert velocity[0] == f"{2.0 * 40.0 / t:.4g} mm/s"
        assert acceleration[0] == "0 mm/s²"
        # the last column is the axis over the whole cycle, not at the cursor: its most used limit,
        # the rise's jerk j = Cj·h/T³ with Cj = 4π² (handbook value, from memory) against 700,000
        cycle = [str(c) for c in readout.content.columns[5].cells]
        assert cycle[0] == f"✗ jerk {4 * math.pi**2 * 40.0 / t**3 / 700_000.0 * 100:.0f} %"


async def test_a_burst_of_edits_ends_with_the_numbers_of_the_last(project_file):
    from workbench import editing
    from workbench.tui.messages import ProjectEdited

    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        project = app.project
        for span in (95.0, 100.0, 105.0, 110.0, 115.0):
            project = editing.set_span(project, LID, 0, span)
            app.post_message(ProjectEdited(project, f"span {span:g}"))
        await settle(pilot)
        assert app.project is project
        assert app.results_for is project  # no older result left on screen
        v, _ = cycloidal_peaks(40.0, 115.0, 120.0)
        assert peaks(app)["velocity"]["value"] == f"{v:.4g} mm/s"
        assert app.history.undo() == "span 115"


async def test_the_footer_is_rebuilt_only_when_its_keys_change(project_file):
    """A dialog opened and closed brings back the same keys: the footer keeps its key widgets
    (Textual's own footer would rebuild them all); another view's keys do replace them."""
    app = Workbench(load_project(project_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        before = [id(k) for k in app.query("FooterKey")]
        shown = footer_keys(app)
        await pilot.press("m")  # the machine speed dialog
        await pilot.pause()
        assert app.screen is not app.screen_stack[0]
        await pilot.press("escape")
        await settle(pilot)
        assert footer_keys(app) == shown and [id(k) for k in app.query("FooterKey")] == before
        await pilot.press("2")  # the Timing view: keys of its own
        await settle(pilot)
        assert footer_keys(app) != shown
        await pilot.press("1")
        await settle(pilot)
        assert footer_keys(app) == shown


async def type_in_a_bunch(pilot, *keys: str) -> None:
    """Keys arriving together, as a quick hand or a slow SSH link delivers them: all are in the
    app's queue before the first is handled (the pilot's `press` waits between keys)."""
    from textual import events

    controls = {"enter": "\r", "tab": "\t", "backspace": "\x7f", "escape": "\x1b"}
    for key in keys:
        pilot.app.post_message(events.Key(key, key if len(key) == 1 else controls.get(key)))
    await settle(pilot, rounds=4)


@pytest.mark.parametrize("keys, check", [
    (("m", "1", "1", "0", "enter"), lambda p: p.speed == 110.0),
    (("L", "9", "9", "9", "enter"), lambda p: p.axis(LID).limits.velocity == 999.0),
    (("l", "down", "enter"), lambda p: p.axis(LID).segments[0].law == law_ids()[law_ids().index("cycloidal") + 1]),
])
async def test_keys_typed_right_after_a_dialog_key_go_to_the_dialog(keys, check):
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        base = app.screen
        await type_in_a_bunch(pilot, *keys)
        assert app.screen is base and check(app.project)
        assert app.history.can_undo and not app.query_one(AxesView).holding


def dialog_title(app) -> str:
    return getattr(app.screen, "title_text", "")


@pytest.mark.parametrize("keys, check", [
    # a key before the dialog's acts first: the law list is for the segment the cursor went to
    (("down", "l"), lambda app: dialog_title(app).startswith("Law of segment 2")),
    # an edit before it lands, and the dialog opens on the edited project
    (("d", "m"), lambda app: len(app.project.axis(LID).segments) == 2 and dialog_title(app) == "Machine speed"),
    # a cell typed over and applied, then a dialog
    (("right", "right", "enter", "1", "0", "0", "enter", "m"),
     lambda app: app.project.axis(LID).segments[0].span == 100.0 and dialog_title(app) == "Machine speed"),
    # Tab moves to the next field in its turn; Backspace acts before the digits after it
    (("L", "9", "9", "9", "tab", "5", "0", "0", "0", "0", "enter"),
     lambda app: (app.project.axis(LID).limits.velocity, app.project.axis(LID).limits.acceleration) == (999.0, 50000.0)
     and app.status_text == "limits of axis lid-lift: velocity 900 → 999 mm/s, acceleration 25,000 → 50,000 mm/s²"),
    (("L", "backspace", "8", "0", "0", "enter"), lambda app: app.project.axis(LID).limits.velocity == 800.0),
    # keys after the Enter that closes a dialog act on the screen under it
    (("m", "1", "1", "0", "enter", "l"),
     lambda app: app.project.speed == 110.0 and dialog_title(app).startswith("Law of segment 1")),
    # a second Enter or Escape that reaches a closing dialog does not close the workbench's screen
    (("m", "1", "1", "0", "enter", "enter"),
     lambda app: app.project.speed == 110.0 and dialog_title(app).startswith("Law of segment 1")),
    (("m", "escape", "escape"), lambda app: not app.history.can_undo and dialog_title(app) == ""),
    # a law picked from the add dialog's list, then the span: the drop-down takes the focus back
    # after its list closes, and the digits still go to the span field
    (("a", "down", "down", "down", "enter", "tab", "1", "5"),
     lambda app: app.screen.query_one("#span", Input).value == "15" and app.screen.focused.id == "span"),
])
async def test_keys_in_a_bunch_act_in_the_order_typed(keys, check):
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await type_in_a_bunch(pilot, *keys)
        assert app.is_running and check(app)


async def test_a_dialog_closed_on_the_value_it_opened_with_changes_nothing():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        before = app.project
        await pilot.press("m", "enter")
        await settle(pilot)
        assert app.project is before and not app.history.can_undo and not app.history.modified
        assert "nothing changed" in app.status_text and not app.query_one(AxesView).holding


async def test_the_law_list_says_what_the_law_under_the_cursor_would_do():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("l")
        picker = app.screen
        laws = picker.query_one("#laws", DataTable)
        laws.move_cursor(row=laws.get_row_index("poly345"))
        await pilot.pause()
        # the 3-4-5 rise of 40 mm in 90° at 120 cycles/min: j = Cj·h/T³ with Cj = 60 (handbook
        # value from memory, Norton); it is the axis's largest jerk, against its 700,000 mm/s³
        t = 90.0 / 360.0 * 60.0 / 120.0
        share = 60.0 * 40.0 / t**3 / 700_000.0
        feedback = str(picker.query_one("#feedback").render())
        assert "segment 1: cycloidal → poly345" in feedback
        assert f"jerk at {share * 100:.0f} % of its limit, LIMIT EXCEEDED" in feedback
        assert app.project.axis(LID).segments[0].law == "cycloidal"  # only a preview


async def test_the_speed_dialog_says_which_axis_a_speed_would_push_hardest():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("m", "1", "0", "0")
        # tray-pusher's modified-trapezoid push of 180 mm in 120° at 100 cycles/min: v = Cv·h/T
        # with Cv = 2 (handbook value from memory), against its 2,500 mm/s
        t = 120.0 / 360.0 * 60.0 / 100.0
        share = 2.0 * 180.0 / t / 2500.0
        feedback = str(app.screen.query_one("#feedback").render())
        assert f"tray-pusher velocity at {share * 100:.0f} % of its limit, all axes within limits" in feedback


def segments(app) -> list:
    return [(s.law, s.span) for s in app.project.axis(LID).segments]


@pytest.mark.parametrize("pressed, bunches, check", [
    # an edit lands before the key after it acts: nothing typed is built on the state before it
    ((), [("m", "1", "1", "0", "enter", "d")], lambda app: app.project.speed == 110.0 and len(segments(app)) == 2),
    ((), [("d", "m", "1", "1", "0", "enter")], lambda app: app.project.speed == 110.0 and len(segments(app)) == 2),
    ((), [("right", "right", "enter", "1", "0", "0", "enter", "down", "enter", "5", "0", "enter")],
     lambda app: segments(app)[0][1] == 100.0 and segments(app)[1][1] == 50.0),
    # a cursor move from before Enter does not close the cell Enter opened
    (("right", "right"), [("down", "enter"), ("1", "2", "0", "enter")],
     lambda app: segments(app)[1][1] == 120.0 and app.query_one("#views").current == "axes"),
    # cursor moves and Enter in one bunch: the cell Enter opens stays open for the digits
    ((), [("down", "right", "right", "enter", "1", "4", "0", "enter")], lambda app: segments(app)[1][1] == 140.0),
    # the app's keys keep their turn: undo, then split
    (("d",), [("u", "s")], lambda app: len(segments(app)) == 4),
    # a bunch typed into a dialog already open: Backspace before the digits after it
    (("m",), [("backspace", "9", "0", "enter")], lambda app: app.project.speed == 90.0),
])
async def test_edits_and_keys_in_a_bunch_land_in_order(pressed, bunches, check):
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        if pressed:
            await pilot.press(*pressed)
            await settle(pilot)
        for keys in bunches:
            await type_in_a_bunch(pilot, *keys)
        assert app.is_running and check(app)


def timing_angle(app) -> float:
    from workbench.tui.views.timing import TimingView

    return app.query_one(TimingView).angle


@pytest.mark.parametrize("preset, keys, check", [
    # quit waits its turn: the delete lands first, so quitting asks about the unsaved change
    ("tray-lidder", ("d", "ctrl+q"),
     lambda app: len(segments(app)) == 2 and dialog_title(app) == "Unsaved changes"),
    # a view's step keys wait their turn: they step the view that the key before them showed
    ("tray-lidder", ("2", "right", "right"),
     lambda app: timing_angle(app) == 10.0 and app.query_one(SegmentTable).cursor_coordinate.column == 0),
    ("tray-lidder", ("2", "right", "1", "right"),
     lambda app: timing_angle(app) == 5.0 and app.query_one(SegmentTable).cursor_coordinate.column == 1),
    # the Loads view's step keys step the cursor, not the scroll under it
    ("cam-press", ("5", "right", "right", "left"), lambda app: app.query_one("#loads").angle == 5.0),
    # a step key typed after the one that opens a dialog is the dialog's (its field's cursor)
    ("cam-press", ("4", "L", "right"),
     lambda app: isinstance(app.screen.focused, Input) and app.query_one("#cam").angle == 0.0),
])
async def test_no_key_jumps_its_turn(preset, keys, check):
    app = Workbench(load_project(preset_path(preset)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await type_in_a_bunch(pilot, *keys)
        assert app.is_running and check(app)


@pytest.mark.parametrize("preset, key, view_id", [
    ("tray-lidder", "2", "timing"), ("slider-crank", "3", "linkage"), ("cam-press", "4", "cam"),
    ("cam-press", "5", "loads"),
])
async def test_the_footer_and_help_show_a_views_step_keys_as_its_own(preset, key, view_id):
    app = Workbench(load_project(preset_path(preset)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press(key)
        await settle(pilot)
        view = app.query_one(f"#{view_id}")
        active = app.screen.active_bindings
        # ← → step the view (not a scroll around its focused widget), and that is what is shown
        assert all(active[k].node is view and active[k].binding.action.startswith("step") for k in ("left", "right"))


async def test_after_opening_a_file_the_view_a_key_shows_takes_the_keys_after_it():
    app = Workbench(load_project(preset_path("slider-crank")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await open_file(pilot, preset_path("cam-press"))  # from the Linkage view: nothing has the focus now
        await type_in_a_bunch(pilot, "4", "right", "right", "right")  # the Cam view, three steps
        assert app.query_one("#cam").angle == 15.0


@pytest.mark.parametrize("typed, saved_as", [("80", "cycle_time"), ("90", "speed")])
async def test_the_speed_dialog_says_how_a_cycle_time_file_will_keep_the_speed(typed, saved_as):
    app = Workbench(load_project(preset_path("carton-indexer")))  # given by cycle_time = 0.8 s
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await type_in_a_bunch(pilot, "m", *typed)
        feedback = str(app.screen.query_one("#feedback").render())
        assert f"saved as {saved_as}" in feedback  # 80 → 0.75 s is short; 90 → 0.666… s is not


async def test_at_80_columns_the_timing_readout_marks_each_axis_over_the_cycle():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        readout = app.query_one("#timing-readout")
        names = [c.plain if hasattr(c, "plain") else str(c) for c in readout.content.columns[0].cells]
        # the lid's jerk is over its limit (cycloidal Cj = 4π², see above); the others are within
        assert names == ["✗ lid-lift", "✓ tray-pusher", "✓ seal-head"]
        assert len(readout.content.columns) == 5 and "over the cycle" in str(readout.content.caption)


def test_a_verdict_with_an_infinite_peak_says_so_in_words():
    from workbench import editing
    from workbench.tui.views.axes_dialogs import most_used

    # a harmonic rise after a dwell jumps in acceleration (the harmonic's end acceleration is not
    # zero, handbook): its jerk is infinite, over any jerk limit
    project = editing.set_law(load_project(preset_path("tray-lidder")), LID, 0, "harmonic")
    assert most_used(project, [LID]) == "jerk infinite (the motion jumps), LIMIT EXCEEDED"


async def test_the_limits_dialog_shows_large_limits_written_out():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("L")
        await pilot.pause()
        assert app.screen.query_one("#jerk", Input).value == "700,000"  # not 7e+05
        await pilot.press("enter")  # taken as it stands: nothing changes
        await settle(pilot)
        assert app.project.axis(LID).limits.jerk == 700_000.0 and not app.history.can_undo


async def test_keys_after_an_action_that_waits_for_the_cams_wait_with_it():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await open_file(pilot, preset_path("cam-press"))
        # the Cam view, export, CSV: `e` waits for the cams to be studied, and the `c` with it
        await type_in_a_bunch(pilot, "4", "e", "c")
        assert getattr(app.screen, "title_text", "") == "Export cam stamp-cam as CSV"
