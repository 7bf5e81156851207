"""The cam's checks against its limits and its least radii, as a compact table.

Every number carries its unit; each limit says where it comes from — the
file, or common practice (a rule of thumb, marked `*`); pass/fail is a word
and a symbol, colour only repeats it.  `rows` and `radii` keep the shown
text for tests.
"""

from __future__ import annotations

import math

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.widgets import Static

from ...axisreport import fmt
from ...camfile import COMMON_PRACTICE, FROM_FILE
from ..format import OK_STYLE, OVER_STYLE, WARN_STYLE, degrees, used_bar
from .cam_data import MM, CamEntry

NEAR_ZERO = 1e-9  # a shown value this small (in its unit) is 0: what is left of a cancellation
PRACTICE_MARK = "*"  # beside a limit that is common practice, not from the file
NOTE = f"{PRACTICE_MARK} common practice (rule of thumb): no limit in the file"
COLUMN_GAP = (0, 1, 0, 0)  # one space between columns: the table fits beside the drawing at 80 columns
WIDE = 76  # from this width on, the table shows the share of each limit as a bar
LIMIT_HEADER = "limit (L)"  # with the Cam view's key that changes the limits (not in the footer at 80 columns)
LABELS = {
    "pivot_clearance": "pivot clearance",
    "pressure_angle": "pressure angle",
    "undercut": "undercut",
    "curvature_ratio": "curvature ratio",
    "cusp": "cusp",
    "face_width": "face width",
    "min_radius": "profile radius",
    "corner": "corners",
}
FAIL = {"pivot_clearance": "✗ IN CAM", "pressure_angle": "✗ OVER", "undercut": "✗ UNDERCUT",
        "curvature_ratio": "✗ TOO SHARP", "cusp": "✗ CUSP", "face_width": "✗ TOO NARROW", "min_radius": "✗ TOO SHARP", "corner": "✗ CORNER"}
PASS = {"pivot_clearance": "✓ clear", "undercut": "✓ none", "cusp": "✓ none"}


def num(value: float) -> str:
    """A number as the screens show it (4 significant digits), a rounding speck as 0."""
    return fmt(0.0 if abs(value) < NEAR_ZERO else value)


def angle(rad: float) -> str:
    """A cam angle in rad as deg on screen: "278.3°"."""
    return degrees(round(math.degrees(rad) % 360.0, 1) % 360.0)


def stretches(intervals) -> str:
    return ", ".join(f"{angle(i.start)}–{angle(i.end)}" for i in intervals)


def _source(entry: CamEntry, quantity: str) -> str:
    source = entry.study.limit_source.get(quantity)
    return f" {PRACTICE_MARK}" if source == COMMON_PRACTICE else (" file" if source == FROM_FILE else "")


def _row(entry: CamEntry, c) -> dict:
    """One check as the strings the table shows."""
    q, a = c.quantity, entry.study.analysis
    at = angle(c.at)
    if q == "pivot_clearance":  # pivot distance − the outline's largest radius; the cam must pass outside it
        value, limit = f"{num(c.value * MM)} mm", "> 0 mm"
    elif q == "pressure_angle":
        value, limit = f"{num(math.degrees(c.value))}°", f"≤ {num(math.degrees(c.limit))}°{_source(entry, q)}"
    elif q == "undercut":  # judged on the least convex pitch radius against the roller radius
        value, limit = f"{num(c.value * MM)} mm", f"> {num(c.limit * MM)} mm roller"
    elif q == "curvature_ratio":
        value, limit = f"{c.value:.2f}×", f"≥ {num(c.limit)}×{_source(entry, q)}"
    elif q == "cusp":  # judged on the least profile radius
        value, limit = f"{num(c.value * MM)} mm", "> 0 mm"
    elif q == "face_width":
        value, limit = f"{num(c.value * MM)} mm", f"≤ {num(c.limit * MM)} mm face"
    elif q == "min_radius":
        value, limit = f"{num(c.value * MM)} mm", f"≥ {num(c.limit * MM)} mm{_source(entry, q)}"
    else:
        value = f"{len(a.corners)} at " + ", ".join(angle(x) for x in a.corners)
        limit, at = "none", ""
    verdict = PASS.get(q, "✓ within") if c.ok else FAIL[q]
    return {"check": LABELS[q], "value": value, "at": at, "limit": limit, "used": c.used, "verdict": verdict,
            "ok": c.ok}


def check_rows(entry: CamEntry) -> list[dict]:
    """The cam's checks in the verdict's order."""
    return [_row(entry, c) for c in entry.study.verdict.checks]


