"""What the Cam view says when the project has no `[[cam]]`: what one is, with an example.

The example is the smallest useful table of the README's Cams section, on
an axis of the project in mm where there is one; a test checks that it
reads as a valid table.
"""

from __future__ import annotations

from rich.text import Text

from ...projectfile import Project

EXAMPLE = (  # (key = value, comment): the smallest useful [[cam]], from the README's Cams section
    ("[[cam]]", ""),
    ('name = "{name}"', "unique among the cams"),
    ('axis = "{axis}"', "the axis whose motion the follower makes"),
    ('turning = "cw"', '"cw" or "ccw"'),
    ("", ""),
    ("[cam.follower]", ""),
    ('type = "translating-roller"', 'an axis in deg: "oscillating-roller"'),
    ("prime_radius = 60.0", "mm"),
    ("roller_radius = 12.0", "mm"),
    ("offset = 6.0", "mm"),
)
COMMENT_COLUMN = 31  # where the example's comments start


def example_text(axis: str) -> str:
    """The example [[cam]] table for an axis named `axis`, comments lined up."""
    lines = []
    for code, comment in EXAMPLE:
        code = code.format(name=f"{axis}-cam", axis=axis)
        lines.append(f"{code.ljust(COMMENT_COLUMN - 1)} # {comment}" if comment else code)
    return "\n".join(lines)


def no_cam_text(project: Project | None) -> Text:
    """What to say when the project has no [[cam]]: what a cam table is, with an example."""
    axis = next((a.name for a in project.axes if a.unit == "mm" and not a.index), None) if project else None
    text = Text()
    text.append("This project has no [[cam]] table.\n\n", style="bold")
    text.append("A [[cam]] table turns an axis into a disk cam: the axis motion becomes the follower's "
                "motion against cam angle. Add one to the file, for example:\n\n")
    text.append(example_text(axis or "an-axis-in-mm") + "\n\n", style="cyan")
    text.append("then open the file again (ctrl+o). The README's Cams section lists every follower type, "
                "[cam.limits] and [cam.loads].", style="dim")
    return text
