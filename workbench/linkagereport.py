"""The linkages in `camwright check` (JSON and Rich) and their outputs in `camwright table`.

Registered as a check section: the JSON document gets a "linkages" list,
the human report a block per linkage, and a linkage that does not solve
(dead point, not assembled, not driven) or an output over a limit makes the
exit code 1.  A table source answers `--axis LINKAGE.OUTPUT`.
"""

from __future__ import annotations

import math

import numpy as np
from rich import box
from rich.console import Group
from rich.padding import Padding
from rich.table import Table
from rich.text import Text

from solver.kinematics import DEAD_POINT, NOT_ASSEMBLED, NOT_DRIVEN, SOLVED

from . import axisreport  # a module reference: axisreport may still be loading (it imports projectfile)
from .linkagefile import describe, find_linkage, linkage_specs, target_unit
from .csvtable import motion_csv_text
from .sections import CHECK_SECTIONS, TABLE_NAMES, TABLE_SOURCES
from .tomlcheck import ProjectError

FULL_TURN = 360.0  # master degrees per cycle
QUANTITIES = ("velocity", "acceleration", "jerk")
STATUS_WORDS = {SOLVED: "solved", DEAD_POINT: "DEAD POINT", NOT_ASSEMBLED: "NOT ASSEMBLED", NOT_DRIVEN: "NOT DRIVEN"}
POWER = {"velocity": "/s", "acceleration": "/s²", "jerk": "/s³"}
LEAST_TRANSMISSION = 40.0  # deg: common practice (a rule of thumb, no single source)
NEAR_ZERO = 1e-9  # a displayed value this small (in its unit) is shown as 0


def fmt(value, digits: int = 4) -> str:
    return axisreport.fmt(None if value is None else (0.0 if abs(value) < NEAR_ZERO else value), digits)


def _at(value: float) -> float:
    """Master angle in [0, 360) rounded to 1e-6 degree (peak searches resolve far finer)."""
    return round(value % FULL_TURN, 6) % FULL_TURN + 0.0


# --- JSON ------------------------------------------------------------------------------


def _peak_json(peak, with_infinite: bool) -> dict:
    entry = {"value": peak.value, "at": _at(peak.at)}
    if with_infinite:
        entry["infinite"] = peak.infinite
    return entry


def output_json(spec, spec_output, study) -> dict:
    """One output: its range, peaks (unit/s^k), limits, share used, max speed and jumps."""
    doc = {
        "name": spec_output.name,
        "table": f"{spec.name}.{spec_output.name}",
        "of": describe(spec_output.target, spec),
        "unit": target_unit(spec, spec_output.target),
        "ok": study is not None and study.ok,
        "limits": {q: v for q, v in spec_output.limits.items() if v is not None},
    }
    if study is None:
        return {**doc, "range": None, "peaks": None, "used": None, "max_speed": None, "joins": []}
    return {
        **doc,
        "range": {"min": _peak_json(study.minimum, False), "max": _peak_json(study.maximum, False)},
        "peaks": {q: _peak_json(study.peaks[q], q != "velocity") for q in QUANTITIES},
        "used": {c.quantity: (None if math.isinf(c.used) else c.used) for c in study.checks},
        "max_speed": study.max_speed,
        "joins": [{"at": _at(j.at), "velocity_jump": j.velocity_jump, "acceleration_jump": j.acceleration_jump}
                  for j in study.jumps],
    }


def _dof_json(dof) -> dict | None:
    if dof is None:
        return None
    return {
        "dof": dof.dof,
        "redundant": dof.redundant,
        "driven": dof.driven,
        "free": [{"bodies": list(m.bodies), "joints": list(m.joints)} for m in dof.free],
        "dependent": list(dof.dependent),
        "message": dof.message,
    }


def linkage_json(study) -> dict:
    result = study.solution.result
    dead = result.dead_point
    by_name = {o.name: o for o in study.outputs}
    return {
        "name": study.spec.name,
        "ok": study.ok,
        "status": study.status,
        "message": result.message,
        "stopped_at": None if study.stop_at is None else _at(study.stop_at),
        "dead_point": None if dead is None else {
            "reason": dead.reason,
            "at": _at(math.degrees(dead.at)),
            "joints": list(dead.joints),
            "bodies": list(dead.bodies),
        },
        "dof": _dof_json(result.dof),
        "outputs": [output_json(study.spec, o, by_name.get(o.name)) for o in study.spec.outputs],
    }


# --- Rich ---------------------------------------------------------------------------------


