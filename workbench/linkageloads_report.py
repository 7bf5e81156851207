"""Linkage loads in `camwright check`: JSON under "linkage_loads" and a Rich block per linkage.

Registered as a check section after the linkages' own: one entry per
linkage with a `[linkage.loads]` table — per driver the effort it supplies
(peak and where, RMS, peak speed and power) and with a servo the figures at
the motor against its limits; per joint the peak force (and couple of a
slider or weld); the rigid-body caution.  A motor over a limit, or loads
that could not be computed over the whole cycle, make the exit code 1.
"""

from __future__ import annotations

from rich import box
from rich.console import Group
from rich.padding import Padding
from rich.table import Table
from rich.text import Text

from . import axisreport  # a module reference: axisreport may still be loading (it imports projectfile)
from . import linkageloads_study as study_module
from .linkagefile import linkage_specs
from .sections import CHECK_SECTIONS

JSON_KEY = "linkage_loads"
SPEED_UNITS = {"deg": "deg/s", "mm": "mm/s"}
JSON_UNITS = {"N·m": "N*m", "N": "N"}  # ASCII units in the JSON, as the cams' loads give them
SERVO_WORDS = {"peak_torque": "peak torque", "rms_torque": "RMS torque", "speed": "speed"}
SERVO_UNITS = {"peak_torque": "N·m", "rms_torque": "N·m", "speed": "rpm"}
NEAR_ZERO = 1e-9  # a shown value this small (in its unit) is 0: what is left of a cancellation


def fmt(value, digits: int = 4) -> str:
    return axisreport.fmt(None if value is None else (0.0 if abs(value) < NEAR_ZERO else value), digits)


def _peak(peak) -> dict:
    return {"value": peak.value, "at": study_module.at_deg(peak.at)}


def table_names(spec, d) -> dict:
    """The `camwright table` names of a driver: its effort and, with a servo, the motor."""
    word = "torque" if d.effort_unit == "N·m" else "force"
    names = {"effort": f"{spec.name}.{d.name}.{word}"}
    if d.servo is not None:
        names["servo"] = f"{spec.name}.{d.name}.servo"
    return names


# --- JSON ------------------------------------------------------------------------------


def servo_json(s) -> dict:
    spec = s.spec
    return {
        "at": s.at,
        "of": s.of,
        "ratio": spec.ratio,
        "lead": spec.lead,
        "efficiency": spec.efficiency if spec.efficiency is not None else 1.0,
        "rotor_inertia": spec.rotor_inertia or 0.0,
        "motor": {"peak_torque": _peak(s.peak_torque), "rms_torque": s.rms_torque, "peak_speed": _peak(s.peak_speed)},
        "limits": {q: v for q, v in spec.limits.items() if v is not None},
        "checks": [{"quantity": c.quantity, "value": c.peak.value, "limit": c.limit,
                    "at": None if c.peak.at is None else study_module.at_deg(c.peak.at),
                    "used": c.used, "headroom": c.headroom, "ok": c.ok} for c in s.checks],
        "ok": s.ok,
        "units": {"torque": "N*m", "speed": "rpm", "rotor_inertia": "kg*mm^2", "lead": "mm/turn",
                  "ratio": "motor turns per " + ("mm" if s.unit == "mm" else "turn")},
    }


def driver_json(spec, d) -> dict:
    return {
        "name": d.name,
        "of": d.of,
        "tables": table_names(spec, d),
        "effort_unit": JSON_UNITS[d.effort_unit],
        "peak": _peak(d.peak),
        "rms": d.rms,
        "peak_speed": {**_peak(d.peak_rate), "unit": SPEED_UNITS[d.unit]},
        "peak_power": _peak(d.peak_power),
        "servo": None if d.servo is None else servo_json(d.servo),
        "ok": d.ok,
    }


def reaction_json(spec, r) -> dict:
    return {
        "joint": r.joint,
        "kind": r.kind,
        "bodies": list(r.bodies),
        "table": f"{spec.name}.{r.joint}.reaction",
        "peak": _peak(r.peak),
        "peak_couple": None if r.couple is None else _peak(r.couple),
    }


