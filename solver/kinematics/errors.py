"""The one error a mechanism model raises: a fault in what the caller built."""

from __future__ import annotations


class ModelError(ValueError):
    """A mechanism that cannot be built or solved as given.

    `item` names the body, joint, driver or output at fault (None for the
    model as a whole); `key` names the argument or field that is wrong (None
    if no single one), so that a file reader can point at the line.
    """

    def __init__(self, message: str, item: str | None = None, key: str | None = None):
        super().__init__(message)
        self.message = message
        self.item = item
        self.key = key
