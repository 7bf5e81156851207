"""A burst of edits on a machine with many axes: how long until the numbers of the last are in.

A quick hand (or a held key) makes edits faster than their numbers are
computed.  Five span edits are posted to the running workbench back to
back; the clock stops when the app holds the numbers of the last one.
Printed: median and best of the wall time, and the CPU time of the whole
process over the burst (the work done, including numbers nobody will see).
The machine is the tray lidder preset with its axes repeated (`COPIES`
times three axes), each sampled at 3,600 points per cycle.

    python benchmarks/bench_burst.py [runs]
"""

from __future__ import annotations

import asyncio
import re
import statistics
import sys
import time

from workbench import editing
from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import loads_project
from workbench.tui.messages import ProjectEdited

COPIES = 6  # the preset's three axes, this many times: 18 axes
SPANS = (95.0, 100.0, 105.0, 110.0, 115.0)  # segment 1 of the first axis, one edit each
RUNS = 5
LID = "lid-lift"


def many_axes() -> str:
    """The tray lidder's file with its axes repeated under new names."""
    text = preset_path("tray-lidder").read_text()
    head, first, rest = text.partition("[[axis]]")
    axes = first + rest
    copies = [re.sub(r'(?m)^name = "([^"]+)"', lambda m, k=k: f'name = "{m.group(1)}-{k}"', axes)
              for k in range(1, COPIES)]
    return head + axes + "".join("\n" + c for c in copies)


async def burst() -> tuple[float, float]:
    app = Workbench(loads_project(many_axes()))
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        while app.results_for is not app.project:
            await asyncio.sleep(0.005)
        project = app.project
        wall, cpu = time.perf_counter(), time.process_time()
        for span in SPANS:
            project = editing.set_span(project, LID, 0, span)
            app.post_message(ProjectEdited(project, f"span {span:g}"))
        while app.results_for is not project:
            await asyncio.sleep(0.001)
        return (time.perf_counter() - wall) * 1000.0, (time.process_time() - cpu) * 1000.0


def main() -> None:
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else RUNS
    axes = len(loads_project(many_axes()).axes)
    results = [asyncio.run(burst()) for _ in range(runs)]
    walls, cpus = [w for w, _ in results], [c for _, c in results]
    print(f"{len(SPANS)} edits posted at once, {axes} axes: numbers of the last in "
          f"{statistics.median(walls):.0f} ms median (best {min(walls):.0f} ms); "
          f"CPU {statistics.median(cpus):.0f} ms median")


if __name__ == "__main__":
    main()
