"""The Linkage view's readout: the chosen output and the drivers at the master angle on view.

Values come from the solved instants (`Trace.at`); a value below `SPECK` of
its quantity's largest over the cycle is what is left of a cancellation
and is shown as 0.  At a dead point the rates grow without bound, so there
the readout says so instead of printing them.
"""

from __future__ import annotations

from rich.text import Text

from ..format import OVER_STYLE, degrees
from .linkage_data import LinkageEntry, driver_value
from .linkage_report import num, stop_text

SPECK = 1e-6  # a value below this share of its quantity's largest over the cycle is shown as 0 (rounding)


def readout_text(entry: LinkageEntry | None, output: str | None, angle: float) -> Text:
    """Three or four lines: the angle and the output's position and velocity, its acceleration and
    jerk, the drivers' values (with the axis each follows), and where the linkage stops."""
    if entry is None:
        return Text("")
    if not entry.runs:
        return Text("✗ the linkage does not move (see below)", style=OVER_STYLE)
    text = Text()
    stopped = not entry.solved and angle >= entry.last
    text.append(f"at master {stop_text(angle) if stopped else degrees(angle)}", style="bold")
    trace = entry.traces.get(output) if output else None
    if trace is not None:
        v = trace.at(angle)
        unit = trace.unit
        shown = {q: num(x if abs(x) > SPECK * trace.largest(q) else 0.0) for q, x in v.items()}
        text.append(f": {output} {shown['position']} {unit}")
        if not stopped:
            speed = shown["velocity"]
            moving = "↑ " if speed != "0" and v["velocity"] > 0 else "↓ " if speed != "0" else ""
            if speed == "0" and shown["acceleration"] == "0":
                text.append(" at rest\n")
            else:
                text.append(f" {moving}{speed} {unit}/s\n")
            text.append(f"acceleration {shown['acceleration']} {unit}/s² · jerk {shown['jerk']} {unit}/s³")
    if stopped:  # the dead point itself: the rates grow without bound there
        text.append("\n✗ it stops here: a dead point, its rates grow without bound", style=OVER_STYLE)
    drivers = []
    for d in entry.spec.drivers:
        value = driver_value(entry, d.name, angle)
        if value is not None:
            words = f"{num(value[0])}°" if value[1] == "deg" else f"{num(value[0])} mm"
            drivers.append(f"{d.name} at {words}" + (f" (axis {d.axis})" if d.axis else ""))
    if drivers:
        text.append("\ndriver " + " · ".join(drivers), style="dim")
    return text
