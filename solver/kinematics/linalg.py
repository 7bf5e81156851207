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

Both work on the scaled matrix (rows and columns made dimensionless, see
System.scaled_jacobian) and return solutions in SI units.  Both give the
sign of det Φq per instant (a sign change between neighbouring instants
means a singular configuration was passed) and a condition indicator:
`DenseFactor` the exact 1-norm condition number of scaled Φq, `SparseFactor`
a cheap estimate from its pivots that only screens instants for an exact
check.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

PLAN_SAMPLES = 3  # random configurations used to learn the sparsity and constant entries
PLAN_SEED = 7  # fixed, so a mechanism always gets the same plan
CONSTANT_TOLERANCE = 1e-13  # entries equal across samples to this are constant
MIN_CONSTANT_PIVOT = 0.5  # smallest constant entry worth pivoting on (pins give 1)
TINY = 1e-300  # guards a division when a pivot is exactly zero (singular matrix)


@dataclass
class Step:
    """One planned pivot: row r, column c, rows below to update, columns to the right."""

    r: int
    c: int
    below: np.ndarray
    right: np.ndarray


class EliminationPlan:
    """Pivot order of the constant entries and the dense remainder, learned from samples."""

    def __init__(self, samples: np.ndarray, pivot_columns: np.ndarray):
        """`samples` (n, n, S): scaled Φq at random configurations; `pivot_columns`: columns that may take a constant pivot."""
        n = samples.shape[0]
        M = samples.copy()
        rows, cols = set(range(n)), set(range(n))
        allowed = set(int(c) for c in pivot_columns)
        steps = []
        while True:
            best = None
            nz = np.any(M != 0.0, axis=2)
            for c in sorted(cols & allowed):
                active = [r for r in rows if nz[r, c]]
                if not active:
                    continue
                column_max = max(np.max(np.abs(M[r, c])) for r in active)
                for r in active:
                    v = M[r, c]
                    if np.ptp(v) > CONSTANT_TOLERANCE or abs(v[0]) < MIN_CONSTANT_PIVOT:
                        continue
                    if abs(v[0]) < column_max * (1 - CONSTANT_TOLERANCE):
                        continue
                    cost = (sum(nz[r, j] for j in cols) - 1) * (len(active) - 1)
                    if best is None or cost < best[0]:
                        best = (cost, r, c)
            if best is None:
                break
            _, r, c = best
            rows.discard(r)
            cols.discard(c)
            below = np.array(sorted(i for i in rows if nz[i, c]), dtype=int)
            right = np.array(sorted(j for j in cols if nz[r, j]), dtype=int)
            if below.size:
                L = M[below, c] / M[r, c]
                if right.size:
                    M[np.ix_(below, right)] -= L[:, None, :] * M[r, right][None]
                M[below, c] = 0.0
            steps.append(Step(r, c, below, right))
        self.steps = steps
        self.rest_rows = np.array(sorted(rows), dtype=int)
        self.rest_cols = np.array(sorted(cols), dtype=int)
        order_r = [s.r for s in steps] + list(self.rest_rows)
        order_c = [s.c for s in steps] + list(self.rest_cols)
        self.sign = _permutation_sign(order_r) * _permutation_sign(order_c)


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

    def __init__(self, jac, row_scale, col_scale):
        self.row_scale = row_scale[:, None]
        self.col_scale = col_scale[:, None]
        self.scaled = np.moveaxis(jac * row_scale[:, None, None] * col_scale[None, :, None], 2, 0)
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
                norm = np.max(np.sum(np.abs(self.scaled), axis=1), axis=1)
                inv_norm = np.max(np.sum(np.abs(self.inverse), axis=1), axis=1)
                cond = norm * inv_norm
            self._condition = np.where(np.isfinite(cond), cond, np.inf)
        return self._condition

    def solve(self, b: np.ndarray) -> np.ndarray:
        """x (n, N) with Φq x = b (m, N), per instant."""
        x = np.einsum("kij,jk->ik", self.inverse, b * self.row_scale)
        return x * self.col_scale


