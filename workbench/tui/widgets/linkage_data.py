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

from solver.kinematics import GROUND, NOT_ASSEMBLED, NOT_DRIVEN, SOLVED, mobility
from solver.kinematics.base import LENGTH
from solver.kinematics.newton import assemble
from solver.kinematics.system import System

from ...linkagefile import LinkageSpec, describe, split_ref, target_unit
from ...linkagemodel import LinkageFault, build_linkage
from ...linkagesolve import solve_linkage, stretches
from ...linkagestudy import LinkageStudy, study_linkage

MM = 1e3  # mm per m
FULL_TURN = 360.0  # master degrees per cycle
QUANTITIES = ("position", "velocity", "acceleration", "jerk")
GUIDE_MARGIN = 0.08  # a slider's guide is drawn this share of the linkage's size past the travel at each end
STOP_GAP = 1e-9  # deg: a dead point this close after the last grid instant needs no instant of its own
MIN_SIZE = 1.0  # mm: the least extent of a drawing (a linkage of one point still gets a frame)

PLACED = "as placed in the file: it does not assemble there"
NEAREST = "as near as it comes to assembling at master 0°: the joints marked ! stay open"
OPEN = 1e-6  # a joint whose scaled residual (lengths in units of the linkage's size, angles in rad) is
#              larger than this stays open in the nearest configuration
ASSEMBLED = "assembled at master 0°; not driven, so it does not move"


# --- outputs --------------------------------------------------------------------------------


def hermite(t: np.ndarray, y: np.ndarray, dy: np.ndarray, at: float) -> float:
    """y at `at` from samples y(t) and their slopes dy (per unit of t): cubic Hermite between the
    neighbouring samples; past the ends, a first-order step from the nearest one."""
    n = t.size
    k = int(np.searchsorted(t, at, side="right")) - 1
    if k < 0:
        return float(y[0] + dy[0] * (at - t[0]))
    if k >= n - 1:
        return float(y[-1] + dy[-1] * (at - t[-1]))
    h = t[k + 1] - t[k]
    if h <= 0.0:
        return float(y[k + 1])
    s = (at - t[k]) / h
    h00, h10, h01, h11 = 2 * s**3 - 3 * s**2 + 1, s**3 - 2 * s**2 + s, -2 * s**3 + 3 * s**2, s**3 - s**2
    return float(h00 * y[k] + h10 * h * dy[k] + h01 * y[k + 1] + h11 * h * dy[k + 1])


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
class Frames:
    """Body frames of a linkage: per body, origin (complex, mm) and angle (rad); arrays over
    instants (N,) or single values.  The ground is at 0 with angle 0."""

    origin: dict
    angle: dict

    def point(self, spec: LinkageSpec, ref: str):
        """Machine position (complex, mm) of "body.point"."""
        body, name = split_ref(ref)
        u, v = spec.points(body)[name]
        if body == GROUND:
            return complex(u, v)
        return self.origin[body] + (u + 1j * v) * np.exp(1j * self.angle[body])


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


def _frames_from_q(q: np.ndarray, bodies) -> Frames:
    """Frames from coordinates q (..., 3B) in m, rad: the last axis body by body (x, y, φ)."""
    origin, angle = {}, {}
    for k, b in enumerate(bodies):
        origin[b] = (q[..., 3 * k] + 1j * q[..., 3 * k + 1]) * MM
        angle[b] = q[..., 3 * k + 2]
    return Frames(origin, angle)


def _placed(spec: LinkageSpec) -> Frames:
    """The bodies where the file places them (rough, at master 0)."""
    return Frames({b.name: complex(b.place[0], b.place[1]) for b in spec.bodies},
                  {b.name: math.radians(b.place[2]) for b in spec.bodies})


def _slider_unit(spec: LinkageSpec, joint, frames: Frames):
    """Unit vector (complex) of a slider's travel in the machine frame."""
    body, _ = split_ref(joint.first)
    ax, ay = joint.axis or (1.0, 0.0)
    u = complex(ax, ay) / abs(complex(ax, ay))
    return u if body == GROUND else u * np.exp(1j * frames.angle[body])


def slider_travel(spec: LinkageSpec, joint, frames: Frames):
    """Travel of a slider's sliding point from its guide point along the guide (mm)."""
    d = frames.point(spec, joint.second) - frames.point(spec, joint.first)
    u = _slider_unit(spec, joint, frames)
    return (d * np.conj(u)).real


def guide_line(spec: LinkageSpec, joint, frames: Frames, travel: tuple[float, float], margin: float):
    """The guide of a slider as two points (complex, mm), `margin` past the travel at each end."""
    g = frames.point(spec, joint.first)
    u = _slider_unit(spec, joint, frames)
    return np.array([g + (travel[0] - margin) * u, g + (travel[1] + margin) * u])


