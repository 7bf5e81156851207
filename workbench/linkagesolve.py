"""Solving a linkage over one machine cycle, in stretches.

The cycle is solved in stretches: it is cut at every segment
boundary of every axis a driver follows, and each stretch is solved on its
own, starting from where the previous one ended (so the linkage stays on the
branch it was drawn on).  Within a stretch every driver follows one smooth
law, which the solver needs:

* its branch check compares each step with the step's size, so a linkage at
  rest (every driver in a dwell) would be judged on rounding noise — a
  stretch at rest is solved once, at its start, and held;
* a velocity jump between segments would read as a jump to another branch;
* peaks are refined by a parabola through dense samples, which overshoots
  where a derivative jumps — within a stretch none does, and each stretch's
  ends are sampled exactly (its last instant END_GAP before the cut), which
  also gives the size of every jump at a cut.

A linkage driven only at steady speed has no cuts and is solved in one go.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.kinematics import INSTANTS, SOLVED, CycleResult, solve_cycle

from .linkagefile import LinkageSpec
from .linkagemodel import BuiltLinkage, build_linkage

FULL_TURN = 360.0  # master degrees per cycle
END_GAP = 1e-9  # rad before a cut where a stretch's last instant is solved: its left-hand values
NEAR_START = 1e-4  # rad: an instant this close after a stretch's start is assembled there directly (a march
#                    step this short from rest would move the linkage less than rounding noise)
CUT_MERGE = 1e-9  # deg: segment boundaries of different axes this close are one cut
MIN_STRETCH_INSTANTS = 16  # fewest instants a stretch is analysed on (the peak search needs neighbours)


@dataclass(frozen=True)
class Stretch:
    """A stretch of master angle (deg) in which every driver follows one segment; `rest`: every one dwells."""

    start: float
    end: float
    rest: bool


def stretches(project, spec: LinkageSpec) -> tuple[Stretch, ...]:
    """The cycle cut at every segment boundary of the axes the drivers follow; () if they follow none."""
    programs = [project.programs[d.axis] for d in spec.drivers if d.axis is not None]
    if not programs:
        return ()
    cuts: list[float] = []
    for theta0 in sorted(s.theta0 for p in programs for s in p.shapes):
        if not cuts or theta0 - cuts[-1] > CUT_MERGE:
            cuts.append(theta0)
    steady = any(d.turns is not None for d in spec.drivers)
    out = []
    for a, b in zip(cuts, cuts[1:] + [FULL_TURN]):
        middle = 0.5 * (a + b)
        rest = not steady and all(_law_at(p, middle) == "dwell" for p in programs)
        out.append(Stretch(a, b, rest))
    return tuple(out)


def _law_at(program, theta_deg: float) -> str:
    k = int(np.searchsorted(program.bounds, theta_deg, side="right")) - 1
    return program.shapes[min(max(k, 0), len(program.shapes) - 1)].law_id


# --- solving ----------------------------------------------------------------------------


@dataclass
class Piece:
    """One stretch as solved: its own result (a single instant when at rest) and its grid's extras."""

    stretch: Stretch
    result: CycleResult
    keep: np.ndarray  # which of result's instants were asked for (False: a stretch end added to follow on)


@dataclass
class LinkageSolution:
    """The cycle solved at the instants asked for: `result` (a solver `CycleResult`; draw with
    `result.point(body, point)`, m) and, when cut into stretches, each stretch's `pieces`."""

    built: BuiltLinkage
    result: CycleResult
    pieces: list[Piece]

    @property
    def status(self) -> str:
        return self.result.status


def _end_state(result: CycleResult, bodies) -> dict:
    """Body coordinates (m, m, rad) at a result's last instant, as guesses for the next stretch."""
    q = result.q[-1]
    return {b: tuple(q[3 * k : 3 * k + 3]) for k, b in enumerate(bodies)}


