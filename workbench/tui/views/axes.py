"""The Axes view: one axis's segments, peaks against limits, joins and motion plots.

Keys act on the segment under the cursor.  Every edit goes through a pure
operation of `workbench.editing` (via `axes_dialogs` where something must be
typed) and is applied at once by the app (`Workbench.apply_edit`), which keeps the history
and sends the new state back down with `show_project`.

A new state and its numbers reach the screen in one update: from
`show_project` until `show_results` brings the numbers for it (at most
`HOLD_S`), screen updates are held (`App.batch_update`).  Painted apart,
the edit's table would take one update and the plots and peaks another,
and Textual paints its second update after an idle spell one to two
frames after the first.

The typed cells (span, end position, time) are edited in place
(`widgets.cell_editing`, `widgets.cell_editor`): the value is typed over the
cell while the focus stays on the table, and the view hands the editor its
keys; the numbers of what is typed are computed while it is typed.  In place,
closing the editor costs one layout pass, where a dialog screen closing makes
Textual repaint the whole screen under it.  The footer shows the editor's
keys while it is open, and the view's again once the edit is on screen.

The other edits that need typing or choosing (law, machine speed, limits, a
new segment) open a dialog (`screens.model_dialog.ModelDialog`).  The view
computes the numbers of what the dialog would make while it is open
(`views.ahead.NumbersAhead`, as for the cells) and holds screen updates from
the moment it closes with an edit, so the screen under it is repainted once,
with the edit's numbers.
"""

from __future__ import annotations

from typing import Callable

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.widgets import Static

from ... import editing
from ...editing import EditError
from ...projectfile import Project
from ..compute import AxisResult
from ..format import OK_STYLE, OVER_STYLE, axis_verdict, number
from ..messages import Status
from ..screens.model_dialog import ModelDialog
from ..widgets.axis_plots import PlotPanel
from ..widgets.cell_editing import CellsInPlace
from ..widgets.cell_editor import CellField, EditNote
from ..widgets.peaks_panel import PeaksPanel
from ..widgets.segment_table import SegmentTable
from . import axes_dialogs as dialogs
from .ahead import NumbersAhead
from .axis_rename import start_rename
from .base import WorkbenchView

HOLD_S = 0.1  # the longest a new state waits for its numbers before it is painted alone (s)
IN_PLACE = ("span", "ends", "time")  # table columns whose cells are typed over in place


class AxisBar(Static):
    """Which axis, its unit, the machine speed and the axis's verdict, in one line."""

    DEFAULT_CSS = "AxisBar { height: 1; }"


