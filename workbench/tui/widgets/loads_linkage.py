"""Loads of linkage drivers (`[linkage.loads]`) for the Loads view.

One `LoadsItem` per driver of a linkage with loads, from
`workbench.linkageloads_study.study_loads` at the machine speed of the
project as edited: the torque (or force) against master angle — at the
motor through the gearing, with its peak and RMS limits, when the driver
has a servo — and the speed beside it with the speed limit; the figures:
peak and RMS effort at the driver, peak speed and power, the motor's peak
and RMS torque and speed against its limits in words, and every joint's
peak reaction.  A linkage without loads gets one item saying how to add
them.
"""

from __future__ import annotations

import math

import numpy as np

from ... import linkageloads_study as study_module
from ...axisreport import percent
from ...linkagefile import linkage_specs
from ...linkageloads_report import gearing_words
from ...projectfile import Project
from .cam_plots import Curve, PlotSpec, RefLine, pattern_word
from .cam_verdicts import num
from .loads_data import Figure, LoadsItem, register_loads_source

TORQUE_STYLE = "bright_green"
SPEED_STYLE = "bright_cyan"
RPM = 60.0 / (2.0 * math.pi)  # rev/min per rad/s
SCALE = {"deg": 180.0 / math.pi, "mm": 1e3}  # file unit per SI unit of a coordinate
SPEED = {"deg": "deg/s", "mm": "mm/s"}
KIND = "linkage driver"
LOADS_EXAMPLE = """\
[linkage.loads]                # under a [[linkage]]
gravity = [0.0, -9.81]         # m/s², machine frame

[[linkage.loads.body]]
name = "{body}"
mass = 0.8                     # kg
centre = [20.0, 0.0]           # mm, body frame
inertia = 500.0                # kg·mm² about the centre"""


def _deg(value: float) -> str:
    return f"{round(value, 1) % 360.0:g}°"


def _closed(theta_rad: np.ndarray, values: np.ndarray, periodic: bool) -> tuple[np.ndarray, np.ndarray]:
    """Master angles in deg with 360° appended (the value at 0°) on a whole cycle, so plots reach the edge."""
    theta = np.degrees(theta_rad)
    if not periodic or theta.size == 0:
        return theta, values
    return np.append(theta, 360.0), np.append(values, values[:1])


def _share(check) -> str:
    """A servo check in words: "✓ 41 % of 0.5 N·m"."""
    unit = "rpm" if check.quantity == "speed" else "N·m"
    return f"{'✓' if check.ok else '✗'} {percent(check.used)} of {num(check.limit)} {unit}"


def torque_plot(d) -> PlotSpec:
    """Motor torque with ± its peak limit (dashed) and ± its RMS limit (dotted); or the driver's own effort."""
    s = d.servo
    if s is None:
        theta, effort = _closed(d.drive.theta, d.drive.effort, d.drive.periodic)
        parts = (f"{d.of} [{d.effort_unit}]", f"peak {num(d.peak.value)} {d.effort_unit} at {_deg(d.peak.at)}",
                 f"RMS {num(d.rms)} {d.effort_unit}")
        return PlotSpec(parts, (Curve(theta, effort, TORQUE_STYLE),), (RefLine(0.0, "zero"),))
    theta, torque = _closed(s.sizing.theta, s.sizing.torque, s.drive.periodic)
    parts = ["motor torque [N·m]"]
    lines = [RefLine(0.0, "zero")]
    checks = {c.quantity: c for c in s.checks}
    if "peak_torque" in checks:
        limit = checks["peak_torque"].limit
        parts.append(f"limit ±{num(limit)} N·m ({pattern_word('limit')})")
        lines += [RefLine(limit, "limit"), RefLine(-limit, "limit")]
    if "rms_torque" in checks:
        limit = checks["rms_torque"].limit
        parts.append(f"RMS limit ±{num(limit)} N·m ({pattern_word('threshold')})")
        lines += [RefLine(limit, "threshold"), RefLine(-limit, "threshold")]
    parts.append(f"peak {num(s.peak_torque.value)} N·m at {_deg(s.peak_torque.at)}")
    return PlotSpec(tuple(parts), (Curve(theta, torque, TORQUE_STYLE),), tuple(lines))


