"""Write the README's screenshots (docs/*.svg) from the running workbench.

Each view is opened on a preset through Textual's pilot, left to settle
(its numbers computed and painted), and saved as SVG.  Run after a change
that alters a screen the README shows:

    .venv/bin/python docs/screens.py
"""

from __future__ import annotations

import asyncio
from pathlib import Path

from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import load_project

DOCS = Path(__file__).resolve().parent
# file name, preset, terminal size (columns, rows), keys pressed after opening
SCREENS = (
    ("axes-view.svg", "tray-lidder", (120, 40), ()),
    ("timing-view.svg", "label-arm", (100, 30), ("2",)),
    ("linkage-view.svg", "six-bar-press", (120, 40), ("3",)),
    ("cam-view.svg", "cam-press", (120, 40), ("4",)),
    ("loads-view.svg", "cam-press", (120, 40), ("5",)),
)


async def settle(pilot) -> None:
    for _ in range(3):
        await pilot.pause()
        await pilot.app.workers.wait_for_complete()
    await pilot.pause(0.2)


async def shoot(name: str, preset: str, size: tuple[int, int], keys: tuple[str, ...]) -> None:
    app = Workbench(load_project(preset_path(preset)))
    async with app.run_test(size=size) as pilot:
        await settle(pilot)
        for key in keys:
            await pilot.press(key)
            await settle(pilot)
        app.save_screenshot(str(DOCS / name))


def main() -> None:
    for screen in SCREENS:
        asyncio.run(shoot(*screen))
        print(f"wrote docs/{screen[0]}")


if __name__ == "__main__":
    main()
