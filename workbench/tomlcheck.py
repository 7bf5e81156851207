"""Reading checked values out of parsed TOML tables, with messages that say where.

Every message names the file, the table (e.g. ``axis "lid-lift", segment 3``)
and the key, so that a user can go straight to the line at fault.
"""

from __future__ import annotations

import math
from pathlib import Path


class ProjectError(Exception):
    """A project file that cannot be used: one clear message, no traceback."""

    def __init__(self, file: str | Path | None, where: str | None, key: str | None, problem: str):
        self.file = str(file) if file is not None else None
        self.where = where
        self.key = key
        self.problem = problem
        super().__init__(self.message)

    @property
    def message(self) -> str:
        parts = [p for p in (self.file, self.where) if p]
        if self.key:
            parts.append(f'key "{self.key}"')
        parts.append(self.problem)
        return ": ".join(parts)


class Table:
    """A parsed TOML table read key by key; `done()` refuses keys nobody asked for."""

    def __init__(self, data, file, where: str | None):
        self.file = file
        self.where = where
        if not isinstance(data, dict):
            raise self.error(None, f"must be a table, got {type(data).__name__}")
        self.data = data
        self.seen: set[str] = set()

    def error(self, key: str | None, problem: str) -> ProjectError:
        return ProjectError(self.file, self.where, key, problem)

    def has(self, key: str) -> bool:
        return key in self.data

    def raw(self, key: str, default=None):
        self.seen.add(key)
        return self.data.get(key, default)

    def number(self, key: str, *, required=False, positive=False, default=None) -> float | None:
        """A finite float (TOML integers accepted); None when absent and not required."""
        self.seen.add(key)
        if key not in self.data:
            if required:
                raise self.error(key, "is missing")
            return default
        value = self.data[key]
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise self.error(key, f"must be a number, got {value!r}")
        if not math.isfinite(value):
            raise self.error(key, f"must be finite, got {value!r}")
        if positive and value <= 0:
            raise self.error(key, f"must be positive, got {value!r}")
        return float(value)

    def text(self, key: str, *, required=False, default=None, choices=None) -> str | None:
        self.seen.add(key)
        if key not in self.data:
            if required:
                raise self.error(key, "is missing")
            return default
        value = self.data[key]
        if not isinstance(value, str):
            raise self.error(key, f"must be a string, got {value!r}")
        if choices is not None and value not in choices:
            raise self.error(key, f"must be one of {', '.join(map(repr, choices))}, got {value!r}")
        return value

    def tables(self, key: str, *, required=False) -> list[dict]:
        """An array of tables (``[[key]]``); [] when absent and not required."""
        self.seen.add(key)
        if key not in self.data:
            if required:
                raise self.error(key, "is missing")
            return []
        value = self.data[key]
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            raise self.error(key, f"must be an array of tables ([[{key}]])")
        return value

    def table(self, key: str, where: str) -> "Table | None":
        self.seen.add(key)
        if key not in self.data:
            return None
        return Table(self.data[key], self.file, where)

    def done(self) -> None:
        extra = [k for k in self.data if k not in self.seen]
        if extra:
            raise self.error(extra[0], "is not a known key here" + _known(self.seen))


def _known(keys) -> str:
    return f" (known: {', '.join(sorted(keys))})" if keys else ""
