"""Edits that reach past the axes into the project's parts: a cam's sizes, turning and
limits, and an axis's name, which the cams and linkage drivers that follow the axis carry too.

Like every edit of `workbench.editing` (which re-exports these), each takes a
project and returns a new one, or raises `EditError` with one reason a user
can read; the project passed in is never changed.  Sizes are in mm and the
pressure-angle limit in deg, as the file and the screens give them.  An
edited cam is read back as the file would read it, so what is accepted
loads again after a save.
"""

from __future__ import annotations

import math
from dataclasses import MISSING, fields, replace
from typing import Callable

from solver.cam import FOLLOWERS, CamGeometryError, RollerFollower

from .camfile import PART_KEY as CAM_KEY
from .camfile import TURNING, CamLimitsSpec, CamSpec, cam_specs, dump_cams, follower_of, parse_cams
from .linkagefile import PART_KEY as LINKAGE_KEY
from .linkagefile import LinkageSpec, linkage_specs
from .projectfile import Project
from .sections import TABLE_NAMES
from .tomlcheck import ProjectError


# --- cam sizes -----------------------------------------------------------------


def cam_sizes(spec: CamSpec) -> list[tuple[str, float | None, bool]]:
    """(key, value in mm or None where the file leaves it out, required) for every size of the
    cam's follower type, in the order the file lists them."""
    given = dict(spec.sizes)
    return [(f.name, given.get(f.name), f.default is MISSING and f.default_factory is MISSING)
            for f in fields(FOLLOWERS[spec.follower])]


def _cam(project: Project, name: str) -> tuple[int, CamSpec]:
    for i, spec in enumerate(cam_specs(project)):
        if spec.name == name:
            return i, spec
    raise EditError(f"no cam named {name!r}", "cam")


def set_cam_size(project: Project, cam_name: str, key: str, value: float | None) -> Project:
    """One size of a cam's follower, mm; None leaves an optional size out of the file (its default).

    Refused where the follower cannot be built (a roller as large as the prime
    circle, an arm that cannot reach the cam), where a limit no longer applies
    (a curvature ratio on a knife edge), or where the cam cannot be laid out
    any more; the edited cam is read back as the file would read it, so what
    is accepted here loads again after a save."""
    index, spec = _cam(project, cam_name)
    known = cam_sizes(spec)
    words = spec.follower.replace("-", " ")
    if key not in [k for k, _, _ in known]:
        raise EditError(f"a {words} follower has no size {key!r} (its sizes: "
                        f"{', '.join(k for k, _, _ in known)})", key)
    required = next(r for k, _, r in known if k == key)
    if value is None and required:
        raise EditError(f"{key}: a {words} follower needs it: type a length in mm", key)
    if value is not None and not math.isfinite(value):
        raise EditError(f"{key}: must be finite, got {value!r}", key)
    sizes = {k: v for k, v, _ in known if v is not None}
    if value is None:
        sizes.pop(key, None)
    else:
        sizes[key] = float(value)
    edited = replace(spec, sizes=tuple((k, sizes[k]) for k, _, _ in known if k in sizes))
    if edited == spec:
        return project
    try:
        follower_of(edited)
    except CamGeometryError as exc:
        others = ", ".join(f"{k} {v:g} mm" for k, v in edited.sizes if k != key)
        raise EditError(f"{key} = {_mm(value)}: {exc.message}" + (f" — with {others}" if others else ""),
                        key) from None
    if edited.limits.curvature_ratio is not None and edited.size("roller_radius") == 0:
        raise EditError("roller_radius = 0 mm makes a knife edge, which has no curvature ratio: "
                        "take curvature_ratio out of [cam.limits] first", key)
    return _with_cam(project, index, edited, f"{key} = {_mm(value)}", key)


def _with_cam(project: Project, index: int, edited: CamSpec, what: str, key: str) -> Project:
    """The project with cam `index` replaced by `edited` as the file would read it back;
    refused (naming `what` was typed into `key`) where the file would refuse it."""
    try:
        read_back = parse_cams(dump_cams([edited]), project, project.path)[0]
    except ProjectError as exc:
        raise EditError(f"{what}: the cam cannot be laid out: {exc.problem}", key) from None
    specs = cam_specs(project)
    specs[index] = read_back
    return replace(project, parts={**project.parts, CAM_KEY: specs})


def _mm(value: float | None) -> str:
    return "(the default)" if value is None else f"{value:g} mm"


# --- cam turning and limits ------------------------------------------------------

MAX_PRESSURE_ANGLE = 90.0  # deg: at 90° the follower is pushed square to its travel and cannot move


def reversed_turning(turning: str) -> str:
    """"ccw" for "cw" and the other way round."""
    return "ccw" if turning == "cw" else "cw"


def set_cam_turning(project: Project, cam_name: str, turning: str) -> Project:
    """The cam turning "cw" or "ccw" (seen with the follower on top); the same turning: the same project.

    A translating follower's offset keeps to the side that eases the rise
    (`solver.cam.translating`), so its cam comes out mirrored with the same
    pressure angles; an oscillating follower's pivot stays put, so its
    pressure angles change."""
    index, spec = _cam(project, cam_name)
    if turning not in TURNING:
        raise EditError(f"turning: must be {' or '.join(repr(t) for t in TURNING)}, got {turning!r}", "turning")
    if turning == spec.turning:
        return project
    return _with_cam(project, index, replace(spec, turning=turning), f"turning = {turning}", "turning")


