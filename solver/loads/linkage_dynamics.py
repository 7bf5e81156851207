"""Kinetostatics of a kinematically driven linkage: Φqᵀλ = Q − M q̈ at every instant at once.

Coordinates are the kinematics' q = (x, y, φ) of each moving body's local
origin (solver.kinematics).  For a body with mass m, centre of mass at
local c (global offset a = A c from the origin) and inertia J about it,
d'Alembert's principle in these coordinates reads, per body,

    Q*  = [ m a_G ;  a × m a_G + J α ]          (what the forces must supply)
    a_G = r̈ + perp(a) φ̈ − a φ̇²                  (acceleration of the centre of mass)

and the constraint forces −Φqᵀλ close the balance Q* = Q − Φqᵀλ with the
applied generalized forces Q (gravity m g at the centre of mass, a force F
at local point s as [F ; A s × F], a torque T as [0, 0, T]).  So
Φqᵀλ = Q − Q* (E. J. Haug, Computer-Aided Kinematics and Dynamics of
Mechanical Systems, 1989, ch. 6 and 11, from memory; P. E. Nikravesh,
Computer-Aided Analysis of Mechanical Systems, 1988, likewise).

At constant machine speed ω the kinematics' derivatives per rad of master
angle give q̇ = ω q', q̈ = ω² q'', so Q* = ω² Q*'' and

    λ = λ_static + ω² λ_inertial,   Φqᵀ λ_static = Q,   Φqᵀ λ_inertial = −Q*''

— both solved once per instant as one stacked `np.linalg.solve`; every
quantity derived linearly from λ (drive efforts, joint reactions) splits
the same way and is rescaled to any machine speed exactly.

A driver holding coordinate g(q) to d(θ) has the row Φ = g(q) − d: its
constraint force −λ_d ∂g/∂q is the drive's generalized force conjugate to
g, so the drive supplies the effort e = −λ_d (N·m for an angle, N for a
length) and the power e·ġ.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .linkage_model import CompiledLoading, LoadsError


@dataclass(frozen=True)
class BodyMotion:
    """Centre-of-mass kinematics of the B moving bodies at N instants, per rad^k of master angle.

    offset (2, N, B): a = A c, from body origin to centre of mass (m);
    vel (2, N, B), acc (2, N, B): v_G' and a_G'' (m/rad, m/rad²);
    omega (N, B), alpha (N, B): φ', φ'' (rad/rad, rad/rad²); cos, sin (N, B) of φ.
    """

    offset: np.ndarray
    vel: np.ndarray
    acc: np.ndarray
    omega: np.ndarray
    alpha: np.ndarray
    cos: np.ndarray
    sin: np.ndarray


def body_motion(loading: CompiledLoading, q: np.ndarray, dq: np.ndarray, ddq: np.ndarray) -> BodyMotion:
    """Centre-of-mass motion from body coordinates q, q', q'' (each (N, n), per rad^k)."""
    N = q.shape[0]
    phi = q[:, 2::3]
    w, al = dq[:, 2::3], ddq[:, 2::3]
    c, s = np.cos(phi), np.sin(phi)
    cx, cy = loading.centre[:, 0], loading.centre[:, 1]
    ax, ay = c * cx - s * cy, s * cx + c * cy  # a = A c
    vel = np.empty((2, N, phi.shape[1]))
    vel[0] = dq[:, 0::3] - ay * w  # r' + perp(a) φ'
    vel[1] = dq[:, 1::3] + ax * w
    acc = np.empty_like(vel)
    w2 = w * w
    acc[0] = ddq[:, 0::3] - ay * al - ax * w2  # r'' + perp(a) φ'' − a φ'²
    acc[1] = ddq[:, 1::3] + ax * al - ay * w2
    return BodyMotion(np.stack([ax, ay]), vel, acc, w, al, c, s)


def point_offsets(motion: BodyMotion, body: np.ndarray, local: np.ndarray) -> np.ndarray:
    """A s for local points `local` (P, 2) on bodies `body` (P,): (2, N, P) in m."""
    c, s = motion.cos[:, body], motion.sin[:, body]
    return np.stack([c * local[:, 0] - s * local[:, 1], s * local[:, 0] + c * local[:, 1]])


def generalized_forces(loading: CompiledLoading, motion: BodyMotion) -> tuple[np.ndarray, np.ndarray]:
    """(Q, −Q*'') each (N, n): applied generalized forces, and minus the inertia demand per rad².

    Columns follow q: (x, y, φ) per body; forces in N, moments about the
    body's local origin in N·m (per rad² of master angle for the second).
    """
    N, B = motion.omega.shape
    m, J = loading.mass, loading.inertia
    ax, ay = motion.offset
    static = np.zeros((N, B, 3))
    gx, gy = m * loading.gravity[0], m * loading.gravity[1]  # weight at the centre of mass
    static[:, :, 0] += gx
    static[:, :, 1] += gy
    static[:, :, 2] += ax * gy - ay * gx
    if loading.force.size:
        arm = point_offsets(motion, loading.force_body, loading.force_point)  # (2, N, F)
        fx, fy = loading.force[:, 0], loading.force[:, 1]
        moment = arm[0] * fy - arm[1] * fx
        for f, b in enumerate(loading.force_body):  # a few loads; each step is over all instants
            static[:, b, 0] += fx[f]
            static[:, b, 1] += fy[f]
            static[:, b, 2] += moment[:, f]
    for t, b in enumerate(loading.torque_body):
        static[:, b, 2] += loading.torque[t]
    inertial = np.empty((N, B, 3))
    max_, may_ = m * motion.acc[0], m * motion.acc[1]
    inertial[:, :, 0] = -max_
    inertial[:, :, 1] = -may_
    inertial[:, :, 2] = -(ax * may_ - ay * max_ + J * motion.alpha)
    return static.reshape(N, 3 * B), inertial.reshape(N, 3 * B)


def dense_jacobian(system, q: np.ndarray) -> np.ndarray:
    """Φq (m, n, N) at body coordinates q (N, n): the kinematics' layout, instants last."""
    jac = system.jacobian(np.ascontiguousarray(q.T))
    if jac.shape[0] != jac.shape[1]:
        raise LoadsError(
            "loads need a kinematically driven linkage: as many independent equations as body coordinates",
            None, "driver",
        )
    return jac


def stacked_solve(matrices: np.ndarray, rhs: np.ndarray) -> np.ndarray:
    """Solve every matrix of a stack (N, n, n) — a view, any layout — for rhs (N, n, k)."""
    try:
        return np.linalg.solve(matrices, rhs)
    except np.linalg.LinAlgError:
        raise LoadsError("the constraint Jacobian is singular at a solved instant (a dead point): "
                         "the loads there are not determined", None, None) from None


def multipliers(jac: np.ndarray, rhs: np.ndarray) -> np.ndarray:
    """λ (N, m, k) solving Φqᵀ λ = rhs for Φq (m, n, N) and rhs (N, n, k)."""
    return stacked_solve(jac.transpose(2, 1, 0), rhs)
