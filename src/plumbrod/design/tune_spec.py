"""Read a design file's ``[tune]`` table: the free variables, their bounds, the targets.

Kept apart from the main validator so it can move into the declarative schema table
once that exists.  Every problem is one :class:`~plumbrod.errors.DesignFileError`
naming the file and the key.

A variable moves one or more points together by the same offset (mm, chassis frame):
pickups named ``<body>.<pickup>`` (``points``), or a rocker's whole pivot axis
(``pivot``).  The offset runs along a line (``line = [dx, dy, dz]`` with
``range_mm = [from, to]``) or within a box (``box_mm = { x = [lo, hi], z = [lo, hi] }``;
axes left out stay fixed).  In a planar design a line and a box use the view's two
coordinates.  With ``[design] mirror = true`` every moved point whose name has a
right-hand copy moves that copy too, mirrored (y negated).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from plumbrod.design.model import Design, Limits
from plumbrod.errors import DesignFileError

__all__ = ["TUNE_KEYS", "TuneSpec", "TuneTargets", "TuneVariable", "read_tune"]

TUNE_KEYS = (
    "seed",
    "population",
    "generations",
    "screen_steps",
    "polish",
    "variables",
    "targets",
    "weights",
)
_VARIABLE_KEYS = ("points", "pivot", "line", "range_mm", "box_mm")
_TARGET_KEYS = (
    "route_ratio",
    "route_ratio_range",
    "line_of_action_deg",
    "transmission_angle_deg",
    "heave_sensitivity",
    "buckling_reserve",
    "tension_reserve",
    "clearance_mm",
    "sprung_leakage",
)
_WEIGHT_KEYS = ("route_ratio", "mass", "leakage")
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


def _fail(design: Design, key: str, problem: str, fix: str = "") -> DesignFileError:
    return DesignFileError(design.source, key, problem, fix)


def _number(design: Design, value: Any, key: str) -> float:
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value):
        raise _fail(design, key, f"expected a finite number, got {value!r}", "write a number")
    return float(value)


def _bound(design: Design, value: Any, key: str) -> tuple[float, float]:
    if not isinstance(value, list) or len(value) != 2:
        raise _fail(design, key, f"expected [from, to], got {value!r}", "write two numbers")
    lo, hi = (_number(design, v, f"{key}[{i}]") for i, v in enumerate(value))
    if lo == hi:
        raise _fail(design, key, f"empty bound [{lo:g}, {hi:g}]", "give from < to")
    if lo > hi:
        raise _fail(design, key, f"inverted bound [{lo:g}, {hi:g}]", "put the smaller value first")
    return lo, hi


def _table(design: Design, value: Any, key: str, allowed: tuple[str, ...]) -> dict[str, Any]:
    if not isinstance(value, dict):
        raise _fail(design, key, f"expected a table, got {value!r}", f"write it as [{key}]")
    for name in value:
        if name not in allowed:
            raise _fail(design, f"{key}.{name}", "unknown key", "allowed: " + ", ".join(allowed))
    return value


def _view_vector(design: Design, values: tuple[float, ...], key: str) -> np.ndarray:
    """A direction given in the file's coordinates, as x, y, z."""
    if design.plane is None:
        if len(values) != 3:
            raise _fail(design, key, "expected [dx, dy, dz]", "write three numbers")
        return np.array(values)
    if len(values) != 2:
        view = "[dy, dz]" if design.plane == "front" else "[dx, dz]"
        raise _fail(design, key, f"expected {view} (planar design)", "write two numbers")
    a, b = values
    return np.array((0.0, a, b) if design.plane == "front" else (a, 0.0, b))


def _mirror_of(design: Design, point: str, names: tuple[str, ...]) -> str | None:
    if "left" not in point:
        return None
    other = point.replace("left", "right")
    return other if other in names else None


