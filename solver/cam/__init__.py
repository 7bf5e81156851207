"""Cam geometry: pitch curve, profile, pressure angle, curvature, undercut, sizing.

SI units and radians throughout; see README.md in this folder for the API.
"""

from .analysis import CamAnalysis, CurveRadii, FaceUse, analyse
from .errors import CamGeometryError
from .extremes import Extreme, Interval
from .followers import FlatFollower, Follower, RollerFollower
from .geometry import Cam, CamPoints, cam_points
from .motion import CamMotion, Turning, motion_from_function, motion_from_program
from .oscillating import OscillatingFlat, OscillatingRoller
from .translating import TranslatingFlat, TranslatingRoller

__all__ = [
    "Cam", "CamAnalysis", "CamGeometryError", "CamMotion", "CamPoints", "CurveRadii",
    "Extreme", "FaceUse", "FlatFollower", "Follower", "Interval", "OscillatingFlat",
    "OscillatingRoller", "RollerFollower", "TranslatingFlat", "TranslatingRoller", "Turning",
    "analyse", "cam_points", "motion_from_function", "motion_from_program",
]
