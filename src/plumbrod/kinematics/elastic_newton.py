"""Newton solve of a redundantly located design, pose by pose (DESIGN §4a).

The set-up (which rods are springs, the square set, the reduced Hessian) is
:mod:`plumbrod.kinematics.elastic`.  Here each pose minimises the elastic energy under
the rigid rows by damped Newton steps on the reduced system (steps halved until the
merit, the largest rigid residual or scaled energy gradient in mm, falls), started along
the design pose's tangent; poses that do not converge, or land on another branch (sign
of the square set's determinant), are reached by continuation from the nearest solved
pose with step halving.  A spring strained beyond
:data:`~plumbrod.kinematics.elastic.ABSURD_STRAIN` is a redundancy conflict.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.errors import AssemblyError
from plumbrod.kinematics.drives import Drive
from plumbrod.kinematics.elastic import (
    ABSURD_STRAIN,
    ElasticSetup,
    ElasticSolution,
    constraint_rows,
    reduced_hessian,
)
from plumbrod.kinematics.frames import Pose
from plumbrod.kinematics.linkage import Kinematics, Linkage
from plumbrod.kinematics.solver import RESIDUAL_TOL_MM, Solved

__all__ = ["redundancy_conflict", "solve_elastic"]

Array = NDArray[np.float64]

MAX_ITERATIONS = 30

MAX_HALVINGS = 8

MIN_CONTINUATION_STEP = 1.0 / 4096.0


@dataclass(frozen=True)
class _State:
    kin: Kinematics
    res: Array  # (B, m)
    jac: Array  # (B, m, nq)
    ext: Array  # (B, ne)
    jext: Array  # (B, ne, nq)

    def take(self, index: NDArray[np.intp]) -> _State:
        k = self.kin
        return _State(
            Kinematics(k.rotation[index], k.translation[index], k.points[index], k.columns[index]),
            self.res[index],
            self.jac[index],
            self.ext[index],
            self.jext[index],
        )


def _evaluate(link: Linkage, drive: Drive, setup: ElasticSetup, pose: Pose) -> _State:
    kin = link.kinematics(pose)
    res, jac = constraint_rows(link, drive, kin)
    ends = link.rod_ends[setup.rods]
    d = kin.points[:, ends[:, 0]] - kin.points[:, ends[:, 1]]
    ell = np.linalg.norm(d, axis=-1)
    design = link.rod_length[:, setup.rods]
    # a rod row's Jacobian is (d/ℓ₀)·(...); the exact ∂ℓ/∂q is (d/ℓ)·(...)
    jext = jac[:, setup.rods] * (design / ell)[..., None]
    return _State(kin, res, jac, ell - design, jext)


def _reduced(setup: ElasticSetup, state: _State, rhs_rigid: Array, rhs_kept: Array) -> tuple:
    """Solve the square set for ``rhs`` columns plus one column per kept spring.

    Returns ``dq0`` (B, nq, c), ``y`` (B, nq, nK) and ``g`` = J_R·y (B, nR, nK).
    """
    a = _square(setup, state)
    n, nq = a.shape[0], a.shape[1]
    n_rigid, nk = setup.rigid_rows.size, setup.kept.size
    cols = rhs_rigid.shape[2]
    b = np.zeros((n, nq, cols + nk))
    b[:, :n_rigid, :cols] = rhs_rigid
    b[:, n_rigid:, :cols] = rhs_kept
    b[:, n_rigid + np.arange(nk), cols + np.arange(nk)] = 1.0
    sol = np.linalg.solve(a, b)
    dq0, y = sol[..., :cols], sol[..., cols:]
    jr = state.jext[:, setup.removed]
    return dq0, y, jr @ y, jr


def _square(setup: ElasticSetup, state: _State) -> Array:
    """(B, nq, nq) the rigid rows, then the kept springs' exact ∂ℓ/∂q rows."""
    return np.concatenate((state.jac[:, setup.rigid_rows], state.jext[:, setup.kept]), axis=1)


