"""Peaks, joins, limits and the highest machine speed of an axis.

All peaks are true maxima (refined, or exact for the handbook laws), found
per segment in master-angle units and scaled to time by ω = 2π·N/60:
v ∝ N, a ∝ N², j ∝ N³.  That scaling also gives the highest machine speed
that keeps every limit in closed form:
``N_max = N · min(v_lim/v, √(a_lim/a), ∛(j_lim/j))``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .program import FULL_CYCLE, Program, omega
from .peaksearch import TIE

QUANTITIES = ("velocity", "acceleration", "jerk")
JUMP_TOLERANCE = 1e-9  # a join jump smaller than this share of the axis's peak counts as none


@dataclass(frozen=True)
class Peak:
    """A peak magnitude (unit/s^k) and the master angle (deg) where it first occurs.

    `value` is None and `infinite` True where a lower derivative jumps.
    """

    value: float | None
    at: float
    infinite: bool = False


@dataclass(frozen=True)
class Join:
    """A join between two segments at master angle `at` (deg).

    Jumps are right minus left, in unit/s and unit/s² (0.0 when continuous).
    """

    at: float
    velocity_jump: float
    acceleration_jump: float
    left: int  # 1-based segment numbers
    right: int


@dataclass(frozen=True)
class SegmentPeaks:
    """Peaks of one segment and its dimensionless coefficients (Cv, Ca, Cj; None without lift)."""

    number: int
    law: str
    start: float  # master deg
    span: float  # master deg
    duration: float  # s at the analysed speed
    lift: float
    peaks: dict[str, Peak]
    coefficients: tuple[float, float, float] | None


@dataclass(frozen=True)
class LimitCheck:
    """One limit against its peak: `used` is peak/limit (inf where the peak is infinite)."""

    quantity: str
    limit: float
    peak: Peak
    used: float

    @property
    def ok(self) -> bool:
        return self.used <= 1.0

    @property
    def headroom(self) -> float:
        """Share of the limit still free (negative when over)."""
        return 1.0 - self.used


@dataclass(frozen=True)
class AxisReport:
    """Everything `check` says about one axis at one machine speed."""

    name: str
    unit: str
    speed: float  # cycles/min
    peaks: dict[str, Peak]
    segments: tuple[SegmentPeaks, ...]
    joins: tuple[Join, ...]
    checks: tuple[LimitCheck, ...]
    max_speed: float | None  # cycles/min; None without limits or when none binds

    @property
    def ok(self) -> bool:
        return all(c.ok for c in self.checks)


def _first_max(items):
    """The (value, at) with the largest value, the earliest on ties."""
    best = None
    for value, at in items:
        if best is None or value > best[0] * (1 + TIE):
            best = (value, at)
    return best


def master_peaks(program: Program):
    """Per segment: [(|d^k s/dθ^k| max in unit/rad^k, master deg)] for k = 1, 2, 3."""
    out = []
    for shape in program.shapes:
        b = math.radians(shape.span)
        row = []
        for k in (1, 2, 3):
            value, x = shape.peak(k)
            row.append((value / b**k, shape.theta0 + x * shape.span))
        out.append(row)
    return out


def joins(program: Program, per_segment=None) -> list[tuple[float, float, float, int, int]]:
    """(at deg, Δ ds/dθ, Δ d²s/dθ², left, right) at every join, wrap-around at 0° first."""
    per_segment = per_segment or master_peaks(program)
    n = len(program.shapes)
    ref = [max(row[k][0] for row in per_segment) for k in range(2)]
    out = []
    for i in range(n):
        left, right = program.shapes[i - 1], program.shapes[i]
        _, l_end = left.ends()
        r_start, _ = right.ends()
        jumps = []
        for k in (1, 2):
            jump = r_start[k] / math.radians(right.span) ** k - l_end[k] / math.radians(left.span) ** k
            if abs(jump) <= JUMP_TOLERANCE * ref[k - 1]:
                jump = 0.0
            jumps.append(jump)
        out.append((right.theta0, jumps[0], jumps[1], (i - 1) % n + 1, i + 1))
    return out


def analyse(program: Program, speed_cpm: float) -> AxisReport:
    """Peaks per segment and per axis, joins, limit checks and max speed at `speed_cpm`."""
    w = omega(speed_cpm)
    per_segment = master_peaks(program)
    raw_joins = joins(program, per_segment)
    segments = []
    for number, (shape, row) in enumerate(zip(program.shapes, per_segment), start=1):
        peaks = {q: Peak(v * w ** (k + 1), at) for k, (q, (v, at)) in enumerate(zip(QUANTITIES, row))}
        coeffs = None
        if shape.lift != 0.0:
            coeffs = tuple(shape.peak(k)[0] / abs(shape.lift) for k in (1, 2, 3))
        duration = shape.span / FULL_CYCLE * 60.0 / speed_cpm
        segments.append(
            SegmentPeaks(number, shape.law_id, shape.theta0, shape.span, duration, shape.lift, peaks, coeffs)
        )
    axis_master = [_first_max(row[k] for row in per_segment) for k in range(3)]
    peaks = {q: Peak(v * w ** (k + 1), at) for k, (q, (v, at)) in enumerate(zip(QUANTITIES, axis_master))}
    v_jumps = [(abs(dv), at) for at, dv, _, _, _ in raw_joins if dv]
    a_jumps = [(abs(da), at) for at, _, da, _, _ in raw_joins if da]
    if v_jumps:
        at = _first_max(v_jumps)[1]
        peaks["acceleration"] = Peak(None, at, True)
        peaks["jerk"] = Peak(None, at, True)
    elif a_jumps:
        peaks["jerk"] = Peak(None, _first_max(a_jumps)[1], True)

    checks = []
    bounds = []  # highest ω each limit allows
    for k, (q, limit) in enumerate(program.axis.limits.items()):
        if limit is None:
            continue
        peak = peaks[q]
        used = math.inf if peak.infinite else peak.value / limit
        checks.append(LimitCheck(q, float(limit), peak, used))
        master = axis_master[k][0]
        if peak.infinite:
            bounds.append(0.0)
        elif master > 0.0:
            bounds.append((limit / master) ** (1.0 / (k + 1)))
    max_speed = None
    if bounds:
        max_speed = min(bounds) * 60.0 / (2.0 * math.pi)
    join_list = tuple(
        Join(at, dv * w, da * w * w, left, right) for at, dv, da, left, right in raw_joins
    )
    return AxisReport(
        program.axis.name,
        program.axis.unit,
        float(speed_cpm),
        peaks,
        tuple(segments),
        join_list,
        tuple(checks),
        max_speed,
    )
