"""The Axes view's plots: what is drawn where, limit lines told apart without colour,
and plots drawn again only when their picture changes.

The curve checks use the cycloidal rise's closed form: lift h over span β
at machine speed N peaks at v = 2h/T in the middle of the rise, with
T = (β/360)(60/N) (Cv = 2, handbook value from memory, Norton, *Cam Design
and Manufacturing Handbook*).  Velocity against time scales with the
machine speed while position against master angle does not depend on it
(v = ds/dθ · ω, chain rule).
"""

from __future__ import annotations

import numpy as np
import pytest

from workbench import editing
from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.messages import ProjectEdited
from workbench.tui.widgets.axis_chart import (BOUNDARY, CURVE, FRAME, LIMIT, LIMIT_DASH, TICK, Chart,
                                              Scale, draw)
from workbench.tui.widgets.axis_plots import AxisPlot

from tests.tui_pilot import settle, workers_done

LID = "lid-lift"
OTHER = "tray-pusher"
THETA = np.arange(3601) * 0.1  # master angle, deg


def cycloidal_peak_velocity(lift_mm: float, span_deg: float, speed_cpm: float) -> float:
    """2h/T (handbook Cv = 2)."""
    return 2.0 * lift_mm / (span_deg / 360.0 * 60.0 / speed_cpm)


def inside(grid: np.ndarray, width: int, height: int) -> np.ndarray:
    """The cells inside the frame (rows 2 … height-3, columns 8 … width-2)."""
    return grid[2:height - 2, 8:width - 1]


# --- the grid of cells ---------------------------------------------------------------------


def test_a_constant_curve_lies_in_the_row_of_its_value():
    width, height = 60, 14
    chart = Chart("flat", THETA, np.full(THETA.size, 3.0), -10.0, 10.0)
    codes, kinds = draw(chart, width, height)
    scale = Scale(width - 9, height - 4, -10.0, 10.0)
    rows, cols = np.nonzero(inside(kinds, width, height) == CURVE)
    assert set(rows.tolist()) == {scale.row(3.0)}
    assert cols.min() == 0 and cols.max() == width - 10  # 0° to 360°, left to right edge


def test_limit_lines_are_dashed_at_plus_and_minus_the_limit():
    width, height = 62, 16
    chart = Chart("v", THETA, np.zeros(THETA.size), -1000.0, 1000.0, limit=900.0)
    codes, kinds = draw(chart, width, height)
    scale = Scale(width - 9, height - 4, -1000.0, 1000.0)
    cells = inside(kinds, width, height)
    period, drawn = LIMIT_DASH
    for value in (900.0, -900.0):
        row = cells[scale.row(value)]
        columns = np.flatnonzero(row == LIMIT)
        assert columns.size > 0
        assert np.all(columns % period < drawn)  # the gaps stay empty: a dashed line
        dashes = np.arange(row.size) % period < drawn
        assert np.all(row[dashes] == LIMIT)  # every dash is there
    assert np.count_nonzero(cells == LIMIT) == 2 * np.count_nonzero(np.arange(width - 9) % period < drawn)


def test_the_curve_keeps_its_cells_where_it_crosses_a_limit_or_a_boundary():
    width, height = 60, 14
    values = np.linspace(-1000.0, 1000.0, THETA.size)  # crosses both limits and the 180° boundary
    chart = Chart("v", THETA, values, -1000.0, 1000.0, limit=500.0, bounds=(180.0,))
    codes, kinds = draw(chart, width, height)
    scale = Scale(width - 9, height - 4, -1000.0, 1000.0)
    cells = inside(kinds, width, height)
    assert cells[scale.row(0.0), scale.column(180.0)] == CURVE
    assert cells[scale.row(500.0), scale.column(270.0)] == CURVE
    column = cells[:, scale.column(180.0)]  # the boundary: thin line wherever nothing else is drawn
    drawn = np.flatnonzero(column != BOUNDARY)
    assert set(column[drawn].tolist()) == {CURVE, LIMIT}
    assert set(drawn.tolist()) <= {scale.row(500.0), scale.row(-500.0), *np.flatnonzero(column == CURVE).tolist()}
    top, bottom = kinds[1], kinds[height - 2]
    assert np.all(top[7:] == FRAME) and np.all(bottom[7:] == FRAME)


def test_tick_labels_name_values_in_their_rows():
    width, height = 60, 14
    chart = Chart("a", THETA, np.zeros(THETA.size), -20_000.0, 20_000.0)
    codes, kinds = draw(chart, width, height)
    scale = Scale(width - 9, height - 4, -20_000.0, 20_000.0)
    text = ["".join(map(chr, row)) for row in codes]
    assert text[2 + scale.row(10_000.0)].startswith("   10k ┫")
    assert text[2 + scale.row(0.0)].startswith("     0 ┫")
    assert text[-1].startswith("       0°") and text[-1].endswith("360°")
    assert np.all(kinds[-1][np.array([c != " " for c in text[-1]])] == TICK)


