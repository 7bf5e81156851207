"""Solve a mechanism over a machine cycle: positions, velocities, accelerations, jerks.

The work is split so that Python loops only where the mathematics is
sequential (DESIGN §4):

1. Assemble at the first instant from the rough coordinates and check the
   degrees of freedom (dof.py).
2. March along the master angle with predictor and Newton (march.py),
   taking steps up to COARSE_STEP long, shorter where the branch checks ask
   for it.  This is the sequential part; it follows the branch the designer
   drew and stops at dead points.
3. Fill the gaps between the marched states with nodes at most
   NODE_SPACING apart, all solved at once from the quintic Hermite
   interpolation of the marched states (hermite.py) and checked like march
   steps; a gap whose new nodes fail a check is marched instead.
4. Interpolate these nodes to every requested instant and run Newton on all
   of them at once with the batched factorization (linalg.py); from nodes
   this close the guess is already within the tolerance, so one iteration
   usually does.  The velocities, accelerations and jerks are then three
   batched solves with the same factors.
5. Check every instant as the march checks its steps (convergence,
   conditioning, det sign, branch consistency between neighbours) and
   re-march, instant by instant, any stretch that fails; a failure there is
   a dead point like any other.

Where a driver's derivatives may jump (its motion's breaks: a program's
segment boundaries) the march lands on both sides of the jump (march.py),
so both are nodes, and no branch check links two instants across it.
"""

from __future__ import annotations

import math
import threading
from collections import OrderedDict
from dataclasses import dataclass, replace

import numpy as np

from .dof import analyse_dof, describe_motion
from .hermite import interpolate
from .linalg import DenseFactor
from .march import (
    BRANCH_TOLERANCE,
    COARSE_STEP,
    DEAD_POINT_CONDITION,
    State,
    Stop,
    across_breaks,
    branch_defect,
    march,
    solve_instant,
)
from .newton import GUIDE_TOLERANCE, assemble, derivatives, newton
from .result import DEAD_POINT, NOT_ASSEMBLED, NOT_DRIVEN, SOLVED, CycleResult, DeadPoint
from .system import System

INSTANTS = 3600  # default instants per cycle: 0.1° of master angle
NODE_SPACING = math.radians(2.0)  # from nodes this close the quintic Hermite guess is within ~1e-12 of the link lengths
SCREEN_CONDITION = DEAD_POINT_CONDITION * 1e-3  # pivot estimate above this sends an instant to the exact check
STARTS_KEPT = 32  # assemblies remembered (a re-solve after an edit that keeps geometry and start values reuses its own)

# Assembling from the rough coordinates, the mobility check and the first solved
# state depend only on the compiled structure, the rough coordinates, the master
# angle of the drawing and the drivers' values there; keyed by exactly those.
_starts: OrderedDict = OrderedDict()
_starts_lock = threading.Lock()


@dataclass
class Nodes:
    """Solved instants as arrays: master angles `theta` (K,) rad, and q, q', q'' each (n, K)."""

    theta: np.ndarray
    q: np.ndarray
    dq: np.ndarray
    ddq: np.ndarray

    @classmethod
    def of(cls, states: list[State]) -> "Nodes":
        return cls(
            np.array([s.theta for s in states]),
            np.array([s.q for s in states]).T,
            np.array([s.dq for s in states]).T,
            np.array([s.ddq for s in states]).T,
        )


def solve_cycle(mechanism, speed: float, instants: int = INSTANTS, theta=None, drawn_at: float = 0.0) -> CycleResult:
    """Solve `mechanism` at `instants` equally spaced master angles over one cycle (or at `theta`, rad, increasing).

    `speed` is the machine speed in cycles/min; it only scales the time
    derivatives the result reports.  The bodies' rough coordinates show the
    linkage at master angle `drawn_at` (rad): it is assembled there and
    followed to the first instant.
    """
    system = System(mechanism)
    if theta is None:
        theta = 2.0 * math.pi * np.arange(instants) / instants
    theta = np.asarray(theta, dtype=float)
    if theta.ndim != 1 or theta.size == 0 or np.any(np.diff(theta) <= 0.0) or not np.all(np.isfinite(theta)):
        raise ValueError("theta must be a non-empty, strictly increasing array of finite master angles (rad)")
    try:
        return CycleSolver(system).solve(theta, float(speed), float(drawn_at))
    finally:
        system.release_workspace()  # the result keeps the System; its scratch memory serves the next solve


