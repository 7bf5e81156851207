"""The cams in `camwright check`: JSON data (angles deg, lengths mm) and Rich tables.

Registered as a check section: the JSON document gets a "cams" list, the
human report a table per cam (and one per cam with loads), and a cam that
fails a check, or a follower that loses contact or its margin, makes the
exit code 1.
"""

from __future__ import annotations

import math
import textwrap
from dataclasses import dataclass

import numpy as np
from rich import box
from rich.console import Group
from rich.padding import Padding
from rich.table import Table
from rich.text import Text

from solver.cam import FOLLOWERS, CamGeometryError, RollerFollower
from solver.loads import FollowerForces, follower_forces, preload_for_margin

from . import axisreport  # a module reference: axisreport may still be loading (it imports projectfile)
from .camfile import COMMON_PRACTICE, CamStudy, cam_specs, follower_load, load_radius, study_cam
from .projectfile import Project
from .sections import CHECK_SECTIONS


def fmt(value, digits: int = 4) -> str:
    return axisreport.fmt(value, digits)

LOADS_CAUTION = (
    "Loads are rigid-body estimates: no elasticity of frame, shaft or follower\n"
    "train, no spring surge, no impact. Check spring fatigue and surge and the\n"
    "contact stress separately."
)
TURNING_WORDS = {"cw": "turns clockwise", "ccw": "turns counter-clockwise"}


def deg(rad: float) -> float:
    """A cam angle in rad as deg in [0, 360), rounded to 1e-6 deg (finer than any search)."""
    return round(math.degrees(rad) % 360.0, 6) % 360.0 + 0.0


def mm(m: float) -> float:
    return m * 1e3


def follower_words(kind: str) -> str:
    return kind.replace("-", " ")


# --- loads -------------------------------------------------------------------


@dataclass(frozen=True)
class CamLoads:
    """A force-closed follower at the machine speed: forces in N (along the follower's
    travel; at the load radius when oscillating), torque in N·m, angles in deg."""

    speed: float  # cycles/min
    mass: float  # kg moving with the follower (a third of the spring's counts)
    min_contact: float
    min_contact_at: float
    contact_kept: bool
    jump_speed: float | None  # cycles/min; None: no deceleration can lift the follower
    margin: float
    margin_given: bool
    preload: float
    preload_for_margin: float
    peak_torque: float
    peak_torque_at: float
    rms_torque: float
    forces: FollowerForces  # arrays in the follower's own coordinate (see solver.loads)
    load_radius: float | None = None  # mm from the pivot where an oscillating follower's loads act

    @property
    def ok(self) -> bool:
        return self.contact_kept and self.min_contact >= self.margin


def cam_loads(project: Project, study: CamStudy) -> CamLoads | None:
    """Contact force, jump speed, preload for the margin and camshaft torque, or None without loads."""
    spec = study.spec
    load = follower_load(spec)
    if load is None:
        return None
    lever = load_radius(spec) or 1.0  # oscillating: moments N·m → forces N at the load radius
    cam_motion = study.cam.motion

    def motion(theta_deg):
        s, s1, s2 = cam_motion(np.radians(theta_deg))
        return s, s1, s2, None

    speed = project.speed
    forces = follower_forces(motion, load, speed)
    margin = spec.loads.margin or 0.0
    need = preload_for_margin(motion, load, speed, margin * lever)
    return CamLoads(
        speed=speed,
        mass=spec.loads.mass,
        min_contact=forces.min_contact / lever,
        min_contact_at=round(forces.min_contact_at, 6) % 360.0,
        contact_kept=not forces.jumps,
        jump_speed=forces.jump_speed,
        margin=margin,
        margin_given=spec.loads.margin is not None,
        preload=spec.loads.preload,
        preload_for_margin=need / lever,
        load_radius=None if load_radius(spec) is None else load_radius(spec) * 1e3,
        peak_torque=forces.peak_torque,
        peak_torque_at=round(forces.peak_torque_at, 6) % 360.0,
        rms_torque=forces.rms_torque,
        forces=forces,
    )


def loads_json(loads: CamLoads) -> dict:
    return {
        "speed": loads.speed,
        "ok": loads.ok,
        "moving_mass": loads.mass,
        "load_radius": loads.load_radius,
        "min_contact": {"value": loads.min_contact, "at": loads.min_contact_at},
        "contact_kept": loads.contact_kept,
        "jump_speed": loads.jump_speed,
        "margin": loads.margin,
        "preload": loads.preload,
        "preload_for_margin": loads.preload_for_margin,
        "torque": {"peak": {"value": loads.peak_torque, "at": loads.peak_torque_at}, "rms": loads.rms_torque},
        "units": {"force": "N", "torque": "N*m", "speed": "cycles/min", "mass": "kg", "angle": "deg",
                  "length": "mm"},
        "note": LOADS_CAUTION.replace("\n", " "),
    }


