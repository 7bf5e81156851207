"""Cam geometry: pitch curve, profile, pressure angle, curvature, undercut, sizing.

SI units and radians throughout; see README.md in this folder for the API.
"""

from .analysis import DEFAULT_POINTS, MIN_POINTS, CamAnalysis, CurveRadii, FaceUse, analyse
from .errors import CamGeometryError
from .extremes import Extreme, Interval
from .followers import FlatFollower, Follower, RollerFollower
from .geometry import Cam, CamPoints, cam_points
from .limits import (
    CURVATURE_RATIO,
    CURVATURE_RATIO_RANGE,
    OSCILLATING_PRESSURE_ANGLE,
    OSCILLATING_PRESSURE_ANGLE_RANGE,
    PIVOT_CLEARANCE,
    PIVOT_TOUCH,
    TRANSLATING_PRESSURE_ANGLE,
    CamCheck,
    CamLimits,
    CamVerdict,
    check_cam,
    common_practice_limits,
)
from .motion import CamMotion, Turning, motion_from_function, motion_from_program
from .oscillating import OscillatingFlat, OscillatingRoller
from .outline import closed_outline
from .sizing import SizeResult, largest_roller, smallest_base_radius, smallest_prime_radius
from .translating import TranslatingFlat, TranslatingRoller

FOLLOWERS = {cls.type_id: cls for cls in (TranslatingRoller, TranslatingFlat, OscillatingRoller, OscillatingFlat)}
"""Follower classes by their type id ("translating-roller", …), for a project file's follower key."""

__all__ = [
    "CURVATURE_RATIO", "CURVATURE_RATIO_RANGE", "DEFAULT_POINTS", "FOLLOWERS", "MIN_POINTS", "OSCILLATING_PRESSURE_ANGLE",
    "OSCILLATING_PRESSURE_ANGLE_RANGE", "PIVOT_CLEARANCE", "PIVOT_TOUCH",
    "TRANSLATING_PRESSURE_ANGLE",
    "Cam", "CamAnalysis", "CamCheck", "CamGeometryError", "CamLimits", "CamMotion", "CamPoints",
    "CamVerdict", "CurveRadii", "Extreme", "FaceUse", "FlatFollower", "Follower", "Interval",
    "OscillatingFlat", "OscillatingRoller", "RollerFollower", "SizeResult", "TranslatingFlat",
    "TranslatingRoller", "Turning",
    "analyse", "cam_points", "check_cam", "closed_outline", "common_practice_limits",
    "largest_roller", "motion_from_function", "motion_from_program", "smallest_base_radius",
    "smallest_prime_radius",
]
