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

This module holds the view's state, layout and painting; its keys are in
`linkage_keys` and the way it gets its studies (cache and worker) in
`linkage_studies`, both mixed into `LinkageView`.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Static

from ...linkagefile import LinkageSpec, linkage_specs
from ...projectfile import Project
from ..widgets.cam_verdicts import show_text
from ..widgets.linkage_data import LinkageEntry
from ..widgets.linkage_drawing import LinkageDrawing, legend
from ..widgets.linkage_empty import no_linkage_text
from ..widgets.linkage_layout import VIEW_CSS, arrange
from ..widgets.linkage_plots import LinkagePlot, output_plot
from ..widgets.linkage_readout import readout_text
from ..widgets.linkage_report import BARS, LinkageReport, bar_text, side_rows, table_width
from ..widgets.view_scroll import ViewScroll
from . import register_view
from .base import WorkbenchView
from .linkage_keys import LINKAGE_BINDINGS, LinkageKeys
from .linkage_studies import LinkageStudies


class LinkageBar(Static):
    """Which linkage, its verdict and what it is made of, in one line."""

    DEFAULT_CSS = "LinkageBar { height: 1; padding: 0 1; }"


class LinkageView(LinkageKeys, LinkageStudies, WorkbenchView):
    view_id = "linkage"
    title = "Linkage"

    DEFAULT_CSS = VIEW_CSS

    BINDINGS = LINKAGE_BINDINGS

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
            with ViewScroll(id="lk-side", can_focus=False):
                with Vertical(id="lk-info"):
                    yield Static(id="lk-readout")
                    yield Static(id="lk-legend", classes="lk-legend")
                yield LinkageReport(id="lk-report")
                yield Static(id="lk-legend-last", classes="lk-legend")
        with Horizontal(id="lk-plots"):
            yield LinkagePlot(id="lk-position")
            yield LinkagePlot(id="lk-rate")
        with ViewScroll(id="lk-empty"):
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
            self.screen.set_focus(self.query_one(LinkageDrawing))  # now: the next key finds it
        else:
            self.screen.set_focus(self.query_one("#lk-empty"))


register_view(LinkageView)