def read_tune(design: Design, data: dict[str, Any], point_names: tuple[str, ...]) -> TuneSpec:
    """The validated ``[tune]`` table of a design's TOML ``data``.

    ``point_names`` are the linkage's point names (pickups and rocker axis points).
    Raises DesignFileError naming the key when the table is missing or wrong.
    """
    if "tune" not in data:
        raise _fail(design, "tune", "missing table", "add a [tune] table (see examples/README.md)")
    tune = _table(design, data["tune"], "tune", TUNE_KEYS)
    options: dict[str, int] = {}
    for name, low in (("population", 4), ("generations", 1), ("screen_steps", 3), ("polish", 0)):
        if name in tune:
            value = tune[name]
            if isinstance(value, bool) or not isinstance(value, int) or value < low:
                raise _fail(
                    design, f"tune.{name}", f"expected a whole number >= {low}, got {value!r}"
                )
            options[name] = value
    seed = tune.get("seed")
    if seed is not None and (isinstance(seed, bool) or not isinstance(seed, int) or seed < 0):
        raise _fail(design, "tune.seed", f"expected a whole number >= 0, got {seed!r}")
    raw_vars = tune.get("variables", {})
    if not isinstance(raw_vars, dict):
        raise _fail(design, "tune.variables", "expected a table", "add [tune.variables.<name>]")
    if not raw_vars:
        raise _fail(design, "tune.variables", "no free variable", "add [tune.variables.<name>]")
    variables: list[TuneVariable] = []
    groups: dict[str, tuple[str, ...]] = {}
    pivots: dict[str, str] = {}
    rockers = {r.name for r in design.rockers}
    head = data.get("design", {})
    mirror = bool(head.get("mirror", False)) if isinstance(head, dict) else False
    for vname, raw in raw_vars.items():
        key = f"tune.variables.{vname}"
        table = _table(design, raw, key, _VARIABLE_KEYS)
        if ("points" in table) == ("pivot" in table):
            raise _fail(design, key, "give either points or pivot", 'e.g. points = ["rocker.arm"]')
        if "points" in table:
            pts = table["points"]
            if not isinstance(pts, list) or not pts or not all(isinstance(p, str) for p in pts):
                raise _fail(design, f"{key}.points", "expected a list of pickup names")
            for p in pts:
                if p not in design.pickups:
                    raise _fail(design, f"{key}.points", f"no pickup '{p}'", "use <body>.<pickup>")
            file_points = tuple(pts)
            groups[vname] = file_points
        else:
            rocker = table["pivot"]
            if rocker not in rockers:
                raise _fail(design, f"{key}.pivot", f"no rocker '{rocker}'", "name a rocker")
            pivots[vname] = rocker
            file_points = (f"{rocker}.axis_a", f"{rocker}.axis_b")
        moved: list[tuple[str, float]] = []  # point, y sign
        for p in file_points:
            moved.append((p, 1.0))
            if mirror:
                other = _mirror_of(design, p, point_names)
                if other is not None:
                    moved.append((other, -1.0))
        if ("line" in table) == ("box_mm" in table):
            raise _fail(design, key, "give either line with range_mm, or box_mm")
        axes: list[tuple[str, np.ndarray, tuple[float, float], str]] = []
        if "line" in table:
            line = table["line"]
            if not isinstance(line, list):
                raise _fail(design, f"{key}.line", "expected a direction [dx, dy, dz]")
            vec = _view_vector(
                design, tuple(_number(design, v, f"{key}.line") for v in line), f"{key}.line"
            )
            size = float(np.linalg.norm(vec))
            if size == 0.0:
                raise _fail(design, f"{key}.line", "zero direction", "give a direction")
            if "range_mm" not in table:
                raise _fail(design, f"{key}.range_mm", "missing key", "add range_mm = [from, to]")
            axes.append(
                (
                    vname,
                    vec / size,
                    _bound(design, table["range_mm"], f"{key}.range_mm"),
                    f"{key}.range_mm",
                )
            )
        else:
            if "range_mm" in table:
                raise _fail(design, f"{key}.range_mm", "range_mm goes with line, not box_mm")
            allowed = (
                _AXES
                if design.plane is None
                else (("y", "z") if design.plane == "front" else ("x", "z"))
            )
            box = _table(design, table["box_mm"], f"{key}.box_mm", allowed)
            if not box:
                raise _fail(design, f"{key}.box_mm", "no axis", "e.g. box_mm = { x = [-10, 10] }")
            for axis, value in box.items():
                unit = np.zeros(3)
                unit[_AXES.index(axis)] = 1.0
                axes.append(
                    (
                        f"{vname}.{axis}",
                        unit,
                        _bound(design, value, f"{key}.box_mm.{axis}"),
                        f"{key}.box_mm.{axis}",
                    )
                )
        for name, unit, (lo, hi), bkey in axes:
            dirs = tuple(
                (float(unit[0]), float(unit[1] * sign), float(unit[2])) for _, sign in moved
            )
            variables.append(TuneVariable(name, bkey, lo, hi, tuple(p for p, _ in moved), dirs))
    return TuneSpec(
        variables=tuple(variables),
        targets=_targets(design, tune.get("targets", {})),
        weights=_weights(design, tune.get("weights", {})),
        seed=seed,
        groups=groups,
        pivots=pivots,
        **options,
    )


def _targets(design: Design, raw: Any) -> TuneTargets:
    table = _table(design, raw, "tune.targets", _TARGET_KEYS)
    lim: Limits = design.limits

    def num(name: str, default: float, positive: bool = True) -> float:
        if name not in table:
            return default
        value = _number(design, table[name], f"tune.targets.{name}")
        if positive and value <= 0:
            raise _fail(design, f"tune.targets.{name}", f"expected a value above 0, got {value:g}")
        return value

    def pair(name: str, default: tuple[float, float]) -> tuple[float, float]:
        return _bound(design, table[name], f"tune.targets.{name}") if name in table else default

    ratio_range = pair("route_ratio_range", lim.route_ratio)
    ratio = num("route_ratio", (ratio_range[0] + ratio_range[1]) / 2.0)
    if not ratio_range[0] <= ratio <= ratio_range[1]:
        raise _fail(
            design,
            "tune.targets.route_ratio",
            "outside route_ratio_range",
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


def _weights(design: Design, raw: Any) -> dict[str, float]:
    table = _table(design, raw, "tune.weights", _WEIGHT_KEYS)
    out = {"route_ratio": 1.0, "mass": 0.0, "leakage": 0.0}
    for name, value in table.items():
        w = _number(design, value, f"tune.weights.{name}")
        if w < 0:
            raise _fail(design, f"tune.weights.{name}", f"expected 0 or more, got {w:g}")
        out[name] = w
    return out
