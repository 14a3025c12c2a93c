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

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import CHASSIS, Design

__all__ = [
    "FIXED",
    "FREE",
    "HINGE",
    "SLIDE",
    "Kinematics",
    "Linkage",
    "Pose",
    "build_linkage",
    "cross",
    "rotation_about",
]

FIXED, HINGE, SLIDE, FREE = 0, 1, 2, 3
Array = NDArray[np.float64]


def cross(a: Array, b: Array) -> Array:
    """Cross product over the last axis, broadcasting (faster than np.cross here)."""
    ax, ay, az = a[..., 0], a[..., 1], a[..., 2]
    bx, by, bz = b[..., 0], b[..., 1], b[..., 2]
    return np.stack((ay * bz - az * by, az * bx - ax * bz, ax * by - ay * bx), axis=-1)


def _cross_into(a: Array, b: Array, out: Array) -> None:
    """``out[...] = a x b`` over the last axis, without temporaries of the stacked result."""
    np.multiply(a[..., 1], b[..., 2], out=out[..., 0])
    out[..., 0] -= a[..., 2] * b[..., 1]
    np.multiply(a[..., 2], b[..., 0], out=out[..., 1])
    out[..., 1] -= a[..., 0] * b[..., 2]
    np.multiply(a[..., 0], b[..., 1], out=out[..., 2])
    out[..., 2] -= a[..., 1] * b[..., 0]


def rotation_about(axis: Array, angle: Array) -> Array:
    """Rotation matrices (..., 3, 3) about unit ``axis`` (..., 3) by ``angle`` (...) rad."""
    axis = np.asarray(axis, dtype=float)
    angle = np.asarray(angle, dtype=float)
    s = np.sin(angle)[..., None, None]
    c = np.cos(angle)[..., None, None]
    x, y, z = axis[..., 0], axis[..., 1], axis[..., 2]
    zero = np.zeros_like(x)
    k = np.stack((np.stack((zero, -z, y), -1), np.stack((z, zero, -x), -1),
                  np.stack((-y, x, zero), -1)), -2)
    outer = axis[..., :, None] * axis[..., None, :]
    eye = np.eye(3)
    return c * eye + s * k + (1.0 - c) * outer


def rotation_vector_matrix(rotvec: Array) -> Array:
    """Rotation matrices (..., 3, 3) of rotation vectors (..., 3) (rad)."""
    angle = np.linalg.norm(rotvec, axis=-1)
    safe = np.where(angle > 1e-300, angle, 1.0)
    axis = rotvec / safe[..., None]
    axis = np.where((angle > 1e-300)[..., None], axis, np.array([1.0, 0.0, 0.0]))
    return rotation_about(axis, angle)


@dataclass(frozen=True)
class Pose:
    """A batch of linkage poses.

    ``joint`` (B, nj): hinge angles (rad) and slide displacements (mm);
    ``rotation`` (B, nf, 3, 3) and ``centre`` (B, nf, 3): free bodies' rotations and
    the current positions of their reference points (mm).
    """

    joint: Array
    rotation: Array
    centre: Array

    @property
    def size(self) -> int:
        """Number of poses in the batch."""
        return int(self.joint.shape[0])

    def take(self, index: NDArray[np.intp] | slice | int) -> Pose:
        """A sub-batch (index along the pose axis)."""
        if isinstance(index, int):
            index = slice(index, index + 1)
        return Pose(self.joint[index], self.rotation[index], self.centre[index])

    def repeat(self, count: int) -> Pose:
        """The (single) pose repeated ``count`` times."""
        return Pose(np.repeat(self.joint, count, axis=0), np.repeat(self.rotation, count, axis=0),
                    np.repeat(self.centre, count, axis=0))


