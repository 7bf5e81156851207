"""Normalized motion laws, segments, axis programs and their peaks (numpy only)."""

from .laws import LAWS, BOUNDARY_LAWS, MotionLaw, law_ids, register_law
from .peaks import AxisReport, Join, LimitCheck, Peak, SegmentPeaks, analyse
from .program import (
    Axis,
    EndConditions,
    Limits,
    Machine,
    Program,
    ProgramError,
    Segment,
    compile_axis,
    omega,
)

__all__ = [
    "LAWS", "BOUNDARY_LAWS", "MotionLaw", "law_ids", "register_law",
    "AxisReport", "Join", "LimitCheck", "Peak", "SegmentPeaks", "analyse",
    "Axis", "EndConditions", "Limits", "Machine", "Program", "ProgramError",
    "Segment", "compile_axis", "omega",
]
