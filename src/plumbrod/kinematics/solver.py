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
    "diagnose_failure",
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
    elastic_rows: tuple[int, ...] = ()
    """Rows solved as springs (redundant rods, :mod:`plumbrod.kinematics.elastic`): their
    residual is the rod's stretch, not an error, and is left out of ``residual_max_mm``."""

    @property
    def residual_max_mm(self) -> Array:
        """(B,) largest absolute residual of each pose (rigid rows only)."""
        res = self.residual
        if self.elastic_rows:
            res = np.delete(res, list(self.elastic_rows), axis=1)
        if res.shape[1] == 0:
            return np.zeros(res.shape[0])
        return np.abs(res).max(axis=1)


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
        hint = "branch-change" if ok[0] else "cannot-reach"
        step *= 0.5
        if step < MIN_CONTINUATION_STEP:
            last_kin, _, last_jac = evaluate(link, drive.with_parameters(current[None]), pose)
            raise diagnose_failure(
                link, solved, last_kin, last_jac, solved.residual, hint, sweep_name, describe(nxt)
            )
    return pose


DEAD_POINT_DEG = 10.0
"""A rod end whose transmission angle is this close to 0° or 180° at the last pose
reached is named as the cause when the linkage stops assembling."""


def _member(label: str) -> str:
    return label.split("'")[1] if "'" in label else label


def diagnose_failure(
    link: Linkage,
    solved: Solved,
    last_kin: Kinematics,
    last_jac: Array,
    trial_residual: Array,
    hint: str,
    sweep_name: str,
    driver: str,
    skip_rows: tuple[int, ...] = (),
) -> AssemblyError:
    """The error for a pose the continuation cannot reach, with its cause (``kind``).

    ``hint`` is how the last attempt failed: ``branch-change`` when Newton converged but
    on the other assembly, ``cannot-reach`` when it did not converge.  Then, at the last
    pose reached:

    * a branch change names the rod the singular direction of the constraint Jacobian
      loads most (and the rocker, when a rod end there is in line with its arm);
    * otherwise, a rod end on a hinged body within :data:`DEAD_POINT_DEG` of 0° or 180°
      is a true dead point (rod and rocker named);
    * otherwise the row with the largest residual of the failed attempt cannot reach,
      with how much longer or shorter it would have to be.

    ``skip_rows`` (springs of an elastic solve) are never named as unreachable.
    """
    from plumbrod.kinematics.transmission import joint_labels, transmission_angles

    labels = [*link.row_labels(), *(f"corner '{c}' driver" for c in link.corner_names)]
    nr = len(link.rod_names)
    mu, _ = transmission_angles(link, last_kin)
    toggle: tuple[str, str, float] | None = None
    if mu.shape[1]:
        off = np.minimum(mu[0], 180.0 - mu[0])
        j = int(np.argmin(off))
        if off[j] < DEAD_POINT_DEG:
            rod, body = joint_labels(link)[j]
            toggle = (rod, body, float(mu[0, j]))
    if hint == "branch-change":
        u, sigma, _ = np.linalg.svd(last_jac[0])
        weight = np.abs(u[:, -1]) if sigma.size else np.zeros(len(labels))
        weight[nr:] = 0.0
        row = int(np.argmax(weight)) if weight.any() else 0
        name = toggle[0] if toggle else _member(labels[row])
        at = f" at '{toggle[1]}' (transmission angle {toggle[2]:.1f}°)" if toggle else ""
        return AssemblyError(
            name,
            sweep_name,
            driver,
            f"branch change: rod '{name}'{at} passes a singular pose and the linkage would "
            "go on in its other assembly (a body flips over); limit the sweep to this side, "
            "or move the pickups so the rods never fall in line",
            kind="branch-change",
        )
    if toggle is not None:
        rod, body, angle = toggle
        return AssemblyError(
            rod,
            sweep_name,
            driver,
            f"dead point: rod '{rod}' is in line with its arm on '{body}' (transmission "
            f"angle {angle:.1f}°) and cannot turn it further; lengthen the arm, move the "
            "rod's pickups, or limit the sweep",
            kind="dead-point",
        )
    res = np.array(trial_residual[0], dtype=float)
    res[list(skip_rows)] = 0.0
    row = int(np.argmax(np.abs(res)))
    name = labels[row]
    value = float(res[row])
    if row < nr:
        how = f"{abs(value):.3g} mm {'longer' if value > 0 else 'shorter'}"
        text = (
            f"rod '{_member(name)}' cannot reach: it would have to be {how} (the bodies it "
            "joins part further than it allows); check its pickups and the sweep's range"
        )
    else:
        text = (
            f"{name} cannot be satisfied (residual {value:+.3g} mm): the linkage cannot reach "
            "this pose; check the pickups and the sweep's range"
        )
    return AssemblyError(_member(name), sweep_name, driver, text, kind="cannot-reach")
