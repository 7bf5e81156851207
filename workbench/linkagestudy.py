"""A linkage over one machine cycle: its outputs' peaks against their limits.

Values here are in the file's units (mm or deg, per s^k), master angles in
degrees.  The cycle is solved in one go (linkagesolve.py); the solver's
peak search never runs across a segment boundary of a driver's axis, and
the jumps at those boundaries are read from their two sides
(solver.kinematics.output_joins).  A velocity jump means infinite
acceleration and jerk, an acceleration jump infinite jerk, as for an axis.
A transmission angle turns back where the lines pass 90° or fall parallel:
its rate flips sign there, a velocity jump of its own.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from motionlaws import Limits
from motionlaws.peaks import LimitCheck, Peak
from motionlaws.peaksearch import TIE
from solver.kinematics import INSTANTS, SOLVED, TransmissionAngle, output_joins, refined_max

from .linkagefile import LinkageSpec
from .linkagesolve import FULL_TURN, LinkageSolution, solve_linkage

QUANTITIES = ("velocity", "acceleration", "jerk")
JUMP_SHARE = 1e-6  # a jump at a cut below this share of the output's largest |derivative| counts as none
RIGHT_ANGLE = 0.5 * math.pi
STILL = 1e-9  # per rad^k, in units of the linkage's size (lengths) or rad: a signal this small does not move


# --- outputs ---------------------------------------------------------------------------


@dataclass(frozen=True)
class OutputJump:
    """At a cut (master deg), the output's velocity and acceleration jump (right minus left, unit/s^k)."""

    at: float
    velocity_jump: float
    acceleration_jump: float


@dataclass(frozen=True)
class OutputStudy:
    """One output over the cycle in file units: extremes, peaks, limit checks, max speed, jumps."""

    name: str
    unit: str
    speed: float
    minimum: Peak
    maximum: Peak
    peaks: dict[str, Peak]
    checks: tuple[LimitCheck, ...]
    max_speed: float | None
    jumps: tuple[OutputJump, ...]
    folds: tuple[float, ...] = ()  # master deg where a transmission angle turns back at 90° or 0° (rate flips sign)

    @property
    def ok(self) -> bool:
        return all(c.ok for c in self.checks)


def _scale(unit: str) -> float:
    """File unit per SI unit: mm per m, deg per rad."""
    return 1e3 if unit == "mm" else 180.0 / math.pi


def _folds(curve, output) -> list[tuple[float, float, float]]:
    """(master deg, jump of μ' per rad, μ there in rad) where a transmission angle μ turns back.

    μ folds the angle ψ ∈ [0°, 180°] between the two lines at 90° and at 0°
    (lines parallel), so its rate flips sign there: a velocity jump of 2|ψ'|.
    A fold is a sign flip of μ' between samples with |μ'| on both sides too
    large for a smooth turn (where |μ'| ≤ |μ''|·h/2 on one side).
    """
    if not isinstance(output, TransmissionAngle) or curve.theta.size < 2:
        return []
    mu, d1, d2, t = curve.value, curve.d1, curve.d2, curve.theta
    h = np.diff(t)
    flip = np.sign(d1[:-1]) * np.sign(d1[1:]) < 0.0
    steep = np.minimum(np.abs(d1[:-1]), np.abs(d1[1:])) > h * np.maximum(np.abs(d2[:-1]), np.abs(d2[1:]))
    out = []
    for i in np.flatnonzero(flip & steep):
        corner = RIGHT_ANGLE if mu[i] > 0.5 * RIGHT_ANGLE else 0.0
        left, right = abs(mu[i] - corner), abs(mu[i + 1] - corner)
        share = left / (left + right) if left + right > 0.0 else 0.5
        out.append((math.degrees(t[i] + share * h[i]), abs(d1[i]) + abs(d1[i + 1]), corner))
    return out


def _angle(item) -> float:
    return item[1]


def _first_max(items):
    """The (value, at) with the largest value; the earliest given on ties (as motionlaws does)."""
    best = None
    for value, at in items:
        if best is None or value > best[0] + TIE * abs(best[0]):
            best = (value, at)
    return best


def _refined(view, output, signal: np.ndarray, order: int, sign: float, still: float) -> tuple[float, float]:
    """(max of sign·value (order 0) or of |derivative|, master deg): the solver's refined search
    (solver.kinematics.peaks.refined_max).  A signal that does not move (a point on a straight
    guide, a slider's angle) is taken as sampled: its "maxima" would be rounding noise."""
    y = sign * signal if order == 0 else np.abs(signal)
    spread = np.ptp(signal) if order == 0 else np.max(np.abs(signal))
    k = int(np.argmax(y))
    if spread <= still:
        return float(y[k]), math.degrees(view.theta[k]) % FULL_TURN
    value, at = refined_max(view, output, signal, order, sign)
    return value, math.degrees(at) % FULL_TURN


def _output_peaks(view, output, still_length: float):
    """(highest, lowest, {quantity: (peak, at)}) of an output over a view, SI, master deg."""
    curve = view.output(output)
    still = still_length if curve.unit == "m" else STILL
    high = _refined(view, output, curve.value, 0, 1.0, still)
    low = _refined(view, output, curve.value, 0, -1.0, still)
    peaks = {q: _refined(view, output, curve.derivative(k), k, 1.0, still * (2 * math.pi * view.speed / 60) ** k)
             for k, q in enumerate(QUANTITIES, start=1)}
    return high, low, peaks, curve


