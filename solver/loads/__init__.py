"""Loads on the drive from kinematics already computed: rigid-body estimates only."""

from .follower import (
    FollowerForces,
    FollowerLoad,
    follower_forces,
    jump_speed,
    preload_for_margin,
)


def scaled_motion(program, factor: float):
    """A program's master motion (s and derivatives per radian) times `factor`
    (e.g. 1e-3 for mm → m, π/180 for deg → rad)."""

    def motion(theta_deg):
        return tuple(factor * row for row in program.master(theta_deg))

    return motion


__all__ = [
    "FollowerForces", "FollowerLoad", "follower_forces", "jump_speed",
    "preload_for_margin", "scaled_motion",
]
