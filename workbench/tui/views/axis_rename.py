"""Renaming the axis on view in the Axes view (`n`), with the cams and linkage drivers that follow it.

The value dialog (`EditDialog`) tries every keystroke on the model
(`workbench.editing.rename_axis`): a blank name, the same name, or one taken
by another axis or by a table of the project is refused there with the
reason; the preview names what follows the axis under its new name.  The
accepted project is applied at once (`Workbench.apply_edit`: one undo step,
saved like every other edit), and the view stays on the renamed axis.
"""

from __future__ import annotations

from ... import editing
from ...projectfile import Project
from ..screens.edit_value import EditDialog


def followers_words(project: Project, name: str) -> str:
    """"cam "stamp-cam" and linkage "press" driver "crank"", or "nothing else" when nothing follows it."""
    users = editing.axis_users(project, name)
    if not users:
        return "nothing else"
    return ", ".join(users[:-1]) + (" and " if len(users) > 1 else "") + users[-1]


def rename_dialog(project: Project, old: str) -> EditDialog:
    """The value dialog for the new name of axis `old`."""

    def attempt(text, _choice):
        return editing.rename_axis(project, old, text)

    def explain(edited: Project) -> str:
        if edited is project:
            return "no change"
        new = edited.axes[[a.name for a in project.axes].index(old)].name
        follow = editing.axis_users(project, old)
        return f"{old} → {new}" + (f"; {followers_words(edited, new)} follow{'s' if len(follow) == 1 else ''}"
                                   if follow else "")

    users = editing.axis_users(project, old)
    follow = (f"{followers_words(project, old)} follow{'s' if len(users) == 1 else ''} it, renamed with it"
              if users else "no cam or linkage driver follows it")
    return EditDialog(f"Name of axis {old}", f"name — unique among the axes; {follow}:", old, attempt, explain)


def start_rename(view) -> None:
    """Ask for a new name of the axis on `view` (the Axes view); the edit goes to the app, and the
    view is put back on the axis under its new name once the app has sent the new project down."""
    project, old = view.project, view.axis_name
    if project is None or old is None:
        return

    def done(edited: Project | None) -> None:
        if edited is None or edited is project:
            return
        index = [a.name for a in project.axes].index(old)
        new = edited.axes[index].name
        follow = followers_words(edited, new)
        note = f"renamed axis {old} to {new}" + ("" if follow == "nothing else" else f" ({follow} too)")
        view.app.apply_edit(edited, note)
        view.app.call_later(view.select_axis, new)  # after the app's handling of the edit, in its queue

    view.app.push_screen(rename_dialog(project, old), done)
