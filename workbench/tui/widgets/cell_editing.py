"""The view side of editing a table's cells in place (`CellsInPlace`, a mixin for a view).

The view keeps the keyboard focus on its `SegmentTable` and hands the open
`CellEditor` the keys that edit its line.  Enter applies: the editor
closes, screen updates are held (the host's `_hold`) and the app applies the
edit at once, so the editor's closing and the edit are painted together.
The numbers of what is typed are computed while it is typed (the host's
`want_numbers`, `views.ahead.NumbersAhead`), so Enter finds them done.

Keys act in the order they were typed, even when they arrive in a bunch
(`on_key`): each key reaches the view before the app's bindings, so the
view runs its own and its table's bindings as the key passes, rather than
let the app run them after keys the view has acted on ("↓ enter" edits the
cell below; "enter 1 2 0 enter" applies 120; "↓ l" picks the law of the
segment below; keys typed after one that opened a dialog go to the dialog).

The host provides `project`, `axis_name`, `_hold()`, `want_numbers(project)`,
`drop_ahead()`, `edit_cell()` (open the cell under the cursor), a
`SegmentTable`, a `CellField` and an `EditNote` among its children, and
bindings for `edit_cell` and `apply_edit` (enter) and `cancel_edit`
(escape); it calls `_init_cells()` in `__init__` and `_mount_cells()` on
mount.
"""

from __future__ import annotations

from typing import Callable

from textual import events
from textual.geometry import Region
from textual.widgets import DataTable

from ...editing import EditError
from ..messages import Status
from .cell_editor import CellEdit, CellEditor, CellField, EditNote
from .segment_table import SegmentTable

EDITOR_ACTIONS = ("apply_edit", "cancel_edit")  # the view's actions while a cell is edited
KEPT_FOCUS = ("tab", "shift+tab")  # keys that would move the focus away: an open editor swallows them


