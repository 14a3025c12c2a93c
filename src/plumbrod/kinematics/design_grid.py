"""Many candidate designs through the same poses at once: a designs × poses batch.

A tuning run asks the same question of thousands of candidate designs that differ only
in some hardpoints: does each assemble through the sweep, and with what tangents.  Here
the work that belongs to a design (its design pose, the tangent there and the assembly
branch, the sign of the constraint Jacobian's determinant) is done once per design; the
poses of every design then solve together in one stacked Newton iteration, started from
each design's first-order prediction.  Poses that do not converge are retried by
marching from the nearest solved pose of the same design (all designs at once); a design
with a pose still unsolved, off its branch, or with a singular design pose, is reported
as not assembling (``assembled`` False), never raised as an error.

The batch is flattened design-major: pose ``p`` of design ``g`` is row ``g * P + p``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.drives import Drive
from plumbrod.kinematics.frames import Array, Pose
from plumbrod.kinematics.linkage import Kinematics, Linkage
from plumbrod.kinematics.solver import _branch_rows, _branch_sign, evaluate, newton, tangent

__all__ = ["GridSolution", "solve_grid"]

MARCH_ROUNDS = 6
"""Rounds of marching from solved neighbours for poses the first Newton pass missed."""


@dataclass(frozen=True)
class GridSolution:
    """Solved poses of G designs × P poses (flattened design-major, G·P rows)."""

    link: Linkage
    """The linkage holding one copy of each design's points per pose (G·P, np, 3)."""
    pose: Pose
    kin: Kinematics
    jacobian: Array  # (G·P, m, nq)
    tangent: Array  # (G·P, nq, npar)
    assembled: NDArray[np.bool_]  # (G,)
    designs: int
    poses: int


def _design_work(
    link: Linkage, drive: Drive, designs: int
) -> tuple[Pose, Array, Array, NDArray[np.intp], NDArray[np.bool_]]:
    """Per design, once: design pose, tangent (G, nq, npar), branch sign (G,), rows, ok."""
    zero = drive.with_parameters(np.zeros((designs, drive.parameters.shape[1])))
    base = link.design_pose(designs)
    kin0, res0, jac0 = evaluate(link, zero, base)
    ok = np.all(np.isfinite(jac0), axis=(1, 2)) & np.all(np.isfinite(res0), axis=1)
    rows = _branch_rows(jac0[int(np.argmax(ok))] if ok.any() else jac0[0])
    square = jac0[:, rows]
    safe = np.where(ok[:, None, None], square, np.eye(square.shape[1]))
    sign = np.linalg.slogdet(safe)[0]
    ok &= sign != 0  # a singular design pose is a dead point: no branch to keep
    tan0 = tangent(link, zero, kin0, np.where(ok[:, None, None], jac0, _identity_like(jac0)))
    return base, tan0, sign, rows, ok


def solve_grid(link: Linkage, points: Array, drive: Drive) -> GridSolution:
    """Solve every pose of ``drive`` (P poses) for each of the designs ``points`` (G, np, 3).

    ``link`` supplies the topology (its own points are not used).  Returns the solved
    batch with tangents; designs that do not assemble keep their last iterate there and
    are flagged in ``assembled``.
    """
    points = np.asarray(points, dtype=float)
    g = points.shape[0]
    params = np.asarray(drive.parameters, dtype=float)
    p = params.shape[0]
    designs = link.with_points(points)
    base, tan0, sign0, rows, ok = _design_work(designs, drive, g)

    flat = link.with_points(np.repeat(points, p, axis=0))
    all_params = np.tile(params, (g, 1))
    full = drive.with_parameters(all_params)
    start = Pose(
        np.repeat(base.joint, p, axis=0),
        np.repeat(base.rotation, p, axis=0),
        np.repeat(base.centre, p, axis=0),
    )
    step = np.einsum("gqk,gpk->gpq", tan0, params[None].repeat(g, axis=0))
    guess = flat.advance(start, step.reshape(g * p, -1))
    solved, conv = newton(flat, full, guess)
    pose, kin, jac = solved.pose, solved.kin, solved.jacobian
    good = conv & (_branch_sign(jac, rows) == np.repeat(sign0, p))
    good &= np.repeat(ok, p)

    for _ in range(MARCH_ROUNDS):
        grid = good.reshape(g, p)
        missing = ~grid & ok[:, None]
        if not missing.any():
            break
        # the nearest solved neighbour along the pose axis of the same design
        src = np.full((g, p), -1, dtype=np.intp)
        for shift in (1, -1):
            nb = np.roll(grid, shift, axis=1)
            idx = np.roll(np.arange(p), shift)
            valid = np.arange(p) != (0 if shift == 1 else p - 1)
            take = missing & nb & valid[None, :] & (src < 0)
            src[take] = np.broadcast_to(idx, (g, p))[take]
        want = np.flatnonzero((src >= 0).ravel())
        if want.size == 0:
            break
        from_rows = (want // p) * p + src.ravel()[want]
        sub_link = flat.with_points(flat.points[from_rows])
        d_from = drive.with_parameters(all_params[from_rows])
        kin_f, _, jac_f = evaluate(sub_link, d_from, pose.take(from_rows))
        tan_f = tangent(sub_link, d_from, kin_f, jac_f)
        guess_q = np.einsum("bqk,bk->bq", tan_f, all_params[want] - all_params[from_rows])
        trial = sub_link.advance(pose.take(from_rows), guess_q)
        s_sol, s_ok = newton(
            sub_link.with_points(flat.points[want]), drive.with_parameters(all_params[want]), trial
        )
        s_ok &= _branch_sign(s_sol.jacobian, rows) == sign0[want // p]
        if not s_ok.any():
            break
        reached = want[s_ok]
        pose = _put(pose, reached, s_sol.pose.take(np.flatnonzero(s_ok)))
        good[reached] = True
    kin, res, jac = evaluate(flat, full, pose)
    good &= np.all(np.isfinite(res), axis=1) & (np.abs(res).max(axis=1) <= 1e-8)
    assembled = good.reshape(g, p).all(axis=1) & ok
    safe_jac = np.where(np.repeat(assembled, p)[:, None, None], jac, _identity_like(jac))
    tan = tangent(flat, full, kin, safe_jac)
    return GridSolution(flat, pose, kin, jac, tan, assembled, g, p)


def _identity_like(jac: Array) -> Array:
    out = np.zeros_like(jac)
    k = min(jac.shape[1], jac.shape[2])
    out[:, np.arange(k), np.arange(k)] = 1.0
    return out


def _put(pose: Pose, index: NDArray[np.intp], values: Pose) -> Pose:
    joint, rotation, centre = pose.joint.copy(), pose.rotation.copy(), pose.centre.copy()
    joint[index], rotation[index], centre[index] = values.joint, values.rotation, values.centre
    return Pose(joint, rotation, centre)
