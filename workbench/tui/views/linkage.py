"""The Linkage view: one linkage drawn to scale at a master angle, its outputs' peaks and plots.

The linkage follows its drivers' axes: every new project state (an edit in
the Axes view, an undo, an open) is studied again in a worker
(`linkage_data.study_entry`) — only when what the linkage depends on has
changed (its table, the machine speed, the axes its drivers follow) — so
the view always shows the edited project, not the file on disk.  A linkage
that stops (dead point) is drawn at the last solved angle; one that does
not assemble or is not driven is drawn as it stands, with the reason.

Keys: `,` `.` pick the linkage, `o` `O` the output, `p` the rate plotted
beside the position, `←` `→` step the master angle (shift: 1°), `home` back
to 0°, `w` to the worst spots in turn, `z` the drawing on the whole view,
`↑` `↓` scroll the figures when they do not fit.
"""

from __future__ import annotations

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.widgets import Static
from textual.worker import Worker, WorkerState, get_current_worker

from ...linkagefile import LinkageSpec, linkage_specs
from ...projectfile import Project
from ..format import degrees
from ..messages import Status
from ..widgets.cam_verdicts import show_text
from ..widgets.linkage_data import (
    FULL_TURN,
    STUDY_FAILED,
    LinkageEntry,
    entry_of,
    same_inputs,
    spots,
    study_entry,
)
from ..widgets.linkage_drawing import LinkageDrawing, legend
from ..widgets.linkage_layout import VIEW_CSS, arrange
from ..widgets.linkage_empty import no_linkage_text
from ..widgets.linkage_plots import LinkagePlot, output_plot
from ..widgets.linkage_readout import readout_text
from ..widgets.linkage_report import (
    BARS,
    LinkageReport,
    bar_text,
    side_rows,
    status_words,
    stop_text,
    table_width,
)
from . import register_view
from .base import WorkbenchView

LINKAGE_ACTIONS = {"step", "go", "worst", "cycle_linkage", "cycle_output", "next_rate", "scroll_side",
                   "zoom"}  # keys that need a linkage
COARSE_STEP = 5.0  # deg per ← →
FINE_STEP = 1.0  # deg per shift+← →
RATES = ("velocity", "acceleration", "jerk")
CACHE = 8  # studies kept (by what they depend on): stepping through linkages and undo cost no solve


class LinkageBar(Static):
    """Which linkage, its verdict and what it is made of, in one line."""

    DEFAULT_CSS = "LinkageBar { height: 1; padding: 0 1; }"


