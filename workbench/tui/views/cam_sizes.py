"""Changing a cam's follower sizes from the Cam view: pick the size, type the length.

`s` in the Cam view lists the sizes of the cam's follower type with their
values (`ChoiceDialog`, one key each); the chosen one opens the value dialog
(`EditDialog`), which tries every keystroke on the model
(`workbench.editing.set_cam_size`): the reason shows where a length is
refused, and the preview says the base circle and the cam's verdict it would
give.  The accepted project is applied at once (`Workbench.apply_edit`: one
undo step, saved like every other edit).
"""

from __future__ import annotations

from dataclasses import fields

from rich.text import Text

from solver.cam import FOLLOWERS, CamGeometryError

from ... import editing
from ...axisreport import fmt
from ...camfile import find_cam, study_cam
from ...editing import parse_number
from ...projectfile import Project
from ..messages import Status
from ..screens.confirm import ChoiceDialog
from ..screens.edit_value import EditDialog

CHOICE_KEYS = "abcdefgh"  # one key per size in the list (no app key among them)
MEANING = {  # what each size is, in a few words (README, Cams)
    "prime_radius": "prime circle: roller centre from the cam centre at the lowest position",
    "roller_radius": "roller radius (0: a knife edge)",
    "base_radius": "base circle radius",
    "offset": "line of travel from the cam centre; positive eases the rise",
    "face_width": "face width about the line of travel, checked when given",
    "pivot_distance": "cam centre to the arm's pivot",
    "arm_length": "pivot to roller centre",
    "face_offset": "face line from the pivot, toward the cam",
}
FLAT_OFFSET = "line of travel from the cam centre (moves the contact on the face, not the cam)"
SHORT = {  # the same in the list of sizes, where a line must fit a dialog at 80 columns
    "prime_radius": "prime circle radius",
    "roller_radius": "roller (0: knife edge)",
    "base_radius": "base circle radius",
    "offset": "line of travel off the centre",
    "face_width": "checked when given",
    "pivot_distance": "cam centre to arm pivot",
    "arm_length": "pivot to roller centre",
    "face_offset": "face line off the pivot",
}


def meaning(follower: str, key: str) -> str:
    if key == "offset" and follower == "translating-flat":
        return FLAT_OFFSET
    return MEANING.get(key, key.replace("_", " "))


def _mm(value: float | None) -> str:
    return "—" if value is None else f"{fmt(value)} mm"


def typed_form(value: float | None) -> str:
    """The value as the input shows it: short, but never rounded ("60", "12.3456789")."""
    if value is None:
        return ""
    short = f"{value:g}"
    return short if float(short) == value else repr(value)


def shown(follower: str, key: str, value: float | None) -> str:
    """A size as listed: "60 mm"; one the file leaves out: its default ("0 mm (default)", "— (none)")."""
    if value is not None:
        return _mm(value)
    default = next(f.default for f in fields(FOLLOWERS[follower]) if f.name == key)
    return "— (none)" if default is None else f"{_mm(default)} (default)"


def size_choices(project: Project, cam_name: str) -> list[tuple[str, str, str]]:
    """(key to press, size, line shown) for every size of the cam's follower type."""
    spec = find_cam(project, cam_name)
    return [(CHOICE_KEYS[i], key, f"{key:<15}{shown(spec.follower, key, value):>15}  {SHORT.get(key, '')}")
            for i, (key, value, _) in enumerate(editing.cam_sizes(spec))]


def sizes_text(project: Project | None, cam_name: str | None) -> Text:
    """The follower's sizes in one dim line for the Cam view: "sizes: prime_radius 60 mm · … (s)"."""
    spec = find_cam(project, cam_name) if project is not None and cam_name is not None else None
    if spec is None:
        return Text("")
    given = [f"{key} {_mm(value)}" for key, value, _ in editing.cam_sizes(spec) if value is not None]
    return Text(f"sizes: {' · '.join(given)} (s: change)", style="dim")


def verdict_words(project: Project, cam_name: str) -> str:
    """"base circle 48 mm — then: ✓ all checks pass" (or the checks that fail) for the cam of `project`."""
    spec = find_cam(project, cam_name)
    try:
        study = study_cam(project, spec)
    except CamGeometryError as exc:  # set_cam_size has read it back, so this is not expected
        return f"✗ cannot be laid out: {exc.message}"
    base = f"base circle {fmt(study.cam.follower.base_radius * 1e3)} mm"
    if study.ok:
        return f"{base} — then: ✓ all checks pass"
    failed = ", ".join(c.quantity.replace("_", " ") for c in study.verdict.checks if not c.ok)
    return f"{base} — then: ✗ fails {failed}"


def size_dialog(project: Project, cam_name: str, key: str) -> tuple[EditDialog, str]:
    """The value dialog for one size, and the note that names the edit."""
    spec = find_cam(project, cam_name)
    value, required = next((v, r) for k, v, r in editing.cam_sizes(spec) if k == key)

    def attempt(text, _choice):
        typed = parse_number(text, key, allow_blank=not required, units=("mm",))
        return editing.set_cam_size(project, cam_name, key, typed)

    def explain(edited: Project) -> str:
        new = find_cam(edited, cam_name).size(key)
        change = "no change" if new == value else \
            f"{key} {shown(spec.follower, key, value)} → {shown(spec.follower, key, new)}"
        return f"{change}; {verdict_words(edited, cam_name)}"

    blank = "" if required else "; blank: leave it out of the file"
    screen = EditDialog(
        f"Size of cam {cam_name} ({spec.follower.replace('-', ' ')} follower)",
        f"{key} [mm] — {meaning(spec.follower, key)}{blank}:",
        typed_form(value), attempt, explain,
    )
    return screen, f"cam {cam_name}: {key}"


def start_size_edit(view, project: Project, cam_name: str) -> None:
    """Ask which size of the cam to change, then its length; the result goes up from `view`."""

    spec = find_cam(project, cam_name)

    def edited(result: Project | None, key: str, note: str) -> None:
        if result is None:
            return
        if result is project:
            view.post_message(Status(f"{note}: unchanged"))
            return
        old, new = spec.size(key), find_cam(result, cam_name).size(key)
        view.app.apply_edit(result, f"{note} {shown(spec.follower, key, old)} → "
                                    f"{shown(spec.follower, key, new)}")

    def chosen(key: str | None) -> None:
        if key is not None:
            screen, note = size_dialog(project, cam_name, key)
            view.app.push_screen(screen, lambda result: edited(result, key, note))

    view.app.push_screen(ChoiceDialog(
        f"Sizes of cam {cam_name} ({spec.follower.replace('-', ' ')} follower)",
        "press the key of the size to change:",
        size_choices(project, cam_name)), chosen)
