"""Masses of the route and what they add to each corner's unsprung mass (DESIGN §5.8).

* Static share: with only gravity on the route's parts (element, rockers, rods), the
  load each tyre carries, in kg.
* Kinetic-energy-equivalent mass at the wheel: ``Σ m|∂v/∂ṡ|² + Σ ωᵀIω`` over the route's
  bodies for a unit wheel speed, in single-wheel bump (that corner alone) and in heave
  (every wheel together; the total divided among the corners).

Approximations, stated in the report: a rocker is a point mass (its ``mass_kg``, or its
plate's mass) at the centroid of its pickups; a rod is uniform (its kinetic energy from
its end velocities); an element without ``inertia_kg_m2`` is a uniform block spanning
its pickups, cg and centre of pressure.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import Element, LoadCase
from plumbrod.kinematics.drives import TravelDrive
from plumbrod.kinematics.sweeps import SweepSpec, run_sweep
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.loads import STANDARD_GRAVITY_M_S2, applied_loads
from plumbrod.mechanics.plates import rocker_mass_kg
from plumbrod.mechanics.statics import solve_statics

__all__ = ["CornerMass", "MassReport", "element_inertia", "mass_report"]

Array = NDArray[np.float64]


@dataclass(frozen=True)
class CornerMass:
    """Added unsprung mass at one corner (kg)."""

    corner: str
    static_share_kg: float
    kinetic_single_kg: float
    kinetic_heave_kg: float
    existing_kg: float | None


@dataclass(frozen=True)
class MassReport:
    bodies_kg: dict[str, float]
    """Mass of every element, rocker and rod."""
    corners: tuple[CornerMass, ...]
    estimated_inertia: tuple[str, ...]
    """Elements whose inertia was estimated."""

    @property
    def total_kg(self) -> float:
        return float(sum(self.bodies_kg.values()))


def element_inertia(analysis: Analysis, element: Element) -> tuple[Array, bool]:
    """Inertia tensor about the cg (kg·mm², chassis axes) and whether it is estimated."""
    if element.inertia_kg_m2 is not None:
        return np.diag(element.inertia_kg_m2) * 1e6, False
    pts = [p.position_mm for p in analysis.design.pickups.values() if p.body == element.name]
    pts += [element.cg_mm, element.centre_of_pressure_mm]
    size = np.ptp(np.array(pts), axis=0)
    dx, dy, dz = size
    m = element.mass_kg
    return np.diag([m * (dy**2 + dz**2), m * (dx**2 + dz**2), m * (dx**2 + dy**2)]) / 12.0, True


def mass_report(analysis: Analysis) -> MassReport:
    """Masses and the unsprung mass they add, at the design pose."""
    design, link = analysis.design, analysis.link
    bodies: dict[str, float] = {e.name: e.mass_kg for e in design.elements}
    for rocker in design.rockers:
        bodies[rocker.name] = rocker_mass_kg(design, rocker)
    for rod in design.rods:
        bodies[rod.name] = analysis.members[rod.name].mass_kg

    nc = len(link.corner_names)
    spec = SweepSpec("design", TravelDrive(np.zeros((1, nc))), {"travel_mm": np.zeros(1)})
    result = run_sweep(link, spec, analysis.elastic)
    gravity = applied_loads(
        design, link, analysis.members, analysis.routes, (LoadCase("gravity", 0.0),)
    )
    share = solve_statics(link, analysis.routes, analysis.members, gravity, result)
    static_kg = share.contact_force_N[0, 0] / STANDARD_GRAVITY_M_S2

    kin = result.solved.kin
    tangents = result.tangent[0]  # (nq, nc)
    cases = [tangents[:, c] for c in range(nc)] + [tangents.sum(axis=1)]
    energy = np.array([_kinetic_mass(analysis, kin, dq) for dq in cases])
    estimated = []
    for element in design.elements:
        if element.inertia_kg_m2 is None:
            estimated.append(element.name)
    corners = tuple(
        CornerMass(
            corner=name,
            static_share_kg=float(static_kg[c]),
            kinetic_single_kg=float(energy[c]),
            kinetic_heave_kg=float(energy[-1] / nc),
            existing_kg=design.corner(name).unsprung_mass_kg,
        )
        for c, name in enumerate(link.corner_names)
    )
    return MassReport(bodies, corners, tuple(estimated))


def _kinetic_mass(analysis: Analysis, kin: object, dq: Array) -> float:
    """2·KE per unit wheel speed squared (kg) of the route parts for the motion ``dq``."""
    from plumbrod.kinematics.linkage import Kinematics

    assert isinstance(kin, Kinematics)
    design, link = analysis.design, analysis.link
    total = 0.0
    for element in design.elements:
        b = link.body(element.name)
        cg = kin.points[:, link.point(f"{element.name}.cg")]
        v = kin.jacobian_at(link, np.array([b]), cg[:, None])[0, 0] @ dq
        twist = kin.body_twists(link, np.array([b]))[0, 0] @ dq
        inertia, _ = element_inertia(analysis, element)
        w = twist[3:6]
        total += element.mass_kg * float(v @ v) + float(w @ inertia @ w)  # kg·mm² · (rad/mm)²
    for rocker in design.rockers:
        mass = rocker_mass_kg(design, rocker)
        if not mass:
            continue
        picks = [p.position_mm for p in design.pickups.values() if p.body == rocker.name]
        if not picks:
            continue
        centre = np.mean(picks, axis=0)
        b = link.body(rocker.name)
        moved = (kin.rotation[0, b] @ centre) + kin.translation[0, b]
        v = kin.jacobian_at(link, np.array([b]), moved[None, None])[0, 0] @ dq
        total += mass * float(v @ v)
    for rod in design.rods:
        ends = np.array([link.point(rod.end_a), link.point(rod.end_b)])
        va, vb = kin.point_jacobian(link, ends)[0] @ dq
        m = analysis.members[rod.name].mass_kg
        total += m / 3.0 * float(va @ va + va @ vb + vb @ vb)
    return total
