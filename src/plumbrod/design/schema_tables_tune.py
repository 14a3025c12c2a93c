"""Schema entries of ``[tune]``: what ``plumbrod tune`` may move (``variables``), must
meet (``targets``) and minimises (``weights``).  Its reader,
:mod:`plumbrod.design.tune_spec`, reads each value through these entries and keeps the
checks across keys (points or pivot, line or box, bounds, names that exist)."""

from __future__ import annotations

from plumbrod.design.schema_key import COORDINATE_LIMIT_MM as _C
from plumbrod.design.schema_key import MAX_STEPS, POSITIVE, Key
from plumbrod.design.schema_key import key as _k

__all__ = ["TUNE_TABLE_KEYS"]

_OFFSET = {"unit": "mm", "minimum": -1_000.0, "maximum": 1_000.0}
"""A free point moves by at most a metre either way."""
_VARIABLE = "tune.variables.*"

TUNE_TABLE_KEYS: tuple[Key, ...] = (
    _k("tune.seed", "integer", "random seed of the search (--seed overrides)", default=0,
       minimum=0, maximum=2**32 - 1),
    _k("tune.population", "integer", "candidates per generation per variable", default=24,
       minimum=4, maximum=1_000),
    _k("tune.generations", "integer", "generations of the search (--generations overrides)",
       default=40, minimum=1, maximum=10_000),
    _k("tune.screen_steps", "integer", "travel poses of the screening sweep", default=33,
       minimum=3, maximum=MAX_STEPS),
    _k("tune.polish", "integer", "best distinct candidates polished locally", default=3,
       minimum=0, maximum=100),
    _k("tune.variables", "named", "the free variables of the search (at least one)", required=True,
       missing="add a [tune.variables.<name>] table"),
    _k("tune.targets", "table",
       "constraint limits of the search; each defaults to the design's [limits]"),
    _k("tune.weights", "table", "weights of the objectives the search minimises"),
    # -- [tune.variables.<name>] ------------------------------------------------------------
    _k(_VARIABLE, "table",
       "one free variable: points (or a rocker's pivot) moved together by one offset"),
    _k(f"{_VARIABLE}.points", "string_list",
       "pickups moved together, as <body>.<pickup> (this or pivot)",
       shape='["rocker_left.front_arm"]'),
    _k(f"{_VARIABLE}.pivot", "string", "a rocker whose whole pivot axis moves (this or points)"),
    _k(f"{_VARIABLE}.line", "direction",
       "direction of the offset (with range_mm; this or box_mm)", minimum=-_C, maximum=_C),
    _k(f"{_VARIABLE}.range_mm", "range", "offsets along the line, from < to (with line)",
       **_OFFSET),
    _k(f"{_VARIABLE}.box_mm", "table",
       "offsets within a box instead of along a line; axes left out stay fixed"),
    _k(f"{_VARIABLE}.box_mm.x", "range", "offsets along x, lo < hi", when=("3d", "side"),
       **_OFFSET),
    _k(f"{_VARIABLE}.box_mm.y", "range", "offsets along y, lo < hi", when=("3d", "front"),
       **_OFFSET),
    _k(f"{_VARIABLE}.box_mm.z", "range", "offsets along z, lo < hi", **_OFFSET),
    # -- [tune.targets] -----------------------------------------------------------------------
    _k("tune.targets.route_ratio", "number",
       "route ratio aimed at (default: the middle of route_ratio_range)", maximum=100.0,
       **POSITIVE),
    _k("tune.targets.route_ratio_range", "range", "allowed route ratios, from < to",
       minimum=-100.0, maximum=100.0),
    _k("tune.targets.line_of_action_deg", "number",
       "largest angle between a route's force and the wheel's travel", unit="deg",
       maximum=90.0, **POSITIVE),
    _k("tune.targets.transmission_angle_deg", "range",
       "allowed transmission angles at a rocker, from < to", unit="deg", minimum=0.0,
       maximum=180.0),
    _k("tune.targets.heave_sensitivity", "number",
       "element ride-height change per mm of body heave", unit="mm/mm", maximum=10.0,
       **POSITIVE),
    _k("tune.targets.buckling_reserve", "number", "critical load over the largest compression",
       maximum=1_000.0, **POSITIVE),
    _k("tune.targets.tension_reserve", "number", "yield load over the largest tension",
       maximum=1_000.0, **POSITIVE),
    _k("tune.targets.clearance_mm", "number", "least distance between parts", unit="mm",
       maximum=1_000.0, **POSITIVE),
    _k("tune.targets.sprung_leakage", "number",
       "avoidable spring-load change, as a share of the element's vertical load",
       maximum=1.0, **POSITIVE),
    # -- [tune.weights] -----------------------------------------------------------------------
    _k("tune.weights.route_ratio", "number", "weight of holding the route ratio flat",
       default=1.0, minimum=0.0, maximum=1_000.0),
    _k("tune.weights.mass", "number", "weight of the rods' mass (over the design's)",
       default=0.0, minimum=0.0, maximum=1_000.0),
    _k("tune.weights.leakage", "number",
       "weight of the avoidable spring-load share (over its target)", default=0.0,
       minimum=0.0, maximum=1_000.0),
)  # fmt: skip
