"""The TOML project file (DESIGN §6): load, check, save atomically.

`load_project` returns a `Project` whose axes are already compiled, so a
loaded project is known to be valid; every fault is one `ProjectError`
naming file, table and key.  `dumps` writes the canonical layout, and
load → save → load gives the identical project.

Linkage, cam and load tables are parts of their own (`PARTS`): each part
module registers a parser and a writer for its top-level key.
"""

from __future__ import annotations

import os
import tempfile
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable

from motionlaws import (
    Axis,
    EndConditions,
    Limits,
    Machine,
    Program,
    ProgramError,
    Segment,
    compile_axis,
)

from .tomlcheck import ProjectError, Table
from .tomlmerge import merge_text
from .tomlwrite import dumps as toml_dumps

FILE_VERSION = 1
UNITS = ("mm", "deg")


@dataclass(frozen=True)
class Part:
    """A top-level array of tables handled by its own module.

    `parse(tables, project, file)` gets the raw list of tables and the project
    parsed so far (machine and axes), and returns the part's objects; `dump`
    turns them back into plain TOML data.
    """

    key: str
    parse: Callable[[list, "Project", Any], Any]
    dump: Callable[[Any], list]


PARTS: dict[str, Part] = {}


def register_part(part: Part) -> None:
    PARTS[part.key] = part


@dataclass
class Project:
    """A machine, its axes (with compiled programs) and any further parts."""

    machine: Machine
    axes: list[Axis]
    programs: dict[str, Program] = field(default_factory=dict)
    parts: dict[str, Any] = field(default_factory=dict)
    path: Path | None = None
    source_text: str | None = None  # the text it was loaded from: saves keep its comments

    def same_content(self, other: Project) -> bool:
        """True when `other` would write the same machine, axes and parts (an edit that
        changes nothing)."""
        return self.machine == other.machine and self.axes == other.axes and self.parts == other.parts

    def axis(self, name: str) -> Axis:
        for axis in self.axes:
            if axis.name == name:
                return axis
        raise KeyError(name)

    @property
    def speed(self) -> float:
        """Machine speed in cycles/min."""
        return self.machine.cpm


def _axis_label(name: str | None, number: int) -> str:
    return f'axis "{name}"' if name else f"axis {number}"


def _conditions(table: Table | None) -> EndConditions | None:
    if table is None:
        return None
    cond = EndConditions(
        velocity=table.number("velocity"),
        acceleration=table.number("acceleration"),
        jerk=table.number("jerk"),
    )
    table.done()
    return cond


def _parse_segment(raw, file, label: str) -> Segment:
    t = Table(raw, file, label)
    law = t.text("law", required=True)
    span = t.number("span", required=True, positive=True)
    to = t.number("to")
    start = _conditions(t.table("start", f"{label}, start"))
    end = _conditions(t.table("end", f"{label}, end"))
    t.done()
    return Segment(law=law, span=span, to=to, start=start, end=end)


def _parse_axis(raw, file, number: int) -> Axis:
    name_guess = raw.get("name") if isinstance(raw, dict) else None
    label = _axis_label(name_guess if isinstance(name_guess, str) else None, number)
    t = Table(raw, file, label)
    name = t.text("name", required=True)
    if not name.strip():
        raise t.error("name", "must not be empty")
    unit = t.text("unit", default="mm", choices=UNITS)
    start = t.number("start", default=0.0)
    index = t.number("index")
    limits = Limits()
    lt = t.table("limits", f"{label}, limits")
    if lt is not None:
        limits = Limits(
            velocity=lt.number("velocity", positive=True),
            acceleration=lt.number("acceleration", positive=True),
            jerk=lt.number("jerk", positive=True),
        )
        lt.done()
    segments = tuple(
        _parse_segment(s, file, f"{label}, segment {i}")
        for i, s in enumerate(t.tables("segment", required=True), start=1)
    )
    t.done()
    if not segments:
        raise t.error("segment", "an axis needs at least one [[axis.segment]]")
    return Axis(name=name, unit=unit, start=start, index=index, limits=limits, segments=segments)


