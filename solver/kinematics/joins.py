"""An output on both sides of every break of its drivers: the jumps a segment boundary makes.

Where a driver's law changes (a program's segment boundary, its motion's
`breaks`) the output's velocity, acceleration or jerk may jump.  Its value
and derivatives are solved just before the break (JOIN_GAP short: the
left-hand limit) and at it (the right-hand value), over a whole cycle when
the result is one, else over the solved range.  A velocity jump means an
infinite acceleration and jerk there, an acceleration jump an infinite
jerk, as for an axis.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .march import JOIN_GAP
from .peaks import cycle_breaks, solve_output_at


@dataclass(frozen=True)
class OutputJoin:
    """At a break `at` (master rad), the output's (g, g', g'', g''') per rad^k on each side."""

    at: float
    left: np.ndarray
    right: np.ndarray

    @property
    def jump(self) -> np.ndarray:
        """Right minus left of (g, g', g'', g''') per rad^k."""
        return self.right - self.left


def output_joins(result, output) -> tuple[OutputJoin, ...]:
    """The output's one-sided values at every break of the drivers: over one cycle from the first
    instant when the result solved a whole cycle, else within the solved instants."""
    if result.system is None or result.theta.size == 0:
        return ()
    try:
        return _output_joins(result, output)
    finally:  # its scratch memory serves the next solve (workspace.py)
        result.system.release_workspace()


def _output_joins(result, output) -> tuple[OutputJoin, ...]:
    breaks = cycle_breaks(result)
    if not result.success:
        breaks = breaks[breaks - JOIN_GAP >= result.theta[0]]
    if not breaks.size:
        return ()
    k = breaks.size
    angles = np.concatenate([breaks - JOIN_GAP, breaks])
    curve = solve_output_at(result, output, angles)
    solved = np.isin(angles, curve.theta)  # the solved angles, in order; a join needs both sides
    rows = np.full((4, angles.size), np.nan)
    rows[:, solved] = [curve.value, curve.d1, curve.d2, curve.d3]
    return tuple(OutputJoin(float(b), rows[:, i].copy(), rows[:, k + i].copy())
                 for i, b in enumerate(breaks) if solved[i] and solved[k + i])
