"""Edit operations on a `Project`, free of any user interface.

Every operation takes a project and returns a new one (the old one is never
changed), or raises `EditError` with a reason a user can read.  The changed
axis is compiled before the new project is returned, so a project that comes
out of here is as valid as one loaded from a file.

Spans of an axis must sum to 360 master degrees.  An operation that changes
one span therefore names a *donor*: the segment that gives (or takes) the
difference.  `default_donor` picks the nearest dwell after the segment that
can give it (a dwell is the usual slack in a cycle), else the nearest
dwell, else the next segment.

Segment numbers here are 0-based indices; messages show them 1-based, as the
screens and the project file's error messages do.
"""

from __future__ import annotations

import math
from dataclasses import replace

from motionlaws import LAWS, Axis, Limits, Machine, ProgramError, Segment, compile_axis, law_ids

from .projectfile import Project

FULL_CYCLE = 360.0  # master degrees in one cycle
SPAN_DIGITS = 9  # spans are rounded to 1e-9 deg after arithmetic, so sums stay at 360 exactly enough
QUANTITIES = ("velocity", "acceleration", "jerk")


class EditError(ValueError):
    """An edit that was refused; `message` says why, `field` names what was typed into."""

    def __init__(self, message: str, field: str | None = None):
        super().__init__(message)
        self.message = message
        self.field = field


# --- reading typed values ----------------------------------------------------

def parse_number(text: str, what: str, *, positive: bool = False, allow_blank: bool = False,
                 units: tuple[str, ...] = ()) -> float | None:
    """A finite number from what a user typed; a trailing unit from `units` is allowed.

    Blank gives None when `allow_blank`, else an error.  Thousands separators
    "_" and "," and spaces are ignored ("25,000" is 25000).
    """
    raw = text.strip()
    for unit in sorted(units, key=len, reverse=True):
        if raw.endswith(unit):
            raw = raw[: -len(unit)].strip()
            break
    if not raw:
        if allow_blank:
            return None
        raise EditError(f"{what}: type a number", what)
    cleaned = raw.replace("_", "").replace(",", "").replace(" ", "")
    try:
        value = float(cleaned)
    except ValueError:
        raise EditError(f"{what}: {raw!r} is not a number", what) from None
    if not math.isfinite(value):
        raise EditError(f"{what}: must be finite, got {raw!r}", what)
    if positive and value <= 0:
        raise EditError(f"{what}: must be above 0, got {raw}", what)
    return value + 0.0  # "-0" is 0 (not shown or saved as -0)


# --- helpers -----------------------------------------------------------------

def axis_index(project: Project, name: str) -> int:
    for i, axis in enumerate(project.axes):
        if axis.name == name:
            return i
    raise EditError(f"no axis named {name!r}", "axis")


def _check_segment(axis: Axis, index: int) -> Segment:
    if not 0 <= index < len(axis.segments):
        raise EditError(f"axis {axis.name!r} has no segment {index + 1}", "segment")
    return axis.segments[index]


def segment_ends(axis: Axis) -> list[tuple[float, float]]:
    """(from, to) position of every segment, in the axis unit (dwells hold their start)."""
    out = []
    position = float(axis.start)
    for seg in axis.segments:
        end = position if seg.law == "dwell" or seg.to is None else float(seg.to)
        out.append((position, end))
        position = end
    return out


def _with_axis(project: Project, axis: Axis, old_name: str | None = None) -> Project:
    """A new project with `axis` in place of the axis called `old_name` (default: its own name)."""
    old_name = old_name or axis.name
    i = axis_index(project, old_name)
    try:
        program = compile_axis(axis)
    except ProgramError as exc:
        where = f"segment {exc.segment}: " if exc.segment else ""
        raise EditError(f"{where}{exc.message}", exc.key) from None
    axes = list(project.axes)
    axes[i] = axis
    programs = {(axis.name if k == old_name else k): (program if k == old_name else v)
                for k, v in project.programs.items()}
    return replace(project, axes=axes, programs=programs)


def _with_segments(project: Project, axis: Axis, segments) -> Project:
    return _with_axis(project, replace(axis, segments=tuple(segments)))


