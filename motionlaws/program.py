"""Segments, axes and their compiled motion programs.

An axis moves through ordered segments that together span one machine cycle
(360 master degrees).  `compile_axis` checks an `Axis` and turns it into a
`Program`, which evaluates position and its derivatives at any array of
master angles:

* `Program.master(theta)` — s and ds/dθ, d²s/dθ², d³s/dθ³ with θ in
  radians of master angle (unit, unit/rad, unit/rad², unit/rad³).  This is
  the cam function itself and does not depend on machine speed.
* `Program.kinematics(theta, speed)` — s, v, a, j in unit, unit/s, unit/s²,
  unit/s³ at a machine speed in cycles/min (ω = 2π·speed/60 rad/s, so
  v = ω·ds/dθ, a = ω²·d²s/dθ², j = ω³·d³s/dθ³).

Master angles are in degrees at the interface.  Angles outside [0, 360)
wrap; an indexing axis advances by `index` each cycle.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .laws import LAWS, law_ids
from .peaksearch import refined_max_abs
from .polyfit import hermite_coefficients

FULL_CYCLE = 360.0  # master degrees in one machine cycle
SPAN_SUM_TOLERANCE = 1e-9  # degrees: spans must sum to 360 within this
POSITION_TOLERANCE = 1e-9  # relative to the axis's position scale
BOUNDARY_SNAP = 1e-9  # degrees: angles this close below a segment start are on it


class ProgramError(ValueError):
    """An axis that cannot be compiled.

    `segment` is the 1-based segment number (None for the axis as a whole),
    `key` the project-file key at fault (None if no single key).
    """

    def __init__(self, message: str, segment: int | None = None, key: str | None = None):
        super().__init__(message)
        self.message = message
        self.segment = segment
        self.key = key


@dataclass(frozen=True)
class EndConditions:
    """Derivatives at one end of a `polynomial` segment, per master degree.

    velocity in unit/deg, acceleration in unit/deg², jerk in unit/deg³ (so
    that the motion scales exactly with machine speed).  A higher derivative
    may be given only with all lower ones.
    """

    velocity: float | None = None
    acceleration: float | None = None
    jerk: float | None = None

    def as_list(self) -> list[float]:
        out = []
        for value in (self.velocity, self.acceleration, self.jerk):
            if value is None:
                break
            out.append(float(value))
        return out


@dataclass(frozen=True)
class Segment:
    """One segment of an axis: a law over `span` master degrees, ending at `to`."""

    law: str
    span: float
    to: float | None = None
    start: EndConditions | None = None  # polynomial only
    end: EndConditions | None = None  # polynomial only


@dataclass(frozen=True)
class Limits:
    """Optional limits: velocity unit/s, acceleration unit/s², jerk unit/s³."""

    velocity: float | None = None
    acceleration: float | None = None
    jerk: float | None = None

    def items(self):
        return (("velocity", self.velocity), ("acceleration", self.acceleration), ("jerk", self.jerk))

    @property
    def any(self) -> bool:
        return any(v is not None for _, v in self.items())


@dataclass(frozen=True)
class Axis:
    """An axis: its name, unit ("mm" or "deg"), start position and segments.

    `index` is the advance per cycle of an indexing axis (None otherwise).
    """

    name: str
    segments: tuple[Segment, ...]
    unit: str = "mm"
    start: float = 0.0
    limits: Limits = field(default_factory=Limits)
    index: float | None = None


@dataclass(frozen=True)
class Machine:
    """The machine: a name and its speed, given as cycles/min or as seconds per cycle."""

    name: str = ""
    speed: float | None = None  # cycles per minute
    cycle_time: float | None = None  # seconds per cycle

    @property
    def cpm(self) -> float:
        """Machine speed in cycles per minute."""
        if self.speed is not None:
            return float(self.speed)
        if self.cycle_time is not None:
            return 60.0 / float(self.cycle_time)
        raise ProgramError("the machine needs a speed or a cycle_time", key="speed")


def omega(speed_cpm: float) -> float:
    """Master angular speed in rad/s at `speed_cpm` cycles per minute."""
    return 2.0 * math.pi * speed_cpm / 60.0


class SegmentShape:
    """A compiled segment: s(x) and d^k s/dx^k on x in [0, 1], in position units.

    Subclasses give `_shape(x)` and `peak(order)`.
    """

    law_id: str = ""
    breakpoints: tuple[float, ...] = ()

    def __init__(self, theta0: float, span: float, p0: float, p1: float):
        self.theta0 = theta0  # master degrees where the segment starts
        self.span = span  # master degrees
        self.p0 = p0
        self.p1 = p1

    @property
    def lift(self) -> float:
        return self.p1 - self.p0

    def shape(self, x):
        return self._shape(np.asarray(x, dtype=float))

    def shape_scaled(self, x, scales):
        """s and its x-derivatives each multiplied by scales = (c1, c2, c3)."""
        s, s1, s2, s3 = self._shape(x)
        return s, s1 * scales[0], s2 * scales[1], s3 * scales[2]

    def _shape(self, x):  # pragma: no cover - contract
        raise NotImplementedError

    def peak(self, order: int) -> tuple[float, float]:
        """(max |d^k s/dx^k| over the segment, x where it first occurs)."""
        return refined_max_abs(lambda x: self._shape(x)[order], self.breakpoints)

    def ends(self) -> tuple[tuple[float, ...], tuple[float, ...]]:
        """(s, s', s'', s''') per x^k at x = 0 and at x = 1."""
        values = self._shape(np.array([0.0, 1.0]))
        return tuple(float(v[0]) for v in values), tuple(float(v[1]) for v in values)


class LawShape(SegmentShape):
    """A registered normalized law scaled to the segment's lift."""

    def __init__(self, law, theta0, span, p0, p1):
        super().__init__(theta0, span, p0, p1)
        self.law = law
        self.law_id = law.id
        self.breakpoints = law.breakpoints

    def _shape(self, x):
        return self.shape_scaled(x, (1.0, 1.0, 1.0))

    def shape_scaled(self, x, scales):
        y, y1, y2, y3 = self.law.evaluate(x)
        h = self.lift
        if not self.law.moves:
            return np.full_like(x, self.p0), y1, y2, y3
        return self.p0 + h * y, y1 * (h * scales[0]), y2 * (h * scales[1]), y3 * (h * scales[2])

    def peak(self, order):
        value, where = self.law.peaks[order - 1] if order else (0.0, 0.0)
        return abs(self.lift) * value, where


