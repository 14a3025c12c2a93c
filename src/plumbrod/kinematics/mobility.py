"""Is every body exactly located?  Grübler–Kutzbach count, confirmed by Jacobian rank.

The count treats each rod as a link with a ball joint at each end (its spin about its
own axis is an idle freedom and is taken off); hinges and slides have one freedom,
ball joints three (in a planar design every joint is a pin with one freedom).  With one
driver per corner the count should be zero.  The count can be fooled by special
geometry, so the rank of the constraint Jacobian at the design pose decides: a missing
rank is a free motion (named by the body that moves most in it), a surplus row is a
redundant member (named with the members it duplicates).

References: K. J. Waldron, G. L. Kinzel, S. K. Agrawal, *Kinematics, Dynamics, and
Design of Machinery*, 3rd ed., §1.8 (mobility criteria).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.drives import TravelDrive
from plumbrod.kinematics.linkage import FREE, HINGE, SLIDE, Kinematics, Linkage
from plumbrod.kinematics.solver import evaluate

__all__ = ["Mobility", "analyse_mobility"]

Array = NDArray[np.float64]
RANK_TOL = 1e-9
"""Singular values below this fraction of the largest count as zero."""

_AXIS_NAMES = ("x (fore-aft)", "y (sideways)", "z (vertical)")
_ROTATION_NAMES = ("x (roll)", "y (pitch)", "z (yaw)")


@dataclass(frozen=True)
class Mobility:
    """Result of the location analysis."""

    count: int
    """Grübler–Kutzbach mobility after idle rod spins, before drivers."""
    formula: str
    drivers: int
    rank: int
    n_coords: int
    n_rows: int
    free_motions: tuple[str, ...]
    redundant: tuple[str, ...]
    redundant_members: tuple[tuple[str, ...], ...]

    @property
    def exact(self) -> bool:
        """True when every body is located and no member is redundant."""
        return not self.free_motions and not self.redundant

    @property
    def over_constrained(self) -> bool:
        return bool(self.redundant) and not self.free_motions


def _gruebler(link: Linkage) -> tuple[int, str]:
    n_rods = len(link.rod_names)
    moving = link.n_bodies - 1
    links = 1 + moving + n_rods
    lower = int(np.sum((link.mount == HINGE) | (link.mount == SLIDE)))
    balls = len(link.ball_names) + 2 * n_rods
    if link.plane is not None:
        joints = lower + balls  # every joint is a pin (one freedom) in the plane
        count = 3 * (links - 1) - 2 * joints
        formula = (
            f"M = 3(n-1) - 2j = 3({links}-1) - 2*{joints} = {count} "
            f"(n = {links} links incl. {n_rods} rods, j = {joints} pins and slides)"
        )
        return count, formula
    raw = 6 * (links - 1) - 5 * lower - 3 * balls
    count = raw - n_rods
    formula = (
        f"M = 6(n-1) - 5*j1 - 3*j3 - idle = 6({links}-1) - 5*{lower} - 3*{balls} "
        f"- {n_rods} = {count} (n = {links} links incl. {n_rods} rods; "
        f"j1 = {lower} hinges and slides; j3 = {balls} ball joints; "
        f"{n_rods} idle rod spins)"
    )
    return count, formula


def _scales(link: Linkage) -> Array:
    """Column scales that make rotations (rad) comparable to translations (mm)."""
    length = link.characteristic_length()
    scale = np.ones(link.n_coords)
    for b in range(link.n_bodies):
        if link.mount[b] == HINGE:
            scale[link.joint_index[b]] = length
    k = link.free_basis.shape[1]
    rotational = np.any(link.free_basis[3:6] != 0, axis=0)
    for f in range(link.n_free):
        scale[link.n_joint + f * k : link.n_joint + (f + 1) * k][rotational] = length
    return scale


def analyse_mobility(link: Linkage) -> Mobility:
    """Count and rank the design's constraints at the design pose (travel drivers)."""
    count, formula = _gruebler(link)
    nc = len(link.corner_names)
    pose = link.design_pose(1)
    kin, _, jac = evaluate(link, TravelDrive(np.zeros((1, nc))), pose)
    scale = _scales(link)
    scaled = jac[0] * scale[None, :]
    _, sigma, vt = np.linalg.svd(scaled)
    top = sigma[0] if sigma.size else 1.0
    rank = int(np.sum(sigma > RANK_TOL * top))
    m, n = scaled.shape
    free: list[str] = []
    for vec in vt[rank:n]:
        coords = vec * scale
        free.append(_axis_cause(link, vec) or _describe_motion(link, kin, coords))
    redundant: list[str] = []
    groups: list[tuple[str, ...]] = []
    if m > rank:
        # a rod is redundant when the others keep the same rank without it
        removable = []
        for r in range(len(link.rod_names)):
            rest = np.delete(scaled, r, axis=0)
            s_rest = np.linalg.svd(rest, compute_uv=False)
            if int(np.sum(s_rest > RANK_TOL * top)) == rank:
                removable.append(link.rod_names[r])
        surplus = m - rank
        groups.append(tuple(removable))
        listed = ", ".join(f"'{n}'" for n in removable) or "(no single rod)"
        redundant.append(
            f"{surplus} redundant member{'s' if surplus > 1 else ''}: removing "
            f"{'any one' if surplus == 1 else 'some'} of rods {listed} leaves the rest "
            "exactly located"
        )
    return Mobility(
        count=count,
        formula=formula,
        drivers=nc,
        rank=rank,
        n_coords=n,
        n_rows=m,
        free_motions=tuple(free),
        redundant=tuple(redundant),
        redundant_members=tuple(groups),
    )


