"""The `[linkage.loads]` table: what the bodies weigh, what acts on them, and a servo per driver.

```toml
[linkage.loads]
gravity = [0.0, -9.81]              # m/s², machine frame (omit: none, e.g. a horizontal table)

[[linkage.loads.body]]
name = "rod"                        # a body of this linkage
mass = 0.9                          # kg
centre = [105.0, 0.0]               # mm in the body's frame, or one of its points: "B" (default: origin)
inertia = 3300.0                    # kg·mm² about the centre of mass (default 0)

[[linkage.loads.force]]
at = "head.face"                    # the body's point it acts at
force = [60.0, 0.0]                 # N, machine frame, constant
name = "gas spring"                 # optional: names it in messages and reports

[[linkage.loads.torque]]
body = "rocker"
torque = -0.8                       # N·m, counter-clockwise positive, constant

[[linkage.loads.servo]]
driver = "motor"                    # the driver whose motion the motor makes
# at = "O"                          # the pin (or slider) the motor works, when not the driven one
ratio = 20.0                        # motor turns per turn of the driven angle (per mm of a travel)
# lead = 10.0                       # a travel: mm per motor turn (ball screw, belt), instead of ratio
efficiency = 0.9                    # of the gearing (default 1)
rotor_inertia = 20.0                # kg·mm² turning at motor speed (default 0)

[linkage.loads.servo.limits]        # optional, each key too: at the motor
peak_torque = 0.5                   # N·m
rms_torque = 0.25                   # N·m
speed = 3000.0                      # rpm
```

Every key is read through `Table`, so a bad value is one `ProjectError`
naming file, table (``linkage "pusher", loads, body "crank"``) and key.
Values are kept as the file gives them (None where absent) so that dumps
round-trip; `loading_of` and `gearing_of` convert to SI once, here at the
edge.  Registered with `register_linkage_loads` on import.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields

from solver.kinematics import GROUND
from solver.loads import BodyMass, BodyTorque, Gearing, LinkageLoading, PointForce, ServoLimits

from .linkagefile import LinkageLoads, LinkageSpec, register_linkage_loads, split_ref, target_unit
from .tomlcheck import Table

MM = 1e-3  # m per mm
KG_MM2 = 1e-6  # kg·m² per kg·mm²
RPM = 2.0 * math.pi / 60.0  # rad/s per rev/min
TURN = 2.0 * math.pi  # rad per motor turn
LOADS_KEYS = ("gravity", "body", "force", "torque", "servo")
BODY_KEYS = ("name", "mass", "centre", "inertia")
FORCE_KEYS = ("name", "at", "force")
TORQUE_KEYS = ("name", "body", "torque")
SERVO_KEYS = ("driver", "at", "ratio", "lead", "efficiency", "rotor_inertia", "limits")
LIMIT_KEYS = ("peak_torque", "rms_torque", "speed")


# --- the file's values ---------------------------------------------------------


@dataclass(frozen=True)
class BodyLoadSpec:
    """A body's mass (kg), centre of mass ([x, y] mm in its frame, or a point name) and inertia (kg·mm²)."""

    name: str
    mass: float
    centre: tuple[float, float] | str | None = None
    inertia: float | None = None


@dataclass(frozen=True)
class ForceSpec:
    """A constant force (N, machine frame) at "body.point"."""

    at: str
    force: tuple[float, float]
    name: str | None = None

    @property
    def label(self) -> str:
        return self.name or self.at


@dataclass(frozen=True)
class TorqueSpec:
    """A constant torque (N·m, counter-clockwise positive) on a body."""

    body: str
    torque: float
    name: str | None = None

    @property
    def label(self) -> str:
        return self.name or f"torque on {self.body}"


@dataclass(frozen=True)
class ServoLimitsSpec:
    """At the motor: peak and RMS torque (N·m) and speed (rpm); None where absent."""

    peak_torque: float | None = None
    rms_torque: float | None = None
    speed: float | None = None

    def items(self):
        return ((f.name, getattr(self, f.name)) for f in fields(self))