def speed_plot(d) -> PlotSpec:
    """Motor speed (rpm) with ± its limit; or the driver's own speed."""
    s = d.servo
    if s is None:
        theta, rate = _closed(d.drive.theta, d.drive.rate * SCALE[d.unit], d.drive.periodic)
        unit = SPEED[d.unit]
        parts = (f"speed [{unit}]", f"peak {num(d.peak_rate.value)} {unit} at {_deg(d.peak_rate.at)}")
        return PlotSpec(parts, (Curve(theta, rate, SPEED_STYLE),), (RefLine(0.0, "zero"),))
    theta, speed = _closed(s.sizing.theta, s.sizing.speed * RPM, s.drive.periodic)
    parts = ["motor speed [rpm]"]
    lines = [RefLine(0.0, "zero")]
    check = next((c for c in s.checks if c.quantity == "speed"), None)
    if check is not None:
        parts.append(f"limit ±{num(check.limit)} rpm ({pattern_word('limit')})")
        lines += [RefLine(check.limit, "limit"), RefLine(-check.limit, "limit")]
    parts.append(f"peak {num(s.peak_speed.value)} rpm at {_deg(s.peak_speed.at)}")
    return PlotSpec(tuple(parts), (Curve(theta, speed, SPEED_STYLE),), tuple(lines))


def figures(d, study) -> tuple[Figure, ...]:
    u = d.effort_unit
    out = [Figure(f"{d.of}, peak", f"{num(d.peak.value)} {u}", _deg(d.peak.at)),
           Figure(f"{d.of}, RMS", f"{num(d.rms)} {u}"),
           Figure(f"speed {d.of.split(' ', 1)[1]}, peak", f"{num(d.peak_rate.value)} {SPEED[d.unit]}", _deg(d.peak_rate.at)),
           Figure("power, peak", f"{num(d.peak_power.value)} W", _deg(d.peak_power.at))]
    s = d.servo
    if s is not None:
        checks = {c.quantity: c for c in s.checks}
        rows = (("peak_torque", "motor torque, peak", f"{num(s.peak_torque.value)} N·m", _deg(s.peak_torque.at)),
                ("rms_torque", "motor torque, RMS", f"{num(s.rms_torque)} N·m", ""),
                ("speed", "motor speed, peak", f"{num(s.peak_speed.value)} rpm", _deg(s.peak_speed.at)))
        for quantity, what, value, at in rows:
            c = checks.get(quantity)
            out.append(Figure(what, value, at, _share(c) if c else "· no limit", c.ok if c else None))
    for r in study.reactions:
        out.append(Figure(f"{r.kind} {r.joint} force, peak", f"{num(r.peak.value)} N", _deg(r.peak.at),
                          f"{r.bodies[0]}–{r.bodies[1]}"))
        if r.couple is not None:
            out.append(Figure(f"{r.kind} {r.joint} couple, peak", f"{num(r.couple.value)} N·m", _deg(r.couple.at)))
    return tuple(out)


def _readout(d):
    s = d.servo
    theta = np.degrees(d.drive.theta)
    effort = d.drive.effort

    def at(angle: float) -> str:
        k = int(np.argmin(np.abs((theta - angle % 360.0 + 180.0) % 360.0 - 180.0)))
        text = f"{d.of} {num(float(effort[k]))} {d.effort_unit}"
        if s is not None:
            text += f" · motor {num(float(s.sizing.torque[k]))} N·m at {num(float(s.sizing.speed[k] * RPM))} rpm"
        else:
            text += f" · speed {num(float(d.drive.rate[k] * SCALE[d.unit]))} {SPEED[d.unit]}"
        return text

    return at