def loads_json(study) -> dict:
    spec = study.spec
    loads = spec.loads
    return {
        "linkage": spec.name,
        "ok": study.ok,
        "status": study.status,
        "complete": study.complete,
        "message": study.message if study.status != "solved" else "",
        "speed": study.speed,
        "gravity": list(loads.gravity) if loads.gravity is not None else None,
        "masses": {b.name: b.mass for b in loads.bodies},
        "drivers": [driver_json(spec, d) for d in study.drivers],
        "reactions": [reaction_json(spec, r) for r in study.reactions],
        "units": {"force": "N", "torque": "N*m", "power": "W", "angle": "deg", "mass": "kg",
                  "speed": "cycles/min", "gravity": "m/s^2"},
        "caution": study_module.CAUTION,
    }


# --- Rich ---------------------------------------------------------------------------------


def _table(columns) -> Table:
    """A Rich table whose headers are plain text (no markup: "[N·m]" must stay visible)."""
    table = Table(expand=False, box=box.SIMPLE_HEAD, show_edge=False, pad_edge=False, padding=(0, 1))
    for name, justify in columns:
        table.add_column(Text(name), justify=justify)
    return table


def _deg(peak) -> str:
    return fmt(study_module.at_deg(peak.at), 5)


def gearing_words(s) -> str:
    """The servo's gearing in words: "ratio 20 (motor turns per turn), efficiency 0.9, rotor 20 kg·mm²"."""
    spec = s.spec
    if spec.lead is not None:
        gear = f"lead {fmt(spec.lead)} mm per motor turn"
    elif spec.ratio is not None:
        gear = f"ratio {fmt(spec.ratio)} (motor turns per {'mm' if s.unit == 'mm' else 'turn'})"
    else:
        gear = "direct (ratio 1)"
    eff = spec.efficiency if spec.efficiency is not None else 1.0
    return f"{gear}, efficiency {fmt(eff)}, rotor {fmt(spec.rotor_inertia or 0.0)} kg·mm²"


def driver_block(spec, d) -> list:
    effort = "torque" if d.effort_unit == "N·m" else "force"
    where = ", where its servo works" if d.servo is not None and d.servo.at is not None else ""
    lines = [Text.assemble("  ", (f"driver {d.name}", "bold"), f"  {d.of}{where}")]
    table = _table((("", "left"), ("value", "right"), ("at [deg]", "right")))
    table.add_row(Text(f"peak {effort} [{d.effort_unit}]"), fmt(d.peak.value), _deg(d.peak))
    table.add_row(Text(f"RMS {effort} [{d.effort_unit}]"), fmt(d.rms), "")
    table.add_row(Text(f"peak speed [{SPEED_UNITS[d.unit]}]"), fmt(d.peak_rate.value), _deg(d.peak_rate))
    table.add_row(Text("peak power [W]"), fmt(d.peak_power.value), _deg(d.peak_power))
    lines.append(Padding(table, (0, 0, 0, 4)))
    s = d.servo
    if s is None:
        return lines
    state = Text("within limits", style="green") if s.ok else Text("LIMIT EXCEEDED", style="bold red")
    if not s.checks:
        state = Text("no limits set", style="dim")
    lines.append(Text.assemble("    ", ("servo", "bold"), "  ", state))
    lines.append(Padding(Text(gearing_words(s), style="dim"), (0, 0, 0, 6)))
    table = _table((("at the motor", "left"), ("value", "right"), ("at [deg]", "right"), ("limit", "right"),
                    ("used", "right"), ("verdict", "left")))
    checks = {c.quantity: c for c in s.checks}
    rows = (("peak_torque", s.peak_torque.value, _deg(s.peak_torque)), ("rms_torque", s.rms_torque, ""),
            ("speed", s.peak_speed.value, _deg(s.peak_speed)))
    for q, value, at in rows:
        c = checks.get(q)
        table.add_row(Text(f"{SERVO_WORDS[q]} [{SERVO_UNITS[q]}]"), fmt(value), at, fmt(c.limit) if c else "—",
                      axisreport.used_text(c.used) if c else "—",
                      axisreport.verdict_text(c.used) if c else Text("no limit", style="dim"))
    lines.append(Padding(table, (0, 0, 0, 6)))
    return lines


