"""Peaks against limits, max speed and join warnings of one axis."""

from __future__ import annotations

from rich.cells import cell_len
from rich.segment import Segment
from rich.text import Text
from textual.geometry import Size
from textual.strip import Strip
from textual.widget import Widget

from motionlaws.peaks import QUANTITIES

from ..compute import AxisResult
from ..format import BAR_WIDTH, OVER_STYLE, OK_STYLE, WARN_STYLE, degrees, number, unit_of, used_bar, verdict

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


class PeaksPanel(Widget):
    """A compact peaks-vs-limits table; `rows` keeps the shown values for tests.

    The lines are laid out as Rich `Text` (the table's columns padded by
    hand, `table_lines`) and painted from strips kept until the result or
    the width changes; a layout pass is asked for only when the number of
    lines may change.  The table keeps one line per quantity (narrower
    forms first, `table_lines`); the other lines wrap."""

    DEFAULT_CSS = """
    PeaksPanel { height: auto; }
    """

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.result: AxisResult | None = None
        self.cells: list[list[Text]] = []
        """The table: a header, then one row per quantity (`COLUMNS`)."""
        self.lines: list[Text] = [Text("computing …", style="dim")]
        """The lines under the table (max speed, joins), before wrapping."""
        self.rows: dict[str, dict] = {}
        """Per quantity: value, at, limit, used, verdict text as shown."""
        self._version = 0
        """Counts what was shown (keys the caches below)."""
        self._wrapped: tuple[tuple, list[Text]] = ((), [])
        self._strips: tuple[tuple, list[Strip]] = ((), [])

    def show(self, result: AxisResult | None) -> None:
        if result is not None and result is self.result:
            return
        self.result = result
        before = len(self.cells) + len(self.lines)
        if result is None:
            self.rows, self.cells = {}, []
            self.lines = [Text("computing …", style="dim")]
        else:
            self.rows, self.cells = peak_rows(result)
            joins = join_lines(result) or [Text("joins: ✓ no jumps in velocity or acceleration", style="dim")]
            self.lines = [max_speed_line(result), *joins]
        self._version += 1
        wraps = any(line.cell_len > self.size.width for line in self.lines)  # the height may change
        self.refresh(layout=wraps or len(self.cells) + len(self.lines) != before)

    def _lines_at(self, width: int) -> list[Text]:
        """The lines as shown at `width`: the table in the widest form that fits, others wrapped."""
        key = (self._version, width)
        if self._wrapped[0] != key:
            console, out = self.app.console, table_lines(self.cells, width) if self.cells else []
            for line in self.lines:
                out += line.wrap(console, width) if line.cell_len > width > 0 else [line]
            self._wrapped = (key, out)
        return self._wrapped[1]

    def get_content_height(self, container: Size, viewport: Size, width: int) -> int:
        return len(self._lines_at(width))

    def render_line(self, y: int) -> Strip:
        width, style = self.size.width, self.rich_style
        key = (self._version, width, style)
        if self._strips[0] != key:
            console = self.app.console
            strips = [Strip(Segment.apply_style(line.render(console), style)).adjust_cell_length(width, style)
                      for line in self._lines_at(width)]
            self._strips = (key, strips)
        strips = self._strips[1]
        return strips[y] if y < len(strips) else Strip.blank(width, style)


COLUMNS = (  # (header, justify) of the peaks table
    ("peaks", "left"), ("value", "right"), ("at", "right"), ("limit", "right"),
    ("share of limit", "left"), ("verdict", "left"),
)
CELL_PAD = 1  # spaces either side of every cell (two between columns)


def peak_rows(result: AxisResult) -> tuple[dict[str, dict], list[list[Text]]]:
    """The values per quantity (`PeaksPanel.rows`) and the table's cells: a bold header, then one
    row per quantity."""
    report = result.report
    checks = {c.quantity: c for c in report.checks}
    rows, cells = {}, [[Text(header, style="bold") for header, _ in COLUMNS]]
    for q in QUANTITIES:
        peak = report.peaks[q]
        unit = unit_of(q, result.unit)
        check = checks.get(q)
        value = "infinite" if peak.infinite else number(peak.value, unit)
        used = check.used if check else None
        word = verdict(used)
        limit = number(check.limit, unit) if check else "—"
        cells.append([
            Text(q),
            Text(value, style=OVER_STYLE if peak.infinite else ""),
            Text(degrees(peak.at)),
            Text(limit),
            used_bar(used) if used is not None else Text("—", style="dim"),
            word,
        ])
        rows[q] = {"value": value, "at": degrees(peak.at), "limit": limit, "used": used, "verdict": word.plain}
    return rows, cells


def table_lines(cells: list[list[Text]], width: int) -> list[Text]:
    """Rows of cells as lines, each column padded to its widest cell (justified as `COLUMNS` says)
    with `CELL_PAD` spaces either side: the widest form that fits in `width` of (1) that,
    (2) without the pad at the table's outer edges, (3) the share of limit as a percentage only
    (no bar); the last form cropped when nothing fits."""
    for outer, bars in ((True, True), (False, True), (False, False)):
        rows = cells if bars else [[*row[:SHARE], share_only(row[SHARE], header=i == 0), *row[SHARE + 1:]]
                                   for i, row in enumerate(cells)]
        lines = _padded(rows, outer)
        if max(line.cell_len for line in lines) <= width:
            break
    return lines


SHARE = 4  # column of the share of limit


def share_only(cell: Text, header: bool) -> Text:
    """The share-of-limit cell without its bar ("71 %"), or the header shortened ("share")."""
    if header:
        return Text("share", style=cell.style)
    plain = cell.plain
    if plain == "—":
        return cell
    start = BAR_WIDTH + 1
    while start < len(plain) and plain[start] == " ":
        start += 1
    return cell[start:]


def _padded(rows: list[list[Text]], outer: bool) -> list[Text]:
    widths = [max(cell_len(row[c].plain) for row in rows) for c in range(len(COLUMNS))]
    pad, last = " " * CELL_PAD, len(COLUMNS) - 1
    lines = []
    for row in rows:
        line = Text(no_wrap=True, overflow="crop")
        for c, (cell, width, (_, justify)) in enumerate(zip(row, widths, COLUMNS)):
            space = " " * (width - cell_len(cell.plain))
            if outer or c > 0:
                line.append(pad)
            if justify == "right":
                line.append(space)
            line.append_text(cell)
            if justify != "right" and c < last:
                line.append(space)
            if outer or c < last:
                line.append(pad)
        lines.append(line)
    return lines