def radius_rows(entry: CamEntry) -> list[dict]:
    """Least convex and concave radius of the pitch curve (rollers) and of the profile."""
    a = entry.study.analysis
    out = []
    for name, radii in (("pitch curve", a.pitch_radii), ("profile", a.profile_radii)):
        if radii is None:
            continue
        h = radii.concave
        out.append({"curve": name, "convex": f"{num(radii.convex.value * MM)} mm", "convex_at": angle(radii.convex.at),
                    "concave": "none" if h is None else f"{num(h.value * MM)} mm",
                    "concave_at": "" if h is None else angle(h.at)})
    return out


def show_text(static: Static, text: Text) -> None:
    """Update a `Static` of automatic height, with a layout pass only when its wrapped height
    changes (a readout that changes at every key must not re-lay the screen each time)."""
    width = max(1, static.size.width)
    lines = len(text.wrap(static.app.console, width)) if width > 1 else -1
    layout = lines != getattr(static, "_shown_lines", None) or width == 1
    static._shown_lines = lines
    static.update(text, layout=layout)


def trouble_lines(entry: CamEntry) -> list[str]:
    """Where the profile cannot be cut, in words (marked × and ◆ in the drawing), and a pivot the cam reaches."""
    a = entry.study.analysis
    out = []
    clearance = entry.study.verdict.get("pivot_clearance")
    if clearance is not None and not clearance.ok:
        top = a.largest_radius
        out.append(f"✗ pivot not clear of the cam: its largest radius {num(top.value * MM)} mm (at "
                   f"{angle(top.at)}) reaches the pivot at {num(entry.study.cam.follower.pivot_distance * MM)} mm")
    if a.undercut:
        out.append(f"× undercut {stretches(a.undercut)}: the profile loops there")
    if a.cusp:
        out.append(f"× cusp {stretches(a.cusp)}: the face cannot follow there")
    if a.corners:
        out.append(f"◆ corner at {', '.join(angle(c) for c in a.corners)}: the axis velocity jumps")
    return out


class CamVerdicts(Static):
    """Checks, least radii and the common-practice note of one cam."""

    DEFAULT_CSS = "CamVerdicts { height: auto; }"

    def __init__(self, **kwargs):
        super().__init__("", **kwargs)
        self.entry: CamEntry | None = None
        self.rows: list[dict] = []
        """The checks as shown (strings), in order."""
        self.radii: list[dict] = []
        """The least radii as shown (strings)."""
        self._wide: bool | None = None

    def show(self, entry: CamEntry | None) -> None:
        if entry is self.entry and self._wide == self._is_wide():
            return
        self.entry = entry
        self._paint()

    def _is_wide(self) -> bool:
        return self.size.width >= WIDE

    def on_resize(self) -> None:
        if self._wide != self._is_wide():
            self._paint()

    def _paint(self) -> None:
        entry = self.entry
        self._wide = self._is_wide()
        if entry is None or entry.study is None:
            self.rows, self.radii = [], []
            self.update("")
            return
        self.rows, self.radii = check_rows(entry), radius_rows(entry)
        table = Table(box=None, padding=COLUMN_GAP, show_edge=False, expand=False, header_style="bold")
        for name, justify in (("check", "left"), ("value", "right"), ("at", "right"), (LIMIT_HEADER, "left")):
            table.add_column(name, justify=justify, no_wrap=True)
        if self._wide:
            table.add_column("share of limit", no_wrap=True)
        table.add_column("verdict", no_wrap=True)
        for row in self.rows:
            cells = [row["check"], row["value"], row["at"], row["limit"]]
            if self._wide:
                used = row["used"]
                cells.append(used_bar(used) if used is not None else Text("—", style="dim"))
            cells.append(Text(row["verdict"], style=OK_STYLE if row["ok"] else OVER_STYLE))
            table.add_row(*cells)
        radii = Table(box=None, padding=COLUMN_GAP, show_edge=False, expand=False, header_style="bold")
        for name, justify in (("least radius", "left"), ("convex", "right"), ("at", "right"),
                              ("concave", "right"), ("at", "right")):
            radii.add_column(name, justify=justify, no_wrap=True)
        for r in self.radii:
            radii.add_row(r["curve"], r["convex"], r["convex_at"], r["concave"], r["concave_at"])
        parts = [table]
        if COMMON_PRACTICE in entry.study.limit_source.values():
            parts.append(Text(NOTE, style="dim"))
        parts += [Text(line, style=WARN_STYLE) for line in trouble_lines(entry)]
        parts.append(radii)
        self.update(Group(*parts))
