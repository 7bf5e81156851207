"""Edit → plots and peaks on screen, measured through the running workbench (Textual pilot).

One edit (segment 1's span of the lid lift, alternating 90° ↔ 100°) is sent
to the app as a view would send it; then the same edit is made as a user
makes it: Enter on the span cell, the value typed over the cell, and the
clock starts at the Enter that applies it (the cell editor closes, the edit
follows; the view computed the typed value's numbers while it was typed,
and the pause before Enter lets that finish, as a person's does).  The clock stops at the end of the
screen update (compositor pass) in which the peaks panel and every plot on
view were painted with the new numbers — not when the numbers arrive, nor
when a plot has only prepared its drawing.  Each axis is sampled at 3,600
points per cycle.  Target: within 50 ms.

Each size runs `RUNS` times (a fresh app each time) of `EDITS` edits; the
app is let go quiet between edits so one edit's leftovers do not land on
the next.  Printed: best, median and 90th percentile of all edits, the
median split into "numbers" (edit → results handed to the view: worker and
queue) and "paint" (results → on screen), and the CPU time the UI thread
spent per edit (less disturbed by other work on the machine than the wall
clock).  Also the worker alone.

    python benchmarks/bench_tui.py [runs]
"""

from __future__ import annotations

import asyncio
import statistics
import sys
import time

from textual.screen import Screen
from textual.widgets import Input

from workbench import editing
from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.compute import POINTS_PER_CYCLE, compute_axis
from workbench.tui.messages import ProjectEdited
from workbench.tui.views.axes import AxesView
from workbench.tui.widgets.axis_plots import AxisPlot

EDITS = 30  # edits per run after warm-up
WARM_UP = 3
RUNS = 3  # fresh apps per size (the machine is shared: repeat, report the spread)
QUIET_S = 0.03  # pause between edits so each starts from an idle app
TARGET_MS = 50.0
POSTED, TYPED, DIALOG = "posted", "typed", "dialog"  # how an edit is made (measure)
LID = "lid-lift"


class Watch:
    """Follows one edit: when the view got the numbers of a state newer than `before`, and
    when each watched widget was painted with them."""

    def __init__(self) -> None:
        self.before = None
        self.on = False
        self.t_results = 0.0
        self.pending: set[int] = set()
        self.done = asyncio.Event()
        self.t_done = 0.0
        self.cpu_done = 0.0

    def start(self, before, widgets) -> None:
        self.before, self.on, self.t_results, self.t_done = before, True, 0.0, 0.0
        self.pending = {id(w) for w in widgets}
        self.done = asyncio.Event()  # in the running loop (each run has its own)

    def fresh(self, axes: AxesView) -> bool:
        """The view shows the numbers of the edited state."""
        return self.on and axes.results_for is not self.before and axes.results_for is axes.project


watch = Watch()


def _patch_app() -> None:
    """Timestamps: the view receiving results, each compositor pass ending."""
    show_results = AxesView.show_results

    def timed_show_results(self, project, results):
        if watch.on and project is not watch.before and not watch.t_results:
            watch.t_results = time.perf_counter()
        show_results(self, project, results)
        for plot in self.query(AxisPlot):  # a plot whose picture did not change has nothing to paint
            if plot._built_for is not None and plot._built_for[0] is plot.chart:
                watch.pending.discard(id(plot))

    AxesView.show_results = timed_show_results

    compositor_refresh = Screen._compositor_refresh

    def timed_compositor_refresh(self):
        compositor_refresh(self)
        if watch.on and not watch.pending and not watch.done.is_set():
            watch.t_done = time.perf_counter()
            watch.cpu_done = time.thread_time()
            watch.done.set()

    Screen._compositor_refresh = timed_compositor_refresh


def _watch_paint(widget, fresh) -> None:
    """Mark `widget` painted once the compositor renders it while `fresh()` holds."""
    render_lines = widget.render_lines

    def watched(crop):
        lines = render_lines(crop)
        if fresh():
            watch.pending.discard(id(painted_for[id(widget)]))
        return lines

    widget.render_lines = watched


painted_for: dict[int, object] = {}  # id(painter) → the widget it paints for


