"""Φ, Φq, γ and η at one instant, on plain numbers: the lean path of a march step.

A march step solves one instant at a time, and numpy costs about a
microsecond per call however small its arrays, so evaluating the kinds on
(k, 1) arrays is mostly call overhead.  A kind's formulas are plain
arithmetic on its poses and numbers (base.py), so they run just as well on
Python floats, one instance at a time: `InstantKinds` does that and gathers
the rows and the varying Φq entries into lists; numpy sees one scaled dense
(n, n) matrix, laid out for LAPACK.  Python floats are IEEE doubles like
numpy's and every formula runs in the same order, so the numbers are those
of the batched path.

`InstantKinds.of(system)` checks, when a mechanism is compiled, that every
active kind gives plain numbers here and the batched path's values (at a
random configuration); a kind that does not (it calls numpy on its
arguments, say) leaves its mechanism on the batched path.
"""

from __future__ import annotations

import math

import numpy as np

CHECK_SEED = 11  # fixed random configuration for the check, so a mechanism always gets the same verdict
CHECK_TOLERANCE = 1e-12  # relative to each row's size: agreement expected to round-off (in practice exact)


class FloatPose:
    """`frames.Pose` of one body at one instant, in floats; `rotate` as Pose's, without remembering."""

    __slots__ = ("x", "y", "phi", "c", "s")

    def __init__(self, x, y, phi, c, s):
        self.x, self.y, self.phi, self.c, self.s = x, y, phi, c, s

    def rotate(self, local):
        lx, ly = local
        c, s = self.c, self.s
        return (c * lx - s * ly, s * lx + c * ly)


class FloatRates:
    """`frames.Rates` of one body at one instant, in floats."""

    __slots__ = ("x", "y", "phi")

    def __init__(self, x, y, phi):
        self.x, self.y, self.phi = x, y, phi


GROUND = FloatPose(0.0, 0.0, 0.0, 1.0, 0.0)  # at rest at the origin (never changed)
GROUND_RATES = FloatRates(0.0, 0.0, 0.0)