def reactions_block(study) -> list:
    table = _table((("peak reaction", "left"), ("value", "right"), ("at [deg]", "right"), ("between", "left")))
    for r in study.reactions:
        bodies = Text(f"{r.bodies[0]}–{r.bodies[1]}", style="dim")
        table.add_row(Text(f"{r.kind} {r.joint}, force [N]"), fmt(r.peak.value), _deg(r.peak), bodies)
        if r.couple is not None:
            table.add_row(Text(f"{r.kind} {r.joint}, couple [N·m]"), fmt(r.couple.value), _deg(r.couple), "")
    return [Padding(table, (0, 0, 0, 4))]


def loads_block(study) -> Group:
    spec = study.spec
    head = Text.assemble((f"loads on linkage {spec.name}", "bold"), f"  at {fmt(study.speed)} cycles/min  ")
    if study.status != "solved" and not study.drivers:
        head.append("NOT COMPUTED", style="bold red")
        return Group(head, Padding(Text(f"the linkage does not run through the cycle: {study.message}"),
                                   (0, 0, 0, 2)))
    servos = [d.servo for d in study.drivers if d.servo is not None]
    if not study.complete:
        head.append("PARTIAL CYCLE", style="bold red")
    elif any(not s.ok for s in servos):
        head.append("SERVO LIMIT EXCEEDED", style="bold red")
    elif any(s.checks for s in servos):
        head.append("servo within limits", style="green")
    else:
        head.append("no servo limits to check" if servos else "no servo given", style="dim")
    lines = [head]
    loads = spec.loads
    masses = ", ".join(f"{b.name} {fmt(b.mass)} kg" for b in loads.bodies) or "none (massless bodies)"
    gravity = "none" if loads.gravity is None else f"[{fmt(loads.gravity[0])}, {fmt(loads.gravity[1])}] m/s²"
    extra = [f"{f.label} [{fmt(f.force[0])}, {fmt(f.force[1])}] N at {f.at}" for f in loads.forces]
    extra += [f"{t.label} {fmt(t.torque)} N·m on {t.body}" for t in loads.torques]
    lines.append(Padding(Text(f"masses: {masses}; gravity {gravity}" + ("; loads: " + "; ".join(extra) if extra else ""),
                              style="dim"), (0, 0, 0, 2)))
    if not study.complete:
        lines.append(Padding(Text(f"loads cover the solved stretch only: {study.message}", style="bold red"),
                             (0, 0, 0, 2)))
    for d in study.drivers:
        lines += driver_block(spec, d)
    lines += reactions_block(study)
    lines.append(Padding(Text(study_module.CAUTION, style="dim"), (0, 0, 0, 2)))
    return Group(*lines)


# --- the check section -----------------------------------------------------------------


def loads_section(project):
    """`check`'s linkage-loads section: ("linkage_loads", list of JSON, Rich renderables, ok), or None."""
    specs = [s for s in linkage_specs(project) if s.loads is not None]
    if not specs:
        return None
    docs, renderables, ok = [], [], True
    for spec in specs:
        try:
            study = study_module.study_loads(project, spec)
        except (study_module.LinkageFault, study_module.LoadsFault) as exc:  # only after an edit
            problem = f'{exc.where}: key "{exc.key}": {exc.problem}' if exc.key else f"{exc.where}: {exc.problem}"
            docs.append({"linkage": spec.name, "ok": False, "status": "invalid", "message": problem})
            renderables.append(Text(f"loads on linkage {spec.name}  NOT COMPUTED: {problem}", style="bold red"))
            ok = False
            continue
        docs.append(loads_json(study))
        renderables.append(loads_block(study))
        ok = ok and study.ok
    return JSON_KEY, docs, renderables, ok


CHECK_SECTIONS.append(loads_section)
