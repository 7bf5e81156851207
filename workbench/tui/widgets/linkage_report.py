"""The Linkage view's words: how the solve went, the drivers, one output's peaks against its limits.

Every number carries its unit; pass/fail is a word and a symbol, and colour
only repeats it.  `LinkageReport.rows` and `.lines` keep what is shown, for
tests.  A linkage that does not run says where (master angle), why, and
which joints are involved; an under-driven one names its free motions.
"""

from __future__ import annotations

import math

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.widgets import Static

from solver.kinematics import DEAD_POINT, GROUND, NOT_ASSEMBLED, NOT_DRIVEN, REASONS, SOLVED

from ...axisreport import fmt, percent
from ...linkagefile import describe, split_ref
from ...linkagereport import driver_words
from ..format import OK_STYLE, OVER_STYLE, WARN_STYLE, degrees, number, unit_of, used_bar, verdict
from .linkage_data import FULL_TURN, STUDY_FAILED, LinkageEntry
from .linkage_drawing import INVOLVED_MARK

RATES = ("velocity", "acceleration", "jerk")
LEAST_TRANSMISSION = 40.0  # deg: common practice (a rule of thumb, no single source)
NEAR_ZERO = 1e-9  # a shown value this small (in its unit) is 0: what is left of a cancellation
NARROW_TABLE = 54  # columns of a typical peaks table without the share column (before a study is known)
BARS, PERCENT = "bars", "percent"  # how the share of each limit is shown, widest first
SHARE_COLUMN = {BARS: len("share of limit") + 1, PERCENT: len("used") + 2}  # its columns with the gap before
NEAR_LIMIT = 0.9  # a share above this is shown as a warning (as the Axes view does)
COLUMN_GAP = (0, 1, 0, 0)
READOUT_ROWS = 5  # angle and output, rates, drivers, legend (which may wrap)


def num(value: float) -> str:
    return fmt(0.0 if abs(value) < NEAR_ZERO else value)


def at_text(angle: float) -> str:
    """A peak's master angle on screen, 0.1° resolution, in [0, 360)."""
    return degrees(round(angle % FULL_TURN, 1) % FULL_TURN)


def stop_text(angle: float) -> str:
    """Where a linkage stops, to 0.01°: a dead point is worth the second decimal."""
    return f"{angle:.2f}°"


def status_words(entry: LinkageEntry | None) -> tuple[str, str]:
    """(words, style) of a linkage's state, for the bar: "✓ solved, every output within limits", …"""
    if entry is None:
        return "(computing…)", "dim"
    if entry.study is None:
        failed = (entry.problem or "").startswith(STUDY_FAILED)
        return ("✗ COULD NOT BE STUDIED" if failed else "✗ CANNOT BE BUILT"), OVER_STYLE
    status = entry.status
    if status == SOLVED:
        if not any(o.checks for o in entry.study.outputs):
            return "✓ solved · no limits set", OK_STYLE
        if entry.study.ok:
            return "✓ solved, every output within limits", OK_STYLE
        return "✗ solved, LIMIT EXCEEDED", OVER_STYLE
    if status == DEAD_POINT:
        return f"✗ DEAD POINT at master {stop_text(entry.study.stop_at)}", OVER_STYLE
    if status == NOT_ASSEMBLED:
        return f"✗ NOT ASSEMBLED at master {stop_text(entry.study.stop_at or 0.0)}", OVER_STYLE
    dof = entry.study.solution.result.dof
    if status == NOT_DRIVEN and dof is not None and dof.dof:
        return f"✗ NOT DRIVEN: {dof.dof} free degree(s) of freedom", OVER_STYLE
    if status == NOT_DRIVEN:
        return "✗ OVER-CONSTRAINED", OVER_STYLE
    return f"✗ {status}", OVER_STYLE


def bar_text(names: list[str], spec, entry: LinkageEntry | None, project, width: int) -> Text:
    """The view's top line: which linkage, its state in words, then what it is made of as far as it
    fits in `width` ("linkage ◂ pusher ▸ 1/2 (, .)  ✓ solved, … · 3 bodies · 4 joints · machine …")."""
    if spec is None:
        return Text("")
    text = Text(no_wrap=True, overflow="ellipsis")
    text.append("linkage ", style="dim")
    text.append(f"◂ {spec.name} ▸", style="bold")
    text.append(f" {names.index(spec.name) + 1}/{len(names)}", style="dim")
    text.append(" (, .)" if len(names) > 1 else "", style="dim")
    text.append("  ")
    words, style = status_words(entry)
    text.append(words, style=style)
    pieces = [f"{len(spec.bodies)} bodies", f"{len(spec.joints)} joints",
              f"machine {num(project.speed)} cycles/min"]
    room = width - len(text.plain)
    for piece in pieces:  # as many as fit whole
        if len(piece) + 3 > room:
            break
        text.append(" · ", style="dim")
        text.append(piece, style="dim")
        room -= len(piece) + 3
    return text


