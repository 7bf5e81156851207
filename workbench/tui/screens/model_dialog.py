"""The base of the dialogs whose result is an edited model.

Whoever opens one may `listen`: `candidate(model)` is called each time what
is typed (or highlighted) makes a model the dialog would accept, so its
numbers can be computed before Enter; `closing()` is called just before an
accepted model is handed back and the dialog leaves, so the one who listens
can hold screen updates and the screen under the dialog comes back in the
same update as the edit's plots (Textual repaints a resumed screen whole).

Keys typed right after the one that opened it go to its first field
(`screens.typed_ahead.FieldDialog`).
"""

from __future__ import annotations

from typing import Any, Callable

from .typed_ahead import FieldDialog


class ModelDialog(FieldDialog):
    """A modal dialog returning an edited model, or None when cancelled."""

    def __init__(self) -> None:
        super().__init__()
        self._told_candidate: Callable[[Any], None] | None = None
        self._told_closing: Callable[[], None] | None = None
        self._model_tried: tuple[Any, Any] | None = None

    def listen(self, candidate: Callable[[Any], None] | None = None,
               closing: Callable[[], None] | None = None) -> None:
        """Be told of each acceptable model as it is typed, and of the dialog closing with one."""
        self._told_candidate, self._told_closing = candidate, closing

    def tried(self, typed: Any, attempt: Callable[[], Any]) -> Any:
        """`attempt()`'s model for what is `typed` (a comparable key), made once: the Enter that
        accepts returns the very model offered while it was typed, whose numbers were computed
        ahead (they are found by identity).  A refusal (`EditError`) is raised each time."""
        if self._model_tried is not None and self._model_tried[0] == typed:
            return self._model_tried[1]
        model = attempt()
        self._model_tried = (typed, model)
        return model

    def offer(self, model: Any) -> None:
        """What is typed now makes `model` (None: nothing acceptable)."""
        if model is not None and self._told_candidate is not None:
            self._told_candidate(model)

    def accept(self, model: Any) -> None:
        """Close with `model` as the result (once: a second Enter that reaches a closing dialog
        does nothing)."""
        if not self.is_attached or self.app.screen is not self:  # closed already (pop is at once)
            return
        if self._told_closing is not None:
            self._told_closing()
        self.dismiss(model)

    def action_cancel(self) -> None:
        self.dismiss(None)
