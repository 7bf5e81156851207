"""Batched linear solves with Φq at many instants at once.

Each instant needs Φq x = b for up to four right-hand sides (a Newton step,
then velocity, acceleration and jerk).  The matrices are small (3 columns per
body) and sparse, and numpy's stacked LAPACK calls pay a fixed cost per
matrix that dominates at thousands of instants.  So two paths, one result:

* `DenseFactor` (few instants): the inverse of each scaled Φq by LAPACK.
* `SparseFactor` (many instants): elimination planned once per mechanism
  (`EliminationPlan`), executed with array operations over all instants.
  A pin's two rows hold ±1 in the x and y columns of its bodies whatever
  the configuration, so the plan first pivots on such constant entries (no
  pivot can shrink, no multiplier exceeds 1 in magnitude) and leaves a small
  dense block, mostly the φ columns, which is eliminated with partial
  pivoting chosen per instant.

Both judge pivots on the scaled matrix (rows and columns made
dimensionless, see System.scaled_jacobian) and return solutions in SI units.  Both give the
sign of det Φq per instant (a sign change between neighbouring instants
means a singular configuration was passed) and a condition indicator:
`DenseFactor` the exact 1-norm condition number of scaled Φq, `SparseFactor`
a cheap estimate from its pivots that only screens instants for an exact
check.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.linalg import lapack

PLAN_SAMPLES = 3  # random configurations used to learn the sparsity and constant entries
PLAN_SEED = 7  # fixed, so a mechanism always gets the same plan
CONSTANT_TOLERANCE = 1e-13  # entries equal across samples to this are constant
MIN_CONSTANT_PIVOT = 0.5  # smallest constant entry worth pivoting on (pins give 1)
TINY = 1e-300  # guards a division when a pivot is exactly zero (singular matrix)
FEW_ENTRIES = 4  # a fill-in update over at most this many entries runs row by row (fewer calls than gathers)
WHOLE_ROWS_FROM = 1024  # instants: from this many on, pivot rows are found by comparing whole rows, not argmax


@dataclass
class Step:
    """One planned pivot: row r, column c, rows below to update, columns to the right.

    The *_slot fields locate the entries in a compact Jacobian (see `bind`).
    Where the pivot, or the multipliers (entries below over the pivot), are
    the same at every configuration, `bind` works them out once:
    `pivot_value`, `multipliers` (len(below),) — None where they vary.
    """

    r: int
    c: int
    below: np.ndarray
    right: np.ndarray
    pivot_slot: int = -1
    below_slots: np.ndarray | None = None
    right_slots: np.ndarray | None = None
    grid_slots: np.ndarray | None = None
    pivot_value: float | None = None
    multipliers: np.ndarray | None = None
    grid_ops: list | None = None  # known multipliers over a few entries: (grid slot, right slot, multiplier) each
    forward: tuple | None = None  # one row below, known multiplier: (row below, pivot row, multiplier)


class EliminationPlan:
    """Pivot order of the constant entries and the dense remainder, learned from samples.

    Greedy, one pivot at a time: among entries of the allowed columns that
    are equal in every sample (constant), at least MIN_CONSTANT_PIVOT in
    size and the largest of their column (so no multiplier exceeds 1), take
    the one whose elimination fills in least (Markowitz count).
    """

    constant_sign = 1.0  # set by `bind`

    def __init__(self, samples: np.ndarray, pivot_columns: np.ndarray):
        """`samples` (n, n, S): scaled Φq at random configurations; `pivot_columns`: columns that may take a constant pivot."""
        n = samples.shape[0]
        M = samples.copy()
        row_free = np.ones(n, dtype=bool)
        col_free = np.ones(n, dtype=bool)
        allowed = np.zeros(n, dtype=bool)
        allowed[np.asarray(pivot_columns, dtype=int)] = True
        never = n * n + 1  # a cost above any Markowitz count
        steps = []
        while True:
            A = np.abs(M)
            top = A.max(axis=2)
            nz = (top > 0.0) & row_free[:, None] & col_free[None, :]
            size = A[:, :, 0]
            constant = (M.max(axis=2) - M.min(axis=2)) <= CONSTANT_TOLERANCE
            column_max = (top * nz).max(axis=0)
            candidate = nz & constant & allowed & (size >= MIN_CONSTANT_PIVOT)
            candidate &= size >= column_max * (1.0 - CONSTANT_TOLERANCE)
            if not candidate.any():
                break
            counts = nz.astype(int)
            cost = np.where(candidate, np.outer(counts.sum(axis=1) - 1, counts.sum(axis=0) - 1), never)
            r, c = divmod(int(cost.argmin()), n)
            below = np.flatnonzero(nz[:, c])
            below = below[below != r]
            right = np.flatnonzero(nz[r])
            right = right[right != c]
            if below.size:
                L = M[below, c] / M[r, c]
                if right.size:
                    M[np.ix_(below, right)] -= L[:, None, :] * M[r, right][None]
                M[below, c] = 0.0
            row_free[r] = False
            col_free[c] = False
            steps.append(Step(r, c, below, right))
        self.steps = steps
        self.rest_rows = np.flatnonzero(row_free)
        self.rest_cols = np.flatnonzero(col_free)
        order_r = [s.r for s in steps] + list(self.rest_rows)
        order_c = [s.c for s in steps] + list(self.rest_cols)
        self.sign = _permutation_sign(order_r) * _permutation_sign(order_c)
        self.rest_slots = None

    def touched(self, n: int) -> np.ndarray:
        """(n, n) bool: every entry the elimination reads or writes (fill-in included)."""
        out = np.zeros((n, n), dtype=bool)
        for s in self.steps:
            out[s.r, s.c] = True
            out[s.below, s.c] = True
            out[s.r, s.right] = True
            out[np.ix_(s.below, s.right)] = True
        out[np.ix_(self.rest_rows, self.rest_cols)] = True
        return out

    def bind(self, slot_of: np.ndarray, constants: np.ndarray | None = None) -> None:
        """Locate every entry the plan uses in a compact Jacobian; `slot_of` (n, n) gives each entry's slot.

        `constants` (one per slot) holds the value of each entry that is the
        same at every configuration, NaN for the others.  Following the
        elimination through them gives the pivots and multipliers that are
        constant, so the factorization uses them as numbers (no division,
        and ±1 multipliers become plain additions in the solves).
        """
        known = None if constants is None else np.array(constants, dtype=float)
        self.constant_sign = 1.0  # product of the signs of the constant pivots
        for s in self.steps:
            s.pivot_slot = int(slot_of[s.r, s.c])
            s.below_slots = slot_of[s.below, s.c]
            s.right_slots = slot_of[s.r, s.right]
            s.grid_slots = slot_of[np.ix_(s.below, s.right)]
            s.pivot_value = s.multipliers = s.grid_ops = s.forward = None
            if known is None:
                continue
            pivot = known[s.pivot_slot]
            if np.isfinite(pivot) and pivot != 0.0:
                s.pivot_value = float(pivot)
                self.constant_sign *= float(np.sign(pivot))
                below = known[s.below_slots]
                if np.all(np.isfinite(below)):
                    s.multipliers = below / pivot
            if s.multipliers is not None and 0 < s.below.size * s.right.size <= FEW_ENTRIES:
                s.grid_ops = [
                    (int(s.grid_slots[i, j]), int(s.right_slots[j]), float(s.multipliers[i]))
                    for i in range(s.below.size) for j in range(s.right.size)
                ]
            if s.multipliers is not None and s.below.size == 1:
                s.forward = (int(s.below[0]), int(s.r), float(s.multipliers[0]))
            if s.below.size and s.right.size:  # the update of the grid keeps it known only if all it uses is known
                if s.multipliers is not None:
                    known[s.grid_slots] -= s.multipliers[:, None] * known[s.right_slots][None, :]
                else:
                    known[s.grid_slots] = np.nan
        self.rest_slots = slot_of[np.ix_(self.rest_rows, self.rest_cols)]


def _permutation_sign(order) -> int:
    order = list(order)
    sign = 1
    seen = [False] * len(order)
    for i in range(len(order)):
        if seen[i]:
            continue
        j, length = i, 0
        while not seen[j]:
            seen[j] = True
            j = order[j]
            length += 1
        if length % 2 == 0:
            sign = -sign
    return sign


class DenseFactor:
    """Scaled Φq inverted per instant by LAPACK: best for a few instants.

    The sign of det Φq and the condition number are worked out on first use
    only (a Newton iteration needs neither).
    """

    def __init__(self, jac, row_scale, col_scale, scaled=None):
        """Φq `jac` (m, n, N) dense, or already scaled and stacked as `scaled` (N, m, n) (then `jac` is unused)."""
        self.row_scale = row_scale[:, None]
        self.col_scale = col_scale[:, None]
        if scaled is None:
            scaled = (jac * row_scale[:, None, None] * col_scale[None, :, None]).transpose(2, 0, 1)
        self.scaled = scaled
        try:
            self.inverse = np.linalg.inv(self.scaled)
        except np.linalg.LinAlgError:  # an exactly singular instant: invert one by one
            self.inverse = np.empty_like(self.scaled)
            for k, matrix in enumerate(self.scaled):
                try:
                    self.inverse[k] = np.linalg.inv(matrix)
                except np.linalg.LinAlgError:
                    self.inverse[k] = np.nan
        self._det_sign = None
        self._condition = None

    @property
    def det_sign(self) -> np.ndarray:
        """Sign of det Φq per instant (0 where exactly singular)."""
        if self._det_sign is None:
            self._det_sign = np.linalg.slogdet(self.scaled)[0]
        return self._det_sign

    @property
    def condition(self) -> np.ndarray:
        """1-norm condition number of scaled Φq per instant (inf where singular)."""
        if self._condition is None:
            with np.errstate(all="ignore"):
                cond = np.abs(self.scaled).sum(axis=1).max(axis=1) * np.abs(self.inverse).sum(axis=1).max(axis=1)
            cond[~np.isfinite(cond)] = np.inf
            self._condition = cond
        return self._condition

    def solve(self, b: np.ndarray, overwrite: bool = False) -> np.ndarray:
        """x (n, N) with Φq x = b (m, N), per instant (`overwrite` is accepted for symmetry; b is kept)."""
        x = np.einsum("kij,jk->ik", self.inverse, b * self.row_scale)
        return x * self.col_scale


class InstantFactor:
    """Scaled Φq of one instant factored by LAPACK's LU (getrf): the lean path of a march step.

    The interface of `DenseFactor` for N = 1 (arrays (1,) for the sign and
    the condition, solutions (n, 1)), and `solve_list` on plain lists,
    without numpy's stacked-linalg wrappers, which cost several times the
    factorization of a small matrix.  The inverse, for the exact 1-norm
    condition number, is formed on first use only.
    """

    __slots__ = ("scaled", "rows", "cols", "lu", "piv", "singular", "_det_sign", "_condition")

    def __init__(self, scaled: np.ndarray, row_scale: list, col_scale: list):
        """`scaled` (n, n): Φq with rows and columns scaled (kept); the scales as lists."""
        self.scaled = scaled
        self.rows = row_scale
        self.cols = col_scale
        self.lu, self.piv, info = _getrf(scaled)
        self.singular = info != 0  # info > 0: an exactly zero pivot; LAPACK's solves would divide by it

    @property
    def det_sign(self) -> np.ndarray:
        """Sign of det Φq, (1,) (0 where exactly singular): signs of U's pivots and of the row exchanges."""
        try:
            return self._det_sign
        except AttributeError:
            pass
        diagonal = self.lu.diagonal().tolist()
        if self.singular or 0.0 in diagonal:
            sign = 0.0
        else:
            flips = sum(v < 0.0 for v in diagonal) + sum(p != i for i, p in enumerate(self.piv.tolist()))
            sign = -1.0 if flips % 2 else 1.0
        self._det_sign = np.array([sign])
        return self._det_sign

    @property
    def condition(self) -> np.ndarray:
        """1-norm condition number of scaled Φq, (1,) (inf where singular)."""
        try:
            return self._condition
        except AttributeError:
            pass
        cond = math.inf
        if not self.singular:
            inverse = _getri(self.lu, self.piv)[0]
            cond = float(np.abs(self.scaled).sum(axis=0).max()) * float(np.abs(inverse).sum(axis=0).max())
            if not math.isfinite(cond):
                cond = math.inf
        self._condition = np.array([cond])
        return self._condition

    def solve_list(self, b: list) -> list:
        """x (list of n) with Φq x = b (list of m)."""
        if self.singular:
            return [math.nan] * len(self.cols)
        x = _getrs(self.lu, self.piv, np.array([v * r for v, r in zip(b, self.rows)]), overwrite_b=1)[0]
        return [v * c for v, c in zip(x.tolist(), self.cols)]

    def solve(self, b: np.ndarray, overwrite: bool = False) -> np.ndarray:
        """x (n, 1) with Φq x = b (m, 1) or (m,)."""
        return np.array(self.solve_list(b.reshape(-1).tolist()))[:, None]


