"""Solving a linkage over one machine cycle.

The solver takes the drivers' segment boundaries in its stride (it lands on
both sides of each, checks nothing across one and fits no peak over one;
solver/kinematics/march.py), so a cycle is one solve from the file's rough
placement, drawn at master 0°.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.kinematics import INSTANTS, CycleResult, solve_cycle

from .linkagefile import LinkageSpec
from .linkagemodel import BuiltLinkage, build_linkage

FULL_TURN = 360.0  # master degrees per cycle


@dataclass
class LinkageSolution:
    """The cycle solved at the instants asked for: `result` (a solver `CycleResult`; draw with
    `result.point(body, point)`, m) and the linkage it was built from."""

    built: BuiltLinkage
    result: CycleResult

    @property
    def status(self) -> str:
        return self.result.status


def cuts(project, spec: LinkageSpec) -> tuple[float, ...]:
    """Master angles (deg, sorted, in [0, 360)) where an axis a driver follows changes segment."""
    starts = {float(s.theta0) for d in spec.drivers if d.axis is not None for s in project.programs[d.axis].shapes}
    return tuple(sorted(starts))


def solve_linkage(project, spec: LinkageSpec, theta=None, instants: int = INSTANTS) -> LinkageSolution:
    """Solve one cycle at master angles `theta` (rad, increasing, in [0, 2π)) or on `instants`
    equally spaced ones.  Raises `LinkageFault` (linkagemodel) when the linkage cannot be built."""
    built = build_linkage(project, spec)
    grid = None if theta is None else np.asarray(theta, dtype=float)
    return LinkageSolution(built, solve_cycle(built.mechanism, project.speed, instants=instants, theta=grid))