LIMIT_UNITS = {"pressure_angle": "deg", "curvature_ratio": "×", "min_radius": "mm"}
"""The unit each `[cam.limits]` key is given in (the file's and the screens')."""


def _limit_value(key: str, value: float | None) -> float | None:
    """A limit as the file keeps it (float), or None; refused where it is not finite or not above 0."""
    if value is None:
        return None
    unit = LIMIT_UNITS[key]
    shown = f"{value:g}" + ("" if unit == "×" else f" {unit}")
    if not math.isfinite(value):
        raise EditError(f"{key}: must be finite, got {value!r}", key)
    if value <= 0:
        raise EditError(f"{key}: must be above 0, got {shown} (blank: leave the limit out)", key)
    if key == "pressure_angle" and value >= MAX_PRESSURE_ANGLE:
        raise EditError(f"{key}: must be below {MAX_PRESSURE_ANGLE:g} deg, got {shown}: at "
                        f"{MAX_PRESSURE_ANGLE:g}° the cam pushes square across the follower's travel", key)
    return float(value)


def set_cam_limits(project: Project, cam_name: str, limits: CamLimitsSpec) -> Project:
    """The cam's `[cam.limits]`: pressure_angle deg, curvature_ratio, min_radius mm; None leaves a
    limit out of the file (common practice then, or no min_radius).  The same limits: the same project.

    Refused with the first reason, in the file's key order: a value not above
    0 or not finite, a pressure angle of 90° or more, a curvature ratio on a
    follower without a roller (a flat face, a knife edge)."""
    index, spec = _cam(project, cam_name)
    values = {f.name: _limit_value(f.name, getattr(limits, f.name)) for f in fields(CamLimitsSpec)}
    words = spec.follower.replace("-", " ")
    if values["curvature_ratio"] is not None:
        if not issubclass(FOLLOWERS[spec.follower], RollerFollower):
            raise EditError(f"curvature_ratio: applies to roller followers only, not a {words} follower "
                            "(leave it blank)", "curvature_ratio")
        if spec.size("roller_radius") == 0:
            raise EditError("curvature_ratio: a knife edge (roller_radius = 0 mm) has no curvature ratio "
                            "(leave it blank)", "curvature_ratio")
    edited = replace(spec, limits=CamLimitsSpec(**values))
    if edited == spec:
        return project
    given = ", ".join(f"{k} {v:g}" for k, v in values.items() if v is not None) or "no limits"
    return _with_cam(project, index, edited, given, "limits")


# --- axis names ----------------------------------------------------------------


def _cams_following(project: Project, old: str, new: str) -> list[CamSpec] | None:
    specs = cam_specs(project)
    if not any(s.axis == old for s in specs):
        return None
    return [replace(s, axis=new) if s.axis == old else s for s in specs]


def _linkages_following(project: Project, old: str, new: str) -> list[LinkageSpec] | None:
    specs = linkage_specs(project)
    if not any(d.axis == old for s in specs if isinstance(s, LinkageSpec) for d in s.drivers):
        return None
    return [replace(s, drivers=tuple(replace(d, axis=new) if d.axis == old else d for d in s.drivers))
            if isinstance(s, LinkageSpec) else s for s in specs]


AXIS_REFERENCES: dict[str, Callable[[Project, str, str], list | None]] = {
    CAM_KEY: _cams_following,  # [[cam]] axis = "name"
    LINKAGE_KEY: _linkages_following,  # [[linkage.driver]] axis = "name"
}
"""Per project-file part: its tables with an axis renamed, or None when none of them names it."""


def axis_users(project: Project, name: str) -> list[str]:
    """What follows axis `name`, in words: 'cam "stamp-cam"', 'linkage "press" driver "crank"'."""
    out = [f'cam "{s.name}"' for s in cam_specs(project) if s.axis == name]
    out += [f'linkage "{s.name}" driver "{d.name}"' for s in linkage_specs(project) if isinstance(s, LinkageSpec)
            for d in s.drivers if d.axis == name]
    return out


def rename_axis(project: Project, old: str, new: str) -> Project:
    """Axis `old` called `new` (surrounding spaces dropped), and every cam and linkage driver that
    follows it with it, in one edit (the same name: the same project).  Refused when the name is blank
    or already taken by another axis or by a table name `camwright table --axis` knows (a linkage
    output, a load)."""
    i = axis_index(project, old)
    name = new.strip()
    if not name:
        raise EditError("name: must not be empty", "name")
    if name == old:
        return project
    if any(a.name == name for a in project.axes):
        raise EditError(f"name: another axis is called {name!r}; axis names must be unique", "name")
    tables = {n for lister in TABLE_NAMES for n in lister(project)}
    if name in tables:
        raise EditError(f"name: {name!r} is already the name of a table of this project "
                        f"(camwright table --axis {name}); choose another", "name")
    edited = _with_axis(project, replace(project.axes[i], name=name), old_name=old)  # its program, anew
    parts = dict(project.parts)
    for key, rename in AXIS_REFERENCES.items():
        renamed = rename(project, old, name)
        if renamed is not None:
            parts[key] = renamed
    return replace(edited, parts=parts)


# Imported last: `editing` re-exports the edits above, so it imports this module at its end.
from .editing import EditError, _with_axis, axis_index  # noqa: E402
