"""Planar kinematics of linkages: model, constraint kinds, drivers and the cycle solver.

Plain Python objects and numpy arrays in and out; SI units (m, rad, s);
master angle θ in rad.  See README.md beside this file for the API.
"""

from .base import Binding, Constraint, Coordinate
from .coordinates import BodyAngle, JointCoordinate, PointX, PointY, RelativeAngle, SliderStroke
from .errors import ModelError
from .fixed import Fixed
from .model import GROUND, Body, Driver, Mechanism
from .motion import DEG, MM, ConstantSpeed, ProgramMotion
from .prismatic import Prismatic
from .revolute import Revolute
from .system import System

__all__ = [
    "Binding", "Constraint", "Coordinate",
    "BodyAngle", "JointCoordinate", "PointX", "PointY", "RelativeAngle", "SliderStroke",
    "ModelError", "Fixed", "GROUND", "Body", "Driver", "Mechanism",
    "DEG", "MM", "ConstantSpeed", "ProgramMotion", "Prismatic", "Revolute", "System",
]
