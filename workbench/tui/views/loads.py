"""The Loads view: what loads the drive over the cycle, with figures and the caution that goes with them.

Each registered loads source (`widgets.loads_data`) gives items: the
spring-closed cam followers (`[cam.loads]`, `widgets.loads_cam`) — contact
force and camshaft torque against cam angle — and the linkage drivers
(`[linkage.loads]`, `widgets.loads_linkage`) — drive torque or force and
speed against master angle.  A cam turns once per machine cycle, so its cam
angle is the master angle; the cursor readout names the one the item is
plotted against (`abscissa`).  An item with nothing to plot (a linkage
without loads, a part that cannot be computed now) shows its words alone.
Items are computed in a worker from the project as edited.  Keys: `,` `.`
pick the item, `←` `→` move the cursor.
"""

from __future__ import annotations

import importlib
import importlib.util

from rich.table import Table
from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Static
from textual.worker import get_current_worker

from ...projectfile import Project
from ..format import OK_STYLE, OVER_STYLE, WARN_STYLE, degrees
from ..widgets import loads_data
from ..widgets.cam_plots import AnglePlot
from ..widgets.cam_verdicts import show_text
from ..widgets.loads_data import LoadsItem, collect_loads, unshown_parts
from ..widgets.view_scroll import ViewScroll
from . import register_view
from .base import WorkbenchView

for _name in loads_data.SOURCE_MODULES:  # each registers its source on import
    if importlib.util.find_spec(f"{loads_data.__package__}.{_name}") is not None:
        importlib.import_module(f"{loads_data.__package__}.{_name}")

COARSE_STEP = 5.0  # deg per ← →
FINE_STEP = 1.0  # deg per shift+← →
MIN_PLOT_ROWS = 7  # least rows of the plots; they take what the figures leave
PLOT_SHARE = 0.6  # but no more than this share of the view
BODY_ROWS = 12  # rows the figures and notes need before an item is known
CAUTION_ROWS = 3  # the rigid-body caution at 80 columns
CAM_ANGLE_KINDS = ("cam follower",)  # item kinds plotted against their cam's angle
MASTER_ANGLE = "master angle"  # what every other item is plotted against

LOADS_EXAMPLE = """\
[cam.loads]                    # under a [[cam]]: a spring-closed follower
follower_mass = 2.4            # kg
spring_rate = 8.0              # N/mm
preload = 180.0                # N, on the base circle
margin = 50.0                  # N, least contact force wanted"""


def abscissa(item: LoadsItem) -> str:
    """What an item's plots and readout run against: "cam angle" for a cam follower (the cam
    turns once per cycle, so it is the master angle by another name), else "master angle"."""
    return "cam angle" if item.kind in CAM_ANGLE_KINDS else MASTER_ANGLE


def plotted(item: LoadsItem | None) -> bool:
    """True when the item has curves (and so a cursor); an item of words only has none."""
    return item is not None and bool(item.plots)


class LoadsBar(Static):
    """Which item, what it is, and its verdict, in one line."""

    DEFAULT_CSS = "LoadsBar { height: 1; padding: 0 1; }"


class FigureTable(Static):
    """The figures of one item; `rows` keeps them as shown, for tests."""

    DEFAULT_CSS = "FigureTable { height: auto; }"

    def __init__(self, **kwargs):
        super().__init__("", **kwargs)
        self.rows: dict[str, dict] = {}
        """Per figure ("what"): value, at, verdict as shown."""

    def show(self, item: LoadsItem | None) -> None:
        self.rows = {}
        if item is None:
            self.update("")
            return
        table = Table(box=None, padding=(0, 1, 0, 0), show_edge=False, expand=False, header_style="bold")
        table.add_column("loads")
        table.add_column("value", justify="right", no_wrap=True)
        table.add_column("at", justify="right", no_wrap=True)
        table.add_column("verdict")
        for f in item.figures:
            style = "" if f.ok is None else (OK_STYLE if f.ok else OVER_STYLE)
            table.add_row(f.what, f.value, f.at, Text(f.verdict, style=style))
            self.rows[f.what] = {"value": f.value, "at": f.at, "verdict": f.verdict}
        self.update(table)


def pending_lines(project: Project | None) -> list[Text]:
    """One line per part whose loads are not shown here yet (a linkage before its source exists)."""
    if project is None:
        return []
    return [Text(f"! This project has {n} [[{key}]] table{'s' if n > 1 else ''}: {what} is not shown "
                 "in this view yet.", style=WARN_STYLE) for key, n, what in unshown_parts(project)]