def _segment_label(axis: Axis, index: int) -> str:
    seg = axis.segments[index]
    return f"segment {index + 1} ({seg.law}, {seg.span:g}°)"


# --- machine -----------------------------------------------------------------

SHORT_CYCLE_TIME = 8  # characters: a cycle time written shorter than this is kept as the file's form


def set_speed(project: Project, cycles_per_minute: float) -> Project:
    """Machine speed in cycles/min.  A machine given by cycle time keeps that form when the new
    cycle time is a short decimal (75 → 0.8 s); else the speed is written as typed (90, not a
    cycle time of 0.6666666666666666 s)."""
    if not (math.isfinite(cycles_per_minute) and cycles_per_minute > 0):
        raise EditError(f"speed: must be above 0 cycles/min, got {cycles_per_minute:g}", "speed")
    m = project.machine
    cycle_time = 60.0 / cycles_per_minute
    if m.cycle_time is not None and m.speed is None and len(repr(cycle_time)) < SHORT_CYCLE_TIME:
        machine = replace(m, cycle_time=cycle_time)
    else:
        machine = replace(m, speed=float(cycles_per_minute), cycle_time=None)
    return replace(project, machine=machine)


def set_machine_name(project: Project, name: str) -> Project:
    return replace(project, machine=replace(project.machine, name=name.strip()))


# --- axis --------------------------------------------------------------------

def set_limits(project: Project, axis_name: str, limits: Limits) -> Project:
    """Replace the limits of an axis (each None for no limit, else above 0)."""
    for q, value in limits.items():
        if value is not None and not (math.isfinite(value) and value > 0):
            raise EditError(f"{q} limit: must be above 0 (or blank for no limit), got {value:g}", q)
    axis = project.axes[axis_index(project, axis_name)]
    return _with_axis(project, replace(axis, limits=limits))


def set_limit(project: Project, axis_name: str, quantity: str, value: float | None) -> Project:
    if quantity not in QUANTITIES:
        raise EditError(f"unknown limit {quantity!r}; limits are {', '.join(QUANTITIES)}", quantity)
    axis = project.axes[axis_index(project, axis_name)]
    return set_limits(project, axis_name, replace(axis.limits, **{quantity: value}))


# --- spans -------------------------------------------------------------------

def default_donor(axis: Axis, index: int, need: float = 0.0) -> int | None:
    """The segment that gives or takes span when `index` changes by `need` deg: the nearest dwell
    after it with more than `need` to give (any dwell takes when `need` ≤ 0), else the nearest
    dwell after it (which then refuses with the reason), else the next segment."""
    n = len(axis.segments)
    if n < 2:
        return None
    dwells = [j for j in ((index + step) % n for step in range(1, n)) if axis.segments[j].law == "dwell"]
    for j in dwells:
        if round(axis.segments[j].span - need, SPAN_DIGITS) > 0:
            return j
    return dwells[0] if dwells else (index + 1) % n


def add_donor(axis: Axis, index: int) -> int:
    """The segment that gives the span of a segment added after `index`: that one when it is a
    dwell, else the nearest dwell after it (the motions keep their durations), else that one."""
    if axis.segments[index].law == "dwell":
        return index
    donor = default_donor(axis, index)
    return donor if donor is not None and axis.segments[donor].law == "dwell" else index


def _rebalanced(axis: Axis, index: int, new_span: float, donor: int | None) -> list[Segment]:
    """Segments with segment `index` at `new_span` and the difference taken from `donor`."""
    segments = list(axis.segments)
    old = segments[index].span
    if not (math.isfinite(new_span) and new_span > 0):
        raise EditError(f"span: must be above 0°, got {new_span:g}", "span")
    if abs(new_span - old) <= 1e-12:
        return segments
    if donor is None:
        raise EditError("span: an axis of one segment always spans 360°; add a segment first", "span")
    if donor == index or not 0 <= donor < len(segments):
        raise EditError("span: choose another segment to give or take the difference", "span")
    left = round(segments[donor].span - (new_span - old), SPAN_DIGITS)
    if left <= 0:
        raise EditError(
            f"span: {_segment_label(axis, donor)} cannot give {new_span - old:g}° "
            f"(it would have {left:g}° left); choose another segment to take it from", "span")
    segments[index] = replace(segments[index], span=round(new_span, SPAN_DIGITS))
    segments[donor] = replace(segments[donor], span=left)
    return segments