class LinkageView(WorkbenchView):
    view_id = "linkage"
    title = "Linkage"

    DEFAULT_CSS = VIEW_CSS

    BINDINGS = [
        Binding("right", f"step({COARSE_STEP:g})", f"+{COARSE_STEP:g}°", key_display="→", priority=True,
                tooltip=f"Master angle {COARSE_STEP:g}° on"),
        Binding("left", f"step({-COARSE_STEP:g})", f"-{COARSE_STEP:g}°", key_display="←", priority=True,
                tooltip=f"Master angle {COARSE_STEP:g}° back"),
        Binding("shift+right", f"step({FINE_STEP:g})", f"+{FINE_STEP:g}°", show=False, priority=True,
                tooltip=f"Master angle {FINE_STEP:g}° on"),
        Binding("shift+left", f"step({-FINE_STEP:g})", f"-{FINE_STEP:g}°", show=False, priority=True,
                tooltip=f"Master angle {FINE_STEP:g}° back"),
        Binding("home", "go(0)", "0°", show=False, priority=True, tooltip="Master angle back to 0°"),
        Binding("o", "cycle_output(1)", "Output", tooltip="Show the next output of the linkage"),
        Binding("O", "cycle_output(-1)", "Prev output", key_display="O", show=False,
                tooltip="Show the previous output"),
        Binding("p", "next_rate", "Plot", tooltip="Plot the next rate beside the position: velocity, "
                "acceleration, jerk"),
        Binding("z", "zoom", "Zoom", tooltip="The drawing takes the whole view, with the readout under it "
                "(again: back to the figures and plots)"),
        Binding("w", "worst", "Worst spot", tooltip="Go to where the linkage stops, then the output's peaks "
                "(the most used limit first) and its extremes, in turn"),
        Binding("down", "scroll_side(1)", "Scroll down", key_display="↓", show=False,
                tooltip="Scroll the figures beside the drawing (when they do not fit)"),
        Binding("up", "scroll_side(-1)", "Scroll up", key_display="↑", show=False,
                tooltip="Scroll the figures beside the drawing back"),
        Binding("comma", "cycle_linkage(-1)", "Prev linkage", key_display=",", show=False,
                tooltip="Show the previous linkage"),
        Binding("full_stop", "cycle_linkage(1)", "Next linkage", key_display=".", show=False,
                tooltip="Show the next linkage"),
    ]

    class Studied(Message):
        """The worker has studied linkage `name` of `project` (`inputs`: what the study depends on)."""

        def __init__(self, project: Project, name: str, inputs: tuple, entry: LinkageEntry) -> None:
            super().__init__()
            self.project, self.name, self.inputs, self.entry = project, name, inputs, entry

    def __init__(self) -> None:
        super().__init__()
        self.project: Project | None = None
        self.linkage_name: str | None = None
        """The linkage on view."""
        self.output_name: str | None = None
        """The output whose peaks and plots are on view."""
        self.entry: LinkageEntry | None = None
        """The study on view (for `linkage_name`; may be one edit behind while the worker runs)."""
        self.fresh = False
        """True when `entry` belongs to the project on view."""
        self.angle = 0.0
        """Master angle on view, deg (held at the last solved angle of a linkage that stops)."""
        self.rate = "velocity"
        """The rate plotted beside the position."""
        self.rate_chosen = False
        """True once the user picked the rate; until then the most used limit's rate is shown."""
        self.zoomed = False
        """True while the drawing takes the view (with the readout under it)."""
        self._cache: list[tuple[tuple, LinkageEntry]] = []
        self._spot = 0
        self._waiting: list = []
        """Actions asked for while the worker studies; they run when it is done."""

    def compose(self) -> ComposeResult:
        yield LinkageBar(id="lk-bar")
        with Horizontal(id="lk-top"):
            yield LinkageDrawing(id="lk-drawing")
            with VerticalScroll(id="lk-side", can_focus=False):
                with Vertical(id="lk-info"):
                    yield Static(id="lk-readout")
                    yield Static(id="lk-legend", classes="lk-legend")
                yield LinkageReport(id="lk-report")
                yield Static(id="lk-legend-last", classes="lk-legend")
        with Horizontal(id="lk-plots"):
            yield LinkagePlot(id="lk-position")
            yield LinkagePlot(id="lk-rate")
        with VerticalScroll(id="lk-empty"):
            yield Static(id="lk-empty-text")

    # --- state down ---------------------------------------------------------

    @property
    def specs(self) -> list[LinkageSpec]:
        return linkage_specs(self.project) if self.project is not None else []

    @property
    def spec(self) -> LinkageSpec | None:
        return next((s for s in self.specs if s.name == self.linkage_name), None)

    def show_project(self, project: Project) -> None:
        if project is self.project:
            return
        self.project = project
        names = [s.name for s in self.specs]
        if self.linkage_name not in names:
            self.linkage_name = names[0] if names else None
        self._pick_output()
        self._layout_mode()
        self._request()

    def _pick_output(self) -> None:
        spec = self.spec
        names = [o.name for o in spec.outputs] if spec is not None else []
        if self.output_name not in names:
            self.output_name = names[0] if names else None

    def _request(self) -> None:
        """Show the study of the linkage on view: from the cache, or start the worker for it."""
        spec = self.spec
        if spec is None:
            self.entry, self.fresh = None, False
            self._refresh_all()
            return
        inputs = same_inputs(self.project, spec)
        cached = next((e for k, e in self._cache if k == inputs), None)
        if cached is not None:
            self._take(cached)
            return
        self.fresh = False
        if self.entry is not None and self.entry.spec != spec:
            self.entry = None  # another linkage's drawing (or outputs) would mislead; an axis edit keeps it
        self._refresh_all()
        self.study(self.project, spec.name, inputs)

    @work(thread=True, exclusive=True, group="linkage-view", exit_on_error=False)
    def study(self, project: Project, name: str, inputs: tuple) -> None:
        """Study one linkage of `project` off the UI thread; a newer request cancels an older one."""
        spec = next(s for s in linkage_specs(project) if s.name == name)
        entry = study_entry(project, spec)
        if not get_current_worker().is_cancelled:
            self.post_message(self.Studied(project, name, inputs, entry))

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        """A study that fails unexpectedly is said on screen, not left "computing" for ever."""
        worker = event.worker
        if worker.group != "linkage-view" or event.state != WorkerState.ERROR or self.spec is None:
            return
        problem = f"{STUDY_FAILED} ({type(worker.error).__name__}: {worker.error})"
        self.post_message(Status(problem, error=True))
        self._take(entry_of(self.project, self.spec, None, problem))

    @on(Studied)
    def _studied(self, message: Studied) -> None:
        self._cache = [(k, e) for k, e in self._cache if k != message.inputs][-(CACHE - 1):]
        self._cache.append((message.inputs, message.entry))
        if message.project is not self.project or message.name != self.linkage_name:
            return  # a newer state or another linkage is on its way
        self._take(message.entry)

    def _take(self, entry: LinkageEntry) -> None:
        before = self.entry if self.entry is not None and self.entry.name == entry.name else None
        self.entry, self.fresh = entry, True
        if entry.runs and not entry.solved:  # stops part way: show where, the first time it does
            if before is None or before.solved or self.angle > entry.last:
                self.angle = entry.last
                self.post_message(Status(f"linkage {entry.name} stops at master {stop_text(entry.last)}: "
                                         "drawn there; ← steps back", error=True))
        self._choose_rate()
        self._refresh_all()
        waiting, self._waiting = self._waiting, []
        for action in waiting:
            action()

    def _choose_rate(self) -> None:
        """Until the user picks, plot the rate whose limit is most used."""
        study = self.entry.output_study(self.output_name) if self.entry and self.output_name else None
        if self.rate_chosen or study is None or not study.checks:
            return
        self.rate = max(study.checks, key=lambda c: c.used).quantity

    def _when_studied(self, action) -> bool:
        """True to go on now; False while the linkage is being studied (`action` runs then)."""
        if self.fresh or self.spec is None:
            return True
        self._waiting.append(action)
        return False

    # --- layout -------------------------------------------------------------

    def _layout_mode(self) -> None:
        has = bool(self.specs)
        for name in ("#lk-bar", "#lk-top"):
            self.query_one(name).display = has
        self.query_one("#lk-plots").display = self._plots_shown()
        self.query_one("#lk-empty").display = not has
        if not has:
            self.query_one("#lk-empty-text", Static).update(no_linkage_text(self.project, self.size.width))
        self.call_after_refresh(self._size_parts)
        self.refresh_bindings()

    def _plots_shown(self) -> bool:
        """Plots while there is something to plot (or it is being computed), and not zoomed."""
        entry = self.entry
        something = entry is None or (entry.runs and bool(entry.traces))
        return bool(self.specs) and not self.zoomed and something

    def on_resize(self) -> None:
        self._size_parts()
        self._refresh_bar()
        if not self.specs:
            self.query_one("#lk-empty-text", Static).update(no_linkage_text(self.project, self.size.width))

    def _size_parts(self) -> None:
        """Lay the parts out for the view's size (`linkage_layout.arrange`); zoomed, the drawing
        takes all but the readout."""
        w, h = self.size
        if h == 0:
            return
        top, side, drawing = self.query_one("#lk-top"), self.query_one("#lk-side"), self.query_one(LinkageDrawing)
        if self.zoomed:
            top.set_class(False, "-above")
            side.styles.height = "auto"
            drawing.styles.width = "100%"
            return
        outputs = [o.name for o in self.spec.outputs] if self.spec is not None else []
        outputs = outputs or [None]  # the widest table of any output: the drawing keeps its size as `o` steps
        extent = (1.0, 1.0)
        if self.entry is not None:
            x0, x1, y0, y1 = self.entry.bounds
            extent = (x1 - x0, y1 - y0)
        plan = arrange(w, h, extent, max(table_width(self.entry, o) for o in outputs),
                       max(table_width(self.entry, o, BARS) for o in outputs),
                       max(side_rows(self.entry, o) for o in outputs), self._plots_shown())
        self.query_one("#lk-plots").styles.height = max(plan.plot_rows, 1)
        top.set_class(plan.above, "-above")
        side.styles.height = plan.side_rows if plan.above else "1fr"
        drawing.styles.width = "100%" if plan.above else plan.drawing_width

    # --- painting -------------------------------------------------------------

    def _refresh_all(self) -> None:
        entry = self.entry
        self.query_one("#lk-plots").display = self._plots_shown()
        self._refresh_bar()
        self.query_one(LinkageReport).show(entry, self.output_name)
        for shown in self.query(".lk-legend").results(Static):
            shown.update(legend(entry))
        for plot_id, quantity in (("#lk-position", "position"), ("#lk-rate", self.rate)):
            plot = self.query_one(plot_id, LinkagePlot)
            spec = output_plot(entry, self.output_name, quantity) if entry and self.output_name else None
            plot.show_spec(spec, self.angle if entry is not None and entry.runs else None)
        self._size_parts()
        self._refresh_angle()

    def _refresh_angle(self) -> None:
        self.query_one(LinkageDrawing).show(self.entry, self.angle)
        show_text(self.query_one("#lk-readout", Static), readout_text(self.entry, self.output_name, self.angle))


    def _refresh_bar(self) -> None:
        entry = self.entry if self.fresh else None
        text = bar_text([s.name for s in self.specs], self.spec, entry, self.project, self.size.width - 2)
        self.query_one(LinkageBar).update(text, layout=False)

    def focus_first(self) -> None:
        if self.specs:
            self.query_one(LinkageDrawing).focus()
        else:
            self.query_one("#lk-empty").focus()

    # --- keys ---------------------------------------------------------------

    def check_action(self, action: str, parameters) -> bool | None:
        """Linkage keys only where there is a linkage (the footer then leaves them out)."""
        if action in LINKAGE_ACTIONS and not self.specs:
            return False
        return True

    def action_step(self, step: float) -> None:
        entry = self.entry
        if entry is not None and not entry.runs:
            self.post_message(Status(f"linkage {entry.name} does not move: {status_words(entry)[0]}", error=True))
            return
        if entry is not None and entry.runs and not entry.solved:  # a linkage that stops: no wrap past its ends
            target = self.angle + step
            if target > entry.last:
                self.post_message(Status(f"linkage {entry.name} stops at master {stop_text(entry.last)}: "
                                         "it cannot be stepped past that", error=True))
            self.action_go(min(max(target, 0.0), entry.last))
            return
        self.action_go(self.angle + step)

    def action_go(self, angle_deg: float) -> None:
        angle = round(float(angle_deg) % FULL_TURN, 6) % FULL_TURN
        entry = self.entry
        if entry is not None and entry.runs and not entry.solved:
            angle = entry.reachable(float(angle_deg))
        self.angle = angle
        if entry is not None and entry.runs:
            for plot in self.query(LinkagePlot):
                plot.set_cursor(self.angle)
        self._refresh_angle()

    def action_zoom(self) -> None:
        self.zoomed = not self.zoomed
        self.set_class(self.zoomed, "-zoom")
        self.query_one("#lk-plots").display = self._plots_shown()
        self._size_parts()
        self.query_one(LinkageDrawing).refresh()
        if not self.zoomed:
            self.call_after_refresh(self._refresh_all)  # the plots were hidden: draw them at their size
        self.post_message(Status("drawing on the whole view (z: back)" if self.zoomed else "figures and plots back"))

    def action_scroll_side(self, rows: int) -> None:
        side = self.query_one("#lk-side", VerticalScroll)
        side.scroll_to(y=side.scroll_y + rows, animate=False)

    def action_cycle_linkage(self, step: int) -> None:
        names = [s.name for s in self.specs]
        if not names:
            return
        i = names.index(self.linkage_name) if self.linkage_name in names else 0
        self.select_linkage(names[(i + step) % len(names)])

    def select_linkage(self, name: str) -> None:
        self.linkage_name = name
        self.output_name = None
        self._pick_output()
        self._spot = 0
        self._request()

    def action_cycle_output(self, step: int) -> None:
        spec = self.spec
        names = [o.name for o in spec.outputs] if spec is not None else []
        if not names:
            self.post_message(Status("this linkage has no outputs: add a [[linkage.output]]", error=True))
            return
        i = names.index(self.output_name) if self.output_name in names else 0
        self.output_name = names[(i + step) % len(names)]
        self._spot = 0
        self._choose_rate()
        self._refresh_all()

    def action_next_rate(self) -> None:
        self.rate_chosen = True
        self.rate = RATES[(RATES.index(self.rate) + 1) % len(RATES)]
        self._refresh_all()
        self.post_message(Status(f"plot: {self.rate} beside the position (p: next)"))

    def action_worst(self) -> None:
        if not self._when_studied(self.action_worst):
            return
        found = spots(self.entry, self.output_name) if self.entry is not None else []
        if not found:
            self.post_message(Status("nothing to go to: the linkage does not move", error=True))
            return
        what, at = found[self._spot % len(found)]
        self._spot += 1
        self.action_go(at)
        who = f"{self.output_name}: " if self.output_name and what != "where it stops" else ""
        self.post_message(Status(f"linkage {self.linkage_name}: {who}{what} at {degrees(round(at, 1))} (w: next spot)"))


register_view(LinkageView)