def parse_project(data: dict, file=None) -> Project:
    """Check parsed TOML data and build a `Project` (raises `ProjectError`)."""
    top = Table(data, file, None)
    version = top.raw("version")
    if version is None:
        raise top.error("version", f"is missing (this program writes version = {FILE_VERSION})")
    if version != FILE_VERSION or isinstance(version, bool):
        raise top.error("version", f"must be {FILE_VERSION}, got {version!r}")
    mt = top.table("machine", "machine")
    if mt is None:
        raise top.error("machine", "is missing: the [machine] table gives the speed")
    machine = Machine(
        name=mt.text("name", default=""),
        speed=mt.number("speed", positive=True),
        cycle_time=mt.number("cycle_time", positive=True),
    )
    mt.done()
    if (machine.speed is None) == (machine.cycle_time is None):
        raise mt.error("speed", "give exactly one of speed (cycles/min) and cycle_time (s)")
    axes = [_parse_axis(raw, file, i) for i, raw in enumerate(top.tables("axis"), start=1)]
    seen: set[str] = set()
    programs = {}
    for i, axis in enumerate(axes, start=1):
        label = _axis_label(axis.name, i)
        if axis.name in seen:
            raise ProjectError(file, label, "name", "is used by an earlier axis: names must be unique")
        seen.add(axis.name)
        try:
            programs[axis.name] = compile_axis(axis)
        except ProgramError as exc:
            where = label if exc.segment is None else f"{label}, segment {exc.segment}"
            raise ProjectError(file, where, exc.key, exc.message) from None
    project = Project(machine=machine, axes=axes, programs=programs)
    for key, part in PARTS.items():
        project.parts[key] = part.parse(top.tables(key), project, file)
    top.done()
    return project


def load_project(path) -> Project:
    """Read, check and compile a project file (raises `ProjectError`)."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise ProjectError(path, None, None, "no such file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ProjectError(path, None, None, f"cannot be read: {exc}") from None
    return loads_project(text, path)


def loads_project(text: str, file=None) -> Project:
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ProjectError(file, None, None, f"is not valid TOML: {exc}") from None
    project = parse_project(data, file)
    project.path = Path(file) if file is not None else None
    project.source_text = text
    return project


def _drop_none(d: dict) -> dict:
    return {k: v for k, v in d.items() if v is not None}


def _dump_conditions(c: EndConditions | None):
    if c is None:
        return None
    return _drop_none({"velocity": c.velocity, "acceleration": c.acceleration, "jerk": c.jerk})


def project_data(project: Project) -> dict:
    """The project as plain TOML data in the canonical order."""
    m = project.machine
    data: dict[str, Any] = {
        "version": FILE_VERSION,
        "machine": _drop_none({"name": m.name, "speed": m.speed, "cycle_time": m.cycle_time}),
    }
    axes = []
    for a in project.axes:
        entry = _drop_none({"name": a.name, "unit": a.unit, "start": a.start, "index": a.index})
        limits = _drop_none(dict(a.limits.items()))
        if limits:
            entry["limits"] = limits
        entry["segment"] = [
            _drop_none(
                {
                    "law": s.law,
                    "span": s.span,
                    "to": s.to,
                    "start": _dump_conditions(s.start),
                    "end": _dump_conditions(s.end),
                }
            )
            for s in a.segments
        ]
        axes.append(entry)
    if axes:
        data["axis"] = axes
    for key, part in PARTS.items():
        tables = part.dump(project.parts.get(key))
        if tables:
            data[key] = tables
    return data


def dumps(project: Project) -> str:
    """The project file text: the loaded file's own text with only what changed
    changed (comments and layout kept), or the canonical layout for a new file."""
    data = project_data(project)
    if project.source_text is not None:
        _leave_unwritten_defaults(data, project.source_text)
        merged = merge_text(project.source_text, data)
        if merged is not None:
            return merged
    return toml_dumps(data)


def _leave_unwritten_defaults(data: dict, source_text: str) -> None:
    """An axis `start` of 0 (the default) stays unwritten where the file did not write it, so a
    save adds no line the user did not have."""
    try:
        original = tomllib.loads(source_text)
    except tomllib.TOMLDecodeError:
        return
    axes = [a for a in original.get("axis", []) if isinstance(a, dict)] if isinstance(original.get("axis"), list) else []
    by_name = {a.get("name"): a for a in axes}
    for i, entry in enumerate(data.get("axis", [])):
        # the axis as the file wrote it: by name, else in its place (a renamed axis)
        was = by_name.get(entry["name"], axes[i] if i < len(axes) else {})
        if entry.get("start") == 0.0 and "start" not in was:
            del entry["start"]


def write_atomic(path, text: str) -> None:
    """Write `text` to `path` via a temporary file in the same folder and a rename."""
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent or ".")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as handle:
            handle.write(text)
            handle.flush()
            os.fsync(handle.fileno())
        if path.exists():
            os.chmod(tmp, path.stat().st_mode & 0o777)
        else:
            os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise


def save_project(project: Project, path=None) -> Path:
    """Save atomically to `path` (default: where it was loaded from)."""
    path = Path(path or project.path)
    text = dumps(project)
    write_atomic(path, text)
    project.path = path
    project.source_text = text
    return path


# Part modules register themselves with `register_part` on import.
from . import parts  # noqa: E402,F401