@dataclass(frozen=True)
class ServoSpec:
    """The motor behind a driver: where it works (`at`, a joint; None: the driven coordinate),
    gearing (`ratio` motor turns per turn or per mm, or `lead` mm per motor turn), efficiency,
    rotor inertia (kg·mm²) and limits."""

    driver: str
    at: str | None = None
    ratio: float | None = None
    lead: float | None = None
    efficiency: float | None = None
    rotor_inertia: float | None = None
    limits: ServoLimitsSpec = ServoLimitsSpec()


@dataclass(frozen=True)
class LoadsSpec:
    """One `[linkage.loads]` table in file units; frozen, compares by value."""

    gravity: tuple[float, float] | None = None
    bodies: tuple[BodyLoadSpec, ...] = ()
    forces: tuple[ForceSpec, ...] = ()
    torques: tuple[TorqueSpec, ...] = ()
    servos: tuple[ServoSpec, ...] = ()

    def servo(self, driver: str) -> ServoSpec | None:
        return next((s for s in self.servos if s.driver == driver), None)

    def body(self, name: str) -> BodyLoadSpec | None:
        return next((b for b in self.bodies if b.name == name), None)


# --- reading -------------------------------------------------------------------------


def _refuse_unknown(t: Table, known) -> None:
    """Name a misspelt key first, before the "is missing" it would otherwise cause."""
    extra = [k for k in t.data if k not in known]
    if extra:
        raise t.error(extra[0], f"is not a known key here (known: {', '.join(sorted(known))})")


def _pair(t: Table, key: str, what: str, *, required=False) -> tuple[float, float] | None:
    """Two finite numbers as a tuple of floats, or None when absent."""
    value = t.raw(key)
    if value is None:
        if required:
            raise t.error(key, f"is missing: give {what}")
        return None
    ok = isinstance(value, list) and len(value) == 2
    ok = ok and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in value)
    if not ok:
        raise t.error(key, f"must be {what}, got {value!r}")
    if not all(math.isfinite(v) for v in value):
        raise t.error(key, f"must be finite numbers, got {value!r}")
    return float(value[0]), float(value[1])


def _not_negative(t: Table, key: str, unit: str, *, required=False) -> float | None:
    value = t.number(key, required=required)
    if value is not None and value < 0:
        raise t.error(key, f"must be zero or more ({unit}), got {value!r}")
    return value


def _name(t: Table, key: str, what: str) -> str | None:
    name = t.text(key)
    if name is not None and not name.strip():
        raise t.error(key, f"must not be empty: it names the {what}")
    return name