def trouble_lines(entry: LinkageEntry) -> list[tuple[str, str]]:
    """Why the linkage does not run through the cycle, in words: (line, style)."""
    if entry.study is None:
        words, style = status_words(entry)
        return [(words, style), (entry.problem or "", ""), (f"drawn {entry.still_words}", "dim")]
    result = entry.study.solution.result
    words, style = status_words(entry)
    out = [(words, style)]
    if entry.status == DEAD_POINT and result.dead_point is not None:
        dead = result.dead_point
        out.append((REASONS.get(dead.reason, dead.reason) + ".", ""))
        joints = ", ".join(f"{j}{INVOLVED_MARK}" for j in dead.joints) or "none named"
        out.append((f"joints involved: {joints} (marked in the drawing)", OVER_STYLE))
        if dead.bodies:
            out.append((f"bodies it moves: {', '.join(dead.bodies)}", ""))
        out.append((f"drawn stopped at {stop_text(entry.last)}, the last solved angle; ← goes back", "dim"))
    elif entry.status == NOT_DRIVEN and result.dof is not None:
        dof = result.dof
        out.append((f"{dof.coordinates} coordinates, {dof.equations} equations, rank {dof.rank}", ""))
        for i, motion in enumerate(dof.free, start=1):
            joints = ", ".join(motion.joints) or "none"
            out.append((f"free motion {i}: moves {', '.join(motion.bodies)}; joints it works: {joints}", ""))
        if dof.free:
            out.append(("drive one of those joints or bodies (a [[linkage.driver]])", WARN_STYLE))
        if dof.redundant:
            out.append((f"{dof.redundant} equation(s) depend on others among: {', '.join(dof.dependent)} — "
                        "remove one of them or free a joint", WARN_STYLE))
        out.append((f"drawn {entry.still_words}", "dim"))
    else:
        out.append((result.message, ""))
        if entry.gaps:
            gaps = ", ".join(f"{name}{INVOLVED_MARK}" + (f" ({num(gap)} mm apart)" if gap is not None else "")
                             for name, gap in entry.gaps)
            out.append((f"joints that stay open: {gaps}", OVER_STYLE))
        out.append((f"drawn {entry.still_words}", "dim"))
    return out


def motor_pin(entry: LinkageEntry, output) -> str | None:
    """The ground pin whose angle an output reports when no driver turns it (an output-driven
    linkage: the output is the profile a motor there must run), else None."""
    if output.target.kind != "joint":
        return None
    joint = entry.spec.joint(output.target.of)
    if joint is None or joint.kind != "pin":
        return None
    if GROUND not in (split_ref(joint.first)[0], split_ref(joint.second)[0]):
        return None
    driven = {d.target.of for d in entry.spec.drivers if d.target.kind == "joint"}
    return None if joint.name in driven else joint.name


def output_header(entry: LinkageEntry, name: str, width: int = 1000) -> Text:
    """"output ◂ stroke ▸ 1/2 (o) · travel on slider slide [mm]  ✓ within limits" (the verdict
    only when it fits in `width`: the table's verdicts say it too)."""
    spec = entry.spec
    names = [o.name for o in spec.outputs]
    output = spec.output(name)
    study = entry.output_study(name)
    unit = entry.traces[name].unit if name in entry.traces else ""
    text = Text(no_wrap=False)
    text.append("output ", style="dim")
    text.append(f"◂ {name} ▸", style="bold")
    text.append(f" {names.index(name) + 1}/{len(names)}" + (" (o)" if len(names) > 1 else ""), style="dim")
    text.append(f" · {describe(output.target, spec)}" + (f" [{unit}]" if unit else ""))
    pin = motor_pin(entry, output)
    if pin is not None:
        text.append(f" · the motor profile at pin {pin} (output-driven)", style="bold")
    if study is not None:
        if not study.checks:
            verdict_words = ("  · no limits set", "dim")
        elif study.ok:
            verdict_words = ("  ✓ within limits", OK_STYLE)
        else:
            verdict_words = ("  ✗ LIMIT EXCEEDED", OVER_STYLE)
        if len(text.plain) + len(verdict_words[0]) <= width or not study.ok:
            text.append(*verdict_words)
    return text


