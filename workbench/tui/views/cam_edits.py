"""Changing a cam's turning and its limits from the Cam view.

`t` reverses the turning (cw ↔ ccw) in one edit (`workbench.editing.set_cam_turning`).
`L` opens a dialog of the three `[cam.limits]` values (`screens.fields_dialog`)
that tries every keystroke on the model (`workbench.editing.set_cam_limits`):
a refused value shows its reason where it is typed, an accepted one previews
the cam's checks under the typed limits.  A blank pressure angle or
curvature ratio is the common-practice value (shown greyed in the field), a
blank min_radius no limit.  Each accepted edit is applied at once (`Workbench.apply_edit`)
(one undo step, saved like every other edit).
"""

from __future__ import annotations

import math

from solver.cam import FOLLOWERS, CamGeometryError, common_practice_limits

from ... import editing
from ...axisreport import fmt
from ...camfile import CamLimitsSpec, CamSpec, find_cam, follower_of, study_cam
from ...editing import EditError, parse_number
from ...projectfile import Project
from ..messages import Status
from ..screens.fields_dialog import Field, FieldsDialog
from .cam_sizes import typed_form

LIMIT_KEYS = ("pressure_angle", "curvature_ratio", "min_radius")  # the file's keys, in its order
TYPED_UNITS = {"pressure_angle": ("deg", "°"), "curvature_ratio": ("×", "x"), "min_radius": ("mm",)}
SHOWN_UNITS = {"pressure_angle": "°", "curvature_ratio": "×", "min_radius": " mm"}
LABELS = {"pressure_angle": "pressure_angle [deg]", "curvature_ratio": "curvature_ratio [×]",
          "min_radius": "min_radius [mm]"}
CHECK_WORDS = {"pressure_angle": "pressure angle", "curvature_ratio": "curvature ratio",
               "min_radius": "profile radius"}  # the checks the limits set, as the verdict table names them
TURNING_WORDS = {"cw": "cw ↻", "ccw": "ccw ↺"}
MIRRORED = " (mirrored: offset on the rise's side)"  # a translating follower (solver.cam.translating)


# --- turning ---------------------------------------------------------------------------


def reverse_turning(view, project: Project, cam_name: str) -> None:
    """Reverse the cam's turning as one edit; the note names it ("cam feed-cam: turning cw → ccw"), and
    says why a translating follower's cam comes out mirrored with the same pressure angles."""
    spec = find_cam(project, cam_name)
    new = editing.reversed_turning(spec.turning)
    try:
        edited = editing.set_cam_turning(project, cam_name, new)
    except EditError as exc:
        view.post_message(Status(f"refused — cam {cam_name}: {exc.message}", error=True))
        view.app.bell()
        return
    mirrored = MIRRORED if FOLLOWERS[spec.follower].motion_kind == "linear" else ""
    view.app.apply_edit(edited, f"cam {cam_name}: turning {spec.turning} → {new}{mirrored}")


# --- limits ----------------------------------------------------------------------------


def limit_words(key: str, value: float | None) -> str:
    """A limit as the file gives it: "30°", "2×", "10 mm"; where it is left out "default" (common
    practice) or, for min_radius, "none"."""
    if value is None:
        return "none" if key == "min_radius" else "default"
    return f"{value:g}{SHOWN_UNITS[key]}"


def blank_means(spec: CamSpec) -> dict[str, str]:
    """What a blank field means for this cam's follower, per limit key."""
    try:
        default = common_practice_limits(follower_of(spec))
    except CamGeometryError:  # not expected: the cam was read back when it was edited
        default = None
    angle = default.pressure_angle if default is not None else None
    ratio = default.curvature_ratio if default is not None else None
    kind = spec.follower.replace("-", " ")
    return {
        "pressure_angle": "blank: none" if angle is None else
        f"blank: {fmt(math.degrees(angle))} (common practice)",
        "curvature_ratio": f"blank: {fmt(ratio)} (common practice)" if ratio is not None else
        ("blank (no ratio for a knife edge)" if spec.size("roller_radius") == 0 else
         f"blank (no ratio for a {kind} follower)"),
        "min_radius": "blank: no limit",
    }


