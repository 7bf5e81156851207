"""Joint reactions from the Lagrange multipliers: the force and couple each joint transmits.

A joint's rows contribute the generalized constraint force −Φq[rows]ᵀ λ[rows]
to the bodies it joins (linkage_dynamics).  On a moving body b its three
columns are the force (Fx, Fy) in N and the moment about b's local origin
in N·m.  For the joints the kinematics has — pin (`Revolute`), slider
(`Prismatic`), weld (`Fixed`) — the two bodies receive equal and opposite
forces along one line through the joint's point on body j (the pin, or the
slider point in its guide), so a joint is reported by

* `force` — on body j from body i (machine frame, N),
* `couple` — on body j from body i about that point (N·m; zero for a pin,
  the guide's resisting couple for a slider, the weld's moment),
* `point` — where the point is at each instant (machine frame, m).

Body i receives −force and −couple at the same point.  When body j is the
ground the force is read from body i's columns and turned round.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .linkage_model import GROUND

KINDS = {"Revolute": "pin", "Prismatic": "slider", "Fixed": "weld"}


@dataclass(frozen=True)
class JointInfo:
    """A joint as the reactions need it: bodies i, j, its point on j (local m, or None: j's origin)."""

    name: str
    kind: str
    body_i: str
    body_j: str
    point_j: np.ndarray | None


def joint_infos(mechanism) -> list[JointInfo]:
    """Every joint of the mechanism, in the kinematics' row order."""
    out = []
    for name, joint in mechanism.joints.items():
        kind = type(joint).__name__
        if kind == "Prismatic":
            i, j = joint.guide[0], joint.slider
        elif kind in ("Revolute", "Fixed"):
            i, j = joint.i[0], joint.j
        else:  # another constraint kind: its two bodies, moments about j's origin
            bodies = joint.resolve(mechanism).bind(mechanism).bodies
            out.append(JointInfo(name, kind.lower(), bodies[0], bodies[-1], None))
            continue
        out.append(JointInfo(name, KINDS[kind], i, j[0], mechanism.point(j, name, "j")))
    return out


def joint_rows(system) -> dict[str, np.ndarray]:
    """Row indices of each joint in Φq (rows come joint by joint)."""
    names = np.array(system.row_names[: system.first_driver_row], dtype=object)
    return {name: np.flatnonzero(names == name) for name in dict.fromkeys(names)}


def joint_points(infos, bodies: list[str], q: np.ndarray) -> np.ndarray:
    """(J, N, 2) machine position (m) of each joint's point on body j at body coordinates q (N, n)."""
    index = {b: k for k, b in enumerate(bodies)}
    out = np.zeros((len(infos), q.shape[0], 2))
    for k, info in enumerate(infos):
        local = np.zeros(2) if info.point_j is None else info.point_j
        if info.body_j == GROUND:
            out[k] = local
            continue
        b = index[info.body_j]
        x, y, phi = q[:, 3 * b], q[:, 3 * b + 1], q[:, 3 * b + 2]
        c, s = np.cos(phi), np.sin(phi)
        out[k, :, 0] = x + c * local[0] - s * local[1]
        out[k, :, 1] = y + s * local[0] + c * local[1]
    return out


def reactions(infos, rows, bodies, jac: np.ndarray, lam: np.ndarray, q: np.ndarray, points: np.ndarray):
    """(force (P, J, N, 2), couple (P, J, N)) on body j from body i, for P sets of multipliers.

    jac (m, n, N) as the kinematics gives it; lam (P, m, N); q (N, n);
    points from `joint_points`.  All joints at once: each joint's rows
    (padded to the longest with a zero row) against the three columns of
    the body its force is read from.
    """
    index = {b: k for k, b in enumerate(bodies)}
    m, _, N = jac.shape
    P, J = lam.shape[0], len(infos)
    if J == 0:
        return np.zeros((P, 0, N, 2)), np.zeros((P, 0, N))
    on_j = np.array([info.body_j != GROUND for info in infos])
    b = np.array([index[info.body_j if j else info.body_i] for info, j in zip(infos, on_j)])
    width = max(len(rows[info.name]) for info in infos)
    R = np.full((J, width), m)  # row m: the zero row
    for k, info in enumerate(infos):
        R[k, : len(rows[info.name])] = rows[info.name]
    cols = 3 * b[:, None] + np.arange(3)
    block = np.zeros((J, width, 3, N))
    real = R < m
    block[real] = jac[R[real][:, None], cols[np.nonzero(real)[0]]]  # (J, width, 3, N)
    lam_ext = np.concatenate([lam, np.zeros((P, 1, N))], axis=1)
    mult = lam_ext[:, R]  # (P, J, width, N)
    gen = -np.sum(block[None] * mult[:, :, :, None, :], axis=2)  # (P, J, 3, N) on body b
    dx = points[:, :, 0] - q[:, 3 * b].T  # (J, N)
    dy = points[:, :, 1] - q[:, 3 * b + 1].T
    fx, fy = gen[:, :, 0], gen[:, :, 1]
    sign = np.where(on_j, 1.0, -1.0)[:, None]  # force on j: read from i and turned round when j is ground
    force = np.stack([fx, fy], axis=-1) * sign[..., None]
    couple = (gen[:, :, 2] - (dx * fy - dy * fx)) * sign
    return force, couple