def peak_rows(entry: LinkageEntry, name: str) -> dict[str, dict]:
    """The output's extremes and peaks as the table shows them (strings; `used` a share or None)."""
    study = entry.output_study(name)
    if study is None:
        return {}
    unit = study.unit
    checks = {c.quantity: c for c in study.checks}
    rows = {
        "lowest": {"value": number(study.minimum.value, unit), "at": at_text(study.minimum.at), "limit": "",
                   "used": None, "verdict": ""},
        "highest": {"value": number(study.maximum.value, unit), "at": at_text(study.maximum.at), "limit": "",
                    "used": None, "verdict": ""},
    }
    for q in RATES:
        peak, check = study.peaks[q], checks.get(q)
        u = unit_of(q, unit)
        rows[q] = {"value": "infinite" if peak.infinite else number(0.0 if abs(peak.value) < NEAR_ZERO else peak.value, u),
                   "at": at_text(peak.at), "limit": number(check.limit, u) if check else "—",
                   "used": check.used if check else None, "verdict": verdict(check.used if check else None).plain}
    return rows


def max_speed_text(entry: LinkageEntry, name: str, width: int = 1000) -> Text | None:
    """"max speed within limits ✓ 87.32 cycles/min (now 80 cycles/min)"; without "within limits"
    when that would not fit in `width` (max speed means within every limit)."""
    study = entry.output_study(name)
    if study is None:
        return None
    now = f"(now {number(study.speed, 'cycles/min')})"
    if study.max_speed is None:
        return Text(f"max speed: no limit binds {now}", style="dim")
    ok = study.max_speed >= study.speed
    value = f"{'✓' if ok else '✗'} {number(study.max_speed, 'cycles/min')}"
    label = "max speed within limits " if len(value) + len(now) + 25 <= width else "max speed "
    return Text.assemble(label, (value, OK_STYLE if ok else OVER_STYLE), f" {now}")


def note_lines(entry: LinkageEntry, name: str) -> list[str]:
    """Jumps where a driver's axis changes segment, turn-backs and a low transmission angle."""
    study = entry.output_study(name)
    output = entry.spec.output(name)
    if study is None:
        return []
    out = []
    unit = study.unit
    for j in study.jumps:
        if j.velocity_jump:
            out.append(f"! at {at_text(j.at)} a driver changes segment: velocity jumps "
                       f"{number(j.velocity_jump, unit + '/s')}, acceleration and jerk ∞")
        else:
            out.append(f"! at {at_text(j.at)} a driver changes segment: acceleration jumps "
                       f"{number(j.acceleration_jump, unit + '/s²')}, jerk ∞")
    if study.folds:
        where = ", ".join(at_text(a) for a in study.folds)
        out.append(f"! turns back at {where} (lines at 90° or parallel): its rate flips sign, acceleration ∞")
    if output.target.kind == "transmission" and study.minimum.value < LEAST_TRANSMISSION:
        out.append(f"! falls to {num(study.minimum.value)}°, below {LEAST_TRANSMISSION:g}° "
                   "(common practice): the linkage may bind")
    return out


def table_width(entry: LinkageEntry | None, output: str | None, share: str | None = PERCENT) -> int:
    """Columns the peaks table of `output` takes with the share of each limit shown as `share`:
    `BARS`, `PERCENT` or None (not shown)."""
    rows = peak_rows(entry, output) if entry is not None and output is not None else {}
    if not rows:
        return NARROW_TABLE + SHARE_COLUMN.get(share, 0)
    columns = [max(len("peaks"), *(len(k) for k in rows))]
    for key, title in (("value", "value"), ("at", "at"), ("limit", "limit"), ("verdict", "verdict")):
        columns.append(max(len(title), *(len(r[key]) for r in rows.values())))
    if share is not None:
        columns.append(SHARE_COLUMN[share] - 1)
    return sum(columns) + len(columns) - 1  # one blank column between columns


