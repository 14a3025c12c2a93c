"""The design-file schema: one entry per key path, the single source of truth.

Each :class:`Key` gives a key path (``*`` stands for a name the user chooses, as in
``corners.*.tyre_radius_mm``), its kind of value, unit, default, allowed range, whether
it is required, and a one-line meaning.  The section readers (``build_*.py``,
``car.py``, ``tradeoff_spec.py``, ``tune_spec.py``) take the allowed and required keys,
the defaults and the ranges from here; the key reference in ``examples/README.md``
(:mod:`plumbrod.design.reference`) and the JSON Schema
(:mod:`plumbrod.design.json_schema`) are generated from it.

The top-level tables are listed here; their keys live in one module per group of
tables: ``schema_tables_linkage`` (design, chassis, corners, rockers, elements, rods),
``schema_tables_setup`` (sweeps, limits, load cases, materials, zones),
``schema_tables_car`` (car, tradeoff) and ``schema_tables_tune`` (tune).  Adding a key
is one entry there (and the line in the section reader that hands its value to the
model).  See DEVELOPERS.md, "Adding a design-file key".
"""

from __future__ import annotations

from plumbrod.design.schema_key import (
    COORDINATE_LIMIT_MM,
    KINDS,
    MAX_GRID_POSES,
    MAX_STEPS,
    Key,
)
from plumbrod.design.schema_key import key as _k
from plumbrod.design.schema_tables_car import CAR_TRADEOFF_KEYS
from plumbrod.design.schema_tables_linkage import LINKAGE_KEYS
from plumbrod.design.schema_tables_setup import SETUP_KEYS
from plumbrod.design.schema_tables_tune import TUNE_TABLE_KEYS

__all__ = [
    "COORDINATE_LIMIT_MM",
    "KEYS",
    "KINDS",
    "MAX_GRID_POSES",
    "MAX_STEPS",
    "Key",
    "children",
    "entry",
]

TOP_LEVEL: tuple[Key, ...] = (
    _k("design", "table", "name and kind of the design", required=True,
       missing='add a [design] table with name = "..."'),
    _k("chassis", "table", "hardpoints fixed to the chassis"),
    _k("corners", "named", "the wheels the routes reach (at least one)", required=True,
       missing="add at least one [corners.<name>] table"),
    _k("rockers", "named", "rockers (bell cranks) turning about an axis in their parent"),
    _k("rods", "named", "straight two-force members between two pickups"),
    _k("elements", "named", "the aero elements carried (at least one)", required=True,
       missing="add at least one [elements.<name>] table"),
    _k("sweeps", "table", "ranges and steps of the motions swept"),
    _k("limits", "table", "limits of the checks (common practice unless you set your own)"),
    _k("load_cases", "named", "load cases; without them, two from top_speed_kmh"),
    _k("materials", "named", "materials added or overridden, by id"),
    _k("zones", "named", "keep-out solids fixed to the chassis"),
    _k("tune", "table",
       "what plumbrod tune may move, must meet and minimises (read by plumbrod tune only)"),
    _k("car", "table", "the car around the route: what the corners do not say"),
    _k("tradeoff", "table",
       "the car around the route for the ride study of plumbrod tradeoff; per corner means "
       "one wheel's share"),
)  # fmt: skip

KEYS: tuple[Key, ...] = TOP_LEVEL + LINKAGE_KEYS + SETUP_KEYS + TUNE_TABLE_KEYS + CAR_TRADEOFF_KEYS
"""Every entry; a table's keys are listed (and documented) in this order."""

_BY_PATH = {k.path: k for k in KEYS}


def entry(path: str) -> Key:
    """The schema entry of a key path written with ``*`` for user-chosen names."""
    return _BY_PATH[path]


def children(path: str, tags: tuple[str, ...] | frozenset[str] | None = None) -> tuple[Key, ...]:
    """The keys directly inside the table at ``path``, in table order; with ``tags``,
    only those that apply to such a design."""
    return tuple(k for k in KEYS if k.parent == path and (tags is None or k.applies(tags)))
