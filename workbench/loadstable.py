"""Loads as CSV tables for `camwright table FILE --axis NAME`: drive efforts, the motor, joint reactions,
cam contact force and camshaft torque.

Names (rows from master 0° up to, not including, 360° at `--step`; every
float at full precision; the unit in each header, in ASCII as N*m):

* `LINKAGE.DRIVER.torque` (an angle) or `LINKAGE.DRIVER.force` (a travel):
  `master [deg]`, `torque [N*m]` | `force [N]`, `speed [deg/s]` | `speed
  [mm/s]`, `power [W]` — the effort the driver's motion costs where its
  motor works (the driven coordinate, or its servo's `at` joint).
* `LINKAGE.DRIVER.servo` (a driver with a servo): `master [deg]`, the
  effort at the gearbox output (`output torque [N*m]` or `output force
  [N]`, where the motor works) and its `output speed`, `motor torque
  [N*m]`, `motor speed [rpm]`.
* `LINKAGE.JOINT.reaction`: `master [deg]`, `force [N]` (magnitude),
  `force x [N]`, `force y [N]` (on the joint's second body from its first,
  machine frame), and `couple [N*m]` for a slider or weld.
* `CAM.contact`: `master [deg]`, `contact force [N]` (along the follower's
  travel; at the load radius when oscillating).  `CAM.torque`:
  `master [deg]`, `camshaft torque [N*m]`.  The cam turns once per cycle:
  master angle is cam angle.

Registered first among the table sources, so that "pusher.motor.torque" is
not read as an output "motor.torque" of linkage "pusher".
"""

from __future__ import annotations

import math

import numpy as np

from solver.kinematics import SOLVED
from solver.loads import follower_forces, motor_curves

from . import linkageloads
from . import linkageloads_study as study_module
from .camfile import build_cam, find_cam, follower_load, load_radius
from .csvtable import csv_text as csv
from .linkagefile import find_linkage, linkage_specs, target_unit
from .linkagemodel import LinkageFault
from .linkagesolve import solve_linkage
from .sections import TABLE_NAMES, TABLE_SOURCES
from .tomlcheck import ProjectError

FULL_TURN = 360.0  # master degrees per cycle
RPM = 60.0 / (2.0 * math.pi)  # rev/min per rad/s
SCALE = {"deg": 180.0 / math.pi, "mm": 1e3}  # file unit per SI unit of a coordinate
SPEED = {"deg": "deg/s", "mm": "mm/s"}
CAM_TABLES = ("contact", "torque")
DRIVER_TABLES = ("torque", "force", "servo")


def master_grid(step: float) -> np.ndarray:
    """Master angles (deg) from 0 up to, not including, 360 at `step`, as the axis tables have them."""
    count = int(math.ceil(FULL_TURN / step - 1e-9))
    return np.round(np.arange(count) * step, 9)


# --- linkages ---------------------------------------------------------------------------


def _names(spec) -> list[str]:
    """The loads tables of a linkage with `[linkage.loads]`."""
    if spec.loads is None:
        return []
    out = []
    for d in spec.drivers:
        unit = target_unit(spec, study_module.motor_target(spec, d))
        out.append(f"{spec.name}.{d.name}.{'torque' if unit == 'deg' else 'force'}")
        if spec.loads.servo(d.name) is not None:
            out.append(f"{spec.name}.{d.name}.servo")
    return out + [f"{spec.name}.{j.name}.reaction" for j in spec.joints]


def _solved_loads(project, spec, theta_deg):
    """`SolvedLoads` at master angles θ (deg); ProjectError when the cycle does not solve."""
    try:
        solution = solve_linkage(project, spec, theta=np.radians(theta_deg))
    except LinkageFault as exc:
        raise ProjectError(project.path, exc.where, exc.key, exc.problem) from None
    result = solution.result
    if result.status != SOLVED:
        raise ProjectError(project.path, spec.label, None, f"{result.message}: no loads table can be written")
    try:
        return study_module.solved_loads(project, spec, result)
    except study_module.LoadsFault as exc:
        raise ProjectError(project.path, exc.where, exc.key, exc.problem) from None


