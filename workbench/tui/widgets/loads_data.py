"""What the Loads view shows, and the hook through which each part adds its loads.

A *loads source* turns a project into `LoadsItem`s — one per thing that
loads the drive (a spring-closed cam follower, later a linkage's driver):
plots against cam angle, figures in words with their units and verdicts,
and notes.  Sources register by the project-file part they read:

    register_loads_source("linkage", linkage_drive_loads)

A module in this folder whose name is in `SOURCE_MODULES` is imported by
the Loads view when it exists, so `loads_linkage.py` ending in that call is
all a new source needs.  Until a part has a source, `unshown_parts` names
it and the view says its loads are not shown yet.  Nothing here imports
Textual beyond the plot specs' data classes.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

from ...projectfile import Project
from .cam_plots import PlotSpec

SOURCE_MODULES = ("loads_cam", "loads_linkage")  # modules here that register a loads source
PENDING = {  # parts whose loads belong in this view, and what they will be
    "linkage": "the drive torque of its driver",
}


@dataclass(frozen=True)
class Figure:
    """One line of figures: what, the value with its unit, where (cam angle) and a verdict in words.

    ok: True / False colours the verdict (its words and symbol say the same), None leaves it plain."""

    what: str
    value: str
    at: str = ""
    verdict: str = ""
    ok: bool | None = None


@dataclass(frozen=True)
class LoadsItem:
    """One thing that loads the drive, as the Loads view shows it."""

    name: str
    kind: str  # e.g. "cam follower"
    ok: bool | None  # None: nothing to judge
    verdict: str  # words and symbol, e.g. "✓ contact holds"
    about: tuple[str, ...]  # what it is and at what speed, in pieces the bar shows as far as they fit
    plots: tuple[PlotSpec, ...]
    figures: tuple[Figure, ...]
    notes: tuple[str, ...] = ()
    caution: str = ""
    readout: Callable[[float], str] | None = None  # the values at a cam angle (deg), in words
    values: dict = field(default_factory=dict)  # the numbers behind the figures (SI-free: N, N·m, deg)


LoadsSource = Callable[[Project], list[LoadsItem]]
LOADS_SOURCES: dict[str, LoadsSource] = {}


def register_loads_source(part_key: str, source: LoadsSource) -> LoadsSource:
    """Add (or replace) the source of loads for the project-file part `part_key`."""
    LOADS_SOURCES[part_key] = source
    return source


def collect_loads(project: Project) -> list[LoadsItem]:
    """Every item of every registered source, in registration order.  A source that fails gives
    one item saying so (the others still show)."""
    items: list[LoadsItem] = []
    for key, source in LOADS_SOURCES.items():
        try:
            items += source(project)
        except Exception as exc:  # noqa: BLE001 - a source's fault is shown, never a traceback
            items.append(LoadsItem(f"[[{key}]]", key, False, "✗ NOT COMPUTED", (), (), (),
                                   (f"the loads of the [[{key}]] tables could not be computed: {exc}",)))
    return items


def unshown_parts(project: Project) -> list[tuple[str, int, str]]:
    """(part key, number of tables, what will be shown) for parts of `project` whose loads
    belong here but have no source yet."""
    out = []
    for key, what in PENDING.items():
        tables = project.parts.get(key) or []
        if tables and key not in LOADS_SOURCES:
            out.append((key, len(tables), what))
    return out
