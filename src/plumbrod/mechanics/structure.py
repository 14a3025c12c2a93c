"""Buckling and tension reserve of every rod over every pose and load case.

A rod's critical load is fixed by its section, material, length and end fixity K
(:func:`plumbrod.mechanics.columns.critical_load_N`: Euler above the transition slenderness,
Johnson below); its worst compression and tension come from the statics of every sweep.
Reserve factors: buckling RF = P_cr/|P| for P < 0, tension RF = S_y·A/P for P > 0;
margin MS = RF/required − 1.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.columns import critical_load_N, tension_capacity_N, transition_slenderness
from plumbrod.mechanics.members import Member

__all__ = ["FORCE_FLOOR_N", "RodReserve", "WorstForce", "capacity", "rod_reserves"]

FORCE_FLOOR_N = 1e-6
"""Forces smaller than this count as zero (round-off of an unloaded rod)."""


@dataclass(frozen=True)
class WorstForce:
    """The largest force of one sign of a rod, and where it happens."""

    force_N: float
    sweep: str
    pose: int
    case: str


@dataclass(frozen=True)
class RodReserve:
    """Buckling and tension figures of one rod."""

    name: str
    critical_load_N: float
    regime: str
    slenderness: float
    transition_slenderness: float
    tension_capacity_N: float
    compression: WorstForce | None
    tension: WorstForce | None

    @property
    def buckling_rf(self) -> float:
        if self.compression is None or self.compression.force_N >= 0:
            return float("inf")
        return self.critical_load_N / abs(self.compression.force_N)

    @property
    def tension_rf(self) -> float:
        if self.tension is None or self.tension.force_N <= 0:
            return float("inf")
        return self.tension_capacity_N / self.tension.force_N


def capacity(member: Member) -> tuple[float, str, float, float, float]:
    """Critical load N, regime, slenderness KL/r, transition slenderness, S_y·A (N)."""
    s, m = member.section, member.material
    k = member.rod.end_fixity
    area, inertia = s.area_mm2, s.second_moment_mm4
    slender = k * member.length_mm / float(np.sqrt(inertia / area))
    lam_t = float(transition_slenderness(m.modulus_MPa, m.yield_MPa))
    p_cr = float(critical_load_N(area, inertia, member.length_mm, k, m.modulus_MPa, m.yield_MPa))
    regime = "euler" if slender >= lam_t else "johnson"
    return p_cr, regime, slender, lam_t, float(tension_capacity_N(area, m.yield_MPa))


def rod_reserves(analysis: Analysis) -> dict[str, RodReserve]:
    """Worst compression and tension of every design rod over every sweep and case."""
    out: dict[str, RodReserve] = {}
    for rod in analysis.design.rods:
        member = analysis.members[rod.name]
        p_cr, regime, slender, lam_t, cap = capacity(member)
        j = analysis.link.rod_names.index(rod.name)
        comp: WorstForce | None = None
        tens: WorstForce | None = None
        for sweep, st in analysis.statics.items():
            f = analysis.rod_force_N(sweep)[..., j]  # (B, K), fight forces included
            b, k = np.unravel_index(int(np.argmin(f)), f.shape)
            if f[b, k] < -FORCE_FLOOR_N and (comp is None or f[b, k] < comp.force_N):
                comp = WorstForce(float(f[b, k]), sweep, int(b), st.cases[k])
            b, k = np.unravel_index(int(np.argmax(f)), f.shape)
            if f[b, k] > FORCE_FLOOR_N and (tens is None or f[b, k] > tens.force_N):
                tens = WorstForce(float(f[b, k]), sweep, int(b), st.cases[k])
        out[rod.name] = RodReserve(rod.name, p_cr, regime, slender, lam_t, cap, comp, tens)
    return out