def _step(setup: ElasticSetup, state: _State) -> tuple[Array, Array]:
    """Newton step (B, nq) and the reduced energy gradient (B, nK) in N."""
    kk, kr = setup.stiffness[setup.kept], setup.stiffness[setup.removed]
    e_k, e_r = state.ext[:, setup.kept], state.ext[:, setup.removed]
    dq0, y, g, jr = _reduced(setup, state, -state.res[:, setup.rigid_rows, None], -e_k[..., None])
    c = e_r + (jr @ dq0)[..., 0]
    t = np.linalg.solve(reduced_hessian(setup, g), -np.einsum("brk,r,br->bk", g, kr, c)[..., None])
    step = dq0[..., 0] + (y @ t)[..., 0]
    grad = kk * e_k + np.einsum("brk,r,br->bk", g, kr, e_r)
    return step, grad


def _merit(setup: ElasticSetup, state: _State, grad: Array) -> Array:
    rigid = np.abs(state.res[:, setup.rigid_rows]).max(axis=1)
    return np.maximum(rigid, np.abs(grad).max(axis=1, initial=0.0) / setup.stiffness.max())


def _put(pose: Pose, index: NDArray[np.intp], values: Pose) -> Pose:
    joint, rotation, centre = pose.joint.copy(), pose.rotation.copy(), pose.centre.copy()
    joint[index], rotation[index], centre[index] = values.joint, values.rotation, values.centre
    return Pose(joint, rotation, centre)


def _newton(
    link: Linkage, drive: Drive, setup: ElasticSetup, guess: Pose
) -> tuple[Pose, _State, NDArray[np.bool_], int]:
    """Iterate every pose; returns pose, state, converged mask and iterations."""
    pose = guess
    state = _evaluate(link, drive, setup, pose)
    step, grad = _step(setup, state)
    merit = _merit(setup, state, grad)
    it = 0
    for it in range(1, MAX_ITERATIONS + 1):  # noqa: B007
        active = merit > RESIDUAL_TOL_MM
        if not active.any():
            break
        scale = np.where(active, 1.0, 0.0)
        improved = np.zeros(pose.size, dtype=bool)
        trial_pose, trial_state = pose, state
        trial_step, trial_grad, trial_merit = step, grad, merit
        for _ in range(MAX_HALVINGS + 1):
            todo = np.flatnonzero(active & ~improved)
            if todo.size == 0:
                break
            sub_pose = link.advance(pose.take(todo), step[todo] * scale[todo, None])
            sub_drive = drive.with_parameters(drive.parameters[todo])
            sub_state = _evaluate(link, sub_drive, setup, sub_pose)
            sub_step, sub_grad = _step(setup, sub_state)
            sub_merit = _merit(setup, sub_state, sub_grad)
            ok = (sub_merit < merit[todo]) | (sub_merit <= RESIDUAL_TOL_MM)
            take = todo[ok]
            if take.size:
                trial_pose = _put(trial_pose, take, sub_pose.take(np.flatnonzero(ok)))
                trial_state = _merge(trial_state, take, sub_state, np.flatnonzero(ok))
                trial_step = trial_step.copy()
                trial_grad = trial_grad.copy()
                trial_merit = trial_merit.copy()
                trial_step[take] = sub_step[ok]
                trial_grad[take] = sub_grad[ok]
                trial_merit[take] = sub_merit[ok]
                improved[take] = True
            scale[todo[~ok]] *= 0.5
        pose, state, step, grad, merit = (
            trial_pose,
            trial_state,
            trial_step,
            trial_grad,
            trial_merit,
        )
        if not improved[active].any():
            break
    return pose, state, merit <= RESIDUAL_TOL_MM, it


