"""Loads of spring-closed cam followers (`[cam.loads]`) for the Loads view.

One `LoadsItem` per cam with loads, from `workbench.camreport.cam_loads` at
the machine speed of the project as edited: contact force against cam
angle with the zero line (below it the follower jumps) and the margin line,
camshaft torque against cam angle, and the figures — least contact and
where, jump verdict, highest speed without jump, preload for the margin,
peak and RMS torque.  Forces are in N along the follower's travel (at the
load radius on the arc for an oscillating follower), torque in N·m.
"""

from __future__ import annotations

import numpy as np

from solver.cam import FOLLOWERS, CamGeometryError

from ...camfile import cam_specs, study_cam
from ...camreport import LOADS_CAUTION, CamLoads, cam_loads
from ...projectfile import Project
from .cam_plots import Curve, PlotSpec, RefLine, pattern_word
from .cam_verdicts import num
from .loads_data import Figure, LoadsItem, register_loads_source

CONTACT_STYLE = "bright_cyan"
TORQUE_STYLE = "bright_green"


def _deg(value: float) -> str:
    return f"{round(value, 1) % 360.0:g}°"


def _closed(theta: np.ndarray, values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The cycle's samples with 360° appended (the value at 0°), so plots reach the right edge."""
    return np.append(theta, 360.0), np.append(values, values[:1])


def contact_curve(loads: CamLoads) -> np.ndarray:
    """Contact force (N) on the grid of `loads.forces.theta`; at the load radius when oscillating."""
    lever = loads.load_radius * 1e-3 if loads.load_radius is not None else 1.0
    return loads.forces.contact / lever


def contact_plot(loads: CamLoads, at_radius: str) -> PlotSpec:
    theta, force = _closed(loads.forces.theta, contact_curve(loads))
    parts = [f"contact force{at_radius} [N]"]
    lines = [RefLine(0.0, "threshold")]
    if loads.margin > 0:
        parts.append(f"margin {num(loads.margin)} N ({pattern_word('limit')})")
        lines.append(RefLine(loads.margin, "limit"))
    parts += [f"jumps below 0 N ({pattern_word('threshold')})",
              f"least {num(loads.min_contact)} N at {_deg(loads.min_contact_at)}"]
    return PlotSpec(tuple(parts), (Curve(theta, force, CONTACT_STYLE),), tuple(lines))


def torque_plot(loads: CamLoads) -> PlotSpec:
    theta, torque = _closed(loads.forces.theta, loads.forces.torque)
    parts = ("camshaft torque [N·m]", f"peak {num(loads.peak_torque)} N·m at {_deg(loads.peak_torque_at)}",
             f"RMS {num(loads.rms_torque)} N·m")
    return PlotSpec(parts, (Curve(theta, torque, TORQUE_STYLE),), (RefLine(0.0, "zero"),))


def figures(loads: CamLoads, at_radius: str) -> tuple[Figure, ...]:
    kept = loads.contact_kept
    out = [Figure(f"least contact force{at_radius}", f"{num(loads.min_contact)} N", _deg(loads.min_contact_at),
                  "✓ kept" if kept else "✗ LOST: the follower jumps", kept)]
    spare = loads.min_contact - loads.margin
    met = spare >= 0
    word = f"✓ met, {num(spare)} N to spare" if met else f"✗ NOT MET, {num(-spare)} N short"
    given = "" if loads.margin_given else " (none given)"
    out.append(Figure(f"margin wanted{given}", f"{num(loads.margin)} N", "", word, met))
    if loads.jump_speed is None:
        out.append(Figure("max speed without jump", "any", "", "✓ nothing lifts the follower", True))
    else:
        ok = loads.jump_speed > loads.speed
        out.append(Figure("max speed without jump", f"{num(loads.jump_speed)} cycles/min", "",
                          f"{'✓' if ok else '✗'} now {num(loads.speed)} cycles/min", ok))
    enough = loads.preload >= loads.preload_for_margin
    out.append(Figure("preload for the margin", f"{num(loads.preload_for_margin)} N", "",
                      f"{'✓' if enough else '✗'} {num(loads.preload)} N in the file", enough))
    out.append(Figure("camshaft torque, peak", f"{num(loads.peak_torque)} N·m", _deg(loads.peak_torque_at)))
    out.append(Figure("camshaft torque, RMS", f"{num(loads.rms_torque)} N·m"))
    return tuple(out)


def _readout(loads: CamLoads, at_radius: str):
    theta = loads.forces.theta
    force, torque = contact_curve(loads), loads.forces.torque

    def at(angle: float) -> str:
        k = int(np.argmin(np.abs(theta - angle % 360.0)))
        return (f"contact force{at_radius} {num(float(force[k]))} N · "
                f"camshaft torque {num(float(torque[k]))} N·m")

    return at


def cam_follower_loads(project: Project) -> list[LoadsItem]:
    """A `LoadsItem` for every cam of `project` with `[cam.loads]` (a cam that an edit has left
    unable to be laid out gets an item that says so)."""
    items = []
    for spec in cam_specs(project):
        if spec.loads is None:
            continue
        oscillating = FOLLOWERS[spec.follower].motion_kind == "angular"
        follower = f"spring-closed {spec.follower.replace('-', ' ')} follower"
        try:
            loads = cam_loads(project, study_cam(project, spec))
        except CamGeometryError as exc:
            problem = f"{exc.key}: {exc.message}" if exc.key else exc.message
            items.append(LoadsItem(spec.name, "cam follower", False, "✗ CANNOT BE LAID OUT",
                                   (follower, f"axis {spec.axis}"), (), (),
                                   (f"the cam cannot be laid out now — {problem}",)))
            continue
        at_radius = f" at {num(loads.load_radius)} mm" if oscillating else ""
        notes = [f"moving mass {num(loads.mass)} kg: follower + ⅓ of the spring (common practice)"]
        if oscillating:
            notes.append(f"mass, forces and spring rate are taken {num(loads.load_radius)} mm from the pivot, "
                         "along the arc")
        items.append(LoadsItem(
            name=spec.name,
            kind="cam follower",
            ok=loads.ok,
            verdict="✓ contact holds" if loads.ok else "✗ CONTACT AT RISK",
            about=(f"at {num(loads.speed)} cycles/min", follower, f"axis {spec.axis}"),
            plots=(contact_plot(loads, at_radius), torque_plot(loads)),
            figures=figures(loads, at_radius),
            notes=tuple(notes),
            caution=LOADS_CAUTION.replace("\n", " "),
            readout=_readout(loads, at_radius),
            values={"min_contact": loads.min_contact, "min_contact_at": loads.min_contact_at,
                    "jump_speed": loads.jump_speed, "preload_for_margin": loads.preload_for_margin,
                    "peak_torque": loads.peak_torque, "peak_torque_at": loads.peak_torque_at,
                    "rms_torque": loads.rms_torque, "contact_kept": loads.contact_kept},
        ))
    return items


register_loads_source("cam", cam_follower_loads)
