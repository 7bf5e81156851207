"""Force-closed cam followers: contact force, jump, spring preload, camshaft torque.

Rigid-body kinetostatics at every cam angle, no time integration.  Works in
a generalized follower coordinate: for a translating follower s in m, force
in N, mass in kg, spring rate in N/m; for an oscillating one s in rad,
moment in N·m, inertia in kg·m², rate in N·m/rad.  Sign convention: s grows
away from the cam; the spring and the constant external load push the
follower back onto the cam.

Along the follower's line of motion, the cam must supply

    N(θ) = m·s̈ + k·(x0 + s) + F_ext + F_fric·sign(ṡ)

(`preload` = k·x0 is the spring force at s = 0).  Contact is lost — the
follower jumps — where N ≤ 0.  At constant machine speed ω, s̈ = ω²·s''(θ)
with s'' = d²s/dθ², so N = m·s''·ω² + B(θ), B the speed-independent rest,
and contact holds at every angle with s'' < 0 as long as
ω² < B/(m·|s''|): the highest speed without jump is the minimum of that
over the cycle (exact, no search over speeds).

Camshaft torque from the power balance (frictionless contact):
T·ω = N·ṡ, so T(θ) = N(θ)·ds/dθ.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from motionlaws.program import FULL_CYCLE, omega

GRID = 36_000  # cam-angle samples per cycle for extremes (0.01°), then refined
REFINE_ROUNDS = 4  # zoom rounds around the best sample (each 32× finer)


@dataclass(frozen=True)
class FollowerLoad:
    """Mass and forces on a force-closed follower (generalized SI units, see module)."""

    mass: float  # kg (or kg·m²): follower plus the reduced spring mass
    spring_rate: float  # N/m (or N·m/rad)
    preload: float  # N (or N·m): spring force at s = 0
    external: float = 0.0  # N, constant, pushing the follower onto the cam
    friction: float = 0.0  # N, Coulomb, opposing the follower's velocity

    @staticmethod
    def reduced_mass(follower_mass: float, spring_mass: float) -> float:
        """Follower mass plus a third of the spring's mass (common practice for a
        helical spring with one end fixed)."""
        return follower_mass + spring_mass / 3.0


@dataclass(frozen=True)
class FollowerForces:
    """Contact force and camshaft torque over one cycle at one machine speed."""

    theta: np.ndarray  # master deg
    contact: np.ndarray  # N along the follower's line of motion
    torque: np.ndarray  # N·m on the camshaft
    min_contact: float  # N
    min_contact_at: float  # master deg
    jumps: bool  # contact lost somewhere in the cycle
    jump_speed: float | None  # cycles/min: highest speed without jump (None: never jumps)
    peak_torque: float  # N·m, largest magnitude
    peak_torque_at: float  # master deg
    rms_torque: float  # N·m over the cycle


def _parts(motion, load: FollowerLoad, theta_deg):
    """(s'' per rad², B(θ), ds/dθ) where N = m·s''·ω² + B."""
    s, d1, d2, _ = motion(theta_deg)
    fric = load.friction * np.sign(d1)
    rest = load.spring_rate * s + load.preload + load.external + fric
    return d2, rest, d1


def _refine_min(f, theta_grid, values, lo=0.0, hi=FULL_CYCLE):
    """Refine the minimum of f around the best grid sample by zooming."""
    i = int(np.argmin(values))
    step = theta_grid[1] - theta_grid[0]
    a, b = max(lo, theta_grid[i] - step), min(hi, theta_grid[i] + step)
    best_t, best_v = float(theta_grid[i]), float(values[i])
    for _ in range(REFINE_ROUNDS):
        ts = np.linspace(a, b, 65)
        vs = f(ts)
        k = int(np.argmin(vs))
        if vs[k] < best_v:
            best_t, best_v = float(ts[k]), float(vs[k])
        h = ts[1] - ts[0]
        a, b = max(lo, ts[k] - h), min(hi, ts[k] + h)
    return best_v, best_t


def jump_speed(motion, load: FollowerLoad) -> float | None:
    """Highest machine speed (cycles/min) at which the follower keeps contact.

    `motion(theta_deg)` returns s, ds/dθ, d²s/dθ², d³s/dθ³ in the follower's
    SI unit per radian.  None when no deceleration can lift it (s'' ≥ 0
    throughout); 0.0 when contact is lost even at rest.
    """
    theta = np.linspace(0.0, FULL_CYCLE, GRID, endpoint=False)
    d2, rest, _ = _parts(motion, load, theta)
    if np.min(rest) <= 0.0:
        return 0.0
    pulling = d2 < 0.0
    if not np.any(pulling):
        return None

    def ratio(t):
        dd, rr, _ = _parts(motion, load, t)
        with np.errstate(divide="ignore"):
            return np.where(dd < 0.0, rr / (load.mass * np.abs(dd)), np.inf)

    values = ratio(theta)
    w2, _ = _refine_min(ratio, theta, values)
    return math.sqrt(w2) * 60.0 / (2.0 * math.pi)


def preload_for_margin(motion, load: FollowerLoad, speed_cpm: float, margin: float) -> float:
    """Spring preload (N) that leaves at least `margin` N of contact force at `speed_cpm`.

    Exact: the preload adds to N at every angle.
    """
    forces = follower_forces(motion, load, speed_cpm)
    return load.preload + (margin - forces.min_contact)


def follower_forces(motion, load: FollowerLoad, speed_cpm: float, points: int = 3600) -> FollowerForces:
    """Contact force and camshaft torque around the cycle at `speed_cpm`."""
    w = omega(speed_cpm)
    theta = np.linspace(0.0, FULL_CYCLE, points, endpoint=False)

    def contact(t):
        d2, rest, _ = _parts(motion, load, t)
        return load.mass * d2 * w * w + rest

    def torque(t):
        d2, rest, d1 = _parts(motion, load, t)
        return (load.mass * d2 * w * w + rest) * d1

    n = contact(theta)
    fine = np.linspace(0.0, FULL_CYCLE, GRID, endpoint=False)
    n_min, n_at = _refine_min(contact, fine, contact(fine))
    tq = torque(theta)
    tq_fine = torque(fine)
    t_peak, t_at = _refine_min(lambda t: -np.abs(torque(t)), fine, -np.abs(tq_fine))
    rms = float(np.sqrt(np.mean(tq_fine**2)))
    return FollowerForces(
        theta=theta,
        contact=n,
        torque=tq,
        min_contact=n_min,
        min_contact_at=n_at,
        jumps=n_min <= 0.0,
        jump_speed=jump_speed(motion, load),
        peak_torque=-t_peak,
        peak_torque_at=t_at,
        rms_torque=rms,
    )