def _driver_table(project, spec, driver, what: str, theta) -> str:
    target = study_module.motor_target(spec, driver)
    unit = target_unit(spec, target)
    effort = "torque" if unit == "deg" else "force"
    name = f"{spec.name}.{driver.name}"
    if what in ("torque", "force") and what != effort:
        where = f"pin {target.of}" if target is not driver.target else f"driver {driver.name!r}"
        raise ProjectError(project.path, spec.label, "--axis",
                           f"{where} moves {'an angle' if unit == 'deg' else 'a travel'}: "
                           f"its effort is a {effort}, table {name}.{effort}")
    servo = spec.loads.servo(driver.name)
    if what == "servo" and servo is None:
        raise ProjectError(project.path, study_module.loads_where(spec), "servo",
                           f"driver {driver.name!r} has no [[linkage.loads.servo]]: no motor to tabulate")
    drive = _solved_loads(project, spec, theta).drives[driver.name]
    speed_column = f"speed [{SPEED[unit]}]"
    e_unit = "N*m" if unit == "deg" else "N"
    if what != "servo":
        header = ["master [deg]", f"{effort} [{e_unit}]", speed_column, "power [W]"]
        return csv(header, (theta, drive.effort, drive.rate * SCALE[unit], drive.power))
    torque, speed, _ = motor_curves(drive.effort, drive.rate, drive.acceleration,
                                    linkageloads.gearing_of(servo, unit))
    header = ["master [deg]", f"output {effort} [{e_unit}]", f"output {speed_column}", "motor torque [N*m]",
              "motor speed [rpm]"]
    return csv(header, (theta, drive.effort, drive.rate * SCALE[unit], torque, speed * RPM))


def _reaction_table(project, spec, joint, theta) -> str:
    r = _solved_loads(project, spec, theta).reactions[joint.name]
    header = ["master [deg]", "force [N]", "force x [N]", "force y [N]"]
    columns = [theta, r.magnitude, r.force[:, 0], r.force[:, 1]]
    if r.kind != "pin":
        header.append("couple [N*m]")
        columns.append(r.couple)
    return csv(header, columns)


def linkage_loads_csv(project, name: str, step: float) -> str | None:
    """CSV of "LINKAGE.DRIVER.torque|force|servo" or "LINKAGE.JOINT.reaction", or None for other names."""
    pieces = name.split(".")
    if len(pieces) != 3:
        return None
    linkage, item, what = pieces
    spec = find_linkage(project, linkage)
    if spec is None or spec.output(f"{item}.{what}") is not None:  # not ours: a dotted output name
        return None
    if spec.loads is None:
        raise ProjectError(project.path, spec.label, "--axis",
                           f"{name!r}: linkage {linkage!r} has no [linkage.loads] (masses, loads, servos), "
                           "so it has no loads tables")
    driver = next((d for d in spec.drivers if d.name == item), None)
    joint = spec.joint(item)
    theta = master_grid(step)
    if driver is not None and what in DRIVER_TABLES:
        return _driver_table(project, spec, driver, what, theta)
    if joint is not None and what == "reaction":
        return _reaction_table(project, spec, joint, theta)
    known = ", ".join(_names(spec) + [f"{spec.name}.{o.name}" for o in spec.outputs])
    raise ProjectError(project.path, spec.label, "--axis", f"no table {name!r} (this linkage has: {known})")


# --- cams -------------------------------------------------------------------------------


def cam_loads_csv(project, name: str, step: float) -> str | None:
    """CSV of "CAM.contact" or "CAM.torque" for a cam with `[cam.loads]`, or None for other names."""
    head, dot, what = name.rpartition(".")
    spec = find_cam(project, head) if dot else None
    if spec is None:
        return None
    if what not in CAM_TABLES:
        raise ProjectError(project.path, spec.label, "--axis",
                           f"no table {name!r} (cam tables: {head}.contact, {head}.torque)")
    load = follower_load(spec)
    if load is None:
        raise ProjectError(project.path, spec.label, "--axis",
                           f"{name!r}: cam {head!r} has no [cam.loads] (a spring-closed follower's masses and "
                           "spring), so no forces")
    theta = master_grid(step)
    cam_motion = build_cam(project, spec).motion
    # follower_forces samples `points` cam angles evenly over its cycle; stretching its angle by
    # `spread` puts them on the table's own grid (k·step), derivatives still per radian of cam angle.
    spread = theta.size * step / FULL_TURN

    def motion(theta_deg):
        s, s1, s2 = cam_motion(np.radians(np.asarray(theta_deg) * spread))
        return s, s1, s2, None

    forces = follower_forces(motion, load, project.speed, points=theta.size)
    if what == "contact":
        lever = load_radius(spec) or 1.0  # oscillating: N·m about the pivot → N at the load radius
        return csv(["master [deg]", "contact force [N]"], (theta, forces.contact / lever))
    return csv(["master [deg]", "camshaft torque [N*m]"], (theta, forces.torque))


def loads_table_names(project) -> list[str]:
    """Every name the loads sources know."""
    names = [n for spec in linkage_specs(project) for n in _names(spec)]
    cams = [c for c in project.parts.get("cam") or [] if c.loads is not None]
    return names + [f"{c.name}.{w}" for c in cams for w in CAM_TABLES]


def loads_csv(project, name: str, step: float) -> str | None:
    """The table source: a linkage's or a cam's loads table, or None."""
    text = linkage_loads_csv(project, name, step)
    return text if text is not None else cam_loads_csv(project, name, step)


TABLE_SOURCES.insert(0, loads_csv)
TABLE_NAMES.append(loads_table_names)
