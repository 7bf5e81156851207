"""Numbers, units and verdicts as the screens show them.

Every number goes out with its unit; pass/fail is a word and a symbol, and
colour only repeats it (16-colour terminals and colour-blind users read the
same thing).
"""

from __future__ import annotations

import math

from rich.text import Text

from ..axisreport import fmt, percent

POWER = {"position": "", "velocity": "/s", "acceleration": "/s²", "jerk": "/s³"}
BAR_WIDTH = 8  # cells of a share-of-limit bar (fits the peaks table in 80 columns)
OK_STYLE = "green"
OVER_STYLE = "bold red"
WARN_STYLE = "yellow"


def unit_of(quantity: str, unit: str) -> str:
    """"mm/s²" for acceleration of a mm axis."""
    return f"{unit}{POWER[quantity]}"


def number(value: float | None, unit: str, digits: int = 4) -> str:
    """A value with its unit: "16,085 mm/s²"; "—" when there is none."""
    if value is None:
        return "—"
    return f"{fmt(value, digits)} {unit}".rstrip()


ROUNDING_NOISE = 1e-9  # of a curve's largest value: below it, a value read off the curve is 0


def tidy(value: float, scale: float) -> float:
    """`value` read off a curve whose largest magnitude is `scale`, with rounding noise shown as 0
    (an acceleration of 1e-12 mm/s² in a dwell)."""
    return 0.0 if abs(value) <= ROUNDING_NOISE * scale else value


def degrees(value: float) -> str:
    """A master angle: "22.5°" (0.1° is finer than any screen shows)."""
    return f"{value:.1f}°" if abs(value - round(value)) > 1e-9 else f"{round(value):d}°"


def used_bar(used: float, width: int = BAR_WIDTH) -> Text:
    """A share of a limit as a bar and a percentage: "██████░░░░  61 %"; over 100 % ends in "▶"."""
    if math.isinf(used):
        return Text("█" * (width - 1) + "▶" + "    ∞ %", style=OVER_STYLE)
    filled = min(width, int(round(used * width)))
    bar = "█" * filled + "░" * (width - filled)
    if used > 1.0:
        bar = bar[:-1] + "▶"
    style = OVER_STYLE if used > 1.0 else (WARN_STYLE if used > 0.9 else OK_STYLE)
    return Text(f"{bar} {percent(used):>6}", style=style, no_wrap=True)


def verdict(used: float | None) -> Text:
    """"✓ within", "✗ OVER" or "· no limit"."""
    if used is None:
        return Text("· no limit", style="dim")
    if used > 1.0:
        return Text("✗ OVER", style=OVER_STYLE)
    return Text("✓ within", style=OK_STYLE)


def axis_verdict(ok: bool, has_limits: bool) -> Text:
    """An axis against its limits over the cycle: "✓ all within limits" or "✗ LIMIT EXCEEDED"."""
    if not has_limits:
        return Text("· no limits", style="dim")
    return Text("✓ all within limits", style=OK_STYLE) if ok else Text("✗ LIMIT EXCEEDED", style=OVER_STYLE)
