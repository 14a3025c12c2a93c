"""Newton–Raphson on the linkage's constraint equations, batched over poses.

A sweep is solved in one batch: every pose starts from the design pose moved along the
design tangent (the first-order prediction), then all poses iterate together with
stacked linear algebra.  Poses that do not converge, or land on another assembly
branch, are reached by continuation from the nearest solved pose with step halving.
A pose that cannot be reached raises :class:`~plumbrod.errors.AssemblyError` naming
the member with the largest residual and the driver values.

Assembly branch: the sign of the constraint Jacobian's determinant.  It changes only
through a singular pose, where two assemblies meet (a rocker at a dead point), so a
solved pose whose sign differs from the design's lies on another branch.  A rod passing
straight through a rocker's pivot line on a rocker that another rod drives is not a
branch change; the transmission-angle check reports it.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.errors import AssemblyError
from plumbrod.kinematics.drives import Drive
from plumbrod.kinematics.frames import Pose, concatenate_poses
from plumbrod.kinematics.linkage import Kinematics, Linkage

__all__ = [
    "RESIDUAL_TOL_MM",
    "Solved",
    "evaluate",
    "evaluate_residual",
    "newton",
    "solve_poses",
    "tangent",
]

Array = NDArray[np.float64]
RESIDUAL_TOL_MM = 1e-10
"""Largest constraint residual a solved pose may keep (mm)."""
MAX_ITERATIONS = 25
MAX_HALVINGS = 8
MIN_CONTINUATION_STEP = 1.0 / 4096.0


@dataclass(frozen=True)
class Solved:
    """A solved batch: the poses, their kinematics, residual rows and Jacobians."""

    pose: Pose
    kin: Kinematics
    residual: Array  # (B, m) mm, drivers last
    jacobian: Array  # (B, m, nq)
    iterations: int

    @property
    def residual_max_mm(self) -> Array:
        """(B,) largest absolute residual of each pose."""
        if self.residual.shape[1] == 0:
            return np.zeros(self.residual.shape[0])
        return np.abs(self.residual).max(axis=1)


def evaluate(link: Linkage, drive: Drive, pose: Pose) -> tuple[Kinematics, Array, Array]:
    """Kinematics, residual (B, m) and Jacobian (B, m, nq): members then drivers."""
    kin = link.kinematics(pose)
    res, jac = link.residual_and_jacobian(kin)
    d_res, d_jac = drive.rows(link, kin)
    return kin, np.concatenate((res, d_res), axis=1), np.concatenate((jac, d_jac), axis=1)


def _solve_linear(jac: Array, rhs: Array) -> Array:
    """Least-squares / exact solution of ``jac @ x = rhs`` for a stack (B, m, n)."""
    m, n = jac.shape[1], jac.shape[2]
    if m == n:
        try:
            # numpy's stubs type solve() of float64 arrays as floating[Any]
            return np.linalg.solve(jac, rhs[..., None])[..., 0]  # type: ignore[return-value]
        except np.linalg.LinAlgError:
            pass
    return (np.linalg.pinv(jac, rcond=1e-12) @ rhs[..., None])[..., 0]


def tangent(link: Linkage, drive: Drive, kin: Kinematics, jac: Array) -> Array:
    """dq/d(parameters) at solved poses: (B, nq, npar)."""
    p_jac = drive.parameter_jacobian(link, kin)  # (B, nc, npar)
    m = jac.shape[1]
    nc = p_jac.shape[1]
    full = np.zeros((jac.shape[0], m, p_jac.shape[2]))
    full[:, m - nc :] = p_jac
    if m == jac.shape[2]:
        try:
            # numpy's stubs type solve() of float64 arrays as floating[Any]
            return -np.linalg.solve(jac, full)  # type: ignore[return-value]
        except np.linalg.LinAlgError:
            pass
    return -(np.linalg.pinv(jac, rcond=1e-12) @ full)


def evaluate_residual(link: Linkage, drive: Drive, pose: Pose) -> Array:
    """Residual rows (B, m) only: members then drivers."""
    kin = link.kinematics(pose, twists=False)
    return np.concatenate((link.residual(kin), drive.residual(link, kin)), axis=1)


def newton(
    link: Linkage,
    drive: Drive,
    guess: Pose,
    *,
    tol: float = RESIDUAL_TOL_MM,
    max_iterations: int = MAX_ITERATIONS,
) -> tuple[Solved, NDArray[np.bool_]]:
    """Iterate every pose of the batch; returns the result and a converged mask (B,)."""
    pose = guess
    kin, res, jac = evaluate(link, drive, pose)
    norm = np.abs(res).max(axis=1) if res.shape[1] else np.zeros(pose.size)
    iterations = 0
    for iterations in range(1, max_iterations + 1):  # noqa: B007
        active = norm > tol
        if not active.any():
            break
        step = np.zeros((pose.size, link.n_coords))
        step[active] = _solve_linear(jac[active], -res[active])
        trial = link.advance(pose, step)
        t_kin, t_res, t_jac = evaluate(link, drive, trial)
        t_norm = np.abs(t_res).max(axis=1)
        worse = active & ~(t_norm < norm) & (t_norm > tol)
        scale = 1.0
        for _ in range(MAX_HALVINGS):
            if not worse.any():
                break
            scale *= 0.5
            idx = np.flatnonzero(worse)
            sub = link.advance(pose.take(idx), step[idx] * scale)
            s_link, s_drive = _subset(link, drive, idx)
            s_kin, s_res, s_jac = evaluate(s_link, s_drive, sub)
            s_norm = np.abs(s_res).max(axis=1)
            better = (s_norm < norm[idx]) | (s_norm <= tol)
            take = idx[better]
            if take.size:
                trial = _put(trial, take, sub.take(np.flatnonzero(better)))
                t_kin = _put_kin(t_kin, take, s_kin, np.flatnonzero(better))
                t_res[take] = s_res[better]
                t_jac[take] = s_jac[better]
                t_norm[take] = s_norm[better]
            worse[take] = False
        # poses that could not improve keep their old state
        stuck = worse
        if stuck.any():
            idx = np.flatnonzero(stuck)
            trial = _put(trial, idx, pose.take(idx))
            t_kin = _put_kin(t_kin, idx, kin, idx)
            t_res[idx] = res[idx]
            t_jac[idx] = jac[idx]
            t_norm[idx] = norm[idx]
        pose, kin, res, jac, norm = trial, t_kin, t_res, t_jac, t_norm
        if stuck.all():
            break
    converged = norm <= tol
    return Solved(pose, kin, res, jac, iterations), converged


def _subset(link: Linkage, drive: Drive, index: NDArray[np.intp]) -> tuple[Linkage, Drive]:
    """The linkage (when it holds a design batch) and drive restricted to ``index``."""
    sub_link = link.with_points(link.points[index]) if link.points.shape[0] > 1 else link
    return sub_link, drive.with_parameters(drive.parameters[index])


def _put(pose: Pose, index: NDArray[np.intp], values: Pose) -> Pose:
    joint, rotation, centre = pose.joint.copy(), pose.rotation.copy(), pose.centre.copy()
    joint[index], rotation[index], centre[index] = values.joint, values.rotation, values.centre
    return Pose(joint, rotation, centre)


def _put_kin(
    kin: Kinematics, index: NDArray[np.intp], src: Kinematics, src_index: NDArray[np.intp]
) -> Kinematics:
    rot, trans, pts, cols = (
        kin.rotation.copy(),
        kin.translation.copy(),
        kin.points.copy(),
        kin.columns.copy(),
    )
    rot[index], trans[index] = src.rotation[src_index], src.translation[src_index]
    pts[index], cols[index] = src.points[src_index], src.columns[src_index]
    return Kinematics(rot, trans, pts, cols)


def solve_poses(
    link: Linkage,
    drive: Drive,
    *,
    sweep_name: str = "sweep",
    describe: Callable[[Array], str] | None = None,
) -> Solved:
    """Solve every pose of ``drive`` (its parameters (B, npar)) from the design pose.

    The linkage may hold one design (points (1, np, 3)) or a batch of candidate designs
    (points (B, np, 3)): pose ``i`` then belongs to design ``i``.
    ``describe(parameters)`` formats one pose's driver values for error messages.
    Raises AssemblyError when a pose cannot be reached on the design's branch.
    """
    params = np.asarray(drive.parameters, dtype=float)
    count = params.shape[0]
    designs = link.points.shape[0]
    if designs not in (1, count):
        raise ValueError(f"expected 1 design or one per pose ({count}), got {designs}")
    zero = np.zeros((designs, params.shape[1]))
    base = link.design_pose(designs)
    base_drive = drive.with_parameters(zero)
    kin0, _, jac0 = evaluate(link, base_drive, base)
    rows = _branch_rows(jac0[0])
    signs0 = _branch_sign(jac0, rows)  # (G,)
    tan0 = tangent(link, base_drive, kin0, jac0)  # (G, nq, npar)
    start = base.repeat(count) if designs == 1 else base
    guess = link.advance(
        start, np.einsum("bqp,bp->bq", np.broadcast_to(tan0, (count, *tan0.shape[1:])), params)
    )
    solved, ok = newton(link, drive, guess)
    ok &= _branch_sign(solved.jacobian, rows) == signs0
    if ok.all():
        return solved
    describe = describe or (lambda p: ", ".join(f"{v:+.4g}" for v in p))
    fixes: list[tuple[int, Pose]] = []
    if designs > 1:  # each candidate design marches from its own design pose
        for i in np.flatnonzero(~ok):
            one, one_drive = _subset(link, drive, np.array([i]))
            pose_i = _continue(
                one,
                one_drive,
                base.take(int(i)),
                zero[0],
                params[i],
                (rows, signs0[i : i + 1]),
                sweep_name,
                describe,
            )
            fixes.append((int(i), pose_i))
    else:
        done_params = params[ok]
        done_pose = solved.pose.take(np.flatnonzero(ok))
        for i in np.flatnonzero(~ok):
            start_pose, start_par = base, zero[0]
            if done_params.shape[0]:
                near = int(np.argmin(np.linalg.norm(done_params - params[i], axis=1)))
                if np.linalg.norm(done_params[near] - params[i]) < np.linalg.norm(params[i]):
                    start_pose, start_par = done_pose.take(near), done_params[near]
            pose_i = _continue(
                link, drive, start_pose, start_par, params[i], (rows, signs0), sweep_name, describe
            )
            fixes.append((int(i), pose_i))
            done_params = np.vstack((done_params, params[i]))
            done_pose = concatenate_poses([done_pose, pose_i])
    pose = solved.pose
    for index, p in fixes:
        pose = _put(pose, np.array([index]), p)
    kin, res, jac = evaluate(link, drive, pose)
    return Solved(pose, kin, res, jac, solved.iterations)


def _branch_rows(jac: Array) -> NDArray[np.intp]:
    """Rows of a design Jacobian (m, n) that form a square, full-rank set."""
    m, n = jac.shape
    if m == n:
        return np.arange(m)
    chosen: list[int] = []
    for r in range(m):
        trial = jac[[*chosen, r]]
        if np.linalg.matrix_rank(trial) == len(chosen) + 1:
            chosen.append(r)
        if len(chosen) == n:
            break
    return np.array(chosen, dtype=np.intp)


def _branch_sign(jac: Array, rows: NDArray[np.intp]) -> Array:
    """(B,) sign of the determinant of the chosen square rows of the Jacobian."""
    return np.linalg.slogdet(jac[:, rows])[0]


def _continue(
    link: Linkage,
    drive: Drive,
    pose: Pose,
    start: Array,
    target: Array,
    branch: tuple[NDArray[np.intp], Array],
    sweep_name: str,
    describe: Callable[[Array], str],
) -> Pose:
    """March from ``pose`` at parameters ``start`` to ``target`` with step halving."""
    done = 0.0
    step = 1.0
    current = start.copy()
    while done < 1.0:
        step = min(step, 1.0 - done)
        nxt = start + (target - start) * (done + step)
        d_now = drive.with_parameters(current[None])
        kin, _, jac = evaluate(link, d_now, pose)
        tan = tangent(link, d_now, kin, jac)[0]
        guess = link.advance(pose, ((nxt - current) @ tan.T)[None])
        d_next = drive.with_parameters(nxt[None])
        solved, ok = newton(link, d_next, guess)
        if ok[0] and _branch_sign(solved.jacobian, branch[0])[0] == branch[1][0]:
            pose, current, done = solved.pose, nxt, done + step
            step = min(step * 2.0, 1.0)
            continue
        step *= 0.5
        if step < MIN_CONTINUATION_STEP:
            last_kin, _, last_jac = evaluate(link, drive.with_parameters(current[None]), pose)
            member, detail = _diagnose(link, solved, last_kin, last_jac)
            raise AssemblyError(member, sweep_name, describe(nxt), detail)
    return pose


DEAD_POINT_DEG = 10.0
"""A rod end whose transmission angle is this close to 0° or 180° at the last pose
reached is named as the cause when the linkage stops assembling."""


def _diagnose(
    link: Linkage, solved: Solved, last_kin: Kinematics, last_jac: Array
) -> tuple[str, str]:
    """Name the member that fails.

    Near the last pose reached: a rod end at a dead point (transmission angle near 0°
    or 180°, the rod in line with its arm); else the rod the singular direction of the
    constraint Jacobian loads most; else the row with the largest residual.
    """
    from plumbrod.kinematics.transmission import joint_labels, transmission_angles

    mu, _ = transmission_angles(link, last_kin)
    if mu.shape[1]:
        off = np.minimum(mu[0], 180.0 - mu[0])
        j = int(np.argmin(off))
        if off[j] < DEAD_POINT_DEG:
            rod, body = joint_labels(link)[j]
            return rod, (
                f"rod '{rod}' reaches a dead point at '{body}' (transmission angle "
                f"{mu[0, j]:.1f}°): it is in line with the arm and cannot push the "
                "linkage further"
            )
    labels = [*link.row_labels(), *(f"corner '{c}' driver" for c in link.corner_names)]
    u, sigma, _ = np.linalg.svd(last_jac[0])
    if sigma.size and sigma[-1] < 1e-3 * sigma[0]:
        weight = np.abs(u[:, -1])
        weight[len(link.rod_names) :] = 0.0  # name a rod
        if weight.any():
            row = int(np.argmax(weight))
            name = labels[row]
            member = name.split("'")[1] if "'" in name else name
            return member, (
                f"{name} reaches a dead point: the linkage would have to flip "
                "to its other assembly to go further"
            )
    row = int(np.argmax(np.abs(solved.residual[0])))
    name = labels[row]
    member = name.split("'")[1] if "'" in name else name
    value = float(solved.residual[0, row])
    return member, f"{name} cannot be satisfied (residual {value:+.3g} mm): it cannot reach"
