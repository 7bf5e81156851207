"""Sequential continuation along the master angle: one instant after another.

From a solved instant, the next is predicted by q + q'h + ½q''h² (h the step
in master angle) and corrected by Newton–Raphson, so the solution follows
the assembly branch it started on.  A step is accepted only if

1. Newton converged within STEP_ITERATIONS,
2. the scaled Φq is not near singular (condition ≤ DEAD_POINT_CONDITION),
3. det Φq kept its sign (a sign change means a singular configuration —
   a dead point where two branches meet — was passed), and
4. the step is consistent with one smooth branch: the Euler–Maclaurin
   identity q_b − q_a = h/2 (q'_a + q'_b) − h²/12 (q''_b − q''_a) + O(h⁵)
   holds to BRANCH_TOLERANCE of the step (a jump to another branch breaks
   it by a share of order one).

A rejected step is halved and retried; below MIN_STEP the march stops and
reports why, with the last solved instant: the dead point lies within a few
MIN_STEP of it.  A march may run forwards or backwards in master angle.

Where a driver's derivatives may jump (its motion's `breaks`, e.g. a
program's segment boundaries) no step straddles the jump, since the checks
above hold only on one smooth law: the march walks to JOIN_GAP before the
break (the left-hand side), then crosses to the break itself with one
Newton solve from there, checked for convergence, conditioning, det sign
and continuity of q, and walks on.  A step in which the linkage barely
moves (every driver at rest) is judged against STILL_STEP rather than its
own size, which would be rounding noise.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .linalg import DenseFactor
from .motion import ON_BREAK, breaks_between
from .newton import POSITION_TOLERANCE, STEP_ITERATIONS, derivatives, newton

COARSE_STEP = math.radians(45.0)  # longest continuation step (fewest Newton iterations per cycle in tests); shorter where checks ask
MIN_STEP = 1e-7  # rad of master angle: dead points are located to this
DEAD_POINT_CONDITION = 1e8  # 1-norm condition of scaled Φq: beyond it positions keep under half their digits
BRANCH_TOLERANCE = 1e-2  # on one branch the Euler–Maclaurin defect is O(h⁴) of the step; a jump makes it O(1)
LAST_STEP_STRETCH = 1.5  # a remainder up to this many steps is taken in one, so no sliver is left
NEAR_SINGULAR = 1e4  # condition beyond which a refused step is blamed on a dead point rather than a stray jump
GROWTH = 2.0  # after an accepted short step, the next may be this much longer (up to the longest step)
STILL_STEP = 1e-6  # scaled (share of the linkage size): the least step size a branch defect is measured against;
#                    Newton leaves ~1e-12 of noise in q at rest, a jump to another branch moves O(1)
JOIN_GAP = 1e-9  # rad before a break where its left-hand side is solved (programs put angles within
#                  1e-9° ≈ 1.7e-11 rad below a segment start onto it, so this is well clear)
JOIN_CONTINUITY = 1e-6  # scaled: largest change of q allowed across a break (q is continuous; the gap moves it ~1e-9)

LIMIT = "limit"  # Newton found no assembly: a limit position of the driven coordinate
SINGULAR = "singular"  # Φq near singular at an instant
CROSSED = "crossed"  # det Φq changed sign: a singular configuration between two instants
JUMP = "jump"  # the step left the branch
# Near a dead point several symptoms appear while the step shrinks (near a limit
# position the two branches close in, so a step may also land on the other one);
# the stop names the most telling: a singular or crossed Φq, then a limit, then a jump.
REASON_PRIORITY = (SINGULAR, CROSSED, LIMIT, JUMP)


@dataclass
class State:
    """One solved instant: master angle (rad), q, q', q'' (n,), sign of det Φq, condition (NaN: not worked out)."""

    theta: float
    q: np.ndarray
    dq: np.ndarray
    ddq: np.ndarray
    det_sign: float
    condition: float


