"""Read a design file's ``[tune]`` table: the free variables, their bounds, the targets.

Each value is read through its schema entry (``schema_tables_tune.py``: kind, unit,
range, default); this module keeps the checks across keys (points or pivot, line or
box, an empty or inverted bound, names that exist).  Every problem is one
:class:`~plumbrod.errors.DesignFileError` naming the file and the key.

A variable moves one or more points together by the same offset (mm, chassis frame):
pickups named ``<body>.<pickup>`` (``points``), or a rocker's whole pivot axis
(``pivot``).  The offset runs along a line (``line = [dx, dy, dz]`` with
``range_mm = [from, to]``) or within a box (``box_mm = { x = [lo, hi], z = [lo, hi] }``;
axes left out stay fixed).  In a planar design a line and a box use the view's two
coordinates.  With ``[design] mirror = true`` every moved point whose name has a
right-hand copy moves that copy too, mirrored (y negated).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from plumbrod.design.model import Design, Limits
from plumbrod.design.reader import Reader, guess, join_key
from plumbrod.design.schema import Key, children, entry

__all__ = ["TUNE_KEYS", "TuneSpec", "TuneTargets", "TuneVariable", "read_tune"]

TUNE_KEYS = tuple(k.name for k in children("tune"))
"""The keys of ``[tune]`` (their kinds, units and ranges: ``schema_tables_tune.py``)."""
_VARIABLE = "tune.variables.*"
_AXES = ("x", "y", "z")


@dataclass(frozen=True)
class TuneVariable:
    """One scalar free variable: ``offset = value * direction`` for each point it moves."""

    name: str
    """``<variable>`` or ``<variable>.<axis>`` for a box."""
    key: str
    """The design-file key path it came from (for messages)."""
    low: float
    high: float
    points: tuple[str, ...]
    """Linkage point names moved (mirrored copies included)."""
    directions: tuple[tuple[float, float, float], ...]
    """Unit offset of each point per unit of the variable (mm/mm)."""


@dataclass(frozen=True)
class TuneTargets:
    """Constraint limits of the search; each defaults to the design's check limit."""

    route_ratio: float
    route_ratio_range: tuple[float, float]
    line_of_action_deg: float
    transmission_angle_deg: tuple[float, float]
    heave_sensitivity: float
    buckling_reserve: float
    tension_reserve: float
    clearance_mm: float
    sprung_leakage: float
    """Avoidable spring-load change, as a share of the element's vertical load."""


@dataclass(frozen=True)
class TuneSpec:
    """What ``plumbrod tune`` may move, what it must meet and what it minimises."""

    variables: tuple[TuneVariable, ...]
    targets: TuneTargets
    weights: dict[str, float]
    seed: int | None = None
    population: int = 24
    generations: int = 40
    screen_steps: int = 33
    polish: int = 3
    groups: dict[str, tuple[str, ...]] = field(default_factory=dict)
    """Variable name -> the file points it moves (left-hand originals only)."""
    pivots: dict[str, str] = field(default_factory=dict)
    """Variable name -> rocker whose pivot it moves."""

    @property
    def bounds(self) -> list[tuple[float, float]]:
        return [(v.low, v.high) for v in self.variables]


def _bound(r: Reader, value: Any, key: str, spec: Key) -> tuple[float, float]:
    """A ``[from, to]`` bound: each number by the schema entry, then from < to."""
    lo, hi = r.numbers(value, key, 2, "[from, to]", spec)
    if lo == hi:
        r.fail(key, f"empty bound [{lo:g}, {hi:g}]", "give from < to")
    if lo > hi:
        r.fail(key, f"inverted bound [{lo:g}, {hi:g}]", "put the smaller value first")
    return lo, hi


def _mirror_of(point: str, names: tuple[str, ...]) -> str | None:
    if "left" not in point:
        return None
    other = point.replace("left", "right")
    return other if other in names else None