def _grid(stretch: Stretch, theta: np.ndarray | None, instants: int) -> tuple[np.ndarray, np.ndarray]:
    """(grid, keep) for a stretch: equally spaced from its start to END_GAP before its end when
    analysing (theta None), else the asked instants inside it plus that end instant."""
    a, b = math.radians(stretch.start), math.radians(stretch.end)
    if theta is None:
        count = max(MIN_STRETCH_INSTANTS, int(math.ceil(instants * (stretch.end - stretch.start) / FULL_TURN)) + 1)
        grid = np.linspace(a, b - END_GAP, count)
        return grid, np.ones(count, dtype=bool)
    inside = theta[(theta >= a) & (theta < b)]
    if inside.size and b - inside[-1] < NEAR_START:
        return inside, np.ones(inside.size, dtype=bool)
    return np.append(inside, b - END_GAP), np.append(np.ones(inside.size, dtype=bool), False)


def solve_linkage(project, spec: LinkageSpec, theta=None, instants: int = INSTANTS) -> LinkageSolution:
    """Solve one cycle at master angles `theta` (rad, increasing, in [0, 2π); others are not solved)
    or, for analysis, on about `instants` per cycle with every stretch's ends included.

    Raises `LinkageFault` (linkagemodel) when the linkage cannot be built.
    """
    built = build_linkage(project, spec)
    speed = project.speed
    cut = stretches(project, spec)
    if not cut:
        grid = None if theta is None else np.asarray(theta, dtype=float)
        result = solve_cycle(built.mechanism, speed, instants=instants, theta=grid)
        return LinkageSolution(built, result, [])
    theta = None if theta is None else np.asarray(theta, dtype=float)
    bodies = [b.name for b in spec.bodies]
    pieces: list[Piece] = []
    guesses = None  # the first stretch starts from the file's rough placement, drawn at master 0
    for stretch in cut:
        mechanism = build_linkage(project, spec, guesses).mechanism
        a = math.radians(stretch.start)
        grid, keep = _grid(stretch, theta, instants)
        if stretch.rest:
            result = solve_cycle(mechanism, speed, theta=np.array([a]), drawn_at=a)
        else:
            drawn = grid[0] if grid[0] - a < NEAR_START else a
            result = solve_cycle(mechanism, speed, theta=grid, drawn_at=drawn)
        pieces.append(Piece(stretch, result, keep))
        if result.status != SOLVED:
            break
        guesses = _end_state(result, bodies)
    return LinkageSolution(built, _merge(pieces, theta, speed, instants), pieces)


def _merge(pieces: list[Piece], theta, speed: float, instants: int) -> CycleResult:
    """One `CycleResult` over the instants asked for (stretches at rest held at their start)."""
    rows = {k: [] for k in ("theta", "q", "dq", "ddq", "dddq")}
    for piece in pieces:
        r = piece.result
        if piece.stretch.rest and r.status == SOLVED:
            if theta is None:
                t, _ = _grid(piece.stretch, None, instants)
            else:
                lo, hi = math.radians(piece.stretch.start), math.radians(piece.stretch.end)
                t = theta[(theta >= lo) & (theta < hi)]
            zero = np.zeros((t.size, r.q.shape[1]))
            for key, value in (("theta", t), ("q", np.repeat(r.q[:1], t.size, axis=0)), ("dq", zero),
                               ("ddq", zero), ("dddq", zero)):
                rows[key].append(value)
            continue
        keep = piece.keep[: r.theta.size]
        for key in rows:
            rows[key].append(getattr(r, key)[keep])
    last = pieces[-1].result
    n = len(last.coordinates)
    arrays = {k: (np.concatenate(v) if v else np.empty((0,) if k == "theta" else (0, n))) for k, v in rows.items()}
    requested = instants if theta is None else theta.size
    return CycleResult(last.status, last.message, arrays["theta"], arrays["q"], arrays["dq"], arrays["ddq"],
                       arrays["dddq"], last.coordinates, speed, requested, pieces[0].result.dof, last.dead_point,
                       last.system)
