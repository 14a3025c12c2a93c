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
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.car import car_layout
from plumbrod.design.model import Design, LoadCase
from plumbrod.design.tradeoff_spec import TradeoffSpec
from plumbrod.errors import DesignFileError
from plumbrod.kinematics.drives import TravelDrive
from plumbrod.kinematics.figures import route_ratios
from plumbrod.kinematics.sweeps import SweepSpec, run_sweep
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.loads import STANDARD_GRAVITY_M_S2, applied_loads
from plumbrod.mechanics.mass import MassReport
from plumbrod.mechanics.ride import (
    QuarterCar,
    Unstable,
    band_limited_mean_squares,
    combined_mean_square,
    gaussian_exceedance,
    mean_squares,
    natural_frequencies_Hz,
    static_drop_m,
    wheel_rate_for_ride_frequency,
)
from plumbrod.mechanics.road import (
    ISO_8608_BAND_CYCLES_PER_M,
    class_mean_m3,
    velocity_psd_m2_s,
)
from plumbrod.mechanics.springs import spring_loads
from plumbrod.mechanics.statics import solve_statics

__all__ = ["CASES", "AxleStudy", "CaseStudy", "TradeoffStudy", "axle_groups", "study_tradeoff"]

Array = NDArray[np.float64]
CASES = ("bolted", "routed")
AXLE_TOLERANCE_MM = 50.0
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


# -- the car around the route ------------------------------------------------------


def axle_groups(design: Design) -> dict[str, tuple[str, ...]]:
    """The design's corners by axle (``[car]`` and the corners, as the spring loads see
    them): only the axles that hold a corner."""
    return {a.name: a.corners for a in car_layout(design).axles if a.in_design}


def _axle_x(design: Design, corners: tuple[str, ...]) -> float:
    return float(np.mean([design.corner(c).wheel_centre_mm[0] for c in corners]))


@dataclass(frozen=True)
class _Aero:
    """The elements' aero loads at top speed, at the design pose."""

    down_N: float
    """Vertical load, + = down (N)."""
    x_mm: float
    """x of its line of action (mm)."""
    drag_moment_Nmm: float
    """Σ drag × height above the ground (N·mm): the pitch moment that loads the rear."""
    delivered_N: dict[str, float]
    """What each corner's tyre receives through the routes (N, + = down)."""
    route_ratio: dict[str, float]
    """Each corner's mean route ratio."""
    axle_N: dict[str, tuple[float, float, float]]
    """Per axle with corners, per spring: (tyre gain, spring change routed, spring change
    bolted) in N, + = more load, from the spring loads (DESIGN §5a); empty when a
    wheelbase is needed and unknown."""


def _aero_at_top(analysis: Analysis, top_kmh: float) -> _Aero:
    design, link = analysis.design, analysis.link
    nc = len(link.corner_names)
    spec = SweepSpec("design", TravelDrive(np.zeros((1, nc))), {"travel_mm": np.zeros(1)})
    result = run_sweep(link, spec)
    cases = (LoadCase("top", top_kmh), LoadCase("rest", 0.0))
    loads = applied_loads(design, link, analysis.members, analysis.routes, cases)
    statics = solve_statics(link, analysis.routes, analysis.members, loads, result)
    contact = statics.contact_force_N[0, 0] - statics.contact_force_N[0, 1]
    aero = [i for i, label in enumerate(loads.labels) if label.endswith(" aero")]
    force = loads.force_N[0, aero] - loads.force_N[1, aero]
    down = -force[:, 2]
    total = float(down.sum())
    x = float(np.sum(down * loads.point_mm[aero, 0]) / total) if total else 0.0
    ground = float(np.mean([c.wheel_centre_mm[2] - c.tyre_radius_mm for c in design.corners]))
    drag = float(np.sum(-force[:, 0] * (loads.point_mm[aero, 2] - ground)))
    ratios = route_ratios(link, analysis.routes, result)
    by_corner: dict[str, list[float]] = {}
    for route in analysis.routes.routes:
        by_corner.setdefault(route.corner, []).append(float(ratios[route.name][0]))
    delivered = {name: float(contact[c]) for c, name in enumerate(link.corner_names)}
    springs = spring_loads(link, analysis.routes, analysis.members, loads, {}, {})
    d = springs.design
    tyre = d.tyre_gain_N[0, 0] - d.tyre_gain_N[0, 1]  # (S,)
    routed = (d.spring_N[0, 0] - d.spring_N[0, 1]).sum(axis=0)  # (S,)
    bolted = (d.spring_bolted_N[0, 0] - d.spring_bolted_N[0, 1]).sum(axis=0)
    per_axle: dict[str, tuple[float, float, float]] = {}
    for a, axle in enumerate(springs.layout.axles):
        idx = [i for i, k in enumerate(springs.spring_axle) if k == a]
        values = (
            float(np.mean(tyre[idx])),
            float(np.mean(routed[idx])),
            float(np.mean(bolted[idx])),
        )
        if axle.in_design and all(math.isfinite(v) for v in values):
            per_axle[axle.name] = values
    ratio = {c: float(np.mean(v)) for c, v in by_corner.items()}
    return _Aero(total, x, drag, delivered, ratio, per_axle)


