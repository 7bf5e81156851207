"""Peaks against limits, max speed and join warnings of one axis."""

from __future__ import annotations

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.widgets import Static

from motionlaws.peaks import QUANTITIES

from ..compute import AxisResult
from ..format import OVER_STYLE, OK_STYLE, WARN_STYLE, degrees, number, unit_of, used_bar, verdict



JUMPS = (  # (attribute, what jumps, unit power, what follows)
    ("velocity_jump", "velocity", "/s", "acceleration and jerk ∞"),
    ("acceleration_jump", "acceleration", "/s²", "jerk ∞"),
)


def join_lines(result: AxisResult) -> list[Text]:
    """Velocity and acceleration jumps at joins: one line per jump, or one line per
    kind listing the angles when a kind jumps at several joins."""
    lines = []
    for attr, what, power, follows in JUMPS:
        jumps = [j for j in result.report.joins if getattr(j, attr)]
        unit = result.unit + power
        if len(jumps) == 1:
            j = jumps[0]
            lines.append(Text(f"! {follows}: {what} jumps {number(getattr(j, attr), unit)} "
                              f"at {degrees(j.at)} (segment {j.left}→{j.right})", style=WARN_STYLE))
        elif jumps:
            largest = max(abs(getattr(j, attr)) for j in jumps)
            at = ", ".join(degrees(j.at) for j in jumps)
            lines.append(Text(f"! {follows}: {what} jumps ≤ {number(largest, unit)} at {at}",
                              style=WARN_STYLE))
    return lines


def max_speed_line(result: AxisResult) -> Text:
    report = result.report
    now = f"now {number(report.speed, 'cycles/min')}"
    if report.max_speed is None:
        return Text(f"max speed: no limit binds ({now})", style="dim")
    ok = report.max_speed >= report.speed
    mark = "✓" if ok else "✗"
    return Text.assemble(
        "max speed within limits: ",
        (f"{mark} {number(report.max_speed, 'cycles/min')}", OK_STYLE if ok else OVER_STYLE),
        f"  ({now})",
    )


class PeaksPanel(Static):
    """A compact peaks-vs-limits table; `rows` keeps the shown values for tests."""

    DEFAULT_CSS = """
    PeaksPanel { height: auto; }
    """

    def __init__(self, **kwargs):
        super().__init__("", **kwargs)
        self.result: AxisResult | None = None
        self._height = 0
        self.rows: dict[str, dict] = {}
        """Per quantity: value, at, limit, used, verdict text as shown."""

    def show(self, result: AxisResult | None) -> None:
        if result is not None and result is self.result:
            return
        self.result = result
        if result is None:
            self.rows = {}
            self._height = 1
            self.update(Text("computing …", style="dim"))
            return
        report = result.report
        checks = {c.quantity: c for c in report.checks}
        table = Table(box=None, padding=(0, 1), show_edge=False, expand=False, header_style="bold")
        table.add_column("peaks")
        table.add_column("value", justify="right")
        table.add_column("at", justify="right")
        table.add_column("limit", justify="right")
        table.add_column("share of limit", no_wrap=True)
        table.add_column("verdict", no_wrap=True)
        self.rows = {}
        for q in QUANTITIES:
            peak = report.peaks[q]
            unit = unit_of(q, result.unit)
            check = checks.get(q)
            value = "infinite" if peak.infinite else number(peak.value, unit)
            used = check.used if check else None
            word = verdict(used)
            table.add_row(
                q,
                Text(value, style=OVER_STYLE if peak.infinite else ""),
                degrees(peak.at),
                number(check.limit, unit) if check else "—",
                used_bar(used) if used is not None else Text("—", style="dim"),
                word,
            )
            self.rows[q] = {"value": value, "at": degrees(peak.at),
                            "limit": number(check.limit, unit) if check else "—",
                            "used": used, "verdict": word.plain}
        lines = join_lines(result) or [Text("joins: ✓ no jumps in velocity or acceleration", style="dim")]
        # header + 3 quantities + max speed + joins; a layout pass only when that count changes
        height = 5 + len(lines)
        self.update(Group(table, max_speed_line(result), *lines), layout=height != self._height)
        self._height = height
