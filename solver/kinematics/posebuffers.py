"""Poses and rates of one evaluation, gathered per kind, in borrowed scratch memory.

Poses, rates and the per-kind gathers of them are temporaries of one
evaluation; they live in a borrowed workspace (workspace.py), so that
evaluating thousands of instants does not ask the allocator for fresh
megabytes (and the OS for fresh pages) on every call or every solve.  Kinds
return new arrays; whatever refers into a buffer is copied out before it is
reused.  After a batched Newton step the poses are moved by the step
(`advance_poses`) so that γ and η at the solved q need no cos and sin.
"""

from __future__ import annotations

import weakref

import numpy as np

from .frames import Pose, Rates
from .workspace import borrow, give_back

TRIG_REUSE_FROM = 64  # instants: from this many on, moving the poses by a Newton step beats cos and sin afresh
GROUND_POSE = np.array([[0.0], [0.0], [0.0], [1.0], [0.0]])  # x, y, φ, cos φ, sin φ of the ground
ADVANCE_LIMIT = 1e-4  # rad: a turn this small is applied to cos, sin by series to below round-off (error δ⁴/24)


class PoseBuffers:
    """The pose and rate buffers of `System` (a mixin: it works on the System's attributes)."""

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

    def _take(self, g, arrays, key) -> np.ndarray:
        shape = (arrays.shape[0], g.slots.shape[0], g.slots.shape[1], arrays.shape[2])
        return np.take(arrays, g.slots, axis=1, out=self._buffer((key, g.number), shape), mode="clip")

    # The Pose and Rates objects viewing a gathered buffer are made once per
    # buffer and handed out again (a Pose forgets its remembered rotations).
    def _slot_poses(self, g, arrays) -> list[Pose]:
        taken = self._take(g, arrays, "pose")  # (5, slots, k, N)
        known = self._slot_views.get(("pose", g.number))
        if known is not None and known[0] is taken:
            for pose in known[1]:
                pose.forget()
            return known[1]
        poses = [Pose(*taken[:, t]) for t in range(taken.shape[1])]
        self._slot_views[("pose", g.number)] = (taken, poses)
        return poses

    def _slot_rates(self, g, arrays, key="rates") -> list[Rates]:
        taken = self._take(g, arrays, key)
        known = self._slot_views.get((key, g.number))
        if known is not None and known[0] is taken:
            return known[1]
        rates = [Rates(*taken[:, t]) for t in range(taken.shape[1])]
        self._slot_views[(key, g.number)] = (taken, rates)
        return rates