def share_cell(used: float | None, share: str) -> Text:
    """The share of a limit used, as a bar with its percentage or as the percentage alone."""
    if used is None:
        return Text("—", style="dim")
    if share == BARS:
        return used_bar(used)
    style = OVER_STYLE if used > 1.0 else (WARN_STYLE if used > NEAR_LIMIT else OK_STYLE)
    return Text("∞ %" if math.isinf(used) else percent(used), style=style)


def side_rows(entry: LinkageEntry | None, output: str | None) -> int:
    """Rows the readout or the report needs, whichever is taller, when they stand side by side."""
    if entry is None:
        return READOUT_ROWS
    drivers = sum(2 if d.axis else 1 for d in entry.spec.drivers) or 1  # one following an axis takes two lines
    if entry.status != SOLVED:
        report = len(trouble_lines(entry)) + drivers
    elif output is None:
        report = 1 + drivers
    else:
        report = 1 + 6 + 1 + len(note_lines(entry, output)) + drivers  # header, table, max speed
        report += 1 if motor_pin(entry, entry.spec.output(output)) else 0  # a longer header
        report += 1  # a header or a note that wraps
    return max(READOUT_ROWS, report)


class LinkageReport(Static):
    """How the solve went, the drivers and the chosen output's peaks against its limits."""

    DEFAULT_CSS = "LinkageReport { height: auto; }"

    def __init__(self, **kwargs):
        super().__init__("", **kwargs)
        self.rows: dict[str, dict] = {}
        """The chosen output's rows as shown (lowest, highest, velocity, acceleration, jerk)."""
        self.lines: list[str] = []
        """Every other line as shown (status, drivers, notes), plain text."""
        self._shown: tuple | None = None
        self._entry: LinkageEntry | None = None
        self._output: str | None = None

    def show(self, entry: LinkageEntry | None, output: str | None) -> None:
        key = (id(entry), output, self.size.width)
        if key == self._shown:
            return
        self._shown, self._entry, self._output = key, entry, output
        self.rows, self.lines = {}, []
        if entry is None:
            self.update(Text("computing …", style="dim"))
            return
        parts = []
        if entry.status != SOLVED:
            for line, style in trouble_lines(entry):
                parts.append(Text(line, style=style))
        if entry.status == SOLVED and output is not None:
            parts += self._output_parts(entry, output)
        elif entry.status == SOLVED:
            parts.append(Text("no outputs: add a [[linkage.output]] to see its peaks", style="dim"))
        for d in entry.spec.drivers:
            parts.append(Text.assemble(("driver ", "dim"), (d.name, "bold"), f": {driver_words(entry.spec, d)}"))
        if not entry.spec.drivers:
            parts.append(Text("no drivers: a [[linkage.driver]] turns a joint or follows an axis", style="dim"))
        self.lines = [p.plain for p in parts if isinstance(p, Text)]
        self.update(Group(*parts))

    def _share(self, entry, output) -> str | None:
        """How the share of each limit fits in this width: bars, the percentage, or not at all."""
        for share in (BARS, PERCENT):
            if self.size.width >= table_width(entry, output, share):
                return share
        return None

    def on_resize(self) -> None:
        if self._shown is not None and self._shown[2] != self.size.width:
            self.show(self._entry, self._output)

    def _output_parts(self, entry: LinkageEntry, output: str) -> list:
        share = self._share(entry, output)
        self.rows = peak_rows(entry, output)
        table = Table(box=None, padding=COLUMN_GAP, show_edge=False, pad_edge=False, expand=False,
                      header_style="bold")
        for name, justify in (("peaks", "left"), ("value", "right"), ("at", "right"), ("limit", "right")):
            table.add_column(name, justify=justify, no_wrap=True)
        if share is not None:
            table.add_column("share of limit" if share == BARS else "used", no_wrap=True,
                             justify="left" if share == BARS else "right")
        table.add_column("verdict", no_wrap=True)
        for what, row in self.rows.items():
            cells = [what, Text(row["value"], style=OVER_STYLE if row["value"] == "infinite" else ""), row["at"],
                     row["limit"]]
            if share is not None:
                cells.append(Text("") if what in ("lowest", "highest") else share_cell(row["used"], share))
            cells.append(verdict(row["used"]) if what not in ("lowest", "highest") else Text(""))
            table.add_row(*cells)
        parts = [output_header(entry, output, self.size.width), table]
        speed = max_speed_text(entry, output, self.size.width)
        if speed is not None:
            parts.append(speed)
        parts += [Text(line, style=WARN_STYLE) for line in note_lines(entry, output)]
        return parts