class CellsInPlace:
    """Typed cells of the host's segment table, edited in place."""

    def _init_cells(self) -> None:
        self.editor: CellEditor | None = None
        """The in-place editor of the table's typed cells."""
        self._edit_note: str | Callable[[object], str] = ""
        """The note of the edit open in place (for undo and the status line), or how to word it
        from the edited project."""
        self._footer_stale = False
        """True when the footer still shows the editor's keys after it closed with an edit."""
        self._editing_at = None
        """The table cell the open editor is over (a cursor move there from before keeps it open)."""

    def _mount_cells(self) -> None:
        self.editor = CellEditor(self.query_one(CellField), self.query_one(EditNote))

    def relabel_footer(self) -> None:
        """After an edit made in place is on screen: the footer shows the view's keys again."""
        if self._footer_stale:
            self._footer_stale = False
            self.call_after_refresh(self.refresh_bindings)

    @property
    def editing(self) -> bool:
        """True while a cell of the table is being typed over."""
        return self.editor is not None and self.editor.is_open

    def _edit_in_place(self, build: Callable[[], tuple[CellEdit, object]]) -> None:
        if self.project is None or self.axis_name is None:
            return
        try:
            edit, note = build()
        except EditError as exc:
            self.post_message(Status(exc.message, error=True))
            self.app.bell()
            return
        table = self.query_one(SegmentTable)
        table.focus()  # the keys come through the table, so they must go to it
        self._edit_note = note
        self._editing_at = table.cursor_coordinate
        self.editor.open(edit, *self._editor_place(table))
        self.refresh_bindings()

    def _editor_place(self, table: SegmentTable) -> tuple[Region, int]:
        """Where the editor goes: the cell under the cursor, and the line under the table."""
        return self._cell_region(table), table.region.bottom - self.content_region.y

    def _cell_region(self, table: SegmentTable) -> Region:
        """The cell under the table's cursor, in this view's coordinates."""
        row, column = table.cursor_coordinate
        columns = table.ordered_columns
        x = sum(c.get_render_width(table) for c in columns[:column])
        y = sum(r.height for r in table.ordered_rows[:row]) + (table.header_height if table.show_header else 0)
        origin = table.content_region.offset - self.content_region.offset - table.scroll_offset
        return Region(origin.x + x, origin.y + y, columns[column].get_render_width(table), 1)

    def _close_editor(self) -> None:
        self.drop_ahead()
        if self.editing:
            self.editor.close()
            self.refresh_bindings()

    def action_apply_edit(self) -> None:
        """Enter in an open cell (from the palette; a typed Enter comes through `on_key`)."""
        if self.editing:
            self._apply_typed()

    def action_edit_cell(self) -> None:
        """Enter on a cell (from the palette; a typed Enter comes through `on_key`)."""
        if not self.editing:
            self.edit_cell()

    def _apply_typed(self) -> None:
        """The value typed in the open cell: the edit goes up with the editor's closing, or the
        reason stays."""
        project = self.editor.result
        if project is None:
            self.app.bell()  # refused: the reason is on view under the cell
            return
        if self.editor.unchanged:  # nothing to do, nothing to undo
            self._close_editor()
            return
        self.editor.close()
        self._footer_stale = True
        self._hold()  # the editor closing and the edit reach the screen together
        note = self._edit_note
        self.app.apply_edit(project, note if isinstance(note, str) else note(project))

    def action_cancel_edit(self) -> None:
        self._close_editor()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """While a cell is edited only its keys act here; otherwise only they do not."""
        return (action in EDITOR_ACTIONS) == self.editing

    async def on_key(self, event: events.Key) -> None:
        """Every key that reaches the view acts here, in the order it was typed.

        An open editor takes the keys that edit its line, Enter and Escape.  A
        dialog that a key before this one opened takes it (`take_key`).  Else
        Enter opens the cell, and the bindings run now, from the table's up to
        the app's (save, undo, help, views) — not once the key has travelled
        on to the app, where a binding runs after keys the view has already
        acted on.  A key that finds the focus gone (a view switch before it)
        goes back to the app as if typed now."""
        if self.editing:
            if event.key == "enter":
                self._apply_typed()
            elif event.key == "escape":
                self.action_cancel_edit()
            elif event.is_printable and event.character:
                self.editor.type(event.character)
            elif not self.editor.key(event.key) and event.key not in KEPT_FOCUS:
                return
            event.stop()
            event.prevent_default()
            self._compute_ahead()
            return
        event.stop()
        event.prevent_default()
        here = self.app.screen is self.screen and self.app.focused is self.query_one(SegmentTable)
        if here and event.key == "enter":
            self.edit_cell()
        else:  # a covering dialog's, the app's, or a binding's (`WorkbenchView.key_in_turn`)
            await self.key_in_turn(event)

    def on_paste(self, event: events.Paste) -> None:
        if self.editing:
            self.editor.type(event.text)
            event.stop()
            self._compute_ahead()

    def _compute_ahead(self) -> None:
        """Start the numbers of what is typed now, so that Enter finds them done."""
        project = self.editor.result if self.editing else None
        if project is not None and not self.editor.unchanged:
            self.want_numbers(project)

    def on_data_table_cell_highlighted(self, event: DataTable.CellHighlighted) -> None:
        now = self.query_one(SegmentTable).cursor_coordinate
        if self.editing and event.coordinate == now and now != self._editing_at:
            self._close_editor()  # the cursor left the cell (a click, a page key); not a move from
            #                       before Enter whose message comes late

    def on_descendant_blur(self, event: events.DescendantBlur) -> None:
        if self.editing and isinstance(event.widget, SegmentTable):
            self._close_editor()

    def on_resize(self, event: events.Resize) -> None:
        if self.editing:  # the cell moves with the table: follow it once the table is laid out
            self.call_after_refresh(self._follow_cell)

    def _follow_cell(self) -> None:
        if self.editing:
            self.editor.place(*self._editor_place(self.query_one(SegmentTable)))
