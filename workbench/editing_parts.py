"""Edits that reach past the axes into the project's parts: a cam's sizes, and an axis's
name, which the cams and linkage drivers that follow the axis carry too.

Like every edit of `workbench.editing` (which re-exports these), each takes a
project and returns a new one, or raises `EditError` with one reason a user
can read; the project passed in is never changed.  Sizes are in mm, as the
file and the screens give them.
"""

from __future__ import annotations

import math
from dataclasses import MISSING, fields, replace
from typing import Callable

from solver.cam import FOLLOWERS, CamGeometryError

from .camfile import PART_KEY as CAM_KEY
from .camfile import CamSpec, cam_specs, dump_cams, follower_of, parse_cams
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
    try:
        read_back = parse_cams(dump_cams([edited]), project, project.path)[0]
    except ProjectError as exc:
        raise EditError(f"{key} = {_mm(value)}: the cam cannot be laid out: {exc.problem}", key) from None
    specs = cam_specs(project)
    specs[index] = read_back
    return replace(project, parts={**project.parts, CAM_KEY: specs})


def _mm(value: float | None) -> str:
    return "(the default)" if value is None else f"{value:g} mm"


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
