"""Helpers for the pilot tests of the workbench (Textual's `App.run_test`)."""

from __future__ import annotations

import asyncio

from textual.worker import WorkerCancelled, WorkerState

_UNFINISHED = (WorkerState.PENDING, WorkerState.RUNNING)


async def workers_done(app) -> None:
    """Wait until no worker of `app` is pending or running. A worker cancelled on the way is
    normal (a newer edit replaces an older one's numbers) and is not an error; a worker that
    failed raises, as Textual's `wait_for_complete` does."""
    while True:
        pending = [worker for worker in app.workers if worker.state in _UNFINISHED]
        if not pending:
            return
        results = await asyncio.gather(*(worker.wait() for worker in pending), return_exceptions=True)
        for result in results:
            if isinstance(result, BaseException) and not isinstance(result, WorkerCancelled):
                raise result


async def settle(pilot, rounds: int = 2) -> None:
    """Let keys reach the views and the workers' results reach the widgets: `rounds` times a
    pause and the workers finishing (a result may start another worker), then a last pause."""
    for _ in range(rounds):
        await pilot.pause()
        await workers_done(pilot.app)
    await pilot.pause()