class _LoadsReader:
    """Reads one `[linkage.loads]` against the linkage read so far."""

    def __init__(self, table: Table, spec: LinkageSpec):
        self.t = table
        self.spec = spec
        self.bodies = [b.name for b in spec.bodies]

    def sub(self, raw, what: str, number: int, name_key: str) -> Table:
        guess = raw.get(name_key) if isinstance(raw, dict) else None
        name = f'{what} "{guess}"' if isinstance(guess, str) and guess.strip() else f"{what} {number}"
        return Table(raw, self.t.file, f"{self.t.where}, {name}")

    def body_name(self, t: Table, key: str) -> str:
        name = t.text(key, required=True)
        if name == GROUND:
            raise t.error(key, "the ground does not move: it takes no masses or loads")
        if name not in self.bodies:
            raise t.error(key, f"no body {name!r} in this linkage (bodies: {', '.join(self.bodies)})")
        return name

    def read(self) -> LoadsSpec:
        t = self.t
        _refuse_unknown(t, LOADS_KEYS)
        gravity = _pair(t, "gravity", "[x, y] in m/s² (machine frame), e.g. [0.0, -9.81]")
        bodies: list[BodyLoadSpec] = []
        for i, raw in enumerate(t.tables("body"), start=1):
            bodies.append(self.body(self.sub(raw, "body", i, "name"), bodies))
        forces = tuple(self.force(self.sub(raw, "force", i, "name")) for i, raw in enumerate(t.tables("force"), 1))
        torques = tuple(self.torque(self.sub(raw, "torque", i, "name")) for i, raw in enumerate(t.tables("torque"), 1))
        servos: list[ServoSpec] = []
        for i, raw in enumerate(t.tables("servo"), start=1):
            servos.append(self.servo(self.sub(raw, "servo", i, "driver"), servos))
        t.done()
        return LoadsSpec(gravity, tuple(bodies), forces, torques, tuple(servos))

    def body(self, b: Table, earlier: list[BodyLoadSpec]) -> BodyLoadSpec:
        _refuse_unknown(b, BODY_KEYS)
        name = self.body_name(b, "name")
        if any(e.name == name for e in earlier):
            raise b.error("name", "is given an earlier mass: one [[linkage.loads.body]] per body")
        mass = _not_negative(b, "mass", "kg", required=True)
        inertia = _not_negative(b, "inertia", "kg·mm² about the centre of mass")
        centre = None
        if b.has("centre"):
            raw = b.raw("centre")
            if isinstance(raw, str):
                points = self.spec.points(name)
                if raw not in points:
                    raise b.error("centre", f"body {name!r} has no point {raw!r} (points: {', '.join(points)})")
                centre = raw
            else:
                centre = _pair(b, "centre", '[x, y] in mm in the body\'s frame, or one of its points, e.g. "B"')
        b.done()
        return BodyLoadSpec(name, mass, centre, inertia)

    def force(self, f: Table) -> ForceSpec:
        _refuse_unknown(f, FORCE_KEYS)
        name = _name(f, "name", "force")
        at = f.text("at", required=True)
        body, point = split_ref(at)
        if "." not in at:
            raise f.error("at", f'{at!r} must name a point as "body.point", e.g. "head.face"')
        if body == GROUND:
            raise f.error("at", "the ground does not move: a force on it does no work on the linkage")
        if body not in self.bodies:
            raise f.error("at", f"{at!r}: no body {body!r} in this linkage (bodies: {', '.join(self.bodies)})")
        points = self.spec.points(body)
        if point not in points:
            raise f.error("at", f"{at!r}: body {body!r} has no point {point!r} (points: {', '.join(points)})")
        force = _pair(f, "force", "[Fx, Fy] in N (machine frame)", required=True)
        f.done()
        return ForceSpec(at, force, name)

    def torque(self, t: Table) -> TorqueSpec:
        _refuse_unknown(t, TORQUE_KEYS)
        name = _name(t, "name", "torque")
        body = self.body_name(t, "body")
        torque = t.number("torque", required=True)
        t.done()
        return TorqueSpec(body, torque, name)

    def servo(self, s: Table, earlier: list[ServoSpec]) -> ServoSpec:
        _refuse_unknown(s, SERVO_KEYS)
        drivers = {d.name: d for d in self.spec.drivers}
        driver = s.text("driver", required=True)
        if driver not in drivers:
            raise s.error("driver", f"no driver {driver!r} in this linkage (drivers: {', '.join(drivers) or 'none'})")
        if any(e.driver == driver for e in earlier):
            raise s.error("driver", "has an earlier servo: one [[linkage.loads.servo]] per driver")
        at = s.text("at")
        unit = target_unit(self.spec, drivers[driver].target)
        if at is not None:
            unit = self.motor_joint(s, at, drivers, driver)
        if s.has("ratio") and s.has("lead"):
            raise s.error("lead", "give ratio or lead, not both")
        ratio = s.number("ratio", positive=True)
        lead = s.number("lead", positive=True)
        where = f"pin {at}" if at is not None else f"driver {driver!r}"
        if lead is not None and unit != "mm":
            raise s.error("lead", f"belongs to a travel (a screw or belt), but {where} moves an angle: give ratio")
        if unit == "mm" and ratio is None and lead is None:
            raise s.error("lead", f"is missing: {where} moves a travel; give lead (mm per motor turn) or ratio "
                                  "(motor turns per mm) — a linear motor is not modelled")
        efficiency = s.number("efficiency", positive=True)
        if efficiency is not None and efficiency > 1.0:
            raise s.error("efficiency", f"must be at most 1 (a share of the power passed on), got {efficiency!r}")
        inertia = _not_negative(s, "rotor_inertia", "kg·mm²")
        limits = ServoLimitsSpec()
        lt = s.table("limits", f"{s.where}, limits")
        if lt is not None:
            _refuse_unknown(lt, LIMIT_KEYS)
            limits = ServoLimitsSpec(*(lt.number(k, positive=True) for k in LIMIT_KEYS))
            lt.done()
        s.done()
        return ServoSpec(driver, at, ratio, lead, efficiency, inertia, limits)

    def motor_joint(self, s: Table, at: str, drivers, driver: str) -> str:
        """Check `at` (the joint the motor works) and return its unit, "deg" or "mm"."""
        joint = self.spec.joint(at)
        if joint is None:
            known = ", ".join(j.name for j in self.spec.joints if j.kind != "weld") or "none"
            raise s.error("at", f"no joint {at!r} in this linkage (pins and sliders: {known})")
        if joint.kind == "weld":
            raise s.error("at", f"joint {at!r} is a weld: it does not move, so no motor can work it")
        for d in drivers.values():
            if d.target.kind == "joint" and d.target.of == at:
                if d.name == driver:
                    raise s.error("at", f"is the joint driver {driver!r} moves already: leave at out")
                raise s.error("at", f"joint {at!r} is held by driver {d.name!r}: the motor cannot turn it")
        return "mm" if joint.kind == "slider" else "deg"


