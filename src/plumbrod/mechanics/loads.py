"""Load cases and the loads they apply: aero forces and the inertia of the masses.

Aero: downforce ½ρV²·S·C_L and drag ½ρV²·S·C_D at the element's centre of pressure,
along the ground's −z and −x (the air flows along the car); or the forces a load case
gives directly.  Masses: every element, rocker and rod feels ``m·g`` times
``(1 + bump_g)`` downward and ``−m·g·longitudinal_g`` along x, ``−m·g·lateral_g``
along y (longitudinal_g + = accelerating, − = braking; lateral_g + = turning left).
All forces are in the ground frame, N.

References: lift equation L = ½ρV²·S·C_L (NASA Glenn Research Center, "The Lift
Coefficient"); standard sea-level density 1.225 kg/m³ (ISO 2533:1975, U.S. Standard
Atmosphere 1976); standard gravity 9.80665 m/s² (CGPM 1901, ISO 80000-3).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import PLANE_NORMAL_AXIS, Design, Element, LoadCase, Vec3
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.routes import RouteMap, element_of_body
from plumbrod.mechanics.members import Member
from plumbrod.mechanics.plates import rocker_mass_kg

__all__ = [
    "SEA_LEVEL_DENSITY_KG_M3",
    "STANDARD_GRAVITY_M_S2",
    "AppliedLoads",
    "aero_force_N",
    "applied_loads",
    "design_load_cases",
    "dynamic_pressure_Pa",
]

Array = NDArray[np.float64]
SEA_LEVEL_DENSITY_KG_M3 = 1.225
STANDARD_GRAVITY_M_S2 = 9.80665
DEFAULT_BUMP_G = 3.0
"""Vertical bump factor of the second default case: common practice, confirm it."""


def dynamic_pressure_Pa(speed_kmh: float, density_kg_m3: float = SEA_LEVEL_DENSITY_KG_M3) -> float:
    """q = ½ρV² with V in m/s, Pa."""
    v = speed_kmh / 3.6
    return 0.5 * density_kg_m3 * v * v


def design_load_cases(design: Design) -> tuple[LoadCase, ...]:
    """The design's load cases, or the two defaults at ``top_speed_kmh``; then one
    ground-strike case per element that names a strike."""
    cases: tuple[LoadCase, ...] = ()
    if design.load_cases:
        cases = design.load_cases
    elif design.top_speed_kmh is not None:
        cases = (
            LoadCase("top-speed", design.top_speed_kmh),
            LoadCase(
                f"top-speed-bump-{DEFAULT_BUMP_G:g}g", design.top_speed_kmh, bump_g=DEFAULT_BUMP_G
            ),
        )
    return cases + strike_cases(design, cases)


def strike_cases(design: Design, cases: tuple[LoadCase, ...]) -> tuple[LoadCase, ...]:
    """A ground strike on an element: the strike force straight up at its point, on top
    of the aero loads at the highest speed of the other cases and the weights (1 g).
    The strike force is the design's own figure (common practice: confirm it)."""
    out = []
    speed = max((c.speed_kmh for c in cases), default=design.top_speed_kmh or 0.0)
    for element in design.elements:
        if element.strike is None:
            continue
        forces: dict[str, tuple[float, float, float]] = {}
        for other in design.elements:
            if other.aero is None:
                given = next(
                    (c.forces_N[other.name] for c in cases if other.name in c.forces_N), None
                )
                forces[other.name] = given or (0.0, 0.0, 0.0)
        out.append(
            LoadCase(
                f"{element.name}-ground-strike",
                speed,
                forces_N=forces,
                strikes={element.name: (element.strike.force_N, element.strike.at_mm)},
            )
        )
    return tuple(out)


def aero_force_N(element: Element, case: LoadCase) -> tuple[float, float, float]:
    """The element's aero force in the ground frame for a case, N."""
    if element.name in case.forces_N:
        return case.forces_N[element.name]
    if element.aero is None:
        return (0.0, 0.0, 0.0)
    q = dynamic_pressure_Pa(case.speed_kmh, case.air_density_kg_m3)
    area = element.aero.reference_area_m2
    return (
        -q * area * element.aero.drag_coefficient,
        0.0,
        -q * area * element.aero.downforce_coefficient,
    )


@dataclass(frozen=True)
class AppliedLoads:
    """Point loads for every case: which body, where (design position), how much.

    ``force_N`` (K, nl, 3) is in the ground frame; ``owner`` (nl,) is the index of the
    element whose load it counts as (route parts count with their element).  In a
    planar design the components normal to the view are left out (the planar linkage
    cannot carry them) and ``left_out`` says which, per load case.
    """

    cases: tuple[str, ...]
    elements: tuple[str, ...]
    labels: tuple[str, ...]
    body: NDArray[np.intp]
    point_mm: Array
    owner: NDArray[np.intp]
    force_N: Array
    left_out: tuple[str, ...] = ()

    @property
    def size(self) -> int:
        return len(self.labels)


