"""The results of the ride study (``plumbrod tradeoff``): per case, per axle and for the
whole design; the figures computed per road class."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from plumbrod.mechanics.ride import QuarterCar

__all__ = ["CASES", "FIGURES", "AxleStudy", "CaseStudy", "TradeoffStudy"]

Array = NDArray[np.float64]

CASES = ("bolted", "routed")

FIGURES = (
    "tyre_load_rms_N",
    "tyre_load_ratio",
    "unloading_probability",
    "body_acceleration_rms_m_s2",
    "travel_rms_mm",
    "bump_stop_probability",
    "element_height_rms_mm",
    "tyre_load_band_ratio",
)
"""Per road class, over the speeds: RMS dynamic tyre load and its ratio to the static
tyre load, Φ(−F_static/σ), RMS body acceleration and travel, the chance of reaching the
bump stop, the RMS change of the element's height above the road, and the tyre-load RMS
over the ISO 8608 band (0.011–2.83 cycles/m) as a share of the closed form's."""


@dataclass(frozen=True)
class CaseStudy:
    """One case (bolted or routed) of one axle, per corner."""

    name: str
    wheel_rate_N_per_mm: float
    rate_from: str
    """'given', 'budget', 'target ride frequency' or 'unchanged'."""
    sprung_mass_kg: float
    unsprung_mass_kg: float
    damper_N_s_per_mm: float
    body_frequency_Hz: float
    wheel_hop_frequency_Hz: float
    """Undamped coupled modes at rest (no aero stiffness)."""
    sprung_load_N: float
    unsprung_load_N: float
    """Aero load per corner at top speed on each mass (N, + = down)."""
    ride_height_drop_mm: Array
    element_drop_mm: Array
    spring_compression_mm: Array
    stable: NDArray[np.bool_]
    follows_wheel: float
    """Share of the wheel's motion the element follows (0 bolted; the route ratio)."""
    car: QuarterCar
    """The quarter car at top speed (SI units), for a time simulation."""
    classes: dict[str, dict[str, Array]]
    """Road class -> figure of :data:`FIGURES` -> values over the speeds (NaN where the
    car is unstable)."""


@dataclass(frozen=True)
class AxleStudy:
    axle: str
    corners: tuple[str, ...]
    load_share: float
    """The axle's share of the elements' vertical load (lever rule)."""
    added_unsprung_kg: float
    tyre_rate_N_per_mm: float
    bump_travel_mm: float
    cases: dict[str, CaseStudy]
    sentence: str
    tyre_load_rms_mass_only_N: float | None = None
    """Tyre-load RMS at top speed on the first class with the routed unsprung mass on the
    bolted spring and damper: what the added mass alone does."""


@dataclass(frozen=True)
class TradeoffStudy:
    design: str
    source: str
    elements: tuple[str, ...]
    top_speed_kmh: float
    speeds_kmh: Array
    road_classes: tuple[str, ...]
    ride_height_budget_mm: float
    axles: dict[str, AxleStudy]
    notes: tuple[str, ...] = field(default_factory=tuple)
