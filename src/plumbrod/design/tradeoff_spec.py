"""The ``[tradeoff]`` table: what the ride study (``plumbrod tradeoff``) needs about the
car beyond the route itself.

Keys (units in the names; per corner means one wheel's share):

* sprung mass: ``corner_sprung_mass_front_kg`` / ``corner_sprung_mass_rear_kg``, or the
  car's ``sprung_mass_kg`` with ``sprung_mass_front_share`` (0 to 1);
* ``tyre_rate_N_per_mm``: the tyre's vertical stiffness (required);
* damping at the wheel: ``damping_ratio`` (of critical, on the wheel rate) or
  ``damper_rate_N_s_per_mm`` (one of them, required);
* ``ride_height_budget_mm``: how far the aero load may lower the body at top speed
  (required);
* ``road_classes``: ISO 8608 classes, default every class A to E (the first one is the
  verdict's);
* ``speed_steps``: speeds from top speed / steps to top speed, default 12 (our own
  default: it only sets the plots' resolution);
* ``target_ride_frequency_Hz`` (optional): the softest ride frequency the routed car
  may drop to;
* ``downforce_per_mm`` (optional, N/mm at top speed, + = more downforce as the element
  nears the road): the aero stiffness, scaled with the square of the speed;
* ``bump_travel_mm`` (optional): travel to the bump stop at static ride height; default
  the bump end of the travel sweep;

The wheel rates and the wheelbase come from ``[car]``.

This module reads the table only; it imports nothing from the loader, so the schema can
take these keys over unchanged.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, NoReturn, Protocol

__all__ = ["ROAD_CLASSES", "TRADEOFF_KEYS", "TradeoffSpec", "read_tradeoff"]

ROAD_CLASSES = ("A", "B", "C", "D", "E", "F", "G", "H")
"""The ISO 8608 classes."""

DEFAULT_ROAD_CLASSES: tuple[str, ...] = ("A", "B", "C", "D", "E")
DEFAULT_SPEED_STEPS = 12

TRADEOFF_KEYS = (
    "corner_sprung_mass_front_kg",
    "corner_sprung_mass_rear_kg",
    "sprung_mass_kg",
    "sprung_mass_front_share",
    "tyre_rate_N_per_mm",
    "damping_ratio",
    "damper_rate_N_s_per_mm",
    "ride_height_budget_mm",
    "road_classes",
    "speed_steps",
    "target_ride_frequency_Hz",
    "downforce_per_mm",
    "bump_travel_mm",
)


class _Reader(Protocol):
    def fail(self, key: str, problem: str, fix: str = "") -> NoReturn: ...

    def keys(self, table: Any, key: str, allowed: Any, required: Any = ()) -> dict[str, Any]: ...

    def number(
        self, value: Any, key: str, *, positive: bool = False, non_negative: bool = False
    ) -> float: ...

    def integer(self, value: Any, key: str, *, minimum: int = 1) -> int: ...

    def string(self, value: Any, key: str, choices: Any = None) -> str: ...


@dataclass(frozen=True)
class TradeoffSpec:
    """The ``[tradeoff]`` table, validated (units as in the key names)."""

    tyre_rate_N_per_mm: float
    ride_height_budget_mm: float
    damping_ratio: float | None = None
    damper_rate_N_s_per_mm: float | None = None
    corner_sprung_mass_kg: dict[str, float] | None = None
    """Per axle ('front', 'rear'), when given per corner."""
    sprung_mass_kg: float | None = None
    sprung_mass_front_share: float | None = None
    road_classes: tuple[str, ...] = DEFAULT_ROAD_CLASSES
    speed_steps: int = DEFAULT_SPEED_STEPS
    target_ride_frequency_Hz: float | None = None
    downforce_per_mm: float = 0.0
    bump_travel_mm: float | None = None

    def corner_sprung_mass(self, axle: str) -> float | None:
        """Sprung mass per corner of an axle (kg), or None when the table lacks it."""
        if self.corner_sprung_mass_kg and axle in self.corner_sprung_mass_kg:
            return self.corner_sprung_mass_kg[axle]
        if self.sprung_mass_kg is not None and self.sprung_mass_front_share is not None:
            front = self.sprung_mass_front_share
            share = front if axle == "front" else 1.0 - front
            return self.sprung_mass_kg * share / 2.0
        return None


_HINTS = {
    "tyre_rate_N_per_mm": "add the tyre's vertical stiffness, e.g. tyre_rate_N_per_mm = 250",
    "ride_height_budget_mm": (
        "add how far the aero load may lower the body at top speed, e.g. ride_height_budget_mm = 10"
    ),
}


def read_tradeoff(table: Any, r: _Reader) -> TradeoffSpec | None:
    """Validate a ``[tradeoff]`` table (None when the design has none)."""
    if table is None:
        return None
    t = r.keys(table, "tradeoff", TRADEOFF_KEYS)
    for key in ("tyre_rate_N_per_mm", "ride_height_budget_mm"):
        if key not in t:
            r.fail(f"tradeoff.{key}", "missing key", _HINTS[key])

    def num(key: str, **kw: bool) -> float | None:
        return r.number(t[key], f"tradeoff.{key}", **kw) if key in t else None

    ratio = num("damping_ratio", positive=True)
    rate = num("damper_rate_N_s_per_mm", positive=True)
    if ratio is None and rate is None:
        r.fail(
            "tradeoff.damping_ratio",
            "missing key: the study needs the damping at the wheel",
            "add damping_ratio (of critical, e.g. 0.4) or damper_rate_N_s_per_mm",
        )
    if ratio is not None and rate is not None:
        r.fail(
            "tradeoff.damper_rate_N_s_per_mm",
            "both damping_ratio and damper_rate_N_s_per_mm are given",
            "keep one of them",
        )
    if ratio is not None and ratio >= 5.0:
        r.fail(
            "tradeoff.damping_ratio",
            f"{ratio:g} of critical is not a car's damper",
            "use a ratio below 5",
        )

    corner = {
        axle: v
        for axle in ("front", "rear")
        if (v := num(f"corner_sprung_mass_{axle}_kg", positive=True)) is not None
    }
    total = num("sprung_mass_kg", positive=True)
    share = num("sprung_mass_front_share")
    if share is not None and not 0.0 <= share <= 1.0:
        r.fail(
            "tradeoff.sprung_mass_front_share",
            f"expected 0 to 1, got {share:g}",
            "give the front axle's share of the sprung mass",
        )
    if (total is None) != (share is None):
        missing = "sprung_mass_front_share" if share is None else "sprung_mass_kg"
        r.fail(
            f"tradeoff.{missing}",
            "missing key: sprung_mass_kg and sprung_mass_front_share go together",
            f"add {missing}",
        )
    if corner and total is not None:
        r.fail(
            "tradeoff.sprung_mass_kg",
            "the sprung mass is given twice (per corner and in total)",
            "keep one way",
        )
    if not corner and total is None:
        r.fail(
            "tradeoff.corner_sprung_mass_front_kg",
            "missing key: the study needs the sprung mass",
            "add corner_sprung_mass_front_kg (and _rear_kg), or sprung_mass_kg with "
            "sprung_mass_front_share",
        )

    classes: tuple[str, ...] = DEFAULT_ROAD_CLASSES
    if "road_classes" in t:
        raw = t["road_classes"]
        if not isinstance(raw, list) or not raw:
            r.fail(
                "tradeoff.road_classes",
                "expected a list of ISO 8608 classes",
                'write e.g. road_classes = ["A", "B"]',
            )
        classes = tuple(
            r.string(v, f"tradeoff.road_classes[{i}]", ROAD_CLASSES) for i, v in enumerate(raw)
        )
        if len(set(classes)) != len(classes):
            r.fail("tradeoff.road_classes", "a class is listed twice", "list each class once")
    steps = DEFAULT_SPEED_STEPS
    if "speed_steps" in t:
        steps = r.integer(t["speed_steps"], "tradeoff.speed_steps", minimum=2)
        if steps > 500:
            r.fail(
                "tradeoff.speed_steps",
                f"{steps} speeds is more than the study needs",
                "use 500 or fewer",
            )

    return TradeoffSpec(
        tyre_rate_N_per_mm=r.number(
            t["tyre_rate_N_per_mm"], "tradeoff.tyre_rate_N_per_mm", positive=True
        ),
        ride_height_budget_mm=r.number(
            t["ride_height_budget_mm"], "tradeoff.ride_height_budget_mm", positive=True
        ),
        damping_ratio=ratio,
        damper_rate_N_s_per_mm=rate,
        corner_sprung_mass_kg=corner or None,
        sprung_mass_kg=total,
        sprung_mass_front_share=share,
        road_classes=classes,
        speed_steps=steps,
        target_ride_frequency_Hz=num("target_ride_frequency_Hz", positive=True),
        downforce_per_mm=num("downforce_per_mm") or 0.0,
        bump_travel_mm=num("bump_travel_mm", positive=True),
    )
