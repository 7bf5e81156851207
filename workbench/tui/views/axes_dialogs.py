"""Edits of the Axes view, each wired to one pure edit of `workbench.editing`.

A typed cell of the segment table (span, end position, time) is edited in
place: its function returns a `CellEdit`.  The others return a dialog screen
whose result is the edited project (or None).  Each also returns the note
that names the edit for undo and the status line.
"""

from __future__ import annotations

from typing import Callable

from motionlaws import Limits, analyse

from ... import editing
from ...axisreport import percent
from ...editing import EditError, parse_number, segment_ends
from ...projectfile import Project
from ..format import number, unit_of
from ..screens.add_segment import AddSegmentDialog
from ..screens.edit_value import EditDialog
from ..screens.fields_dialog import Field, FieldsDialog
from ..screens.law_picker import LawPicker
from ..screens.model_dialog import ModelDialog
from ..widgets.cell_editor import CellEdit

DEGREE_UNITS = ("deg", "°")

Note = str | Callable[[Project], str]
"""What names a dialog's edit for undo and the status line: words, or words made from the result."""


def describe(old: Project, new: Project, axis_name: str) -> str:
    """What changed in an axis, in a line: spans, ends and laws that differ."""
    if new.speed != old.speed:
        return f"machine {number(old.speed, 'cycles/min')} → {number(new.speed, 'cycles/min')}"
    a, b = old.axis(axis_name), new.axis(axis_name)
    if len(a.segments) != len(b.segments):
        return f"{len(b.segments)} segments: " + ", ".join(f"{s.law} {s.span:g}°" for s in b.segments)
    parts = []
    ends_a, ends_b = segment_ends(a), segment_ends(b)
    for i, (sa, sb) in enumerate(zip(a.segments, b.segments), start=1):
        if sa.law != sb.law:
            parts.append(f"segment {i}: {sa.law} → {sb.law}")
        if sa.span != sb.span:
            parts.append(f"segment {i} ({sb.law}): {sa.span:g}° → {sb.span:g}°")
        if ends_a[i - 1][1] != ends_b[i - 1][1] and sa.law == sb.law:
            parts.append(f"segment {i} ends at {ends_b[i - 1][1]:g} {a.unit} (was {ends_a[i - 1][1]:g})")
    if a.limits != b.limits:
        parts.append("limits changed")
    if not parts:
        worst = most_used(new, [axis_name])
        return "no change" + (f" — now: {worst}" if worst else "")
    return "; ".join(parts) + verdict_after(new, axis_name)


def most_used(project: Project, axis_names: list[str]) -> str:
    """"jerk at 116 % of its limit, LIMIT EXCEEDED": the most used limit of the named axes
    (the axis named too when there are several); "" when none has limits."""
    worst, ok, unlimited = None, True, []
    for name in axis_names:
        report = analyse(project.programs[name], project.speed)
        ok = ok and report.ok
        if not report.checks:
            unlimited.append(name)
        for check in report.checks:
            if worst is None or check.used > worst[1].used:
                worst = (name, check)
    if worst is None:
        return ""
    name, check = worst
    if check.used == float("inf"):
        return f"{who_of(name, axis_names)}{check.quantity} infinite (the motion jumps), LIMIT EXCEEDED"
    share = percent(check.used)
    if not ok:
        state = "LIMIT EXCEEDED"
    elif len(axis_names) == 1:
        state = "all within limits"
    else:
        state = "all axes within limits" if not unlimited else \
            f"all limits met; {', '.join(unlimited)}: no limits"
    return f"{who_of(name, axis_names)}{check.quantity} at {share} of its limit, {state}"


def who_of(name: str, axis_names: list[str]) -> str:
    """"lid-lift " when a verdict is over several axes, else nothing."""
    return f"{name} " if len(axis_names) > 1 else ""


def verdict_after(project: Project, axis_name: str) -> str:
    """" — then: jerk at 49 % of its limit, all within limits" for the edited axis."""
    worst = most_used(project, [axis_name])
    return f" — then: {worst}" if worst else ""


def verdict_all(project: Project) -> str:
    """" — then: lid-lift jerk at 116 % of its limit, LIMIT EXCEEDED" over every axis (a
    machine speed moves them all)."""
    worst = most_used(project, [a.name for a in project.axes])
    return f" — then: {worst}" if worst else ""


def _choices(project: Project, axis_name: str, skip: int | None) -> list[tuple[str, int]]:
    axis = project.axis(axis_name)
    return [(f"{i + 1} {s.law} {s.span:g}°", i) for i, s in enumerate(axis.segments) if i != skip]


