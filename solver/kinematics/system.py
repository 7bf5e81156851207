"""A mechanism compiled for evaluation: Φ, Φq, γ, η over stacks of instants.

The coordinates q of the B moving bodies are ordered body by body,
(x, y, φ) each, so column 3b + c of Φq belongs to body b.  Rows come joint
by joint, then driver by driver; instances of one kind are evaluated
together.  Arrays keep the instants last: q is (n, N), Φ is (m, N), Φq is
(m, n, N) dense or, for the batched factorization, a compact `Jacobian`
holding only the entries that can be non-zero, so that every elementwise
operation runs over contiguous instants.  Derivatives are w.r.t. master angle θ (rad); a driver holding
coordinate g(q) to motion d(θ) contributes Φ = g(q) − d(θ), so that
Φq q' = d', and d'', d''' add to its γ, η.

Scaled quantities, used to compare rows and columns of mixed units: lengths
divided by the model's length scale L, angles as they are.
"""

from __future__ import annotations

import numpy as np

from .compiled import SLOT_COLUMNS, Compiling, Group, remember, remembered, stack_params, structure_key
from .model import GROUND, Mechanism
from .motion import evaluate_motion
from .posebuffers import PoseBuffers


class Jacobian:
    """Φq at N instants in compact form: one row of `values` (slots + 2, N) per entry that can be non-zero.

    Row `slots` is always zero (it stands for every structural zero) and
    row `slots + 1` takes the partials w.r.t. the ground, which has no
    coordinates.  `dense()` gives the full (m, n, N) array.  The values live
    in a buffer of the System that the next evaluation overwrites: factor
    (or copy) them at once, as `linalg.factor` does.
    """

    __slots__ = ("values", "system")

    def __init__(self, values: np.ndarray, system: "System"):
        self.values = values
        self.system = system

    def dense(self) -> np.ndarray:
        sys_ = self.system
        out = np.zeros((sys_.m * sys_.n, self.values.shape[1]))
        out[sys_.slot_entries] = self.values[: sys_.slots]
        return out.reshape(sys_.m, sys_.n, -1)

    def scaled_stack(self, row_scale: np.ndarray, col_scale: np.ndarray) -> np.ndarray:
        """Φq with rows and columns scaled (as System.scaled_jacobian), instants first: (N, m, n)."""
        sys_ = self.system
        rows, cols = sys_.slot_rows, sys_.slot_cols
        scaled = self.values[: sys_.slots] * row_scale[rows][:, None] * col_scale[cols][:, None]
        out = np.zeros((self.values.shape[1], sys_.m * sys_.n))
        out[:, sys_.slot_entries] = scaled.T
        return out.reshape(-1, sys_.m, sys_.n)


