"""Vertical compliance of each route and the element's deflection (DESIGN §5.9).

With the wheels held, ``g_i = ∂z/∂ℓ_i`` is a point's vertical motion per unit extension
of rod ``i`` (from the constraint Jacobian: ``∂z/∂q · Φ_q⁻¹`` on rod ``i``'s row).  The
route's vertical stiffness at its element pickup is ``1/k = Σ g_i²/k_i`` with
``k_i = EA/L``; the element's deflection at its centre of pressure under a load case is
``δz = Σ g_i·T_i/k_i`` (unit-load method, with the real rod forces ``T_i``).  Rockers
are rigid.  Over-constrained designs: the stiffness shown is a lower bound.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.mechanics.analysis import Analysis

__all__ = ["ComplianceReport", "compliance_report"]

Array = NDArray[np.float64]


@dataclass(frozen=True)
class ComplianceReport:
    route_stiffness_N_per_mm: dict[str, float]
    """Vertical stiffness at each route's element pickup, design pose (N/mm)."""
    deflection_mm: dict[str, dict[str, Array]]
    """sweep -> element -> (B, K) vertical deflection of the centre of pressure (mm)."""
    worst: tuple[float, str, str, int, str] | None
    """(deflection mm, element, sweep, pose, load case) of the largest |deflection|."""


def _influence(analysis: Analysis, sweep: str, points: list[str]) -> Array:
    """(B, n_points, n_rods) ∂z/∂ℓ for every link rod, wheels held."""
    link = analysis.link
    res = analysis.sweeps[sweep]
    jac = res.solved.jacobian  # (B, m, nq): members then drivers
    idx = np.array([link.point(p) for p in points])
    jz = res.solved.kin.point_jacobian(link, idx)[:, :, 2, :]  # (B, n, nq)
    rhs = np.swapaxes(jz, 1, 2)  # (B, nq, n)
    jt = np.swapaxes(jac, 1, 2)
    if jt.shape[1] == jt.shape[2]:
        g = np.linalg.solve(jt, rhs)  # (B, m, n): row-space weights
    else:
        g = np.linalg.pinv(jt, rcond=1e-12) @ rhs
    return np.swapaxes(g[:, : len(link.rod_names)], 1, 2)


def compliance_report(analysis: Analysis) -> ComplianceReport:
    link = analysis.link
    design = analysis.design
    k = np.full(len(link.rod_names), np.inf)
    for i, name in enumerate(link.rod_names):
        if name in analysis.members:
            k[i] = analysis.members[name].stiffness_N_per_mm
    flex = np.where(np.isfinite(k), 1.0 / k, 0.0)

    stiffness: dict[str, float] = {}
    reference = "travel" if "travel" in analysis.sweeps else next(iter(analysis.sweeps))
    mid = analysis.sweeps[reference].spec.size // 2
    pickups = [r.pickup for r in analysis.routes.routes]
    if pickups:
        g = _influence(analysis, reference, pickups)[mid]  # (n, nr)
        for route, row in zip(analysis.routes.routes, g, strict=True):
            c = float(np.sum(row**2 * flex))
            stiffness[route.name] = 1.0 / c if c > 0 else float("inf")

    deflection: dict[str, dict[str, Array]] = {}
    worst: tuple[float, str, str, int, str] | None = None
    cops = [f"{e.name}.centre_of_pressure" for e in design.elements]
    for sweep, st in analysis.statics.items():
        g = _influence(analysis, sweep, cops)  # (B, E, nr)
        stretch = st.rod_force_N * flex  # (B, K, nr)
        dz = np.einsum("ber,bkr->bke", g, stretch)
        deflection[sweep] = {e.name: dz[:, :, j] for j, e in enumerate(design.elements)}
        b, kk, e = np.unravel_index(int(np.argmax(np.abs(dz))), dz.shape)
        if worst is None or abs(dz[b, kk, e]) > abs(worst[0]):
            worst = (float(dz[b, kk, e]), design.elements[e].name, sweep, int(b), st.cases[kk])
    return ComplianceReport(stiffness, deflection, worst)
