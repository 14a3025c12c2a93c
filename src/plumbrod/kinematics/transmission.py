"""Transmission angles at rod ends on hinged bodies (rockers and wishbones).

At a rod end on a body that turns about an axis, the arm is the perpendicular from the
axis to the pickup, and the transmission angle ``mu`` is the angle between the arm and
the rod, both seen in the body's plane of rotation (the classic four-bar definition,
extended to 3D by projecting the rod onto that plane).  ``mu = 90°`` transmits best;
``mu`` near 0° or 180° is lock-up: the rod then lies in the plane of the axis and the
arm and cannot turn the body.  The rod's tilt out of the plane of rotation is reported
beside it.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.frames import cross
from plumbrod.kinematics.linkage import HINGE, Kinematics, Linkage

__all__ = ["hinged_rod_ends", "joint_labels", "transmission_angles"]

Array = NDArray[np.float64]


def hinged_rod_ends(link: Linkage) -> tuple[NDArray[np.intp], NDArray[np.intp], NDArray[np.intp]]:
    """Rod ends on hinged bodies: (rod index, pickup point, other-end point), each (n,)."""
    key = "hinged_rod_ends"
    if key not in link._cache:
        rods, here, there = [], [], []
        for r, (a, b) in enumerate(link.rod_ends):
            for p, o in ((a, b), (b, a)):
                if link.mount[link.point_body[p]] == HINGE:
                    rods.append(r)
                    here.append(p)
                    there.append(o)
        link._cache[key] = (
            np.array(rods, dtype=np.intp),
            np.array(here, dtype=np.intp),
            np.array(there, dtype=np.intp),
        )
    return link._cache[key]


def joint_labels(link: Linkage) -> list[tuple[str, str]]:
    """(rod name, body name) of each rod end on a hinged body."""
    rods, here, _ = hinged_rod_ends(link)
    return [
        (link.rod_names[r], link.body_names[link.point_body[p]])
        for r, p in zip(rods, here, strict=True)
    ]


def _geometry(link: Linkage, kin: Kinematics) -> tuple[Array, Array, Array, Array]:
    """Unit axis, arm, projected rod and full rod vectors at each hinged rod end."""
    _, here, there = hinged_rod_ends(link)
    body = link.point_body[here]
    rot = kin.rotation[:, body]
    axis = (rot @ link.axis_direction[:, body, :, None])[..., 0]
    origin = (rot @ link.axis_origin[:, body, :, None])[..., 0] + kin.translation[:, body]
    pick = kin.points[:, here]
    rel = pick - origin
    arm = rel - np.sum(rel * axis, axis=-1, keepdims=True) * axis
    rod = kin.points[:, there] - pick
    rod_in_plane = rod - np.sum(rod * axis, axis=-1, keepdims=True) * axis
    return axis, arm, rod_in_plane, rod


def transmission_angles(link: Linkage, kin: Kinematics) -> tuple[Array, Array]:
    """(B, n) transmission angle (deg, 0–180) and rod tilt out of the plane (deg)."""
    rods, _, _ = hinged_rod_ends(link)
    n = kin.points.shape[0]
    if rods.size == 0:
        return np.zeros((n, 0)), np.zeros((n, 0))
    axis, arm, rod_p, rod = _geometry(link, kin)
    cos = np.sum(arm * rod_p, axis=-1)
    sine = np.linalg.norm(cross(arm, rod_p), axis=-1)
    mu = np.degrees(np.arctan2(sine, cos))
    tilt = np.degrees(
        np.arcsin(
            np.clip(np.abs(np.sum(rod * axis, axis=-1)) / np.linalg.norm(rod, axis=-1), 0.0, 1.0)
        )
    )
    return mu, tilt