# --- geometry JSON -----------------------------------------------------------

CHECK_UNITS = {"pivot_clearance": "mm", "pressure_angle": "deg", "undercut": "mm", "curvature_ratio": "",
               "cusp": "mm", "face_width": "mm", "min_radius": "mm", "corner": "count"}


def _extreme(e, length=True):
    if e is None:
        return None
    return {"value": mm(e.value) if length else math.degrees(e.value), "at": deg(e.at)}


def _radii(r):
    return None if r is None else {"convex": _extreme(r.convex), "concave": _extreme(r.concave)}


def _regions(intervals):
    return [{"from": deg(i.start), "to": deg(i.end)} for i in intervals]


def _check_value(quantity: str, value: float) -> float:
    if CHECK_UNITS[quantity] == "deg":
        return math.degrees(value)
    if CHECK_UNITS[quantity] == "mm":
        return mm(value)
    return value


def _finite(x):
    return None if x is None or not math.isfinite(x) else x


def check_json(c) -> dict:
    return {
        "quantity": c.quantity,
        "unit": CHECK_UNITS[c.quantity],
        "value": _check_value(c.quantity, c.value),
        "limit": _check_value(c.quantity, c.limit),
        "at": deg(c.at),
        "used": _finite(c.used),
        "headroom": _finite(c.headroom),
        "ok": c.ok,
    }


def limits_json(study: CamStudy) -> dict:
    lim, source = study.limits, study.limit_source
    out = {}
    if lim.pressure_angle is not None:
        out["pressure_angle"] = {"value": math.degrees(lim.pressure_angle), "unit": "deg",
                                 "source": source["pressure_angle"]}
    if lim.curvature_ratio is not None:
        out["curvature_ratio"] = {"value": lim.curvature_ratio, "unit": "", "source": source["curvature_ratio"]}
    if lim.min_radius is not None:
        out["min_radius"] = {"value": mm(lim.min_radius), "unit": "mm", "source": source["min_radius"]}
    return out


def cam_json(study: CamStudy, loads: CamLoads | None) -> dict:
    spec, a = study.spec, study.analysis
    roller = isinstance(study.cam.follower, RollerFollower)
    face = None
    if a.face is not None:
        face = {"from": mm(a.face.low.value), "to": mm(a.face.high.value), "width": mm(a.face.width)}
    return {
        "name": spec.name,
        "axis": spec.axis,
        "follower": {"type": spec.follower, **dict(spec.sizes)},
        "turning": spec.turning,
        "ok": study.ok and (loads is None or loads.ok),
        "geometry_ok": study.ok,
        "base_radius": mm(study.cam.follower.base_radius),
        "pressure_angle": _extreme(a.max_pressure_angle, length=False),
        "radius_of_curvature": {"pitch": _radii(a.pitch_radii), "profile": _radii(a.profile_radii)},
        "undercut": {"found": bool(a.undercut), "regions": _regions(a.undercut)} if roller else None,
        "cusp": None if roller else {"found": bool(a.cusp), "regions": _regions(a.cusp)},
        "corners": [deg(c) for c in a.corners],
        "largest_radius": _extreme(a.largest_radius),
        "pivot_clearance": _extreme(a.pivot_clearance),
        "face": face,
        "limits": limits_json(study),
        "checks": [check_json(c) for c in study.verdict.checks],
        "loads": None if loads is None else loads_json(loads),
    }


# --- Rich --------------------------------------------------------------------

CHECK_LABELS = {
    "pivot_clearance": "pivot clearance [mm]",
    "pressure_angle": "pressure angle [deg]",
    "undercut": "pitch radius [mm]",
    "curvature_ratio": "curvature ratio",
    "cusp": "cusp radius [mm]",  # the profile's, checked for a cusp (≤ 0)
    "face_width": "face width [mm]",
    "min_radius": "profile radius [mm]",
    "corner": "corners",
}
FAIL_WORDS = {"pivot_clearance": "IN CAM", "undercut": "UNDERCUT", "cusp": "CUSP", "corner": "CORNER",
              "curvature_ratio": "TOO SHARP", "min_radius": "TOO SHARP"}
PASS_WORDS = {"pivot_clearance": "clear", "undercut": "no undercut", "cusp": "no cusp"}
DEFAULT_MARK = "*"  # marks a limit that is the common-practice default
DEFAULT_NOTE = f"  {DEFAULT_MARK} common practice: a rule of thumb, used where the file sets no limit"
NEAR_ZERO = 1e-9  # a displayed value this small (in its unit) is shown as 0
NOTE_WIDTH = 78  # a long warning wraps within an 80-column terminal, indented under its "!"


