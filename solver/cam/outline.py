"""Closed outlines for export: the profile or pitch curve as a polygon of points.

The analysis lists points in order of cam angle, which runs around the cam
against its turning (clockwise for a counter-clockwise cam).  Drawings and
machining want a closed contour with a fixed orientation, so the outline is
returned counter-clockwise, starting and ending at the point for cam angle 0.
"""

from __future__ import annotations

import numpy as np

from .analysis import CamAnalysis


def closed_outline(analysis: CamAnalysis, curve: str = "profile", mirror: bool = False) -> np.ndarray:
    """(N + 1, 2) points in m, counter-clockwise, first point repeated at the end.

    curve: "profile" (the cam) or "pitch" (roller centre path; roller
    followers only).  mirror: reflect x → −x, the cam for the mirror-image
    machine (the follower on the other side of the cam).
    """
    if curve == "profile":
        points = analysis.profile
    elif curve == "pitch" and analysis.pitch is not None:
        points = analysis.pitch
    else:
        raise ValueError(f"no {curve!r} curve for this follower; choose 'profile' or 'pitch'")
    if mirror:
        points = points * np.array([-1.0, 1.0])
    x, y = points[:, 0], points[:, 1]
    area2 = np.dot(x, np.roll(y, -1)) - np.dot(np.roll(x, -1), y)  # twice the signed area
    order = np.arange(len(points))
    if area2 < 0:
        order = (-order) % len(points)  # same start, opposite way round
    return points[np.append(order, 0)]