class PolynomialShape(SegmentShape):
    """A segment polynomial in x from end conditions (laws `polynomial`, `blend`)."""

    def __init__(self, law_id, theta0, span, p0, p1, start: list[float], end: list[float]):
        super().__init__(theta0, span, p0, p1)
        self.law_id = law_id
        poly = np.polynomial.Polynomial(hermite_coefficients(start, end))
        self.polys = (poly, poly.deriv(1), poly.deriv(2), poly.deriv(3))

    def _shape(self, x):
        return tuple(p(x) for p in self.polys)


def _per_x(per_degree: list[float], span: float) -> list[float]:
    """Derivatives per master degree^k (k = 1, 2, …) to per x^k over a span."""
    return [d * span ** (k + 1) for k, d in enumerate(per_degree)]


def _check_number(value, what: str, segment: int | None, key: str, positive=False):
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise ProgramError(f"{what} must be a finite number, got {value!r}", segment, key)
    if positive and value <= 0:
        raise ProgramError(f"{what} must be positive, got {value!r}", segment, key)


def compile_axis(axis: Axis) -> "Program":
    """Check `axis` and build its `Program`; raise `ProgramError` on the first fault."""
    if not axis.segments:
        raise ProgramError("an axis needs at least one segment", key="segment")
    _check_number(axis.start, "start", None, "start")
    if axis.index is not None:
        _check_number(axis.index, "index", None, "index")
    for name, value in axis.limits.items():
        if value is not None:
            _check_number(value, f"limit {name}", None, f"limits.{name}", positive=True)
    known = set(law_ids())
    theta = 0.0
    position = float(axis.start)
    scale = max(abs(axis.start), abs(axis.index or 0.0), *(abs(s.to or 0.0) for s in axis.segments), 1.0)
    plan = []  # (number, segment, theta0, p0, p1)
    for number, seg in enumerate(axis.segments, start=1):
        if seg.law not in known:
            raise ProgramError(
                f"unknown law {seg.law!r}; known laws: {', '.join(law_ids())}", number, "law"
            )
        _check_number(seg.span, "span", number, "span", positive=True)
        if seg.law == "dwell":
            if seg.to is not None:
                _check_number(seg.to, "to", number, "to")
                if abs(seg.to - position) > POSITION_TOLERANCE * scale:
                    raise ProgramError(
                        f"a dwell holds its position: to = {seg.to!r} differs from {position!r}",
                        number,
                        "to",
                    )
            target = position
        else:
            if seg.to is None:
                raise ProgramError(f"law {seg.law!r} needs an end position 'to'", number, "to")
            _check_number(seg.to, "to", number, "to")
            target = float(seg.to)
        if seg.law != "polynomial" and (seg.start is not None or seg.end is not None):
            raise ProgramError(
                "end conditions 'start'/'end' belong to law 'polynomial' only", number, "start"
            )
        for key, cond in (("start", seg.start), ("end", seg.end)):
            if cond is None:
                continue
            given = [cond.velocity, cond.acceleration, cond.jerk]
            for name, value in zip(("velocity", "acceleration", "jerk"), given):
                if value is not None:
                    _check_number(value, f"{key}.{name}", number, f"{key}.{name}")
            if len(cond.as_list()) != sum(v is not None for v in given):
                raise ProgramError(
                    f"{key}: give acceleration only with velocity, jerk only with acceleration",
                    number,
                    key,
                )
        plan.append((number, seg, theta, position, target))
        theta += float(seg.span)
        position = target
    if abs(theta - FULL_CYCLE) > SPAN_SUM_TOLERANCE:
        raise ProgramError(f"spans sum to {theta:g} master degrees, not 360", key="span")
    goal = float(axis.start) + float(axis.index or 0.0)
    if abs(position - goal) > POSITION_TOLERANCE * scale:
        what = f"start + index = {goal:g}" if axis.index else f"its start {goal:g}"
        raise ProgramError(
            f"the last segment ends at {position:g}, not at {what}"
            + ("" if axis.index else " (an indexing axis declares 'index')"),
            len(axis.segments),
            "to",
        )

    shapes: list[SegmentShape | None] = [None] * len(plan)
    for i, (number, seg, theta0, p0, p1) in enumerate(plan):
        if seg.law in LAWS:
            shapes[i] = LawShape(LAWS[seg.law], theta0, seg.span, p0, p1)
        elif seg.law == "polynomial":
            start = [p0] + _per_x((seg.start or EndConditions()).as_list(), seg.span)
            end = [p1] + _per_x((seg.end or EndConditions()).as_list(), seg.span)
            shapes[i] = PolynomialShape("polynomial", theta0, seg.span, p0, p1, start, end)
    n = len(plan)
    for i, (number, seg, theta0, p0, p1) in enumerate(plan):
        if seg.law != "blend":
            continue
        left, right = shapes[(i - 1) % n], shapes[(i + 1) % n]
        if left is None or right is None or n < 3:
            raise ProgramError(
                "a blend takes its end conditions from its neighbours, which must not be blends",
                number,
                "law",
            )
        # Derivatives per x of the neighbours, rescaled to this segment's span.
        left_end = left.ends()[1]
        right_start = right.ends()[0]
        start = [p0] + [left_end[k] * (seg.span / left.span) ** k for k in (1, 2)]
        end = [p1] + [right_start[k] * (seg.span / right.span) ** k for k in (1, 2)]
        shapes[i] = PolynomialShape("blend", theta0, seg.span, p0, p1, start, end)
    return Program(axis, tuple(shapes))  # type: ignore[arg-type]


