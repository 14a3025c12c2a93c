"""One entry of the design-file schema (:class:`Key`), its kinds of value and the shared
bounds; the entries themselves are in the ``schema_tables_*`` modules, gathered by
:mod:`plumbrod.design.schema`."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

__all__ = [
    "COORDINATE_LIMIT_MM",
    "KINDS",
    "MAX_GRID_POSES",
    "MAX_STEPS",
    "POINT",
    "POSITIVE",
    "Key",
    "key",
]

COORDINATE_LIMIT_MM = 100_000.0
"""Every coordinate within ±100 m of the origin (a car is a few metres long)."""
MAX_STEPS = 10_001
"""Poses of one sweep at most."""
MAX_GRID_POSES = 250_000
"""Poses of the heave-roll grid at most (product of its two step counts)."""

KINDS = (
    "table",  # a table of the keys below it
    "named",  # a table of tables (or values) whose names the user chooses: child "*"
    "string",
    "string_list",  # one or more strings (each one of the choices, when given)
    "boolean",
    "number",
    "integer",
    "point",  # [x, y, z] mm, or the view's two coordinates in a planar design
    "zone_point",  # [x, y, z] always; a planar design also takes its view's two
    "direction",  # [dx, dy, dz], or the view's two in a planar design (any length)
    "range",  # [from, to], from < to
    "vector3",  # three numbers
    "axis",  # two points
    "ends",  # two pickup names
    "outline",  # at least three [a, b] corners
    "steps2",  # two whole numbers
)

_NUMERIC_KINDS = (
    "number",
    "integer",
    "point",
    "zone_point",
    "direction",
    "range",
    "vector3",
    "axis",
)


@dataclass(frozen=True)
class Key:
    """One key of the design file.

    ``minimum``/``maximum`` bound the value (each number of a point, range or vector);
    ``open_minimum`` makes the lower bound exclusive (``> minimum``).  ``when`` limits
    the key to designs with one of the given tags: ``3d``, ``front``, ``side`` (the
    plane), ``double_wishbone``, or a zone kind ``box``/``cylinder``/``prism``.
    ``missing`` is the fix shown when a required key is absent; ``too_low`` a
    (problem, fix) pair replacing the usual message below the minimum, ``too_high``
    one above the maximum (``{value}`` is filled in).  ``shape`` names a vector's
    numbers in messages (``[lx, ly, lz]``), or gives an example of a list of strings.
    """

    path: str
    kind: str
    meaning: str
    unit: str = ""
    default: Any = None
    minimum: float | None = None
    maximum: float | None = None
    open_minimum: bool = False
    required: bool = False
    choices: tuple[str, ...] = ()
    when: tuple[str, ...] = ()
    missing: str = "add it"
    too_low: tuple[str, str] = ()  # type: ignore[assignment]
    too_high: tuple[str, str] = ()  # type: ignore[assignment]
    shape: str = ""

    @property
    def name(self) -> str:
        """The last part of the path."""
        return self.path.rsplit(".", 1)[-1]

    @property
    def parent(self) -> str:
        """The path of the table holding this key ("" for a top-level table)."""
        return self.path.rpartition(".")[0]

    @property
    def numeric(self) -> bool:
        """Whether the value is, or is made of, numbers with a range."""
        return self.kind in _NUMERIC_KINDS

    def applies(self, tags: tuple[str, ...] | frozenset[str]) -> bool:
        """Whether the key is allowed in a design with these tags."""
        return not self.when or any(t in tags for t in self.when)


POINT: dict[str, Any] = {
    "minimum": -COORDINATE_LIMIT_MM,
    "maximum": COORDINATE_LIMIT_MM,
    "unit": "mm",
}
"""The bounds and unit of every coordinate: ``key(..., **POINT)``."""
POSITIVE: dict[str, Any] = {"minimum": 0.0, "open_minimum": True}
"""More than zero: ``key(..., maximum=..., **POSITIVE)``."""


def key(path: str, kind: str, meaning: str, **more: Any) -> Key:
    """One schema entry (the tables' short spelling of :class:`Key`)."""
    return Key(path, kind, meaning, **more)
