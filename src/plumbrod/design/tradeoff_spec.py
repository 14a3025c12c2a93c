"""The ``[tradeoff]`` table: what the ride study (``plumbrod tradeoff``) needs about the
car beyond the route itself.

The sprung mass comes per corner (``corner_sprung_mass_front_kg`` / ``_rear_kg``) or
as the car's ``sprung_mass_kg`` with ``sprung_mass_front_share``; the damping at the
wheel as ``damping_ratio`` or ``damper_rate_N_s_per_mm`` (one of them).  The wheel
rates and the wheelbase come from ``[car]``.

Each value is read through its schema entry (``schema_tables_car.py``: kind, unit,
range, default); this module keeps the checks across keys (damping given once,
the sprung mass given one way, each road class once).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, NoReturn, Protocol

from plumbrod.design.schema import children, entry
from plumbrod.design.schema_tables_car import DEFAULT_ROAD_CLASSES, ROAD_CLASSES

__all__ = ["ROAD_CLASSES", "TRADEOFF_KEYS", "TradeoffSpec", "read_tradeoff"]

DEFAULT_SPEED_STEPS: int = entry("tradeoff.speed_steps").default

TRADEOFF_KEYS = tuple(k.name for k in children("tradeoff"))
"""The keys of ``[tradeoff]`` (their kinds, units and ranges: ``schema_tables_car.py``)."""


class _Reader(Protocol):
    """What this module uses of :class:`plumbrod.design.reader.Reader` (not imported:
    the model imports this module and the reader imports the model)."""

    def fail(self, key: str, problem: str, fix: str = "") -> NoReturn: ...

    def table(self, table: Any, key: str, path: str, *tags: str) -> dict[str, Any]: ...

    def value(self, table: dict[str, Any], key: str, path: str) -> Any: ...


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


def read_tradeoff(table: Any, r: _Reader) -> TradeoffSpec | None:
    """Validate a ``[tradeoff]`` table (None when the design has none)."""
    if table is None:
        return None
    t = r.table(table, "tradeoff", "tradeoff")

    def val(name: str) -> Any:
        return r.value(t, "tradeoff", f"tradeoff.{name}")

    ratio = val("damping_ratio")
    rate = val("damper_rate_N_s_per_mm")
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

    corner = {
        axle: v
        for axle in ("front", "rear")
        if (v := val(f"corner_sprung_mass_{axle}_kg")) is not None
    }
    total = val("sprung_mass_kg")
    share = val("sprung_mass_front_share")
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

    classes = val("road_classes")
    if len(set(classes)) != len(classes):
        r.fail("tradeoff.road_classes", "a class is listed twice", "list each class once")
    return TradeoffSpec(
        tyre_rate_N_per_mm=val("tyre_rate_N_per_mm"),
        ride_height_budget_mm=val("ride_height_budget_mm"),
        damping_ratio=ratio,
        damper_rate_N_s_per_mm=rate,
        corner_sprung_mass_kg=corner or None,
        sprung_mass_kg=total,
        sprung_mass_front_share=share,
        road_classes=classes,
        speed_steps=val("speed_steps"),
        target_ride_frequency_Hz=val("target_ride_frequency_Hz"),
        downforce_per_mm=val("downforce_per_mm"),
        bump_travel_mm=val("bump_travel_mm"),
    )