AXIS_PARALLEL_DEG = 1.0
"""A rod within this angle of a rocker's axis, or whose line passes this close (as a
fraction of the rod length) to the axis, cannot turn the rocker."""


def _axis_cause(link: Linkage, vec: Array) -> str | None:
    """When a rocker is free to turn about its own axis because every rod on it is
    parallel to the axis or meets it, name that rod: the fix is the axis, not a rod."""
    if link.n_bodies < 2:
        return None
    weight = np.abs(vec)
    for b in range(1, link.n_bodies):
        if link.mount[b] != HINGE or link.body_kind[b] != "rocker":
            continue
        j = link.joint_index[b]
        if weight[j] < 0.5 * weight.max():
            continue
        u = link.axis_direction[0, b]
        a = link.axis_origin[0, b]
        rods: list[tuple[str, float, bool]] = []
        effective = False
        for r, (p, o) in enumerate(link.rod_ends):
            for here, there in ((p, o), (o, p)):
                if link.point_body[here] != b:
                    continue
                d = link.points[0, there] - link.points[0, here]
                length = float(np.linalg.norm(d))
                arm = float(np.dot(np.cross(link.points[0, here] - a, d / length), u))
                angle = float(np.degrees(np.arccos(min(1.0, abs(np.dot(d, u)) / length))))
                parallel = angle < AXIS_PARALLEL_DEG
                if parallel or abs(arm) < np.radians(AXIS_PARALLEL_DEG) * length:
                    rods.append((link.rod_names[r], angle, parallel))
                else:
                    effective = True
        if effective or not rods:
            continue
        name, angle, parallel = rods[0]
        only = "the only rod on it" if len(rods) == 1 else "every rod on it"
        how = (
            f"runs parallel to its axis ({angle:.1f}° from it)"
            if parallel
            else "points straight at its axis"
        )
        return (
            f"rocker '{link.body_names[b]}' is free to turn about its own pivot axis: rod "
            f"'{name}' ({only}) {how}, so it cannot turn the rocker; turn the rocker's "
            "axis (axis_mm) so that it is square to the rod, or move the rod's pickups"
        )
    return None


def _describe_motion(link: Linkage, kin: Kinematics, coords: Array) -> str:
    """Name the body that moves most in a null motion and how it moves."""
    length = link.characteristic_length()
    best, best_size, best_text = "", -1.0, ""
    for b in range(1, link.n_bodies):
        mask = link.ancestors[b]
        twist = kin.columns[0][:, mask] @ coords[mask]
        v, w = twist[0:3], twist[3:6]
        ref = link.points[0, link.reference[b]] if link.mount[b] == FREE else link.axis_origin[0, b]
        v_ref = v + np.cross(w, ref)
        size = float(max(np.linalg.norm(v_ref), np.linalg.norm(w) * length))
        if size > best_size * (1 + 1e-9):
            best_size = size
            best = link.body_names[b]
            if np.linalg.norm(w) * length >= np.linalg.norm(v_ref):
                axis = int(np.argmax(np.abs(w)))
                best_text = f"rotate about {_ROTATION_NAMES[axis]}"
            else:
                axis = int(np.argmax(np.abs(v_ref)))
                best_text = f"move along {_AXIS_NAMES[axis]}"
    kind = link.body_kind[link.body_names.index(best)] if best else "body"
    return f"{kind} '{best}' is free to {best_text}; add a rod that stops it"