# -- wheel rates -------------------------------------------------------------------


def _drop(car: QuarterCar, sprung_N: float, unsprung_N: float) -> float:
    try:
        return static_drop_m(car, sprung_N, unsprung_N)[0]
    except Unstable:
        return math.inf


def _budget_rate(
    car: QuarterCar, sprung_N: float, unsprung_N: float, budget_m: float
) -> float | None:
    """The softest wheel rate (N/m) that keeps |body drop| ≤ budget under the loads;
    None when any rate does; ValueError when none does."""

    def drop(k: float) -> float:
        return abs(_drop(_with_rate(car, k), sprung_N, unsprung_N))

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


def _with_rate(car: QuarterCar, rate: float) -> QuarterCar:
    return QuarterCar(
        car.sprung_kg, car.unsprung_kg, rate, car.damper_N_s_m, car.tyre_N_m,
        car.aero_N_m, car.aero_on,
    )  # fmt: skip


# -- the study ---------------------------------------------------------------------


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
    aero = _aero_at_top(analysis, top)
    ratio = aero.route_ratio
    if aero.down_N <= 0.0:
        raise DesignFileError(
            src, f"elements.{design.elements[0].name}.aero",
            "no downforce at top speed: the study needs each element's aero data",
            "add reference_area_m2 and downforce_coefficient",
        )  # fmt: skip
    groups = axle_groups(design)
    notes: list[str] = []
    loads_by_axle = _axle_loads(design, groups, aero, notes)
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


@dataclass(frozen=True)
class _AxleLoad:
    """Downforce at top speed per corner of one axle (N, + = down)."""

    share: float
    """The axle's share of the elements' vertical load."""
    tyre_N: float
    spring_routed_N: float
    spring_bolted_N: float


def _axle_loads(
    design: Design, groups: dict[str, tuple[str, ...]], aero: _Aero, notes: list[str]
) -> dict[str, _AxleLoad]:
    """Each axle's tyre and spring loads from the spring loads of DESIGN §5a (statics of
    the chassis on its two axles, the drag's pitch moment included); without a wheelbase
    a one-axle design puts the whole load on its axle (and says so)."""
    layout = car_layout(design)
    out: dict[str, _AxleLoad] = {}
    for axle in layout.axles:
        if not axle.in_design:
            continue
        n = len(axle.springs)
        if axle.name in aero.axle_N:
            tyre, routed, bolted = aero.axle_N[axle.name]
        else:
            tyre = bolted = aero.down_N / n
            routed = tyre - float(np.mean([aero.delivered_N[c] for c in axle.corners]))
            notes.append(
                f"the {axle.name} axle takes the whole load: without the wheelbase the "
                "pitch couple between the axles is left out (give [car] wheelbase_mm)"
            )
        out[axle.name] = _AxleLoad(tyre * n / aero.down_N, tyre, routed, bolted)
    if len(out) == 1 and layout.wheelbase_mm is not None:
        other = 1.0 - next(iter(out.values())).share
        notes.append(
            f"the other axle's tyres gain {other:+.0%} of the downforce, through its springs "
            "the same bolted or routed: its quarter car does not change"
        )
    return out


def _study_axle(
    analysis: Analysis,
    mass: MassReport,
    spec: TradeoffSpec,
    axle: str,
    corners: tuple[str, ...],
    load: _AxleLoad,
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
    bump = _bump_travel(design, spec)
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
                need = _budget_rate(trial, *loads[name], budget)
            except ValueError:
                raise DesignFileError(
                    src, "tradeoff.ride_height_budget_mm",
                    f"no wheel rate keeps the {axle} body within "
                    f"{spec.ride_height_budget_mm:g} mm at {top:g} km/h ({name}): the tyres "
                    "alone sink further",
                    "raise the budget or give a stiffer tyre_rate_N_per_mm",
                ) from None  # fmt: skip
        rates[name] = _choose_rate(name, given, need, spec, m_s, k_t, rates, axle, src)
    cases = {
        name: _case(
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


def _choose_rate(
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


def _bump_travel(design: Design, spec: TradeoffSpec) -> float:
    if spec.bump_travel_mm is not None:
        return spec.bump_travel_mm * 1e-3
    if design.sweeps.travel_mm is not None and design.sweeps.travel_mm[1] > 0.0:
        return design.sweeps.travel_mm[1] * 1e-3
    raise DesignFileError(
        design.source, "tradeoff.bump_travel_mm",
        "missing: the travel sweep has no bump end to take it from",
        "add the travel to the bump stop at static ride height",
    )  # fmt: skip


def _case(
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
