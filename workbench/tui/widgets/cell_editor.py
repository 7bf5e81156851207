"""A table cell edited in place: the value is typed over the cell, a note under the table.

The note names what is edited, the segment that gives or takes the difference
(where there is one; up/down picks another) and, at every key, either the
reason the model refuses the typed value or what the change would do.  Enter
applies only what the model accepts; Escape closes and nothing changes.

The owner keeps the keyboard focus on its table and hands the editor its keys
(`CellEditor.type`, `CellEditor.key`).  The focus never moves, so closing the
editor changes nothing on screen but the editor itself: no focus change
rebuilds the footer or lays out the screen between Enter and the edit's
numbers.  The editor knows nothing about projects: a `CellEdit` gives it
`attempt(text, choice)`, which returns the edited model or raises `EditError`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable

from rich.cells import cell_len
from rich.text import Text
from textual.geometry import Region
from textual.widget import Widget
from textual.widgets import Static

from ..screens.edit_value import try_value

MIN_FIELD_WIDTH = 8  # cells: room for a value and the cursor in a narrow column
NOTE_MAX_WIDTH = 86  # cells: a note wider than this reads worse, not better


@dataclass(frozen=True)
class CellEdit:
    """What one in-place edit needs: what is edited, its value and how the model takes it."""

    title: str
    """What is edited, e.g. "span of segment 1 (cycloidal), axis lid-lift"."""
    prompt: str
    """The value's unit and rule, e.g. "span [deg] — spans sum to 360°"."""
    value: str
    """The value as it is now, as text."""
    attempt: Callable[[str, Any], Any]
    """(typed text, choice) → the edited model, or raises `EditError` with the reason."""
    explain: Callable[[Any], str] | None = None
    """The edited model → one line saying what the change does."""
    choices: tuple[tuple[str, Any], ...] = ()
    """(label, value) of who gives or takes the difference; empty when there is no choice."""
    choice_prompt: str = ""
    choice: Any = None


class LineText:
    """One line of typed text with a cursor.  Fresh, the whole text is selected: the first
    character typed replaces it (a cell is usually typed over, not amended)."""

    def __init__(self, text: str) -> None:
        self.text = text
        self.cursor = len(text)
        self.selected = bool(text)

    def insert(self, typed: str) -> None:
        if self.selected:
            self.text, self.cursor, self.selected = "", 0, False
        self.text = self.text[: self.cursor] + typed + self.text[self.cursor:]
        self.cursor += len(typed)

    def key(self, key: str) -> bool:
        """Apply an editing key (not a printable one); False if `key` is not one."""
        text, at = self.text, self.cursor
        if key in ("backspace", "delete", "ctrl+u") and self.selected:
            self.text, self.cursor = "", 0
        elif key == "backspace":
            self.text, self.cursor = text[: max(at - 1, 0)] + text[at:], max(at - 1, 0)
        elif key == "delete":
            self.text = text[:at] + text[at + 1:]
        elif key == "ctrl+u":  # clear back to the start, as shells do
            self.text, self.cursor = text[at:], 0
        elif key == "left":
            self.cursor = 0 if self.selected else max(at - 1, 0)
        elif key == "right":
            self.cursor = min(at + 1, len(text))
        elif key in ("home", "ctrl+a"):
            self.cursor = 0
        elif key in ("end", "ctrl+e"):
            self.cursor = len(text)
        else:
            return False
        self.selected = False
        return True

    def render(self) -> Text:
        """The text with the selection or the cursor cell in reverse video."""
        if self.selected:
            return Text.assemble(" ", (self.text, "reverse"), " ")
        before, under, after = self.text[: self.cursor], self.text[self.cursor: self.cursor + 1], \
            self.text[self.cursor + 1:]
        return Text.assemble(" ", before, (under or " ", "reverse"), after, " " if under else "")