class Program:
    """A compiled axis: evaluates motion at any array of master angles (degrees)."""

    def __init__(self, axis: Axis, shapes: tuple[SegmentShape, ...]):
        self.axis = axis
        self.shapes = shapes
        self.bounds = np.array([s.theta0 for s in shapes] + [FULL_CYCLE])
        self._spans_rad = np.radians([s.span for s in shapes])

    @property
    def index(self) -> float:
        return float(self.axis.index or 0.0)

    def _evaluate(self, theta_deg, rate: float):
        """Rows s, d^k s/dθ^k · rate^k for k = 1..3 (θ in rad).

        rate = 1 gives the master-angle derivatives, rate = ω the time derivatives.
        """
        theta = np.asarray(theta_deg, dtype=float)
        flat = theta.ravel()
        out = np.empty((4, flat.size))
        if flat.size == 0:
            return tuple(row.reshape(theta.shape) for row in out)
        if flat.min() >= 0.0 and flat.max() < FULL_CYCLE:
            t, cycles = flat, None
        else:
            cycles = np.floor(flat / FULL_CYCLE)
            t = flat - cycles * FULL_CYCLE
        # An angle a hair below a boundary (30° that came back from radians as
        # 29.999999999999996°) belongs to the segment that starts there.
        seg = np.searchsorted(self.bounds, t + BOUNDARY_SNAP, side="right") - 1
        np.clip(seg, 0, len(self.shapes) - 1, out=seg)
        if flat.size > 1 and np.all(seg[1:] >= seg[:-1]):  # sorted: contiguous slices
            cuts = np.searchsorted(seg, np.arange(len(self.shapes) + 1))
            groups = [slice(a, b) for a, b in zip(cuts[:-1], cuts[1:])]
        else:
            groups = [np.flatnonzero(seg == k) for k in range(len(self.shapes))]
        for k, (shape, where) in enumerate(zip(self.shapes, groups)):
            c = rate / self._spans_rad[k]  # d/dθ·(1/rate) = (1/β) d/dx
            x = (t[where] - shape.theta0) * (1.0 / shape.span)
            s, s1, s2, s3 = shape.shape_scaled(x, (c, c * c, c * c * c))
            out[0, where] = s
            out[1, where] = s1
            out[2, where] = s2
            out[3, where] = s3
        if cycles is not None and self.index:
            out[0] += cycles * self.index
        return tuple(row.reshape(theta.shape) for row in out)

    def master(self, theta_deg):
        """s, ds/dθ, d²s/dθ², d³s/dθ³ at master angles (degrees in; derivatives per radian)."""
        return self._evaluate(theta_deg, 1.0)

    def kinematics(self, theta_deg, speed_cpm: float):
        """s, v, a, j (unit, unit/s, unit/s², unit/s³) at master angles θ (deg) and machine speed."""
        return self._evaluate(theta_deg, omega(speed_cpm))

    def table(self, speed_cpm: float, step_deg: float = 1.0):
        """(θ, s, v, a, j) rows from 0 up to but not including 360 degrees."""
        count = int(math.ceil(FULL_CYCLE / step_deg - 1e-9))
        theta = np.round(np.arange(count) * step_deg, 9)
        return (theta, *self.kinematics(theta, speed_cpm))
