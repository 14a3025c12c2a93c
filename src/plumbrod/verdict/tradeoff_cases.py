"""One case (bolted or routed) of one axle of the ride study over the speeds: static
drops under the aero loads, and per ISO 8608 road class the figures of
:data:`plumbrod.verdict.tradeoff_results.FIGURES`."""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.tradeoff_spec import TradeoffSpec
from plumbrod.mechanics.loads import STANDARD_GRAVITY_M_S2
from plumbrod.mechanics.ride import (
    QuarterCar,
    Unstable,
    band_limited_mean_squares,
    combined_mean_square,
    gaussian_exceedance,
    mean_squares,
    natural_frequencies_Hz,
    static_drop_m,
)
from plumbrod.mechanics.road import ISO_8608_BAND_CYCLES_PER_M, class_mean_m3, velocity_psd_m2_s
from plumbrod.verdict.tradeoff_results import FIGURES, CaseStudy

__all__ = ["study_case"]

Array = NDArray[np.float64]


def study_case(
    name: str,
    car0: QuarterCar,
    rate_from: str,
    loads_top: tuple[float, float],
    static_unsprung_kg: float,
    speeds: Array,
    spec: TradeoffSpec,
    bump_m: float,
    follows: float,
) -> CaseStudy:
    """One case over the speeds; ``follows`` is the share of the wheel's motion the
    element follows (0 bolted, the route ratio routed)."""
    top = float(speeds[-1])
    at_rest = QuarterCar(
        car0.sprung_kg, car0.unsprung_kg, car0.spring_N_m, car0.damper_N_s_m, car0.tyre_N_m
    )
    body_hz, hop_hz, _ = natural_frequencies_Hz(at_rest)
    ns = speeds.size
    drop = np.full(ns, np.nan)
    element = np.full(ns, np.nan)
    squeeze = np.full(ns, np.nan)
    stable = np.zeros(ns, dtype=bool)
    classes = {c: {f: np.full(ns, np.nan) for f in FIGURES} for c in spec.road_classes}
    for i, v_kmh in enumerate(speeds):
        scale = (v_kmh / top) ** 2
        car = QuarterCar(
            car0.sprung_kg, car0.unsprung_kg, car0.spring_N_m, car0.damper_N_s_m,
            car0.tyre_N_m, car0.aero_N_m * scale, car0.aero_on,
        )  # fmt: skip
        s_N, u_N = loads_top[0] * scale, loads_top[1] * scale
        try:
            body, wheel = static_drop_m(car, s_N, u_N)
            unit = mean_squares(car, velocity_psd_m2_s(1.0, v_kmh / 3.6))
        except Unstable:
            continue
        stable[i] = True
        drop[i], squeeze[i] = body * 1e3, (body - wheel) * 1e3
        element[i] = ((1.0 - follows) * body + follows * wheel) * 1e3
        v = v_kmh / 3.6
        band = band_limited_mean_squares(
            car, velocity_psd_m2_s(1.0, v), tuple(b * v for b in ISO_8608_BAND_CYCLES_PER_M)
        )
        height = combined_mean_square(
            car,
            velocity_psd_m2_s(1.0, v),
            {"body_height": 1.0 - follows, "wheel_height": follows},
        )
        f_static = (car.sprung_kg + static_unsprung_kg) * STANDARD_GRAVITY_M_S2 + s_N + u_N
        for c in spec.road_classes:
            gd = class_mean_m3(c)
            tyre = math.sqrt(unit["tyre_load"] * gd)
            travel = math.sqrt(unit["travel"] * gd)
            out = classes[c]
            out["tyre_load_rms_N"][i] = tyre
            out["tyre_load_ratio"][i] = tyre / f_static
            out["unloading_probability"][i] = gaussian_exceedance(f_static, tyre)
            out["body_acceleration_rms_m_s2"][i] = math.sqrt(unit["body_acceleration"] * gd)
            out["travel_rms_mm"][i] = travel * 1e3
            out["bump_stop_probability"][i] = gaussian_exceedance(bump_m - (body - wheel), travel)
            out["element_height_rms_mm"][i] = math.sqrt(height * gd) * 1e3
            out["tyre_load_band_ratio"][i] = math.sqrt(band["tyre_load"] / unit["tyre_load"])
    return CaseStudy(
        name=name,
        wheel_rate_N_per_mm=car0.spring_N_m / 1e3,
        rate_from=rate_from,
        sprung_mass_kg=car0.sprung_kg,
        unsprung_mass_kg=car0.unsprung_kg,
        damper_N_s_per_mm=car0.damper_N_s_m / 1e3,
        body_frequency_Hz=body_hz,
        wheel_hop_frequency_Hz=hop_hz,
        sprung_load_N=loads_top[0],
        unsprung_load_N=loads_top[1],
        ride_height_drop_mm=drop,
        element_drop_mm=element,
        spring_compression_mm=squeeze,
        stable=stable,
        follows_wheel=follows,
        car=car0,
        classes=classes,
    )