DONOR_PROMPT = "difference taken from / given to"
NEW_SPAN = 30.0  # deg: a new segment's span, unless the segment giving it has less than twice that
NEAREST = -1  # the donor choice "the nearest dwell after it that can" (`editing.default_donor`)


def _donor_choices(project: Project, axis_name: str, index: int) -> tuple[tuple[str, int], ...]:
    """Who gives or takes a span's difference: the nearest dwell that can, then each other segment."""
    if len(project.axis(axis_name).segments) < 2:
        return ()
    return (("nearest dwell that can", NEAREST), *_choices(project, axis_name, index))


def _typed(text: str, shown: str, exact: float, what: str, **rules) -> float:
    """The number typed; the value as shown (rounded) stands for the exact one it was shown
    from, so Enter on an untouched cell changes nothing."""
    value = parse_number(text, what, **rules)
    return exact if text.strip() == shown else value


def span_note(before: Project, after: Project, axis_name: str, index: int, what: str) -> str:
    """"span of segment 1: 90° → 100° (segment 2 gave 10°)" — what a span or time edit did."""
    old, new = before.axis(axis_name).segments, after.axis(axis_name).segments
    if what == "time":
        ms = 60_000.0 / before.speed / 360.0
        text = f"time of segment {index + 1}: {old[index].span * ms:.4g} → {new[index].span * ms:.4g} ms"
    else:
        text = f"span of segment {index + 1}: {old[index].span:g}° → {new[index].span:g}°"
    for j, (a, b) in enumerate(zip(old, new)):
        if j != index and a.span != b.span:
            verb = "gave" if b.span < a.span else "took"
            text += f" (segment {j + 1} {verb} {abs(b.span - a.span):g}°)"
    return text


def span_edit(project: Project, axis_name: str, index: int) -> tuple[CellEdit, Note]:
    axis = project.axis(axis_name)
    seg = axis.segments[index]
    shown = f"{seg.span:g}"

    def attempt(text, choice):
        span = _typed(text, shown, seg.span, "span", positive=True, units=DEGREE_UNITS)
        return editing.set_span(project, axis_name, index, span, choice)

    edit = CellEdit(
        f"span of segment {index + 1} ({seg.law}), axis {axis_name}",
        "span [deg] — the spans of an axis sum to 360°",
        shown, attempt, lambda p: describe(project, p, axis_name),
        choices=_donor_choices(project, axis_name, index), choice_prompt=DONOR_PROMPT, choice=NEAREST,
    )
    return edit, lambda p: span_note(project, p, axis_name, index, "span")


def time_edit(project: Project, axis_name: str, index: int) -> tuple[CellEdit, Note]:
    axis = project.axis(axis_name)
    seg = axis.segments[index]
    ms = seg.span / 360.0 * 60_000.0 / project.speed
    shown = f"{ms:.4g}"

    def attempt(text, choice):
        value = _typed(text, shown, ms, "time", positive=True, units=("ms",))
        return editing.set_duration(project, axis_name, index, value / 1000.0, choice)

    edit = CellEdit(
        f"time of segment {index + 1} ({seg.law}) at {number(project.speed, 'cycles/min')}",
        "time [ms] — sets the span at the machine speed; the spans sum to 360°",
        shown, attempt, lambda p: describe(project, p, axis_name),
        choices=_donor_choices(project, axis_name, index), choice_prompt=DONOR_PROMPT, choice=NEAREST,
    )
    return edit, lambda p: span_note(project, p, axis_name, index, "time")


def end_edit(project: Project, axis_name: str, index: int) -> tuple[CellEdit, Note]:
    axis = project.axis(axis_name)
    seg = axis.segments[index]
    start, end = segment_ends(axis)[index]
    if seg.law == "dwell":
        raise EditError(f"segment {index + 1} is a dwell: it holds {number(start, axis.unit)}; "
                        "change its law (l) to make it move")

    shown = f"{end:g}"

    def attempt(text, _choice):
        return editing.set_to(project, axis_name, index, _typed(text, shown, end, "to", units=(axis.unit,)))

    edit = CellEdit(
        f"end position of segment {index + 1} ({seg.law}), axis {axis_name}",
        f"to [{axis.unit}] — it starts at {number(start, axis.unit)}; the last segment must end "
        f"at the axis start{' + index' if axis.index else ''}",
        shown, attempt, lambda p: describe(project, p, axis_name),
    )
    return edit, lambda p: (f"end position of segment {index + 1}: {end:g} → "
                            f"{segment_ends(p.axis(axis_name))[index][1]:g} {axis.unit}")


