"""The Cam view: one cam drawn to scale at a cam angle, its checks, pressure angle and curvature.

The cam follows its axis: every new project state (an edit in the Axes
view, an undo, an open) is studied again in a worker (`cam_data.study_cams`),
so the view always shows the edited project, not the file on disk.  Keys:
`,` `.` pick the cam, `←` `→` turn it (shift: 1°), `home` back to 0°, `w`
to the worst spots in turn, `e` export the profile with the writer of
`camwright profile`, `s` change the follower's sizes (`cam_sizes`), `t`
reverse the turning and `L` change the limits (`cam_edits`).
"""

from __future__ import annotations

import math

from rich.text import Text
from textual import events, on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Static
from textual.worker import get_current_worker

from ...axisreport import fmt
from ...camfile import cam_specs
from ...projectfile import Project
from ..format import OK_STYLE, OVER_STYLE, degrees
from ..messages import Status
from ..widgets.cam_data import CamEntry, readout, study_cams
from ..widgets.cam_drawing import CELL_ASPECT, CamDrawing, legend
from ..widgets.cam_empty import no_cam_text
from ..widgets.cam_export import start_export
from ..widgets.cam_plots import AnglePlot, pressure_angle_plot, radius_plot
from ..widgets.cam_verdicts import CamVerdicts, angle, show_text
from ..widgets.view_scroll import ViewScroll
from . import register_view
from .cam_edits import reverse_turning, start_limits_edit, turning_text
from .cam_sizes import sizes_text, start_size_edit
from .base import WorkbenchView

CAM_ACTIONS = {"step", "go", "worst", "export", "cycle_cam", "sizes", "turning", "limits"}  # keys that need a cam
COARSE_STEP = 5.0  # deg per ← →
FINE_STEP = 1.0  # deg per shift+← →
PLOT_ROWS = (7, 13)  # least and most rows for the plots; a third of the view between them
DRAWING_SHARE = 0.45  # the drawing takes at most this share of the width
MIN_DRAWING = 20  # columns
SIDE_WIDTH = 60  # columns the checks table needs beside the drawing
WIDE_SIDE_WIDTH = 78  # columns it needs with the share-of-limit bars
WIDE_DRAWING = 40  # the drawing gives way to the bars only while it keeps this many columns
STRAIGHT = 1e6  # mm: a radius beyond this is shown as straight
BAR_PRIORITY = (1, 2, 0, 3)  # the bar's pieces (follower, axis, turning, base circle) by the room they get
LIFT_AT_REST = 1e-9  # |ds/dθ| below this (axis unit per rad) counts as at rest


class CamBar(Static):
    """Which cam, its follower and axis, and its verdict, in one line."""

    DEFAULT_CSS = "CamBar { height: 1; padding: 0 1; }"