def test_a_short_plot_labels_each_row_with_a_value_in_it():
    width, height = 60, 8  # four rows of data: 20k, 10k, 0, -10k, -20k would put two in a row
    lo, hi = -21_000.0, 21_000.0
    chart = Chart("a", THETA, np.zeros(THETA.size), lo, hi)
    codes, _ = draw(chart, width, height)
    scale = Scale(width - 9, height - 4, lo, hi)
    text = ["".join(map(chr, row)) for row in codes]
    labels = {r: text[2 + r][:6].strip() for r in range(scale.rows) if text[2 + r][:6].strip()}
    for r, label in labels.items():  # each label's value is drawn in its own row
        value = float(label.replace("k", "e3"))
        assert scale.row(value) == r, (label, r)
    assert labels[scale.row(0.0)] == "0"  # the zero line (a dwell) reads 0


def test_a_small_plot_shows_only_its_title():
    chart = Chart("velocity [mm/s]", THETA, np.zeros(THETA.size), -1.0, 1.0, limit=0.5)
    codes, kinds = draw(chart, 30, 4)
    assert "".join(map(chr, codes[0])).startswith("velocity [mm/s]")
    assert not np.any(kinds[1:])


# --- in the workbench ----------------------------------------------------------------------


def plot(app, quantity: str) -> AxisPlot:
    return app.query_one(f"#plot-{quantity}", AxisPlot)


async def edit(pilot, project, note: str = "test") -> None:
    pilot.app.post_message(ProjectEdited(project, note))
    await settle(pilot)


async def test_velocity_plot_peaks_at_the_closed_form_in_mid_rise():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        velocity = plot(app, "velocity")
        chart = velocity.chart
        assert velocity.points_drawn == 3601
        codes, kinds = draw(chart, *velocity.size)
        cells = inside(kinds, *velocity.size)
        scale = Scale(velocity.size.width - 9, velocity.size.height - 4, chart.lo, chart.hi)
        rows, cols = np.nonzero(cells == CURVE)
        top = rows.min()
        v = cycloidal_peak_velocity(40.0, 90.0, 120.0)  # 640 mm/s at 45°
        assert top == scale.row(v)
        peak_columns = cols[rows == top]
        assert peak_columns.min() <= scale.column(45.0) <= peak_columns.max()


async def test_titles_name_the_limit_line_pattern_not_its_colour():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert plot(app, "velocity").title == "velocity [mm/s]  peak 640  limit ±900 (dashed)"
        assert plot(app, "position").title == "position [mm]  0 … 40"
        for quantity in ("velocity", "acceleration", "jerk"):
            title = plot(app, quantity).title
            assert "(dashed)" in title and "red" not in title
            strips = [plot(app, quantity).render_line(y) for y in range(plot(app, quantity).size.height)]
            assert strips[0].text.startswith(title)


async def test_a_speed_change_redraws_the_rates_but_not_the_position():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        builds = {q: plot(app, q).builds for q in ("position", "velocity", "acceleration", "jerk")}
        position_chart = plot(app, "position").chart
        await edit(pilot, editing.set_speed(app.project, 150.0))
        assert plot(app, "position").chart is position_chart
        assert plot(app, "position").builds == builds["position"]
        for q in ("velocity", "acceleration", "jerk"):
            assert plot(app, q).builds == builds[q] + 1
        v = cycloidal_peak_velocity(40.0, 90.0, 150.0)  # 800 mm/s
        assert f"peak {v:.0f}" in plot(app, "velocity").title


async def test_an_edit_of_another_axis_leaves_these_plots_alone():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert app.query_one("#axes").axis_name == LID
        builds = [p.builds for p in app.query(AxisPlot)]
        await edit(pilot, editing.set_span(app.project, OTHER, 1, 110.0))
        assert app.query_one("#axes").results_for is app.project
        assert [p.builds for p in app.query(AxisPlot)] == builds
        await edit(pilot, editing.set_span(app.project, LID, 0, 100.0))
        assert all(p.builds == b + 1 for p, b in zip(app.query(AxisPlot), builds))
        v = cycloidal_peak_velocity(40.0, 100.0, 120.0)  # 576 mm/s
        assert f"peak {v:.0f}" in plot(app, "velocity").title