def _num(value: float, digits: int = 4) -> str:
    return fmt(0.0 if abs(value) < NEAR_ZERO else value, digits)


def _limit_text(study: CamStudy, c) -> str:
    q, limit = c.quantity, _check_value(c.quantity, c.limit)
    mark = f" {DEFAULT_MARK}" if study.limit_source.get(q) == COMMON_PRACTICE else ""
    if q == "pressure_angle":
        return f"≤ {_num(limit)}{mark}"
    if q == "undercut":
        return f"> {_num(limit)} (roller)"
    if q in ("curvature_ratio", "min_radius"):
        return f"≥ {_num(limit)}{mark}"
    if q == "cusp":
        return "> 0"
    if q == "pivot_clearance":
        return "> 0"
    if q == "face_width":
        return f"≤ {_num(limit)} (face)"
    return "none"


def _verdict(c) -> Text:
    if c.ok:
        return Text(PASS_WORDS.get(c.quantity, "within"), style="green")
    return Text(FAIL_WORDS.get(c.quantity, "OVER"), style="bold red")


def _used(c) -> str:
    if c.used is None:
        return "—"
    return "∞" if math.isinf(c.used) else axisreport.percent(c.used, 1)


def _where(intervals) -> str:
    return ", ".join(f"{_num(deg(i.start), 5)}°–{_num(deg(i.end), 5)}°" for i in intervals)


def _radius_row(table: Table, name: str, radii) -> None:
    c, h = radii.convex, radii.concave
    table.add_row(name, _num(mm(c.value)), _num(deg(c.at), 5),
                  "none" if h is None else _num(mm(h.value)), "" if h is None else _num(deg(h.at), 5))


def _table(columns) -> Table:
    """A Rich table whose headers are plain text (no markup: "[mm]" must stay visible)."""
    table = Table(expand=False, box=box.SIMPLE_HEAD, show_edge=False, pad_edge=False, padding=(0, 1))
    for name, justify in columns:
        table.add_column(Text(name), justify=justify)
    return table


def pivot_words(study: CamStudy) -> str:
    """The pivot against the cam in a sentence: how far clear, or that the cam reaches it (the verdict's word)."""
    a = study.analysis
    c, top = a.pivot_clearance, a.largest_radius
    d = mm(study.cam.follower.pivot_distance)
    where = f"largest cam radius {_num(mm(top.value))} mm (follower there at {_num(deg(top.at), 5)}°)"
    if study.verdict.get("pivot_clearance").ok:
        return f"pivot clear of the cam by {_num(mm(c.value))} mm: {where}, pivot at {_num(d)} mm"
    return (f"pivot not clear of the cam (clearance {_num(mm(c.value))} mm): the {where} reaches the pivot "
            f"at {_num(d)} mm, so the turning cam would strike it; move the pivot out or make the cam smaller")


def cam_table(study: CamStudy) -> Group:
    """One cam: checks against limits in words, then the curvature and any trouble spots."""
    spec, a = study.spec, study.analysis
    state = Text("all checks pass", style="green") if study.ok else Text("CHECK FAILED", style="bold red")
    head = Text.assemble((f"cam {spec.name}", "bold"), "  ", state)
    what = Text(f"  {follower_words(spec.follower)} follower on axis {spec.axis}, {TURNING_WORDS[spec.turning]}\n"
                f"  base circle radius {_num(mm(study.cam.follower.base_radius))} mm")
    table = _table((("check", "left"), ("value", "right"), ("at [deg]", "right"),
                    ("limit", "left"), ("used", "right"), ("verdict", "left")))
    for c in study.verdict.checks:
        value = _check_value(c.quantity, c.value)
        table.add_row(Text(CHECK_LABELS[c.quantity]), f"{value:.0f}" if c.quantity == "corner" else _num(value),
                      _num(deg(c.at), 5), Text(_limit_text(study, c)), _used(c), _verdict(c))
    lines = [head, what, Padding(table, (0, 0, 0, 2))]
    if COMMON_PRACTICE in study.limit_source.values():
        lines.append(Text(DEFAULT_NOTE, style="dim"))
    radii = _table((("least radius", "left"), ("convex [mm]", "right"), ("at [deg]", "right"),
                    ("concave [mm]", "right"), ("at [deg]", "right")))
    if a.pitch_radii is not None:
        _radius_row(radii, "pitch curve", a.pitch_radii)
    _radius_row(radii, "profile", a.profile_radii)
    lines.append(Padding(radii, (0, 0, 0, 2)))
    if a.face is not None:
        lines.append(Text(f"  contact on the face from {_num(mm(a.face.low.value))} mm to "
                          f"{_num(mm(a.face.high.value))} mm (width {_num(mm(a.face.width))} mm)"))
    if a.undercut:
        lines.append(Text(f"  ! undercut at {_where(a.undercut)}: the profile loops there and cannot be cut",
                          style="yellow"))
    if a.cusp:
        lines.append(Text(f"  ! cusp at {_where(a.cusp)}: the face cannot follow the profile there",
                          style="yellow"))
    clearance = study.verdict.get("pivot_clearance")
    if clearance is not None and not clearance.ok:
        lines.append(Text(textwrap.fill(pivot_words(study), NOTE_WIDTH, initial_indent="  ! ",
                                        subsequent_indent="    "), style="yellow"))
    for c in a.corners:
        lines.append(Text(f"  ! corner at {_num(deg(c), 5)}°: the axis velocity jumps, the cam has a step",
                          style="yellow"))
    return Group(*lines)