class SparseFactor:
    """Scaled Φq factored along an `EliminationPlan`, with array operations over instants."""

    def __init__(self, plan: EliminationPlan, jac, row_scale, col_scale):
        self.plan = plan
        self.row_scale = row_scale[:, None]
        self.col_scale = col_scale[:, None]
        A = jac * row_scale[:, None, None] * col_scale[None, :, None]
        N = A.shape[2]
        self.multipliers = []
        det_sign = np.full(N, float(plan.sign))
        for s in plan.steps:
            pivot = A[s.r, s.c]
            det_sign *= np.sign(pivot)
            if s.below.size:
                L = A[s.below, s.c] / pivot
                if s.right.size:
                    A[s.below[:, None], s.right[None, :]] -= L[:, None, :] * A[s.r, s.right][None]
            else:
                L = None
            self.multipliers.append(L)
        self.A = A
        R, C = plan.rest_rows, plan.rest_cols
        S = A[R[:, None], C[None, :]]  # (r, r, N)
        r = len(R)
        perm = np.tile(np.arange(r)[:, None], (1, N))
        cols = np.arange(N)
        smallest = np.full(N, np.inf)
        largest = np.ones(N)  # constant pivots are 1 in magnitude
        for k in range(r):
            p = k + np.argmax(np.abs(S[k:, k, :]), axis=0)
            moved = p != k
            if np.any(moved):
                idx = cols[moved]
                pk = p[moved]
                row_k = S[k][:, idx].copy()
                S[k][:, idx] = S[pk, :, idx].T
                S[pk, :, idx] = row_k.T
                perm_k = perm[k, idx].copy()
                perm[k, idx] = perm[pk, idx]
                perm[pk, idx] = perm_k
                det_sign[moved] *= -1.0
            pivot = S[k, k]
            det_sign *= np.sign(pivot)
            size = np.abs(pivot)
            smallest = np.minimum(smallest, size)
            largest = np.maximum(largest, size)
            if k + 1 < r:
                with np.errstate(all="ignore"):
                    S[k + 1 :, k] /= np.where(pivot == 0.0, TINY, pivot)
                S[k + 1 :, k + 1 :] -= S[k + 1 :, k, None, :] * S[k, None, k + 1 :, :]
        self.S = S
        self.perm = perm
        self.det_sign = det_sign
        with np.errstate(divide="ignore"):
            self.condition = np.where(smallest > 0.0, largest / smallest, np.inf) if r else np.ones(N)

    def solve(self, b: np.ndarray) -> np.ndarray:
        """x (n, N) with Φq x = b (m, N), per instant."""
        plan = self.plan
        x = b * self.row_scale
        for s, L in zip(plan.steps, self.multipliers):
            if L is not None:
                x[s.below] -= L * x[s.r]
        out = np.empty_like(x)
        R, C = plan.rest_rows, plan.rest_cols
        r = len(R)
        if r:
            y = np.take_along_axis(x[R], self.perm, axis=0)
            S = self.S
            for k in range(1, r):
                y[k] -= np.sum(S[k, :k] * y[:k], axis=0)
            for k in range(r - 1, -1, -1):
                if k + 1 < r:
                    y[k] -= np.sum(S[k, k + 1 :] * y[k + 1 :], axis=0)
                with np.errstate(all="ignore"):
                    y[k] /= S[k, k]
            out[C] = y
        A = self.A
        for s in reversed(plan.steps):
            value = x[s.r]
            if s.right.size:
                value = value - np.sum(A[s.r, s.right] * out[s.right], axis=0)
            out[s.c] = value / A[s.r, s.c]
        return out * self.col_scale


SPARSE_FROM = 64  # instants: from this many on, the planned elimination beats stacked LAPACK


def factor(plan: EliminationPlan | None, jac, row_scale, col_scale):
    """The better factorization of Φq (m, n, N) for the number of instants N."""
    if plan is not None and jac.shape[2] >= SPARSE_FROM:
        return SparseFactor(plan, jac, row_scale, col_scale)
    return DenseFactor(jac, row_scale, col_scale)
