"""The Linkage view's keys: stepping the cycle, picking linkage, output and rate, zoom, worst spots.

`LINKAGE_BINDINGS` are the view's bindings and `LinkageKeys` their actions,
mixed into `LinkageView` (which gives the state they act on: `project`,
`spec`/`specs`, `entry`, `angle`, `output_name`, `rate`, `zoomed`, and the
painting and layout methods they call).  A key that needs a linkage is left
out of the footer where there is none (`check_action`).
"""

from __future__ import annotations

from textual.binding import Binding
from textual.containers import VerticalScroll

from ..format import degrees
from ..messages import Status
from ..widgets.linkage_data import FULL_TURN, spots
from ..widgets.linkage_drawing import LinkageDrawing
from ..widgets.linkage_plots import LinkagePlot
from ..widgets.linkage_report import status_words, stop_text

LINKAGE_ACTIONS = {"step", "go", "worst", "cycle_linkage", "cycle_output", "next_rate", "scroll_side",
                   "zoom"}  # keys that need a linkage
COARSE_STEP = 5.0  # deg per ← →
FINE_STEP = 1.0  # deg per shift+← →
RATES = ("velocity", "acceleration", "jerk")

LINKAGE_BINDINGS = [
    Binding("right", f"step({COARSE_STEP:g})", f"+{COARSE_STEP:g}°", key_display="→",
            tooltip=f"Master angle {COARSE_STEP:g}° on"),
    Binding("left", f"step({-COARSE_STEP:g})", f"-{COARSE_STEP:g}°", key_display="←",
            tooltip=f"Master angle {COARSE_STEP:g}° back"),
    Binding("shift+right", f"step({FINE_STEP:g})", f"+{FINE_STEP:g}°", show=False,
            tooltip=f"Master angle {FINE_STEP:g}° on"),
    Binding("shift+left", f"step({-FINE_STEP:g})", f"-{FINE_STEP:g}°", show=False,
            tooltip=f"Master angle {FINE_STEP:g}° back"),
    Binding("home", "go(0)", "0°", show=False, tooltip="Master angle back to 0°"),
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


class LinkageKeys:
    """The actions of `LINKAGE_BINDINGS` (a mixin of `LinkageView`)."""

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