def parse_loads(table: Table, spec: LinkageSpec) -> LoadsSpec:
    """Read `[linkage.loads]` of linkage `spec` (raises `ProjectError` naming the key at fault)."""
    return _LoadsReader(table, spec).read()


# --- writing -------------------------------------------------------------------------


def _drop_none(items) -> dict:
    return {k: v for k, v in items if v is not None}


def _plain(value):
    return list(value) if isinstance(value, tuple) else value


def dump_loads(loads: LoadsSpec) -> dict:
    """Plain TOML data for `[linkage.loads]`, in the order and shape the reader reads."""
    out: dict = {}
    if loads.gravity is not None:
        out["gravity"] = list(loads.gravity)
    if loads.bodies:
        out["body"] = [_drop_none((f.name, _plain(getattr(b, f.name))) for f in fields(BodyLoadSpec))
                       for b in loads.bodies]
    if loads.forces:
        out["force"] = [_drop_none((("name", f.name), ("at", f.at), ("force", list(f.force))))
                        for f in loads.forces]
    if loads.torques:
        out["torque"] = [_drop_none((("name", t.name), ("body", t.body), ("torque", t.torque)))
                         for t in loads.torques]
    if loads.servos:
        out["servo"] = []
        for s in loads.servos:
            entry = _drop_none((f.name, getattr(s, f.name)) for f in fields(ServoSpec) if f.name != "limits")
            limits = _drop_none(s.limits.items())
            if limits:
                entry["limits"] = limits
            out["servo"].append(entry)
    return out


# --- SI at the edge -----------------------------------------------------------------------


def loading_of(spec: LinkageSpec, loads: LoadsSpec) -> LinkageLoading:
    """The loads in SI for solver.loads: kg, m, kg·m², m/s², N, N·m."""
    masses = {}
    for b in loads.bodies:
        centre = b.centre
        if isinstance(centre, str):
            centre = spec.points(b.name)[centre]
        x, y = centre if centre is not None else (0.0, 0.0)
        masses[b.name] = BodyMass(b.mass, (x * MM, y * MM), (b.inertia or 0.0) * KG_MM2)
    forces = tuple(PointForce(*split_ref(f.at), f.force, f.label) for f in loads.forces)
    torques = tuple(BodyTorque(t.body, t.torque, t.label) for t in loads.torques)
    return LinkageLoading(masses, loads.gravity or (0.0, 0.0), forces, torques)


def gearing_of(servo: ServoSpec, unit: str) -> Gearing:
    """The gearing in SI: ratio in motor rad per rad (an angle) or per m (a travel, `unit` "mm")."""
    if unit == "mm":
        ratio = TURN / (servo.lead * MM) if servo.lead is not None else servo.ratio * TURN / MM
    else:
        ratio = servo.ratio if servo.ratio is not None else 1.0
    efficiency = servo.efficiency if servo.efficiency is not None else 1.0
    return Gearing(ratio, efficiency, (servo.rotor_inertia or 0.0) * KG_MM2)


def servo_limits_of(servo: ServoSpec) -> ServoLimits:
    """The motor's limits in SI: N·m, N·m, rad/s."""
    lim = servo.limits
    return ServoLimits(lim.peak_torque, lim.rms_torque, None if lim.speed is None else lim.speed * RPM)


register_linkage_loads(LinkageLoads(parse_loads, dump_loads))
