"""Wheel rates of the ride study: the softest rate that keeps the body's drop at top
speed within the ride-height budget (spring and tyre in series), the rate for a target
ride frequency, and which one each case takes.  Rates in N/m inside, N/mm at the edges."""

from __future__ import annotations

import math

from plumbrod.design.model import Design
from plumbrod.design.tradeoff_spec import TradeoffSpec
from plumbrod.errors import DesignFileError
from plumbrod.mechanics.ride import (
    QuarterCar,
    Unstable,
    static_drop_m,
    wheel_rate_for_ride_frequency,
)

__all__ = ["body_drop", "budget_rate", "bump_travel", "choose_rate", "with_rate"]


def body_drop(car: QuarterCar, sprung_N: float, unsprung_N: float) -> float:
    try:
        return static_drop_m(car, sprung_N, unsprung_N)[0]
    except Unstable:
        return math.inf


def budget_rate(
    car: QuarterCar, sprung_N: float, unsprung_N: float, budget_m: float
) -> float | None:
    """The softest wheel rate (N/m) that keeps |body drop| ≤ budget under the loads;
    None when any rate does; ValueError when none does."""

    def drop(k: float) -> float:
        return abs(body_drop(with_rate(car, k), sprung_N, unsprung_N))

    lo, hi = 1e2, 1e10
    if math.isinf(drop(hi)):
        return None  # unstable whatever the spring: the study reports it
    if drop(hi) > budget_m:
        raise ValueError("tyre")
    if drop(lo) <= budget_m:
        return None
    for _ in range(200):
        mid = math.sqrt(lo * hi)
        if drop(mid) > budget_m:
            lo = mid
        else:
            hi = mid
        if hi / lo < 1 + 1e-12:
            break
    return hi


def with_rate(car: QuarterCar, rate: float) -> QuarterCar:
    return QuarterCar(
        car.sprung_kg, car.unsprung_kg, rate, car.damper_N_s_m, car.tyre_N_m,
        car.aero_N_m, car.aero_on,
    )  # fmt: skip


def choose_rate(
    name: str,
    given: float | None,
    need: float | None,
    spec: TradeoffSpec,
    m_s: float,
    k_t: float,
    rates: dict[str, tuple[float, str]],
    axle: str,
    src: str,
) -> tuple[float, str]:
    target = None
    if spec.target_ride_frequency_Hz is not None:
        try:
            target = wheel_rate_for_ride_frequency(m_s, spec.target_ride_frequency_Hz, k_t)
        except ValueError as exc:
            raise DesignFileError(
                src, "tradeoff.target_ride_frequency_Hz", str(exc), "choose a lower frequency"
            ) from None
    if name == "bolted":
        if given:
            return given * 1e3, "given"
        if need is not None:
            return need, "budget"
        if target is not None:
            return target, "target ride frequency"
        raise DesignFileError(
            src, f"car.wheel_rate_{axle}_N_per_mm",
            "missing: the budget does not set the bolted wheel rate (the springs carry no "
            "aero load)", f"add wheel_rate_{axle}_N_per_mm under [car]",
        )  # fmt: skip
    if target is not None and (need is None or target >= need):
        return target, "target ride frequency"
    if need is not None:
        return need, "budget"
    return rates["bolted"][0], "unchanged"


def bump_travel(design: Design, spec: TradeoffSpec) -> float:
    if spec.bump_travel_mm is not None:
        return spec.bump_travel_mm * 1e-3
    if design.sweeps.travel_mm is not None and design.sweeps.travel_mm[1] > 0.0:
        return design.sweeps.travel_mm[1] * 1e-3
    raise DesignFileError(
        design.source, "tradeoff.bump_travel_mm",
        "missing: the travel sweep has no bump end to take it from",
        "add the travel to the bump stop at static ride height",
    )  # fmt: skip
