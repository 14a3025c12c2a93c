"""The linkage as arrays: bodies, coordinates, points, and the constraint equations.

Conventions
-----------
* Every body's local coordinates are the design coordinates (chassis frame at the
  design pose), so a body pose ``(R, t)`` maps a design position to its current
  position: ``p = R @ p_design + t``.  At the design pose ``R = I`` and ``t = 0``.
* All positions are in the chassis frame, mm; angles in radians inside this module.
* Coordinates: a body hinged to its parent has one angle about the hinge axis (rad); a
  sliding body one displacement along its slide (mm); a free body (an upright held by
  wishbones, an aero element) six increments ``(dc, dtheta)`` of its reference point and
  rotation (three in a planar design: the in-plane ones).  The coordinate vector is
  ``[joint values | free-body increments]``.
* Twists are ``[v, w]`` at the chassis origin: a point ``p`` of the body moves by
  ``v + w x p``.
* Batch axes: poses ``B`` lead every state array; the geometry (the points array) has a
  leading axis ``G`` that is 1 or ``B``, so a stack of candidate designs solves at once.

Constraint rows (all in mm): rod lengths ``(|d|^2 - L^2) / 2L``, ball joints (three
components, the in-plane ones in a planar design), and one driver row per corner (see
:mod:`plumbrod.kinematics.drives`).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import Design
from plumbrod.kinematics.frames import (
    Array,
    Pose,
    cross,
    cross_into,
    rotation_vector,
    rotation_vector_matrix,
    skew,
)

__all__ = ["FIXED", "FREE", "HINGE", "SLIDE", "Kinematics", "Linkage"]

FIXED, HINGE, SLIDE, FREE = 0, 1, 2, 3


@dataclass(frozen=True)
class Kinematics:
    """Everything one evaluation of a pose batch produces (chassis frame, mm).

    ``columns`` (B, 6, nq) is the twist ``[v, w]`` at the origin of each coordinate's
    unit increment; a body moves with the columns of its ancestors' coordinates.
    """

    rotation: Array  # (B, nb, 3, 3) body rotations
    translation: Array  # (B, nb, 3)
    points: Array  # (B, np, 3) every named point
    columns: Array  # (B, 6, nq)

    def jacobian_rows(self, link: Linkage, bodies: NDArray[np.intp], wrench: Array) -> Array:
        """Rows ``sum_s wrench[r, s] . twist(bodies[r, s])``: (B, r, nq).

        ``bodies`` (r, s) names the body each side of each row acts on; ``wrench``
        (B, r, s, 6) is ``[f, p x f]`` for a gradient ``f`` at a point ``p`` of it.
        """
        n, rows, sides = wrench.shape[0], wrench.shape[1], wrench.shape[2]
        flat = wrench.reshape(n, rows * sides, 6)
        if link.points.shape[0] > 1:  # a design batch: einsum's planned product is faster
            per = np.einsum("nrk,nkq->nrq", flat, self.columns, optimize=True)
        else:
            per = flat @ self.columns
        per = per.reshape(n, rows, sides, -1)
        mask = link.float_ancestors[bodies]
        out = per[:, :, 0] * mask[:, 0]
        for side in range(1, sides):
            out += per[:, :, side] * mask[:, side]
        return out

    def point_jacobian(self, link: Linkage, index: NDArray[np.intp]) -> Array:
        """d(point)/dq for the named points ``index``: (B, n, 3, nq)."""
        return self.jacobian_at(link, link.point_body[index], self.points[:, index])

    def jacobian_at(self, link: Linkage, bodies: NDArray[np.intp], points: Array) -> Array:
        """d(point)/dq for points (B, n, 3) fixed in ``bodies`` (n,): (B, n, 3, nq)."""
        n, count = points.shape[0], points.shape[1]
        eye = np.broadcast_to(np.eye(3), (n, count, 3, 3))
        wrench = np.concatenate((eye, cross(points[:, :, None, :], eye)), axis=-1)
        rows = self.jacobian_rows(
            link, np.repeat(bodies, 3)[:, None], wrench.reshape(n, count * 3, 1, 6)
        )
        return rows.reshape(n, count, 3, -1)

    def body_twists(self, link: Linkage, bodies: NDArray[np.intp]) -> Array:
        """Twists (B, n, 6, nq) of the given bodies, ``[v, w]`` at the origin."""
        return self.columns[:, None, :, :] * link.ancestors[bodies][None, :, None, :]


@dataclass(frozen=True)
class Linkage:
    """Topology (indices, names) plus the design-pose points (G, np, 3) in mm.

    Built by :func:`build_linkage`; ``with_points`` gives a candidate-design batch.
    """

    design: Design
    body_names: tuple[str, ...]
    body_kind: tuple[str, ...]
    mount: NDArray[np.intp]  # (nb,) FIXED / HINGE / SLIDE / FREE
    parent: NDArray[np.intp]  # (nb,) parent body (0 = chassis) for hinge/slide
    axis_points: NDArray[np.intp]  # (nb, 2) point indices of hinge axis / slide direction
    reference: NDArray[np.intp]  # (nb,) point index of a free body's reference point
    joint_index: NDArray[np.intp]  # (nb,) joint column of hinge/slide bodies, else -1
    free_index: NDArray[np.intp]  # (nb,) free-body slot, else -1
    order: tuple[int, ...]  # bodies, parents before children
    ancestors: NDArray[np.bool_]  # (nb, nq): coordinate k moves body b
    point_names: tuple[str, ...]
    point_body: NDArray[np.intp]  # (np,)
    points: Array  # (G, np, 3) design positions
    rod_names: tuple[str, ...]
    rod_ends: NDArray[np.intp]  # (nr, 2) point indices
    ball_names: tuple[str, ...]
    ball_ends: NDArray[np.intp]  # (nball, 2) point indices
    ball_components: tuple[int, ...]  # which of x, y, z each ball joint constrains
    corner_names: tuple[str, ...]
    wheel_centre: NDArray[np.intp]  # (nc,) point index
    corner_upright: NDArray[np.intp]  # (nc,) body index
    tyre_radius_mm: Array  # (nc,)
    spin_axis: Array  # (nc, 3) wheel spin axis at the design pose (unit)
    free_basis: Array  # (6, k) increments of a free body -> [dc, dtheta]
    n_joint: int
    n_free: int
    plane: str | None
    # memo of derived arrays, one type per key (each accessor returns its own type)
    _cache: dict[str, Any] = field(default_factory=dict, compare=False, repr=False)

    # -- sizes ----------------------------------------------------------------
    @property
    def n_bodies(self) -> int:
        return len(self.body_names)

    @property
    def n_coords(self) -> int:
        """Length of the coordinate vector."""
        return self.n_joint + self.n_free * self.free_basis.shape[1]

    @property
    def n_rows(self) -> int:
        """Constraint rows without drivers: rods then ball-joint components."""
        return len(self.rod_names) + len(self.ball_names) * len(self.ball_components)

    def body(self, name: str) -> int:
        """Index of the body called ``name``."""
        return self.body_names.index(name)

    def point(self, name: str) -> int:
        """Index of the point called ``name`` (``<body>.<pickup>``)."""
        return self.point_names.index(name)

    def row_labels(self) -> list[str]:
        """A human name for each constraint row (drivers excluded)."""
        labels = [f"rod '{n}'" for n in self.rod_names]
        axes = "xyz"
        for name in self.ball_names:
            labels.extend(f"ball joint '{name}' ({axes[c]})" for c in self.ball_components)
        return labels

    # -- geometry derived from the points ---------------------------------------
    def with_points(self, points: Array) -> Linkage:
        """The same topology with other design points (G, np, 3): candidate designs."""
        points = np.asarray(points, dtype=float)
        if points.ndim == 2:
            points = points[None]
        if points.shape[1:] != self.points.shape[1:]:
            raise ValueError(
                f"expected points of shape (G, {self.points.shape[1]}, 3), got {points.shape}"
            )
        return replace(self, points=points, _cache={})

    @property
    def float_ancestors(self) -> Array:
        """``ancestors`` as 0.0/1.0 (multiplying by floats is faster than by booleans)."""
        if "float_ancestors" not in self._cache:
            self._cache["float_ancestors"] = self.ancestors.astype(float)
        return self._cache["float_ancestors"]

    @property
    def axis_direction(self) -> Array:
        """(G, nb, 3) unit hinge axis / slide direction of each body (zeros otherwise)."""
        if "axis" not in self._cache:
            a = self.points[:, self.axis_points[:, 0]]
            b = self.points[:, self.axis_points[:, 1]]
            d = b - a
            n = np.linalg.norm(d, axis=-1, keepdims=True)
            moving = (self.mount == HINGE) | (self.mount == SLIDE)
            self._cache["axis"] = np.where(moving[None, :, None], d / np.where(n > 0, n, 1), 0.0)
        return self._cache["axis"]

    @property
    def axis_origin(self) -> Array:
        """(G, nb, 3) a point on each hinge axis (design position, mm)."""
        return self.points[:, self.axis_points[:, 0]]

    @property
    def rod_length(self) -> Array:
        """(G, nr) rod lengths at the design pose (mm)."""
        if "rod_length" not in self._cache:
            d = self.points[:, self.rod_ends[:, 0]] - self.points[:, self.rod_ends[:, 1]]
            self._cache["rod_length"] = np.linalg.norm(d, axis=-1)
        return self._cache["rod_length"]

    # -- poses --------------------------------------------------------------------
    def design_pose(self, count: int = 1) -> Pose:
        """``count`` copies of the design pose (the geometry batch G must be 1 or ``count``)."""
        refs = self.points[:, self.reference[self.free_index >= 0]]
        return Pose(
            np.zeros((count, self.n_joint)),
            np.broadcast_to(np.eye(3), (count, self.n_free, 3, 3)).copy(),
            np.broadcast_to(refs, (count, self.n_free, 3)).copy(),
        )

    def advance(self, pose: Pose, step: Array) -> Pose:
        """The pose moved by coordinate increments ``step`` (B, nq)."""
        joint = pose.joint + step[:, : self.n_joint]
        if self.n_free == 0:
            return Pose(joint, pose.rotation, pose.centre)
        k = self.free_basis.shape[1]
        inc = step[:, self.n_joint :].reshape(step.shape[0], self.n_free, k) @ self.free_basis.T
        centre = pose.centre + inc[..., 0:3]
        rotation = rotation_vector_matrix(inc[..., 3:6]) @ pose.rotation
        return Pose(joint, rotation, centre)

    def difference(self, pose: Pose, base: Pose) -> Array:
        """Coordinate increments (B, nq) that take ``base`` to ``pose`` (small moves)."""
        d_joint = pose.joint - base.joint
        if self.n_free == 0:
            return d_joint
        rel = pose.rotation @ np.swapaxes(base.rotation, -1, -2)
        rotvec = rotation_vector(rel)
        inc = np.concatenate((pose.centre - base.centre, rotvec), axis=-1)
        coords = inc @ self.free_basis  # basis columns are orthonormal selections
        return np.concatenate((d_joint, coords.reshape(pose.size, -1)), axis=1)

    # -- kinematics ---------------------------------------------------------------
    def _levels(self) -> list[dict[str, np.ndarray]]:
        """Hinged and sliding bodies grouped by depth in the tree, with axis data (G, n)."""
        if "levels" in self._cache:
            return self._cache["levels"]
        depth = np.zeros(self.n_bodies, dtype=int)
        for b in self.order[1:]:
            depth[b] = 1 if self.mount[b] == FREE else depth[self.parent[b]] + 1
        axis, origin = self.axis_direction, self.axis_origin
        levels: list[dict[str, np.ndarray]] = []
        for level in range(1, int(depth.max(initial=0)) + 1):
            entry: dict[str, np.ndarray] = {}
            for kind, mount in (("hinge", HINGE), ("slide", SLIDE)):
                bodies = np.flatnonzero((depth == level) & (self.mount == mount))
                entry[kind] = bodies
                entry[f"{kind}_parent"] = self.parent[bodies]
                entry[f"{kind}_joint"] = self.joint_index[bodies]
                u = axis[:, bodies]
                entry[f"{kind}_u"] = u
                if mount == HINGE:
                    a = origin[:, bodies]
                    entry["hinge_a"] = a
                    entry["hinge_k"] = skew(u)
                    entry["hinge_uu"] = u[..., :, None] * u[..., None, :]
                    entry["hinge_uxa"] = cross(u, a)
                    entry["hinge_uua"] = np.sum(u * a, axis=-1, keepdims=True) * u
            levels.append(entry)
        self._cache["levels"] = levels
        return levels

    def _points_by_body(self) -> list[tuple[int, NDArray[np.intp]]]:
        """(body, its point indices) for every body that holds points."""
        if "points_by_body" not in self._cache:
            self._cache["points_by_body"] = [
                (b, np.flatnonzero(self.point_body == b))
                for b in range(self.n_bodies)
                if np.any(self.point_body == b)
            ]
        return self._cache["points_by_body"]

    def _homogeneous_points(self) -> tuple[Array, NDArray[np.intp], NDArray[np.intp]]:
        """Points as homogeneous columns (G, 4, np) and the gather indices of their body."""
        if "homogeneous" not in self._cache:
            pts = self.points
            ones = np.ones((*pts.shape[:2], 1))
            cols = np.swapaxes(np.concatenate((pts, ones), axis=-1), 1, 2).copy()
            rows = 3 * self.point_body[:, None] + np.arange(3)[None, :]
            which = np.broadcast_to(np.arange(len(self.point_body))[:, None], rows.shape)
            self._cache["homogeneous"] = (cols, rows, np.ascontiguousarray(which))
        return self._cache["homogeneous"]

    def kinematics(self, pose: Pose, twists: bool = True) -> Kinematics:
        """Body poses, point positions and (unless ``twists`` is False, when only
        positions are needed) the coordinate twists for a batch of poses."""
        n = pose.size
        nb = self.n_bodies
        affine = np.empty((n, nb, 3, 4))
        rot = affine[..., 0:3]
        trans = affine[..., 3]
        rot[:, 0] = np.eye(3)
        trans[:, 0] = 0.0
        col = np.zeros((n, 6, self.n_coords) if twists else (n, 6, 0))
        if self.n_free:
            free = np.flatnonzero(self.mount == FREE)
            slots = self.free_index[free]
            r = pose.rotation[:, slots]
            c = pose.centre[:, slots]
            rot[:, free] = r
            refs = self.points[:, self.reference[free]]
            trans[:, free] = c - (r @ refs[..., None])[..., 0]
            nf = len(free)
        if self.n_free and twists:
            full = np.zeros((n, 6, nf, 6))
            idx = np.arange(nf)
            for i in range(3):
                full[:, i, idx, i] = 1.0
                full[:, 3 + i, idx, 3 + i] = 1.0
            # dtheta about axis e_i moves the origin-coincident point by c x e_i
            full[:, 0, :, 4], full[:, 0, :, 5] = -c[..., 2], c[..., 1]
            full[:, 1, :, 3], full[:, 1, :, 5] = c[..., 2], -c[..., 0]
            full[:, 2, :, 3], full[:, 2, :, 4] = -c[..., 1], c[..., 0]
            if self.free_basis.shape[1] != 6:
                full = full @ self.free_basis
            col[:, :, self.n_joint :] = full.reshape(n, 6, -1)
        eye = np.eye(3)
        for level, entry in enumerate(self._levels()):
            on_chassis = level == 0  # every parent is the chassis: R_P = I, t_P = 0
            bodies = entry["hinge"]
            if bodies.size:
                par = entry["hinge_parent"]
                jnt = entry["hinge_joint"]
                ang = pose.joint[:, jnt]
                c = np.cos(ang)[..., None]
                s = np.sin(ang)[..., None]
                turn = (
                    c[..., None] * eye
                    + s[..., None] * entry["hinge_k"]
                    + (1.0 - c[..., None]) * entry["hinge_uu"]
                )
                a = entry["hinge_a"]
                u = entry["hinge_u"]
                shift = a - (c * a + s * entry["hinge_uxa"] + (1.0 - c) * entry["hinge_uua"])
                if on_chassis:
                    rot[:, bodies] = turn
                    trans[:, bodies] = shift
                    if twists:
                        u_w = np.broadcast_to(u, (n, *u.shape[1:]))
                        a_w = np.broadcast_to(a, (n, *a.shape[1:]))
                else:
                    rp, tp = rot[:, par], trans[:, par]
                    rot[:, bodies] = rp @ turn
                    trans[:, bodies] = (rp @ shift[..., None])[..., 0] + tp
                    if twists:
                        u_w = (rp @ u[..., None])[..., 0]
                        a_w = (rp @ a[..., None])[..., 0] + tp
                if twists:
                    col[:, 0:3, jnt] = np.swapaxes(cross(a_w, u_w), 1, 2)
                    col[:, 3:6, jnt] = np.swapaxes(u_w, 1, 2)
            bodies = entry["slide"]
            if bodies.size:
                par = entry["slide_parent"]
                jnt = entry["slide_joint"]
                u = entry["slide_u"]
                if on_chassis:
                    rot[:, bodies] = eye
                    u_w = np.broadcast_to(u, (n, *u.shape[1:]))
                else:
                    rp = rot[:, par]
                    rot[:, bodies] = rp
                    u_w = (rp @ u[..., None])[..., 0]
                trans[:, bodies] = trans[:, par] + u_w * pose.joint[:, jnt, None]
                if twists:
                    col[:, 0:3, jnt] = np.swapaxes(u_w, 1, 2)
        if self.points.shape[0] > 1:  # a design batch: each body's points by its pose
            pts = np.empty((n, self.points.shape[1], 3))
            for b, own in self._points_by_body():
                pts[:, own] = (
                    np.einsum("npj,nij->npi", self.points[:, own], rot[:, b], optimize=True)
                    + trans[:, b, None]
                )
            return Kinematics(rot, trans, pts, col)
        cols, rows, which = self._homogeneous_points()
        every = affine.reshape(n, 3 * nb, 4) @ cols  # each body's transform on each point
        pts = every[:, rows, which]
        return Kinematics(rot, trans, pts, col)

    def _member_rows(self) -> tuple[NDArray[np.intp], NDArray[np.intp]]:
        """Point indices (m, 2) and their bodies (m, 2) of the rod and ball-joint rows."""
        if "member_rows" not in self._cache:
            nc = len(self.ball_components)
            ends = np.concatenate((self.rod_ends, np.repeat(self.ball_ends, nc, axis=0)))
            self._cache["member_rows"] = (ends, self.point_body[ends])
        return self._cache["member_rows"]

    def member_rows(self, kin: Kinematics) -> tuple[Array, Array, NDArray[np.intp]]:
        """Rod and ball-joint rows: residual (B, m) mm, gradient (B, m, 3) and ends (m, 2).

        The gradient is d(residual)/d(point) for the first end; the second end's is its
        negative.  A constraint force ``lambda`` on the row acts as ``lambda * gradient``
        on the first end's point and the opposite on the second's.
        """
        pts = kin.points
        n = pts.shape[0]
        nr = len(self.rod_names)
        ends, _ = self._member_rows()
        m = ends.shape[0]
        grad = np.empty((n, m, 3))
        res = np.empty((n, m))
        if nr:
            d = pts[:, self.rod_ends[:, 0]] - pts[:, self.rod_ends[:, 1]]
            length = self.rod_length
            res[:, :nr] = (np.einsum("bri,bri->br", d, d) - length**2) / (2.0 * length)
            grad[:, :nr] = d / length[..., None]
        if m > nr:
            comp = np.array(self.ball_components)
            gap = pts[:, self.ball_ends[:, 0]] - pts[:, self.ball_ends[:, 1]]
            res[:, nr:] = gap[:, :, comp].reshape(n, -1)
            grad[:, nr:] = np.tile(np.eye(3)[comp], (len(self.ball_names), 1))
        return res, grad, ends

    def residual(self, kin: Kinematics) -> Array:
        """Rod and ball-joint rows' residual (B, m) mm, without the Jacobian."""
        return self.member_rows(kin)[0]

    def residual_and_jacobian(self, kin: Kinematics) -> tuple[Array, Array]:
        """Rod and ball-joint rows: residual (B, m) mm and Jacobian (B, m, nq)."""
        pts = kin.points
        n = pts.shape[0]
        res, grad, ends = self.member_rows(kin)
        m = ends.shape[0]
        if m == 0:
            return res, np.zeros((n, 0, self.n_coords))
        _, bodies = self._member_rows()
        wrench = np.empty((n, m, 2, 6))
        wrench[:, :, 0, 0:3] = grad
        wrench[:, :, 1, 0:3] = -grad
        cross_into(pts[:, ends[:, 0]], grad, wrench[:, :, 0, 3:6])
        cross_into(grad, pts[:, ends[:, 1]], wrench[:, :, 1, 3:6])
        return res, kin.jacobian_rows(self, bodies, wrench)

    def characteristic_length(self) -> float:
        """A length (mm) that scales rotations against translations: the points' spread."""
        pts = self.points[0]
        return float(max(np.sqrt(((pts - pts.mean(0)) ** 2).sum(1).mean()), 1.0))
