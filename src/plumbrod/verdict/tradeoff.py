"""Is routing the load worth it?  Per axle, the quarter car with the element bolted to the
chassis beside the same car with the element routed to the uprights, on ISO 8608 roads at
every speed up to top speed (``plumbrod tradeoff``).

* bolted: the element's downforce loads the springs (the axle's share of it by the lever
  rule); the wheel rate is the car's, or the rate that keeps the body's drop at top speed
  within ``ride_height_budget_mm`` (spring and tyre in series);
* routed: what the route delivers goes straight to the tyres, the rest (the spring share)
  to the springs; the unsprung mass grows by the route's kinetic-energy-equivalent mass
  per corner (single-wheel bump: left and right tracks uncorrelated); the wheel rate drops
  to the softest that meets the same budget, or to ``target_ride_frequency_Hz``.

Loads are the aero loads only (½ρV²SC_L, from the design), scaled with V².  The element's
height above the road follows the body (bolted) or the wheel (routed, route ratio 1).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.car import car_layout
from plumbrod.design.tradeoff_spec import TradeoffSpec
from plumbrod.errors import DesignFileError
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.mass import MassReport
from plumbrod.mechanics.ride import QuarterCar, Unstable, mean_squares
from plumbrod.mechanics.road import class_mean_m3, velocity_psd_m2_s
from plumbrod.verdict.tradeoff_cases import study_case
from plumbrod.verdict.tradeoff_loads import AxleLoad, aero_at_top, axle_groups, axle_loads
from plumbrod.verdict.tradeoff_rates import budget_rate, bump_travel, choose_rate
from plumbrod.verdict.tradeoff_results import AxleStudy, TradeoffStudy

__all__ = ["study_tradeoff"]

Array = NDArray[np.float64]


def study_tradeoff(analysis: Analysis, mass: MassReport) -> TradeoffStudy:
    """Bolted against routed, per axle that the routes reach; raises DesignFileError
    when an input the study needs is missing or cannot be met."""
    design = analysis.design
    spec = design.tradeoff
    src = design.source
    if spec is None:
        raise DesignFileError(
            src, "tradeoff", "the design has no [tradeoff] table",
            "add one with the car's sprung mass, tyre rate, damping and ride-height budget "
            "(see examples/README.md)",
        )  # fmt: skip
    top = design.top_speed_kmh or max((c.speed_kmh for c in design.load_cases), default=0.0)
    if top <= 0.0:
        raise DesignFileError(
            src, "design.top_speed_kmh", "missing: the study sweeps speeds up to top speed",
            "add top_speed_kmh under [design]",
        )  # fmt: skip
    aero = aero_at_top(analysis, top)
    ratio = aero.route_ratio
    if aero.down_N <= 0.0:
        raise DesignFileError(
            src, f"elements.{design.elements[0].name}.aero",
            "no downforce at top speed: the study needs each element's aero data",
            "add reference_area_m2 and downforce_coefficient",
        )  # fmt: skip
    groups = axle_groups(design)
    notes: list[str] = []
    loads_by_axle = axle_loads(design, groups, aero, notes)
    speeds = top * np.arange(1, spec.speed_steps + 1) / spec.speed_steps
    axles = {
        axle: _study_axle(
            analysis,
            mass,
            spec,
            axle,
            corners,
            loads_by_axle[axle],
            speeds,
            ratio,
        )
        for axle, corners in groups.items()
    }
    for axle in axles.values():
        bolted = axle.cases["bolted"]
        sink = float(bolted.ride_height_drop_mm[-1])
        if bolted.rate_from == "given" and sink > spec.ride_height_budget_mm * (1 + 1e-9):
            notes.append(
                f"bolted, the {axle.axle} springs at {bolted.wheel_rate_N_per_mm:g} N/mm let "
                f"the body sink {sink:.1f} mm at {top:g} km/h, beyond the "
                f"{spec.ride_height_budget_mm:g} mm budget"
            )
    return TradeoffStudy(
        design=design.name,
        source=src,
        elements=tuple(e.name for e in design.elements),
        top_speed_kmh=top,
        speeds_kmh=speeds,
        road_classes=spec.road_classes,
        ride_height_budget_mm=spec.ride_height_budget_mm,
        axles=axles,
        notes=tuple(notes),
    )


def _study_axle(
    analysis: Analysis,
    mass: MassReport,
    spec: TradeoffSpec,
    axle: str,
    corners: tuple[str, ...],
    load: AxleLoad,
    speeds: Array,
    ratio: dict[str, float],
) -> AxleStudy:
    design = analysis.design
    src = design.source
    n = len(corners)
    m_s = spec.corner_sprung_mass(axle)
    if m_s is None:
        raise DesignFileError(
            src, f"tradeoff.corner_sprung_mass_{axle}_kg",
            f"missing: the {axle} axle's sprung mass per corner",
            f"add corner_sprung_mass_{axle}_kg",
        )  # fmt: skip
    own = []
    for name in corners:
        value = design.corner(name).unsprung_mass_kg
        if value is None:
            raise DesignFileError(
                src, f"corners.{name}.unsprung_mass_kg",
                "missing: the ride study needs each corner's own unsprung mass",
                "add unsprung_mass_kg (wheel, tyre, upright, brake, half the links)",
            )  # fmt: skip
        own.append(value)
    m_u = float(np.mean(own))
    by_corner = {c.corner: c for c in mass.corners}
    added = float(np.mean([by_corner[c].kinetic_single_kg for c in corners]))
    static_added = float(np.mean([by_corner[c].static_share_kg for c in corners]))
    k_t = spec.tyre_rate_N_per_mm * 1e3
    share = load.share
    k_aero = spec.downforce_per_mm * 1e3 * share / n
    budget = spec.ride_height_budget_mm * 1e-3
    bump = bump_travel(design, spec)
    top = float(speeds[-1])
    follows = float(np.mean([ratio.get(c, 1.0) for c in corners]))

    def car(m_unsprung: float, rate: float, on: str) -> QuarterCar:
        c = 1e3 * (spec.damper_rate_N_s_per_mm or 0.0)
        if spec.damping_ratio is not None:
            c = 2.0 * spec.damping_ratio * math.sqrt(rate * m_s)
        return QuarterCar(m_s, m_unsprung, rate, c, k_t, k_aero, on)  # type: ignore[arg-type]

    loads = {
        "bolted": (load.spring_bolted_N, 0.0),
        "routed": (load.spring_routed_N, load.tyre_N - load.spring_routed_N),
    }
    given = {a.name: a.wheel_rate_N_per_mm for a in car_layout(design).axles}.get(axle)
    rates: dict[str, tuple[float, str]] = {}
    for name, m_unsprung, on in (("bolted", m_u, "sprung"), ("routed", m_u + added, "unsprung")):
        need = None
        if not (name == "bolted" and given):
            trial = car(m_unsprung, given * 1e3 if given else 50e3, on)
            try:
                need = budget_rate(trial, *loads[name], budget)
            except ValueError:
                raise DesignFileError(
                    src, "tradeoff.ride_height_budget_mm",
                    f"no wheel rate keeps the {axle} body within "
                    f"{spec.ride_height_budget_mm:g} mm at {top:g} km/h ({name}): the tyres "
                    "alone sink further",
                    "raise the budget or give a stiffer tyre_rate_N_per_mm",
                ) from None  # fmt: skip
        rates[name] = choose_rate(name, given, need, spec, m_s, k_t, rates, axle, src)
    cases = {
        name: study_case(
            name, car(mu_c, rates[name][0], on), rates[name][1], loads[name], static_kg,
            speeds, spec, bump, 0.0 if name == "bolted" else follows,
        )
        for name, mu_c, on, static_kg in (
            ("bolted", m_u, "sprung", m_u),
            ("routed", m_u + added, "unsprung", m_u + static_added),
        )
    }  # fmt: skip
    try:  # the added mass alone: routed unsprung mass on the bolted spring
        alone = car(m_u + added, rates["bolted"][0], "unsprung")
        v_top = top / 3.6
        psd = velocity_psd_m2_s(class_mean_m3(spec.road_classes[0]), v_top)
        mass_only: float | None = math.sqrt(mean_squares(alone, psd)["tyre_load"])
    except Unstable:
        mass_only = None
    study = AxleStudy(
        axle, corners, share, added, spec.tyre_rate_N_per_mm, bump * 1e3, cases, "", mass_only
    )
    return AxleStudy(**{**study.__dict__, "sentence": _sentence(study, analysis, spec, speeds)})


def _sentence(study: AxleStudy, analysis: Analysis, spec: TradeoffSpec, speeds: Array) -> str:
    """The verdict of one axle on the first road class at top speed."""
    cls = spec.road_classes[0]
    bolted, routed = study.cases["bolted"], study.cases["routed"]
    kinds = sorted({e.kind for e in analysis.design.elements})
    what = kinds[0] if len(kinds) == 1 and kinds[0] != "other" else "element"
    if not (bolted.stable.all() and routed.stable.all()):
        parts = ", ".join(
            f"{c.name} from {speeds[np.flatnonzero(~c.stable)[0]]:.0f} km/h"
            for c in (bolted, routed)
            if not c.stable.all()
        )
        return (
            f"on the {study.axle} axle the aero stiffness (downforce_per_mm) beats the "
            f"springs: unstable {parts}; the other figures hold below that speed only"
        )
    hb = bolted.classes[cls]["element_height_rms_mm"][-1]
    hr = routed.classes[cls]["element_height_rms_mm"][-1]
    tb = bolted.classes[cls]["tyre_load_rms_N"][-1]
    tr = routed.classes[cls]["tyre_load_rms_N"][-1]
    kb, kr = bolted.wheel_rate_N_per_mm, routed.wheel_rate_N_per_mm
    if round(kr) < round(kb):
        rate = f"lets the {study.axle} wheel rate drop from {kb:.0f} to {kr:.0f} N/mm"
    elif round(kr) > round(kb):
        rate = f"needs the {study.axle} wheel rate up from {kb:.0f} to {kr:.0f} N/mm"
    else:
        rate = f"keeps the {study.axle} wheel rate at {kb:.0f} N/mm"
    change = tr / tb - 1.0
    verb = "rises" if change >= 0 else "falls"
    size = f" {abs(change):.0%}"
    if round(abs(change) * 100.0) == 0:
        verb, size = "stays", " the same"
    alone = ""
    if study.tyre_load_rms_mass_only_N is not None and kr != kb:
        alone = f", {study.tyre_load_rms_mass_only_N / tb - 1.0:+.0%} from the mass alone"
    return (
        f"on a class-{cls} road the routed {what} holds its height within ±{hr:.1f} mm "
        f"against ±{hb:.1f} mm bolted and {rate}; tyre-load variation {verb}{size} "
        f"with the {study.added_unsprung_kg:.1f} kg added per corner"
        f"{alone} (RMS at {speeds[-1]:.0f} km/h)"
    )
