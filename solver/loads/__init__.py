"""Loads on the drive from kinematics already computed: rigid-body estimates only.

Cam followers (follower.py) and linkages (linkage*.py: drive efforts and
joint reactions by kinetostatics; servo.py: servo sizing).  See README.md.
"""

from .follower import (
    FollowerForces,
    FollowerLoad,
    follower_forces,
    jump_speed,
    preload_for_margin,
)
from .linkage import DriveLoad, JointReaction, LinkageLoads, linkage_loads
from .linkage_model import BodyMass, BodyTorque, LinkageLoading, LoadsError, PointForce
from .linkage_peaks import refined_peak
from .linkage_power import drive_efforts_by_power, kinetic_energy, velocity_coefficients
from .servo import Gearing, ServoFigures, ServoLimits, ServoSizing, motor_curves, servo_sizing


def scaled_motion(program, factor: float):
    """A program's master motion (s and derivatives per radian) times `factor`
    (e.g. 1e-3 for mm → m, π/180 for deg → rad)."""

    def motion(theta_deg):
        return tuple(factor * row for row in program.master(theta_deg))

    return motion


__all__ = [
    "FollowerForces", "FollowerLoad", "follower_forces", "jump_speed",
    "preload_for_margin", "scaled_motion",
    "DriveLoad", "JointReaction", "LinkageLoads", "linkage_loads",
    "BodyMass", "BodyTorque", "LinkageLoading", "LoadsError", "PointForce",
    "drive_efforts_by_power", "kinetic_energy", "refined_peak", "velocity_coefficients",
    "Gearing", "ServoFigures", "ServoLimits", "ServoSizing", "motor_curves", "servo_sizing",
]
