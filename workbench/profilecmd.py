"""`camwright profile FILE --cam NAME --format csv|dxf|svg --out PATH [--points N]`.

Writes one cam's profile: CSV points, a DXF outline for CAM/CNC or an SVG
drawing for a design review (see `workbench.camexport`).  The format may be
left out when `--out` ends in .csv, .dxf or .svg; without `--out` the text
goes to stdout.  Files are written atomically.

Exit codes: 0 written and the cam passes every check; 1 written but some
check fails (a warning names it on stderr) — or, for DXF, refused because
the outline is not cuttable (undercut, cusp or corner) unless `--force`;
2 invalid file or arguments.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from solver.cam import DEFAULT_POINTS, MIN_POINTS

from .camexport import FORMATS, profile_csv, profile_dxf, profile_svg, uncuttable, verdict_lines
from .camfile import cam_specs, find_cam, study_cam
from .cli import CAUTION, EXIT_OK, EXIT_OVER, UsageError, command
from .projectfile import ProjectError, load_project, write_atomic

MAX_POINTS = 360_000  # 0.001° of cam angle: finer than any cam is cut
TURNING_WORDS = {"cw": "turns clockwise", "ccw": "turns counter-clockwise"}


def _points(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a whole number: {text!r}") from None
    if not MIN_POINTS <= value <= MAX_POINTS:
        raise argparse.ArgumentTypeError(f"must lie between {MIN_POINTS} and {MAX_POINTS}, got {value}")
    return value


def _profile_args(p):
    p.add_argument("file", help="project file (.toml)")
    p.add_argument("--cam", required=True, help="cam name")
    p.add_argument("--format", choices=FORMATS, help="csv, dxf or svg (default: from the --out suffix)")
    p.add_argument("--out", help="write here (atomically) instead of to stdout")
    p.add_argument("--points", type=_points, default=DEFAULT_POINTS,
                   help=f"points around the cam (default {DEFAULT_POINTS}: every 0.1°)")
    p.add_argument("--force", action="store_true", help="write a DXF even where the outline cannot be cut")


def _format(args) -> str:
    if args.format:
        return args.format
    suffix = Path(args.out).suffix.lower().lstrip(".") if args.out else ""
    if suffix in FORMATS:
        return suffix
    known = ", ".join(FORMATS)
    if args.out:
        raise UsageError("profile", f"--out {args.out}: {suffix or 'no ending'} is not a format it writes "
                                    f"({known}); give --format, or an --out path ending in one of them")
    raise UsageError("profile", f"--format is missing: give --format {known}, or an --out path ending in one")


def describe(project, spec) -> tuple[str, str]:
    """A title (cam and machine) and a subtitle (follower sizes, axis, turning) for drawings."""
    machine = project.machine.name or (project.path.stem if project.path else "")
    title = f"cam {spec.name}" + (f" — {machine}" if machine else "")
    sizes = ", ".join(f"{k.replace('_', ' ')} {v:g} mm" for k, v in spec.sizes)
    subtitle = (f"{spec.follower.replace('-', ' ')} follower ({sizes}); axis {spec.axis}; "
                f"{TURNING_WORDS[spec.turning]}; {project.speed:g} cycles/min")
    return title, subtitle


@command("profile", "write a cam profile as CSV points, a DXF outline or an SVG drawing", _profile_args)
def run_profile(args, out, err) -> int:
    project = load_project(args.file)
    fmt = _format(args)
    spec = find_cam(project, args.cam)
    if spec is None:
        known = ", ".join(c.name for c in cam_specs(project)) or "none in this file"
        raise ProjectError(args.file, None, "--cam", f"no cam {args.cam!r} (cams: {known})")
    study = study_cam(project, spec, points=args.points)
    blocked = uncuttable(study)
    title, subtitle = describe(project, spec)
    if fmt == "dxf" and blocked and not args.force:
        err.print(f"camwright: cam {spec.name}: no DXF written, the outline cannot be cut as it stands: "
                  f"{'; '.join(blocked)}. Change the cam, or write it anyway with --force.",
                  markup=False, highlight=False)
        return EXIT_OVER
    if fmt == "csv":
        text = profile_csv(study, project.axis(spec.axis).unit)
    elif fmt == "dxf":
        text = profile_dxf(study, f"{title}: {subtitle}", CAUTION)
    else:
        text = profile_svg(study, title, subtitle, CAUTION)
    if args.out:
        write_atomic(args.out, text)
    else:
        out.file.write(text)
    if study.ok:
        if args.out:
            err.print(f"wrote {args.out}: cam {spec.name}, {len(study.analysis.theta)} points", markup=False,
                      highlight=False)
        return EXIT_OK
    failed = [v for v, c in zip(verdict_lines(study), study.verdict.checks) if not c.ok]
    err.print(f"camwright: cam {spec.name} fails a check: {'; '.join(failed)}", markup=False, highlight=False)
    return EXIT_OVER
