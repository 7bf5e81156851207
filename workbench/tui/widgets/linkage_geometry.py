"""Where a linkage's points are: body frames, sliders and their guides, the drawing's extent.

Plain geometry in the file's units (mm, complex numbers for points in the
machine frame; angles in rad), shared by the Linkage view's data and its
drawing.  `open_joints` finds, for a linkage that does not assemble, the
configuration nearest to assembled and the joints that stay open there.
Nothing here imports Textual.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.kinematics import GROUND
from solver.kinematics import open_gaps

from ...linkagefile import LinkageSpec, split_ref

MM = 1e3  # mm per m
GUIDE_MARGIN = 0.08  # a slider's guide is drawn this share of the linkage's size past the travel at each end
MIN_SIZE = 1.0  # mm: the least extent of a drawing (a linkage of one point still gets a frame)
BOUNDS_PAD = 0.02  # share of the drawing's extent left free around it
OPEN = 1e-6  # a joint whose scaled residual (lengths in units of the linkage's size, angles in rad) is
#              larger than this stays open in the nearest configuration


def hermite(t: np.ndarray, y: np.ndarray, dy: np.ndarray, at: float) -> float:
    """y at `at` from samples y(t) and their slopes dy (per unit of t): cubic Hermite between the
    neighbouring samples; past the ends, a first-order step from the nearest one."""
    n = t.size
    k = int(np.searchsorted(t, at, side="right")) - 1
    if k < 0:
        return float(y[0] + dy[0] * (at - t[0]))
    if k >= n - 1:
        return float(y[-1] + dy[-1] * (at - t[-1]))
    h = t[k + 1] - t[k]
    if h <= 0.0:
        return float(y[k + 1])
    s = (at - t[k]) / h
    h00, h10, h01, h11 = 2 * s**3 - 3 * s**2 + 1, s**3 - 2 * s**2 + s, -2 * s**3 + 3 * s**2, s**3 - s**2
    return float(h00 * y[k] + h10 * h * dy[k] + h01 * y[k + 1] + h11 * h * dy[k + 1])


@dataclass(frozen=True)
class Frames:
    """Body frames of a linkage: per body, origin (complex, mm) and angle (rad); arrays over
    instants (N,) or single values.  The ground is at 0 with angle 0."""

    origin: dict
    angle: dict

    def point(self, spec: LinkageSpec, ref: str):
        """Machine position (complex, mm) of "body.point"."""
        body, name = split_ref(ref)
        u, v = spec.points(body)[name]
        if body == GROUND:
            return complex(u, v)
        return self.origin[body] + (u + 1j * v) * np.exp(1j * self.angle[body])


def frames_from_q(q: np.ndarray, bodies) -> Frames:
    """Frames from coordinates q (..., 3B) in m, rad: the last axis body by body (x, y, φ)."""
    origin, angle = {}, {}
    for k, b in enumerate(bodies):
        origin[b] = (q[..., 3 * k] + 1j * q[..., 3 * k + 1]) * MM
        angle[b] = q[..., 3 * k + 2]
    return Frames(origin, angle)


def placed(spec: LinkageSpec) -> Frames:
    """The bodies where the file places them (rough, at master 0)."""
    return Frames({b.name: complex(b.place[0], b.place[1]) for b in spec.bodies},
                  {b.name: math.radians(b.place[2]) for b in spec.bodies})


def slider_unit(spec: LinkageSpec, joint, frames: Frames):
    """Unit vector (complex) of a slider's travel in the machine frame."""
    body, _ = split_ref(joint.first)
    ax, ay = joint.axis or (1.0, 0.0)
    u = complex(ax, ay) / abs(complex(ax, ay))
    return u if body == GROUND else u * np.exp(1j * frames.angle[body])


def slider_travel(spec: LinkageSpec, joint, frames: Frames):
    """Travel of a slider's sliding point from its guide point along the guide (mm)."""
    d = frames.point(spec, joint.second) - frames.point(spec, joint.first)
    u = slider_unit(spec, joint, frames)
    return (d * np.conj(u)).real


def guide_line(spec: LinkageSpec, joint, frames: Frames, travel: tuple[float, float], margin: float):
    """The guide of a slider as two points (complex, mm), `margin` past the travel at each end."""
    g = frames.point(spec, joint.first)
    u = slider_unit(spec, joint, frames)
    return np.array([g + (travel[0] - margin) * u, g + (travel[1] + margin) * u])


def all_points(spec: LinkageSpec, frames: Frames) -> dict[str, object]:
    """Every named point of every body and of the ground, "body.point" → complex mm (or arrays)."""
    out = {f"{GROUND}.{p}": complex(x, y) for p, (x, y) in spec.ground}
    for b in spec.bodies:
        for p, _ in b.points:
            out[f"{b.name}.{p}"] = frames.point(spec, f"{b.name}.{p}")
    return out


def size_of(spec: LinkageSpec) -> float:
    """A characteristic size of the linkage (mm): the largest extent of its points as placed."""
    pts = np.array([complex(v) for v in all_points(spec, placed(spec)).values()])
    if pts.size == 0:
        return MIN_SIZE
    extent = max(float(np.ptp(pts.real)), float(np.ptp(pts.imag)))
    return max(extent, MIN_SIZE)


def drawing_bounds(spec: LinkageSpec, frames: Frames, travel: dict, margin: float) -> tuple[float, float, float, float]:
    zs = [np.atleast_1d(np.asarray(z, dtype=complex)).ravel() for z in all_points(spec, frames).values()]
    for j in spec.joints:
        if j.kind == "slider":
            zs.append(np.asarray(guide_line(spec, j, frames, travel[j.name], margin), dtype=complex).ravel())
    z = np.concatenate(zs) if zs else np.zeros(1, dtype=complex)
    x0, x1, y0, y1 = float(z.real.min()), float(z.real.max()), float(z.imag.min()), float(z.imag.max())
    pad = max(x1 - x0, y1 - y0, MIN_SIZE) * BOUNDS_PAD
    return x0 - pad, x1 + pad, y0 - pad, y1 + pad


def open_joints(mechanism) -> tuple[np.ndarray | None, tuple[tuple[str, float | None], ...]]:
    """The configuration nearest to assembled at master 0 (least squares from the file's placing) and
    the joints and drivers that stay open there, widest gap first: (name, gap in mm, or None for a
    gap that is an angle)."""
    q, gaps = open_gaps(mechanism, 0.0)
    return q, tuple((g.name, None if g.length is None else g.length * MM) for g in gaps if g.size > OPEN)