@pytest.mark.parametrize("size, shown", [((80, 24), 1), ((120, 40), 4)])
async def test_only_plots_on_view_are_drawn(size, shown):
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=size) as pilot:
        await settle(pilot)
        builds = [p.builds for p in app.query(AxisPlot)]
        await edit(pilot, editing.set_span(app.project, LID, 0, 100.0))  # changes all four curves
        drawn = [p for p, b in zip(app.query(AxisPlot), builds) if p.builds > b]
        assert len(drawn) == shown and all(p.display for p in drawn)
        if shown == 1:
            hidden = next(p for p in app.query(AxisPlot) if p.quantity == "position")
            assert not hidden.display and hidden.chart is not None  # kept, drawn when it comes on view
            before = hidden.builds
            app.query_one("#plots").shown = "position"
            await settle(pilot)
            assert hidden.display and hidden.builds == before + 1


# --- an edit and its numbers reach the screen together ----------------------------------------


async def test_an_edit_waits_for_its_numbers_then_is_painted_with_them(monkeypatch):
    import threading

    import workbench.app as app_module
    import workbench.tui.views.axes as axes_module

    hold_s = 0.5  # long enough to look while it holds, whatever else the machine does
    monkeypatch.setattr(axes_module, "HOLD_S", hold_s)
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        view = app.query_one("#axes")
        assert not view.holding
        await edit(pilot, editing.set_span(app.project, LID, 0, 100.0))
        assert not view.holding and view.results_for is app.project  # released when the numbers came

        gate = threading.Event()
        compute = app_module.compute_results
        monkeypatch.setattr(app_module, "compute_results", lambda project: gate.wait(10) and compute(project))
        try:
            app.post_message(ProjectEdited(editing.set_span(app.project, LID, 0, 110.0), "slow numbers"))
            await pilot.pause()
            assert view.holding and view.results_for is not app.project
            await pilot.pause(hold_s * 1.5)
            assert not view.holding  # painted alone after HOLD_S, numbers still to come
            assert "(computing…)" in app.query_one("#axis-bar").content.plain
        finally:
            gate.set()
        await settle(pilot)
        assert view.results_for is app.project and not view.holding
        v = cycloidal_peak_velocity(40.0, 110.0, 120.0)  # 523.6 mm/s
        assert f"peak {v:.4g}" in plot(app, "velocity").title


@pytest.mark.parametrize("value", [900.0, -900.0, 0.0, 999.0, -1000.0, 1000.0, 1200.0])
def test_a_level_line_has_the_dots_of_a_line_stepped_across(value):
    scale = Scale(53, 12, -1000.0, 1000.0)
    stepped = scale.dots(np.array([0.0, 360.0]), np.full(2, value))
    assert np.array_equal(scale.level(value), stepped)


async def test_a_cell_editor_closing_and_its_edit_are_painted_together(monkeypatch):
    import threading

    import workbench.app as app_module
    import workbench.tui.views.ahead as ahead_module

    app = Workbench(load_project(preset_path("tray-lidder")))
    held_when_sent = []
    apply_edit = app.apply_edit

    def watched_apply_edit(project, note) -> None:
        if not held_when_sent:
            view = app.query_one("#axes")
            held_when_sent.append((view.holding, view.editing))
        apply_edit(project, note)

    app.apply_edit = watched_apply_edit

    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        view = app.query_one("#axes")
        screen = app.screen
        gate = threading.Event()  # no numbers at all until the gate opens: neither ahead nor after
        compute = app_module.compute_results
        slow = lambda project: gate.wait(10) and compute(project)  # noqa: E731
        monkeypatch.setattr(app_module, "compute_results", slow)
        monkeypatch.setattr(ahead_module, "compute_results", slow)
        try:
            app.query_one("#segments").move_cursor(row=0, column=2)  # segment 1's span
            await pilot.press("enter", "1", "0", "0")
            assert view.editing and view.editor.text == "100" and app.screen is screen
            await pilot.press("enter")
            # held from the editor's closing, before the edit went up; no other screen came or went
            assert held_when_sent == [(True, False)] and app.screen is screen
            assert view.holding and view.results_for is not app.project
        finally:
            gate.set()
        await settle(pilot)
        assert not view.holding and view.results_for is app.project
        assert app.project.axis(LID).segments[0].span == 100.0
        v = cycloidal_peak_velocity(40.0, 100.0, 120.0)  # 576 mm/s
        assert f"peak {v:.4g}" in plot(app, "velocity").title


async def test_the_numbers_of_a_typed_value_are_ready_at_enter(monkeypatch):
    import threading

    import workbench.app as app_module

    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        view = app.query_one("#axes")
        gate = threading.Event()  # the app's own numbers for the edit wait at the gate
        compute = app_module.compute_results
        monkeypatch.setattr(app_module, "compute_results", lambda project: gate.wait(10) and compute(project))
        try:
            app.query_one("#segments").move_cursor(row=0, column=2)  # segment 1's span
            await pilot.press("enter", "1", "0", "0")
            await workers_done(app)  # the view's numbers of "100", computed while typed
            await pilot.press("enter")
            await pilot.pause()
            assert app.project.axis(LID).segments[0].span == 100.0
            assert view.results_for is app.project and not view.holding  # painted without the app's numbers
            assert app.results_for is not app.project
            v = cycloidal_peak_velocity(40.0, 100.0, 120.0)  # 576 mm/s
            assert f"peak {v:.4g}" in plot(app, "velocity").title
            assert app.query_one("#peaks").rows["velocity"]["value"] == f"{v:.0f} mm/s"
        finally:
            gate.set()
        await settle(pilot)
        assert app.results_for is app.project and view.results_for is app.project
        assert app.results is view.results  # the same numbers, not computed a second time
        assert f"peak {v:.4g}" in plot(app, "velocity").title


