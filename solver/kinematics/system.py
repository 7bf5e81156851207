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

import threading
import weakref
from collections import OrderedDict
from dataclasses import dataclass, field

import numpy as np

from .base import LENGTH
from .errors import ModelError
from .frames import Pose, Rates
from .linalg import PLAN_SAMPLES, PLAN_SEED, EliminationPlan
from .model import GROUND, Mechanism
from .motion import evaluate_motion
from .workspace import borrow, give_back

SLOT_COLUMNS = 3  # x, y, φ per body
COMPILED_KEPT = 32  # mechanism structures whose compiled form is remembered (a re-solve or a motion edit reuses it)
TRIG_REUSE_FROM = 64  # instants: from this many on, moving the poses by a Newton step beats cos and sin afresh
GROUND_POSE = np.array([[0.0], [0.0], [0.0], [1.0], [0.0]])  # x, y, φ, cos φ, sin φ of the ground
ADVANCE_LIMIT = 1e-4  # rad: a turn this small is applied to cos, sin by series to below round-off (error δ⁴/24)


@dataclass
class Group:
    """All instances of one kind: stacked numbers and where their rows and columns go."""

    kind: type
    names: list[str]
    par: dict[str, np.ndarray]
    slots: np.ndarray  # (slots, k) body indices; the ground is index B
    rows: np.ndarray  # (ROWS, k) row of each equation
    cols: np.ndarray  # (3·slots, k) column of each partial derivative (ground: dummy columns)
    variable: list[tuple[int, int]] = field(default_factory=list)  # (row, col) entries that vary
    var_slots: np.ndarray | None = None  # compact-Jacobian slot of each varying entry, instance-major per entry
    flat_rows: np.ndarray | None = None  # rows.ravel(): where a kind's stacked rows go
    number: int = 0  # position among the System's groups (names its scratch buffers)


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


def stack_params(bindings) -> dict[str, np.ndarray]:
    """Parameters of several bindings of one kind, component first: (d, k, 1) each."""
    out = {}
    for key in bindings[0].params:
        rows = np.stack([np.atleast_1d(np.asarray(b.params[key], dtype=float)) for b in bindings])
        out[key] = np.ascontiguousarray(rows.T[:, :, None])
    return out


# What compiling a mechanism produces, by structure: the bodies, the length scale,
# and every joint and driver coordinate with its kind, bodies and numbers (motions
# are not part of it).  Shared read-only between the Systems of equal structure.
_compiled: OrderedDict = OrderedDict()
_compiled_lock = threading.Lock()
COMPILED_FIELDS = (
    "row_names", "row_units", "m", "first_driver_row", "groups", "row_scale", "col_scale", "_template",
    "_active", "_affine_rows", "_affine_matrix", "_affine_offset", "_affine_gamma", "_affine_eta",
    "_plan", "slots", "slot_entries", "slot_rows", "slot_cols", "_fixed_slots", "_fixed_values",
    "_fixed_dirty", "_fixed_dirty_values",
)


def _structure_key(bodies, length, bound, drivers) -> tuple:
    """Everything compiling depends on, hashable: (name, item, Binding) triples of joints then drivers."""
    items = []
    for name, item, binding in bound:
        params = tuple(
            (key, np.shape(value), np.asarray(value, dtype=float).tobytes()) for key, value in sorted(binding.params.items())
        )
        items.append((name, type(item), item.ROWS, tuple(item.ROW_UNITS), tuple(binding.bodies), params))
    return (tuple(bodies), float(length), drivers, tuple(items))


