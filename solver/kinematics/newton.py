"""Newton–Raphson on the position equations Φ(q, θ) = 0, and the linear solves after it.

Convergence is judged in scaled units (lengths divided by the model's length
scale L, angles in rad): an instant has converged when both the last Newton
step ‖Δq‖∞ and the residual ‖Φ‖∞ are below their tolerances.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .linalg import InstantFactor, factor

POSITION_TOLERANCE = 1e-10  # scaled step: 1e-11 m on a 0.1 m linkage, far below any workshop tolerance
RESIDUAL_TOLERANCE = 1e-10  # scaled ‖Φ‖: gaps in joints of the same size
GUIDE_TOLERANCE = 1e-6  # scaled, for continuation states that only guide later solves; quadratic
# convergence leaves them ~1e-12 off after the step that meets it, while saving the final check step
STEP_ITERATIONS = 8  # from a good predictor Newton converges in 2–4 steps; needing more means the step was too long
ASSEMBLY_ITERATIONS = 60  # from rough coordinates, damped steps may take many
ASSEMBLY_HALVINGS = 30  # backtracking halvings of one damped assembly step before giving up


@dataclass
class Solved:
    """Positions at N instants and what the derivative solves need.

    `q` (n, N) in m and rad; `converged` (N,) bool; `factor` is Φq factored at
    the last iterate (within the position tolerance of `q`); `iterations` the
    Newton steps taken.
    """

    q: np.ndarray
    converged: np.ndarray
    factor: object
    iterations: int


def newton(
    system, q: np.ndarray, drive: np.ndarray, plan=None, max_iterations: int = STEP_ITERATIONS,
    tolerance: float = POSITION_TOLERANCE,
) -> Solved:
    """Newton–Raphson at N instants at once from the guesses `q` (n, N).

    Every instant steps until all have converged or `max_iterations` is
    reached; an instant that has converged keeps taking (negligible) steps,
    which costs nothing extra in array operations.  `tolerance` applies to
    the scaled step and the scaled residual alike.
    """
    lean = system.lean_instant if q.shape[1] == 1 else None
    if lean is not None:
        return _newton_instant(system, lean, q, drive, max_iterations, tolerance)
    q = q.copy()
    converged = np.zeros(q.shape[1], dtype=bool)
    F = None
    residual_tolerance = max(tolerance, RESIDUAL_TOLERANCE)
    for iteration in range(1, max_iterations + 1):
        res, jac = system.residual_jacobian(q, drive)
        F = factor(plan, jac, system.row_scale, system.col_scale)
        if q.shape[1] > 1:  # the residual's size first: the solve takes −Φ in its place
            residual_size = system.scaled_residual(res)
            step = F.solve(np.negative(res, out=res), overwrite=True)
        else:
            step = F.solve(-res, overwrite=True)
        if q.shape[1] == 1:  # one instant (a march step): the same tests on plain numbers
            size = float(system.scaled_step(step)[0])  # NaN or inf unless every entry is finite
            done = size <= tolerance and float(system.scaled_residual(res)[0]) <= residual_tolerance
            converged = np.array([done])
            if math.isfinite(size):
                q += step
                if done or iteration == max_iterations:
                    system.advance_poses(step)
            if done:
                return Solved(q, converged, F, iteration)
            continue
        size = system.scaled_step(step)  # per instant: NaN or inf unless every entry of its step is finite
        with np.errstate(invalid="ignore"):
            converged = (size <= tolerance) & (residual_size <= residual_tolerance)
        finite = np.isfinite(size)
        if finite.all():
            q += step
            if iteration == max_iterations or converged.all():
                system.advance_poses(step)  # the derivatives are evaluated at q next
        else:  # singular instants: leave them where they are (they stay unconverged)
            q[:, finite] += step[:, finite]
        if converged.all():
            return Solved(q, converged, F, iteration)
    return Solved(q, converged, F, max_iterations)


def _newton_instant(system, lean, q: np.ndarray, drive: np.ndarray, max_iterations: int, tolerance: float) -> Solved:
    """`newton` at one instant q (n, 1) on the lean path (instant.py, linalg.InstantFactor): the same
    iterations, numbers and tests, on plain lists and a dense scaled Φq."""
    at = q[:, 0].tolist()
    values = drive[0, :, 0].tolist()
    rows, cols = lean.row_scale, lean.col_scale
    residual_tolerance = max(tolerance, RESIDUAL_TOLERANCE)
    done = False
    for iteration in range(1, max_iterations + 1):
        res, scaled = lean.residual_scaled_jacobian(at, values)
        F = InstantFactor(scaled, rows, cols)
        step = F.solve_list([-v for v in res])
        finite = all(map(math.isfinite, step))
        size = max([abs(v / c) for v, c in zip(step, cols)]) if finite else math.nan
        done = size <= tolerance and max([abs(v * r) for v, r in zip(res, rows)]) <= residual_tolerance
        if finite:
            at = [a + b for a, b in zip(at, step)]
        if done:
            break
    return Solved(np.array(at)[:, None], np.array([done]), F, iteration)


def _derivatives_instant(system, lean, solved: Solved, drive: np.ndarray, orders: int):
    """`derivatives` at one instant on the lean path: the same solves on plain lists."""
    F = solved.factor
    d = drive[:, :, 0].tolist()
    at = solved.q[:, 0].tolist()
    dq = F.solve_list([0.0] * lean.first_driver_row + d[1])
    ddq = F.solve_list(lean.gamma_list(at, dq, d[2]))
    out = [np.array(dq)[:, None], np.array(ddq)[:, None]]
    if orders == 3:
        out.append(np.array(F.solve_list(lean.eta_list(at, dq, ddq, d[3])))[:, None])
    return tuple(out)


def derivatives(system, solved: Solved, drive: np.ndarray, orders: int = 3):
    """q', q'', q''' (each (n, N), per rad^k of master angle) with the factored Φq; the first `orders` (2 or 3)."""
    F, q = solved.factor, solved.q
    lean = system.lean_instant if q.shape[1] == 1 else None
    if lean is not None and isinstance(F, InstantFactor):
        return _derivatives_instant(system, lean, solved, drive, orders)
    dq = F.solve(system.velocity_rhs(drive), overwrite=True)
    ddq = F.solve(system.gamma(q, dq, drive), overwrite=True)
    if orders == 2:
        return dq, ddq
    dddq = F.solve(system.eta(q, dq, ddq, drive, after_gamma=True), overwrite=True)
    return dq, ddq, dddq


def assemble(system, q: np.ndarray, theta: float):
    """Damped Gauss–Newton from rough coordinates `q` (n,) at master angle θ (rad).

    Works for any number of equations: the step is the least-squares,
    minimum-norm solution, so an under-driven model still assembles (at the
    configuration nearest the rough one).  Returns (q, converged).
    """
    drive = system.drive(np.array([theta]))
    q = q.astype(float).copy()

    def evaluate(at):
        r, j = system.residual_jacobian(at[:, None], drive)
        return r[:, 0], j.dense()[:, :, 0], float(system.scaled_residual(r)[0])

    res, jac, size = evaluate(q)
    for _ in range(ASSEMBLY_ITERATIONS):
        scaled = jac * system.row_scale[:, None] * system.col_scale[None, :]
        step = np.linalg.lstsq(scaled, -res * system.row_scale, rcond=None)[0] * system.col_scale
        small_step = float(system.scaled_step(step[:, None])[0]) <= POSITION_TOLERANCE
        if small_step and size <= RESIDUAL_TOLERANCE:
            return q + step, True
        scale = 1.0
        for _ in range(ASSEMBLY_HALVINGS):  # backtrack until the residual shrinks
            trial = q + scale * step
            trial_res, trial_jac, trial_size = evaluate(trial)
            if trial_size < size or trial_size <= RESIDUAL_TOLERANCE:
                break
            scale *= 0.5
        else:
            return q, False
        q, res, jac, size = trial, trial_res, trial_jac, trial_size
    return q, size <= RESIDUAL_TOLERANCE
