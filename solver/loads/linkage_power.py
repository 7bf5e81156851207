"""Drive efforts by virtual power, with velocity coefficients: an independent route to the drive loads.

The power a drive delivers equals the rate of change of kinetic energy plus
the power spent against gravity and the external loads (ideal joints do no
work):

    Σ_k e_k ḋ_k = Σ_bodies (m v_G·a_G + J ω α) − Σ P_ext

(principle of virtual work / power; e.g. R. L. Norton, Design of Machinery,
ch. 11, "the virtual work method", from memory).  With the velocity
coefficients of driver k — u_k = ∂q/∂d_k, the motion of every coordinate
per unit of d_k with the other drivers held, solved from Φq u_k = e_k (unit
vector in driver k's row) — the velocities are q̇ = Σ u_k ḋ_k, and the
balance holds for each driver separately:

    e_k = Σ_bodies (m a_G·u_G,k + J α u_φ,k) − Σ_bodies m g·u_G,k − Σ F·u_P,k − Σ T u_φ,k

with u_G, u_P the coefficients of the centre of mass and of a load's point
(u_r + perp(A s) u_φ).  Nothing here touches the Lagrange multipliers;
where ḋ_k = 0 (a dwell) the coefficients still exist, so the effort is
defined there too.
"""

from __future__ import annotations

import numpy as np

from .linkage import omega_of
from .linkage_dynamics import body_motion, dense_jacobian, point_offsets, stacked_solve
from .linkage_model import LinkageLoading, LoadsError


def velocity_coefficients(system, q: np.ndarray) -> np.ndarray:
    """u (N, n, K): ∂q/∂d_k per driver k at body coordinates q (N, n)."""
    jac = dense_jacobian(system, q)  # (m, n, N)
    m = jac.shape[0]
    K = m - system.first_driver_row
    unit = np.zeros((m, K))
    unit[system.first_driver_row :, :] = np.eye(K)
    return stacked_solve(jac.transpose(2, 0, 1), np.broadcast_to(unit, (q.shape[0], m, K)))


def drive_efforts_by_power(result, loading: LinkageLoading, speed: float | None = None) -> dict[str, np.ndarray]:
    """Each driver's effort (N·m or N, as `linkage_loads`) over the solved instants, by virtual power."""
    system = result.system
    if system is None or result.theta.size == 0:
        raise LoadsError(f"no solved instants to compute loads at ({result.message})", None, None)
    w2 = omega_of(result.speed if speed is None else speed) ** 2
    comp = loading.compile(system.mechanism, system.bodies)
    motion = body_motion(comp, result.q, result.dq, result.ddq)
    ax, ay = motion.offset
    acc_x, acc_y = w2 * motion.acc[0], w2 * motion.acc[1]  # a_G in m/s²
    alpha = w2 * motion.alpha  # rad/s²
    m, J, g = comp.mass, comp.inertia, comp.gravity
    u_all = velocity_coefficients(system, result.q)
    arm = point_offsets(motion, comp.force_body, comp.force_point) if comp.force.size else None
    out = {}
    for k, name in enumerate(system.driver_names):
        u = u_all[:, :, k]
        ux, uy, uphi = u[:, 0::3], u[:, 1::3], u[:, 2::3]
        ugx, ugy = ux - ay * uphi, uy + ax * uphi  # centre of mass: u_r + perp(a) u_φ
        inertia = np.sum(m * (acc_x * ugx + acc_y * ugy) + J * alpha * uphi, axis=1)
        weight = np.sum(m * (g[0] * ugx + g[1] * ugy), axis=1)
        external = np.zeros(result.theta.size)
        for f, b in enumerate(comp.force_body):  # a few loads; each over all instants
            upx = ux[:, b] - arm[1][:, f] * uphi[:, b]
            upy = uy[:, b] + arm[0][:, f] * uphi[:, b]
            external += comp.force[f, 0] * upx + comp.force[f, 1] * upy
        for t, b in enumerate(comp.torque_body):
            external += comp.torque[t] * uphi[:, b]
        out[name] = inertia - weight - external
    return out


def kinetic_energy(result, loading: LinkageLoading, speed: float | None = None) -> np.ndarray:
    """Kinetic energy of the linkage (J) at each solved instant: Σ ½ m v_G² + ½ J ω²."""
    system = result.system
    w2 = omega_of(result.speed if speed is None else speed) ** 2
    comp = loading.compile(system.mechanism, system.bodies)
    motion = body_motion(comp, result.q, result.dq, result.ddq)
    v2 = motion.vel[0] ** 2 + motion.vel[1] ** 2
    return 0.5 * w2 * np.sum(comp.mass * v2 + comp.inertia * motion.omega**2, axis=1)