class System:
    """Evaluates the constraint equations of a `Mechanism` and their derivatives.

    Compiling (binding, constant Jacobian entries, the elimination plan) is
    done once per mechanism structure and remembered (COMPILED_KEPT): a
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

        key = self.structure_key = _structure_key(self.bodies, self.length, bound, len(drivers))
        with _compiled_lock:
            compiled = _compiled.get(key)
            if compiled is not None:
                _compiled.move_to_end(key)
        if compiled is not None:
            self.__dict__.update(compiled)
            return
        self._compile(bound, len(drivers), index)
        compiled = {k: self.__dict__[k] for k in COMPILED_FIELDS if k in self.__dict__}
        with _compiled_lock:
            _compiled[key] = compiled
            while len(_compiled) > COMPILED_KEPT:
                _compiled.popitem(last=False)

    # -- compile ---------------------------------------------------------------
    def _compile(self, bound, drivers: int, index) -> None:
        """Rows, kinds and their instances, constant entries, affine kinds, layout and plan."""
        self.row_names: list[str] = []  # joint or driver owning each row
        self.row_units: list[str] = []
        by_kind: dict[type, list[tuple[str, object, object, list[int]]]] = {}
        for name, item, binding in bound:
            rows = list(range(len(self.row_names), len(self.row_names) + item.ROWS))
            self.row_names += [name] * item.ROWS
            self.row_units += list(item.ROW_UNITS)
            by_kind.setdefault(type(item), []).append((name, item, binding, rows))
        self.m = len(self.row_names)
        self.first_driver_row = self.m - drivers  # driver rows come last
        self.groups = [self._group(kind, items, index) for kind, items in by_kind.items()]
        for number, g in enumerate(self.groups):
            g.number = number

        self.row_scale = np.array([1.0 / self.length if u == LENGTH else 1.0 for u in self.row_units])
        self.col_scale = np.tile([self.length, self.length, 1.0], self.B)
        self._template = np.zeros((self.m, self.n + SLOT_COLUMNS))
        for g in self.groups:
            self._fill_constants(g)
        self._find_affine()
        self._plan = None
        self._layout(None)
        if self.m == self.n and self.n:
            self._plan = self._learn_plan()
            self._layout(self._plan)

    def _group(self, kind, items, index) -> Group:
        bindings = [b for _, _, b, _ in items]
        slots = np.array([[index[name] for name in b.bodies] for b in bindings]).T
        rows = np.array([r for _, _, _, r in items]).T
        cols = np.concatenate([SLOT_COLUMNS * slots[t][None] + np.arange(SLOT_COLUMNS)[:, None] for t in range(len(slots))])
        par = stack_params(bindings)
        return Group(kind, [n for n, _, _, _ in items], par, slots, rows, cols, flat_rows=rows.ravel())

    def _fill_constants(self, g: Group) -> None:
        """Store constant Φq entries once; remember which entries vary."""
        k = g.slots.shape[1]
        probe = self._poses(np.zeros((self.n, 1)))
        poses = self._slot_poses(g, probe)
        for r, row in enumerate(g.kind.jacobian(g.par, *poses)):
            if len(row) != g.cols.shape[0]:
                raise ModelError(f"kind {g.kind.__name__} gives {len(row)} partials per row, not {g.cols.shape[0]}", g.names[0])
            for c, entry in enumerate(row):
                if np.ndim(entry) == 0:
                    self._template[g.rows[r], g.cols[c]] = float(entry)
                else:
                    g.variable.append((r, c))
        assert k == len(g.names)

    def _find_affine(self) -> None:
        """Split off the kinds that are affine in q, to evaluate them as one matrix product.

        A kind whose Φq entries are all plain numbers has Φ(q) = Φ(0) + Φq q
        (the drivers' angle coordinates, for instance); if its γ and η are
        plain numbers too, they are those numbers.  Such kinds are not called
        per evaluation: their rows come from `_affine_matrix` (rows × n),
        `_affine_offset` (Φ at q = 0) and the constant γ, η.  `_active` lists
        the groups still evaluated kind by kind.
        """
        self._active = []
        rows, offset, gamma, eta = [], [], [], []
        probe = self._poses(np.zeros((self.n, 1)))
        still = self._rates(np.zeros((self.n, 1)))
        for g in self.groups:
            if g.variable:
                self._active.append(g)
                continue
            poses, rates = self._slot_poses(g, probe), self._slot_rates(g, still)
            g_rows = g.kind.gamma(g.par, poses, rates)
            e_rows = g.kind.eta(g.par, poses, rates, rates)
            if any(np.ndim(v) for v in list(g_rows) + list(e_rows)):
                self._active.append(g)
                continue
            k = g.rows.shape[1]
            for r, value in enumerate(g.kind.residual(g.par, *poses)):
                rows.append(g.rows[r])
                offset.append(np.broadcast_to(np.asarray(value, dtype=float), (k, 1))[:, 0])
                gamma.append(np.full(k, float(g_rows[r])))
                eta.append(np.full(k, float(e_rows[r])))
        self._poses_shape = None
        if rows:
            self._affine_rows = np.concatenate(rows)
            self._affine_matrix = self._template[self._affine_rows, : self.n].copy()
            self._affine_offset = np.concatenate(offset)[:, None]
            self._affine_gamma = np.concatenate(gamma)[:, None]
            self._affine_eta = np.concatenate(eta)[:, None]
        else:
            self._affine_rows = None

    def _affine_residual(self, out: np.ndarray, q: np.ndarray) -> None:
        if self._affine_rows is not None:
            out[self._affine_rows] = self._affine_matrix @ q + self._affine_offset

    # -- poses ---------------------------------------------------------------
    # Poses, rates and the per-kind gathers of them are temporaries of one
    # evaluation; they live in a borrowed workspace (workspace.py), so that
    # evaluating thousands of instants does not ask the allocator for fresh
    # megabytes (and the OS for fresh pages) on every call or every solve.
    # Kinds return new arrays; whatever refers into a buffer is copied out
    # before it is reused.
    def _buffer(self, key, shape) -> np.ndarray:
        space = self._workspace
        if space is None:
            space = self._workspace = borrow()
            self._give_back = weakref.finalize(self, give_back, space)
        return space.array(key, shape)

    def release_workspace(self) -> None:
        """Give the scratch memory back for the next solve; it is borrowed again if this System evaluates again."""
        if self._workspace is not None:
            self._give_back()
            self._workspace = None
            self._kept = None
            self._poses_shape = None
            self._slot_views.clear()
            self._values_filled = None

    def _poses(self, q: np.ndarray, reuse: bool = False) -> np.ndarray:
        """(5, B+1, N): x, y, φ, cos φ, sin φ of every body; the ground (last) at rest at the origin.

        With `reuse`, poses already in the buffer for exactly these
        coordinates (left there by `advance_poses`) are taken as they are.
        """
        B, N = self.B, q.shape[1]
        shape = (5, B + 1, N)
        out = self._buffer("poses", shape)
        coords = q.reshape(B, 3, N).transpose(1, 0, 2)
        if reuse and N >= TRIG_REUSE_FROM and self._poses_shape == shape and np.array_equal(out[:3, :B], coords):
            return out
        out[:3, :B] = coords
        out[:, B] = GROUND_POSE
        np.cos(out[2, :B], out=out[3, :B])
        np.sin(out[2, :B], out=out[4, :B])
        self._poses_shape = shape
        return out

    def advance_poses(self, step: np.ndarray) -> None:
        """Move the poses of the last evaluation by a small Newton step (n, N) that was added to its q.

        The next `gamma` or `eta` at the moved q then skips cos and sin: they
        are turned by the step's angle with the series cos δ ≈ 1 − δ²/2,
        sin δ ≈ δ − δ³/6 (exact to round-off for |δ| ≤ ADVANCE_LIMIT).  Does
        nothing for few instants, steps that are not small, or when the
        buffer holds other poses.
        """
        B, N = self.B, step.shape[1]
        shape = (5, B + 1, N)
        if N < TRIG_REUSE_FROM or self._poses_shape != shape:
            return
        move = step.reshape(B, 3, N).transpose(1, 0, 2)
        turn = move[2]
        if not np.max(np.abs(turn)) <= ADVANCE_LIMIT:  # also refuses NaN
            self._poses_shape = None
            return
        out = self._buffer("poses", shape)
        out[:3, :B] += move
        t2 = turn * turn
        cos_t = 1.0 - 0.5 * t2
        sin_t = turn * (1.0 - t2 / 6.0)
        c = out[3, :B].copy()
        s = out[4, :B]
        out[3, :B] = c * cos_t - s * sin_t
        out[4, :B] = s * cos_t + c * sin_t

    def _rates(self, dq: np.ndarray, key: str = "rates") -> np.ndarray:
        """(3, B+1, N): a derivative of x, y, φ of every body; zero for the ground."""
        N = dq.shape[1]
        out = self._buffer(key, (3, self.B + 1, N))
        out[:, : self.B] = dq.reshape(self.B, 3, N).transpose(1, 0, 2)
        out[:, self.B] = 0.0
        return out

    def _take(self, g: Group, arrays, key) -> np.ndarray:
        shape = (arrays.shape[0], g.slots.shape[0], g.slots.shape[1], arrays.shape[2])
        return np.take(arrays, g.slots, axis=1, out=self._buffer((key, g.number), shape), mode="clip")

    # The Pose and Rates objects viewing a gathered buffer are made once per
    # buffer and handed out again (a Pose forgets its remembered rotations).
    def _slot_poses(self, g: Group, arrays) -> list[Pose]:
        taken = self._take(g, arrays, "pose")  # (5, slots, k, N)
        known = self._slot_views.get(("pose", g.number))
        if known is not None and known[0] is taken:
            for pose in known[1]:
                pose.forget()
            return known[1]
        poses = [Pose(*taken[:, t]) for t in range(taken.shape[1])]
        self._slot_views[("pose", g.number)] = (taken, poses)
        return poses

    def _slot_rates(self, g: Group, arrays, key="rates") -> list[Rates]:
        taken = self._take(g, arrays, key)
        known = self._slot_views.get((key, g.number))
        if known is not None and known[0] is taken:
            return known[1]
        rates = [Rates(*taken[:, t]) for t in range(taken.shape[1])]
        self._slot_views[(key, g.number)] = (taken, rates)
        return rates

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
        """Write a kind's rows (arrays (k, N) or plain numbers) into out (m, N)."""
        shape = (g.rows.shape[1], out.shape[1])
        for v in values:
            if v.__class__ is not np.ndarray or v.shape != shape:
                for r, value in enumerate(values):
                    out[g.rows[r]] = value
                return
        out[g.flat_rows] = np.concatenate(values)

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
                shape = (g.rows.shape[1], N)
                parts = [partials[r][c] for r, c in g.variable]
                try:
                    block = np.concatenate(parts)
                except ValueError:  # mixed shapes
                    block = None
                if block is None or block.shape != (len(parts) * shape[0], N):
                    block = np.concatenate([np.broadcast_to(v, shape) for v in parts])
                values[g.var_slots] = block
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

    def gamma(self, q, dq, drive) -> np.ndarray:
        """γ (m, N) at q, q' (n, N); Φq q'' = γ."""
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

    def eta(self, q, dq, ddq, drive, after_gamma: bool = False) -> np.ndarray:
        """η (m, N) at q, q', q'' (n, N), so that Φq times the third derivative of q is η.

        With `after_gamma`, the poses and rates gathered by the `gamma` call
        just before (which must have had the same q and first derivative) are
        used again, rotations included.
        """
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
        return np.abs(dq / self.col_scale[:, None]).max(axis=0)

    def scaled_residual(self, res: np.ndarray) -> np.ndarray:
        """max |Φ| per instant, length rows in units of L, angle rows in rad."""
        return np.abs(res * self.row_scale[:, None]).max(axis=0)

    def scaled_jacobian(self, jac: np.ndarray) -> np.ndarray:
        """Φq with rows and columns scaled to be dimensionless (m, n, N)."""
        return jac * self.row_scale[:, None, None] * self.col_scale[None, :, None]

    def elimination_plan(self):
        """The planned elimination for batched solves (None unless Φq is square)."""
        return self._plan

    def _learn_plan(self) -> EliminationPlan:
        """Learn the elimination from Φq at random configurations (fixed seed: always the same plan)."""
        rng = np.random.default_rng(PLAN_SEED)
        q = np.empty((self.n, PLAN_SAMPLES))
        q[0::3] = rng.uniform(-1.0, 1.0, (self.B, PLAN_SAMPLES)) * self.length
        q[1::3] = rng.uniform(-1.0, 1.0, (self.B, PLAN_SAMPLES)) * self.length
        q[2::3] = rng.uniform(-np.pi, np.pi, (self.B, PLAN_SAMPLES))
        samples = self.scaled_jacobian(self.jacobian(q))
        xy = np.array([c for c in range(self.n) if c % 3 < 2], dtype=int)
        return EliminationPlan(samples, xy)

    def _layout(self, plan) -> None:
        """Give a slot of the compact Jacobian to every entry that is non-zero or that the plan touches."""
        m, n = self.m, self.n
        used = self._template[:, :n] != 0.0
        for g in self.groups:
            for r, c in g.variable:
                keep = g.cols[c] < n
                used[g.rows[r][keep], g.cols[c][keep]] = True
        if plan is not None:
            used |= plan.touched(n)
        slot_of = np.full((m, n), -1, dtype=int)
        flat = np.flatnonzero(used.ravel())
        self.slots = flat.size
        slot_of.ravel()[flat] = np.arange(self.slots)
        self.slot_entries = flat  # flat (row·n + col) index of each slot
        self.slot_rows, self.slot_cols = np.divmod(flat, n)
        zero, ground = self.slots, self.slots + 1  # the always-zero row; the row for partials w.r.t. the ground
        slot_of[slot_of < 0] = zero
        varying = np.zeros(self.slots + 2, dtype=bool)
        for g in self.groups:
            if g.variable:
                rows = np.concatenate([g.rows[r] for r, _ in g.variable])
                cols = np.concatenate([g.cols[c] for _, c in g.variable])
                g.var_slots = np.where(cols < n, slot_of[rows, np.minimum(cols, n - 1)], ground)
                varying[g.var_slots] = True
        values = np.append(self._template[:, :n].ravel()[flat], [0.0, 0.0])
        self._fixed_slots = np.flatnonzero(~varying)
        self._fixed_values = values[self._fixed_slots][:, None]
        overwritten = np.zeros(self.slots + 2, dtype=bool)
        if plan is not None:
            constants = np.where(varying, np.nan, values)  # entries the same at every configuration
            plan.bind(slot_of, constants)
            for step in plan.steps:  # fill-in updates of a sparse factorization overwrite these
                overwritten[step.grid_slots.ravel()] = True
        # constant entries to restore before the next factorization when the buffer still holds the rest
        self._fixed_dirty = np.flatnonzero(~varying & overwritten)
        self._fixed_dirty_values = values[self._fixed_dirty][:, None]
        self._values_filled = None

    def initial_guess(self) -> np.ndarray:
        """The rough initial coordinates of the moving bodies, (n,)."""
        return np.array([v for b in self.bodies for v in self.mechanism.bodies[b].guess], dtype=float)

    def coordinate_names(self) -> list[str]:
        return [f"{b}.{c}" for b in self.bodies for c in ("x", "y", "phi")]