def set_span(project: Project, axis_name: str, index: int, span: float, donor: int | None = -1) -> Project:
    """Segment span in master degrees; `donor` absorbs the difference (-1: `default_donor`, the
    nearest dwell after it that can)."""
    axis = project.axes[axis_index(project, axis_name)]
    seg = _check_segment(axis, index)
    if donor == -1:
        donor = default_donor(axis, index, span - seg.span)
    return _with_segments(project, axis, _rebalanced(axis, index, span, donor))


def span_for_duration(project: Project, seconds: float) -> float:
    """Master degrees that last `seconds` at the machine speed."""
    return seconds * project.speed / 60.0 * FULL_CYCLE


def set_duration(project: Project, axis_name: str, index: int, seconds: float, donor: int | None = -1) -> Project:
    """Segment duration in s at the machine speed (changes its span)."""
    if not (math.isfinite(seconds) and seconds > 0):
        raise EditError(f"time: must be above 0 ms, got {seconds * 1e3:g}", "time")
    cycle = 60.0 / project.speed
    if seconds >= cycle:
        raise EditError(f"time: one cycle lasts {cycle * 1e3:g} ms at this speed; "
                        f"a segment must be shorter", "time")
    return set_span(project, axis_name, index, span_for_duration(project, seconds), donor)


# --- law and positions -------------------------------------------------------

def set_law(project: Project, axis_name: str, index: int, law: str) -> Project:
    """Change a segment's law.  A dwell drops its end position; a dwell that starts
    moving ends where it started until `to` is changed; end conditions stay only
    on a `polynomial`."""
    if law not in law_ids():
        raise EditError(f"law: unknown law {law!r}; known laws: {', '.join(law_ids())}", "law")
    axis = project.axes[axis_index(project, axis_name)]
    seg = _check_segment(axis, index)
    _, end = segment_ends(axis)[index]
    if law == "dwell":
        new = Segment(law="dwell", span=seg.span)
    else:
        keep = law == "polynomial"
        new = Segment(law=law, span=seg.span, to=end,
                      start=seg.start if keep else None, end=seg.end if keep else None)
    segments = list(axis.segments)
    segments[index] = new
    return _with_segments(project, axis, segments)


def set_to(project: Project, axis_name: str, index: int, to: float) -> Project:
    """End position of a moving segment (axis unit)."""
    axis = project.axes[axis_index(project, axis_name)]
    seg = _check_segment(axis, index)
    if seg.law == "dwell":
        raise EditError("to: a dwell holds its position; change the segment before it, "
                        "or change this one's law first", "to")
    if not math.isfinite(to):
        raise EditError(f"to: must be finite, got {to!r}", "to")
    segments = list(axis.segments)
    segments[index] = replace(seg, to=float(to))
    return _with_segments(project, axis, segments)


# --- segments ----------------------------------------------------------------

def insert_segment(project: Project, axis_name: str, after: int, law: str, span: float,
                   to: float | None = None, donor: int | None = -1) -> Project:
    """Insert a segment after segment `after` (-1: at the front); `donor` gives its span
    (-1: the segment it follows, or the first one when inserting at the front).
    A moving segment without `to` ends where it starts."""
    axis = project.axes[axis_index(project, axis_name)]
    if law not in law_ids():
        raise EditError(f"law: unknown law {law!r}; known laws: {', '.join(law_ids())}", "law")
    if not -1 <= after < len(axis.segments):
        raise EditError(f"axis {axis.name!r} has no segment {after + 1}", "segment")
    if not (math.isfinite(span) and span > 0):
        raise EditError(f"span: must be above 0°, got {span:g}", "span")
    if donor == -1:
        donor = max(after, 0)
    if not 0 <= donor < len(axis.segments):
        raise EditError("span: choose a segment to give the new segment's span", "span")
    left = round(axis.segments[donor].span - span, SPAN_DIGITS)
    if left <= 0:
        raise EditError(f"span: {_segment_label(axis, donor)} cannot give {span:g}° "
                        f"(it would have {left:g}° left)", "span")
    at = segment_ends(axis)[after][1] if after >= 0 else float(axis.start)
    if law == "dwell":
        new = Segment(law="dwell", span=round(span, SPAN_DIGITS))
    else:
        new = Segment(law=law, span=round(span, SPAN_DIGITS), to=at if to is None else float(to))
    segments = list(axis.segments)
    segments[donor] = replace(segments[donor], span=left)
    segments.insert(after + 1, new)
    return _with_segments(project, axis, segments)


