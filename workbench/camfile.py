"""The `[[cam]]` part of the project file: a cam, its follower, limits and loads.

```toml
[[cam]]
name = "stamp-cam"            # unique among the cams
axis = "stamp"                # the axis whose motion the follower makes
turning = "cw"                # "cw" or "ccw", seen with the follower on top

[cam.follower]
type = "translating-roller"   # an id of solver.cam.FOLLOWERS
prime_radius = 55.0           # follower sizes, mm
roller_radius = 12.0
offset = 5.0

[cam.limits]                  # optional; absent limits are common practice
pressure_angle = 30.0         # deg
curvature_ratio = 2.0         # smallest convex pitch radius / roller radius
min_radius = 8.0              # mm, smallest convex profile radius (no default)

[cam.loads]                   # optional: a force-closed follower
follower_mass = 1.8           # kg
spring_mass = 0.3             # kg (a third of it moves with the follower)
spring_rate = 6.0             # N/mm
preload = 120.0               # N, spring force with the follower on the base circle
external = 0.0                # N, constant, pushing the follower onto the cam
friction = 0.0                # N, opposing the follower's motion
margin = 40.0                 # N, least contact force wanted
```

An axis in mm drives a translating follower, an axis in deg an oscillating
one.  For an oscillating follower the loads are referred to a point
`radius` mm from the pivot (default: the roller centre, `arm_length`) and
act along its arc.  Values are kept as the file gives them (mm, deg, N,
kg); `build_cam` and `follower_load` convert to SI once, here at the edge.
"""

from __future__ import annotations

import math
from dataclasses import MISSING, dataclass, fields
from typing import TYPE_CHECKING

from solver.cam import (
    DEFAULT_POINTS,
    FOLLOWERS,
    Cam,
    CamAnalysis,
    CamGeometryError,
    CamLimits,
    CamVerdict,
    Follower,
    RollerFollower,
    Turning,
    analyse,
    check_cam,
    common_practice_limits,
    motion_from_program,
)
from solver.loads import FollowerLoad

from .tomlcheck import ProjectError, Table

if TYPE_CHECKING:
    from .projectfile import Project

PART_KEY = "cam"
MM = 1e-3  # m per mm
N_PER_MM = 1e3  # N/m per N/mm
TURNING = {"cw": Turning.CLOCKWISE, "ccw": Turning.COUNTERCLOCKWISE}
UNIT_FOR_MOTION = {"linear": "mm", "angular": "deg"}  # the axis unit each follower kind needs
UNIT_SCALE = {"mm": MM, "deg": math.pi / 180.0}  # axis unit → SI (m, rad)
COMMON_PRACTICE = "common practice"
FROM_FILE = "file"


@dataclass(frozen=True)
class CamLimitsSpec:
    """Limits as the file gives them; None where absent (deg, ratio, mm)."""

    pressure_angle: float | None = None
    curvature_ratio: float | None = None
    min_radius: float | None = None


@dataclass(frozen=True)
class CamLoadsSpec:
    """A force-closed follower as the file gives it (kg, N/mm, N, mm); None where absent."""

    follower_mass: float
    spring_rate: float
    preload: float
    spring_mass: float | None = None
    external: float | None = None
    friction: float | None = None
    margin: float | None = None
    radius: float | None = None

    @property
    def mass(self) -> float:
        """kg moving with the follower: its own plus a third of the spring's (common practice)."""
        return FollowerLoad.reduced_mass(self.follower_mass, self.spring_mass or 0.0)


@dataclass(frozen=True)
class CamSpec:
    """One `[[cam]]` table in file units.  `sizes`: (key, mm) pairs in the follower's field order."""

    name: str
    axis: str
    turning: str
    follower: str
    sizes: tuple[tuple[str, float], ...]
    limits: CamLimitsSpec = CamLimitsSpec()
    loads: CamLoadsSpec | None = None

    def size(self, key: str) -> float | None:
        return dict(self.sizes).get(key)

    @property
    def label(self) -> str:
        return cam_label(self.name, None)


def cam_label(name: str | None, number: int | None) -> str:
    return f'cam "{name}"' if name else f"cam {number}"


def cam_specs(project: Project) -> list[CamSpec]:
    """The project's cams (empty when it has none)."""
    return list(project.parts.get(PART_KEY) or [])


def find_cam(project: Project, name: str) -> CamSpec | None:
    return next((c for c in cam_specs(project) if c.name == name), None)


# --- building solver objects (SI) --------------------------------------------


def follower_of(spec: CamSpec) -> Follower:
    """The solver follower (m); raises `CamGeometryError` naming the size at fault."""
    return FOLLOWERS[spec.follower](**{k: v * MM for k, v in spec.sizes})


def build_cam(project: Project, spec: CamSpec) -> Cam:
    """The cam in SI: the axis motion from its lowest position, the follower, the turning."""
    program = project.programs[spec.axis]
    unit = project.axis(spec.axis).unit
    motion = motion_from_program(program, UNIT_SCALE[unit])
    return Cam(motion, follower_of(spec), TURNING[spec.turning])


