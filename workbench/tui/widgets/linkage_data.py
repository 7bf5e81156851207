"""What the Linkage view shows, computed from a project without any UI.

`study_entry(project, spec)` studies one `[[linkage]]` of the (possibly
edited) project over a cycle (`workbench.linkagestudy`) and keeps what the
screen needs in file units: each output as a `Trace` (master deg; mm or deg
per s^k), the body coordinates at every solved instant, the travel of every
slider, the cuts where a driver's axis changes segment, and the extent of
the drawing over the whole cycle (so the scale holds while the angle
steps).  When nothing solved it keeps a still pose instead: the linkage
assembled at master 0° (not driven), as near as it comes to assembling
(with the joints that stay open and their gaps), or as the file places it.

`pose_at(entry, angle)` gives the linkage at any solved master angle (cubic
Hermite between solved instants, with their rates: exact to far below a
screen dot), `Trace.at` an output's values there.  Nothing here imports
Textual: the tests and the worker call it directly.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from solver.kinematics import NOT_ASSEMBLED, NOT_DRIVEN, SOLVED, mobility

from ...linkagefile import LinkageSpec, describe, target_unit
from ...linkagemodel import LinkageFault
from ...linkagesolve import cuts, solve_linkage
from ...linkagestudy import LinkageStudy, study_linkage
from .linkage_geometry import (
    GUIDE_MARGIN,
    MM,
    Frames,
    all_points,
    drawing_bounds,
    frames_from_q,
    guide_line,
    hermite,
    open_joints,
    placed,
    size_of,
    slider_travel,
)

FULL_TURN = 360.0  # master degrees per cycle
QUANTITIES = ("position", "velocity", "acceleration", "jerk")
STOP_GAP = 1e-9  # deg: a dead point this close after the last grid instant needs no instant of its own

STUDY_FAILED = "the linkage could not be studied"  # an unexpected failure, said on screen with its reason
PLACED = "as placed in the file: it does not assemble there"
NEAREST = "as near as it comes to assembling at master 0°: the joints marked ! stay open"
ASSEMBLED = "assembled at master 0°; not driven, so it does not move"


# --- outputs --------------------------------------------------------------------------------


@dataclass(frozen=True)
class Trace:
    """One output over the solved instants: master angle (deg) and position, velocity,
    acceleration, jerk in the output's unit per s^k; `omega` the master speed (rad/s)."""

    name: str
    unit: str
    of: str
    theta: np.ndarray
    values: dict
    omega: float
    grid: int = -1  # instants on the study's grid (the plots'); -1: all of them

    def largest(self, quantity: str) -> float:
        """The largest |value| of `quantity` on the study's grid (0 when empty)."""
        _, values = self.plotted(quantity)
        return float(np.max(np.abs(values))) if values.size else 0.0

    def plotted(self, quantity: str) -> tuple[np.ndarray, np.ndarray]:
        """(master deg, values) on the study's grid, for the plots."""
        n = self.theta.size if self.grid < 0 else self.grid
        return self.theta[:n], self.values[quantity][:n]

    def at(self, angle_deg: float) -> dict[str, float]:
        """Position, velocity, acceleration and jerk at master angle `angle_deg` (each quantity
        Hermite-interpolated with the next as its slope; jerk linearly)."""
        t = np.radians(self.theta)
        at = math.radians(angle_deg)
        out = {}
        for q, nxt in zip(QUANTITIES[:-1], QUANTITIES[1:]):
            out[q] = hermite(t, self.values[q], self.values[nxt] / self.omega, at)
        out["jerk"] = float(np.interp(at, t, self.values["jerk"])) if t.size else math.nan
        return out


# --- the entry ----------------------------------------------------------------------------------


