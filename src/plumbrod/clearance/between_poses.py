"""Clearance between the sweep poses: a pair's least distance over the continuous sweep.

The survey measures every pair at the sweep poses; a pair's true least distance can lie
between two of them (a rod sweeping past a box corner).  For a pair whose closest pose
is ``k``, :func:`refine_pairs` searches the driver values between the poses either side
of ``k`` by golden-section search on the sweep parameter, re-solving the linkage at each
trial value (from the solved pose ``k`` moved along its tangent).

Stopping rule: the distance between two solids changes no faster than their points move,
so over a bracket of parameter width ``w`` it changes by at most ``M w``, where ``M`` bounds
the travel of the solids' defining points per unit parameter (twice their largest travel
to a neighbouring pose, for safety).  The search narrows the bracket until ``M w`` is below
:data:`TOL_MM`, so the figure found is the least distance over the continuous sweep near
``k`` to 0.01 mm (it is never above the distance at pose ``k``).  A grid sweep (heave x roll)
is searched along heave, then roll, twice.

References: golden-section search, J. Kiefer, "Sequential minimax search for a maximum",
Proc. Amer. Math. Soc. 4 (1953) 502-506.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.clearance.distance import separation
from plumbrod.errors import AssemblyError
from plumbrod.geometry.shapes import Box, Capsule, Cylinder, Plate, Prism, Solid
from plumbrod.kinematics.linkage import Kinematics, Linkage
from plumbrod.kinematics.solver import design_branch, solve_near
from plumbrod.kinematics.sweeps import SweepResult

__all__ = ["TOL_MM", "Refined", "Request", "defining_points", "refine_pairs", "take_pose"]

Array = NDArray[np.float64]

TOL_MM = 0.01
"""Accuracy of a refined least distance (mm)."""

_GOLDEN = (np.sqrt(5.0) - 1.0) / 2.0  # 0.618...
_MAX_ITERATIONS = 60


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
    and ``between`` (False when no trial value came closer than pose ``k`` itself)."""

    distance_mm: float
    point_a: Array
    point_b: Array
    values: dict[str, float]
    between: bool


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


