"""Edit → plots and peaks redrawn, measured through the running workbench (Textual pilot).

One edit (segment 1's span of the lid lift, alternating 90° ↔ 100°) is sent
to the app as a view would send it; the clock stops when the peaks panel
shows the new numbers and every plot on view has drawn its canvas for them.
Each axis is sampled at 3,600 points per cycle.  Target: within 50 ms.
Also printed: the parts (numbers in the worker, one plot's canvas draw).

    python benchmarks/bench_tui.py
"""

from __future__ import annotations

import asyncio
import statistics
import time

from workbench import editing
from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.compute import POINTS_PER_CYCLE, compute_results
from workbench.tui.messages import ProjectEdited
from workbench.tui.widgets.motion_plots import MotionPlot

EDITS = 30  # edits per size after warm-up
WARM_UP = 3
TARGET_MS = 50.0
LID = "lid-lift"

drawn_at: dict[int, float] = {}  # id(plot) → when its canvas was last drawn
_original_render = MotionPlot._render_plot


def _timed_render(self) -> None:
    _original_render(self)
    drawn_at[id(self)] = time.perf_counter()


MotionPlot._render_plot = _timed_render


async def measure(size: tuple[int, int]) -> list[float]:
    project = load_project(preset_path("tray-lidder"))
    app = Workbench(project)
    times = []
    async with app.run_test(size=size) as pilot:
        await app.workers.wait_for_complete()
        await pilot.pause()
        axes = app.query_one("#axes")
        for i in range(WARM_UP + EDITS):
            span = 100.0 if i % 2 == 0 else 90.0
            edited = editing.set_span(app.project, LID, 0, span)
            visible = [p for p in app.query(MotionPlot) if p.display and p.size.width]
            t0 = time.perf_counter()
            app.post_message(ProjectEdited(edited, "bench"))
            while True:
                await asyncio.sleep(0.0002)
                if axes.results_for is not edited:
                    continue
                if all(drawn_at.get(id(p), 0.0) > t0 and p.result is axes.result for p in visible):
                    break
            t1 = max(drawn_at[id(p)] for p in visible)
            if i >= WARM_UP:
                times.append((t1 - t0) * 1e3)
            assert app.query_one("#peaks").rows["velocity"]["value"]
    return times


def parts() -> None:
    project = load_project(preset_path("tray-lidder"))
    runs = []
    for _ in range(20):
        t0 = time.perf_counter()
        compute_results(project)
        runs.append((time.perf_counter() - t0) * 1e3)
    axes = len(project.axes)
    print(f"  numbers in the worker ({axes} axes × {POINTS_PER_CYCLE} points, peaks, joins): "
          f"median {statistics.median(runs):.1f} ms")


def main() -> None:
    print(f"edit → plots and peaks redrawn, {POINTS_PER_CYCLE} points per axis (target {TARGET_MS:.0f} ms)")
    parts()
    for size, what in (((80, 24), "one plot"), ((120, 40), "four plots")):
        times = asyncio.run(measure(size))
        med = statistics.median(times)
        p90 = sorted(times)[int(0.9 * len(times)) - 1]
        verdict = "within target" if med <= TARGET_MS else "OVER target"
        print(f"  {size[0]}×{size[1]} ({what}): median {med:.1f} ms, 90th percentile {p90:.1f} ms, "
              f"max {max(times):.1f} ms over {len(times)} edits — {verdict}")


if __name__ == "__main__":
    main()