def concatenate_poses(poses: list[Pose]) -> Pose:
    """Join batches along the pose axis."""
    return Pose(np.concatenate([p.joint for p in poses]),
                np.concatenate([p.rotation for p in poses]),
                np.concatenate([p.centre for p in poses]))


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
        per = (wrench.reshape(n, rows * sides, 6) @ self.columns).reshape(n, rows, sides, -1)
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
        rows = self.jacobian_rows(link, np.repeat(bodies, 3)[:, None],
                                  wrench.reshape(n, count * 3, 1, 6))
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
    _cache: dict[str, object] = field(default_factory=dict, compare=False, repr=False)

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
            raise ValueError(f"expected points of shape (G, {self.points.shape[1]}, 3), "
                             f"got {points.shape}")
        return replace(self, points=points, _cache={})

    @property
    def float_ancestors(self) -> Array:
        """``ancestors`` as 0.0/1.0 (multiplying by floats is faster than by booleans)."""
        if "float_ancestors" not in self._cache:
            self._cache["float_ancestors"] = self.ancestors.astype(float)
        return self._cache["float_ancestors"]  # type: ignore[return-value]

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
        return self._cache["axis"]  # type: ignore[return-value]

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
        return self._cache["rod_length"]  # type: ignore[return-value]

    # -- poses --------------------------------------------------------------------
    def design_pose(self, count: int = 1) -> Pose:
        """``count`` copies of the design pose (the geometry batch G must be 1 or ``count``)."""
        refs = self.points[:, self.reference[self.free_index >= 0]]
        return Pose(np.zeros((count, self.n_joint)),
                    np.broadcast_to(np.eye(3), (count, self.n_free, 3, 3)).copy(),
                    np.broadcast_to(refs, (count, self.n_free, 3)).copy())

    def advance(self, pose: Pose, step: Array) -> Pose:
        """The pose moved by coordinate increments ``step`` (B, nq)."""
        joint = pose.joint + step[:, : self.n_joint]
        if self.n_free == 0:
            return Pose(joint, pose.rotation, pose.centre)
        k = self.free_basis.shape[1]
        inc = step[:, self.n_joint:].reshape(step.shape[0], self.n_free, k) @ self.free_basis.T
        centre = pose.centre + inc[..., 0:3]
        rotation = rotation_vector_matrix(inc[..., 3:6]) @ pose.rotation
        return Pose(joint, rotation, centre)

    def difference(self, pose: Pose, base: Pose) -> Array:
        """Coordinate increments (B, nq) that take ``base`` to ``pose`` (small moves)."""
        d_joint = pose.joint - base.joint
        if self.n_free == 0:
            return d_joint
        rel = pose.rotation @ np.swapaxes(base.rotation, -1, -2)
        rotvec = _rotation_vector(rel)
        inc = np.concatenate((pose.centre - base.centre, rotvec), axis=-1)
        coords = inc @ self.free_basis  # basis columns are orthonormal selections
        return np.concatenate((d_joint, coords.reshape(pose.size, -1)), axis=1)

    # -- kinematics ---------------------------------------------------------------
    def _levels(self) -> list[dict[str, Array]]:
        """Hinged and sliding bodies grouped by depth in the tree, with axis data (G, n)."""
        if "levels" in self._cache:
            return self._cache["levels"]  # type: ignore[return-value]
        depth = np.zeros(self.n_bodies, dtype=int)
        for b in self.order[1:]:
            depth[b] = 1 if self.mount[b] == FREE else depth[self.parent[b]] + 1
        axis, origin = self.axis_direction, self.axis_origin
        levels: list[dict[str, Array]] = []
        for level in range(1, int(depth.max(initial=0)) + 1):
            entry: dict[str, Array] = {}
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
                    entry["hinge_k"] = _skew(u)
                    entry["hinge_uu"] = u[..., :, None] * u[..., None, :]
                    entry["hinge_uxa"] = cross(u, a)
                    entry["hinge_uua"] = np.sum(u * a, axis=-1, keepdims=True) * u
            levels.append(entry)
        self._cache["levels"] = levels
        return levels

    def _homogeneous_points(self) -> tuple[Array, NDArray[np.intp], NDArray[np.intp]]:
        """Points as homogeneous columns (G, 4, np) and the gather indices of their body."""
        if "homogeneous" not in self._cache:
            pts = self.points
            ones = np.ones((*pts.shape[:2], 1))
            cols = np.swapaxes(np.concatenate((pts, ones), axis=-1), 1, 2).copy()
            rows = 3 * self.point_body[:, None] + np.arange(3)[None, :]
            which = np.broadcast_to(np.arange(len(self.point_body))[:, None], rows.shape)
            self._cache["homogeneous"] = (cols, rows, np.ascontiguousarray(which))
        return self._cache["homogeneous"]  # type: ignore[return-value]

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
            col[:, :, self.n_joint:] = full.reshape(n, 6, -1)
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
                turn = (c[..., None] * eye + s[..., None] * entry["hinge_k"]
                        + (1.0 - c[..., None]) * entry["hinge_uu"])
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
        return self._cache["member_rows"]  # type: ignore[return-value]

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
        _cross_into(pts[:, ends[:, 0]], grad, wrench[:, :, 0, 3:6])
        _cross_into(grad, pts[:, ends[:, 1]], wrench[:, :, 1, 3:6])
        return res, kin.jacobian_rows(self, bodies, wrench)

    def characteristic_length(self) -> float:
        """A length (mm) that scales rotations against translations: the points' spread."""
        pts = self.points[0]
        return float(max(np.sqrt(((pts - pts.mean(0)) ** 2).sum(1).mean()), 1.0))