def _lines(
    pose: int, size: int, grid: tuple[int, int] | None
) -> list[tuple[int | None, int | None]]:
    """Neighbour pose indices (lower, upper) along each sweep direction of ``pose``."""
    if grid is None:
        return [(pose - 1 if pose > 0 else None, pose + 1 if pose < size - 1 else None)]
    nh, nr = grid
    i, j = divmod(pose, nr)
    heave = (pose - nr if i > 0 else None, pose + nr if i < nh - 1 else None)
    roll = (pose - 1 if j > 0 else None, pose + 1 if j < nr - 1 else None)
    return [heave, roll, heave, roll]


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
    A request whose trial poses cannot be solved keeps its pose-``k`` figure.
    """
    spec = result.spec
    params_all = np.asarray(spec.drive.parameters, dtype=float)
    size = params_all.shape[0]
    keys = list(spec.values)
    values_all = np.stack([np.asarray(spec.values[k], dtype=float) for k in keys], axis=1)
    pose_all = result.solved.pose
    kin_all = result.solved.kin
    n = len(requests)
    best_d = np.array([r.distance_mm for r in requests], dtype=float)
    best_pa = np.array([r.point_a for r in requests], dtype=float).reshape(n, 3)
    best_pb = np.array([r.point_b for r in requests], dtype=float).reshape(n, 3)
    base_k = np.array([r.pose for r in requests], dtype=np.intp)
    base_p = params_all[base_k].copy()
    base_v = values_all[base_k].copy()
    between = np.zeros(n, bool)
    failed = np.zeros(n, bool)
    if n == 0 or size < 2:
        return _collect(best_d, best_pa, best_pb, base_v, keys, between)
    branch = design_branch(link, spec.drive)
    wanted = {name for r in requests for name in (r.a, r.b) if name not in fixed}
    points_all = {
        name: defining_points(solid) for name, solid in solids_at(kin_all, wanted).items()
    }
    start_pose = pose_all.take(base_k)
    start_tan = result.tangent[base_k]  # (n, nq, npar)
    start_par = params_all[base_k]

    def solid(name: str, moving: Mapping[str, Solid], r: int) -> Solid:
        return take_pose(moving[name], slice(r, r + 1)) if name in moving else fixed[name]

    def measure(params: Array, active: NDArray[np.bool_]) -> tuple[Array, Array, Array]:
        drive = spec.drive.with_parameters(params)
        guess = link.advance(start_pose, np.einsum("bqp,bp->bq", start_tan, params - start_par))
        d = np.full(n, np.inf)
        pa = np.zeros((n, 3))
        pb = np.zeros((n, 3))
        try:
            kin = solve_near(link, drive, guess, sweep_name=spec.name, branch=branch).kin
        except AssemblyError:
            failed[:] = True
            return d, pa, pb
        moving = solids_at(kin, wanted)
        for r in (int(i) for i in np.flatnonzero(active & ~failed)):
            req = requests[r]
            sep = separation(solid(req.a, moving, r), solid(req.b, moving, r))
            d[r] = float(np.asarray(sep.distance_mm).reshape(-1)[0])
            pa[r] = np.asarray(sep.point_a).reshape(-1, 3)[0]
            pb[r] = np.asarray(sep.point_b).reshape(-1, 3)[0]
        return d, pa, pb

    steps = max(len(_lines(0, size, grid)), 1)
    for line in range(steps):
        lo_t = np.zeros(n)
        hi_t = np.zeros(n)
        direction = np.zeros_like(base_p)
        dvalue = np.zeros_like(base_v)
        rate = np.zeros(n)
        for r, req in enumerate(requests):
            lower, upper = _lines(req.pose, size, grid)[line]
            if lower is None and upper is None:
                continue
            other = upper if upper is not None else lower
            assert other is not None
            sign = 1.0 if upper is not None else -1.0
            direction[r] = sign * (params_all[other] - params_all[req.pose])
            dvalue[r] = sign * (values_all[other] - values_all[req.pose])
            lo_t[r] = -1.0 if lower is not None else 0.0
            hi_t[r] = 1.0 if upper is not None else 0.0
            rate[r] = _motion_rate(req, points_all, [i for i in (lower, upper) if i is not None])
        active = (hi_t > lo_t) & ~failed
        if not active.any():
            continue
        width = hi_t - lo_t
        need = np.ones(n, dtype=int)
        ok = active & (rate * width > tol_mm)
        need[ok] = np.ceil(np.log(tol_mm / (rate[ok] * width[ok])) / np.log(_GOLDEN)).astype(int)
        iterations = int(min(max(int(need[active].max()), 1), _MAX_ITERATIONS))
        p0, v0 = base_p.copy(), base_v.copy()

        def at(t: Array, p0: Array = p0, direction: Array = direction) -> Array:
            return p0 + t[:, None] * direction

        a, b = lo_t.copy(), hi_t.copy()
        c = b - _GOLDEN * (b - a)
        d = a + _GOLDEN * (b - a)
        fc, pac, pbc = measure(at(c), active)
        fd, pad, pbd = measure(at(d), active)
        trial = [(c.copy(), fc, pac, pbc), (d.copy(), fd, pad, pbd)]
        for _ in range(iterations):
            left = fc < fd
            b = np.where(left, d, b)
            a = np.where(left, a, c)
            new_t = np.where(left, b - _GOLDEN * (b - a), a + _GOLDEN * (b - a))
            f_new, pa_new, pb_new = measure(at(new_t), active)
            trial.append((new_t.copy(), f_new, pa_new, pb_new))
            c_next = np.where(left, new_t, d)
            d_next = np.where(left, c, new_t)
            fc, fd = np.where(left, f_new, fd), np.where(left, fc, f_new)
            c, d = c_next, d_next
        for t, f, pa, pb in trial:
            better = active & ~failed & (f < best_d)
            best_d[better] = f[better]
            best_pa[better] = pa[better]
            best_pb[better] = pb[better]
            base_p[better] = p0[better] + t[better, None] * direction[better]
            base_v[better] = v0[better] + t[better, None] * dvalue[better]
            between |= better
    return _collect(best_d, best_pa, best_pb, base_v, keys, between)


def _motion_rate(req: Request, points: Mapping[str, np.ndarray], neighbours: list[int]) -> float:
    """Twice the largest travel (mm) of the pair's defining points from pose ``k`` to a
    neighbouring pose: a bound on how fast their distance changes per unit parameter."""
    travel = 0.0
    for name in (req.a, req.b):
        if name not in points:
            continue
        pts = points[name]
        step = pts[neighbours] - pts[req.pose][None]
        travel = max(travel, float(np.max(np.linalg.norm(step, axis=-1))))
    return 2.0 * travel


def _collect(
    d: Array, pa: Array, pb: Array, values: Array, keys: list[str], between: NDArray[np.bool_]
) -> list[Refined]:
    return [
        Refined(
            float(d[r]),
            pa[r].copy(),
            pb[r].copy(),
            {k: float(values[r, i]) for i, k in enumerate(keys)},
            bool(between[r]),
        )
        for r in range(len(d))
    ]