@dataclass(frozen=True)
class LinkageEntry:
    """One linkage of the project as the view draws and reports it.

    `study` is None (with `problem`) when an edit has left it unbuildable.
    `theta` (deg) are the solved instants, `q`, `dq` the body coordinates
    there (m, rad) and their rates per rad; `still` the pose to draw when
    none solved, `still_words` what that pose is.  `travel` gives each
    slider's least and greatest travel (mm), `bounds` the drawing's extent
    (x min, x max, y min, y max; mm), `cuts` the master angles (deg) where
    a driver's axis changes segment.
    """

    spec: LinkageSpec
    study: LinkageStudy | None
    problem: str | None
    theta: np.ndarray
    q: np.ndarray
    dq: np.ndarray
    bodies: tuple[str, ...]
    traces: dict
    still: Frames | None
    still_words: str
    travel: dict
    bounds: tuple[float, float, float, float]
    cuts: tuple[float, ...] = ()
    speed: float = 0.0
    drivers: dict = field(default_factory=dict)
    gaps: tuple = ()  # (joint or driver, gap in mm or None) that stay open where it does not assemble

    @property
    def name(self) -> str:
        return self.spec.name

    @property
    def status(self) -> str:
        return "invalid" if self.study is None else self.study.status

    @property
    def solved(self) -> bool:
        return self.status == SOLVED

    @property
    def runs(self) -> bool:
        """Some instants were solved (the whole cycle, or up to a dead point)."""
        return self.theta.size > 0

    @property
    def last(self) -> float:
        """The last solved master angle (deg); 0 when none."""
        return float(self.theta[-1]) if self.theta.size else 0.0

    @property
    def dead_joints(self) -> tuple[str, ...]:
        dead = self.study.solution.result.dead_point if self.study is not None else None
        return tuple(dead.joints) if dead is not None else ()

    @property
    def involved(self) -> tuple[str, ...]:
        """The joints to point out in the drawing: those of a dead point, or those that stay open."""
        return self.dead_joints or tuple(name for name, _ in self.gaps)

    def output_study(self, name: str):
        if self.study is None:
            return None
        return next((o for o in self.study.outputs if o.name == name), None)

    def reachable(self, angle_deg: float) -> float:
        """`angle_deg` (in [0, 360)) held to the solved stretch: past a dead point, the last solved angle."""
        if self.solved or not self.runs:
            return angle_deg if self.solved else 0.0
        return min(max(angle_deg, float(self.theta[0])), self.last)


def _traces(study: LinkageStudy) -> dict[str, Trace]:
    solution = study.solution
    result = solution.result
    out = {}
    if result.theta.size == 0:
        return out
    theta = np.degrees(result.theta)
    for o in study.spec.outputs:
        curve = result.output(solution.built.outputs[o.name])
        unit = solution.built.units[o.name]
        k = MM if unit == "mm" else 180.0 / math.pi
        values = {"position": curve.value * k, "velocity": curve.velocity * k,
                  "acceleration": curve.acceleration * k, "jerk": curve.jerk * k}
        out[o.name] = Trace(o.name, unit, describe(o.target, study.spec), theta, values, result.omega, theta.size)
    return out


def _with_stop(project, spec: LinkageSpec, study, theta, q, dq, traces):
    """Add the instant a dead point was found at (between grid instants) to what is drawn and read:
    the linkage is shown stopped exactly where the solver stopped.  Traces keep their grid length
    (`Trace.grid`) for the plots: rates run away at a limit position and would flatten the rest."""
    dead = study.solution.result.dead_point if study is not None else None
    if dead is None or not theta.size or math.degrees(dead.at) <= theta[-1] + STOP_GAP:
        return theta, q, dq, traces
    try:
        extra = solve_linkage(project, spec, theta=np.array([dead.at]))
    except (LinkageFault, ArithmeticError, ValueError, np.linalg.LinAlgError):
        return theta, q, dq, traces
    r = extra.result
    if r.status != SOLVED or r.theta.size != 1:
        return theta, q, dq, traces
    theta = np.append(theta, np.degrees(r.theta))
    q, dq = np.vstack([q, r.q]), np.vstack([dq, r.dq])
    longer = {}
    for name, tr in traces.items():
        curve = r.output(extra.built.outputs[name])
        k = MM if tr.unit == "mm" else 180.0 / math.pi
        more = {"position": curve.value, "velocity": curve.velocity, "acceleration": curve.acceleration,
                "jerk": curve.jerk}
        values = {key: np.append(tr.values[key], more[key] * k) for key in QUANTITIES}
        longer[name] = Trace(tr.name, tr.unit, tr.of, theta, values, tr.omega, tr.grid)
    return theta, q, dq, longer