@dataclass
class Stop:
    """Why and where a march stopped: the last solved `state` and the angle `failed` (rad) it could not reach."""

    reason: str
    state: State
    failed: float


def condition_at(system, q: np.ndarray) -> float:
    """1-norm condition number of scaled Φq at coordinates q (n,)."""
    jac = system.jacobian(q[:, None])
    return float(DenseFactor(jac, system.row_scale, system.col_scale).condition[0])


def solve_instant(system, theta: float, guess: np.ndarray, tolerance: float = POSITION_TOLERANCE) -> tuple[State | None, str]:
    """Newton from `guess` (n,) at θ; the state with q', q'' or (None, reason)."""
    drive = system.drive(np.array([theta]))
    solved = newton(system, guess[:, None], drive, None, STEP_ITERATIONS, tolerance)
    if not solved.converged[0]:
        return None, LIMIT
    F = solved.factor
    dq, ddq = derivatives(system, solved, drive, orders=2)
    state = State(theta, solved.q[:, 0], dq[:, 0], ddq[:, 0], float(F.det_sign[0]), float(F.condition[0]))
    if not state.condition <= DEAD_POINT_CONDITION:
        return state, SINGULAR
    return state, ""


def branch_defect(system, q_a, dq_a, ddq_a, q_b, dq_b, ddq_b, h):
    """Euler–Maclaurin defect of the steps a→b as a share of the step (scaled); arrays (n, N) or (n,)."""
    step, mean = q_b - q_a, dq_a + dq_b
    defect = step - 0.5 * h * mean + h * h / 12.0 * (ddq_b - ddq_a)
    scale = system.col_scale if q_a.ndim == 1 else system.col_scale[:, None]
    size = np.abs(step / scale).max(axis=0)
    size = size + np.abs(h * mean / scale).max(axis=0) * 0.5
    return np.abs(defect / scale).max(axis=0) / np.maximum(size, STILL_STEP)


def across_breaks(system, theta: np.ndarray) -> np.ndarray:
    """For each link theta[i] → theta[i+1] (increasing, rad): True where it spans a break or ends on
    one (within ON_BREAK: such an instant may read either side's law)."""
    out = np.zeros(max(theta.size - 1, 0), dtype=bool)
    if theta.size < 2:
        return out
    breaks = breaks_between(system.motions, float(theta[0]) - ON_BREAK, float(theta[-1]) + ON_BREAK)
    for b in breaks:
        first = int(np.searchsorted(theta, b - ON_BREAK, side="left"))  # instants first..last-1 are on b
        last = int(np.searchsorted(theta, b + ON_BREAK, side="right"))
        out[max(first - 1, 0) : min(last, out.size)] = True
    return out


def step(system, state: State, h: float, theta: float | None = None, tolerance: float = POSITION_TOLERANCE):
    """One predicted and corrected step of length h (rad); (state, "") or (None, reason)."""
    theta = state.theta + h if theta is None else theta
    guess = state.q + state.dq * h + 0.5 * state.ddq * h * h
    new, reason = solve_instant(system, theta, guess, tolerance)
    if reason:
        return None, reason
    if new.det_sign != state.det_sign:
        return None, CROSSED
    if branch_defect(system, state.q, state.dq, state.ddq, new.q, new.dq, new.ddq, h) > BRANCH_TOLERANCE:
        return None, JUMP
    return new, ""


def cross(system, state: State, theta: float, tolerance: float = POSITION_TOLERANCE):
    """The state on the far side of a break JOIN_GAP away: (state, "") or (None, reason).

    q is continuous across the break, so Newton starts from q itself; q', q''
    are those of the far side's law (they may jump, so no branch defect).
    """
    new, reason = solve_instant(system, theta, state.q, tolerance)
    if reason:
        return None, reason
    if new.det_sign != state.det_sign:
        return None, CROSSED
    if np.abs((new.q - state.q) / system.col_scale).max() > JOIN_CONTINUITY:
        return None, JUMP
    return new, ""