def law_dialog(project: Project, axis_name: str, index: int) -> tuple[ModelDialog, Note]:
    seg = project.axis(axis_name).segments[index]
    screen = LawPicker(f"Law of segment {index + 1} ({seg.law}, {seg.span:g}°), axis {axis_name}",
                       seg.law, lambda law: editing.set_law(project, axis_name, index, law),
                       lambda p: describe(project, p, axis_name))

    def note(p: Project) -> str:
        return f"law of segment {index + 1}: {seg.law} → {p.axis(axis_name).segments[index].law}"

    return screen, note


def speed_dialog(project: Project) -> tuple[ModelDialog, Note]:
    m = project.machine
    form = (" (the file gives cycle_time; it stays a cycle time when that is a short decimal)"
            if m.speed is None else "")

    shown = f"{project.speed:g}"

    def attempt(text, _choice):
        speed = _typed(text, shown, project.speed, "speed", positive=True, units=("cycles/min", "cpm", "/min"))
        return project if speed == project.speed else editing.set_speed(project, speed)

    def explain(p: Project) -> str:
        kept = p.machine.cycle_time is not None
        saved = "" if m.speed is not None else ("; saved as cycle_time" if kept else "; saved as speed")
        return (f"{number(p.speed, 'cycles/min')} = {number(60_000.0 / p.speed, 'ms')} per cycle{saved}"
                + verdict_all(p))

    def note(p: Project) -> str:
        return f"machine speed {number(project.speed, 'cycles/min')} → {number(p.speed, 'cycles/min')}"

    screen = EditDialog("Machine speed", f"speed [cycles/min]{form}:", shown, attempt, explain)
    return screen, note


def limits_dialog(project: Project, axis_name: str) -> tuple[ModelDialog, Note]:
    axis = project.axis(axis_name)
    fields = [Field(q, f"{q} [{unit_of(q, axis.unit)}]", "" if value is None else f"{value:,.12g}", "blank: no limit")
              for q, value in axis.limits.items()]

    def attempt(texts: tuple[str, ...]) -> Project:
        limits = Limits(**{q: _typed(text, f.value, old, f"{q} limit", positive=True, allow_blank=True,
                                     units=(unit_of(q, axis.unit),))
                           for (q, old), text, f in zip(axis.limits.items(), texts, fields)})
        return project if limits == axis.limits else editing.set_limits(project, axis_name, limits)

    screen = FieldsDialog(f"Limits of axis {axis_name}", fields, attempt,
                          lambda p: most_used(p, [axis_name]), hint="blank: no limit")

    def note(p: Project) -> str:
        return f"limits of axis {axis_name}: " + limits_change(axis, p.axis(axis_name))

    return screen, note


def limits_change(before, after) -> str:
    """"velocity 900 → 999 mm/s, jerk none → 500,000 mm/s³": the limits that differ, written out
    in full and grouped as the peaks table shows them."""
    def shown(value: float | None) -> str:
        return "none" if value is None else f"{value:,.12g}"

    parts = []
    for (q, old), (_, new) in zip(before.limits.items(), after.limits.items()):
        if old != new:
            parts.append(f"{q} {shown(old)} → {shown(new)} {unit_of(q, before.unit)}")
    return ", ".join(parts) or "unchanged"


def add_dialog(project: Project, axis_name: str, index: int) -> tuple[ModelDialog, Note]:
    axis = project.axis(axis_name)
    position = segment_ends(axis)[index][1]
    donor = editing.add_donor(axis, index)
    span = min(NEW_SPAN, round(axis.segments[donor].span / 2.0, 1))  # one the giver can spare

    def attempt(law, span, to, donor_index):
        return editing.insert_segment(project, axis_name, index, law, span, to, donor_index)

    def note(p: Project) -> str:
        old, new = project.axis(axis_name).segments, p.axis(axis_name).segments
        added = new[index + 1]
        gave = next((j for j, (a, b) in enumerate(zip(old, new[:index + 1] + new[index + 2:])) if a.span != b.span),
                    None)
        text = f"new segment {index + 2} ({added.law}, {added.span:g}°)"
        return text + (f"; segment {gave + 1} gave its span" if gave is not None else "")

    screen = AddSegmentDialog(
        f"New segment after segment {index + 1}, axis {axis_name}", axis.unit, position,
        _choices(project, axis_name, None), donor, attempt,
        lambda p: describe(project, p, axis_name), span=span,
    )
    return screen, note