def nothing_text(project: Project | None) -> Text:
    """What to say when there are no loads to show, and how to get some."""
    text = Text()
    text.append("No loads to show for this project.\n\n", style="bold")
    for line in pending_lines(project):
        text.append_text(line)
        text.append("\n\n")
    text.append("A spring-closed cam follower gets its contact force, jump speed, spring preload and "
                "camshaft torque here when its [[cam]] table has a [cam.loads] table, for example:\n\n")
    text.append(LOADS_EXAMPLE + "\n\n", style="cyan")
    text.append("A linkage's driver gets its drive torque or force, with a servo's limits, and every "
                "joint's reaction, when its [[linkage]] table has a [linkage.loads] table with the "
                "bodies' masses (see presets/slider-crank.toml).\n\n")
    text.append("Then open the file again (ctrl+o). The README's Cams and Linkage loads sections list "
                "every key.", style="dim")
    return text


class LoadsView(WorkbenchView):
    view_id = "loads"
    title = "Loads"

    DEFAULT_CSS = """
    LoadsView { layout: vertical; }
    #loads-plots { height: 9; }
    #loads-plots AnglePlot { width: 1fr; }
    #loads-body { height: 1fr; padding: 0 1; scrollbar-size-vertical: 1; }
    #loads-body:focus { background: $boost; }
    #loads-caution, #loads-readout, #loads-notes, #loads-pending { height: auto; }
    #loads-notes.-words { padding-top: 1; }
    #loads-empty { padding: 1 2; display: none; }
    """

    BINDINGS = [
        Binding("right", f"step({COARSE_STEP:g})", f"+{COARSE_STEP:g}°", key_display="→",
                tooltip=f"Cursor {COARSE_STEP:g}° later in the cycle"),
        Binding("left", f"step({-COARSE_STEP:g})", f"-{COARSE_STEP:g}°", key_display="←",
                tooltip=f"Cursor {COARSE_STEP:g}° earlier in the cycle"),
        Binding("shift+right", f"step({FINE_STEP:g})", f"+{FINE_STEP:g}°", show=False,
                tooltip=f"Cursor {FINE_STEP:g}° later"),
        Binding("shift+left", f"step({-FINE_STEP:g})", f"-{FINE_STEP:g}°", show=False,
                tooltip=f"Cursor {FINE_STEP:g}° earlier"),
        Binding("home", "go(0)", "0°", show=False, tooltip="Cursor back to 0° of the cycle"),
        Binding("comma", "cycle(-1)", "Prev", key_display=",", show=False, tooltip="Show the previous loaded part"),
        Binding("full_stop", "cycle(1)", "Next", key_display=".", show=False, tooltip="Show the next loaded part"),
    ]

    class Computed(Message):
        """The worker has the loads of `project`."""

        def __init__(self, project: Project, items: list[LoadsItem]) -> None:
            super().__init__()
            self.project = project
            self.items = items

        def can_replace(self, message: Message) -> bool:
            return isinstance(message, LoadsView.Computed)

    def __init__(self) -> None:
        super().__init__()
        self.project: Project | None = None
        self.items: list[LoadsItem] = []
        """The items as last computed."""
        self.items_for: Project | None = None
        """The project the items belong to (one edit behind while the worker runs)."""
        self.item_name: str | None = None
        """The item on view."""
        self.angle = 0.0
        """Cursor angle, deg (the item's `abscissa`: master angle, or cam angle for a cam)."""
        self._pending_cycle = 0

    def compose(self) -> ComposeResult:
        yield LoadsBar(id="loads-bar")
        with Horizontal(id="loads-plots"):
            yield AnglePlot(id="loads-contact")
            yield AnglePlot(id="loads-torque")
        with ViewScroll(id="loads-body"):
            yield FigureTable(id="loads-figures")
            yield Static(id="loads-caution")
            yield Static(id="loads-readout")
            yield Static(id="loads-notes")
            yield Static(id="loads-pending")
        with ViewScroll(id="loads-empty"):
            yield Static(id="loads-empty-text")

    # --- state down ---------------------------------------------------------

    def show_project(self, project: Project) -> None:
        if project is self.project:
            return
        self.project = project
        self._refresh_bar()
        self.compute(project)

    @work(thread=True, exclusive=True, group="loads-view", exit_on_error=False)
    def compute(self, project: Project) -> None:
        """The loads of `project` off the UI thread; a newer state cancels an older run."""
        items = collect_loads(project)
        if not get_current_worker().is_cancelled:
            self.post_message(self.Computed(project, items))

    @on(Computed)
    def _computed(self, message: Computed) -> None:
        if message.project is not self.project:
            return
        self.items, self.items_for = message.items, message.project
        names = [i.name for i in self.items]
        if self.item_name not in names:
            self.item_name = names[0] if names else None
        self._refresh_all()
        if self._pending_cycle:
            step, self._pending_cycle = self._pending_cycle, 0
            self.action_cycle(step)

    @property
    def item(self) -> LoadsItem | None:
        return next((i for i in self.items if i.name == self.item_name), None)

    def on_resize(self) -> None:
        self._size_plots()
        self._refresh_bar()

    def _size_plots(self) -> None:
        """The plots get what the figures and notes leave (at least `MIN_PLOT_ROWS`, at most `PLOT_SHARE`)."""
        h = self.size.height
        if not h:
            return
        item = self.item
        if item is not None and not item.plots:
            return  # the strip is hidden: the words take the view
        body = BODY_ROWS if item is None else len(item.figures) + 1 + CAUTION_ROWS + 1 + len(item.notes)
        body += len(unshown_parts(self.project)) if self.project is not None else 0
        rows = min(h - 1 - body, int(h * PLOT_SHARE))
        self.query_one("#loads-plots").styles.height = max(MIN_PLOT_ROWS, rows)

    def _refresh_all(self) -> None:
        has = bool(self.items)
        item = self.item
        for name in ("#loads-bar", "#loads-body"):
            self.query_one(name).display = has
        self.query_one("#loads-plots").display = plotted(item)  # no empty strip beside words alone
        self.query_one("#loads-empty").display = not has
        self.refresh_bindings()
        if not has:
            self.query_one("#loads-empty-text", Static).update(nothing_text(self.project))
        self.query_one(FigureTable).display = item is not None and bool(item.figures)
        self._refresh_bar()
        self._size_plots()
        plots = list(self.query(AnglePlot))
        for k, plot in enumerate(plots):
            spec = item.plots[k] if item is not None and k < len(item.plots) else None
            plot.display = spec is not None
            plot.show_spec(spec, self.angle)
        self.query_one(FigureTable).show(item)
        caution = Text(f"! {item.caution}", style=WARN_STYLE) if item is not None and item.caution else Text("")
        box = self.query_one("#loads-caution", Static)
        box.update(caution)
        box.display = bool(caution.plain)
        words_only = item is not None and not item.plots and not item.figures  # the notes are the message
        notes = Text("\n".join(item.notes) if item is not None else "", style="" if words_only else "dim")
        box = self.query_one("#loads-notes", Static)
        box.update(notes)
        box.set_class(words_only, "-words")
        pending = pending_lines(self.project)
        box = self.query_one("#loads-pending", Static)
        box.update(Text("\n").join(pending))
        box.display = bool(pending)
        self._refresh_readout()

    def _refresh_readout(self) -> None:
        item = self.item
        text = Text()
        if plotted(item) and item.readout is not None:
            text.append(f"at {abscissa(item)} {degrees(self.angle)}", style="bold")
            text.append(" (← →): ", style="dim")
            text.append(item.readout(self.angle))
        box = self.query_one("#loads-readout", Static)
        box.display = bool(text.plain)
        show_text(box, text)

    def _refresh_bar(self) -> None:
        bar = self.query_one(LoadsBar)
        names = [i.name for i in self.items]
        item = self.item
        if item is None:
            bar.update(Text("(computing…)", style="dim") if self.items_for is not self.project else "")
            return
        text = Text(no_wrap=True, overflow="ellipsis")
        text.append("loads of ", style="dim")
        text.append(f"◂ {item.name} ▸", style="bold")
        text.append(f" {names.index(item.name) + 1}/{len(names)}", style="dim")
        text.append(" (, .)" if len(names) > 1 else "", style="dim")
        text.append("  ")
        style = "" if item.ok is None else (OK_STYLE if item.ok else OVER_STYLE)
        text.append(item.verdict, style=style)
        if self.items_for is not self.project:
            text.append("  (computing…)", style="dim")
        room = self.size.width - 2 - len(text.plain)
        for piece in item.about:  # as many as fit whole
            if len(piece) + 3 > room:
                break
            text.append(" · ", style="dim")
            text.append(piece, style="dim")
            room -= len(piece) + 3
        bar.update(text, layout=False)

    def focus_first(self) -> None:
        self.screen.set_focus(self.query_one("#loads-body"))  # now: the next key finds it

    # --- keys ---------------------------------------------------------------

    def check_action(self, action: str, parameters) -> bool | None:
        """Cursor and picker keys only while there is something to show (or on its way)."""
        if action in ("step", "go"):  # typed ahead of the items, a step moves where they will show
            return plotted(self.item) or self.items_for is not self.project
        if action == "cycle":
            return bool(self.items) or self.items_for is not self.project
        return True

    def action_step(self, step: float) -> None:
        self.action_go(self.angle + step)

    def action_go(self, angle: float) -> None:
        self.angle = round(float(angle) % 360.0, 6) % 360.0
        for plot in self.query(AnglePlot):
            plot.set_cursor(self.angle)
        self._refresh_readout()

    def action_cycle(self, step: int) -> None:
        if self.items_for is not self.project:  # still computing: the step applies when the items come
            self._pending_cycle += step
            return
        names = [i.name for i in self.items]
        if not names:
            return
        i = names.index(self.item_name) if self.item_name in names else 0
        self.select_item(names[(i + step) % len(names)])

    def select_item(self, name: str) -> None:
        self.item_name = name
        self._refresh_all()


register_view(LoadsView)

