"""The registry of views: Axes, Timing, Linkage, Cam, Loads — in that order on the view bar.

`register_view(cls)` adds a view or replaces the one with the same
`view_id`.  At import, every module named in `PLUGIN_MODULES` that exists is
imported, so a module `workbench/tui/views/cam.py` that ends with
`register_view(CamView)` takes the place of the stand-in by being added.
"""

from __future__ import annotations

import importlib
import importlib.util

from .axes import AxesView
from .base import WorkbenchView
from .pending import CamPending, LinkagePending, LoadsPending
from .timing import TimingView

VIEWS: dict[str, type[WorkbenchView]] = {}
PLUGIN_MODULES = ("linkage", "cam", "loads")  # views being built; each replaces its stand-in


def register_view(cls: type[WorkbenchView]) -> type[WorkbenchView]:
    VIEWS[cls.view_id] = cls
    return cls


for _cls in (AxesView, TimingView, LinkagePending, CamPending, LoadsPending):
    register_view(_cls)

for _name in PLUGIN_MODULES:
    if importlib.util.find_spec(f"{__name__}.{_name}") is not None:
        importlib.import_module(f"{__name__}.{_name}")

__all__ = ["VIEWS", "WorkbenchView", "register_view"]