def _merge(
    state: _State, index: NDArray[np.intp], src: _State, src_index: NDArray[np.intp]
) -> _State:
    def put(a: Array, b: Array) -> Array:
        out = a.copy()
        out[index] = b[src_index]
        return out

    k, s = state.kin, src.kin
    return _State(
        Kinematics(
            put(k.rotation, s.rotation),
            put(k.translation, s.translation),
            put(k.points, s.points),
            put(k.columns, s.columns),
        ),
        put(state.res, src.res),
        put(state.jac, src.jac),
        put(state.ext, src.ext),
        put(state.jext, src.jext),
    )


def _tangent(link: Linkage, drive: Drive, setup: ElasticSetup, state: _State) -> Array:
    """dq/d(parameters) (B, nq, npar) of the elastic minimum (same Hessian as the steps)."""
    p_jac = drive.parameter_jacobian(link, state.kin)  # (B, nc, npar)
    n, m = state.res.shape
    full = np.zeros((n, m, p_jac.shape[2]))
    full[:, m - p_jac.shape[1] :] = p_jac
    nk = setup.kept.size
    dq0, y, g, jr = _reduced(
        setup, state, -full[:, setup.rigid_rows], np.zeros((n, nk, p_jac.shape[2]))
    )
    kr = setup.stiffness[setup.removed]
    rhs = -np.einsum("brk,r,brp->bkp", g, kr, jr @ dq0)
    tau = np.linalg.solve(reduced_hessian(setup, g), rhs)
    return dq0 + y @ tau


def _mismatch(setup: ElasticSetup, state: _State) -> Array:
    """(B, nR) removable set's extension with the kept springs back at design length."""
    e_k, e_r = state.ext[:, setup.kept], state.ext[:, setup.removed]
    n = e_k.shape[0]
    dq0, _, _, jr = _reduced(setup, state, np.zeros((n, setup.rigid_rows.size, 1)), -e_k[..., None])
    return e_r + (jr @ dq0)[..., 0]


def _branch_sign(setup: ElasticSetup, state: _State) -> Array:
    return np.linalg.slogdet(_square(setup, state))[0]


def solve_elastic(
    link: Linkage,
    drive: Drive,
    setup: ElasticSetup,
    *,
    sweep_name: str = "sweep",
    describe: Callable[[Array], str] | None = None,
) -> tuple[Solved, ElasticSolution]:
    """Solve every pose of ``drive`` elastically, from the design pose.

    Raises AssemblyError (kind ``redundancy-conflict``) when a spring's strain is absurd
    (:data:`ABSURD_STRAIN`), and the rigid solver's kinds when a pose cannot be reached.
    """
    describe = describe or (lambda p: ", ".join(f"{v:+.4g}" for v in p))
    params = np.asarray(drive.parameters, dtype=float)
    count, npar = params.shape
    zero = np.zeros((1, npar))
    base = link.design_pose(1)
    base_drive = drive.with_parameters(zero)
    state0 = _evaluate(link, base_drive, setup, base)
    sign0 = _branch_sign(setup, state0)[0]
    tan0 = _tangent(link, base_drive, setup, state0)[0]  # (nq, npar)
    guess = link.advance(base.repeat(count), params @ tan0.T)
    pose, state, ok, iterations = _newton(link, drive, setup, guess)
    ok &= _branch_sign(setup, state) == sign0
    for i in np.flatnonzero(~ok):
        done = np.flatnonzero(ok)
        start_pose, start_par = base, zero[0]
        if done.size:
            near = done[np.argmin(np.linalg.norm(params[done] - params[i], axis=1))]
            if np.linalg.norm(params[near] - params[i]) < np.linalg.norm(params[i]):
                start_pose, start_par = pose.take(int(near)), params[near]
        reached = _continue(
            link, drive, setup, start_pose, start_par, params[i], sign0, sweep_name, describe
        )
        pose = _put(pose, np.array([i]), reached)
        ok[i] = True
    state = _evaluate(link, drive, setup, pose)
    _check_strain(link, setup, state, sweep_name, lambda i: describe(params[i]))
    solution = ElasticSolution(
        setup, state.ext, _mismatch(setup, state), _tangent(link, drive, setup, state)
    )
    solved = Solved(
        pose, state.kin, state.res, state.jac, iterations, elastic_rows=tuple(setup.rods.tolist())
    )
    return solved, solution