class CamView(WorkbenchView):
    view_id = "cam"
    title = "Cam"

    DEFAULT_CSS = """
    CamView { layout: vertical; }
    #cam-top { height: 1fr; }
    #cam-drawing { width: 30; height: 100%; }
    #cam-drawing:focus { background: $boost; }
    #cam-side { width: 1fr; padding: 0 0 0 1; scrollbar-size-vertical: 1; }
    #cam-readout { height: auto; }
    #cam-legend, #cam-sizes { height: auto; }
    #cam-plots { height: 9; }
    #cam-plots AnglePlot { width: 1fr; }
    #cam-empty { padding: 1 2; }
    """

    # The view runs these as each key passes it, in the order typed (`WorkbenchView.on_key`); keys
    # typed right after one that opens a dialog go to the dialog (`screens.typed_ahead`).
    BINDINGS = [
        Binding("right", f"step({COARSE_STEP:g})", f"+{COARSE_STEP:g}°", key_display="→",
                tooltip=f"Turn the cam {COARSE_STEP:g}° on"),
        Binding("left", f"step({-COARSE_STEP:g})", f"-{COARSE_STEP:g}°", key_display="←",
                tooltip=f"Turn the cam {COARSE_STEP:g}° back"),
        Binding("shift+right", f"step({FINE_STEP:g})", f"+{FINE_STEP:g}°", show=False,
                tooltip=f"Turn the cam {FINE_STEP:g}° on"),
        Binding("shift+left", f"step({-FINE_STEP:g})", f"-{FINE_STEP:g}°", show=False,
                tooltip=f"Turn the cam {FINE_STEP:g}° back"),
        Binding("home", "go(0)", "0°", show=False, tooltip="Cam angle back to 0°"),
        Binding("w", "worst", "Worst spot", tooltip="Turn to the largest pressure angle, the least radius, "
                "then any undercut, cusp or corner, in turn"),
        Binding("s", "sizes", "Sizes", tooltip="Change a size of the follower: prime or base circle, roller, "
                "offset, face, arm (refused with the reason where the cam cannot take it)", id="cam-sizes"),
        Binding("t", "turning", "Reverse", show=False, tooltip="Reverse the cam's turning (cw ↔ ccw); a translating "
                "follower's offset keeps to the side that eases the rise, so its cam is mirrored", id="cam-turning"),
        Binding("L", "limits", "Limits", key_display="L", show=False, tooltip="Change the cam's limits: "
                "pressure angle, curvature ratio, least profile radius (blank: common practice)", id="cam-limits"),
        Binding("e", "export", "Export", tooltip="Write the profile as CSV, DXF or SVG (the writer of "
                "camwright profile)", id="cam-export"),
        Binding("comma", "cycle_cam(-1)", "Prev cam", key_display=",", show=False, tooltip="Show the previous cam"),
        Binding("full_stop", "cycle_cam(1)", "Next cam", key_display=".", show=False, tooltip="Show the next cam"),
    ]

    class Studied(Message):
        """The worker has studied every cam of `project`."""

        def __init__(self, project: Project, entries: list[CamEntry]) -> None:
            super().__init__()
            self.project = project
            self.entries = entries

        def can_replace(self, message: Message) -> bool:
            return isinstance(message, CamView.Studied)

    def __init__(self) -> None:
        super().__init__()
        self.project: Project | None = None
        self.entries: list[CamEntry] = []
        """The cams as last studied (for `entries_for`)."""
        self.entries_for: Project | None = None
        """The project the entries belong to (one edit behind while the worker runs)."""
        self.cam_name: str | None = None
        """The cam on view."""
        self.angle = 0.0
        """Cam angle on view, deg."""
        self._spot = 0
        self._waiting: list = []
        """Actions asked for while the worker studies the cams; they run when it is done."""
        self._held: list[events.Key] = []
        """Keys typed after an action that waits for the study: they wait too, in order."""

    def compose(self) -> ComposeResult:
        yield CamBar(id="cam-bar")
        with Horizontal(id="cam-top"):
            yield CamDrawing(id="cam-drawing")
            with ViewScroll(id="cam-side", can_focus=False):
                yield CamVerdicts(id="cam-verdicts")
                yield Static(id="cam-readout")
                yield Static(id="cam-legend")
                yield Static(id="cam-sizes")
        with Horizontal(id="cam-plots"):
            yield AnglePlot(id="cam-pressure")
            yield AnglePlot(id="cam-radius")
        with ViewScroll(id="cam-empty"):
            yield Static(id="cam-empty-text")

    # --- state down ---------------------------------------------------------

    def show_project(self, project: Project) -> None:
        if project is self.project:
            return
        self.project = project
        names = [s.name for s in cam_specs(project)]
        if self.cam_name not in names:
            self.cam_name = names[0] if names else None
        self._layout_mode()
        self._refresh_bar()
        if names:
            self.study(project)

    @work(thread=True, exclusive=True, group="cam-view", exit_on_error=False)
    def study(self, project: Project) -> None:
        """Study every cam of `project` off the UI thread; a newer state cancels an older run."""
        entries = study_cams(project)
        if not get_current_worker().is_cancelled:
            self.post_message(self.Studied(project, entries))

    @on(Studied)
    def _studied(self, message: Studied) -> None:
        if message.project is not self.project:
            return  # a newer state is on its way
        self.entries, self.entries_for = message.entries, message.project
        self._refresh_all()
        waiting, self._waiting = self._waiting, []
        for action in waiting:
            action()
        held, self._held = self._held, []
        for key in held:  # after what the waiting action opened (a dialog takes them)
            self.app.post_message(events.Key(key.key, key.character))

    async def key_in_turn(self, event: events.Key) -> None:
        """A key typed after an action that waits for the cams' study waits with it (`e c`: the
        format chooser the `e` opens once the cams are studied takes the `c`)."""
        if self._waiting:
            self._held.append(event)
            return
        await super().key_in_turn(event)

    def _when_studied(self, action) -> bool:
        """True to go on now; False when the cams are still being studied (`action` runs then)."""
        if self.fresh or self.project is None or not cam_specs(self.project):
            return True
        self._waiting.append(action)
        return False

    @property
    def entry(self) -> CamEntry | None:
        return next((e for e in self.entries if e.name == self.cam_name), None)

    @property
    def fresh(self) -> bool:
        return self.entries_for is not None and self.entries_for is self.project

    def _layout_mode(self) -> None:
        has = bool(self.project is not None and cam_specs(self.project))
        for name in ("#cam-bar", "#cam-top", "#cam-plots"):
            self.query_one(name).display = has
        self.query_one("#cam-empty").display = not has
        if not has:
            self.query_one("#cam-empty-text", Static).update(no_cam_text(self.project))
        self.call_after_refresh(self._size_parts)
        self.refresh_bindings()

    def on_resize(self) -> None:
        self._size_parts()
        self._refresh_bar()

    def _size_parts(self) -> None:
        """Plots a third of the height (within `PLOT_ROWS`); the drawing about square beside the table."""
        w, h = self.size
        if h == 0:
            return
        plots = max(PLOT_ROWS[0], min(PLOT_ROWS[1], h // 3))
        self.query_one("#cam-plots").styles.height = plots
        top = max(1, h - 1 - plots)
        square = int(round(top * CELL_ASPECT))
        width = min(square, int(w * DRAWING_SHARE), w - SIDE_WIDTH)
        if w - width < WIDE_SIDE_WIDTH and w - WIDE_SIDE_WIDTH >= WIDE_DRAWING:
            width = w - WIDE_SIDE_WIDTH  # room for the share-of-limit bars
        self.query_one(CamDrawing).styles.width = max(MIN_DRAWING, width)

    def _refresh_all(self) -> None:
        entry = self.entry
        self._refresh_bar()
        self.query_one(CamVerdicts).show(entry)
        ok = entry is not None and entry.study is not None
        self.query_one("#cam-legend", Static).update(legend(entry) if ok else Text(""))
        self.query_one("#cam-sizes", Static).update(sizes_text(self.project, self.cam_name))
        pressure, radius = self.query_one("#cam-pressure", AnglePlot), self.query_one("#cam-radius", AnglePlot)
        pressure.show_spec(pressure_angle_plot(entry) if ok else None, self.angle)
        radius.show_spec(radius_plot(entry) if ok else None, self.angle)
        self._refresh_angle()

    def _refresh_angle(self) -> None:
        entry = self.entry
        self.query_one(CamDrawing).show(entry, self.angle)
        show_text(self.query_one("#cam-readout", Static), self._readout_text(entry))

    def _readout_text(self, entry: CamEntry | None) -> Text:
        if entry is None:
            return Text("")
        if entry.study is None:
            return Text(f"✗ this cam cannot be laid out now — {entry.problem}", style=OVER_STYLE)
        r = readout(entry.study, entry.unit, self.angle)
        moving = "↑ rising" if r.lift_rate > LIFT_AT_REST else "↓ falling" if r.lift_rate < -LIFT_AT_REST else "at rest"
        text = Text()
        text.append(f"at cam angle {degrees(self.angle)}", style="bold")
        text.append(" (← →): ", style="dim")
        lift = f"{fmt(r.lift)} mm" if entry.unit == "mm" else f"{fmt(r.lift)}°"
        text.append(f"follower {lift} {moving}\n")
        text.append(f"pressure angle {r.pressure_angle:.1f}°")
        if r.pitch_radius is not None:
            text.append(f" · pitch ρ {_radius(r.pitch_radius)}")
        if r.trouble:
            what = "undercut" if entry.study.analysis.undercut else "cusp"
            text.append(f" · × {what} here", style=OVER_STYLE)
        else:
            text.append(f" · profile ρ {_radius(r.profile_radius)}")
        return text

    def _refresh_bar(self) -> None:
        bar = self.query_one(CamBar)
        specs = cam_specs(self.project) if self.project is not None else []
        if not specs:
            bar.update("")
            return
        names = [s.name for s in specs]
        spec = specs[names.index(self.cam_name)]
        text = Text(no_wrap=True, overflow="ellipsis")
        text.append("cam ", style="dim")
        text.append(f"◂ {spec.name} ▸", style="bold")
        text.append(f" {names.index(spec.name) + 1}/{len(names)}", style="dim")
        text.append(" (, .)" if len(names) > 1 else "", style="dim")
        text.append("  ")
        entry = self.entry if self.fresh else None
        if entry is not None and entry.study is None:
            text.append("✗ CANNOT BE LAID OUT", style=OVER_STYLE)
        elif entry is not None:
            text.append("✓ all checks pass" if entry.study.ok else "✗ CHECK FAILED",
                        style=OK_STYLE if entry.study.ok else OVER_STYLE)
        else:
            text.append("(computing…)", style="dim")
        pieces = [spec.follower.replace("-", " "), f"axis {spec.axis}", turning_text(spec) + " (t)"]
        if entry is not None and entry.study is not None:
            pieces += [f"base circle {fmt(entry.study.cam.follower.base_radius * 1e3)} mm"]
        room = self.size.width - 2 - len(text.plain)
        shown = set()
        for i in sorted(range(len(pieces)), key=BAR_PRIORITY.index):  # each one that fits whole
            if len(pieces[i]) + 3 <= room:
                shown.add(i)
                room -= len(pieces[i]) + 3
        for i in sorted(shown):  # in their own order
            text.append(" · ", style="dim")
            text.append(pieces[i], style="dim")
        bar.update(text, layout=False)

    def focus_first(self) -> None:
        self.screen.set_focus(self.query_one(CamDrawing))  # now: the next key finds it

    # --- keys ---------------------------------------------------------------

    def check_action(self, action: str, parameters) -> bool | None:
        """Cam keys only where there is a cam (the footer then leaves them out)."""
        if action in CAM_ACTIONS and not (self.project is not None and cam_specs(self.project)):
            return False
        return True

    def action_step(self, step: float) -> None:
        self.action_go(self.angle + step)

    def action_go(self, angle_deg: float) -> None:
        self.angle = round(float(angle_deg) % 360.0, 6) % 360.0
        for plot in self.query(AnglePlot):
            plot.set_cursor(self.angle)
        self._refresh_angle()

    def action_cycle_cam(self, step: int) -> None:
        specs = cam_specs(self.project) if self.project is not None else []
        if not specs:
            return
        names = [s.name for s in specs]
        i = names.index(self.cam_name) if self.cam_name in names else 0
        self.select_cam(names[(i + step) % len(names)])

    def select_cam(self, name: str) -> None:
        self.cam_name = name
        self._spot = 0
        self._refresh_all()

    def spots(self) -> list[tuple[str, float]]:
        """(what, cam angle in deg) of the places worth a look, worst first."""
        entry = self.entry
        if entry is None or entry.study is None:
            return []
        a = entry.study.analysis
        radii = a.pitch_radii if a.pitch_radii is not None else a.profile_radii
        inside = [c for c in entry.study.verdict.checks if c.quantity == "pivot_clearance" and not c.ok]
        out = [("the cam reaching the pivot", c.at) for c in inside]  # the cam cannot be built
        out += [("largest pressure angle", a.max_pressure_angle.at),
               ("least convex radius" + (" of the pitch curve" if a.pitch_radii else ""), radii.convex.at)]
        out += [("undercut", i.start) for i in a.undercut] + [("cusp", i.start) for i in a.cusp]
        out += [("corner", c) for c in a.corners]
        return [(what, float(angle(at).rstrip("°"))) for what, at in out]

    def action_worst(self) -> None:
        if not self._when_studied(self.action_worst):
            return
        spots = self.spots()
        if not spots:
            return
        what, at = spots[self._spot % len(spots)]
        self._spot += 1
        self.action_go(at)
        self.post_message(Status(f"cam {self.cam_name}: {what} at {degrees(at)} (w: next spot)"))

    def action_export(self) -> None:
        if not self._when_studied(self.action_export):
            return
        entry = self.entry
        if self.project is None or entry is None:
            self.post_message(Status("no cam to export: this project has no [[cam]] table", error=True))
            return
        if entry.study is None:
            self.post_message(Status(f"cam {entry.name} cannot be laid out now: {entry.problem}", error=True))
            self.app.bell()
            return
        start_export(self, self.project, entry.spec)

    def action_sizes(self) -> None:
        if self.project is not None and self.cam_name is not None:
            start_size_edit(self, self.project, self.cam_name)

    def action_turning(self) -> None:
        if self.project is not None and self.cam_name is not None:
            reverse_turning(self, self.project, self.cam_name)

    def action_limits(self) -> None:
        if self.project is not None and self.cam_name is not None:
            start_limits_edit(self, self.project, self.cam_name)


def _radius(mm: float) -> str:
    """A signed radius of curvature in words: "52.1 mm", "80 mm concave", "∞ (straight)"."""
    if not math.isfinite(mm) or abs(mm) > STRAIGHT:
        return "∞ (straight)"
    return f"{fmt(abs(mm), 3)} mm" + ("" if mm >= 0 else " concave")


register_view(CamView)