def effective_limits(spec: CamSpec, follower: Follower) -> tuple[CamLimits, dict[str, str]]:
    """Limits in SI and where each comes from ("file" or "common practice")."""
    default = common_practice_limits(follower)
    given = spec.limits
    source: dict[str, str] = {}
    angle = ratio = None
    if given.pressure_angle is not None:
        angle, source["pressure_angle"] = math.radians(given.pressure_angle), FROM_FILE
    elif default.pressure_angle is not None:
        angle, source["pressure_angle"] = default.pressure_angle, COMMON_PRACTICE
    if given.curvature_ratio is not None:
        ratio, source["curvature_ratio"] = given.curvature_ratio, FROM_FILE
    elif default.curvature_ratio is not None:
        ratio, source["curvature_ratio"] = default.curvature_ratio, COMMON_PRACTICE
    radius = None
    if given.min_radius is not None:
        radius, source["min_radius"] = given.min_radius * MM, FROM_FILE
    return CamLimits(pressure_angle=angle, curvature_ratio=ratio, min_radius=radius), source


def load_radius(spec: CamSpec) -> float | None:
    """m from the pivot where an oscillating follower's loads act; None for translating ones."""
    if spec.loads is None or FOLLOWERS[spec.follower].motion_kind != "angular":
        return None
    radius = spec.loads.radius if spec.loads.radius is not None else spec.size("arm_length")
    return radius * MM


def follower_load(spec: CamSpec) -> FollowerLoad | None:
    """The loads in the follower's own coordinate (N and kg, or N·m and kg·m² when oscillating)."""
    loads = spec.loads
    if loads is None:
        return None
    r = load_radius(spec)
    lever = 1.0 if r is None else r  # force × lever = moment; rate and mass take lever²
    return FollowerLoad(
        mass=loads.mass * lever * lever,
        spring_rate=loads.spring_rate * N_PER_MM * lever * lever,
        preload=loads.preload * lever,
        external=(loads.external or 0.0) * lever,
        friction=(loads.friction or 0.0) * lever,
    )


@dataclass(frozen=True)
class CamStudy:
    """A cam analysed: the geometry, its verdict and the limits used (with their sources)."""

    spec: CamSpec
    cam: Cam
    analysis: CamAnalysis
    verdict: CamVerdict
    limits: CamLimits
    limit_source: dict

    @property
    def ok(self) -> bool:
        return self.verdict.ok


def study_cam(project: Project, spec: CamSpec, points: int = DEFAULT_POINTS) -> CamStudy:
    """Analyse one cam of the project on `points` cam angles and check it.

    Raises `CamGeometryError` (with the key at fault) where the cam cannot be
    laid out, or where an edit has left the axis unable to drive it.
    """
    fault = axis_fault(project, spec.axis, spec.follower)
    if fault is not None:
        raise CamGeometryError(fault[1], key=fault[0])
    cam = build_cam(project, spec)
    result = analyse(cam, points=points)
    limits, source = effective_limits(spec, cam.follower)
    return CamStudy(spec, cam, result, check_cam(result, limits), limits, source)


# --- parsing -----------------------------------------------------------------


def _non_negative(t: Table, key: str, *, required=False) -> float | None:
    value = t.number(key, required=required)
    if value is not None and value < 0:
        raise t.error(key, f"must be zero or more, got {value!r}")
    return value


def _refuse_unknown(t: Table, known) -> None:
    """Name a misspelt key first, before the "is missing" it would otherwise cause."""
    extra = [k for k in t.data if k not in known]
    if extra:
        raise t.error(extra[0], f"is not a known key here (known: {', '.join(sorted(known))})")


def _parse_follower(t: Table, kind: str) -> tuple[tuple[str, float], ...]:
    """The follower's sizes (mm) in the order of its fields; `type` has been read already."""
    cls = FOLLOWERS[kind]
    _refuse_unknown(t, {"type", *(f.name for f in fields(cls))})
    sizes = []
    for f in fields(cls):
        required = f.default is MISSING and f.default_factory is MISSING
        value = t.number(f.name, required=required)
        if value is not None:
            sizes.append((f.name, value))
    t.done()
    return tuple(sizes)


def _parse_limits(t: Table | None, kind: str, sizes: dict) -> CamLimitsSpec:
    if t is None:
        return CamLimitsSpec()
    angle = t.number("pressure_angle", positive=True)
    if angle is not None and angle >= 90.0:
        raise t.error("pressure_angle", f"must be below 90 deg, got {angle!r}")
    ratio = t.number("curvature_ratio", positive=True)
    if ratio is not None and not issubclass(FOLLOWERS[kind], RollerFollower):
        raise t.error("curvature_ratio", f"applies to roller followers only, not {kind}")
    if ratio is not None and sizes.get("roller_radius") == 0:
        raise t.error("curvature_ratio", "a knife edge (roller_radius = 0) has no curvature ratio")
    radius = t.number("min_radius", positive=True)
    t.done()
    return CamLimitsSpec(angle, ratio, radius)