class AxesView(CellsInPlace, NumbersAhead, WorkbenchView):
    view_id = "axes"
    title = "Axes"

    DEFAULT_CSS = """
    AxesView { layers: default editor; }
    """

    # The view runs these as each key passes it, in the order typed (`CellsInPlace.on_key`).
    BINDINGS = [
        Binding("enter", "edit_cell", "Edit",
                tooltip="Edit the cell under the cursor: law, span, end position or time", id="edit"),
        Binding("enter", "apply_edit", "Apply",
                tooltip="Apply the value typed in the cell (a refused value stays, with the reason)",
                id="apply"),
        Binding("escape", "cancel_edit", "Cancel", tooltip="Close the cell being edited; nothing changes",
                id="cancel"),
        Binding("l", "law", "Law", show=False, tooltip="Choose the law of the segment from the list with Cv, Ca, Cj"),
        Binding("a", "add", "Add", tooltip="Insert a segment after this one; its span comes from this dwell or the next (or one you pick)"),
        Binding("d,delete", "delete", "Del", tooltip="Delete the segment; a neighbouring dwell takes its span, else the segment before"),
        Binding("s", "split", "Split", show=False, tooltip="Halve the segment into two of the same law meeting halfway"),
        Binding("left_square_bracket", "move(-1)", "Earlier", show=False, key_display="[",
                tooltip="Move the segment one place earlier in the cycle"),
        Binding("right_square_bracket", "move(1)", "Later", show=False, key_display="]",
                tooltip="Move the segment one place later in the cycle"),
        Binding("m", "speed", "Speed", tooltip="Change the machine speed (cycles/min)"),
        Binding("n", "rename", "Rename", show=False, tooltip="Rename the axis; its cams and linkage drivers follow"),
        Binding("L", "limits", "Limits", key_display="L",
                tooltip="Velocity, acceleration and jerk limits of this axis"),
        Binding("comma", "cycle_axis(-1)", "Prev axis", key_display=",", show=False,
                tooltip="Show the previous axis"),
        Binding("full_stop", "cycle_axis(1)", "Next axis", key_display=".", show=False,
                tooltip="Show the next axis"),
        Binding("p", "next_plot", "Plot", show=False, tooltip="Show the next quantity when one plot fits"),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.project: Project | None = None
        self.axis_name: str | None = None
        """The axis on view (None for a project without axes)."""
        self.results: dict[str, AxisResult] = {}
        self.results_for: Project | None = None
        """The project the results belong to (they may lag one edit behind)."""
        self.plot_chosen = False
        """True once the user picked the plot; until then a short window shows the worst quantity."""
        self._cursor_after: int | None = None
        """Row for the cursor once the next edit comes back (a moved or added segment)."""
        self._held = None
        """The screen-update batch held until the numbers come (None: not holding)."""
        self._hold_timer = None
        self._init_cells()
        self._init_ahead()

    def compose(self) -> ComposeResult:
        yield AxisBar(id="axis-bar")
        yield SegmentTable(id="segments")
        yield PeaksPanel(id="peaks")
        yield PlotPanel(id="plots")
        yield CellField(id="cell-field")
        yield EditNote(id="edit-note")

    def on_mount(self) -> None:
        self._mount_cells()

    # --- state down ---------------------------------------------------------

    def show_project(self, project: Project) -> None:
        if self.editing and project is not self.project:
            self._close_editor()  # it was built on the state before (an undo, say)
        if project is not self.results_for:
            self._hold()
        previous = [a.name for a in self.project.axes] if self.project is not None else []
        self.project = project
        names = [a.name for a in project.axes]
        if self.axis_name not in names:  # renamed, a rename undone, or deleted: stay at its place in the list
            at = previous.index(self.axis_name) if self.axis_name in previous else 0
            self.axis_name = names[min(at, len(names) - 1)] if names else None
        self._refresh_axis()
        ahead = self.take_ahead(project)
        if ahead is not None:  # typed in a cell or a dialog: its numbers are here already
            self.show_results(project, ahead)

    def show_results(self, project: Project, results: dict[str, AxisResult]) -> None:
        if project is self.results_for:
            return  # on view already (computed ahead while the value was typed)
        self.results, self.results_for = results, project
        self._refresh_numbers()
        if project is self.project:
            self._release()

    @property
    def holding(self) -> bool:
        """True while screen updates wait for the numbers of the state on view."""
        return self._held is not None

    def _hold(self) -> None:
        """Hold screen updates until the numbers for the new state come (or `HOLD_S` passes)."""
        if self._held is not None or not self.is_mounted:
            return
        self._held = self.app.batch_update()
        self._held.__enter__()
        self._hold_timer = self.set_timer(HOLD_S, self._release)

    def _release(self) -> None:
        """Let the screen update again (at once: the widgets changed meanwhile are painted)."""
        if self._held is None:
            return
        held, self._held = self._held, None
        self._hold_timer.stop()
        held.__exit__(None, None, None)
        self.screen.check_idle()
        self.relabel_footer()  # once the edit is on screen, not before

    def on_unmount(self) -> None:
        self._release()

    def select_axis(self, name: str) -> None:
        self._close_editor()
        self.axis_name = name
        self._refresh_axis()

    def _refresh_axis(self) -> None:
        table = self.query_one(SegmentTable)
        if self.project is None or self.axis_name is None:
            table.clear()
            self.query_one(AxisBar).update(Text("this project has no axes: add an [[axis]] table to the file"))
            return
        table.show(self.project.axis(self.axis_name), self.project.speed)
        if self._cursor_after is not None:
            row = min(self._cursor_after, table.row_count - 1)
            table.move_cursor(row=max(row, 0), animate=False)
            self._cursor_after = None
        self._refresh_numbers()

    @property
    def result(self) -> AxisResult | None:
        return self.results.get(self.axis_name) if self.axis_name else None

    def _refresh_numbers(self) -> None:
        if self.project is None or self.axis_name is None:
            return
        axis = self.project.axis(self.axis_name)
        names = [a.name for a in self.project.axes]
        result = self.result
        fresh = result is not None and self.results_for is self.project
        bar = Text.assemble(
            ("axis ", "dim"), (f"◂ {axis.name} ▸", "bold"),
            (f" {names.index(axis.name) + 1}/{len(names)} [{axis.unit}]", "dim"),
            (" (, .)" if len(names) > 1 else "", "dim"),
            "  ", number(self.project.speed, "cycles/min"), "  ",
        )
        over = [name for name in names if name != axis.name
                and name in self.results and not self.results[name].report.ok]
        if result is not None and over and result.report.ok and axis.limits.any:
            bar.append("✓ within", style=OK_STYLE)  # this axis; not the machine: it is said next
        elif result is not None:
            bar.append_text(axis_verdict(result.report.ok, axis.limits.any))
        if over:  # the machine is within its limits only when every axis is
            bar.append(f"  ✗ {', '.join(over)} OVER", style=OVER_STYLE)
        if not fresh:
            bar.append("  (computing…)", style="dim")
        self.query_one(AxisBar).update(bar, layout=False)  # one line, always
        self.query_one(PeaksPanel).show(result)
        panel = self.query_one(PlotPanel)
        if result is not None and not self.plot_chosen and result.report.checks:
            worst = max(result.report.checks, key=lambda c: c.used)
            panel.shown = worst.quantity
        panel.show(result)

    def focus_first(self) -> None:
        self.screen.set_focus(self.query_one(SegmentTable))  # now: the next key finds it

    # --- edits up -----------------------------------------------------------

    @property
    def _index(self) -> int:
        return self.query_one(SegmentTable).segment_index

    def _open(self, build: Callable[[], tuple[ModelDialog, dialogs.Note]]) -> None:
        """Open a dialog built from the current project; its result becomes an edit.

        What the dialog would make is computed while it is typed, and screen
        updates are held from the moment it closes with an edit, so the
        screen under it comes back in the same update as the edit's numbers."""
        if self.project is None or self.axis_name is None:
            return
        try:
            screen, note = build()
        except EditError as exc:
            self._cursor_after = None
            self.post_message(Status(exc.message, error=True))
            self.app.bell()
            return
        base = self.project
        held = False

        def closing() -> None:
            nonlocal held
            held = not self.holding
            self._hold()  # the screen under the dialog comes back with the edit's numbers

        def done(project: Project | None) -> None:
            stale = project is not None and self.project is not base
            if project is None or stale or project.same_content(base):
                self._cursor_after = None
                self.drop_ahead()
                if held:
                    self._release()  # held as it closed, and nothing is coming
                if stale:  # an edit came in while it was open (an undo, say): its result would drop it
                    self.post_message(Status("refused — the project changed while the dialog was open; "
                                             "nothing applied", error=True))
                    self.app.bell()
                elif project is not None:
                    self.post_message(Status("nothing changed: the value is the one the project has"))
                return
            self._hold()  # held already (closing), unless the dialog dismissed itself
            resumed = self.app.batch_update()  # and until the screen under the dialog has resumed:
            resumed.__enter__()  # numbers computed ahead end the hold at once, before that
            self.app.apply_edit(project, note if isinstance(note, str) else note(project))
            self.screen.call_later(resumed.__exit__, None, None, None)

        screen.listen(candidate=self.want_numbers, closing=closing)
        self.app.push_screen(screen, done)

    def _apply(self, edit: Callable[[], Project], note: str) -> bool:
        """Run an edit that needs no typing; a refusal goes to the status line."""
        if self.project is None or self.axis_name is None:
            return False
        try:
            project = edit()
        except EditError as exc:
            self._cursor_after = None
            self.post_message(Status(f"refused — {exc.message}", error=True))
            self.app.bell()
            return False
        self.app.apply_edit(project, note)  # at once: a key typed next acts on the edited project
        return True

    def edit_cell(self) -> None:
        """Open the cell under the cursor: typed over in place, or the law list."""
        column = self.query_one(SegmentTable).column_key
        p, name, i = self.project, self.axis_name, self._index
        if column in IN_PLACE:
            builders = {"span": dialogs.span_edit, "ends": dialogs.end_edit, "time": dialogs.time_edit}
            self._edit_in_place(lambda: builders[column](p, name, i))
        else:
            self._open(lambda: dialogs.law_dialog(p, name, i))

    def action_law(self) -> None:
        self._open(lambda: dialogs.law_dialog(self.project, self.axis_name, self._index))

    def action_add(self) -> None:
        self._cursor_after = self._index + 1
        self._open(lambda: dialogs.add_dialog(self.project, self.axis_name, self._index))

    def action_rename(self) -> None:
        start_rename(self)

    def action_speed(self) -> None:
        self._open(lambda: dialogs.speed_dialog(self.project))

    def action_limits(self) -> None:
        self._open(lambda: dialogs.limits_dialog(self.project, self.axis_name))

    def action_delete(self) -> None:
        i = self._index
        axis = self.project.axis(self.axis_name) if self.project and self.axis_name else None
        if axis is None:
            return
        heir = editing.default_heir(axis, i)
        seg = axis.segments[i]
        note = f"deleted segment {i + 1} ({seg.law}, {seg.span:g}°; its span went to segment {heir + 1})"
        self._apply(lambda: editing.delete_segment(self.project, self.axis_name, i, heir), note)

    def action_split(self) -> None:
        i = self._index
        self._apply(lambda: editing.split_segment(self.project, self.axis_name, i),
                    f"split segment {i + 1} in two")

    def action_move(self, offset: int) -> None:
        i = self._index
        word = "earlier" if offset < 0 else "later"
        self._cursor_after = i + offset
        self._apply(lambda: editing.move_segment(self.project, self.axis_name, i, offset),
                    f"moved segment {i + 1} {word}")

    def action_cycle_axis(self, step: int) -> None:
        if self.project is None or not self.project.axes:
            return
        names = [a.name for a in self.project.axes]
        i = names.index(self.axis_name) if self.axis_name in names else 0
        self.select_axis(names[(i + step) % len(names)])

    def action_next_plot(self) -> None:
        panel = self.query_one(PlotPanel)
        self.plot_chosen = True
        shown = panel.next_quantity()
        if not panel.single:
            self.post_message(Status("all four plots are on view; p picks one when the window is small"))
        else:
            self.post_message(Status(f"plot: {shown}"))
