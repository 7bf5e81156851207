"""The Linkage view's plots: an output's position and one of its rates against master angle.

Built on the Cam view's `AnglePlot` (braille curves, 0–360° scale, limit
lines dashed and named so in the title, a cursor): `LinkagePlot` adds the
master angles where a driver's axis changes segment as vertical lines.
Titles carry the unit, the peak with where it is, and the limit in words.
"""

from __future__ import annotations

import numpy as np

from ...axisreport import fmt
from ..format import degrees, unit_of
from .cam_plots import AnglePlot, Curve, PlotSpec, RefLine, pattern_word
from .linkage_data import LinkageEntry

CURVE_STYLE = {"position": "bright_cyan", "velocity": "bright_green",
               "acceleration": "bright_yellow", "jerk": "bright_blue"}  # as the Axes view's plots
BOUNDARY_STYLE = "bright_black"
NEAR_ZERO = 1e-9  # a shown value this small (in its unit) is 0: what is left of a cancellation


def num(value: float) -> str:
    return fmt(0.0 if abs(value) < NEAR_ZERO else value)


class LinkagePlot(AnglePlot):
    """An `AnglePlot` that also marks the cuts (`spec.extras["cuts"]`, master deg) as vertical lines."""

    def redraw(self) -> None:
        self.set_xlimits(0.0, 360.0)  # the whole cycle, also for a curve that stops part way
        cursor, self.cursor = self.cursor, None
        try:
            super().redraw()
        finally:
            self.cursor = cursor
        if not self.is_mounted or not self.display or self.size.width == 0 or self.spec is None:
            return
        for at in self.spec.extras.get("cuts", ()):
            self.add_v_line(at, BOUNDARY_STYLE)
        if cursor is not None:
            self.add_v_line(cursor % 360.0, "bold bright_white")


def output_plot(entry: LinkageEntry, output: str, quantity: str) -> PlotSpec | None:
    """`quantity` of output `output` over the solved instants, with ± its limit where it has one."""
    trace = entry.traces.get(output)
    if trace is None:
        return None
    if quantity == "position":  # up to where it stops: a position stays finite at a dead point
        theta, values = trace.theta, trace.values[quantity]
    else:  # the grid only: rates run away at a dead point and would flatten the rest
        theta, values = trace.plotted(quantity)
    unit = unit_of(quantity, trace.unit)
    name = output if quantity == "position" else quantity
    parts = [f"{name} [{unit}]"]
    lines = [RefLine(0.0, "zero")] if quantity != "position" else []
    study = entry.output_study(output)
    stop = "" if entry.solved else f"stops at {entry.last:.2f}°"
    if quantity == "position":
        if study is not None:
            parts.append(f"{num(study.minimum.value)} … {num(study.maximum.value)} {trace.unit}")
        elif values.size:
            parts.append(f"{num(float(values.min()))} … {num(float(values.max()))} {trace.unit} so far")
    else:
        check = next((c for c in study.checks if c.quantity == quantity), None) if study is not None else None
        if check is not None:
            parts.append(f"limit ±{fmt(check.limit)} ({pattern_word('limit')})")
            lines += [RefLine(check.limit), RefLine(-check.limit)]
        if study is not None:
            peak = study.peaks[quantity]
            value = "infinite" if peak.infinite else num(peak.value)
            parts.append(f"peak {value} at {degrees(round(peak.at % 360.0, 1) % 360.0)}")
    if stop:
        parts.append(stop)
    extras = {"cuts": entry.cuts, "theta": theta, "values": values}
    if not values.size:
        return PlotSpec(tuple(parts), (), tuple(lines), None, extras)
    return PlotSpec(tuple(parts), (Curve(np.asarray(theta), np.asarray(values), CURVE_STYLE[quantity]),),
                    tuple(lines), None, extras)
