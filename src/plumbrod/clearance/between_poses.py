"""Clearance between the sweep poses: a pair's least distance over the continuous sweep.

The survey measures every pair at the sweep poses; a pair's true least distance can lie
between two of them (a rod sweeping past a box corner).  For a pair whose closest pose
is ``k``, :func:`refine_pairs` searches the driver values between the poses either side
of ``k`` by a zooming search on the sweep parameter: :data:`SAMPLES` trial values evenly
over the bracket (a grid of them on a heave x roll grid sweep), the linkage re-solved at
every one (from the solved pose ``k`` moved along its tangent), all pairs and trials in
one batch; then the bracket shrinks to the two sample spacings around the best trial,
and again.

Stopping rule: the distance between two solids changes no faster than their points move,
so between samples ``s`` apart (in the parameter) it can dip at most ``M s / 2`` below the
samples, where ``M`` bounds the travel of the solids' defining points per unit parameter
(twice their largest travel to a neighbouring pose, for safety).  The search zooms until
``M s / 2`` is below :data:`TOL_MM`, so the figure found is the least distance over the
continuous sweep near ``k`` to 0.01 mm, assuming one minimum near ``k`` (it is never above
the distance at pose ``k``).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.clearance.distance import least_separations
from plumbrod.errors import AssemblyError
from plumbrod.geometry.shapes import Box, Capsule, Cylinder, Plate, Prism, Solid
from plumbrod.kinematics.linkage import Kinematics, Linkage
from plumbrod.kinematics.solver import design_branch, solve_near
from plumbrod.kinematics.sweeps import SweepResult

__all__ = ["TOL_MM", "Refined", "Request", "defining_points", "refine_pairs", "take_pose"]

Array = NDArray[np.float64]

TOL_MM = 0.01
"""Accuracy of a refined least distance (mm)."""

SAMPLES = 17
"""Trial values per bracket along one sweep direction (9 per direction on a grid)."""
_GRID_SAMPLES = 9
_MAX_ROUNDS = 12


@dataclass(frozen=True)
class Request:
    """One pair to refine: the names of its two solids, its closest pose in the sweep,
    and the distance (mm) and closest points measured there."""

    a: str
    b: str
    pose: int
    distance_mm: float
    point_a: Array
    point_b: Array


@dataclass(frozen=True)
class Refined:
    """The least distance of a pair between the poses: ``distance_mm`` (mm) at the
    driver ``values`` (the sweep's report keys, e.g. ``travel_mm``), its closest points,
    ``between`` (False when no trial value came closer than pose ``k`` itself) and
    ``searched`` (False when the trial poses could not be solved: pose ``k``'s figure)."""

    distance_mm: float
    point_a: Array
    point_b: Array
    values: dict[str, float]
    between: bool
    searched: bool = True


def take_pose(solid: Solid, index: int | slice) -> Solid:
    """The solid at pose ``index`` of its batch (a fixed solid is returned as it is)."""
    if not solid.batch_shape:
        return solid

    def pick(x: object, base: int) -> np.ndarray:
        arr = np.asarray(x)
        return arr[index] if arr.ndim > base else arr

    if isinstance(solid, (Capsule, Cylinder)):
        return type(solid)(pick(solid.p0, 1), pick(solid.p1, 1), pick(solid.radius, 0))
    if isinstance(solid, Box):
        rotation = None if solid.rotation is None else pick(solid.rotation, 2)
        return Box(pick(solid.centre, 1), pick(solid.half_size, 1), rotation)
    if isinstance(solid, Plate):
        return Plate(pick(solid.vertices, 2), pick(solid.thickness, 0))
    raise TypeError(f"no pose batch expected on {type(solid).__name__}")


def defining_points(solid: Solid) -> np.ndarray:
    """Points (..., k, 3) that fix where a moving solid is (its motion bound)."""
    if isinstance(solid, (Capsule, Cylinder)):
        return np.stack(np.broadcast_arrays(solid.p0, solid.p1), axis=-2)
    if isinstance(solid, Plate):
        return np.asarray(solid.vertices)
    if isinstance(solid, Box):
        signs = np.array([[i, j, k] for i in (-1, 1) for j in (-1, 1) for k in (-1, 1)])
        rot = np.eye(3) if solid.rotation is None else solid.rotation
        corners = np.einsum(
            "...ij,cj->...ci", rot, signs * np.asarray(solid.half_size)[..., None, :]
        )
        return np.asarray(solid.centre)[..., None, :] + corners
    assert isinstance(solid, Prism)
    return np.zeros((1, 3))


def _directions(pose: int, size: int, grid: tuple[int, int] | None) -> list[tuple[int, int]]:
    """Per sweep direction of ``pose``: (pose index one step along it, how many steps
    the bracket reaches below it (0 or 1), how many above (0 or 1)) as (other, code)."""
    if grid is None:
        dims = [(pose, 1, size)]
    else:
        nh, nr = grid
        i, j = divmod(pose, nr)
        dims = [(i, nr, nh), (j, 1, nr)]
    out = []
    for index, stride, count in dims:
        below, above = index > 0, index < count - 1
        if above:
            out.append((pose + stride, (1 if below else 0) * 2 + 1))
        elif below:
            out.append((pose - stride, 2))
        else:
            out.append((pose, 0))
    return out


def refine_pairs(
    link: Linkage,
    result: SweepResult,
    requests: Sequence[Request],
    solids_at: Callable[[Kinematics, set[str]], Mapping[str, Solid]],
    fixed: Mapping[str, Solid],
    *,
    grid: tuple[int, int] | None = None,
    tol_mm: float = TOL_MM,
) -> list[Refined]:
    """Refine every request of one sweep between its poses (see the module text).

    ``solids_at(kin, names)`` gives the moving solids ``names`` at the poses of ``kin``;
    ``fixed`` the fixed zones by name; ``grid`` the (heave, roll) shape of a grid sweep.
    A sweep whose trial poses cannot be solved keeps its pose-``k`` figures.
    """
    spec = result.spec
    params_all = np.asarray(spec.drive.parameters, dtype=float)
    size = params_all.shape[0]
    keys = list(spec.values)
    values_all = np.stack([np.asarray(spec.values[k], dtype=float) for k in keys], axis=1)
    n = len(requests)
    best_d = np.array([r.distance_mm for r in requests], dtype=float)
    best_pa = np.array([r.point_a for r in requests], dtype=float).reshape(n, 3)
    best_pb = np.array([r.point_b for r in requests], dtype=float).reshape(n, 3)
    base_k = np.array([r.pose for r in requests], dtype=np.intp)
    best_v = values_all[base_k].copy()
    between = np.zeros(n, bool)
    if n == 0 or size < 2:
        return _collect(best_d, best_pa, best_pb, best_v, keys, between, searched=False)

    dims = 1 if grid is None else 2
    per_dim = SAMPLES if dims == 1 else _GRID_SAMPLES
    # per request and direction: parameter and value change per unit t, bracket in t
    step_p = np.zeros((n, dims, params_all.shape[1]))
    step_v = np.zeros((n, dims, len(keys)))
    lo = np.zeros((n, dims))
    hi = np.zeros((n, dims))
    neighbours: list[list[int]] = []
    for r, req in enumerate(requests):
        near = []
        for j, (other, code) in enumerate(_directions(req.pose, size, grid)):
            if code == 0:
                continue
            sign = -1.0 if code == 2 else 1.0
            step_p[r, j] = sign * (params_all[other] - params_all[req.pose])
            step_v[r, j] = sign * (values_all[other] - values_all[req.pose])
            lo[r, j] = -1.0 if code in (2, 3) else 0.0
            hi[r, j] = 1.0 if code in (1, 3) else 0.0
            near.append(other)
            if code == 3:
                near.append(2 * req.pose - other)
        neighbours.append(near)

    kin_all = result.solved.kin
    wanted = {name for r in requests for name in (r.a, r.b) if name not in fixed}
    points_all = {
        name: defining_points(solid) for name, solid in solids_at(kin_all, wanted).items()
    }
    rate = np.array(
        [
            _motion_rate(req, points_all, near)
            for req, near in zip(requests, neighbours, strict=True)
        ]
    )
    branch = design_branch(link, spec.drive)
    trials = per_dim**dims
    start_pose = result.solved.pose.take(np.repeat(base_k, trials))
    start_tan = np.repeat(result.tangent[base_k], trials, axis=0)  # (n*trials, nq, npar)
    start_par = params_all[base_k]
    unit = np.linspace(0.0, 1.0, per_dim)
    if dims == 1:
        lattice = unit[:, None]
    else:
        lattice = np.stack(np.meshgrid(unit, unit, indexing="ij"), axis=-1).reshape(-1, 2)

    searched = True
    for _ in range(_MAX_ROUNDS):
        spacing = (hi - lo) / (per_dim - 1)  # (n, dims)
        if not np.any(rate * spacing.sum(axis=1) / 2.0 > tol_mm):
            break
        t = lo[:, None, :] + lattice[None] * (hi - lo)[:, None, :]  # (n, trials, dims)
        params = start_par[:, None, :] + np.einsum("rtd,rdp->rtp", t, step_p)
        flat = params.reshape(n * trials, -1)
        guess = link.advance(
            start_pose, np.einsum("bqp,bp->bq", start_tan, flat - np.repeat(start_par, trials, 0))
        )
        try:
            kin = solve_near(
                link, spec.drive.with_parameters(flat), guess, sweep_name=spec.name, branch=branch
            ).kin
        except AssemblyError:
            searched = False  # keep what was found so far
            break
        moving = solids_at(kin, wanted)

        def block(name: str, r: int, moving: Mapping[str, Solid] = moving) -> Solid:
            if name not in moving:
                return fixed[name]
            return take_pose(moving[name], slice(r * trials, (r + 1) * trials))

        found = least_separations([(block(q.a, r), block(q.b, r)) for r, q in enumerate(requests)])
        for r, least in enumerate(found):
            at = t[r, least.pose_index]
            if least.distance_mm < best_d[r]:
                best_d[r] = least.distance_mm
                best_pa[r], best_pb[r] = least.point_a, least.point_b
                best_v[r] = values_all[base_k[r]] + at @ step_v[r]
                between[r] = True
            centre = at
            lo[r] = np.maximum(lo[r], centre - spacing[r])
            hi[r] = np.minimum(hi[r], centre + spacing[r])
    return _collect(best_d, best_pa, best_pb, best_v, keys, between, searched=searched)


def _motion_rate(req: Request, points: Mapping[str, np.ndarray], neighbours: list[int]) -> float:
    """Twice the largest travel (mm) of the pair's defining points from pose ``k`` to a
    neighbouring pose: a bound on how fast their distance changes per unit parameter."""
    travel = 0.0
    for name in (req.a, req.b):
        if name not in points or not neighbours:
            continue
        pts = points[name]
        step = pts[neighbours] - pts[req.pose][None]
        travel = max(travel, float(np.max(np.linalg.norm(step, axis=-1))))
    return 2.0 * travel


def _collect(
    d: Array,
    pa: Array,
    pb: Array,
    values: Array,
    keys: list[str],
    between: NDArray[np.bool_],
    *,
    searched: bool,
) -> list[Refined]:
    return [
        Refined(
            float(d[r]),
            pa[r].copy(),
            pb[r].copy(),
            {k: float(values[r, i]) for i, k in enumerate(keys)},
            bool(between[r]),
            searched,
        )
        for r in range(len(d))
    ]