class CycleSolver:
    """Runs the four stages of the module docstring for one compiled `System`."""

    def __init__(self, system: System):
        self.system = system

    def _result(self, status, message, theta, arrays, speed, requested, dof, dead=None) -> CycleResult:
        n = self.system.n
        empty = np.empty((0, n))
        q, dq, ddq, dddq = (a.T.copy() for a in arrays) if arrays is not None else (empty,) * 4
        return CycleResult(
            status, message, theta, q, dq, ddq, dddq, tuple(self.system.coordinate_names()),
            speed, requested, dof, dead, self.system,
        )

    def _begin(self, drawn_at: float):
        """Assembled q (n,), whether it assembled, the DOF report, and the first state and its stop reason
        (None, "" unless driven and assembled) — remembered by everything they depend on."""
        system = self.system
        guess = system.initial_guess()
        key = (system.structure_key, guess.tobytes(), drawn_at, system.drive(np.array([drawn_at])).tobytes())
        with _starts_lock:
            known = _starts.get(key)
            if known is not None:
                _starts.move_to_end(key)
        if known is None:
            q0, assembled = assemble(system, guess, drawn_at)
            dof = analyse_dof(system, q0)
            start, reason = solve_instant(system, drawn_at, q0) if dof.driven and assembled else (None, "")
            known = (q0, assembled, dof, start, reason)
            with _starts_lock:
                _starts[key] = known
                while len(_starts) > STARTS_KEPT:
                    _starts.popitem(last=False)
        q0, assembled, dof, start, reason = known
        if start is not None:  # a fresh state for this solve
            start = replace(start, q=start.q.copy(), dq=start.dq.copy(), ddq=start.ddq.copy())
        return q0.copy(), assembled, dof, start, reason

    def solve(self, theta: np.ndarray, speed: float, drawn_at: float = 0.0) -> CycleResult:
        system = self.system
        requested = theta.size
        q0, assembled, dof, start, reason = self._begin(drawn_at)
        if not dof.driven:
            return self._result(NOT_DRIVEN, dof.message, theta[:0], None, speed, requested, dof)
        if not assembled:
            message = (
                f"the linkage cannot be assembled at master {math.degrees(drawn_at):.4f}° near the rough"
                " coordinates: check dimensions, points and the drivers' start values"
            )
            return self._result(NOT_ASSEMBLED, message, theta[:0], None, speed, requested, dof)
        if reason:
            dead = self._dead_point(Stop(reason, start, drawn_at))
            return self._result(DEAD_POINT, dead.message, theta[:0], None, speed, requested, dof, dead)
        if theta[0] != drawn_at:  # follow the drawn branch to the first instant
            lead, stop = march(system, start, [float(theta[0])])
            if stop is not None:
                dead = self._dead_point(stop)
                return self._result(DEAD_POINT, dead.message, theta[:0], None, speed, requested, dof, dead)
            start = lead[-1]

        nodes, stop = march(system, start, [float(theta[-1])], COARSE_STEP, record=True, tolerance=GUIDE_TOLERANCE)
        nodes = [start] + [s for s in nodes if s.theta > start.theta]
        if stop is not None:
            nodes.append(stop.state) if stop.state.theta > nodes[-1].theta else None
        nodes, stop_dense = self._densify(nodes, start)
        if stop_dense is not None:
            stop = stop_dense
        end = nodes.theta[-1]
        count = int(np.searchsorted(theta, end, side="right"))
        fine = theta[:count]
        arrays, stop2 = self._fine(fine, nodes, start)
        if stop2 is not None:
            stop = stop2
            count = arrays[0].shape[1]
        if stop is None:
            return self._result(SOLVED, "solved", theta, arrays, speed, requested, dof)
        dead = self._dead_point(stop)
        return self._result(DEAD_POINT, dead.message, theta[:count], arrays, speed, requested, dof, dead)

    # -- stage 3 -------------------------------------------------------------------
    def _densify(self, nodes: list[State], start: State):
        """Fill the gaps between marched states with nodes at most NODE_SPACING apart, and solve
        all of them (the marched ones again, to full tolerance) at once; (`Nodes`, stop or None)."""
        system = self.system
        coarse = Nodes.of(nodes)
        if len(nodes) == 1:
            return coarse, None
        theta = coarse.theta
        parts = np.maximum(1, np.ceil(np.diff(theta) / NODE_SPACING - 1e-9).astype(int))
        offset = np.concatenate([np.arange(p) / p for p in parts] + [np.zeros(1)])
        gap = np.append(np.repeat(np.arange(len(nodes) - 1), parts), len(nodes) - 1)
        upper = np.append(theta[1:], theta[-1])
        points = theta[gap] + offset * (upper[gap] - theta[gap])
        drive = system.drive(points)
        guess = interpolate(theta, coarse.q, coarse.dq, coarse.ddq, points)
        solved = newton(system, guess, drive, system.elimination_plan())
        dq, ddq = derivatives(system, solved, drive, orders=2)
        F = solved.factor
        ok = solved.converged & (F.det_sign == start.det_sign) & (F.condition <= SCREEN_CONDITION)
        link_ok = branch_defect(
            system, solved.q[:, :-1], dq[:, :-1], ddq[:, :-1], solved.q[:, 1:], dq[:, 1:], ddq[:, 1:], np.diff(points)
        ) <= BRANCH_TOLERANCE
        link_ok |= across_breaks(system, points)  # the march crossed these (both sides are nodes)
        # a point is good when it passes and so do the links on both sides; a gap when all its points are
        good = ok.copy()
        good[:-1] &= link_ok
        good[1:] &= link_ok
        good_gap = np.ones(len(nodes) - 1, dtype=bool)
        np.logical_and.at(good_gap, gap[:-1], good[:-1] & good[1:])
        if good_gap.all():
            return Nodes(points, solved.q, dq, ddq), None
        fresh = self._states(points, solved.q, dq, ddq, start)
        first = np.searchsorted(gap, np.arange(len(nodes)))  # index in `points` of each marched node
        out: list[State] = []
        for k in range(len(nodes) - 1):
            if good_gap[k]:
                out.extend(fresh[first[k] : first[k + 1]])
                continue
            begin = fresh[first[k]] if good[first[k]] else self._resolved(nodes[k])
            out.append(begin)
            step = (theta[k + 1] - theta[k]) / parts[k]
            marched, stop = march(system, begin, [float(theta[k + 1])], step, record=True)
            if stop is not None:
                out.extend(marched)
                if stop.state.theta > out[-1].theta:
                    out.append(stop.state)
                return Nodes.of(out), stop
            out.extend(marched[:-1])  # its last state is node k + 1, taken from the batch or marched next
        out.append(fresh[-1] if good[-1] else self._resolved(nodes[-1]))
        return Nodes.of(out), None

    def _resolved(self, node: State) -> State:
        """A marched node solved again to full tolerance (it was solved to the guide tolerance)."""
        state, _ = solve_instant(self.system, node.theta, node.q)
        return state if state is not None else node

    @staticmethod
    def _states(theta, q, dq, ddq, start) -> list[State]:
        return [State(float(t), q[:, i], dq[:, i], ddq[:, i], start.det_sign, math.nan) for i, t in enumerate(theta)]

    # -- stage 4 and 5 -------------------------------------------------------------
    def _fine(self, fine: np.ndarray, nodes: Nodes, start: State):
        system = self.system
        if nodes.theta.size == 1:
            guess = np.repeat(nodes.q, fine.size, axis=1)
        else:
            guess = interpolate(nodes.theta, nodes.q, nodes.dq, nodes.ddq, fine)
        drive = system.drive(fine)
        solved = newton(system, guess, drive, system.elimination_plan())
        dq, ddq, dddq = derivatives(system, solved, drive)
        q = solved.q
        bad = self._bad(fine, q, dq, ddq, solved, start.det_sign)
        stop = None
        while bad.size:
            i = int(bad[0])
            q, dq, ddq, dddq, stop, fixed_to = self._repair(fine, q, dq, ddq, dddq, i, start)
            if stop is not None:
                break
            later = self._bad(fine, q, dq, ddq, None, start.det_sign)
            bad = later[later > fixed_to]
        return (q, dq, ddq, dddq), stop

    def _bad(self, fine, q, dq, ddq, solved, det_sign) -> np.ndarray:
        """Indices of instants that fail a check, in order."""
        system = self.system
        bad = np.zeros(fine.size, dtype=bool)
        if solved is not None:
            F = solved.factor
            bad |= ~solved.converged
            bad |= F.det_sign != det_sign
            screen = np.flatnonzero(F.condition > SCREEN_CONDITION)
            if screen.size:
                jac = system.jacobian(q[:, screen])
                exact = DenseFactor(jac, system.row_scale, system.col_scale).condition
                bad[screen[exact > DEAD_POINT_CONDITION]] = True
        if fine.size > 1:
            h = np.diff(fine)
            defect = branch_defect(system, q[:, :-1], dq[:, :-1], ddq[:, :-1], q[:, 1:], dq[:, 1:], ddq[:, 1:], h)
            bad[1:] |= ~(defect <= BRANCH_TOLERANCE) & ~across_breaks(system, fine)
        return np.flatnonzero(bad)

    def _repair(self, fine, q, dq, ddq, dddq, i, start):
        """Re-march instants i.. one by one from instant i − 1 until the checks pass again."""
        system = self.system
        if i == 0:
            state = start
            i = 1
            if fine.size == 1:
                return q, dq, ddq, dddq, None, 0
        else:
            state = self._state(fine, q, dq, ddq, i - 1)
        # march instant by instant over about one node spacing, then hand back to the checks
        span = max(1, int(round(NODE_SPACING / max(fine[1] - fine[0], 1e-12)))) if fine.size > 1 else 1
        last = min(fine.size, i + span)
        states, stop = march(system, state, list(fine[i:last]), max_step=NODE_SPACING)
        good = i + len(states)
        for k, s in enumerate(states):
            q[:, i + k], dq[:, i + k], ddq[:, i + k] = s.q, s.dq, s.ddq
        if states:
            idx = np.arange(i, good)
            drive = system.drive(fine[idx])
            F = DenseFactor(system.jacobian(q[:, idx]), system.row_scale, system.col_scale)
            dddq[:, idx] = F.solve(system.eta(q[:, idx], dq[:, idx], ddq[:, idx], drive))
        if stop is not None:
            return q[:, :good], dq[:, :good], ddq[:, :good], dddq[:, :good], stop, good - 1
        return q, dq, ddq, dddq, None, good - 1

    def _state(self, fine, q, dq, ddq, k) -> State:
        system = self.system
        jac = system.jacobian(q[:, k : k + 1])
        F = DenseFactor(jac, system.row_scale, system.col_scale)
        return State(float(fine[k]), q[:, k].copy(), dq[:, k].copy(), ddq[:, k].copy(), float(F.det_sign[0]), float(F.condition[0]))

    def _dead_point(self, stop: Stop) -> DeadPoint:
        """Describe the singular motion at the last solved state of a stop."""
        system = self.system
        q = stop.state.q
        jac = system.scaled_jacobian(system.jacobian(q[:, None]))[:, :, 0]
        _, _, Vt = np.linalg.svd(jac)
        motion = describe_motion(system, q, Vt[-1] * system.col_scale)
        return DeadPoint(stop.reason, float(stop.state.theta), float(stop.failed), motion.joints, motion.bodies, float(stop.state.condition))


def mobility(mechanism, theta: float = 0.0):
    """Assemble `mechanism` at master angle θ (rad) and report its degrees of freedom.

    Returns (DofReport, q) with q (n,) the assembled coordinates, or None in
    place of q when no configuration near the rough one satisfies the
    constraints.  Cheap enough to call on every edit.
    """
    system = System(mechanism)
    q, assembled = assemble(system, system.initial_guess(), float(theta))
    return analyse_dof(system, q), (q if assembled else None)