def _still(project, spec: LinkageSpec, study: LinkageStudy | None):
    """The pose to draw when no instant solved, what it is in words, and the joints that stay open."""
    if study is not None and study.status == NOT_ASSEMBLED:
        try:
            q, gaps = open_joints(study.solution.built.mechanism)
        except (ArithmeticError, ValueError, np.linalg.LinAlgError):
            q, gaps = None, ()
        if q is not None and gaps:
            return frames_from_q(q, study.solution.built.mechanism.moving), NEAREST, gaps
    if study is not None and study.status == NOT_DRIVEN:
        try:
            _, q = mobility(study.solution.built.mechanism)
        except (ArithmeticError, ValueError, np.linalg.LinAlgError):
            q = None
        if q is not None:
            return frames_from_q(q, study.solution.built.mechanism.moving), ASSEMBLED, ()
    return placed(spec), PLACED, ()


def cuts_of(project, spec: LinkageSpec) -> tuple[float, ...]:
    """Master angles (deg) where an axis a driver follows changes segment (0° left out)."""
    try:
        return tuple(c for c in cuts(project, spec) if c > 0.0)
    except KeyError:  # a driver's axis is gone: the study says so
        return ()


def study_entry(project, spec: LinkageSpec) -> LinkageEntry:
    """Study `spec` in `project` over one cycle, for the view (never raises for a bad linkage)."""
    study, problem = None, None
    try:
        study = study_linkage(project, spec)
    except LinkageFault as exc:
        problem = f'{exc.where}: key "{exc.key}": {exc.problem}' if exc.key else f"{exc.where}: {exc.problem}"
    except (ArithmeticError, ValueError, KeyError, np.linalg.LinAlgError) as exc:  # said on screen, never a traceback
        problem = f"{STUDY_FAILED} ({exc})"
    return entry_of(project, spec, study, problem)


def entry_of(project, spec: LinkageSpec, study: LinkageStudy | None, problem: str | None = None) -> LinkageEntry:
    """The view's entry for a study of `spec` (None, with `problem`, when there is none: drawn as placed)."""
    margin = GUIDE_MARGIN * size_of(spec)
    bodies = tuple(b.name for b in spec.bodies)
    gaps = ()
    if study is not None and study.solution.result.theta.size:
        result = study.solution.result
        bodies = tuple(study.solution.built.mechanism.moving)
        frames = frames_from_q(result.q, bodies)
        theta, q, dq = np.degrees(result.theta), result.q, result.dq
        still, words = None, ""
    else:
        frames, words, gaps = _still(project, spec, study)
        still = frames
        n = 3 * len(bodies)
        theta, q, dq = np.zeros(0), np.zeros((0, n)), np.zeros((0, n))
    travel = {}
    for j in spec.joints:
        if j.kind == "slider":
            s = np.atleast_1d(slider_travel(spec, j, frames))
            travel[j.name] = (float(s.min()), float(s.max()))
    drivers = {}
    if study is not None:
        drivers = {d.name: d for d in study.solution.built.mechanism.drivers.values()}
    traces = _traces(study) if study is not None else {}
    theta, q, dq, traces = _with_stop(project, spec, study, theta, q, dq, traces)
    return LinkageEntry(
        spec=spec, study=study, problem=problem, theta=theta, q=q, dq=dq, bodies=bodies,
        traces=traces, still=still, still_words=words, travel=travel, gaps=gaps,
        bounds=drawing_bounds(spec, frames, travel, margin), cuts=cuts_of(project, spec), speed=project.speed,
        drivers=drivers,
    )