def default_heir(axis: Axis, index: int) -> int:
    """Who receives a deleted segment's span: a neighbouring dwell (before, then after), else the one before."""
    n = len(axis.segments)
    before, after = (index - 1) % n, (index + 1) % n
    for j in (before, after):
        if j != index and axis.segments[j].law == "dwell":
            return j
    return before


def delete_segment(project: Project, axis_name: str, index: int, heir: int | None = -1) -> Project:
    """Delete a segment; `heir` receives its span (-1: `default_heir`)."""
    axis = project.axes[axis_index(project, axis_name)]
    seg = _check_segment(axis, index)
    if len(axis.segments) < 2:
        raise EditError("delete: an axis needs at least one segment", "segment")
    if heir == -1:
        heir = default_heir(axis, index)
    if heir is None or heir == index or not 0 <= heir < len(axis.segments):
        raise EditError("delete: choose a segment to receive the freed span", "segment")
    segments = list(axis.segments)
    segments[heir] = replace(segments[heir], span=round(segments[heir].span + seg.span, SPAN_DIGITS))
    del segments[index]
    return _with_segments(project, axis, segments)


def split_segment(project: Project, axis_name: str, index: int) -> Project:
    """Halve a segment's span into two of the same law, meeting halfway in position.

    A polynomial keeps its start conditions on the first half and its end
    conditions on the second."""
    axis = project.axes[axis_index(project, axis_name)]
    seg = _check_segment(axis, index)
    start, end = segment_ends(axis)[index]
    half = round(seg.span / 2.0, SPAN_DIGITS)
    if seg.law == "dwell":
        first, second = Segment("dwell", half), Segment("dwell", round(seg.span - half, SPAN_DIGITS))
    else:
        middle = 0.5 * (start + end)
        first = Segment(seg.law, half, to=middle, start=seg.start)
        second = Segment(seg.law, round(seg.span - half, SPAN_DIGITS), to=seg.to, end=seg.end)
    segments = list(axis.segments)
    segments[index:index + 1] = [first, second]
    return _with_segments(project, axis, segments)


def move_segment(project: Project, axis_name: str, index: int, offset: int) -> Project:
    """Move a segment earlier (offset -1) or later (+1) in the cycle.  End positions
    stay with their segments, so the axis must still return to its start."""
    axis = project.axes[axis_index(project, axis_name)]
    _check_segment(axis, index)
    target = index + offset
    if not 0 <= target < len(axis.segments):
        where = "first" if target < 0 else "last"
        raise EditError(f"move: segment {index + 1} is already the {where}", "segment")
    segments = list(axis.segments)
    segments[index], segments[target] = segments[target], segments[index]
    return _with_segments(project, axis, segments)


def law_table() -> list[tuple[str, tuple[float, float, float] | None]]:
    """Every law id with its peak coefficients (Cv, Ca, Cj); None for the laws shaped per segment."""
    out: list[tuple[str, tuple[float, float, float] | None]] = []
    for law_id in law_ids():
        law = LAWS.get(law_id)
        out.append((law_id, law.coefficients if law is not None and law.moves else None))
    return out


# The edits that reach into cams and linkages (a cam's sizes, turning and limits, an axis renamed with
# what follows it) live in `editing_parts`, which imports this module: imported last, so either may be
# imported first.
from .editing_parts import (  # noqa: E402,F401
    axis_users, cam_sizes, rename_axis, reversed_turning, set_cam_limits, set_cam_size, set_cam_turning,
)
