"""The car around the route for the ride study: the design's axles, the elements' aero
loads at top speed (what the routes deliver to the tyres, what the springs see, DESIGN
§5a) and each axle's share of them.  Loads in N, + = down; lengths in mm."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from plumbrod.design.car import car_layout
from plumbrod.design.model import Design, LoadCase
from plumbrod.kinematics.drives import TravelDrive
from plumbrod.kinematics.figures import route_ratios
from plumbrod.kinematics.sweeps import SweepSpec, run_sweep
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.loads import applied_loads
from plumbrod.mechanics.springs import spring_loads
from plumbrod.mechanics.statics import solve_statics

__all__ = ["AeroAtTop", "AxleLoad", "aero_at_top", "axle_groups", "axle_loads"]


def axle_groups(design: Design) -> dict[str, tuple[str, ...]]:
    """The design's corners by axle (``[car]`` and the corners, as the spring loads see
    them): only the axles that hold a corner."""
    return {a.name: a.corners for a in car_layout(design).axles if a.in_design}


@dataclass(frozen=True)
class AeroAtTop:
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


def aero_at_top(analysis: Analysis, top_kmh: float) -> AeroAtTop:
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
    return AeroAtTop(total, x, drag, delivered, ratio, per_axle)


@dataclass(frozen=True)
class AxleLoad:
    """Downforce at top speed per corner of one axle (N, + = down)."""

    share: float
    """The axle's share of the elements' vertical load."""
    tyre_N: float
    spring_routed_N: float
    spring_bolted_N: float


def axle_loads(
    design: Design, groups: dict[str, tuple[str, ...]], aero: AeroAtTop, notes: list[str]
) -> dict[str, AxleLoad]:
    """Each axle's tyre and spring loads from the spring loads of DESIGN §5a (statics of
    the chassis on its two axles, the drag's pitch moment included); without a wheelbase
    a one-axle design puts the whole load on its axle (and says so)."""
    layout = car_layout(design)
    out: dict[str, AxleLoad] = {}
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
        out[axle.name] = AxleLoad(tyre * n / aero.down_N, tyre, routed, bolted)
    if len(out) == 1 and layout.wheelbase_mm is not None:
        other = 1.0 - next(iter(out.values())).share
        notes.append(
            f"the other axle's tyres gain {other:+.0%} of the downforce, through its springs "
            "the same bolted or routed: its quarter car does not change"
        )
    return out