def _inertia(mass_kg: float, case: LoadCase) -> tuple[float, float, float]:
    w = mass_kg * STANDARD_GRAVITY_M_S2
    return (-w * case.longitudinal_g, -w * case.lateral_g, -w * (1.0 + case.bump_g))


def _vec3(point: NDArray[np.float64]) -> Vec3:
    """A point (3,) as a tuple of floats."""
    x, y, z = (float(v) for v in point)
    return (x, y, z)


def applied_loads(
    design: Design,
    link: Linkage,
    members: dict[str, Member],
    routes: RouteMap,
    cases: tuple[LoadCase, ...],
) -> AppliedLoads:
    """Aero and mass loads of every case on every body."""
    elements = tuple(e.name for e in design.elements)
    owner_of_body: dict[str, int] = {}
    owner_of_rod: dict[str, int] = {}
    for route in routes.routes:
        e = elements.index(route.element)
        for body in route.bodies:
            owner_of_body.setdefault(body, e)
        for rod_name in (*route.receiving_rods, *route.delivering_rods):
            owner_of_rod.setdefault(rod_name, e)
    carrier = element_of_body(design)  # elements and their equalisers
    for body, carried_by in carrier.items():
        owner_of_body.setdefault(body, elements.index(carried_by))
    body_of = {key: p.body for key, p in design.pickups.items()}
    for rod in design.rods:  # rods inside a route, and guides
        for end in (rod.end_a, rod.end_b):
            body = body_of[end]
            if body in carrier:
                owner_of_rod.setdefault(rod.name, elements.index(carrier[body]))
            elif body in owner_of_body:
                owner_of_rod.setdefault(rod.name, owner_of_body[body])

    labels: list[str] = []
    bodies: list[int] = []
    points: list[tuple[float, float, float]] = []
    owners: list[int] = []
    forces: list[list[tuple[float, float, float]]] = []

    def add(
        label: str,
        body: str,
        point: tuple[float, float, float],
        owner: int,
        per_case: list[tuple[float, float, float]],
    ) -> None:
        labels.append(label)
        bodies.append(link.body(body))
        points.append(point)
        owners.append(owner)
        forces.append(per_case)

    for e, element in enumerate(design.elements):
        add(
            f"{element.name} aero",
            element.name,
            element.centre_of_pressure_mm,
            e,
            [
                (0.0, 0.0, 0.0) if element.name in c.forces_at_mm else aero_force_N(element, c)
                for c in cases
            ],
        )
        for k, case in enumerate(cases):
            zero = [(0.0, 0.0, 0.0)] * len(cases)
            if element.name in case.forces_at_mm:
                per_case = list(zero)
                per_case[k] = case.forces_N[element.name]
                add(
                    f"{element.name} force in '{case.name}'",
                    element.name,
                    case.forces_at_mm[element.name],
                    e,
                    per_case,
                )
            if element.name in case.strikes:
                lift, point = case.strikes[element.name]
                per_case = list(zero)
                per_case[k] = (0.0, 0.0, lift)
                add(f"{element.name} strike in '{case.name}'", element.name, point, e, per_case)
        add(
            f"{element.name} mass",
            element.name,
            element.cg_mm,
            e,
            [_inertia(element.mass_kg, c) for c in cases],
        )
    for rocker in design.rockers:
        mass = rocker_mass_kg(design, rocker)
        if not mass:
            continue
        picks = [p.position_mm for p in design.pickups.values() if p.body == rocker.name]
        centroid = _vec3(np.mean(picks, axis=0)) if picks else rocker.axis_a_mm
        add(
            f"{rocker.name} mass",
            rocker.name,
            centroid,
            owner_of_body.get(rocker.name, 0),
            [_inertia(mass, c) for c in cases],
        )
    for rod in design.rods:
        half = members[rod.name].mass_kg / 2.0
        for end in (rod.end_a, rod.end_b):
            pickup = design.pickups[end]
            if pickup.body == "chassis":
                continue
            add(
                f"rod {rod.name} mass",
                pickup.body,
                pickup.position_mm,
                owner_of_rod.get(rod.name, 0),
                [_inertia(half, c) for c in cases],
            )
    k = len(cases)
    force = np.array(forces, dtype=float).reshape(len(labels), k, 3).transpose(1, 0, 2)
    left_out: list[str] = []
    if design.plane is not None:
        axis = PLANE_NORMAL_AXIS[design.plane]
        for c, case in enumerate(cases):
            dropped = force[c, :, axis]
            if np.any(dropped != 0.0):
                left_out.append(
                    f"load case '{case.name}': {np.abs(dropped).sum():.1f} N along "
                    f"{'xyz'[axis]} left out (normal to the {design.plane} view)"
                )
        force[:, :, axis] = 0.0
    return AppliedLoads(
        cases=tuple(c.name for c in cases),
        elements=elements,
        labels=tuple(labels),
        body=np.array(bodies, dtype=np.intp),
        point_mm=np.array(points, dtype=float),
        owner=np.array(owners, dtype=np.intp),
        force_N=force,
        left_out=tuple(left_out),
    )