def _table(columns) -> Table:
    """A Rich table whose headers are plain text (no markup: "[mm/s]" must stay visible)."""
    table = Table(expand=False, box=box.SIMPLE_HEAD, show_edge=False, pad_edge=False, padding=(0, 1))
    for name, justify in columns:
        table.add_column(Text(name), justify=justify)
    return table


def _note(text: str, style: str = "", indent: int = 4) -> Padding:
    """A line of the report that keeps its indent when it wraps."""
    return Padding(Text(text, style=style), (0, 0, 0, indent))


def _verdict(check) -> Text:
    return axisreport.verdict_text(check.used) if check else Text("no limit", style="dim")


def output_block(spec, spec_output, study) -> Group:
    """One output: its range and its peaks against the limits, in words."""
    unit = study.unit
    state = Text("within limits", style="green") if study.ok else Text("LIMIT EXCEEDED", style="bold red")
    if not study.checks:
        state = Text("no limits set", style="dim")
    head = Text.assemble("  ", (f"output {spec.name}.{spec_output.name}", "bold"),
                         f"  {describe(spec_output.target, spec)} [{unit}]  ", state)
    table = _table((("", "left"), ("value", "right"), ("at [deg]", "right"), ("limit", "right"),
                    ("used", "right"), ("verdict", "left")))
    table.add_row(Text(f"lowest [{unit}]"), fmt(study.minimum.value), axisreport.angle_column(_at(study.minimum.at)), "", "", "")
    table.add_row(Text(f"highest [{unit}]"), fmt(study.maximum.value), axisreport.angle_column(_at(study.maximum.at)), "", "", "")
    checks = {c.quantity: c for c in study.checks}
    for q in QUANTITIES:
        peak, check = study.peaks[q], checks.get(q)
        table.add_row(Text(f"{q} [{unit}{POWER[q]}]"), "infinite" if peak.infinite else fmt(peak.value),
                      axisreport.angle_column(_at(peak.at)), fmt(check.limit) if check else "—",
                      axisreport.used_text(check.used) if check else "—", _verdict(check))
    lines = [head, Padding(table, (0, 0, 0, 4))]
    if study.max_speed is not None:
        style = "green" if study.max_speed >= study.speed else "bold red"
        lines.append(Text.assemble("    max speed within limits: ", (f"{fmt(study.max_speed)} cycles/min", style),
                                   f" (now {fmt(study.speed)})"))
    if study.folds:
        where = ", ".join(f"{fmt(_at(at), 5)}°" for at in study.folds)
        lines.append(_note(f"turns back at {where} (lines at 90° or parallel): its rate flips sign", "dim"))
    for j in study.jumps:
        if j.velocity_jump:
            what = f"velocity jumps by {fmt(j.velocity_jump)} {unit}/s: infinite acceleration and jerk"
        else:
            what = f"acceleration jumps by {fmt(j.acceleration_jump)} {unit}/s²: infinite jerk"
        lines.append(_note(f"! at {fmt(_at(j.at), 5)}° a driver changes segment; the {what}", "yellow"))
    if spec_output.target.kind == "transmission" and study.minimum.value < LEAST_TRANSMISSION:
        lines.append(_note(f"! the transmission angle falls to {fmt(study.minimum.value)}°, below "
                           f"{LEAST_TRANSMISSION:g}° (common practice): the linkage may bind", "yellow"))
    return Group(*lines)


def _stopped(study) -> list:
    result = study.solution.result
    if study.status == NOT_DRIVEN:
        dof = result.dof
        lines = [f"{dof.coordinates} coordinates, {dof.equations} equations, rank {dof.rank}"]
        for i, motion in enumerate(dof.free, start=1):
            joints = ", ".join(motion.joints) or "none"
            lines.append(f"free motion {i}: moves {', '.join(motion.bodies)}; joints it works: {joints}")
        if dof.free:
            lines.append("drive one of those joints or bodies (a [[linkage.driver]])")
        if dof.redundant:
            lines.append(f"{dof.redundant} equation(s) depend on others among: {', '.join(dof.dependent)}"
                         " — remove one of them or free a joint")
        return [Padding(Text(line), (0, 0, 0, 2)) for line in lines]
    return [Padding(Text(result.message, style="bold red"), (0, 0, 0, 2))]


