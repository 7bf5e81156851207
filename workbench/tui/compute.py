"""What the screens show, computed from a project without any UI.

`compute_results` runs in a worker thread after every edit: it samples each
axis over one cycle and analyses its peaks, joins and max speed.  Nothing
here touches Textual, so the benchmark and the tests call it directly.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from motionlaws import AxisReport, analyse

from ..projectfile import Project

POINTS_PER_CYCLE = 3600  # samples of each curve over 360° (0.1° apart): finer than any plot
QUANTITIES = ("position", "velocity", "acceleration", "jerk")


@dataclass(frozen=True)
class AxisCurves:
    """One axis sampled over a cycle, 0° to 360° inclusive: master angle in deg, then s, v, a, j in unit, unit/s, unit/s², unit/s³."""

    theta: np.ndarray
    position: np.ndarray
    velocity: np.ndarray
    acceleration: np.ndarray
    jerk: np.ndarray

    def of(self, quantity: str) -> np.ndarray:
        return getattr(self, quantity)


@dataclass(frozen=True)
class AxisResult:
    """An axis's report and curves, plus its segment boundaries (master deg)."""

    name: str
    unit: str
    report: AxisReport
    curves: AxisCurves
    bounds: tuple[float, ...]


def compute_axis(project: Project, name: str, points: int = POINTS_PER_CYCLE) -> AxisResult:
    """Sample and analyse one axis at the machine speed."""
    program = project.programs[name]
    speed = project.speed
    theta = np.arange(points + 1) * (360.0 / points)  # 0 … 360 inclusive: plots reach the right edge
    s, v, a, j = program.kinematics(theta, speed)
    report = analyse(program, speed)
    bounds = tuple(float(b) for b in program.bounds[1:-1])
    return AxisResult(name, program.axis.unit, report, AxisCurves(theta, s, v, a, j), bounds)


RECENT = 4  # states whose numbers are kept: enough for one typed ahead of its edit, and undo


_recent: list[tuple[Project, int, dict[str, AxisResult]]] = []


def compute_results(project: Project, points: int = POINTS_PER_CYCLE) -> dict[str, AxisResult]:
    """Every axis of the project, by name, in file order.

    The numbers of the last `RECENT` states are kept (a state is an immutable
    snapshot: the same object has the same numbers), so a state whose numbers
    a view computed while its value was typed is not computed again when it
    becomes the edit."""
    for known, n, results in list(_recent):
        if known is project and n == points:
            return results
    results = {axis.name: compute_axis(project, axis.name, points) for axis in project.axes}
    _recent.append((project, points, results))
    del _recent[:-RECENT]
    return results