async def open_dialog_and_choose(pilot, how: str) -> None:
    """Open a dialog of the Axes view and make a choice in it, as a user does (Enter not yet)."""
    app = pilot.app
    if how == "speed":  # the machine speed typed over its value
        await pilot.press("m", "1", "1", "0")
    elif how == "law":  # segment 1's law: harmonic, highlighted in the list
        await pilot.press("l")
        laws = app.screen.query_one("#laws")
        laws.move_cursor(row=laws.get_row_index("harmonic"))
    else:  # "limits": the lid lift's velocity limit typed over
        await pilot.press("L", "9", "9", "9")
    await pilot.pause()


def expected_peak_velocity(how: str) -> float:
    """Segment 1 of the lid lift (40 mm over 90° at 120 cycles/min) after the dialog's edit."""
    if how == "speed":
        return cycloidal_peak_velocity(40.0, 90.0, 110.0)  # 586.7 mm/s
    if how == "law":  # harmonic rise: Cv = π/2 (handbook value from memory, Norton)
        return np.pi / 2 * 40.0 / (90.0 / 360.0 * 60.0 / 120.0)  # 418.9 mm/s
    return cycloidal_peak_velocity(40.0, 90.0, 120.0)  # 640 mm/s: a limit moves no curve


@pytest.mark.parametrize("how", ["speed", "law", "limits"])
async def test_the_numbers_of_a_dialogs_choice_are_ready_when_it_closes(monkeypatch, how):
    """What a dialog would make is computed while the dialog is open; Enter paints the edit
    without waiting for the app's own numbers."""
    import threading

    import workbench.app as app_module

    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        view = app.query_one("#axes")
        base = app.screen
        gate = threading.Event()  # the app's own numbers for the edit wait at the gate
        compute = app_module.compute_results
        monkeypatch.setattr(app_module, "compute_results", lambda project: gate.wait(10) and compute(project))
        try:
            await open_dialog_and_choose(pilot, how)
            assert app.screen is not base
            await workers_done(app)  # the view's numbers of the choice
            await pilot.press("enter")
            await pilot.pause()
            assert app.screen is base and app.history.modified
            assert view.results_for is app.project and not view.holding  # painted without the app's numbers
            assert app.results_for is not app.project
            v = expected_peak_velocity(how)
            assert app.query_one("#peaks").rows["velocity"]["value"] == f"{v:.4g} mm/s"
        finally:
            gate.set()
        await settle(pilot)
        assert app.results is view.results  # the same numbers, not computed a second time
        if how == "limits":
            assert app.project.axis(LID).limits.velocity == 999.0


async def test_a_dialog_closing_and_its_edit_are_painted_together():
    """Screen updates are held from the moment the dialog closes with an edit: the screen under
    it comes back in the same update as the edit's numbers, not in one of its own before them."""
    from textual import events

    app = Workbench(load_project(preset_path("tray-lidder")))
    held_at = {}

    def held() -> bool:
        return app._batch_count > 0  # Textual's count of open `batch_update`s: no screen update

    def hook(message) -> None:
        if isinstance(message, events.ScreenResume) and app.is_running:
            held_at.setdefault("screen back", held())

    apply_edit = app.apply_edit

    def watched_apply_edit(project, note) -> None:
        held_at.setdefault("edit", held())
        apply_edit(project, note)

    app.apply_edit = watched_apply_edit

    async with app.run_test(size=(80, 24), message_hook=hook) as pilot:
        await settle(pilot)
        await pilot.press("m", "1", "1", "0")
        held_at.clear()
        await pilot.press("enter")
        await settle(pilot)
        assert held_at == {"screen back": True, "edit": True}
        assert app.project.speed == 110.0 and not app.query_one("#axes").holding


async def test_a_dialog_cancelled_after_a_choice_changes_nothing():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        before = app.project
        view = app.query_one("#axes")
        await open_dialog_and_choose(pilot, "speed")
        await workers_done(app)
        await pilot.press("escape")
        await settle(pilot)
        assert app.project is before and not app.history.modified and not view.holding
        assert view._wanted is None and view._ahead is None  # the numbers typed ahead are let go
