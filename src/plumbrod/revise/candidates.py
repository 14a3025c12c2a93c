"""Screen a batch of candidate designs: the figures the tune's targets need, at once.

A candidate is the design with its free variables set (points moved, mm).  Each batch
of S candidates is solved as S designs × the screening poses (a coarse travel sweep and,
when the design sweeps heave, a coarse heave sweep; see
:mod:`plumbrod.kinematics.design_grid`), and gives per candidate:

* constraints ``c <= 0`` (each figure over its target, as a fraction: route ratio
  band, line of action, transmission angles, ride-height sensitivity to heave, buckling
  and tension reserves and the avoidable spring-load share (the sprung-leakage check's
  figure, :mod:`plumbrod.mechanics.springs`) at the statics poses);
* an objective: ``w_ratio * mean(((R - target) / half band)^2)`` over routes and travel
  poses (the ratio held flat at the target), ``+ w_mass * rod mass / rod mass at the
  start`` and ``+ w_leak * largest avoidable spring-load share / its target``.

Screening is approximate where noted (loads act at their design points, statics at a
few poses, no clearance); the final candidates are checked in full by
:func:`plumbrod.verdict.findings.review`.  A candidate that does not assemble gets
:data:`INFEASIBLE` in every constraint and the objective; it is never an error.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.car import car_layout
from plumbrod.design.model import Design
from plumbrod.design.tune_spec import TuneSpec
from plumbrod.kinematics.design_grid import GridSolution, solve_grid
from plumbrod.kinematics.drives import BodyDrive, TravelDrive
from plumbrod.kinematics.figures import ride_heights, sweep_figures
from plumbrod.kinematics.linkage import Kinematics, Linkage
from plumbrod.kinematics.reduced import reduce_linkage, solve_grid_reduced
from plumbrod.kinematics.solver import Solved
from plumbrod.kinematics.sweeps import SweepResult, SweepSpec
from plumbrod.mechanics.analysis import locate
from plumbrod.mechanics.columns import critical_load_N
from plumbrod.mechanics.loads import applied_loads, design_load_cases
from plumbrod.mechanics.members import resolve_members
from plumbrod.mechanics.springs import _element_axles, _sweep_springs
from plumbrod.mechanics.statics import reference_points, solve_statics

__all__ = ["CONSTRAINTS", "INFEASIBLE", "Screen", "Screening"]

Array = NDArray[np.float64]
INFEASIBLE = 1.0e3
"""Constraint value and objective of a candidate that does not assemble."""
CONSTRAINTS = (
    "route-ratio",
    "line-of-action",
    "transmission-angle",
    "ride-height-sensitivity",
    "buckling",
    "tension",
    "sprung-leakage",
)
HEAVE_STEPS = 9


@dataclass(frozen=True)
class Screen:
    """Screening figures of S candidates."""

    objective: Array  # (S,)
    constraints: Array  # (S, len(CONSTRAINTS)), <= 0 feasible
    assembled: NDArray[np.bool_]  # (S,)
    route_ratio: Array  # (S, routes, P) travel poses
    mass_kg: Array  # (S,) design rods
    leakage: Array  # (S,) largest avoidable spring-load change, share of the vertical load

    @property
    def violation(self) -> Array:
        """(S,) the worst constraint (<= 0 feasible)."""
        return self.constraints.max(axis=1)


class Screening:
    """Evaluates batches of variable vectors ``x`` (S, n) for one design and tune spec."""

    def __init__(self, design: Design, spec: TuneSpec, *, screen_steps: int | None = None):
        self.design = design
        self.spec = spec
        link, _, routes = locate(design)
        self.link: Linkage = link
        self.routes = routes
        self.members = resolve_members(design)
        cases = design_load_cases(design)
        self.loads = applied_loads(design, link, self.members, routes, cases) if cases else None
        self.layout = car_layout(design)
        self.landed = _element_axles(design, routes, self.layout)
        self.refs = reference_points(link, routes)
        self.base = link.points[0].copy()
        n = len(spec.variables)
        self.move = np.zeros((n, *self.base.shape))
        for i, var in enumerate(spec.variables):
            for name, d in zip(var.points, var.directions, strict=True):
                self.move[i, link.point(name)] += d
        sweeps = design.sweeps
        if sweeps.travel_mm is None or not routes.routes:
            raise ValueError("the design needs [sweeps.travel] and a route to tune")
        steps = screen_steps or spec.screen_steps
        travel = np.linspace(*sweeps.travel_mm, steps)
        nc = len(link.corner_names)
        self.travel = SweepSpec(
            "travel", TravelDrive(np.repeat(travel[:, None], nc, axis=1)), {"travel_mm": travel}
        )
        self.heave: SweepSpec | None = None
        if sweeps.heave_mm is not None:
            h = np.linspace(*sweeps.heave_mm, HEAVE_STEPS)
            par = np.zeros((HEAVE_STEPS, 3))
            par[:, 0] = h
            self.heave = SweepSpec(
                "heave", BodyDrive(par, sweeps.motion_centre_mm), {"heave_mm": h}
            )
        self.rods = [link.rod_names.index(r.name) for r in design.rods]
        self.rod_ends = link.rod_ends[self.rods]
        self.area = np.array([self.members[r.name].area_mm2 for r in design.rods])
        self.inertia = np.array(
            [self.members[r.name].section.second_moment_mm4 for r in design.rods]
        )
        mats = [self.members[r.name].material for r in design.rods]
        self.modulus = np.array([m.modulus_MPa for m in mats])
        self.yield_ = np.array([m.yield_MPa for m in mats])
        self.density = np.array([m.density_kg_m3 for m in mats])
        self.fixity = np.array([r.end_fixity for r in design.rods])
        self.mass0 = float(self._mass(self.base[None])[0])
        moved = np.flatnonzero(np.abs(self.move).sum(axis=(0, 2)) > 0)
        self.reduction = reduce_linkage(link, moved)
        """The suspension solved once per pose when the variables leave it alone."""
        self.evaluations = 0

    # -- geometry ------------------------------------------------------------------
    def points(self, x: Array) -> Array:
        """Design points (S, np, 3) of the candidates ``x`` (S, n)."""
        x = np.atleast_2d(np.asarray(x, dtype=float))
        return self.base[None] + np.einsum("sn,npk->spk", x, self.move)

    def _mass(self, points: Array) -> Array:
        d = points[:, self.rod_ends[:, 0]] - points[:, self.rod_ends[:, 1]]
        length = np.linalg.norm(d, axis=-1)
        return (self.density * self.area * 1e-9 * length).sum(axis=1)

    # -- evaluation ----------------------------------------------------------------
    def __call__(self, x: Array) -> Screen:
        x = np.atleast_2d(np.asarray(x, dtype=float))
        pts = self.points(x)
        s = pts.shape[0]
        self.evaluations += s
        t = self.spec.targets
        cons = np.full((s, len(CONSTRAINTS)), INFEASIBLE)
        objective = np.full(s, INFEASIBLE)
        leak = np.full(s, np.nan)
        nr = len(self.routes.routes)
        ratio_out = np.full((s, nr, self.travel.size), np.nan)
        if s == 0:
            return Screen(objective, cons, np.zeros(0, bool), ratio_out, np.zeros(0), leak)
        travel = self._grid(pts, self.travel)
        ok = travel.assembled.copy()
        heave = self._grid(pts, self.heave) if self.heave else None
        if heave is not None:
            ok &= heave.assembled
        mass = self._mass(pts)
        idx = np.flatnonzero(ok)
        if idx.size == 0:
            return Screen(objective, cons, ok, ratio_out, mass, leak)
        tr = _result(self.travel, _subset(travel, idx))
        figs = sweep_figures(tr.link, self.routes, tr.result)
        p = self.travel.size
        k = idx.size
        ratio = np.stack([figs.route_ratio[r.name] for r in self.routes.routes], axis=1)
        ratio = ratio.reshape(k, p, nr).transpose(0, 2, 1)  # (k, routes, P)
        ratio_out[idx] = ratio
        lo, hi = t.route_ratio_range
        centre, half = (lo + hi) / 2.0, (hi - lo) / 2.0
        c_ratio = np.abs(ratio - centre).max(axis=(1, 2)) / half - 1.0
        flat = np.mean(((ratio - t.route_ratio) / half) ** 2, axis=(1, 2))

        loa = [np.stack(list(figs.line_of_action_deg.values()), -1).reshape(k, -1).max(1)]
        mu = [figs.transmission_deg.reshape(k, -1)]
        sens = np.zeros(k)
        parts = [tr]
        if heave is not None and self.heave is not None:
            hv = _result(self.heave, _subset(heave, idx))
            parts.append(hv)
            hfig = sweep_figures(hv.link, self.routes, hv.result)
            loa.append(np.stack(list(hfig.line_of_action_deg.values()), -1).reshape(k, -1).max(1))
            mu.append(hfig.transmission_deg.reshape(k, -1))
            for rh in ride_heights(hv.link, hv.result).values():
                sens = np.maximum(sens, np.abs(rh.sensitivity["heave"]).reshape(k, -1).max(1))
        c_loa = np.max(np.stack(loa), axis=0) / t.line_of_action_deg - 1.0
        t_lo, t_hi = t.transmission_angle_deg
        angles = np.concatenate(mu, axis=1)
        if angles.shape[1]:
            used = np.maximum((90.0 - angles) / (90.0 - t_lo), (angles - 90.0) / (t_hi - 90.0))
            c_mu = used.max(axis=1) - 1.0
        else:
            c_mu = np.full(k, -1.0)
        c_sens = sens / t.heave_sensitivity - 1.0 if heave is not None else np.full(k, -1.0)

        c_buck = np.full(k, -1.0)
        c_tens = np.full(k, -1.0)
        leak_k = np.zeros(k)
        c_leak = np.full(k, -1.0)
        if self.loads is not None:
            c_buck, c_tens, leak_k, c_loa = self._statics(parts, pts[idx], k, c_loa)
            c_leak = leak_k / t.sprung_leakage - 1.0
        w = self.spec.weights
        obj = (
            w["route_ratio"] * flat
            + w["mass"] * mass[idx] / self.mass0
            + w["leakage"] * leak_k / t.sprung_leakage
        )
        cons[idx] = np.stack((c_ratio, c_loa, c_mu, c_sens, c_buck, c_tens, c_leak), axis=1)
        bad = ~np.all(np.isfinite(cons[idx]), axis=1) | ~np.isfinite(obj)
        cons[idx[bad]] = INFEASIBLE
        obj[bad] = INFEASIBLE
        objective[idx] = obj
        leak[idx] = leak_k
        ok[idx[bad]] = False
        return Screen(objective, cons, ok, ratio_out, mass, leak)

    def _grid(self, pts: Array, spec: SweepSpec) -> GridSolution:
        if self.reduction is not None:
            return solve_grid_reduced(self.reduction, pts, spec.drive)
        return solve_grid(self.link, pts, spec.drive)

    def _statics(
        self, parts: list[_Part], pts: Array, k: int, c_loa: Array
    ) -> tuple[Array, Array, Array, Array]:
        """Buckling, tension and line-of-action constraints and leakage from the
        statics at the ends and the middle of each screening sweep."""
        assert self.loads is not None
        t = self.spec.targets
        worst_c = np.zeros((k, len(self.rods)))
        worst_t = np.zeros((k, len(self.rods)))
        leak = np.zeros(k)
        resultant = np.zeros(k)
        for part in parts:
            p = part.spec.size
            pick = np.unique([0, p // 2, p - 1])
            rows = (np.arange(k)[:, None] * p + pick[None, :]).ravel()
            sub = _subset_rows(part, rows, part.spec)
            st = solve_statics(
                sub.link, self.routes, self.members, self.loads, sub.result, virtual_work=False
            )
            f = st.rod_force_N[..., self.rods].reshape(k, -1, len(self.rods))
            worst_c = np.minimum(worst_c, f.min(axis=1))
            worst_t = np.maximum(worst_t, f.max(axis=1))
            springs = _sweep_springs(
                sub.link, self.loads, self.layout, self.landed, self.refs, sub.result, st
            )
            load = np.abs(st.vertical_load_N)[..., None]
            share = np.abs(springs.avoidable_N) / np.where(load > 1e-9, load, np.inf)
            share = np.where(np.isfinite(share), share, 0.0)
            leak = np.maximum(leak, share.reshape(k, -1).max(axis=1))
            for force in st.corner_force_N.values():
                size = np.linalg.norm(force, axis=-1)
                cos = np.abs(force[..., 2]) / np.where(size > 0, size, 1.0)
                ang = np.where(size > 1e-9, np.degrees(np.arccos(np.clip(cos, 0.0, 1.0))), 0.0)
                resultant = np.maximum(resultant, ang.reshape(k, -1).max(axis=1))
        d = pts[:, self.rod_ends[:, 0]] - pts[:, self.rod_ends[:, 1]]
        length = np.linalg.norm(d, axis=-1)
        p_cr = critical_load_N(
            self.area, self.inertia, length, self.fixity, self.modulus, self.yield_
        )
        with np.errstate(divide="ignore"):
            rf_b = np.where(worst_c < -1e-6, p_cr / np.abs(worst_c), np.inf).min(axis=1)
            rf_t = np.where(worst_t > 1e-6, self.yield_ * self.area / worst_t, np.inf).min(axis=1)
        c_b = t.buckling_reserve / rf_b - 1.0
        c_t = t.tension_reserve / rf_t - 1.0
        c_loa = np.maximum(c_loa, resultant / t.line_of_action_deg - 1.0)
        return c_b, c_t, leak, c_loa


@dataclass(frozen=True)
class _Part:
    spec: SweepSpec
    link: Linkage
    result: SweepResult


def _subset(grid: GridSolution, designs: NDArray[np.intp]) -> GridSolution:
    if designs.size == grid.designs:  # every candidate assembled: nothing to copy
        return grid
    p = grid.poses
    rows = (designs[:, None] * p + np.arange(p)[None, :]).ravel()
    return GridSolution(
        grid.link.with_points(grid.link.points[rows]),
        grid.pose.take(rows),
        _take_kin(grid, rows),
        grid.jacobian[rows],
        grid.tangent[rows],
        grid.assembled[designs],
        designs.size,
        p,
    )


def _take_kin(grid: GridSolution, rows: NDArray[np.intp]) -> Kinematics:
    k = grid.kin
    return Kinematics(k.rotation[rows], k.translation[rows], k.points[rows], k.columns[rows])


def _result(spec: SweepSpec, grid: GridSolution) -> _Part:
    """The grid as one sweep result of G·P poses (the figures code works on it as is)."""
    g = grid.designs
    params = np.tile(spec.drive.parameters, (g, 1))
    drive = spec.drive.with_parameters(params)
    values = {key: np.tile(v, g) for key, v in spec.values.items()}
    big = SweepSpec(spec.name, drive, values)
    solved = Solved(grid.pose, grid.kin, np.zeros((g * grid.poses, 0)), grid.jacobian, 0)
    return _Part(spec, grid.link, SweepResult(big, solved, grid.tangent))


def _subset_rows(part: _Part, rows: NDArray[np.intp], spec: SweepSpec) -> _Part:
    res = part.result
    drive = spec.drive.with_parameters(res.spec.drive.parameters[rows])
    values = {key: v[rows] for key, v in res.spec.values.items()}
    solved = res.solved
    kin = solved.kin
    from plumbrod.kinematics.linkage import Kinematics

    sub_kin = Kinematics(
        kin.rotation[rows], kin.translation[rows], kin.points[rows], kin.columns[rows]
    )
    sub = Solved(solved.pose.take(rows), sub_kin, solved.residual[rows], solved.jacobian[rows], 0)
    return _Part(
        spec,
        part.link.with_points(part.link.points[rows]),
        SweepResult(SweepSpec(spec.name, drive, values), sub, res.tangent[rows]),
    )
