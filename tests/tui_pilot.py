"""Helpers for the pilot tests of the workbench (Textual's `App.run_test`)."""

from __future__ import annotations


async def settle(pilot, rounds: int = 2) -> None:
    """Let keys reach the views and the workers' results reach the widgets: `rounds` times a
    pause and the workers finishing (a result may start another worker), then a last pause."""
    for _ in range(rounds):
        await pilot.pause()
        await pilot.app.workers.wait_for_complete()
    await pilot.pause()
