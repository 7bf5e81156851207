"""CSV tables at full precision: every float as its shortest exact repr."""

from __future__ import annotations

import io


def csv_text(header: list[str], columns) -> str:
    """CSV with `header` and one row per index of the equal-length `columns`."""
    buf = io.StringIO()
    buf.write(",".join(header) + "\n")
    for row in zip(*(c.tolist() for c in columns)):
        buf.write(",".join(repr(x + 0.0) for x in row) + "\n")
    return buf.getvalue()


def motion_csv_text(theta, s, v, a, j, unit: str) -> str:
    """The motion table of DESIGN §7: master angle, position and its three time derivatives."""
    header = [
        "master [deg]",
        f"position [{unit}]",
        f"velocity [{unit}/s]",
        f"acceleration [{unit}/s^2]",
        f"jerk [{unit}/s^3]",
    ]
    return csv_text(header, (theta, s, v, a, j))