def _waypoints(theta: float, target: float, breaks: np.ndarray):
    """(angle, crossing) stops on the way from θ to a target: each break passed is reached on its near
    side and crossed to its far side (JOIN_GAP apart; the target itself when it lies on the break);
    the target last.  An angle within ON_BREAK of a break is on it, on the break's right-hand law."""
    out = []
    if target > theta:
        for b in breaks[(breaks - ON_BREAK > theta) & (breaks - ON_BREAK <= target)]:
            if b - JOIN_GAP > theta:
                out.append((b - JOIN_GAP, False))
            out.append((target if target <= b + ON_BREAK else b, True))
    elif target < theta:
        for b in breaks[(breaks - ON_BREAK > target) & (breaks - ON_BREAK <= theta)][::-1]:
            if theta > b + ON_BREAK:
                out.append((b, False))
            out.append((target if target >= b - JOIN_GAP else b - JOIN_GAP, True))
    if not out or out[-1][0] != target:
        out.append((target, False))
    return out


def march(
    system, start: State, targets, max_step: float = COARSE_STEP, record: bool = False,
    tolerance: float = POSITION_TOLERANCE,
):
    """States at each master angle of `targets`, and a `Stop` or None.

    `targets` run monotonically away from start.theta, forwards or
    backwards.  With `record`, every accepted step's state is returned, not
    only those at the targets (the continuation nodes of a cycle; both sides
    of every break passed are among them).  `tolerance` is the Newton
    tolerance of each step (newton.GUIDE_TOLERANCE for states that only
    guide later solves).
    """
    targets = [float(t) for t in targets]
    if not targets:
        return [], None
    ends = [start.theta, *targets]
    breaks = breaks_between(system.motions, min(ends) - JOIN_GAP, max(ends))
    state = start
    h = max_step
    out: list[State] = []
    for target in targets:
        for k, (angle, crossing) in enumerate(_waypoints(state.theta, target, breaks)):
            if k and record:
                out.append(state)  # the previous waypoint: a side of a break
            if crossing:
                new, reason = cross(system, state, angle, tolerance)
                if new is None:
                    return out, _stop(system, state, {reason}, angle)
                state = new
                continue
            state, stop, h = _walk(system, state, angle, h, max_step, tolerance, out if record else None)
            if stop is not None:
                return out, stop
        out.append(state)
    return out, None


def _walk(system, state: State, target: float, h: float, max_step: float, tolerance: float, record):
    """Steps from `state` to `target` (no break between): (state at target, None, next h) or
    (last state, Stop, h).  Appends the states strictly before the target to `record` (a list or None)."""
    direction = 1.0 if target >= state.theta else -1.0
    seen: set[str] = set()  # reasons met since the last accepted step
    while direction * (target - state.theta) > 0.0:
        remaining = direction * (target - state.theta)
        last = remaining <= LAST_STEP_STRETCH * h  # never leave a sliver of a step
        trial = remaining if last else h
        new, reason = step(system, state, direction * trial, target if last else None, tolerance)
        if new is None:
            seen.add(reason)
            h = trial / 2.0
            if h < MIN_STEP:
                return state, _stop(system, state, seen, state.theta + direction * trial), h
            continue
        seen.clear()
        state = new
        h = min(max_step, trial * GROWTH)
        if record is not None and direction * (target - state.theta) > 0.0:
            record.append(state)
    return state, None, h


def _stop(system, state: State, seen: set[str], failed: float) -> Stop:
    """The stop after `state`, named by the most telling of the reasons `seen`."""
    worst = next(r for r in REASON_PRIORITY if r in seen)
    if not state.condition >= 0.0:  # not yet known for a node solved in a batch
        state.condition = condition_at(system, state.q)
    if worst == JUMP and state.condition > NEAR_SINGULAR:
        worst = SINGULAR  # the branches meet here: a dead point, not a stray jump
    return Stop(worst, state, failed)
