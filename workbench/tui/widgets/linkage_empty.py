"""What the Linkage view says when the project has no `[[linkage]]`: what one is, with an example.

The example is the README's offset slider-crank, shortened (its pusher
face and most comments left out); a test checks that it reads as a valid
table.  Wide enough, it is shown in two columns so it fits without scrolling.
"""

from __future__ import annotations

from rich.table import Table
from rich.text import Text

EXAMPLE = """\
[[linkage]]
name = "pusher"

[linkage.ground]                  # fixed points (mm)
O = [0.0, 0.0]
G = [0.0, 20.0]

[[linkage.body]]
name = "crank"
place = [0.0, 0.0, 0.0]           # x, y (mm), angle (deg)
points = { O = [0.0, 0.0], A = [55.0, 0.0] }

[[linkage.body]]
name = "rod"
place = [55.0, 0.0, 5.5]
points = { A = [0.0, 0.0], B = [210.0, 0.0] }

[[linkage.body]]
name = "head"
place = [264.0, 20.0, 0.0]
points = { B = [0.0, 0.0] }

[[linkage.joint]]
name = "O"
pin = ["ground.O", "crank.O"]

[[linkage.joint]]
name = "A"
pin = ["crank.A", "rod.A"]

[[linkage.joint]]
name = "B"
pin = ["rod.B", "head.B"]

[[linkage.joint]]
name = "slide"
slider = ["ground.G", "head.B"]   # guide point, sliding point

[[linkage.driver]]
name = "motor"
joint = "O"                       # the angle at pin O
turns = 1.0                       # or axis = "an-axis-in-deg"

[[linkage.output]]
name = "stroke"
joint = "slide"                   # travel on the slider (mm)

[linkage.output.limits]
velocity = 600.0                  # mm/s
"""
TWO_COLUMNS = 110  # from this width on, the example is shown in two columns
SPLIT_AT = "[[linkage.joint]]"  # the second column starts at the first joint


def example_text(project=None) -> str:
    """The example; its driver's comment names an axis of the project in deg when there is one."""
    axis = next((a.name for a in project.axes if a.unit == "deg"), None) if project is not None else None
    return EXAMPLE.replace('"an-axis-in-deg"', f'"{axis}"') if axis else EXAMPLE


def example_columns(text: str) -> tuple[str, str]:
    """The example cut in two at its first joint table."""
    cut = text.index(SPLIT_AT)
    return text[:cut].rstrip("\n"), text[cut:].rstrip("\n")


def no_linkage_text(project, width: int):
    """No [[linkage]] in the project: what a linkage table is, an example, where to read more."""
    head = Text()
    head.append("This project has no [[linkage]] table.\n\n", style="bold")
    head.append("A [[linkage]] table is a planar linkage drawn at master 0°: fixed points, bodies with their "
                "points, the joints between them, a driver (a joint turned steadily or following an axis) "
                "and the outputs to report against their limits. For example, an offset slider-crank:\n")
    foot = Text("Add one to the file, then open it again (ctrl+o). The README's Linkages section has every "
                "key; presets/slider-crank.toml, crank-rocker.toml, six-bar-press.toml and "
                "servo-carriage.toml are whole examples.", style="dim")
    example = example_text(project)
    grid = Table.grid(padding=(0, 4))
    if width >= TWO_COLUMNS:
        left, right = example_columns(example)
        grid.add_column()
        grid.add_column()
        grid.add_row(Text(left, style="cyan"), Text(right, style="cyan"))
    else:
        grid.add_column()
        grid.add_row(Text(example.rstrip("\n"), style="cyan"))
    out = Table.grid()
    out.add_column()
    out.add_row(head)
    out.add_row(grid)
    out.add_row(Text(""))
    out.add_row(foot)
    return out