def all_points(spec: LinkageSpec, frames: Frames) -> dict[str, object]:
    """Every named point of every body and of the ground, "body.point" → complex mm (or arrays)."""
    out = {f"{GROUND}.{p}": complex(x, y) for p, (x, y) in spec.ground}
    for b in spec.bodies:
        for p, _ in b.points:
            out[f"{b.name}.{p}"] = frames.point(spec, f"{b.name}.{p}")
    return out


def size_of(spec: LinkageSpec) -> float:
    """A characteristic size of the linkage (mm): the largest extent of its points as placed."""
    pts = np.array([complex(v) for v in all_points(spec, _placed(spec)).values()])
    if pts.size == 0:
        return MIN_SIZE
    extent = max(float(np.ptp(pts.real)), float(np.ptp(pts.imag)))
    return max(extent, MIN_SIZE)


def _bounds(spec: LinkageSpec, frames: Frames, travel: dict, margin: float) -> tuple[float, float, float, float]:
    zs = [np.atleast_1d(np.asarray(z, dtype=complex)).ravel() for z in all_points(spec, frames).values()]
    for j in spec.joints:
        if j.kind == "slider":
            zs.append(np.asarray(guide_line(spec, j, frames, travel[j.name], margin), dtype=complex).ravel())
    z = np.concatenate(zs) if zs else np.zeros(1, dtype=complex)
    x0, x1, y0, y1 = float(z.real.min()), float(z.real.max()), float(z.imag.min()), float(z.imag.max())
    pad = max(x1 - x0, y1 - y0, MIN_SIZE) * 0.02
    return x0 - pad, x1 + pad, y0 - pad, y1 + pad


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


def open_joints(mechanism) -> tuple[np.ndarray | None, tuple[tuple[str, float | None], ...]]:
    """The configuration nearest to assembled at master 0 (least squares from the file's placing) and
    the joints and drivers that stay open there, widest gap first: (name, gap in mm, or None for a
    gap that is an angle)."""
    system = System(mechanism)
    q, _ = assemble(system, system.initial_guess(), 0.0)
    res = system.residual(q[:, None], system.drive(np.array([0.0])))[:, 0]
    scaled = res * system.row_scale
    gaps: dict[str, list] = {}
    for name, unit, r, sr in zip(system.row_names, system.row_units, res, scaled):
        entry = gaps.setdefault(name, [0.0, 0.0, True])
        entry[0] += sr * sr
        entry[1] += (r * MM) ** 2 if unit == LENGTH else 0.0
        entry[2] = entry[2] and unit == LENGTH
    found = sorted(((n, math.sqrt(g[0]), math.sqrt(g[1]) if g[2] else None) for n, g in gaps.items()),
                   key=lambda item: -item[1])
    return q, tuple((n, gap) for n, size, gap in found if size > OPEN)


def _still(project, spec: LinkageSpec, study: LinkageStudy | None):
    """The pose to draw when no instant solved, what it is in words, and the joints that stay open."""
    if study is not None and study.status == NOT_ASSEMBLED:
        try:
            q, gaps = open_joints(study.solution.built.mechanism)
        except (ArithmeticError, ValueError, np.linalg.LinAlgError):
            q, gaps = None, ()
        if q is not None and gaps:
            return _frames_from_q(q, study.solution.built.mechanism.moving), NEAREST, gaps
    if study is not None and study.status == NOT_DRIVEN:
        try:
            _, q = mobility(study.solution.built.mechanism)
        except (ArithmeticError, ValueError, np.linalg.LinAlgError):
            q = None
        if q is not None:
            return _frames_from_q(q, study.solution.built.mechanism.moving), ASSEMBLED, ()
    return _placed(spec), PLACED, ()


def cuts_of(project, spec: LinkageSpec) -> tuple[float, ...]:
    """Master angles (deg) where an axis a driver follows changes segment (0° left out)."""
    try:
        return tuple(s.start for s in stretches(project, spec) if s.start > 0.0)
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
        problem = f"the linkage could not be studied ({exc})"
    margin = GUIDE_MARGIN * size_of(spec)
    bodies = tuple(b.name for b in spec.bodies)
    gaps = ()
    if study is not None and study.solution.result.theta.size:
        result = study.solution.result
        bodies = tuple(study.solution.built.mechanism.moving)
        frames = _frames_from_q(result.q, bodies)
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
        bounds=_bounds(spec, frames, travel, margin), cuts=cuts_of(project, spec), speed=project.speed,
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
        frames = _frames_from_q(q, entry.bodies)
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
    frames = _frames_from_q(entry.q, entry.bodies)
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