def parse_limits(texts: tuple[str, ...]) -> CamLimitsSpec:
    """The three typed values (blank: left out); a typed unit is allowed ("25°", "2.5x", "8 mm")."""
    values = [parse_number(text, key, allow_blank=True, units=TYPED_UNITS[key])
              for key, text in zip(LIMIT_KEYS, texts)]
    return CamLimitsSpec(*values)


def limits_verdict(project: Project, cam_name: str) -> str:
    """The cam's verdict and its checks of the limits, in a line:
    "then: all checks pass — pressure angle 24.52° ≤ 30°, curvature ratio 3.70× ≥ 2×"
    (a check over its limit: "then: ✗ fails pressure angle — pressure angle 24.52° > 24° ✗, …")."""
    spec = find_cam(project, cam_name)
    try:
        study = study_cam(project, spec)
    except CamGeometryError as exc:  # set_cam_limits has read it back, so this is not expected
        return f"✗ cannot be laid out: {exc.message}"
    parts = []
    for c in study.verdict.checks:
        if c.quantity == "pressure_angle":
            shown, limit, within = f"{fmt(math.degrees(c.value))}°", f"{fmt(math.degrees(c.limit))}°", "≤"
        elif c.quantity == "curvature_ratio":
            shown, limit, within = f"{c.value:.2f}×", f"{fmt(c.limit)}×", "≥"
        elif c.quantity == "min_radius":
            shown, limit, within = f"{fmt(c.value * 1e3)} mm", f"{fmt(c.limit * 1e3)} mm", "≥"
        else:
            continue
        against = within if c.ok else {"≤": ">", "≥": "<"}[within]
        parts.append(f"{CHECK_WORDS[c.quantity]} {shown} {against} {limit}" + ("" if c.ok else " ✗"))
    failed = [CHECK_WORDS.get(c.quantity, c.quantity.replace("_", " ")) for c in study.verdict.checks if not c.ok]
    verdict = "then: all checks pass" if study.ok else f"then: ✗ fails {', '.join(failed)}"
    return verdict + (" — " + ", ".join(parts) if parts else "")


def limits_change(before: CamSpec, after: CamSpec) -> str:
    """"pressure_angle 30° → default, min_radius none → 10 mm": the limits that differ."""
    parts = [f"{key} {limit_words(key, getattr(before.limits, key))} → {limit_words(key, getattr(after.limits, key))}"
             for key in LIMIT_KEYS if getattr(before.limits, key) != getattr(after.limits, key)]
    return ", ".join(parts) or "unchanged"


def limits_dialog(project: Project, cam_name: str) -> FieldsDialog:
    """The limits dialog of one cam, trying what is typed on `project`."""
    spec = find_cam(project, cam_name)
    blank = blank_means(spec)
    fields = [Field(key, LABELS[key], typed_form(getattr(spec.limits, key)), blank[key]) for key in LIMIT_KEYS]

    def attempt(texts: tuple[str, ...]) -> Project:
        return editing.set_cam_limits(project, cam_name, parse_limits(texts))

    return FieldsDialog(
        f"Limits of cam {cam_name} ({spec.follower.replace('-', ' ')} follower)", fields, attempt,
        lambda edited: limits_verdict(edited, cam_name),
        hint="blank: common practice (greyed) · min_radius blank: no limit",
    )


def start_limits_edit(view, project: Project, cam_name: str) -> None:
    """Open the limits dialog of the cam; the accepted limits go up from `view` as one edit."""
    spec = find_cam(project, cam_name)

    def edited(result: Project | None) -> None:
        if result is None:
            return
        if result is project:
            view.post_message(Status(f"cam {cam_name}: limits unchanged"))
            return
        view.app.apply_edit(result, f"cam {cam_name}: limits " + limits_change(spec, find_cam(result, cam_name)))

    view.app.push_screen(limits_dialog(project, cam_name), edited)


def turning_text(spec: CamSpec) -> str:
    """The turning as the bar shows it: "turns cw ↻"."""
    return f"turns {TURNING_WORDS[spec.turning]}"
