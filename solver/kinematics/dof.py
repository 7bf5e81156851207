"""Degrees of freedom from the rank of Φq, and plain words for free or singular motions.

DOF = coordinates − rank(Φq); equations beyond the rank are redundant (or
conflicting).  Rank is read from the singular values of the scaled Φq
(rows and columns dimensionless, see System.scaled_jacobian).  A null
vector of Φq is a motion the constraints allow; it is described by the
bodies it moves and the joints whose two bodies move relative to each
other.  A left null vector is a combination of equations that cancels; it is
described by the joints and drivers whose rows take part.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

RANK_TOLERANCE = 1e-9  # singular values below this share of the largest count as zero (exact dependencies give ~1e-16)
INVOLVED_SHARE = 0.02  # a body, joint or row takes part in a motion or dependency when its share exceeds this


@dataclass(frozen=True)
class Motion:
    """A motion allowed by the constraints: the bodies it moves and the joints it works."""

    bodies: tuple[str, ...]
    joints: tuple[str, ...]


@dataclass(frozen=True)
class DofReport:
    """Mobility of a model at one configuration.

    `dof` = coordinates − rank; `redundant` = equations − rank.  `free` lists
    one `Motion` per free degree of freedom; `dependent` the names of the
    joints and drivers whose equations depend on each other.
    """

    coordinates: int
    equations: int
    rank: int
    free: tuple[Motion, ...]
    dependent: tuple[str, ...]

    @property
    def dof(self) -> int:
        return self.coordinates - self.rank

    @property
    def redundant(self) -> int:
        return self.equations - self.rank

    @property
    def driven(self) -> bool:
        """True when kinematically driven: no free motion and no redundant equation."""
        return self.dof == 0 and self.redundant == 0

    @property
    def message(self) -> str:
        parts = [f"{self.coordinates} coordinates, {self.equations} equations, rank {self.rank}"]
        if self.driven:
            return parts[0] + ": kinematically driven (0 degrees of freedom)"
        if self.dof:
            parts.append(f"under-driven: {self.dof} free degree(s) of freedom")
            for i, motion in enumerate(self.free, start=1):
                joints = ", ".join(motion.joints) or "none"
                parts.append(
                    f"free motion {i} moves {', '.join(motion.bodies)}; joints it works: {joints}"
                    + (" — drive one of these joints or bodies" if motion.joints else "")
                )
        if self.redundant:
            what = "over-constrained" if self.equations > self.coordinates else "redundant constraints"
            parts.append(
                f"{what}: {self.redundant} equation(s) depend on others among: {', '.join(self.dependent)}"
                " — remove one of them or free a joint"
            )
        return "; ".join(parts)


def describe_motion(system, q: np.ndarray, v: np.ndarray) -> Motion:
    """Bodies and joints a motion v (n,) of the coordinates q (n,) involves."""
    L = system.length
    B = system.B
    move = v.reshape(B, 3)
    size = np.hypot(move[:, 0], move[:, 1]) + L * np.abs(move[:, 2])
    top = float(size.max()) if size.size else 0.0
    if top == 0.0:
        return Motion((), ())
    bodies = tuple(b for b, s in zip(system.bodies, size) if s > INVOLVED_SHARE * top)
    where = q.reshape(B, 3)
    joints = []
    for g in system.groups:
        if len(g.slots) != 2:
            continue
        for k, name in enumerate(g.names):
            if name in system.driver_names or name in joints:
                continue
            i, j = (int(g.slots[t, k]) for t in range(2))
            vi = move[i] if i < B else np.zeros(3)
            vj = move[j] if j < B else np.zeros(3)
            ri = where[i, :2] if i < B else np.zeros(2)
            rj = where[j, :2] if j < B else np.zeros(2)
            # twist of j relative to i, measured at j's origin
            d = rj - ri
            rel_t = vj[:2] - vi[:2] - vi[2] * np.array([-d[1], d[0]])
            rel = np.hypot(*rel_t) + L * abs(vj[2] - vi[2])
            if rel > INVOLVED_SHARE * top:
                joints.append(name)
    return Motion(bodies, tuple(joints))


def dependent_rows(system, u: np.ndarray) -> tuple[str, ...]:
    """Names of the joints and drivers whose rows take part in a left null vector u (m,)."""
    top = float(np.max(np.abs(u)))
    names = []
    for name, weight in zip(system.row_names, np.abs(u)):
        if weight > INVOLVED_SHARE * top and name not in names:
            names.append(name)
    return tuple(names)


def analyse_dof(system, q: np.ndarray) -> DofReport:
    """Rank, free motions and dependent equations of Φq at coordinates q (n,)."""
    jac = system.scaled_jacobian(system.jacobian(q[:, None]))[:, :, 0]
    m, n = jac.shape
    if m == 0:
        eye = np.eye(n)
        return DofReport(n, 0, 0, tuple(describe_motion(system, q, eye[k]) for k in range(0, n, 3)), ())
    U, sv, Vt = np.linalg.svd(jac)
    rank = int(np.sum(sv > RANK_TOLERANCE * sv[0])) if sv.size else 0
    free = []
    for v in Vt[rank:]:
        free.append(describe_motion(system, q, v * system.col_scale))
    dependent: tuple[str, ...] = ()
    if m > rank:
        weights = np.sqrt(np.sum(U[:, rank:] ** 2, axis=1))
        dependent = dependent_rows(system, weights)
    return DofReport(n, m, rank, tuple(free), dependent)