class InstantKinds:
    """The active kinds of a compiled square System, instance by instance, on floats (read-only, shared).

    Rows and columns are those of the System; lists of m or n floats in
    and out, the Jacobian scaled (rows by `row_scale`, columns by
    `col_scale`, as System.scaled_jacobian) in a Fortran-ordered array.
    """

    def __init__(self, system):
        self.B, self.m, self.n = system.B, system.m, system.n
        n = self.n
        row_scale, col_scale = system.row_scale.tolist(), system.col_scale.tolist()
        items, res_rows, var_flat, var_scale = [], [], [], []
        for g in system._active:
            for i in range(g.rows.shape[1]):
                par = {key: tuple(float(v) for v in value[:, i, 0]) for key, value in g.par.items()}
                slots = tuple(int(s) for s in g.slots[:, i])
                picks = []
                for r, c in g.variable:
                    row, col = int(g.rows[r][i]), int(g.cols[c][i])
                    if col < n:  # partials w.r.t. the ground are dropped
                        picks.append((r, c))
                        var_flat.append(col * n + row)  # Fortran order
                        var_scale.append((row_scale[row], col_scale[col]))
                items.append((g.kind, par, slots, tuple(picks)))
                res_rows.extend(int(g.rows[r][i]) for r in range(g.rows.shape[0]))
        self.items = items
        self.row_scale, self.col_scale = row_scale, col_scale
        self.res_rows = res_rows
        self.var_flat = var_flat
        self.var_scale = var_scale
        scaled = system._template[:, :n] * system.row_scale[:, None] * system.col_scale[None, :]
        self.scaled_template = scaled.T.ravel().tolist()  # constant entries, scaled as the batched path does
        self.first_driver_row = system.first_driver_row
        # affine rows (drivers of angles, say): Φ = offset + Σ coef·q, γ and η constants
        self.affine = []
        if system._affine_rows is not None:
            for k, row in enumerate(system._affine_rows.tolist()):
                terms = [(c, v) for c, v in enumerate(system._affine_matrix[k].tolist()) if v != 0.0]
                self.affine.append((row, terms, float(system._affine_offset[k, 0]),
                                    float(system._affine_gamma[k, 0]), float(system._affine_eta[k, 0])))

    @classmethod
    def of(cls, system) -> "InstantKinds | None":
        """The lean evaluator of a just-compiled `system`, or None where the batched path must serve."""
        if system.m != system.n or not system.n:
            return None
        try:
            lean = cls(system)
            if lean._agrees(system):
                return lean
        except Exception:  # a kind that needs arrays: it keeps the batched path
            pass
        return None

    # -- evaluation on lists -------------------------------------------------
    def poses(self, q: list) -> list:
        """A FloatPose per moving body from q (x, y, φ per body), then the ground's."""
        out = []
        for b in range(0, 3 * self.B, 3):
            phi = q[b + 2]
            out.append(FloatPose(q[b], q[b + 1], phi, math.cos(phi), math.sin(phi)))
        out.append(GROUND)
        return out

    def rates(self, dq: list) -> list:
        """FloatRates per moving body from a derivative of q, then the ground's (zero)."""
        out = [FloatRates(dq[b], dq[b + 1], dq[b + 2]) for b in range(0, 3 * self.B, 3)]
        out.append(GROUND_RATES)
        return out

    def residual_scaled_jacobian(self, q: list, d: list):
        """Φ (list of m) and scaled Φq (n, n), Fortran-ordered, at q (list of n) with drivers' values d (list)."""
        poses = self.poses(q)
        rows, entries = [], []
        for kind, par, slots, picks in self.items:
            residual, partials = kind.residual_jacobian(par, *[poses[s] for s in slots])
            rows += residual
            entries += [partials[r][c] for r, c in picks]
        res = [0.0] * self.m
        for r, v in zip(self.res_rows, rows):
            res[r] = v
        for row, terms, offset, _, _ in self.affine:
            total = 0.0
            for c, coef in terms:
                total += coef * q[c]
            res[row] = total + offset
        first = self.first_driver_row
        for k, v in enumerate(d):
            res[first + k] -= v
        flat = self.scaled_template.copy()
        for at, (rs, cs), v in zip(self.var_flat, self.var_scale, entries):
            flat[at] = v * rs * cs
        n = self.n
        return res, np.array(flat).reshape(n, n).T

    def gamma_list(self, q: list, dq: list, d2: list) -> list:
        """γ (list of m) at q, q' (lists of n) with the drivers' d'' (list)."""
        poses, rates = self.poses(q), self.rates(dq)
        rows = []
        for kind, par, slots, _ in self.items:
            rows += kind.gamma(par, [poses[s] for s in slots], [rates[s] for s in slots])
        return self._rows(rows, 3, d2)

    def eta_list(self, q: list, dq: list, ddq: list, d3: list) -> list:
        """η (list of m) at q, q', q'' (lists of n) with the drivers' d''' (list)."""
        poses, rates, accels = self.poses(q), self.rates(dq), self.rates(ddq)
        rows = []
        for kind, par, slots, _ in self.items:
            rows += kind.eta(par, [poses[s] for s in slots], [rates[s] for s in slots], [accels[s] for s in slots])
        return self._rows(rows, 4, d3)

    def _rows(self, rows: list, affine_field: int, driven: list) -> list:
        out = [0.0] * self.m
        for r, v in zip(self.res_rows, rows):
            out[r] = v
        for entry in self.affine:
            out[entry[0]] = entry[affine_field]
        first = self.first_driver_row
        for k, v in enumerate(driven):
            out[first + k] += v
        return out

    # -- the same on arrays (n, 1), for System.gamma and System.eta ----------
    def gamma(self, q: np.ndarray, dq: np.ndarray, drive: np.ndarray) -> np.ndarray:
        """γ (m, 1) at q, q' (n, 1)."""
        out = self.gamma_list(q[:, 0].tolist(), dq[:, 0].tolist(), drive[2, :, 0].tolist())
        return np.array(out)[:, None]

    def eta(self, q: np.ndarray, dq: np.ndarray, ddq: np.ndarray, drive: np.ndarray) -> np.ndarray:
        """η (m, 1) at q, q', q'' (n, 1)."""
        out = self.eta_list(q[:, 0].tolist(), dq[:, 0].tolist(), ddq[:, 0].tolist(), drive[3, :, 0].tolist())
        return np.array(out)[:, None]

    # -- the check when compiling --------------------------------------------
    def _agrees(self, system) -> bool:
        """Every active kind gives plain numbers here and the batched path's values at a random configuration."""
        rng = np.random.default_rng(CHECK_SEED)
        q = np.empty((self.n, 1))
        q[0::3, 0] = rng.uniform(-1.0, 1.0, self.B) * system.length
        q[1::3, 0] = rng.uniform(-1.0, 1.0, self.B) * system.length
        q[2::3, 0] = rng.uniform(-np.pi, np.pi, self.B)
        dq, ddq = rng.uniform(-1.0, 1.0, (2, self.n, 1)) * system.col_scale[:, None]
        drive = rng.uniform(-1.0, 1.0, (4, self.m - self.first_driver_row, 1))
        if not self._plain_numbers(q[:, 0].tolist(), dq[:, 0].tolist(), ddq[:, 0].tolist()):
            return False
        res, scaled = self.residual_scaled_jacobian(q[:, 0].tolist(), drive[0, :, 0].tolist())
        ref_res, ref_jac = system.residual_jacobian(q, drive)
        pairs = [
            (np.array(res)[:, None], ref_res),
            (scaled, system.scaled_jacobian(ref_jac.dense())[:, :, 0]),
            (self.gamma(q, dq, drive), system.gamma(q, dq, drive, batched=True)),
            (self.eta(q, dq, ddq, drive), system.eta(q, dq, ddq, drive, batched=True)),
        ]
        for lean, batched in pairs:
            scale = np.maximum(np.abs(batched).max(axis=1, keepdims=True), 1.0)
            if lean.shape != batched.shape or not np.all(np.abs(lean - batched) <= CHECK_TOLERANCE * scale):
                return False
        return True

    def _plain_numbers(self, q: list, dq: list, ddq: list) -> bool:
        poses, rates, accels = self.poses(q), self.rates(dq), self.rates(ddq)
        for kind, par, slots, _ in self.items:
            ps, rs, acs = [poses[s] for s in slots], [rates[s] for s in slots], [accels[s] for s in slots]
            residual, partials = kind.residual_jacobian(par, *ps)
            values = list(residual) + list(kind.gamma(par, ps, rs)) + list(kind.eta(par, ps, rs, acs))
            values += [v for row in partials for v in row]
            if not all(type(v) in (float, int) for v in values):
                return False
        return True