def same_inputs(project, spec: LinkageSpec) -> tuple:
    """What a linkage's study depends on: the spec, the machine speed, the axes its drivers follow.

    Equal tuples (by value) mean an unchanged study: edits elsewhere need no new solve."""
    followed = []
    names = {a.name for a in project.axes}
    for d in spec.drivers:
        if d.axis is not None:
            followed.append((d.axis, project.axis(d.axis) if d.axis in names else None))
    return spec, project.speed, tuple(followed)


# --- a pose at one angle ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Pose:
    """The linkage at master angle `angle` (deg): its frames (single values), every point
    ("body.point" → complex mm) and the guide of each slider (two points)."""

    angle: float
    frames: Frames
    points: dict
    guides: dict


def pose_at(entry: LinkageEntry, angle_deg: float) -> Pose:
    """The linkage at `angle_deg` (held to the solved stretch); the still pose when none solved."""
    spec = entry.spec
    margin = GUIDE_MARGIN * size_of(spec)
    if entry.runs:
        angle = entry.reachable(angle_deg)
        t, at = np.radians(entry.theta), math.radians(angle)
        q = np.array([hermite(t, entry.q[:, c], entry.dq[:, c], at) for c in range(entry.q.shape[1])])
        frames = frames_from_q(q, entry.bodies)
    else:
        angle, frames = 0.0, entry.still
    guides = {j.name: guide_line(spec, j, frames, entry.travel[j.name], margin)
              for j in spec.joints if j.kind == "slider"}
    return Pose(angle, frames, all_points(spec, frames), guides)


def paths(entry: LinkageEntry) -> dict[str, np.ndarray]:
    """The path (complex mm over the solved instants) of every point an output reports (x or y)."""
    out = {}
    if not entry.runs:
        return out
    frames = frames_from_q(entry.q, entry.bodies)
    for o in entry.spec.outputs:
        if o.target.kind in ("x", "y") and o.target.of not in out:
            out[o.target.of] = np.asarray(frames.point(entry.spec, o.target.of), dtype=complex)
    return out


def driver_value(entry: LinkageEntry, name: str, angle_deg: float) -> tuple[float, str] | None:
    """(value, unit) of driver `name`'s coordinate at `angle_deg`: its motion there, in mm or deg
    (a steadily turning angle modulo 360°)."""
    driver = entry.drivers.get(name)
    spec_driver = next((d for d in entry.spec.drivers if d.name == name), None)
    if driver is None or spec_driver is None:
        return None
    unit = target_unit(entry.spec, spec_driver.target)
    d = float(np.atleast_1d(driver.motion(np.array([math.radians(angle_deg)]))[0])[0])
    value = d * MM if unit == "mm" else math.degrees(d)
    if unit == "deg" and spec_driver.turns is not None:
        value %= FULL_TURN
    return value, unit


def spots(entry: LinkageEntry, output: str | None) -> list[tuple[str, float]]:
    """(what, master deg) worth a look, worst first: the dead point, then the output's peaks by
    share of limit used (in v, a, j order without limits), then its lowest and highest value."""
    out = []
    if entry.study is not None and entry.status != SOLVED and entry.runs:
        out.append(("where it stops", entry.last))
    study = entry.output_study(output) if output else None
    if study is None:
        return out
    used = {c.quantity: c.used for c in study.checks}
    order = sorted(("velocity", "acceleration", "jerk"), key=lambda q: -used.get(q, -1.0))
    for q in order:
        peak = study.peaks[q]
        out.append((f"{q} peak", peak.at % FULL_TURN))
    out += [("lowest value", study.minimum.at % FULL_TURN), ("highest value", study.maximum.at % FULL_TURN)]
    return out