_getrf, _getrs, _getri = lapack.get_lapack_funcs(("getrf", "getrs", "getri"), (np.empty(1),))


class SparseFactor:
    """Φq factored along an `EliminationPlan`, with array operations over instants.

    The constant pivots are taken on Φq as it is (their rows and columns
    scale alike); only the small remainder is scaled, where partial
    pivoting chooses rows and the pivots give the condition estimate.
    `values` is the compact Jacobian (slots, N) of System.residual_jacobian
    and is overwritten.
    """

    def __init__(self, plan: EliminationPlan, values, row_scale, col_scale):
        self.plan = plan
        V = values
        N = V.shape[1]
        self.multipliers = []
        det_sign = np.full(N, float(plan.sign) * plan.constant_sign)
        for s in plan.steps:
            if not s.below.size:
                L = None
            elif s.multipliers is not None:  # known: (len(below), 1) to broadcast over instants
                L = s.multipliers[:, None]
                if s.grid_ops is not None:  # a few entries: row by row, in place (±1: an addition)
                    for grid, right, factor in s.grid_ops:
                        if factor == 1.0:
                            V[grid] -= V[right]
                        elif factor == -1.0:
                            V[grid] += V[right]
                        else:
                            V[grid] -= factor * V[right]
                elif s.right.size:
                    V[s.grid_slots] -= L[:, :, None] * V[s.right_slots][None]
            else:
                L = V[s.below_slots] / V[s.pivot_slot]
                if s.right.size:
                    V[s.grid_slots] -= L[:, None, :] * V[s.right_slots][None]
            if s.pivot_value is None:
                det_sign *= np.sign(V[s.pivot_slot])
            self.multipliers.append(L)
        self.V = V
        R, C = plan.rest_rows, plan.rest_cols
        self.rest_row_scale = row_scale[R][:, None]
        self.rest_col_scale = col_scale[C][:, None]
        S = V[plan.rest_slots]  # a new (r, r, N) array, scaled in place
        S *= self.rest_row_scale[:, :, None] * self.rest_col_scale[None, :, :]
        r = len(R)
        order = np.arange(r * N).reshape(r, N)  # flat index (row · N + instant) of each row, kept in pivot order
        swapped = False
        smallest = np.full(N, np.inf)
        largest = np.ones(N)  # constant pivots are 1 in magnitude
        for k in range(r):
            if k + 1 < r:
                rel = _pivot_rows(S[k:, k, :])  # pivot row per instant, counted from row k
                if rel.any():
                    swapped = True
                    masks = [rel == i for i in range(1, r - k)]
                    _exchange_rows(S, k, masks)
                    _exchange_rows(order, k, masks)
                    np.negative(det_sign, out=det_sign, where=rel != 0)
            pivot = S[k, k]
            det_sign *= np.sign(pivot)
            size = np.abs(pivot)
            np.minimum(smallest, size, out=smallest)
            np.maximum(largest, size, out=largest)
            if k + 1 < r:
                with np.errstate(all="ignore"):
                    S[k + 1 :, k] /= np.where(pivot == 0.0, TINY, pivot)
                S[k + 1 :, k + 1 :] -= S[k + 1 :, k, None, :] * S[k, None, k + 1 :, :]
        self.S = S
        self.gather = order.ravel() if swapped else None  # rows in pivot order, per instant
        self.det_sign = det_sign
        # back substitution reads the same pivot rows for every right-hand side: gather them once
        self.back = [
            (V[s.right_slots] if s.right.size else None, 1.0 / V[s.pivot_slot] if s.pivot_value is None else 1.0 / s.pivot_value)
            for s in plan.steps
        ]
        with np.errstate(divide="ignore"):
            self.condition = np.where(smallest > 0.0, largest / smallest, np.inf) if r else np.ones(N)

    def solve(self, b: np.ndarray, overwrite: bool = False) -> np.ndarray:
        """x (n, N) with Φq x = b (m, N), per instant; with `overwrite`, b (a temporary) is used as scratch."""
        plan = self.plan
        x = b if overwrite else b.copy()
        for s, L in zip(plan.steps, self.multipliers):
            if L is None:
                continue
            if s.forward is not None:  # one row, a known number: in place
                below, r, factor = s.forward
                if factor == 1.0:
                    x[below] -= x[r]
                elif factor == -1.0:
                    x[below] += x[r]
                else:
                    x[below] -= factor * x[r]
            else:
                x[s.below] -= L * x[s.r]
        out = np.empty_like(x)
        R, C = plan.rest_rows, plan.rest_cols
        r = len(R)
        if r:
            y = x[R]
            y *= self.rest_row_scale
            if self.gather is not None:  # rows in pivot order, per instant
                y = y.ravel().take(self.gather).reshape(y.shape)
            S = self.S
            for k in range(1, r):
                y[k] -= S[k, 0] * y[0] if k == 1 else (S[k, :k] * y[:k]).sum(axis=0)
            with np.errstate(all="ignore"):
                for k in range(r - 1, -1, -1):
                    if k + 1 < r:
                        y[k] -= S[k, k + 1] * y[k + 1] if k + 2 == r else (S[k, k + 1 :] * y[k + 1 :]).sum(axis=0)
                    y[k] /= S[k, k]
            y *= self.rest_col_scale
            out[C] = y
        for s, (row, inverse) in zip(reversed(plan.steps), reversed(self.back)):
            value = x[s.r]
            if row is not None:
                if s.right.size == 1:
                    value = value - row[0] * out[s.right[0]]
                else:
                    value = value - (row * out[s.right]).sum(axis=0)
            if s.pivot_value == 1.0:
                out[s.c] = value
            elif s.pivot_value == -1.0:
                np.negative(value, out=out[s.c])
            else:
                np.multiply(value, inverse, out=out[s.c])
        return out