def loads_table(spec_name: str, loads: CamLoads, oscillating: bool) -> Group:
    """A follower's loads at the machine speed, verdicts in words."""
    state = Text("contact holds", style="green") if loads.ok else Text("CONTACT AT RISK", style="bold red")
    head = Text.assemble((f"loads on cam {spec_name}", "bold"), f"  at {_num(loads.speed)} cycles/min  ", state)
    table = _table((("loads", "left"), ("value", "right"), ("at [deg]", "right"), ("verdict", "left")))
    where = f" at {_num(loads.load_radius)} mm" if oscillating else ""
    kept = Text("kept", style="green") if loads.contact_kept else Text("LOST: the follower jumps", style="bold red")
    table.add_row(Text(f"contact force, least{where} [N]"), _num(loads.min_contact),
                  _num(loads.min_contact_at, 5), kept)
    meets = Text("met", style="green") if loads.min_contact >= loads.margin else Text("NOT MET", style="bold red")
    table.add_row(Text("margin wanted [N]" + ("" if loads.margin_given else " (none given)")),
                  _num(loads.margin), "", meets)
    if loads.jump_speed is None:
        table.add_row(Text("max speed without jump [cycles/min]"), "any", "", Text("nothing lifts it"))
    else:
        ok = loads.jump_speed > loads.speed
        table.add_row(Text("max speed without jump [cycles/min]"), _num(loads.jump_speed), "",
                      Text(f"now {_num(loads.speed)}", style="green" if ok else "bold red"))
    table.add_row(Text("spring preload for the margin [N]"), _num(loads.preload_for_margin), "",
                  Text(f"now {_num(loads.preload)}"))
    table.add_row(Text("camshaft torque, peak [N·m]"), _num(loads.peak_torque), _num(loads.peak_torque_at, 5), "")
    table.add_row(Text("camshaft torque, RMS [N·m]"), _num(loads.rms_torque), "", "")
    notes = [f"  moving mass {_num(loads.mass)} kg: follower + a third of the spring (common practice)"]
    if oscillating:
        notes.append(f"  mass, forces and spring rate act {_num(loads.load_radius)} mm from the pivot, along the arc")
    return Group(head, Padding(table, (0, 0, 0, 2)), *(Text(n) for n in notes), Text("  " + LOADS_CAUTION.replace("\n", "\n  "), style="dim"))


# --- the check section ---------------------------------------------------------


def cam_section(project: Project):
    """`check`'s cam section: ("cams", list of cam JSON, Rich renderables, ok), or None."""
    specs = cam_specs(project)
    if not specs:
        return None
    docs, renderables, ok = [], [], True
    for spec in specs:
        try:
            study = study_cam(project, spec)
        except CamGeometryError as exc:  # only after an edit: a loaded file has been checked
            problem = f'key "{exc.key}": {exc.message}' if exc.key else exc.message
            docs.append({"name": spec.name, "axis": spec.axis, "ok": False, "error": problem})
            renderables.append(Text(f"cam {spec.name}  CANNOT BE LAID OUT: {problem}", style="bold red"))
            ok = False
            continue
        loads = cam_loads(project, study)
        doc = cam_json(study, loads)
        docs.append(doc)
        ok = ok and doc["ok"]
        renderables.append(cam_table(study))
        if loads is not None:
            oscillating = FOLLOWERS[spec.follower].motion_kind == "angular"
            renderables.append(loads_table(spec.name, loads, oscillating))
    return "cams", docs, renderables, ok


CHECK_SECTIONS.append(cam_section)
