"""Redundant location solved elastically (DESIGN §4a), batched over poses.

When rows of the constraint Jacobian are dependent at the design pose, some rods hold
a body more times than it needs.  Every design rod that takes part in such a dependency
(its row carries weight in the left null space of the Jacobian) becomes an axial spring
``k = EA/L`` about its design length ``ℓ₀``; every other row (ball joints, rods outside
the dependency, tie rods, drivers) stays rigid.  Each pose then minimises the elastic
energy ``U = ½ Σ kᵢ(ℓᵢ − ℓ₀ᵢ)²`` subject to the rigid rows.

Newton on the stationarity (KKT) system, reduced to the springs: the rigid rows plus
the springs of one kept set form a square set ``A`` (full rank at the design pose); the
other springs (one removable set ``R``) are what the redundancy adds.  With ``t`` the
kept springs' new extensions, one step solves ``A·dq = [−Φ_rigid; t − e_K]`` and so
``e_R' = c + G·t``; minimising ``U`` over ``t`` gives ``(K_K + Gᵀ K_R G)·t = −Gᵀ K_R c``.
The gradient of ``U`` is exact; the Hessian keeps ``Jᵀ K J`` and drops the geometric
terms (force × curvature, smaller than the stiffness terms by the order of the rods'
strain), so a converged pose is the exact constrained minimum.  A step costs one
factorisation of ``A`` (the rigid solver's) with a few more right-hand sides.

Fight forces ``Tᵢ = kᵢ(ℓᵢ − ℓ₀ᵢ)`` (+ tension) are what the motion alone induces.
``mismatch_mm``: to first order, how much the removable set's rods would have to change
length to fit if every rod were rigid (``c`` with the kept springs at zero extension).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.drives import Drive, TravelDrive
from plumbrod.kinematics.linkage import FREE, HINGE, Kinematics, Linkage

__all__ = [
    "ABSURD_STRAIN",
    "ElasticSetup",
    "ElasticSolution",
    "constraint_rows",
    "elastic_response",
    "elastic_setup",
    "reduced_hessian",
]

Array = NDArray[np.float64]

PARTICIPATION_TOL = 1e-7
"""A row whose weight in the (unit) left null vectors exceeds this takes part."""

RANK_TOL = 1e-9

ABSURD_STRAIN = 0.01
"""A spring stretched or shortened by more than 1 % of its length is past the elastic
range of every metal in the shipped table (4130 yields near 0.2 %, Ti-6Al-4V near 0.8 %
strain: yield / modulus, REFERENCES.md): the geometry conflicts, it does not fight."""


@dataclass(frozen=True)
class ElasticSetup:
    """Which rows are springs and how the square set is chosen (indices into the rows
    members-then-drivers of :func:`plumbrod.kinematics.solver.evaluate`)."""

    rods: NDArray[np.intp]  # (ne,) link rod indices solved as springs (= their row)
    stiffness: Array  # (ne,) N/mm
    rigid_rows: NDArray[np.intp]  # rows held exactly
    kept: NDArray[np.intp]  # positions in ``rods`` of the springs in the square set
    removed: NDArray[np.intp]  # positions in ``rods`` of one removable set

    @property
    def square_rows(self) -> NDArray[np.intp]:
        return np.concatenate((self.rigid_rows, self.rods[self.kept]))

    def names(self, link: Linkage) -> tuple[str, ...]:
        return tuple(link.rod_names[r] for r in self.rods)

    def removed_names(self, link: Linkage) -> tuple[str, ...]:
        return tuple(link.rod_names[self.rods[i]] for i in self.removed)


@dataclass(frozen=True)
class ElasticSolution:
    """What the elastic solve adds to a solved sweep (B poses)."""

    setup: ElasticSetup
    extension_mm: Array  # (B, ne) ℓ − ℓ₀ of every spring
    mismatch_mm: Array  # (B, nR) length change the removable set would need if rigid
    tangent: Array  # (B, nq, npar) dq/d(parameters) of the elastic minimum

    @property
    def force_N(self) -> Array:
        """(B, ne) fight forces, + tension."""
        return self.extension_mm * self.setup.stiffness


def _scales(link: Linkage) -> Array:
    """Column scales that make rotations comparable to translations (as in mobility)."""
    length = link.characteristic_length()
    scale = np.ones(link.n_coords)
    for b in range(link.n_bodies):
        if link.mount[b] == HINGE:
            scale[link.joint_index[b]] = length
    k = link.free_basis.shape[1]
    rotational = np.any(link.free_basis[3:6] != 0, axis=0)
    for f in range(link.n_free):
        if link.mount[np.flatnonzero(link.free_index == f)[0]] == FREE:
            scale[link.n_joint + f * k : link.n_joint + (f + 1) * k][rotational] = length
    return scale


def constraint_rows(link: Linkage, drive: Drive, kin: Kinematics) -> tuple[Array, Array]:
    res, jac = link.residual_and_jacobian(kin)
    d_res, d_jac = drive.rows(link, kin)
    return np.concatenate((res, d_res), axis=1), np.concatenate((jac, d_jac), axis=1)


def elastic_setup(link: Linkage, stiffness: Array) -> ElasticSetup | None:
    """The springs of a redundantly located design, or None when it is exactly located
    (or its redundancy involves no rod with a stiffness, so no spring can take it up).

    ``stiffness`` (nr,): EA/L of every link rod (N/mm); NaN for rods without one.
    """
    if link.points.shape[0] != 1 or len(link.rod_names) == 0:
        return None
    nc = len(link.corner_names)
    kin = link.kinematics(link.design_pose(1))
    _, jac = constraint_rows(link, TravelDrive(np.zeros((1, nc))), kin)
    scaled = jac[0] * _scales(link)[None, :]
    u, sigma, _ = np.linalg.svd(scaled)
    top = sigma[0] if sigma.size else 1.0
    rank = int(np.sum(sigma > RANK_TOL * top))
    m, n = scaled.shape
    if m <= rank or rank < n:
        return None
    weight = np.linalg.norm(u[:, rank:], axis=1)
    nr = len(link.rod_names)
    k = np.asarray(stiffness, dtype=float)
    springs = np.array(
        [r for r in range(nr) if weight[r] > PARTICIPATION_TOL and np.isfinite(k[r]) and k[r] > 0],
        dtype=np.intp,
    )
    if springs.size == 0:
        return None
    rigid = np.array([r for r in range(m) if r not in set(springs.tolist())], dtype=np.intp)
    top_r = np.linalg.svd(scaled[rigid], compute_uv=False)
    if int(np.sum(top_r > RANK_TOL * top)) != rigid.size:
        return None  # the rigid rows alone are redundant: no spring can take that up
    chosen = list(rigid)
    kept: list[int] = []
    for i, r in enumerate(springs):
        trial = scaled[[*chosen, r]]
        s = np.linalg.svd(trial, compute_uv=False)
        if int(np.sum(s > RANK_TOL * top)) == len(chosen) + 1:
            chosen.append(int(r))
            kept.append(i)
        if len(chosen) == n:
            break
    if len(chosen) != n:
        return None
    removed = [i for i in range(springs.size) if i not in kept]
    return ElasticSetup(
        rods=springs,
        stiffness=k[springs],
        rigid_rows=rigid,
        kept=np.array(kept, dtype=np.intp),
        removed=np.array(removed, dtype=np.intp),
    )


def reduced_hessian(setup: ElasticSetup, g: Array) -> Array:
    kk, kr = setup.stiffness[setup.kept], setup.stiffness[setup.removed]
    return np.eye(kk.size) * kk + np.einsum("brk,r,brl->bkl", g, kr, g)


def elastic_response(setup: ElasticSetup, jac: Array, rhs: Array) -> Array:
    """dq (B, nq, c) with ``jac[rigid] @ dq = rhs[rigid]`` exactly and the springs'
    rows ``jac[s] @ dq − rhs[s]`` (their extensions; rows scaled to unit rod direction)
    at least elastic energy ``½ Σ k·(...)²``: the motion of the redundant structure for
    imposed row changes ``rhs`` (B, m, c) (rows members then drivers or contacts)."""
    a = np.concatenate((jac[:, setup.rigid_rows], jac[:, setup.rods[setup.kept]]), axis=1)
    n, nq, cols = jac.shape[0], jac.shape[2], rhs.shape[2]
    n_rigid, nk = setup.rigid_rows.size, setup.kept.size
    b = np.zeros((n, nq, cols + nk))
    b[:, :n_rigid, :cols] = rhs[:, setup.rigid_rows]
    b[:, n_rigid + np.arange(nk), cols + np.arange(nk)] = 1.0
    sol = np.linalg.solve(a, b)
    dq0, y = sol[..., :cols], sol[..., cols:]
    jr = jac[:, setup.rods[setup.removed]]
    g = jr @ y
    kk, kr = setup.stiffness[setup.kept], setup.stiffness[setup.removed]
    c = jr @ dq0 - rhs[:, setup.rods[setup.removed]]
    right = kk[None, :, None] * rhs[:, setup.rods[setup.kept]] - np.einsum(
        "brk,r,brc->bkc", g, kr, c
    )
    t = np.linalg.solve(reduced_hessian(setup, g), right)
    return dq0 + y @ t