def _skew(v: Array) -> Array:
    """(..., 3, 3) matrices with ``skew(v) @ x = v x x``."""
    x, y, z = v[..., 0], v[..., 1], v[..., 2]
    zero = np.zeros_like(x)
    return np.stack((np.stack((zero, -z, y), -1), np.stack((z, zero, -x), -1),
                     np.stack((-y, x, zero), -1)), -2)


def _rotation_vector(r: Array) -> Array:
    """Rotation vectors (..., 3) of rotation matrices (angles below pi)."""
    cos = np.clip((np.trace(r, axis1=-2, axis2=-1) - 1.0) / 2.0, -1.0, 1.0)
    angle = np.arccos(cos)
    vec = np.stack((r[..., 2, 1] - r[..., 1, 2], r[..., 0, 2] - r[..., 2, 0],
                    r[..., 1, 0] - r[..., 0, 1]), axis=-1)
    sin = np.sin(angle)
    factor = np.where(sin > 1e-12, angle / (2.0 * np.where(sin > 1e-12, sin, 1.0)), 0.5)
    return vec * factor[..., None]


# ---------------------------------------------------------------------------------
# Building from a design
# ---------------------------------------------------------------------------------


def build_linkage(design: Design) -> Linkage:
    """Arrange a validated design as a :class:`Linkage`."""
    names: list[str] = [CHASSIS]
    kinds: list[str] = ["chassis"]
    mount: list[int] = [FIXED]
    parent: list[int] = [0]
    axis_pts: list[tuple[str, str]] = [("", "")]
    reference: list[str] = [""]
    point_names: list[str] = []
    point_pos: list[tuple[float, float, float]] = []
    point_owner: list[str] = []
    ball_names: list[str] = []
    ball_pairs: list[tuple[str, str]] = []
    rod_names: list[str] = []
    rod_pairs: list[tuple[str, str]] = []

    def add_point(body: str, name: str, pos: tuple[float, float, float]) -> str:
        full = f"{body}.{name}"
        point_names.append(full)
        point_pos.append(pos)
        point_owner.append(body)
        return full

    def add_body(name: str, kind: str, how: int, par: str, axis: tuple[str, str],
                 ref: str) -> None:
        names.append(name)
        kinds.append(kind)
        mount.append(how)
        parent.append(names.index(par))
        axis_pts.append(axis)
        reference.append(ref)

    for corner in design.corners:
        up = corner.upright
        wc = add_point(up, "wheel_centre", corner.wheel_centre_mm)
        if corner.suspension == "slider":
            x, y, z = corner.wheel_centre_mm
            top = add_point(CHASSIS, f"{corner.name}.slide_top", (x, y, z + 1.0))
            base = add_point(CHASSIS, f"{corner.name}.slide_base", (x, y, z))
            add_body(up, "upright", SLIDE, CHASSIS, (base, top), "")
            continue
        w = corner.wishbones
        assert w is not None
        for side in ("upper", "lower"):
            body = f"{corner.name}.{side}"
            front = add_point(CHASSIS, f"{corner.name}.{side}_front",
                              getattr(w, f"{side}_front_mm"))
            rear = add_point(CHASSIS, f"{corner.name}.{side}_rear",
                             getattr(w, f"{side}_rear_mm"))
            add_body(body, "wishbone", HINGE, CHASSIS, (rear, front), "")
        add_body(up, "upright", FREE, CHASSIS, ("", ""), wc)
        for side in ("upper", "lower"):
            outer = getattr(w, f"{side}_outer_mm")
            on_arm = add_point(f"{corner.name}.{side}", "outer_ball", outer)
            on_upright = add_point(up, f"{side}_ball", outer)
            ball_names.append(f"{corner.name} {side} ball joint")
            ball_pairs.append((on_arm, on_upright))
        if w.tie_rod_inner_mm is not None and w.tie_rod_outer_mm is not None:
            inner = add_point(CHASSIS, f"{corner.name}.tie_rod_inner", w.tie_rod_inner_mm)
            outer = add_point(up, "tie_rod_outer", w.tie_rod_outer_mm)
            rod_names.append(f"{corner.name}.tie_rod")
            rod_pairs.append((inner, outer))

    for rocker in design.rockers:
        a = add_point(rocker.name, "axis_a", rocker.axis_a_mm)
        b = add_point(rocker.name, "axis_b", rocker.axis_b_mm)
        # the axis lies in the parent; the axis points are stored on the rocker, which
        # is fine because they do not move relative to the parent
        add_body(rocker.name, "rocker", HINGE, rocker.parent, (a, b), "")

    for element in design.elements:
        ref = add_point(element.name, "centre_of_pressure", element.centre_of_pressure_mm)
        add_point(element.name, "cg", element.cg_mm)
        add_body(element.name, "element", FREE, CHASSIS, ("", ""), ref)

    for key, pickup in design.pickups.items():
        point_names.append(key)
        point_pos.append(pickup.position_mm)
        point_owner.append(pickup.body)

    for rod in design.rods:
        rod_names.append(rod.name)
        rod_pairs.append((rod.end_a, rod.end_b))

    index = {n: i for i, n in enumerate(point_names)}
    nb = len(names)
    body_index = {n: i for i, n in enumerate(names)}
    point_body = np.array([body_index[o] for o in point_owner], dtype=np.intp)
    mount_arr = np.array(mount, dtype=np.intp)

    # joint and free-body numbering
    joint_index = np.full(nb, -1, dtype=np.intp)
    free_index = np.full(nb, -1, dtype=np.intp)
    n_joint = n_free = 0
    for b in range(nb):
        if mount_arr[b] in (HINGE, SLIDE):
            joint_index[b] = n_joint
            n_joint += 1
        elif mount_arr[b] == FREE:
            free_index[b] = n_free
            n_free += 1

    basis = _free_basis(design.plane)
    k = basis.shape[1]
    nq = n_joint + n_free * k
    parent_arr = np.array(parent, dtype=np.intp)
    order = _topological_order(parent_arr, mount_arr)
    ancestors = np.zeros((nb, nq), dtype=bool)
    for b in order[1:]:
        if mount_arr[b] == FREE:
            f = free_index[b]
            ancestors[b, n_joint + f * k: n_joint + (f + 1) * k] = True
            continue
        ancestors[b] = ancestors[parent_arr[b]]
        ancestors[b, joint_index[b]] = True

    axis_idx = np.array([[index.get(a, 0), index.get(b, 0)] for a, b in axis_pts],
                        dtype=np.intp)
    ref_idx = np.array([index.get(r, 0) for r in reference], dtype=np.intp)

    components: tuple[int, ...] = (0, 1, 2)
    if design.plane == "front":
        components = (1, 2)
    elif design.plane == "side":
        components = (0, 2)

    spin = np.array([[0.0, 1.0, 0.0] for _ in design.corners]).reshape(-1, 3)
    return Linkage(
        design=design,
        body_names=tuple(names),
        body_kind=tuple(kinds),
        mount=mount_arr,
        parent=parent_arr,
        axis_points=axis_idx,
        reference=ref_idx,
        joint_index=joint_index,
        free_index=free_index,
        order=order,
        ancestors=ancestors,
        point_names=tuple(point_names),
        point_body=point_body,
        points=np.array(point_pos, dtype=float)[None],
        rod_names=tuple(rod_names),
        rod_ends=np.array([[index[a], index[b]] for a, b in rod_pairs],
                          dtype=np.intp).reshape(-1, 2),
        ball_names=tuple(ball_names),
        ball_ends=np.array([[index[a], index[b]] for a, b in ball_pairs],
                           dtype=np.intp).reshape(-1, 2),
        ball_components=components,
        corner_names=tuple(c.name for c in design.corners),
        wheel_centre=np.array([index[f"{c.upright}.wheel_centre"] for c in design.corners],
                              dtype=np.intp),
        corner_upright=np.array([body_index[c.upright] for c in design.corners],
                                dtype=np.intp),
        tyre_radius_mm=np.array([c.tyre_radius_mm for c in design.corners], dtype=float),
        spin_axis=spin,
        free_basis=basis,
        n_joint=n_joint,
        n_free=n_free,
        plane=design.plane,
    )


def _free_basis(plane: str | None) -> Array:
    """Columns selecting a free body's increments [dc, dtheta]: all six, or in-plane."""
    if plane is None:
        return np.eye(6)
    keep = (1, 2, 3) if plane == "front" else (0, 2, 4)
    return np.eye(6)[:, keep]


def _topological_order(parent: NDArray[np.intp], mount: NDArray[np.intp]) -> tuple[int, ...]:
    order: list[int] = [0]
    placed = {0}
    pending = list(range(1, len(parent)))
    while pending:
        progressed = False
        for b in list(pending):
            if mount[b] == FREE or parent[b] in placed:
                order.append(b)
                placed.add(b)
                pending.remove(b)
                progressed = True
        if not progressed:  # a cycle cannot come from a validated design
            raise ValueError("bodies' parents form a cycle")
    return tuple(order)