def _check_strain(
    link: Linkage,
    setup: ElasticSetup,
    state: _State,
    sweep_name: str,
    describe: Callable[[int], str],
) -> None:
    strain = np.abs(state.ext) / link.rod_length[0, setup.rods]
    if strain.size == 0 or strain.max() <= ABSURD_STRAIN:
        return
    b = int(np.argmax(strain.max(axis=1)))
    raise redundancy_conflict(link, setup, state.take(np.array([b])), sweep_name, describe(b))


def redundancy_conflict(
    link: Linkage, setup: ElasticSetup, state: _State, sweep_name: str, where: str
) -> AssemblyError:
    """The error for a pose whose springs would have to strain absurdly."""
    names = setup.names(link)
    strain = np.abs(state.ext[0]) / link.rod_length[0, setup.rods]
    worst = int(np.argmax(strain))
    mismatch = _mismatch(setup, state)[0]
    removed = setup.removed_names(link)
    need = ", ".join(f"'{n}' {v:+.2f} mm" for n, v in zip(removed, mismatch, strict=True))
    listed = ", ".join(f"'{n}'" for n in names)
    return AssemblyError(
        names[worst],
        sweep_name,
        where,
        f"redundancy conflict: rods {listed} hold the same body more times than it needs, "
        f"and here their lengths disagree by more than any rod can stretch (rod "
        f"'{names[worst]}' strained {strain[worst]:.1%}; rigid rods would need {need}): "
        "check those pickups, or remove one of the rods, or add an equaliser",
        kind="redundancy-conflict",
    )


def _continue(
    link: Linkage,
    drive: Drive,
    setup: ElasticSetup,
    pose: Pose,
    start: Array,
    target: Array,
    sign0: float,
    sweep_name: str,
    describe: Callable[[Array], str],
) -> Pose:
    """March from ``pose`` at parameters ``start`` to ``target`` with step halving."""
    from plumbrod.kinematics.solver import diagnose_failure

    done, step = 0.0, 1.0
    current = start.copy()
    last_kind = "cannot-reach"
    while done < 1.0:
        step = min(step, 1.0 - done)
        nxt = start + (target - start) * (done + step)
        d_now = drive.with_parameters(current[None])
        st_now = _evaluate(link, d_now, setup, pose)
        tan = _tangent(link, d_now, setup, st_now)[0]
        guess = link.advance(pose, ((nxt - current) @ tan.T)[None])
        d_next = drive.with_parameters(nxt[None])
        new_pose, new_state, ok, _ = _newton(link, d_next, setup, guess)
        if ok[0] and _branch_sign(setup, new_state)[0] == sign0:
            strain = np.abs(new_state.ext[0]) / link.rod_length[0, setup.rods]
            if strain.max(initial=0.0) > ABSURD_STRAIN:
                raise redundancy_conflict(link, setup, new_state, sweep_name, describe(nxt))
            pose, current, done = new_pose, nxt, done + step
            step = min(step * 2.0, 1.0)
            continue
        last_kind = "branch-change" if ok[0] else "cannot-reach"
        step *= 0.5
        if step < MIN_CONTINUATION_STEP:
            strain = np.abs(st_now.ext[0]) / link.rod_length[0, setup.rods]
            if strain.max(initial=0.0) > ABSURD_STRAIN / 4.0:
                raise redundancy_conflict(link, setup, st_now, sweep_name, describe(nxt))
            rigid = Solved(
                pose,
                st_now.kin,
                st_now.res,
                st_now.jac,
                0,
                elastic_rows=tuple(setup.rods.tolist()),
            )
            raise diagnose_failure(
                link,
                rigid,
                st_now.kin,
                st_now.jac,
                new_state.res,
                last_kind,
                sweep_name,
                describe(nxt),
                skip_rows=tuple(setup.rods.tolist()),
            )
    return pose
