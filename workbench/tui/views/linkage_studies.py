"""How the Linkage view gets its studies: from a cache, or from a worker off the UI thread.

`LinkageStudies` is mixed into `LinkageView` (which gives `project`, `spec`,
`entry`, `fresh`, `angle`, `output_name`, `rate`, `rate_chosen`, `_cache`,
`_waiting` and `_refresh_all`).  A study is asked for only when what the
linkage depends on has changed (`linkage_data.same_inputs`: its table, the
machine speed, the axes its drivers follow); the last `CACHE` studies are
kept, so stepping through linkages and undo cost no solve.  A study that
fails unexpectedly is said on screen, not left "computing".
"""

from __future__ import annotations

from textual import work
from textual.message import Message
from textual.worker import Worker, WorkerState, get_current_worker

from ...linkagefile import linkage_specs
from ...projectfile import Project
from ..messages import Status
from ..widgets.linkage_data import STUDY_FAILED, LinkageEntry, entry_of, same_inputs, study_entry
from ..widgets.linkage_report import stop_text

CACHE = 8  # studies kept (by what they depend on): stepping through linkages and undo cost no solve


class LinkageStudies:
    """Asking for, caching and taking the study of the linkage on view (a mixin of `LinkageView`)."""

    class Studied(Message):
        """The worker has studied linkage `name` of `project` (`inputs`: what the study depends on)."""

        def __init__(self, project: Project, name: str, inputs: tuple, entry: LinkageEntry) -> None:
            super().__init__()
            self.project, self.name, self.inputs, self.entry = project, name, inputs, entry

    def _request(self) -> None:
        """Show the study of the linkage on view: from the cache, or start the worker for it."""
        spec = self.spec
        if spec is None:
            self.entry, self.fresh = None, False
            self._refresh_all()
            return
        inputs = same_inputs(self.project, spec)
        cached = next((e for k, e in self._cache if k == inputs), None)
        if cached is not None:
            self._take(cached)
            return
        self.fresh = False
        if self.entry is not None and self.entry.spec != spec:
            self.entry = None  # another linkage's drawing (or outputs) would mislead; an axis edit keeps it
        self._refresh_all()
        self.study(self.project, spec.name, inputs)

    @work(thread=True, exclusive=True, group="linkage-view", exit_on_error=False)
    def study(self, project: Project, name: str, inputs: tuple) -> None:
        """Study one linkage of `project` off the UI thread; a newer request cancels an older one."""
        spec = next(s for s in linkage_specs(project) if s.name == name)
        entry = study_entry(project, spec)
        if not get_current_worker().is_cancelled:
            self.post_message(self.Studied(project, name, inputs, entry))

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        """A study that fails unexpectedly is said on screen, not left "computing" for ever."""
        worker = event.worker
        if worker.group != "linkage-view" or event.state != WorkerState.ERROR or self.spec is None:
            return
        problem = f"{STUDY_FAILED} ({type(worker.error).__name__}: {worker.error})"
        self.post_message(Status(problem, error=True))
        self._take(entry_of(self.project, self.spec, None, problem))

    def on_linkage_studies_studied(self, message: Studied) -> None:
        """Keep the study in the cache; take it when it is still the one on view."""
        self._cache = [(k, e) for k, e in self._cache if k != message.inputs][-(CACHE - 1):]
        self._cache.append((message.inputs, message.entry))
        if message.project is not self.project or message.name != self.linkage_name:
            return  # a newer state or another linkage is on its way
        self._take(message.entry)

    def _take(self, entry: LinkageEntry) -> None:
        before = self.entry if self.entry is not None and self.entry.name == entry.name else None
        self.entry, self.fresh = entry, True
        if entry.runs and not entry.solved:  # stops part way: show where, the first time it does
            if before is None or before.solved or self.angle > entry.last:
                self.angle = entry.last
                self.post_message(Status(f"linkage {entry.name} stops at master {stop_text(entry.last)}: "
                                         "drawn there; ← steps back", error=True))
        self._choose_rate()
        self._refresh_all()
        waiting, self._waiting = self._waiting, []
        for action in waiting:
            action()

    def _choose_rate(self) -> None:
        """Until the user picks, plot the rate whose limit is most used."""
        study = self.entry.output_study(self.output_name) if self.entry and self.output_name else None
        if self.rate_chosen or study is None or not study.checks:
            return
        self.rate = max(study.checks, key=lambda c: c.used).quantity

    def _when_studied(self, action) -> bool:
        """True to go on now; False while the linkage is being studied (`action` runs then)."""
        if self.fresh or self.spec is None:
            return True
        self._waiting.append(action)
        return False
