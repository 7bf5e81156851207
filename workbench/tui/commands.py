"""The command palette: every bound action of the app and of each view, every axis and view by name.

Entries are built from the live bindings (as the help is), so a new binding
is in the palette without a line here.
"""

from __future__ import annotations

from functools import partial

from textual.command import DiscoveryHit, Hit, Hits, Provider

from .screens.help import live_bindings


class WorkbenchCommands(Provider):
    """Searches `app.command_entries()`: (name, help, callback)."""

    async def discover(self) -> Hits:
        for name, help_text, callback in self.app.command_entries():
            yield DiscoveryHit(name, callback, help=help_text)

    async def search(self, query: str) -> Hits:
        matcher = self.matcher(query)
        for name, help_text, callback in self.app.command_entries():
            score = matcher.match(name)
            if score > 0:
                yield Hit(score, matcher.highlight(name), callback, help=help_text)


def binding_entries(app, title: str, node, switch=None):
    """(name, help, callback) for every described binding of `node`; `switch` runs first."""
    seen = set()
    for _, binding in live_bindings(app, node):
        if not binding.description or binding.system or binding.action in seen:
            continue
        seen.add(binding.action)
        key = app.get_key_display(binding)
        name = f"{title}: {binding.description}" if title else binding.description
        help_text = f"{binding.tooltip or binding.description}  [{key}]"
        yield name, help_text, partial(_run, app, binding.action, node, switch)


def _run(app, action: str, node, switch) -> None:
    if switch is not None:
        switch()
    app.call_later(app.run_action, action, node)
