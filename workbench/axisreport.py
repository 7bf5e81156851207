"""Axis peaks vs limits as JSON data (DESIGN §7) and as Rich tables."""

from __future__ import annotations

import math

from rich.console import Group
from rich.table import Table
from rich.text import Text

from motionlaws import AxisReport, analyse
from motionlaws.peaks import QUANTITIES

from .projectfile import Project

SYMBOL = {"velocity": "v", "acceleration": "a", "jerk": "j"}
POWER = {"velocity": "/s", "acceleration": "/s²", "jerk": "/s³"}
ASCII_POWER = {"velocity": "/s", "acceleration": "/s^2", "jerk": "/s^3"}


def axis_reports(project: Project) -> list[AxisReport]:
    """Analyse every axis at the machine speed."""
    return [analyse(project.programs[a.name], project.speed) for a in project.axes]


def _at(value: float) -> float:
    """Master angle rounded to 1e-6 degree (peak searches resolve far finer than that)."""
    return round(value, 6) + 0.0


def angle_column(value: float) -> str:
    """A master angle in a report's "at [deg]" column: two decimals, so the column lines up."""
    return f"{round(value, 2) + 0.0:.2f}"


def axis_json(report: AxisReport) -> dict:
    peaks = {}
    for q in QUANTITIES:
        p = report.peaks[q]
        entry = {"value": p.value, "at": _at(p.at)}
        if q != "velocity":
            entry["infinite"] = p.infinite
        peaks[q] = entry
    limits = {c.quantity: c.limit for c in report.checks}
    used = {c.quantity: (None if math.isinf(c.used) else c.used) for c in report.checks}
    return {
        "name": report.name,
        "unit": report.unit,
        "ok": report.ok,
        "peaks": peaks,
        "limits": limits,
        "used": used,
        "max_speed": report.max_speed,
        "joins": [
            {"at": _at(j.at), "velocity_jump": j.velocity_jump, "acceleration_jump": j.acceleration_jump}
            for j in report.joins
        ],
        "segments": [
            {
                "number": s.number,
                "law": s.law,
                "start": _at(s.start),
                "span": s.span,
                "duration": s.duration,
                "lift": s.lift,
                "peaks": {q: {"value": s.peaks[q].value, "at": _at(s.peaks[q].at)} for q in QUANTITIES},
            }
            for s in report.segments
        ],
    }


LARGEST_GROUPED = 1e9  # below it a large number is written out, grouped (jerks of 1e6..1e8 mm/s³
#                        read beside limits such as 700,000); from it on, with an exponent
MOST_PERCENT = 1e5  # a share of a limit of this many % or more is past reading exactly


def percent(used: float, decimals: int = 0) -> str:
    """A finite share of a limit: "116 %"; "> 99,999 %" beyond that (a speed typed far too high)."""
    if used * 100 >= MOST_PERCENT:
        return f"> {MOST_PERCENT - 1:,.0f} %"
    return f"{used * 100:,.{decimals}f} %"


def fmt(value: float | None, digits: int = 4) -> str:
    """A number for people: 4 significant digits, thousands grouped when large."""
    if value is None:
        return "—"
    if value == 0:
        return "0"
    if abs(value) >= LARGEST_GROUPED or abs(value) < 1e-3:
        return f"{value:.{digits - 1}e}"
    if abs(value) >= 10 ** digits:
        return f"{value:,.0f}"
    text = f"{value:,.{digits}g}"  # 5,261 beside 12,000
    return f"{value:,.0f}" if "e" in text else text  # 9,999.9 rounds up to 10,000, not 1e+04


def verdict_text(used: float) -> Text:
    """Pass/fail in words (colour only repeats what the words say)."""
    if math.isinf(used):
        return Text("OVER (infinite)", style="bold red")
    if used > 1.0:
        return Text("OVER", style="bold red")
    return Text("within", style="green")


def used_text(used: float) -> str:
    return "∞" if math.isinf(used) else percent(used, 1)


def axis_table(report: AxisReport) -> Group:
    """A Rich rendering of one axis: peaks vs limits, max speed, join warnings."""
    unit = report.unit
    limits = {c.quantity: c for c in report.checks}
    state = "all within limits" if report.ok else "LIMIT EXCEEDED"
    title = Text.assemble(
        (f"axis {report.name}", "bold"), f"  [{unit}]  ", (state, "green" if report.ok else "bold red")
    )
    table = Table(title=title, title_justify="left", expand=False)
    table.add_column("peak")
    table.add_column("value", justify="right")
    table.add_column(Text("at [deg]"), justify="right")
    table.add_column("limit", justify="right")
    table.add_column("used", justify="right")
    table.add_column("verdict")
    for q in QUANTITIES:
        p = report.peaks[q]
        value = "infinite" if p.infinite else fmt(p.value)
        check = limits.get(q)
        table.add_row(
            Text(f"{q} [{unit}{POWER[q]}]"),  # Text: brackets are not markup
            value,
            angle_column(p.at),
            fmt(check.limit) if check else "—",
            used_text(check.used) if check else "—",
            verdict_text(check.used) if check else Text("no limit", style="dim"),
        )
    lines = [table]
    if report.max_speed is None:
        lines.append(Text(f"  max speed: no limit binds (now {fmt(report.speed)} cycles/min)"))
    else:
        style = "green" if report.max_speed >= report.speed else "bold red"
        lines.append(
            Text.assemble(
                "  max speed within limits: ",
                (f"{fmt(report.max_speed)} cycles/min", style),
                f" (now {fmt(report.speed)})",
            )
        )
    for j in report.joins:
        if j.velocity_jump:
            lines.append(
                Text(
                    f"  ! join at {fmt(j.at, 5)}° (segment {j.left}→{j.right}): velocity jumps by "
                    f"{fmt(j.velocity_jump)} {unit}/s — infinite acceleration and jerk",
                    style="yellow",
                )
            )
        if j.acceleration_jump:
            lines.append(
                Text(
                    f"  ! join at {fmt(j.at, 5)}° (segment {j.left}→{j.right}): acceleration jumps by "
                    f"{fmt(j.acceleration_jump)} {unit}/s² — infinite jerk",
                    style="yellow",
                )
            )
    return Group(*lines)