def _pivot_rows(column: np.ndarray) -> np.ndarray:
    """argmax over rows of |column| (rows, N) per instant: the first of equal largest, as argmax gives it.

    Over many instants numpy's argmax along the first axis runs one tiny
    search per instant, so there the rows are compared as whole arrays.
    """
    size = np.abs(column)
    if column.shape[1] < WHOLE_ROWS_FROM:
        return size.argmax(axis=0)
    best = size[0]
    rel = None
    for i in range(1, size.shape[0]):
        better = size[i] > best  # strictly: a tie keeps the earlier row
        if rel is None:
            rel = better.astype(np.intp)
        else:
            rel[better] = i
        if i + 1 < size.shape[0]:
            best = np.maximum(best, size[i])
    return rel


def _exchange_rows(A: np.ndarray, k: int, masks: list) -> None:
    """Exchange row k of A (rows first, instants last) with row k + i where masks[i − 1] (N,) holds.

    The masks exclude each other; masked copies run over contiguous instants.
    """
    old = A[k].copy()
    for i, mask in enumerate(masks, 1):
        np.copyto(A[k], A[k + i], where=mask)
        np.copyto(A[k + i], old, where=mask)


SPARSE_FROM = 64  # instants: from this many on, the planned elimination beats stacked LAPACK


def factor(plan: EliminationPlan | None, jac, row_scale, col_scale):
    """The better factorization of Φq for its number of instants; `jac` a System `Jacobian` (consumed)."""
    if plan is not None and jac.values.shape[1] >= SPARSE_FROM:
        return SparseFactor(plan, jac.values, row_scale, col_scale)
    return DenseFactor(None, row_scale, col_scale, scaled=jac.scaled_stack(row_scale, col_scale))
