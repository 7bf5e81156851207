"""The contract every constraint kind fulfils, and what it hands the solver.

A constraint kind is a subclass of `Constraint`.  One instance is one joint,
driver coordinate or output coordinate of a mechanism, named by the caller.
The solver groups all instances of one kind and evaluates them together, at
all instants at once, through the kind's class methods; so a kind is written
once, for k instances by N instants, with arrays shaped (k, N).

A kind must give (numbered as the solver uses them):

1. ``ROWS`` — equations per instance, and ``ROW_UNITS`` — "length" (m) or
   "angle" (rad) per row, so the solver can scale rows to compare them.
2. ``bind(model)`` — a `Binding`: the bodies it touches in slot order and its
   numbers (body-local points in m, directions, angles in rad) as arrays,
   checked against the model; raise `ModelError` naming the instance.
3. ``residual(par, *poses)`` — Φ for each row, a list of ROWS arrays (k, N).
4. ``jacobian(par, *poses)`` — for each row, the list of 3·slots partial
   derivatives w.r.t. (x, y, φ) of each slot in order.  An entry that does
   not depend on the configuration is returned as a plain number (0.0 for
   none): the solver then stores it once and may pivot on it.
5. ``gamma(par, poses, rates)`` — γ: minus the part of d²Φ/dθ² that does not
   contain q'' (so that Φq q'' = γ), one array or number per row.
6. ``eta(par, poses, rates, accels)`` — η: minus the part of d³Φ/dθ³ that
   does not contain q''' (so that Φq q''' = η).

Optionally, ``residual_jacobian(par, *poses)`` gives 3. and 4. together
(the base class calls the two); a kind overrides it to share the work
between them where that pays (the one-instant path, instant.py, calls it
once per instance and Newton iteration of a march step, on floats).

`par` maps each parameter name of the binding to its stack over instances,
component first and ready to broadcast: shape (d, k, 1) for a parameter of
d numbers, so ``sx, sy = par["s"]`` gives two (k, 1) columns; `poses` holds one `Pose` per slot, `rates` and `accels` one
`Rates` per slot (first and second derivatives w.r.t. master angle).  Time
never appears: a driver's time dependence is added by the solver from its
motion.  Adding a kind means writing one such subclass; nothing else changes.

A `Coordinate` is a one-row kind that measures something (a joint angle, a
stroke, a point's x): a driver holds it equal to a motion, an output reports
it with its derivatives.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from .errors import ModelError

LENGTH = "length"
ANGLE = "angle"


@dataclass(frozen=True)
class Binding:
    """What one instance contributes: its bodies (slot order) and its numbers."""

    bodies: tuple[str, ...]
    params: dict[str, np.ndarray]


class Constraint:
    """Base class of a constraint kind; the module docstring states the contract."""

    ROWS: ClassVar[int] = 0
    ROW_UNITS: ClassVar[tuple[str, ...]] = ()
    # every kind has a `name` (a dataclass field or a property) labelling its rows

    def resolve(self, model) -> "Constraint":
        """The instance that does the work (a reference to a joint resolves to it)."""
        return self

    def bind(self, model) -> Binding:  # pragma: no cover - contract
        raise NotImplementedError

    @classmethod
    def residual(cls, par, *poses):  # pragma: no cover - contract
        raise NotImplementedError

    @classmethod
    def jacobian(cls, par, *poses):  # pragma: no cover - contract
        raise NotImplementedError

    @classmethod
    def residual_jacobian(cls, par, *poses):
        """(residual rows, Jacobian rows) as `residual` and `jacobian` give them."""
        return cls.residual(par, *poses), cls.jacobian(par, *poses)

    @classmethod
    def gamma(cls, par, poses, rates):  # pragma: no cover - contract
        raise NotImplementedError

    @classmethod
    def eta(cls, par, poses, rates, accels):  # pragma: no cover - contract
        raise NotImplementedError

    def coordinate(self) -> "Coordinate | None":
        """The joint coordinate a driver or output may use (None: the kind has none)."""
        return None


class Coordinate(Constraint):
    """A one-row kind that measures a coordinate; `UNIT` is "m" or "rad"."""

    ROWS = 1
    ROW_UNITS = (LENGTH,)  # (ANGLE,) for a coordinate in rad
    UNIT: ClassVar[str] = "m"


def distinct_bodies(name: str, body_i: str, body_j: str) -> None:
    """Refuse a joint that joins a body to itself."""
    if body_i == body_j:
        raise ModelError(f"joint {name!r} joins body {body_i!r} to itself", name, "j")