class CellField(Widget):
    """The typed value, drawn over the cell being edited."""

    DEFAULT_CSS = """
    CellField {
        layer: editor;
        display: none;
        height: 1;
        background: $accent 40%;
        text-style: bold;
    }
    """

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.line = LineText("")

    def render(self) -> Text:
        return self.line.render()


class EditNote(Static):
    """Under the edited row: the prompt, who gives or takes the difference, the verdict, the keys."""

    DEFAULT_CSS = f"""
    EditNote {{
        layer: editor;
        display: none;
        width: 100%;
        max-width: {NOTE_MAX_WIDTH};
        height: auto;
        padding: 0 1;
        border: round $accent;
        border-title-style: bold;
        background: $surface;
    }}
    """


class CellEditor:
    """Opens, runs and closes one in-place edit on a `CellField` and an `EditNote`."""

    def __init__(self, field: CellField, note: EditNote) -> None:
        self.field = field
        self.note = note
        self.edit: CellEdit | None = None
        self.choice: Any = None
        self.result: Any = None
        """The edited model for what is typed now (None while it is refused)."""
        self.error: str | None = None
        """The reason the typed value is refused (None when it is accepted)."""
        self.feedback = Text()

    @property
    def is_open(self) -> bool:
        return self.edit is not None

    @property
    def text(self) -> str:
        return self.field.line.text

    @property
    def unchanged(self) -> bool:
        """The value is as it was shown (whoever would give or take a difference of nothing)."""
        return self.text.strip() == self.edit.value.strip()

    def open(self, edit: CellEdit, cell: Region, note_y: int) -> None:
        """Start editing `edit` over `cell`, the note from line `note_y` down (both in the
        coordinates of the editor's parent)."""
        self.edit, self.choice = edit, edit.choice
        self.field.line = LineText(edit.value)
        self.note.border_title = edit.title
        self.place(cell, note_y)
        self.field.display = self.note.display = True
        self._check()

    def place(self, cell: Region, note_y: int) -> None:
        """Put the field over `cell` and the note from line `note_y` down (after a resize)."""
        self.field.styles.width = max(cell.width, MIN_FIELD_WIDTH, cell_len(self.edit.value) + 3)
        self.field.styles.offset = (cell.x, cell.y)
        # the note is laid out under the field on the editor layer: it starts one line down
        self.note.styles.offset = (0, note_y - 1)

    def close(self) -> None:
        self.edit = None
        self.result = self.error = None
        self.field.display = self.note.display = False

    def type(self, text: str) -> None:
        """Characters typed or pasted (only the first line of a paste)."""
        lines = text.splitlines()
        if lines and lines[0]:
            self.field.line.insert(lines[0])
            self._changed()

    def key(self, key: str) -> bool:
        """An editing key or up/down (another segment takes the difference); False if not one."""
        if key in ("up", "down"):
            if len(self.edit.choices) > 1:
                values = [value for _, value in self.edit.choices]
                i = values.index(self.choice) if self.choice in values else 0
                self.choice = values[(i + (1 if key == "down" else -1)) % len(values)]
                self._check()
            return True
        if self.field.line.key(key):
            self._changed()
            return True
        return False

    def _changed(self) -> None:
        self.field.refresh()
        self._check()

    def _check(self) -> None:
        """Try what is typed on the model; show the reason or the preview."""
        edit = self.edit
        self.result, self.error, self.feedback = try_value(edit.attempt, edit.explain, self.text,
                                                           self.choice)
        lines = [Text(edit.prompt, style="dim")]
        if edit.choices:
            label = next((label for label, value in edit.choices if value == self.choice), "")
            line = Text.assemble((f"{edit.choice_prompt}: ", "dim"), (f"◂ {label} ▸", "bold"))
            if len(edit.choices) > 1:
                line.append("  ↑ ↓ another", style="dim")
            lines.append(line)
        lines += [self.feedback, Text("enter apply · esc cancel", style="dim")]
        self.note.update(Text("\n").join(lines))
