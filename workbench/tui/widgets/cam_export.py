"""Export a cam profile from the Cam view: ask the format, then the path; write atomically.

The text comes from the writers of `camwright profile` (`workbench.camexport`
with the title and subtitle of `workbench.profilecmd.describe`), computed
from the project as it is on screen — edits included — at the command's
default resolution, so a file written here equals the command's output for
the same project.  As on the command line, no DXF is written where the
outline cannot be cut (undercut, cusp, corner).
"""

from __future__ import annotations

from pathlib import Path

from ...camexport import profile_csv, profile_dxf, profile_svg, uncuttable, verdict_lines
from ...camfile import CamSpec, CamStudy, study_cam
from ...editing import EditError
from ...projectfile import Project, write_atomic
from ..messages import Status
from ..screens.confirm import ChoiceDialog
from ..screens.path_prompt import PathDialog

FORMAT_CHOICES = [
    ("c", "csv", "CSV points: cam angle, follower, profile and pitch x, y, pressure angle, radius"),
    ("d", "dxf", "DXF outline in mm on named layers, for CAM/CNC"),
    ("s", "svg", "SVG drawing 1:1 with the verdicts, for a design review"),
]


def profile_text(project: Project, spec: CamSpec, fmt: str) -> tuple[str, CamStudy]:
    """The file text of `spec` in format `fmt` ("csv", "dxf" or "svg"), as `camwright profile` writes it."""
    from ...cli import CAUTION  # noqa: PLC0415 - the command line loads only when exporting
    from ...profilecmd import describe  # noqa: PLC0415

    study = study_cam(project, spec)
    title, subtitle = describe(project, spec)
    if fmt == "csv":
        return profile_csv(study, project.axis(spec.axis).unit), study
    if fmt == "dxf":
        return profile_dxf(study, f"{title}: {subtitle}", CAUTION), study
    return profile_svg(study, title, subtitle, CAUTION), study


def default_path(project: Project, spec: CamSpec, fmt: str) -> Path:
    """The cam's name with the format's suffix, beside the project file (or here)."""
    folder = project.path.parent if project.path is not None else Path.cwd()
    return folder / f"{spec.name}.{fmt}"


def check_path(path: Path, fmt: str) -> Path:
    """`path` if a file can be written there; `EditError` saying why not."""
    if path.is_dir():
        raise EditError(f"{path} is a folder: give a file name")
    if not path.parent.exists():
        raise EditError(f"no folder {path.parent}")
    if path.suffix.lower() != f".{fmt}":
        raise EditError(f"the file name should end in .{fmt} for a {fmt.upper()} file")
    return path


def write_profile(project: Project, spec: CamSpec, fmt: str, path: Path) -> tuple[str, bool]:
    """Write the profile atomically; (what happened in words, whether it is an error)."""
    text, study = profile_text(project, spec, fmt)
    try:
        write_atomic(path, text)
    except OSError as exc:
        return f"could not write {path}: {exc.strerror or exc}", True
    done = f"wrote {path} ({fmt.upper()}, cam {spec.name}, {len(study.analysis.theta)} points)"
    if study.ok:
        return f"{done} — ✓ all checks pass", False
    failed = [v for v, c in zip(verdict_lines(study), study.verdict.checks) if not c.ok]
    return f"{done} — ! the cam fails a check: {'; '.join(failed)}", False


def start_export(view, project: Project, spec: CamSpec) -> None:
    """Ask the format, then the path (refusing what cannot be written, with the reason), then write."""
    app = view.app

    def report(words: str, error: bool) -> None:
        view.post_message(Status(words, error=error))

    def write(fmt: str, path: Path) -> None:
        words, error = write_profile(project, spec, fmt, path)
        report(words, error)

    def got_path(fmt: str, path: Path | None) -> None:
        if path is None:
            report("export cancelled", False)
            return
        if path.exists():
            app.push_screen(ChoiceDialog("File exists", f"{path} exists already.", [("o", "overwrite", "overwrite it")]),
                            lambda word: write(fmt, path) if word == "overwrite" else report("export cancelled", False))
            return
        write(fmt, path)

    def got_format(fmt: str | None) -> None:
        if fmt is None:
            return
        if fmt == "dxf":
            blocked = uncuttable(study_cam(project, spec))
            if blocked:
                report(f"no DXF: the outline of cam {spec.name} cannot be cut as it stands: {'; '.join(blocked)}. "
                       "Change the cam first (the command line's --force writes it anyway).", True)
                app.bell()
                return
        app.push_screen(PathDialog(f"Export cam {spec.name} as {fmt.upper()}", str(default_path(project, spec, fmt)),
                                   lambda p: check_path(p, fmt),
                                   "enter: write (atomically)   esc: cancel"),
                        lambda path: got_path(fmt, path))

    app.push_screen(ChoiceDialog(f"Export cam {spec.name}",
                                 "Write the profile of the cam as it is on screen (edits included) as:",
                                 FORMAT_CHOICES), got_format)
