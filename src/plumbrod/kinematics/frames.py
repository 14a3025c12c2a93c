"""Rigid-body frames: rotations, rotation vectors and batched body poses.

Angles in radians; positions in mm in the chassis frame.  Every array leads with the
pose batch axis.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = [
    "Array",
    "Pose",
    "concatenate_poses",
    "cross",
    "cross_into",
    "rotation_about",
    "rotation_vector",
    "rotation_vector_matrix",
    "skew",
]

Array = NDArray[np.float64]


def cross(a: Array, b: Array) -> Array:
    """Cross product over the last axis, broadcasting (faster than np.cross here)."""
    ax, ay, az = a[..., 0], a[..., 1], a[..., 2]
    bx, by, bz = b[..., 0], b[..., 1], b[..., 2]
    return np.stack((ay * bz - az * by, az * bx - ax * bz, ax * by - ay * bx), axis=-1)


def cross_into(a: Array, b: Array, out: Array) -> None:
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
    k = np.stack(
        (np.stack((zero, -z, y), -1), np.stack((z, zero, -x), -1), np.stack((-y, x, zero), -1)), -2
    )
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
        return Pose(
            np.repeat(self.joint, count, axis=0),
            np.repeat(self.rotation, count, axis=0),
            np.repeat(self.centre, count, axis=0),
        )


def concatenate_poses(poses: list[Pose]) -> Pose:
    """Join batches along the pose axis."""
    return Pose(
        np.concatenate([p.joint for p in poses]),
        np.concatenate([p.rotation for p in poses]),
        np.concatenate([p.centre for p in poses]),
    )


def skew(v: Array) -> Array:
    """(..., 3, 3) matrices with ``skew(v) @ x = v x x``."""
    x, y, z = v[..., 0], v[..., 1], v[..., 2]
    zero = np.zeros_like(x)
    return np.stack(
        (np.stack((zero, -z, y), -1), np.stack((z, zero, -x), -1), np.stack((-y, x, zero), -1)), -2
    )


def rotation_vector(r: Array) -> Array:
    """Rotation vectors (..., 3) of rotation matrices (angles below pi)."""
    cos = np.clip((np.trace(r, axis1=-2, axis2=-1) - 1.0) / 2.0, -1.0, 1.0)
    angle = np.arccos(cos)
    vec = np.stack(
        (r[..., 2, 1] - r[..., 1, 2], r[..., 0, 2] - r[..., 2, 0], r[..., 1, 0] - r[..., 0, 1]),
        axis=-1,
    )
    sin = np.sin(angle)
    factor = np.where(sin > 1e-12, angle / (2.0 * np.where(sin > 1e-12, sin, 1.0)), 0.5)
    return vec * factor[..., None]
