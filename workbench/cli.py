"""The `camwright` command line (DESIGN §7).

    camwright [FILE]                      open the workbench (no FILE: the demo preset)
    camwright check FILE [--json]         peaks vs limits; exit 0 within, 1 over, 2 invalid
    camwright table FILE --axis NAME [--step DEG] [--out PATH]
    camwright new PATH [--from PRESET]    start a project from a preset

Commands register themselves in `COMMANDS` (name → (add_arguments, run)).
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Callable

from rich.console import Console

from .axisreport import axis_json, axis_reports, axis_table
from .projectfile import ProjectError, load_project, write_atomic
from .presets import DEMO_PRESET, preset_names, preset_path
from .csvtable import motion_csv_text
from .sections import CHECK_SECTIONS, TABLE_NAMES, TABLE_SOURCES

EXIT_OK, EXIT_OVER, EXIT_INVALID = 0, 1, 2


class UsageError(Exception):
    """A command line that cannot be carried out as given (exit 2, one message naming the option)."""

    def __init__(self, command: str, message: str):
        super().__init__(message)
        self.message = f"camwright {command}: {message}"


CAUTION = (
    "Kinematic results alone do not make a machine safe: verify with the drive maker's data, "
    "forces, fatigue, guarding and a risk assessment under the machinery-safety rules that apply "
    "locally, and licensed engineering judgement."
)

COMMANDS: dict[str, tuple[str, Callable, Callable]] = {}


def command(name: str, help: str, arguments: Callable):
    """Register a sub-command: decorates `run(args, out, err) -> exit code`;
    `arguments(parser)` adds its options."""

    def wrap(run):
        COMMANDS[name] = (help, arguments, run)
        return run

    return wrap


# --- check -------------------------------------------------------------------

def _check_args(p):
    p.add_argument("file", help="project file (.toml)")
    p.add_argument("--json", action="store_true", help="machine-readable report on stdout")


@command("check", "peaks vs limits for every axis and output", _check_args)
def run_check(args, out: Console, err: Console) -> int:
    project = load_project(args.file)
    reports = axis_reports(project)
    ok = all(r.ok for r in reports)
    extra = [s(project) for s in CHECK_SECTIONS]
    extra = [e for e in extra if e is not None]
    ok = ok and all(e[3] for e in extra)
    if args.json:
        doc = {"ok": ok, "speed": project.speed, "axes": [axis_json(r) for r in reports]}
        for key, value, _, _ in extra:
            doc[key] = value
        doc["caution"] = CAUTION
        out.file.write(json.dumps(doc, indent=1, allow_nan=False) + "\n")
    else:
        name = project.machine.name or Path(args.file).stem
        out.print(f"[bold]{name}[/]  at {project.speed:g} cycles/min  ({args.file})")
        for report in reports:
            out.print()
            out.print(axis_table(report))
        for _, _, renderables, _ in extra:
            for r in renderables:
                out.print()
                out.print(r)
        out.print()
        out.print("ALL CHECKS PASS" if ok else "SOME CHECK FAILED", style="bold green" if ok else "bold red")
        out.print(f"[dim]{CAUTION}[/]")
    return EXIT_OK if ok else EXIT_OVER



# --- table -------------------------------------------------------------------

def _positive_float(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a number: {text!r}") from None
    if not (value > 0 and value < 360):
        raise argparse.ArgumentTypeError(f"must be above 0 and below 360, got {text}")
    return value


def _table_args(p):
    p.add_argument("file", help="project file (.toml)")
    p.add_argument("--axis", required=True, help="axis name")
    p.add_argument("--step", type=_positive_float, default=1.0, help="master-angle step in degrees (default 1)")
    p.add_argument("--out", help="write the CSV here instead of to stdout")


def motion_csv(project, axis_name: str, step: float) -> str:
    """CSV cam table: master, position, velocity, acceleration, jerk at full precision."""
    axis = project.axis(axis_name)
    theta, s, v, a, j = project.programs[axis_name].table(project.speed, step)
    return motion_csv_text(theta, s, v, a, j, axis.unit)


@command("table", "CSV motion table of one axis (or output)", _table_args)
def run_table(args, out: Console, err: Console) -> int:
    project = load_project(args.file)
    names = [a.name for a in project.axes]
    if args.axis in names:
        text = motion_csv(project, args.axis, args.step)
    else:
        text = None
        for source in TABLE_SOURCES:
            text = source(project, args.axis, args.step)
            if text is not None:
                break
        if text is None:
            known = ", ".join(names + [n for lister in TABLE_NAMES for n in lister(project)]) or "none"
            raise ProjectError(args.file, None, "--axis", f"no axis or output {args.axis!r} (known: {known})")
    if args.out:
        write_atomic(args.out, text)
    else:
        out.file.write(text)
    return EXIT_OK



# --- new -------------------------------------------------------------------

def _new_args(p):
    p.add_argument("path", help="the new project file")
    p.add_argument("--from", dest="preset", default=DEMO_PRESET, choices=preset_names(),
                   help=f"preset to start from (default {DEMO_PRESET})")
    p.add_argument("--force", action="store_true", help="overwrite an existing file")


@command("new", "start a new project file from a preset", _new_args)
def run_new(args, out: Console, err: Console) -> int:
    target = Path(args.path)
    if target.exists() and not args.force:
        err.print(f"{target}: already exists (use --force to overwrite)")
        return EXIT_INVALID
    write_atomic(target, preset_path(args.preset).read_text(encoding="utf-8"))
    out.print(f"wrote {target} from preset {args.preset}")
    return EXIT_OK



# --- entry -------------------------------------------------------------------

def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="camwright",
        description="Motion laws, linkages and cams for machine designers. "
        "`camwright FILE` opens the workbench on FILE.",
    )
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (help_text, arguments, run) in COMMANDS.items():
        p = sub.add_parser(name, help=help_text)
        arguments(p)
        p.set_defaults(run=run)
    return parser


def open_workbench(path: str | None, out: Console, err: Console) -> int:
    """Open the workbench; until the TUI exists, print the check report."""
    target = path or str(preset_path(DEMO_PRESET))
    try:
        from .app import run_app  # noqa: PLC0415 - the TUI is optional at this stage
    except ImportError:
        args = argparse.Namespace(file=target, json=False)
        return run_check(args, out, err)
    return run_app(target)


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    out = Console(soft_wrap=False)
    err = Console(stderr=True, soft_wrap=True)
    try:
        if argv and (argv[0] in COMMANDS or argv[0].startswith("-")):
            args = build_parser().parse_args(argv)
            if args.command is None:
                build_parser().print_help()
                return EXIT_OK
            return args.run(args, out, err)
        if len(argv) > 1:
            err.print(f"camwright: unexpected arguments {' '.join(argv[1:])!r}; see camwright --help")
            return EXIT_INVALID
        return open_workbench(argv[0] if argv else None, out, err)
    except (ProjectError, UsageError) as exc:
        err.print(exc.message, markup=False, highlight=False)
        return EXIT_INVALID
    except OSError as exc:
        err.print(f"camwright: {exc}", markup=False, highlight=False)
        return EXIT_INVALID
    except KeyboardInterrupt:
        return 130


from . import profilecmd  # noqa: E402,F401  (registers `camwright profile`)