def _notes(spec, d) -> tuple[str, ...]:
    loads = spec.loads
    masses = ", ".join(f"{b.name} {num(b.mass)} kg" for b in loads.bodies) or "none (massless bodies)"
    gravity = "no gravity" if loads.gravity is None else f"gravity [{num(loads.gravity[0])}, {num(loads.gravity[1])}] m/s²"
    notes = [f"masses: {masses}; {gravity}"]
    extra = [f"{f.label} [{num(f.force[0])}, {num(f.force[1])}] N at {f.at}" for f in loads.forces]
    extra += [f"{t.label} {num(t.torque)} N·m on {t.body}" for t in loads.torques]
    if extra:
        notes.append("loads: " + "; ".join(extra))
    if d.servo is not None:
        notes.append(f"servo{' at ' + d.servo.at if d.servo.at else ''}: {gearing_words(d.servo)}")
    notes.append("reactions: force on the second body from the first; a ground pin's is its bearing load")
    return tuple(notes)


def _no_loads(spec) -> LoadsItem:
    example = LOADS_EXAMPLE.format(body=spec.bodies[0].name if spec.bodies else "crank")
    return LoadsItem(spec.name, "linkage", None, "· no loads given", (f"linkage {spec.name}",), (), (),
                     ("This linkage has no [linkage.loads] table: add one to see the drive torque, the servo "
                      "against its limits and the joint reactions, for example:", "", *example.splitlines(), "",
                      "then open the file again (ctrl+o). The README's Linkages section lists every key."))


def _failed(name: str, verdict: str, problem: str) -> LoadsItem:
    return LoadsItem(name, KIND, False, verdict, (), (), (), (problem,))


def driver_item(spec, d, study) -> LoadsItem:
    s = d.servo
    ok = None if s is None or not s.checks else s.ok
    verdict = "· no servo limits" if ok is None else ("✓ servo within limits" if ok else "✗ SERVO LIMIT EXCEEDED")
    about = [f"at {num(study.speed)} cycles/min", d.of, f"linkage {spec.name}"]
    if not study.complete:
        ok, verdict = False, "✗ PARTIAL CYCLE"
    return LoadsItem(
        name=f"{spec.name}.{d.name}",
        kind=KIND,
        ok=ok,
        verdict=verdict,
        about=tuple(about),
        plots=(torque_plot(d), speed_plot(d)),
        figures=figures(d, study),
        notes=_notes(spec, d) + (() if study.complete else (f"loads cover the solved stretch only: {study.message}",)),
        caution=study_module.CAUTION,
        readout=_readout(d),
        values={"peak": d.peak.value, "peak_at": d.peak.at, "rms": d.rms, "peak_rate": d.peak_rate.value,
                "motor_peak": None if s is None else s.peak_torque.value,
                "motor_rms": None if s is None else s.rms_torque,
                "motor_speed": None if s is None else s.peak_speed.value,
                "reactions": {r.joint: r.peak.value for r in study.reactions}},
    )


def linkage_drive_loads(project: Project) -> list[LoadsItem]:
    """A `LoadsItem` per driver of every linkage with `[linkage.loads]`; one item per linkage without
    loads, or whose loads cannot be computed now, saying so."""
    items = []
    for spec in linkage_specs(project):
        if spec.loads is None:
            items.append(_no_loads(spec))
            continue
        try:
            study = study_module.study_loads(project, spec)
        except (study_module.LinkageFault, study_module.LoadsFault) as exc:
            problem = f"{exc.where}: {exc.key}: {exc.problem}" if exc.key else f"{exc.where}: {exc.problem}"
            items.append(_failed(spec.name, "✗ CANNOT BE COMPUTED", f"the loads cannot be computed now — {problem}"))
            continue
        if not study.drivers:
            items.append(_failed(spec.name, "✗ NOT COMPUTED",
                                 f"the linkage does not run through the cycle: {study.message}"))
            continue
        items += [driver_item(spec, d, study) for d in study.drivers]
    return items


register_loads_source("linkage", linkage_drive_loads)
