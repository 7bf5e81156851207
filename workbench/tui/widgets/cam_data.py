"""What the Cam view shows, computed from a project without any UI.

`study_cams(project)` analyses every `[[cam]]` of the (possibly edited)
project: a `CamEntry` holds the study, or the reason the cam cannot be laid
out after an edit.  `cam_picture(study, k)` gives the shapes of the drawing
at grid angle `k` — the cam turned to that angle and the follower on it — in
the machine frame, mm, as complex points; `picture_bounds` the extent over
the whole turn, so the scale holds while the angle steps.  `readout` gives
the numbers at one cam angle.  Nothing here imports Textual: the tests and
the worker call it directly.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.cam import DEFAULT_POINTS, CamGeometryError, RollerFollower

from ...camfile import CamSpec, CamStudy, cam_specs, study_cam
from ...projectfile import Project

MM = 1e3  # mm per m
CIRCLE_POINTS = 240  # points of a drawn circle: smoother than any terminal shows
STEM = 0.35  # length of a translating follower's stem, as a share of the cam's largest radius
FACE_MARGIN = 0.12  # a flat face drawn this share of the cam size past the contact it needs
PIVOT_MARK = 0.04  # radius of the pivot circle, as a share of the cam's largest radius
ZERO_MARK = (0.55, 0.9)  # the 0° tick runs between these shares of the base circle radius
BOUND_SAMPLES = 72  # follower poses sampled for the drawing's extent (every 5°)


@dataclass(frozen=True)
class CamEntry:
    """One cam of the project: its spec, the axis unit, and the study or why there is none."""

    spec: CamSpec
    unit: str
    study: CamStudy | None
    problem: str | None = None

    @property
    def name(self) -> str:
        return self.spec.name


def study_cams(project: Project, points: int = DEFAULT_POINTS) -> list[CamEntry]:
    """Every cam of `project`, in file order; a cam an edit has broken carries its problem."""
    entries = []
    for spec in cam_specs(project):
        names = [a.name for a in project.axes]
        unit = project.axis(spec.axis).unit if spec.axis in names else "mm"
        try:
            entries.append(CamEntry(spec, unit, study_cam(project, spec, points)))
        except CamGeometryError as exc:
            problem = f"{exc.key}: {exc.message}" if exc.key else exc.message
            entries.append(CamEntry(spec, unit, None, problem))
        except (ArithmeticError, ValueError, KeyError) as exc:  # said on screen, never a traceback
            entries.append(CamEntry(spec, unit, None, f"the cam could not be studied ({exc})"))
    return entries


def index_of(study: CamStudy, angle_deg: float) -> int:
    """The grid index of cam angle `angle_deg` (nearest sample)."""
    n = len(study.analysis.theta)
    return int(round((angle_deg % 360.0) / 360.0 * n)) % n


# --- the drawing ---------------------------------------------------------------


def _circle(centre: complex, radius: float) -> np.ndarray:
    t = np.linspace(0.0, 2.0 * math.pi, CIRCLE_POINTS + 1)
    return centre + radius * np.exp(1j * t)


def _complex(points: np.ndarray) -> np.ndarray:
    return points[:, 0] + 1j * points[:, 1]


def _closed(z: np.ndarray) -> np.ndarray:
    return np.append(z, z[:1])


def _stretch(n: int, start: float, end: float) -> np.ndarray:
    """Grid indices from cam angle `start` to `end` (rad), wrapping through 0."""
    k0 = int(round(start / (2 * math.pi) * n))
    k1 = int(round(end / (2 * math.pi) * n))
    if k1 < k0:
        k1 += n
    return np.arange(k0, k1 + 1) % n


def follower_shapes(study: CamStudy, k: int) -> list[np.ndarray]:
    """The follower at grid angle `k` as polylines (complex, mm, machine frame)."""
    a, f, sigma = study.analysis, study.cam.follower, study.cam.sigma
    size = cam_radius(study)
    turn = np.exp(1j * sigma * a.theta[k])
    shapes = []
    if isinstance(f, RollerFollower):
        centre = complex(a.pitch[k, 0], a.pitch[k, 1]) * turn * MM
        r = f.roller_radius * MM
        if r > 0:
            shapes.append(_circle(centre, r))
        if hasattr(f, "pivot_distance"):  # the arm back to its pivot
            pivot = complex(f.pivot_distance * MM, 0.0)
            shapes += [np.array([centre, pivot]), _circle(pivot, PIVOT_MARK * size)]
        else:  # the stem up the line of travel
            top = centre + 1j * r
            shapes.append(np.array([top, top + 1j * STEM * size]))
        return shapes
    contact = complex(a.contact[k, 0], a.contact[k, 1]) * MM
    reach = (a.face.high.value - a.face.low.value) * MM + 2 * FACE_MARGIN * size
    if hasattr(f, "pivot_distance"):  # the face along the arm, the pivot at its end
        pivot = complex(f.pivot_distance * MM, 0.0)
        along = -np.exp(-1j * (f.initial_arm_angle + a.lift[k]))  # pivot → cam, along the arm
        foot = contact - a.face_position[k] * MM * along  # the face's point square to the pivot
        far = foot + (a.face.high.value * MM + FACE_MARGIN * size) * along
        shapes += [np.array([pivot, foot, far]), _circle(pivot, PIVOT_MARK * size)]
        return shapes
    axis_x = f.axis_x(sigma) * MM
    half = f.face_width * MM / 2 if f.face_width else reach / 2
    y = contact.imag
    shapes += [np.array([complex(axis_x - half, y), complex(axis_x + half, y)]),
               np.array([complex(axis_x, y), complex(axis_x, y + STEM * size)])]
    return shapes


def cam_radius(study: CamStudy) -> float:
    """The largest radius of the profile (mm): the circle the turning cam sweeps."""
    a = study.analysis
    r = float(np.max(np.hypot(a.profile[:, 0], a.profile[:, 1])))
    if a.pitch is not None:
        r = max(r, float(np.max(np.hypot(a.pitch[:, 0], a.pitch[:, 1]))))
    return r * MM


def picture_bounds(study: CamStudy) -> tuple[float, float, float, float]:
    """(x min, x max, y min, y max) in mm of the drawing over a whole turn."""
    r = cam_radius(study)
    n = len(study.analysis.theta)
    points = [np.array([complex(-r, -r), complex(r, r)])]
    for k in range(0, n, max(1, n // BOUND_SAMPLES)):
        points += follower_shapes(study, k)
    z = np.concatenate(points)
    return float(z.real.min()), float(z.real.max()), float(z.imag.min()), float(z.imag.max())


@dataclass(frozen=True)
class CamPicture:
    """The drawing at one cam angle, in the machine frame, mm, complex points.

    base, pitch (None for flat faces), profile: closed curves; zero_mark:
    a tick from the centre toward the profile point of cam angle 0 (it turns
    with the cam); follower: polylines; trouble: stretches of profile with
    undercut or a cusp; corners: points where the profile has a corner.
    """

    base: np.ndarray
    pitch: np.ndarray | None
    profile: np.ndarray
    zero_mark: np.ndarray
    follower: list[np.ndarray]
    trouble: list[np.ndarray]
    corners: np.ndarray


def cam_picture(study: CamStudy, k: int) -> CamPicture:
    """The cam turned to grid angle `k` with the follower on it."""
    a, sigma = study.analysis, study.cam.sigma
    n = len(a.theta)
    turn = np.exp(1j * sigma * a.theta[k]) * MM  # cam frame (m) → machine frame (mm)
    profile = _complex(a.profile) * turn
    pitch = None if a.pitch is None else _closed(_complex(a.pitch) * turn)
    base = study.cam.follower.base_radius * MM
    toward = profile[0] / abs(profile[0])
    trouble = [profile[_stretch(n, i.start, i.end)] for i in (*a.undercut, *a.cusp)]
    corners = np.array([profile[int(round(c / (2 * math.pi) * n)) % n] for c in a.corners], dtype=complex)
    return CamPicture(
        base=_circle(0j, base),
        pitch=pitch,
        profile=_closed(profile),
        zero_mark=np.array([ZERO_MARK[0] * base * toward, ZERO_MARK[1] * base * toward]),
        follower=follower_shapes(study, k),
        trouble=trouble,
        corners=corners,
    )


# --- numbers at one angle ---------------------------------------------------------


@dataclass(frozen=True)
class Readout:
    """The cam at one angle: follower position (axis unit) and its rate per turn, pressure
    angle (deg), pitch and profile radius of curvature (mm; None where there is no pitch curve),
    and whether the profile there is undercut or a cusp."""

    angle: float
    lift: float
    lift_rate: float
    pressure_angle: float
    pitch_radius: float | None
    profile_radius: float
    trouble: bool


def readout(study: CamStudy, unit: str, angle_deg: float) -> Readout:
    a = study.analysis
    k = index_of(study, angle_deg)
    scale = MM if unit == "mm" else 180.0 / math.pi
    theta = a.theta[k]
    inside = any(_inside(theta, i) for i in (*a.undercut, *a.cusp))
    return Readout(
        angle=math.degrees(theta),
        lift=float(a.lift[k]) * scale,
        lift_rate=float(a.lift_rate[k]) * scale,
        pressure_angle=math.degrees(float(a.pressure_angle[k])),
        pitch_radius=None if a.pitch_radius is None else float(a.pitch_radius[k]) * MM,
        profile_radius=float(a.profile_radius[k]) * MM,
        trouble=inside,
    )


def _inside(theta: float, interval) -> bool:
    if interval.end >= interval.start:
        return interval.start <= theta <= interval.end
    return theta >= interval.start or theta <= interval.end
