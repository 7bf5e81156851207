"""The one error of the cam geometry: a cam that cannot be laid out as given."""

from __future__ import annotations


class CamGeometryError(ValueError):
    """Follower dimensions or a motion that admit no cam.

    `key` names the parameter at fault (``"prime_radius"``, ``"arm_length"``,
    …; None when no single parameter is to blame) so that the caller can point
    at the matching key of the project file.  The message speaks of the
    geometry only and carries no numbers in units, which the caller adds.
    """

    def __init__(self, message: str, key: str | None = None):
        super().__init__(message)
        self.message = message
        self.key = key