def study_output(solution: LinkageSolution, name: str, limits: Limits) -> OutputStudy:
    """Extremes, peaks (true maxima), jumps, limit checks and max speed of one output of a solved cycle."""
    output = solution.built.outputs[name]
    unit = solution.built.units[name]
    k_unit = _scale(unit)
    speed = solution.result.speed
    omega = 2.0 * math.pi * speed / 60.0
    still = STILL * solution.built.mechanism.length_scale()
    high, low, found, curve = _output_peaks(solution.result, output, still)
    highs, lows, peaks = [high], [low], {q: [found[q]] for q in QUANTITIES}
    largest = np.array([np.max(np.abs(d)) for d in (curve.d1, curve.d2, curve.d3)])  # per rad^k
    folds = _folds(curve, output)
    jumps = []
    for join in output_joins(solution.result, output):
        dv, da = join.jump[1], join.jump[2]
        dv = dv if abs(dv) > JUMP_SHARE * largest[0] else 0.0
        da = da if abs(da) > JUMP_SHARE * largest[1] else 0.0
        if dv or da:
            jumps.append(OutputJump(math.degrees(join.at) % FULL_TURN, dv * omega * k_unit, da * omega**2 * k_unit))
    for at, _, corner in folds:  # a fold is an extreme of μ, exactly 0° or 90°
        (highs if corner else lows).append((corner if corner else -0.0, at))
    if isinstance(output, TransmissionAngle):  # a parabola through a fold may overshoot it
        highs = [(min(v, RIGHT_ANGLE), at) for v, at in highs]
        lows = [(min(v, 0.0), at) for v, at in lows]
    high, low = _first_max(sorted(highs, key=_angle)), _first_max(sorted(lows, key=_angle))
    out = {q: Peak(v * k_unit, at) for q, (v, at) in ((q, _first_max(sorted(peaks[q], key=_angle))) for q in QUANTITIES)}
    velocity_jumps = [(abs(j.velocity_jump), j.at) for j in jumps if j.velocity_jump]
    velocity_jumps += [(d * omega * k_unit, at) for at, d, _ in folds]
    acceleration_jumps = [(abs(j.acceleration_jump), j.at) for j in jumps if j.acceleration_jump]
    if velocity_jumps:
        at = _first_max(velocity_jumps)[1]
        out["acceleration"] = out["jerk"] = Peak(None, at, True)
    elif acceleration_jumps:
        out["jerk"] = Peak(None, _first_max(acceleration_jumps)[1], True)
    checks, bounds = [], []
    for k, (q, limit) in enumerate(limits.items(), start=1):
        if limit is None:
            continue
        peak = out[q]
        checks.append(LimitCheck(q, float(limit), peak, math.inf if peak.infinite else peak.value / limit))
        if peak.infinite:
            bounds.append(0.0)
        elif peak.value > 0.0:
            bounds.append(speed * (limit / peak.value) ** (1.0 / k))
    return OutputStudy(name, unit, speed, Peak(-low[0] * k_unit, low[1]), Peak(high[0] * k_unit, high[1]), out,
                       tuple(checks), min(bounds) if bounds else None, tuple(jumps), tuple(at for at, _, _ in folds))


# --- the linkage ---------------------------------------------------------------------------


@dataclass(frozen=True)
class LinkageStudy:
    """A linkage analysed at the machine speed: how the solve went, and each output (when solved).

    `status` is the solver's (`solved`, `dead-point`, `not-assembled`,
    `not-driven`); `stop_at` the master angle (deg) where it stopped;
    `solution` holds the solved instants for drawing.
    """

    spec: LinkageSpec
    solution: LinkageSolution
    outputs: tuple[OutputStudy, ...]

    @property
    def status(self) -> str:
        return self.solution.result.status

    @property
    def message(self) -> str:
        return self.solution.result.message

    @property
    def stop_at(self) -> float | None:
        """Master deg where the solve stopped: the dead point, or where it was assembled; None when solved."""
        r = self.solution.result
        if r.status == SOLVED:
            return None
        if r.dead_point is not None:
            return math.degrees(r.dead_point.at) % FULL_TURN
        return 0.0  # not assembled where it is drawn

    @property
    def ok(self) -> bool:
        return self.status == SOLVED and all(o.ok for o in self.outputs)


def study_linkage(project, spec: LinkageSpec, instants: int = INSTANTS) -> LinkageStudy:
    """Solve the linkage over a cycle and study every output (none when it did not solve)."""
    solution = solve_linkage(project, spec, instants=instants)
    outputs = ()
    if solution.status == SOLVED:
        outputs = tuple(study_output(solution, o.name, o.limits) for o in spec.outputs)
    return LinkageStudy(spec, solution, outputs)


def output_table(project, spec: LinkageSpec, name: str, theta_deg: np.ndarray):
    """(solution, value, velocity, acceleration, jerk) of output `name` at master angles θ (deg), file units.

    The arrays are None when the cycle did not solve (see solution.result.message).
    """
    solution = solve_linkage(project, spec, theta=np.radians(theta_deg))
    if solution.status != SOLVED:
        return solution, None, None, None, None
    curve = solution.result.output(solution.built.outputs[name])
    k = _scale(solution.built.units[name])
    return solution, curve.value * k, curve.velocity * k, curve.acceleration * k, curve.jerk * k
