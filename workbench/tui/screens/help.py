"""Help built from the bindings in force, never from a hand-kept list.

`binding_sections` reads the live bindings (after any keymap) of the app and
of every view, so the help cannot drift from what the keys do.
"""

from __future__ import annotations

from typing import Iterable

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Label, Static

Row = tuple[str, str, str]  # key(s), what it does, longer explanation


def live_bindings(app, node):
    """The bindings of `node` as they are in force: its own, with the app's keymap applied."""
    bindings = node._bindings.copy()
    if app._keymap:
        bindings.apply_keymap(app._keymap)
    return bindings


def rows_of(app, bindings: Iterable[tuple[str, Binding]]) -> list[Row]:
    """One row per action that has a description; keys of the same action are joined."""
    by_action: dict[str, list] = {}
    for _, binding in bindings:
        if not binding.description or binding.system:
            continue
        entry = by_action.setdefault(binding.action, [[], binding])
        key = app.get_key_display(binding)
        if key not in entry[0]:
            entry[0].append(key)
    return [(" ".join(keys), b.description, b.tooltip or "") for keys, b in by_action.values()]


def binding_sections(app, nodes: list[tuple[str, object]]) -> list[tuple[str, list[Row]]]:
    """Sections (title, rows) for the app and the given (title, widget) pairs."""
    sections = [("Everywhere", rows_of(app, live_bindings(app, app)))]
    for title, node in nodes:
        rows = rows_of(app, live_bindings(app, node))
        if rows:
            sections.append((title, rows))
    return sections


class HelpScreen(ModalScreen):
    """Keys by where they work, with what each does."""

    BINDINGS = [Binding("escape,q,f1,question_mark", "close", "Close help", tooltip="Back to the work")]
    AUTO_FOCUS = "#help-body"  # ↑ ↓ page keys scroll it at once

    def __init__(self, sections: list[tuple[str, list[Row]]], about: str = ""):
        super().__init__()
        self.sections = sections
        self.about = about

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog help"):
            yield Label(Text("Keys"), classes="dialog-title")
            with VerticalScroll(id="help-body"):
                for title, rows in self.sections:
                    table = Table(box=None, show_header=False, padding=(0, 1), expand=False)
                    table.add_column("key", style="bold", no_wrap=True, width=14)
                    table.add_column("does")
                    for keys, description, tooltip in rows:
                        text = Text(description)
                        if tooltip:
                            text.append(f" — {tooltip}", style="dim")
                        table.add_row(keys, text)
                    yield Label(Text(title), classes="help-section")
                    yield Static(table)
                if self.about:
                    yield Static(Text(self.about, style="dim"), classes="help-about")
            yield Label(Text("esc: close   ctrl+p: every action by name"), classes="dialog-hint")

    def action_close(self) -> None:
        self.dismiss(None)
