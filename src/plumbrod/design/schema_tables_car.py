"""Schema entries of the car around the route: ``[car]`` (axles, rates, roll share) and
``[tradeoff]`` (the ride study of ``plumbrod tradeoff``).  Their readers,
:mod:`plumbrod.design.car` and :mod:`plumbrod.design.tradeoff_spec`, read each value
through these entries and keep the checks across keys."""

from __future__ import annotations

from plumbrod.design.schema_key import POSITIVE, Key
from plumbrod.design.schema_key import key as _k

__all__ = ["CAR_TRADEOFF_KEYS", "DEFAULT_ROAD_CLASSES", "ROAD_CLASSES"]

ROAD_CLASSES = ("A", "B", "C", "D", "E", "F", "G", "H")
"""The ISO 8608 road classes."""
DEFAULT_ROAD_CLASSES: tuple[str, ...] = ("A", "B", "C", "D", "E")

_ROLL_SHARE = (
    "expected a share from 0 to 1, got {value}",
    "give the front axle's share of the car's roll stiffness, e.g. 0.55",
)
_MASS_SHARE = ("expected 0 to 1, got {value}", "give the front axle's share of the sprung mass")

CAR_TRADEOFF_KEYS: tuple[Key, ...] = (
    # -- [car] ------------------------------------------------------------------------
    _k("car.wheelbase_mm", "number",
       "needed for the spring figures when every corner is on one axle; derived when both "
       "axles have corners (a value given then must agree within 1 mm)",
       unit="mm", maximum=20_000.0, **POSITIVE),
    _k("car.track_front_mm", "number",
       "taken from the corners where present; an axle without corners takes the other "
       "axle's track unless given", unit="mm", maximum=10_000.0, **POSITIVE),
    _k("car.track_rear_mm", "number", "as track_front_mm, for the rear axle", unit="mm",
       maximum=10_000.0, **POSITIVE),
    _k("car.roll_stiffness_front_share", "number",
       "how the springs and bars share a roll moment between the axles (0.5 is common "
       "practice: give your car's)", default=0.5, minimum=0.0, maximum=1.0,
       too_low=_ROLL_SHARE, too_high=_ROLL_SHARE),
    _k("car.wheel_rate_front_N_per_mm", "number", "for the ride-height change at speed",
       unit="N/mm", maximum=10_000.0, **POSITIVE),
    _k("car.wheel_rate_rear_N_per_mm", "number", "for the ride-height change at speed",
       unit="N/mm", maximum=10_000.0, **POSITIVE),
    # -- [tradeoff] ---------------------------------------------------------------------
    _k("tradeoff.corner_sprung_mass_front_kg", "number",
       "sprung mass per front corner (needed for each axle the routes reach, unless "
       "sprung_mass_kg is given)", unit="kg", maximum=5_000.0, **POSITIVE),
    _k("tradeoff.corner_sprung_mass_rear_kg", "number", "sprung mass per rear corner",
       unit="kg", maximum=5_000.0, **POSITIVE),
    _k("tradeoff.sprung_mass_kg", "number",
       "instead of the per-corner masses: the car's sprung mass, with "
       "sprung_mass_front_share", unit="kg", maximum=20_000.0, **POSITIVE),
    _k("tradeoff.sprung_mass_front_share", "number",
       "the front axle's share of sprung_mass_kg (the two go together)", minimum=0.0,
       maximum=1.0, too_low=_MASS_SHARE, too_high=_MASS_SHARE),
    _k("tradeoff.tyre_rate_N_per_mm", "number", "the tyre's vertical stiffness",
       unit="N/mm", maximum=10_000.0, required=True,
       missing="add the tyre's vertical stiffness, e.g. tyre_rate_N_per_mm = 250",
       **POSITIVE),
    _k("tradeoff.damping_ratio", "number",
       "damping at the wheel as a share of critical on the wheel rate (this or "
       "damper_rate_N_s_per_mm)", maximum=5.0,
       too_high=("{value} of critical is not a car's damper", "use a ratio of at most 5"),
       **POSITIVE),
    _k("tradeoff.damper_rate_N_s_per_mm", "number",
       "damping at the wheel as a rate (this or damping_ratio)", unit="N·s/mm",
       maximum=1_000.0, **POSITIVE),
    _k("tradeoff.ride_height_budget_mm", "number",
       "how far the downforce may lower the body at top speed", unit="mm",
       maximum=1_000.0, required=True,
       missing="add how far the aero load may lower the body at top speed, "
       "e.g. ride_height_budget_mm = 10", **POSITIVE),
    _k("tradeoff.road_classes", "string_list",
       "ISO 8608 road classes studied, each once; the verdict uses the first",
       default=DEFAULT_ROAD_CLASSES, choices=ROAD_CLASSES, shape='["A", "B"]'),
    _k("tradeoff.speed_steps", "integer",
       "speeds from top speed / steps to top speed (plumbrod's own default: it only sets "
       "the plots' resolution)", default=12, minimum=2, maximum=500),
    _k("tradeoff.target_ride_frequency_Hz", "number",
       "the softest ride frequency the routed car may drop to (none unless given)",
       unit="Hz", maximum=100.0, **POSITIVE),
    _k("tradeoff.downforce_per_mm", "number",
       "aero stiffness at top speed, + = more downforce nearer the road (scaled with the "
       "square of the speed)", unit="N/mm", default=0.0, minimum=-100_000.0,
       maximum=100_000.0),
    _k("tradeoff.bump_travel_mm", "number",
       "travel to the bump stop at static ride height (default: the travel sweep's bump "
       "end)", unit="mm", maximum=1_000.0, **POSITIVE),
)  # fmt: skip
