"""Planar kinematics of linkages: model, constraint kinds, drivers, the cycle solver, outputs and peaks.

Plain Python objects and numpy arrays in and out; SI units (m, rad, s);
master angle θ in rad.  See README.md beside this file for the API.
"""

from .base import Binding, Constraint, Coordinate
from .coordinates import BodyAngle, JointCoordinate, PointX, PointY, RelativeAngle, SliderStroke
from .cycle import INSTANTS, mobility, solve_cycle
from .dof import DofReport, Motion
from .errors import ModelError
from .fixed import Fixed
from .gaps import Gap, open_gaps
from .joins import OutputJoin, output_joins
from .model import GROUND, Body, Driver, Mechanism
from .motion import DEG, MM, ConstantSpeed, ProgramMotion
from .outputs import CoordinateProbe, OutputCurve
from .peaks import OutputPeaks, check_limits, cycle_breaks, max_speed, output_peaks, refined_max
from .prismatic import Prismatic
from .result import DEAD_POINT, NOT_ASSEMBLED, NOT_DRIVEN, REASONS, SOLVED, CycleResult, DeadPoint
from .revolute import Revolute
from .system import System
from .transmission import TransmissionAngle

__all__ = [
    "Binding", "Constraint", "Coordinate",
    "BodyAngle", "JointCoordinate", "PointX", "PointY", "RelativeAngle", "SliderStroke",
    "INSTANTS", "mobility", "solve_cycle", "DofReport", "Motion",
    "ModelError", "Fixed", "Gap", "open_gaps", "OutputJoin", "output_joins", "GROUND", "Body", "Driver", "Mechanism",
    "DEG", "MM", "ConstantSpeed", "ProgramMotion", "CoordinateProbe", "OutputCurve",
    "OutputPeaks", "check_limits", "cycle_breaks", "max_speed", "output_peaks", "refined_max",
    "Prismatic", "DEAD_POINT", "NOT_ASSEMBLED", "NOT_DRIVEN", "REASONS", "SOLVED", "CycleResult", "DeadPoint",
    "Revolute", "System", "TransmissionAngle",
]
