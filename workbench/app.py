"""The camwright workbench: a Textual app over one project file.

The app owns the project history (immutable snapshots, `workbench.editing`)
and the file; views get each new state through `show_project` and the
numbers through `show_results` once a worker has computed them.  Views send
edits up as `ProjectEdited`; nothing below the app writes files.

    run_app(path) -> exit code       (0 after a normal quit, 2 if the file is invalid)
"""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual import on, work
from textual.app import App, ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.widgets import ContentSwitcher, Static
from textual.worker import get_current_worker

from .editing import EditError
from .tui.history import History
from .projectfile import Project, ProjectError, load_project, save_project
from .tui.commands import WorkbenchCommands, binding_entries
from .tui.compute import compute_results
from .tui.messages import ProjectEdited, ResultsReady, Status
from .tui.screens.confirm import ChoiceDialog
from .tui.screens.help import HelpScreen, binding_sections
from .tui.screens.path_prompt import PathDialog
from .tui.typed_keys import TypedAhead
from .tui.views import VIEWS, WorkbenchView
from .tui.widgets.key_footer import KeyFooter

CAUTION = ("Kinematic results alone do not make a machine safe: verify with the drive maker's data, "
           "forces, fatigue, guarding and a risk assessment under the machinery-safety rules that "
           "apply locally, and licensed engineering judgement.")


class ViewBar(Static):
    """The views by number; the one on view is shown reversed and in brackets."""


class FileLabel(Static):
    """Machine name, file name and whether there are unsaved changes."""


ERROR_NOTE_S = 10.0  # s a long reason stays up in full beside the one-line status


class StatusLine(Static):
    """The last thing that happened, or why something was refused."""