class System(Compiling, PoseBuffers):
    """Evaluates the constraint equations of a `Mechanism` and their derivatives.

    Compiling (binding, constant Jacobian entries, the elimination plan) is
    done once per mechanism structure and remembered (compiled.py): a
    System of a mechanism solved before starts from the same compiled form.
    """

    def __init__(self, mechanism: Mechanism):
        self.mechanism = mechanism
        self.bodies = mechanism.moving
        self.B = len(self.bodies)
        self.n = SLOT_COLUMNS * self.B
        index = {name: b for b, name in enumerate(self.bodies)}
        index[GROUND] = self.B
        self.length = mechanism.length_scale()
        self._workspace = None  # scratch memory, borrowed on first use (workspace.py)
        self._give_back = None
        self._poses_shape = None  # shape of the poses buffer while it holds consistent poses (x, y, φ, cos, sin)
        self._slot_views: dict = {}  # (key, group) -> (gathered buffer, Pose or Rates objects viewing it)
        self._values_filled = None  # the Jacobian buffer while it holds the constant entries
        self._kept = None  # poses and rates of the last gamma call, for eta(after_gamma=True)

        entries = [(j.name, j.resolve(mechanism)) for j in mechanism.joints.values()]
        drivers = list(mechanism.drivers.values())
        entries += [(d.name, d.coordinate.resolve(mechanism)) for d in drivers]
        self.motions = [d.motion for d in drivers]
        self.driver_names = [d.name for d in drivers]
        bound = [(name, item, item.bind(mechanism)) for name, item in entries]

        key = self.structure_key = structure_key(self.bodies, self.length, bound, len(drivers))
        compiled = remembered(key)
        if compiled is not None:
            self.__dict__.update(compiled)
            return
        self._compile(bound, len(drivers), index)
        remember(key, self)

    def _affine_residual(self, out: np.ndarray, q: np.ndarray) -> None:
        if self._affine_rows is not None:
            out[self._affine_rows] = self._affine_matrix @ q + self._affine_offset

    def stack_params(self, bindings):
        return stack_params(bindings)

    # -- evaluation ----------------------------------------------------------
    def drive(self, theta: np.ndarray) -> np.ndarray:
        """(4, drivers, N): each driver's d, d', d'', d''' at master angles θ (rad)."""
        theta = np.asarray(theta, dtype=float)
        out = np.empty((4, len(self.motions), theta.size))
        for i, motion in enumerate(self.motions):
            out[:, i] = evaluate_motion(motion, theta)
        return out

    @staticmethod
    def _scatter(out, g: Group, values) -> None:
        """Write a kind's rows (arrays (k, N) or plain numbers) into out (m, N), row by row (one copy each)."""
        for rows, value in zip(g.rows, values):
            out[rows] = value

    def residual(self, q: np.ndarray, drive: np.ndarray) -> np.ndarray:
        """Φ (m, N) at coordinates q (n, N) with driver values `drive` from `drive()`."""
        self._kept = None
        arrays = self._poses(q)
        out = np.empty((self.m, q.shape[1]))
        self._affine_residual(out, q)
        for g in self._active:
            self._scatter(out, g, g.kind.residual(g.par, *self._slot_poses(g, arrays)))
        out[self.first_driver_row :] -= drive[0]
        return out

    def residual_jacobian(self, q: np.ndarray, drive: np.ndarray):
        """Φ (m, N) and Φq as a compact `Jacobian` at q (n, N)."""
        self._kept = None
        arrays = self._poses(q)
        N = q.shape[1]
        res = np.empty((self.m, N))
        values = self._buffer("jacobian", (self.slots + 2, N))  # valid until the next evaluation
        if values is self._values_filled:  # constants still there: restore those the last factorization overwrote
            values[self._fixed_dirty] = self._fixed_dirty_values
        else:
            values[self._fixed_slots] = self._fixed_values
            self._values_filled = values
        self._affine_residual(res, q)
        for g in self._active:
            poses = self._slot_poses(g, arrays)
            self._scatter(res, g, g.kind.residual(g.par, *poses))
            if g.variable:
                partials = g.kind.jacobian(g.par, *poses)
                for (r, c), slots in zip(g.variable, g.var_slot_rows):
                    values[slots] = partials[r][c]
        res[self.first_driver_row :] -= drive[0]
        return res, Jacobian(values, self)

    def jacobian(self, q: np.ndarray) -> np.ndarray:
        """Φq (m, n, N) at q (n, N), dense."""
        return self.residual_jacobian(q, np.zeros((4, len(self.motions), q.shape[1])))[1].dense()

    def velocity_rhs(self, drive: np.ndarray) -> np.ndarray:
        """−Φθ (m, N): d' in the driver rows, zero elsewhere."""
        out = np.zeros((self.m, drive.shape[2]))
        out[self.first_driver_row :] = drive[1]
        return out

    @property
    def lean_instant(self):
        """The lean evaluator of one instant (instant.py: square Φq, every kind on floats), or None."""
        return self._instant

    def gamma(self, q, dq, drive, batched: bool = False) -> np.ndarray:
        """γ (m, N) at q, q' (n, N); Φq q'' = γ.  One instant takes the lean path unless `batched`."""
        if q.shape[1] == 1 and self._instant is not None and not batched:
            self._kept = None
            return self._instant.gamma(q, dq, drive)
        arrays, rates = self._poses(q, reuse=True), self._rates(dq)
        out = np.empty((self.m, q.shape[1]))
        if self._affine_rows is not None:
            out[self._affine_rows] = self._affine_gamma
        kept = []
        for g in self._active:
            poses, speeds = self._slot_poses(g, arrays), self._slot_rates(g, rates)
            self._scatter(out, g, g.kind.gamma(g.par, poses, speeds))
            kept.append((poses, speeds))
        self._kept = kept
        out[self.first_driver_row :] += drive[2]
        return out

    def eta(self, q, dq, ddq, drive, after_gamma: bool = False, batched: bool = False) -> np.ndarray:
        """η (m, N) at q, q', q'' (n, N), so that Φq times the third derivative of q is η.

        With `after_gamma`, the poses and rates gathered by the `gamma` call
        just before (which must have had the same q and first derivative) are
        used again, rotations included.  One instant takes the lean path
        unless `batched`.
        """
        if q.shape[1] == 1 and self._instant is not None and not batched:
            self._kept = None
            return self._instant.eta(q, dq, ddq, drive)
        kept = self._kept if after_gamma else None
        if kept is None:
            arrays, rates = self._poses(q, reuse=True), self._rates(dq)
        accels = self._rates(ddq, "accels")
        out = np.empty((self.m, q.shape[1]))
        if self._affine_rows is not None:
            out[self._affine_rows] = self._affine_eta
        for i, g in enumerate(self._active):
            if kept is None:
                poses, speeds = self._slot_poses(g, arrays), self._slot_rates(g, rates)
            else:
                poses, speeds = kept[i]
            vals = g.kind.eta(g.par, poses, speeds, self._slot_rates(g, accels, "accels"))
            self._scatter(out, g, vals)
        self._kept = None
        out[self.first_driver_row :] += drive[3]
        return out

    # -- scaling and naming --------------------------------------------------
    def scaled_step(self, dq: np.ndarray) -> np.ndarray:
        """max |Δq| per instant, lengths in units of L, angles in rad."""
        scaled = dq / self.col_scale[:, None]
        return np.abs(scaled, out=scaled).max(axis=0)

    def scaled_residual(self, res: np.ndarray) -> np.ndarray:
        """max |Φ| per instant, length rows in units of L, angle rows in rad."""
        scaled = res * self.row_scale[:, None]
        return np.abs(scaled, out=scaled).max(axis=0)

    def scaled_jacobian(self, jac: np.ndarray) -> np.ndarray:
        """Φq with rows and columns scaled to be dimensionless (m, n, N)."""
        return jac * self.row_scale[:, None, None] * self.col_scale[None, :, None]

    def elimination_plan(self):
        """The planned elimination for batched solves (None unless Φq is square)."""
        return self._plan

    def initial_guess(self) -> np.ndarray:
        """The rough initial coordinates of the moving bodies, (n,)."""
        return np.array([v for b in self.bodies for v in self.mechanism.bodies[b].guess], dtype=float)

    def coordinate_names(self) -> list[str]:
        return [f"{b}.{c}" for b in self.bodies for c in ("x", "y", "phi")]