def read_tune(design: Design, data: dict[str, Any], point_names: tuple[str, ...]) -> TuneSpec:
    """The validated ``[tune]`` table of a design's TOML ``data``.

    ``point_names`` are the linkage's point names (pickups and rocker axis points).
    Raises DesignFileError naming the key when the table is missing or wrong.
    """
    r = Reader(design.source, design.plane)
    if "tune" not in data:
        r.fail("tune", "missing table", "add a [tune] table (see examples/README.md)")
    tune = r.table(data["tune"], "tune", "tune")
    options = {
        name: r.value(tune, "tune", f"tune.{name}")
        for name in ("population", "generations", "screen_steps", "polish")
    }
    seed = r.value(tune, "tune", "tune.seed") if "seed" in tune else None
    raw_vars = r.named(tune["variables"], "tune.variables")
    if not raw_vars:
        r.fail("tune.variables", "no free variable", "add [tune.variables.<name>]")
    variables: list[TuneVariable] = []
    groups: dict[str, tuple[str, ...]] = {}
    pivots: dict[str, str] = {}
    rockers = [rk.name for rk in design.rockers]
    head = data.get("design", {})
    mirror = bool(head.get("mirror", False)) if isinstance(head, dict) else False
    for vname, raw in raw_vars.items():
        key = join_key("tune.variables", vname)
        r.name(vname, key)
        table = r.table(raw, key, _VARIABLE)
        if ("points" in table) == ("pivot" in table):
            both = "points" in table
            r.fail(
                key,
                "points and pivot are both given" if both else "give either points or pivot",
                "keep one of them" if both else 'e.g. points = ["rocker.arm"]',
            )
        if "points" in table:
            file_points = r.value(table, key, f"{_VARIABLE}.points")
            for i, p in enumerate(file_points):
                if p not in design.pickups:
                    hint = guess(p, design.pickups, "use <body>.<pickup>")
                    r.fail(f"{key}.points", f"no pickup '{p}'", hint)
                if p in file_points[:i]:
                    r.fail(f"{key}.points", f"'{p}' is listed twice", "list each point once")
            groups[vname] = file_points
        else:
            rocker = r.value(table, key, f"{_VARIABLE}.pivot")
            if rocker not in rockers:
                r.fail(
                    f"{key}.pivot", f"no rocker '{rocker}'", guess(rocker, rockers, "name a rocker")
                )
            pivots[vname] = rocker
            file_points = (f"{rocker}.axis_a", f"{rocker}.axis_b")
        moved: list[tuple[str, float]] = []  # point, y sign
        for p in file_points:
            moved.append((p, 1.0))
            if mirror:
                other = _mirror_of(p, point_names)
                if other is not None:
                    moved.append((other, -1.0))
        if ("line" in table) == ("box_mm" in table):
            both = "line" in table
            r.fail(
                key,
                "line and box_mm are both given" if both else "give either line or box_mm",
                "keep one of them"
                if both
                else "add line = [dx, dy, dz] with range_mm = [from, to], or box_mm",
            )
        axes: list[tuple[str, np.ndarray, tuple[float, float], str]] = []
        if "line" in table:
            vec = np.array(r.value(table, key, f"{_VARIABLE}.line"))
            size = float(np.linalg.norm(vec))
            if size == 0.0:
                r.fail(f"{key}.line", "zero direction", "give a direction")
            if "range_mm" not in table:
                r.fail(f"{key}.range_mm", "missing key", "add range_mm = [from, to]")
            bkey = f"{key}.range_mm"
            spec = entry(f"{_VARIABLE}.range_mm")
            axes.append((vname, vec / size, _bound(r, table["range_mm"], bkey, spec), bkey))
        else:
            if "range_mm" in table:
                r.fail(f"{key}.range_mm", "range_mm goes with line, not box_mm", "remove it")
            box = r.table(table["box_mm"], f"{key}.box_mm", f"{_VARIABLE}.box_mm")
            if not box:
                r.fail(f"{key}.box_mm", "no axis", "e.g. box_mm = { x = [-10, 10] }")
            for axis, value in box.items():
                unit = np.zeros(3)
                unit[_AXES.index(axis)] = 1.0
                bkey = f"{key}.box_mm.{axis}"
                spec = entry(f"{_VARIABLE}.box_mm.{axis}")
                axes.append((f"{vname}.{axis}", unit, _bound(r, value, bkey, spec), bkey))
        for name, unit, (lo, hi), bkey in axes:
            dirs = tuple(
                (float(unit[0]), float(unit[1] * sign), float(unit[2])) for _, sign in moved
            )
            variables.append(TuneVariable(name, bkey, lo, hi, tuple(p for p, _ in moved), dirs))
    return TuneSpec(
        variables=tuple(variables),
        targets=_targets(r, design.limits, tune.get("targets", {})),
        weights=_weights(r, tune.get("weights", {})),
        seed=seed,
        groups=groups,
        pivots=pivots,
        **options,
    )


def _targets(r: Reader, lim: Limits, raw: Any) -> TuneTargets:
    table = r.table(raw, "tune.targets", "tune.targets")

    def num(name: str, default: float) -> float:
        if name not in table:
            return default
        value: float = r.value(table, "tune.targets", f"tune.targets.{name}")
        return value

    def pair(name: str, default: tuple[float, float]) -> tuple[float, float]:
        if name not in table:
            return default
        key = f"tune.targets.{name}"
        return _bound(r, table[name], key, entry(key))

    ratio_range = pair("route_ratio_range", lim.route_ratio)
    ratio = num("route_ratio", (ratio_range[0] + ratio_range[1]) / 2.0)
    if not ratio_range[0] <= ratio <= ratio_range[1]:
        r.fail(
            "tune.targets.route_ratio",
            f"{ratio:g} is outside route_ratio_range [{ratio_range[0]:g}, {ratio_range[1]:g}]",
            "give a target inside the range",
        )
    return TuneTargets(
        route_ratio=ratio,
        route_ratio_range=ratio_range,
        line_of_action_deg=num("line_of_action_deg", lim.line_of_action_deg),
        transmission_angle_deg=pair("transmission_angle_deg", lim.transmission_angle_deg),
        heave_sensitivity=num("heave_sensitivity", lim.heave_sensitivity),
        buckling_reserve=num("buckling_reserve", lim.buckling_reserve),
        tension_reserve=num("tension_reserve", lim.tension_reserve),
        clearance_mm=num("clearance_mm", lim.clearance_mm),
        sprung_leakage=num("sprung_leakage", lim.sprung_leakage),
    )


def _weights(r: Reader, raw: Any) -> dict[str, float]:
    table = r.table(raw, "tune.weights", "tune.weights")
    return {k.name: r.value(table, "tune.weights", k.path) for k in children("tune.weights")}
