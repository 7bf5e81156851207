"""Compiling a mechanism for evaluation, and remembering the result by structure.

Compiling binds every joint and driver coordinate, groups the instances of
each kind (`Group`), stores the Jacobian entries that never vary, splits
off the kinds that are affine in q, gives every entry that can be non-zero
a slot of the compact Jacobian and learns the elimination plan (linalg.py).
All of it depends only on the bodies, the length scale and every joint and
driver coordinate with its kind, bodies and numbers — not on the motions —
so it is remembered under that key (the last COMPILED_KEPT) and shared,
read-only, by every System of the same structure: a re-solve after an edit
of speed, limits or a motion starts from it; an edit of the geometry makes
a new key.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from dataclasses import dataclass, field

import numpy as np

from .base import LENGTH
from .errors import ModelError
from .instant import InstantKinds
from .linalg import PLAN_SAMPLES, PLAN_SEED, EliminationPlan

SLOT_COLUMNS = 3  # x, y, φ per body
COMPILED_KEPT = 32  # mechanism structures whose compiled form is remembered (a re-solve or a motion edit reuses it)


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
    var_slot_rows: list | None = None  # var_slots split per varying entry: (k,) slots of its instances
    flat_rows: np.ndarray | None = None  # rows.ravel(): where a kind's stacked rows go
    number: int = 0  # position among the System's groups (names its scratch buffers)


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
    "_fixed_dirty", "_fixed_dirty_values", "_instant",
)


def structure_key(bodies, length, bound, drivers) -> tuple:
    """Everything compiling depends on, hashable: (name, item, Binding) triples of joints then drivers."""
    items = []
    for name, item, binding in bound:
        params = tuple(
            (key, np.shape(value), np.asarray(value, dtype=float).tobytes()) for key, value in sorted(binding.params.items())
        )
        items.append((name, type(item), item.ROWS, tuple(item.ROW_UNITS), tuple(binding.bodies), params))
    return (tuple(bodies), float(length), drivers, tuple(items))


def remembered(key):
    """The compiled fields stored under `key`, or None."""
    with _compiled_lock:
        compiled = _compiled.get(key)
        if compiled is not None:
            _compiled.move_to_end(key)
    return compiled


def remember(key, system) -> None:
    """Store the compiled fields of `system` under `key` (the oldest beyond COMPILED_KEPT are dropped)."""
    compiled = {k: system.__dict__[k] for k in COMPILED_FIELDS if k in system.__dict__}
    with _compiled_lock:
        _compiled[key] = compiled
        while len(_compiled) > COMPILED_KEPT:
            _compiled.popitem(last=False)


class Compiling:
    """The compile steps of `System` (a mixin: it works on the System's attributes)."""

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
        self._instant = None  # set before the check below, which evaluates both ways
        self._instant = InstantKinds.of(self)

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
                g.var_slot_rows = np.split(g.var_slots, len(g.variable))
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