async def measure(size: tuple[int, int], how: str = POSTED) -> list[tuple[float, float, float]]:
    """(edit → on screen, edit → numbers on the view, UI thread CPU) in ms for each edit after warm-up.

    `how`: POSTED, the edit is posted as a view posts it; TYPED, it is typed over the span cell and
    the clock starts at the Enter that applies it (the cell editor closes and the edit follows);
    DIALOG, the machine speed is typed into its dialog and the clock starts at the Enter that
    closes the dialog (the screen under it comes back with the edit; the view computed the typed
    value's numbers while the dialog was open, and the pause before Enter lets that finish)."""
    typed = how == TYPED
    project = load_project(preset_path("tray-lidder"))
    app = Workbench(project)
    out = []
    async with app.run_test(size=size) as pilot:
        await app.workers.wait_for_complete()
        await pilot.pause()
        axes = app.query_one("#axes", AxesView)
        peaks = app.query_one("#peaks")
        plots = list(app.query(AxisPlot))
        for plot in plots:
            painted_for[id(plot)] = plot
            _watch_paint(plot, lambda p=plot: watch.fresh(axes) and p.result is axes.result)
        painted_for[id(peaks)] = peaks
        _watch_paint(peaks, lambda: watch.fresh(axes) and peaks.result is axes.result)
        for i in range(WARM_UP + EDITS):
            span = 100.0 if i % 2 == 0 else 90.0
            if how == DIALOG:
                await pilot.press("m")
                await pilot.pause()
                app.screen.query_one("#value", Input).value = "110" if i % 2 == 0 else "120"
                await pilot.pause()
                await asyncio.sleep(QUIET_S)
            if typed:
                app.query_one("#segments").move_cursor(row=0, column=2)
                await pilot.press("enter", *f"{span:g}")
                await pilot.pause()
                assert axes.editing and axes.editor.text == f"{span:g}"
                await asyncio.sleep(QUIET_S)
            visible = [p for p in plots if p.display and p.size.width]
            watch.start(app.project, [peaks, *visible])
            t0, cpu0 = time.perf_counter(), time.thread_time()
            if typed or how == DIALOG:
                pressed = asyncio.create_task(pilot.press("enter"))
            else:
                app.post_message(ProjectEdited(editing.set_span(app.project, LID, 0, span), "bench"))
            await asyncio.wait_for(watch.done.wait(), timeout=10.0)
            if typed or how == DIALOG:
                await pressed
            if i >= WARM_UP:
                out.append(((watch.t_done - t0) * 1e3, (watch.t_results - t0) * 1e3,
                            (watch.cpu_done - cpu0) * 1e3))
            assert peaks.rows["velocity"]["value"]
            await app.workers.wait_for_complete()
            await pilot.pause()
            await asyncio.sleep(QUIET_S)
        watch.on = False
    return out


def worker_alone() -> None:
    project = load_project(preset_path("tray-lidder"))
    runs = []
    for _ in range(20):
        t0 = time.perf_counter()
        {axis.name: compute_axis(project, axis.name) for axis in project.axes}  # as compute_results, not remembered
        runs.append((time.perf_counter() - t0) * 1e3)
    print(f"  numbers in the worker alone ({len(project.axes)} axes × {POINTS_PER_CYCLE} points, "
          f"peaks, joins): median {statistics.median(runs):.1f} ms")


def p90(values: list[float]) -> float:
    return sorted(values)[max(0, int(0.9 * len(values)) - 1)]


def main() -> None:
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else RUNS
    _patch_app()
    print(f"edit → plots and peaks on screen, {POINTS_PER_CYCLE} points per axis (target {TARGET_MS:.0f} ms)")
    worker_alone()
    for size, what, how in (((80, 24), "one plot", POSTED), ((120, 40), "four plots", POSTED),
                            ((80, 24), "one plot, typed over the span cell", TYPED),
                            ((120, 40), "four plots, typed over the span cell", TYPED),
                            ((80, 24), "one plot, machine speed through its dialog", DIALOG),
                            ((120, 40), "four plots, machine speed through its dialog", DIALOG)):
        edits = []
        for _ in range(runs):
            edits += asyncio.run(measure(size, how))
        total = [t for t, _, _ in edits]
        numbers = statistics.median(n for _, n, _ in edits)
        paint = statistics.median(t - n for t, n, _ in edits)
        cpu = [c for _, _, c in edits]
        med = statistics.median(total)
        verdict = "within target" if med <= TARGET_MS else "OVER target"
        print(f"  {size[0]}×{size[1]} ({what}): best {min(total):.1f}, median {med:.1f}, "
              f"90th percentile {p90(total):.1f} ms over {len(total)} edits — {verdict}\n"
              f"      median split: numbers {numbers:.1f}, paint {paint:.1f} ms; "
              f"UI thread CPU per edit: best {min(cpu):.1f}, median {statistics.median(cpu):.1f} ms")


if __name__ == "__main__":
    main()