class Workbench(TypedAhead, App, inherit_bindings=False):
    """camwright's terminal workbench."""

    CSS_PATH = "app.tcss"
    TITLE = "camwright"
    COMMANDS = {WorkbenchCommands}  # every action of ours, once; not the toolkit's own (theme, quit again)
    AUTO_FOCUS = None

    BINDINGS = [
        Binding("ctrl+s", "save", "Save", tooltip="Save the project to its file", id="save"),
        Binding("f2", "save_as", "Save as", show=False, tooltip="Save the project under a new file name", id="save-as"),
        Binding("ctrl+o", "open", "Open", show=False,
                tooltip="Open a project file (the current one to reload it)", id="open"),
        Binding("ctrl+z,u", "undo", "Undo", tooltip="Take back the last edit", id="undo"),
        Binding("ctrl+y,U", "redo", "Redo", show=False, tooltip="Do again what was undone", id="redo"),
        Binding("f1,question_mark", "help", "Help", tooltip="Keys and what they do", id="help"),
        # no priority bindings (App's own are not inherited): quit and the palette act in their turn
        Binding("ctrl+q", "quit", "Quit", tooltip="Quit (asks first when there are unsaved changes)", id="quit"),
        Binding("ctrl+c", "help_quit", show=False, system=True),
        Binding("ctrl+p", "command_palette", "palette", show=False, tooltip="Every action, by name"),
        *[Binding(str(n), f"view('{cls.view_id}')", f"{cls.title} view", show=False,
                  tooltip=f"Show the {cls.title} view", id=f"view-{cls.view_id}")
          for n, cls in enumerate(VIEWS.values(), start=1)],
    ]

    def __init__(self, project: Project):
        super().__init__()
        self.history = History(project)
        self._on_disk: tuple[Path, str] | None = on_disk(project)
        """The file last read or written here and its text then (to notice a change by another)."""
        self.status_text = ""
        """The status line's text (what happened last, or why it was refused)."""
        self.results_for: Project | None = None
        """The project whose numbers are on screen."""
        self.results: dict = {}
        """The latest numbers (`AxisResult` by axis name), for views that come on screen."""

    @property
    def project(self) -> Project:
        return self.history.current

    # --- layout -------------------------------------------------------------

    def compose(self) -> ComposeResult:
        with Horizontal(id="top-bar"):
            yield ViewBar(id="view-bar")
            yield FileLabel(id="file-label")
        with ContentSwitcher(initial=next(iter(VIEWS)), id="views"):
            for cls in VIEWS.values():
                yield cls()
        yield StatusLine(id="status")
        yield KeyFooter(compact=True, show_command_palette=True)

    def on_mount(self) -> None:
        self._show_state()
        self.views[0].focus_first()
        self.set_status(f"opened {self._file_name()} — ? for keys, ctrl+p for every action")

    @property
    def views(self) -> list[WorkbenchView]:
        return list(self.query_one("#views", ContentSwitcher).query_children(WorkbenchView))

    @property
    def current_view(self) -> WorkbenchView:
        switcher = self.query_one("#views", ContentSwitcher)
        return switcher.query_one(f"#{switcher.current}", WorkbenchView)

    def _file_name(self) -> str:
        return self.project.path.name if self.project.path else "(not saved yet)"

    def _refresh_bars(self) -> None:
        current = self.query_one("#views", ContentSwitcher).current
        bar = Text()
        for n, cls in enumerate(VIEWS.values(), start=1):
            if cls.view_id == current:
                bar.append(f"[{n} {cls.title}]", style="reverse bold")
            else:
                bar.append(f" {n} {cls.title} ", style="dim")
        bar.append(" ")
        self.query_one(ViewBar).update(bar, layout=False)
        label = Text(no_wrap=True, overflow="ellipsis", justify="right")
        if self.history.modified:
            label.append("● unsaved ", style="bold yellow")
        label.append(self._file_name())
        name = self.project.machine.name
        if name:
            label.append(f" · {name}", style="bold")
        self.query_one(FileLabel).update(label, layout=False)

    def set_status(self, text: str, error: bool = False) -> None:
        self.status_text = ("✗ " if error else "") + text
        line = self.query_one(StatusLine)
        line.update(Text(self.status_text, style="bold red" if error else ""), layout=False)
        if error and len(self.status_text) > line.content_size.width > 0:
            # a reason cut off by the one-line status is shown whole for a while
            self.notify(text, title="Refused", severity="error", timeout=ERROR_NOTE_S)

    # --- state --------------------------------------------------------------

    def _show_state(self) -> None:
        """Send the current project down to the view on screen and start the numbers.

        Views off screen catch up when they are shown (`action_view`)."""
        project = self.project
        self.current_view.show_project(project)
        self._refresh_bars()
        self.recompute(project)

    @work(thread=True, exclusive=True, group="recompute", exit_on_error=False)
    def recompute(self, project: Project) -> None:
        """Numbers for `project` off the UI thread; a newer edit cancels an older run."""
        results = compute_results(project)
        if not get_current_worker().is_cancelled:
            self.post_message(ResultsReady(project, results))

    @on(ResultsReady)
    def _results_ready(self, message: ResultsReady) -> None:
        if message.project is not self.project:
            return  # an edit came after: its own results are on the way
        self.results_for = message.project
        self.results = message.results
        self.current_view.show_results(message.project, message.results)

    def apply_edit(self, project: Project, note: str) -> None:
        """Make `project` the current state at once (one undo step named `note`).  Views call this
        rather than post `ProjectEdited`, so a key typed right after the edit acts on it."""
        self.history.push(project, note)
        self.set_status(note)
        self._show_state()

    @on(ProjectEdited)
    def _edited(self, message: ProjectEdited) -> None:
        self.apply_edit(message.project, message.note)

    @on(Status)
    def _status(self, message: Status) -> None:
        self.set_status(message.text, message.error)

    def action_undo(self) -> None:
        try:
            note = self.history.undo()
        except EditError as exc:
            self.set_status(exc.message, error=True)
            return
        self.set_status(f"undid the edit “{note}”")
        self._show_state()

    def action_redo(self) -> None:
        try:
            note = self.history.redo()
        except EditError as exc:
            self.set_status(exc.message, error=True)
            return
        self.set_status(f"redid the edit “{note}”")
        self._show_state()

    # --- views --------------------------------------------------------------

    def action_view(self, view_id: str) -> None:
        self.screen.set_focus(None)
        self.query_one("#views", ContentSwitcher).current = view_id
        view = self.current_view
        view.show_project(self.project)
        if self.results_for is not None:
            view.show_results(self.results_for, self.results)
        self._refresh_bars()
        view.focus_first()

    # --- files --------------------------------------------------------------

    def _save_to(self, path: Path, then=None) -> bool:
        """Save to `path` and run `then` after; first ask when the file there has changed on disk
        since it was opened or saved here (another program, a pull), rather than overwrite it."""
        if not self._changed_on_disk(path):
            return self._write(path, then)

        def answered(word: str | None) -> None:
            if word == "overwrite":
                self._write(path, then)
            else:
                self.set_status(f"not saved: {path.name} on disk is as the other change left it")

        self.push_screen(ChoiceDialog(
            "Changed on disk", f"{path} has changed on disk since it was opened or saved here.",
            [("o", "overwrite", "overwrite it with this project")]), answered)
        return False

    def _write(self, path: Path, then=None) -> bool:
        try:
            save_project(self.project, path)
        except OSError as exc:
            self.set_status(f"could not save {path}: {exc.strerror or exc}", error=True)
            return False
        self.history.move_to(path)
        self.history.mark_saved()
        self._on_disk = (path, self.project.source_text)
        self.set_status(f"saved {path}")
        self._refresh_bars()
        if then is not None:
            then()
        return True

    def _changed_on_disk(self, path: Path) -> bool:
        """True when `path` is the file last read or written here and its text is not that now."""
        if self._on_disk is None or not same_file(path, self._on_disk[0]):
            return False
        try:
            return path.read_text(encoding="utf-8") != self._on_disk[1]
        except FileNotFoundError:
            return False  # gone: saving puts it back
        except (OSError, UnicodeDecodeError):
            return True

    def action_save(self, then=None) -> bool:
        if self.project.path is None:
            self.action_save_as()
            return False
        return self._save_to(self.project.path, then)

    def action_save_as(self) -> None:
        def attempt(path: Path) -> Path:
            if path.is_dir():
                raise EditError(f"{path} is a folder: give a file name")
            if not path.parent.exists():
                raise EditError(f"no folder {path.parent}")
            return path

        def done(path: Path | None) -> None:
            if path is None:
                return
            if path.exists() and not (self.project.path and same_file(path, self.project.path)):
                def answered(word: str | None) -> None:
                    if word == "overwrite":
                        self._save_to(path)
                    else:
                        self.set_status(f"not saved: {path} is left as it was")

                self.push_screen(ChoiceDialog("File exists", f"{path} exists already.",
                                              [("o", "overwrite", "overwrite it")]), answered)
                return
            self._save_to(path)

        current = str(self.project.path) if self.project.path else "project.toml"
        self.push_screen(PathDialog("Save as", current, attempt, "enter: save   esc: cancel"), done)

    def action_open(self) -> None:
        def attempt(path: Path) -> Project:
            try:
                return load_project(path)
            except ProjectError as exc:
                raise EditError(exc.message) from None

        def opened(project: Project | None) -> None:
            if project is None:
                return
            self.history = History(project)
            self._on_disk = on_disk(project)
            self.set_status(f"opened {project.path}")
            self._show_state()

        def ask() -> None:
            current = str(self.project.path) if self.project.path else ""
            self.push_screen(PathDialog("Open a project file", current, attempt,
                                        "enter: open (the current file: reload it)   esc: cancel"), opened)

        self._guard_unsaved("open a file (or reload this one)", ask)

    def _guard_unsaved(self, doing: str, then) -> None:
        """Run `then` now, or after asking what to do with unsaved changes."""
        if not self.history.modified:
            then()
            return

        def answered(word: str | None) -> None:
            if word == "save":
                self.action_save(then)
            elif word == "discard":
                then()

        self.push_screen(ChoiceDialog(
            "Unsaved changes", f"{self._file_name()} has unsaved changes. Before you {doing}:",
            [("s", "save", "save them"), ("d", "discard", "discard them")]), answered)

    async def action_quit(self) -> None:
        self._guard_unsaved("quit", self.exit)

    # --- help and palette -----------------------------------------------------

    def action_help(self) -> None:
        nodes = [(f"{view.title} view", view) for view in self.views]
        self.push_screen(HelpScreen(binding_sections(self, nodes), CAUTION))

    def command_entries(self):
        """(name, help, callback) for the palette: every action, view and axis."""
        entries = list(binding_entries(self, "", self))
        for view in self.views:
            entries += binding_entries(self, view.title, view,
                                       switch=lambda v=view.view_id: self.action_view(v))
        for axis in self.project.axes:
            entries.append((f"Axis: {axis.name}", f"Show axis {axis.name} in the Axes view",
                            lambda name=axis.name: self._show_axis(name)))
        return entries

    def _show_axis(self, name: str) -> None:
        self.action_view("axes")
        self.query_one("#axes").select_axis(name)


def on_disk(project: Project) -> tuple[Path, str] | None:
    """(file, text) of a project read from a file, to notice later whether another changed it."""
    if project.path is None or project.source_text is None:
        return None
    return project.path, project.source_text


def same_file(a: Path, b: Path) -> bool:
    """True when `a` and `b` name one file (relative or absolute, through links)."""
    try:
        return a.resolve() == b.resolve()
    except OSError:
        return a == b


def run_app(path) -> int:
    """Open the workbench on a project file; 2 (with one message) when the file is invalid."""
    import sys

    try:
        project = load_project(path)
    except ProjectError as exc:
        print(exc.message, file=sys.stderr)
        return 2
    Workbench(project).run()
    return 0
