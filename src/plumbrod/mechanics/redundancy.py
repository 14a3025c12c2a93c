"""Fight forces of a redundantly located design, added to every load case (DESIGN §4a).

The elastic sweeps (:mod:`plumbrod.kinematics.elastic`) give each spring's stretch
through the motion; ``T = k·(ℓ − ℓ₀)`` (+ tension) is what the motion alone does to the
rod, with no load.  The load cases' own forces come from the elastic statics at the
same poses (:func:`plumbrod.mechanics.statics.solve_statics`); a rod's force in a load
case is the sum (``Analysis.rod_force_N``), so the buckling, tension and rod-end checks
and the force tables see both.  Fight forces are self-equilibrated: they are added to
the rod forces only, not to the joint, upright and leakage figures, which stay those of
the aero and inertia loads.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.elastic import ElasticSetup
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.sweeps import SweepResult
from plumbrod.mechanics.members import Member

__all__ = [
    "FightForces",
    "Redundancy",
    "fight_forces",
    "redundancy_summary",
    "rod_stiffness",
    "spring_compliance",
    "unit_rod_rows",
]

Array = NDArray[np.float64]


def unit_rod_rows(n_rods: int, jac: Array, grad: Array) -> tuple[Array, Array]:
    """Member rows (B, m, nq) and gradients (B, m, 3) with every rod row scaled to the
    unit rod direction.  A rod row's gradient is d/ℓ₀ (the residual's derivative), of
    length ℓ/ℓ₀; a stretched spring's multiplier is then its axial force only after
    this scaling."""
    size = np.linalg.norm(grad[:, :n_rods], axis=-1)[..., None]
    jac, grad = jac.copy(), grad.copy()
    jac[:, :n_rods] /= size
    grad[:, :n_rods] /= size
    return jac, grad


def spring_compliance(setup: ElasticSetup, compliance: Array) -> Array:
    """Row compliances (mm/N) with only the springs of ``setup`` compliant: the rods
    outside the redundancy are rigid, as in the elastic poses."""
    out = np.zeros_like(compliance)
    out[setup.rods] = compliance[setup.rods]
    return out


def rod_stiffness(link: Linkage, members: dict[str, Member]) -> Array:
    """(nr,) EA/L of every link rod (N/mm); NaN for rods that are not design rods."""
    return np.array(
        [
            members[name].stiffness_N_per_mm if name in members else np.nan
            for name in link.rod_names
        ],
        dtype=float,
    )


@dataclass(frozen=True)
class FightForces:
    """One sweep's fight forces over its B poses."""

    sweep: str
    springs: tuple[str, ...]
    force_N: Array  # (B, ne) + tension
    removed: tuple[str, ...]
    mismatch_mm: Array  # (B, nR) length change of the removable set if all were rigid
    rod_force_N: Array  # (B, nr) the same forces over every link rod (0 elsewhere)


def fight_forces(link: Linkage, result: SweepResult) -> FightForces | None:
    """The fight forces of one elastic sweep, or None for a rigid one."""
    elastic = result.elastic
    if elastic is None:
        return None
    setup = elastic.setup
    force = elastic.force_N
    every = np.zeros((force.shape[0], len(link.rod_names)))
    every[:, setup.rods] = force
    return FightForces(
        result.name,
        setup.names(link),
        force,
        setup.removed_names(link),
        elastic.mismatch_mm,
        every,
    )


@dataclass(frozen=True)
class Redundancy:
    """What the report says about a redundantly located design."""

    elements: tuple[str, ...]
    """Elements the springs reach."""
    springs: tuple[str, ...]
    removed: tuple[str, ...]
    largest: tuple[float, str, str, int] | None
    """(force N, rod, sweep, pose) of the largest |fight force|."""
    largest_mismatch: tuple[float, str, str, int] | None
    """(mm, rod, sweep, pose) of the largest length change rigid rods would need."""
    per_sweep: dict[str, FightForces]


def redundancy_summary(
    link: Linkage, setup: ElasticSetup | None, sweeps: dict[str, SweepResult]
) -> Redundancy | None:
    """Summary of the fight forces over every sweep, or None when exactly located."""
    if setup is None:
        return None
    per: dict[str, FightForces] = {}
    largest: tuple[float, str, str, int] | None = None
    mismatch: tuple[float, str, str, int] | None = None
    for name, result in sweeps.items():
        fight = fight_forces(link, result)
        if fight is None:
            continue
        per[name] = fight
        if fight.force_N.size:
            b, r = np.unravel_index(int(np.argmax(np.abs(fight.force_N))), fight.force_N.shape)
            value = float(fight.force_N[b, r])
            if largest is None or abs(value) > abs(largest[0]):
                largest = (value, fight.springs[r], name, int(b))
        if fight.mismatch_mm.size:
            b, r = np.unravel_index(
                int(np.argmax(np.abs(fight.mismatch_mm))), fight.mismatch_mm.shape
            )
            value = float(fight.mismatch_mm[b, r])
            if mismatch is None or abs(value) > abs(mismatch[0]):
                mismatch = (value, fight.removed[r], name, int(b))
    body_of = {key: p.body for key, p in link.design.pickups.items()}
    from plumbrod.kinematics.routes import element_of_body

    carrier = element_of_body(link.design)
    elements: list[str] = []
    for rod in link.design.rods:
        if rod.name not in setup.names(link):
            continue
        for end in (rod.end_a, rod.end_b):
            element = carrier.get(body_of[end])
            if element is not None and element not in elements:
                elements.append(element)
    return Redundancy(
        tuple(elements), setup.names(link), setup.removed_names(link), largest, mismatch, per
    )