def _parse_loads(t: Table | None, kind: str) -> CamLoadsSpec | None:
    if t is None:
        return None
    _refuse_unknown(t, {f.name for f in fields(CamLoadsSpec)})
    follower_mass = t.number("follower_mass", required=True, positive=True)
    spring_mass = _non_negative(t, "spring_mass")
    spring_rate = _non_negative(t, "spring_rate", required=True)
    preload = _non_negative(t, "preload", required=True)
    external = t.number("external")
    friction = _non_negative(t, "friction")
    margin = _non_negative(t, "margin")
    radius = t.number("radius", positive=True)
    angular = FOLLOWERS[kind].motion_kind == "angular"
    if radius is not None and not angular:
        raise t.error("radius", f"applies to oscillating followers only, not {kind}")
    if radius is None and angular and "arm_length" not in {f.name for f in fields(FOLLOWERS[kind])}:
        raise t.error("radius", f"is missing: say how far from the pivot the loads of a {kind} act (mm)")
    t.done()
    return CamLoadsSpec(follower_mass, spring_rate, preload, spring_mass, external, friction, margin, radius)


def axis_fault(project: Project, name: str, kind: str) -> tuple[str, str] | None:
    """(key, problem) when axis `name` cannot drive a `kind` follower, else None.

    The key is "axis" or "type" (the follower's).  A loaded project passes;
    an edited one (an axis renamed, indexed or switched to another unit) may not.
    """
    names = [a.name for a in project.axes]
    if name not in names:
        return "axis", f"no axis {name!r} in this file (axes: {', '.join(names) or 'none'})"
    axis = project.axis(name)
    if axis.index:
        return "axis", (f"axis {axis.name!r} advances {axis.index:g} {axis.unit} every cycle "
                        "(index): a cam must return its follower to the start every turn")
    motion = FOLLOWERS[kind].motion_kind
    need = UNIT_FOR_MOTION[motion]
    if axis.unit != need:
        other = "an oscillating" if motion == "linear" else "a translating"
        return "type", (f"a {kind} follower makes a {'straight-line' if motion == 'linear' else 'swinging'} "
                        f"motion and needs an axis in {need}, but axis {axis.name!r} is in {axis.unit}: "
                        f"choose {other} follower or an axis in {need}")
    return None


def _parse_cam(raw, project: Project, file, number: int) -> CamSpec:
    guess = raw.get("name") if isinstance(raw, dict) else None
    label = cam_label(guess if isinstance(guess, str) and guess.strip() else None, number)
    t = Table(raw, file, label)
    _refuse_unknown(t, {"name", "axis", "turning", "follower", "limits", "loads"})
    name = t.text("name", required=True)
    if not name.strip():
        raise t.error("name", "must not be empty")
    axis = t.text("axis", required=True)
    turning = t.text("turning", required=True, choices=tuple(TURNING))
    ft = t.table("follower", f"{label}, follower")
    if ft is None:
        raise t.error("follower", "is missing: a [cam.follower] table gives the follower type and sizes")
    kind = ft.text("type", required=True, choices=tuple(FOLLOWERS))
    fault = axis_fault(project, axis, kind)
    if fault is not None:
        raise (ft if fault[0] == "type" else t).error(*fault)
    sizes = _parse_follower(ft, kind)
    limits = _parse_limits(t.table("limits", f"{label}, limits"), kind, dict(sizes))
    loads = _parse_loads(t.table("loads", f"{label}, loads"), kind)
    t.done()
    spec = CamSpec(name, axis, turning, kind, sizes, limits, loads)
    try:
        follower_of(spec)
    except CamGeometryError as exc:
        raise ft.error(exc.key, exc.message) from None
    try:
        study_cam(project, spec)
    except CamGeometryError as exc:
        where = t if exc.key == "axis" else ft
        raise where.error(exc.key, exc.message) from None
    return spec


def parse_cams(tables: list, project: Project, file) -> list[CamSpec]:
    """Check every `[[cam]]` table against the project's axes (raises `ProjectError`)."""
    specs: list[CamSpec] = []
    for number, raw in enumerate(tables, start=1):
        spec = _parse_cam(raw, project, file, number)
        if any(s.name == spec.name for s in specs):
            raise ProjectError(file, spec.label, "name", "is used by an earlier cam: names must be unique")
        specs.append(spec)
    return specs


# --- writing -----------------------------------------------------------------


def _drop_none(items) -> dict:
    return {k: v for k, v in items if v is not None}


def dump_cams(specs) -> list[dict]:
    """Plain TOML data for the cams, in the order and shape the parser reads."""
    out = []
    for spec in specs or []:
        entry = {"name": spec.name, "axis": spec.axis, "turning": spec.turning,
                 "follower": {"type": spec.follower, **dict(spec.sizes)}}
        limits = _drop_none((f.name, getattr(spec.limits, f.name)) for f in fields(CamLimitsSpec))
        if limits:
            entry["limits"] = limits
        if spec.loads is not None:
            entry["loads"] = _drop_none((f.name, getattr(spec.loads, f.name)) for f in fields(CamLoadsSpec))
        out.append(entry)
    return out


# Imported last: projectfile loads every part module (this one included) when it is first imported.
from .projectfile import Part, register_part  # noqa: E402

register_part(Part(PART_KEY, parse_cams, dump_cams))