def driver_words(spec, driver) -> str:
    """What a driver does, in words: "turns pin O2 once per cycle, from 0°"."""
    unit = target_unit(spec, driver.target)
    offset = driver.offset or 0.0
    thing = describe(driver.target, spec)
    if driver.turns is not None:
        turns = int(round(driver.turns))
        count = {1: "once", -1: "once backwards"}.get(turns, f"{abs(turns)} times" + (" backwards" if turns < 0 else ""))
        what = thing.replace("angle at ", "").replace("angle of ", "")
        return f"turns {what} {count} per cycle, from {fmt(offset)}°"
    start = f", offset {fmt(offset)} {unit}" if offset else ""
    return f"the {thing} follows axis {driver.axis}{start}"


def linkage_block(study) -> Group:
    """One linkage: how the solve went, then each output."""
    name = study.spec.name
    if study.status == SOLVED:
        state = Text("solved, every output within limits", style="green") if study.ok else \
            Text("solved, LIMIT EXCEEDED", style="bold red")
    else:
        words = STATUS_WORDS.get(study.status, study.status)
        where = f" at master {fmt(study.stop_at, 5)}°"
        dof = study.solution.result.dof
        if study.status == NOT_DRIVEN:
            where = f": {dof.dof} free degree(s) of freedom" if dof.dof else ""
            words = words if dof.dof else "OVER-CONSTRAINED"
        state = Text(f"{words}{where}", style="bold red")
    lines = [Text.assemble((f"linkage {name}", "bold"), "  ", state)]
    for d in study.spec.drivers:
        lines.append(Padding(Text(f"driver {d.name}: {driver_words(study.spec, d)}", style="dim"), (0, 0, 0, 2)))
    if study.status != SOLVED:
        lines += _stopped(study)
        return Group(*lines)
    by_name = {o.name: o for o in study.outputs}
    if not study.spec.outputs:
        lines.append(Text("  no outputs: add a [[linkage.output]] to see its peaks", style="dim"))
    for o in study.spec.outputs:
        lines.append(output_block(study.spec, o, by_name[o.name]))
    return Group(*lines)


# --- the check section and the table source -------------------------------------------------


def linkage_section(project):
    """`check`'s linkage section: ("linkages", list of JSON, Rich renderables, ok), or None."""
    specs = linkage_specs(project)
    if not specs:
        return None
    from . import linkagemodel, linkagestudy  # noqa: PLC0415 - parts.py loads this module while they may be loading
    docs, renderables, ok = [], [], True
    for spec in specs:
        try:
            study = linkagestudy.study_linkage(project, spec)
        except linkagemodel.LinkageFault as exc:  # only after an edit: a loaded file has been checked
            problem = f'{exc.where}: key "{exc.key}": {exc.problem}' if exc.key else f"{exc.where}: {exc.problem}"
            docs.append({"name": spec.name, "ok": False, "status": "invalid", "message": problem})
            renderables.append(Text(f"linkage {spec.name}  CANNOT BE BUILT: {problem}", style="bold red"))
            ok = False
            continue
        docs.append(linkage_json(study))
        renderables.append(linkage_block(study))
        ok = ok and study.ok
    return "linkages", docs, renderables, ok


def output_csv(project, name: str, step: float) -> str | None:
    """CSV motion table of linkage output "LINKAGE.OUTPUT", or None for a name of no linkage."""
    linkage, dot, output = name.partition(".")
    spec = find_linkage(project, linkage) if dot else None
    if spec is None:
        return None
    where = spec.label
    if spec.output(output) is None:
        known = ", ".join(f"{spec.name}.{o.name}" for o in spec.outputs) or "none"
        raise ProjectError(project.path, where, "--axis", f"no output {output!r} (outputs: {known})")
    from . import linkagemodel, linkagestudy  # noqa: PLC0415 - as in linkage_section

    count = int(math.ceil(FULL_TURN / step - 1e-9))
    theta = np.round(np.arange(count) * step, 9)
    try:
        solution, s, v, a, j = linkagestudy.output_table(project, spec, output, theta)
    except linkagemodel.LinkageFault as exc:
        raise ProjectError(project.path, exc.where, exc.key, exc.problem) from None
    if s is None:
        raise ProjectError(project.path, where, None, f"{solution.result.message}: no table can be written")
    return motion_csv_text(theta, s, v, a, j, solution.built.units[output])


def output_names(project) -> list[str]:
    """Every "LINKAGE.OUTPUT" name `output_csv` knows."""
    return [f"{spec.name}.{o.name}" for spec in project.parts.get("linkage") or [] for o in spec.outputs]


CHECK_SECTIONS.append(linkage_section)
TABLE_SOURCES.append(output_csv)
TABLE_NAMES.append(output_names)
