"""Drivers: what sets the pose of the linkage, one equation per corner.

* :class:`TravelDrive` holds each wheel's travel relative to the chassis: the wheel
  centre's displacement along chassis z (mm, + bump).
* :class:`BodyDrive` moves the chassis relative to the ground (heave mm, roll and pitch
  rad) and keeps every wheel on the ground: the lowest point of each wheel (a disc of
  the tyre radius about the spin axis) stays at its design height.  The body pose is
  applied exactly: ``p_ground = Ry(pitch) @ Rx(roll) @ (p - c) + c + heave * z``, with
  ``c`` the motion centre; roll is right-handed about +x (+ lifts the left side), pitch
  right-handed about +y (+ nose down), ISO 8855.

Both give their rows' residual (B, nc) in mm, the Jacobian (B, nc, nq) and the
derivative of the residual with respect to their parameters (B, nc, npar), which the
solver uses for tangents and the figures for sensitivities.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.frames import cross
from plumbrod.kinematics.linkage import Kinematics, Linkage

__all__ = ["BodyDrive", "Drive", "TravelDrive", "chassis_motion"]

Array = NDArray[np.float64]


@dataclass(frozen=True)
class TravelDrive:
    """Wheel travel (B, nc) in mm relative to the chassis; + = bump."""

    parameters: Array

    @property
    def parameter_names(self) -> tuple[str, ...]:
        return tuple(f"travel[{i}]" for i in range(self.parameters.shape[1]))

    def with_parameters(self, parameters: Array) -> TravelDrive:
        return TravelDrive(np.asarray(parameters, dtype=float))

    def residual(self, link: Linkage, kin: Kinematics) -> Array:
        wc = link.wheel_centre
        return kin.points[:, wc, 2] - link.points[:, wc, 2] - self.parameters

    def rows(self, link: Linkage, kin: Kinematics) -> tuple[Array, Array]:
        wc = link.wheel_centre
        phi = self.residual(link, kin)
        n, nc = phi.shape
        wrench = np.zeros((n, nc, 1, 6))
        wrench[:, :, 0, 2] = 1.0
        wrench[:, :, 0, 3:6] = cross(kin.points[:, wc], np.array([0.0, 0.0, 1.0]))
        jac = kin.jacobian_rows(link, link.corner_upright[:, None], wrench)
        return phi, jac

    def parameter_jacobian(self, link: Linkage, kin: Kinematics) -> Array:
        n, nc = kin.points.shape[0], len(link.wheel_centre)
        return np.broadcast_to(-np.eye(nc), (n, nc, nc)).copy()


def chassis_motion(motion: Array, centre_mm: Array) -> tuple[Array, Array, Array, Array]:
    """Chassis pose in the ground frame and its derivatives.

    ``motion`` (B, 3): heave (mm), roll (rad), pitch (rad).  Returns ``rot`` (B, 3, 3),
    ``trans`` (B, 3) with ``p_ground = rot @ p + trans``, and the derivatives
    ``d_rot`` (B, 3, 3, 3) and ``d_trans`` (B, 3, 3) with respect to (heave, roll,
    pitch) on the first trailing axis.
    """
    motion = np.asarray(motion, dtype=float)
    c = np.asarray(centre_mm, dtype=float)
    n = motion.shape[0]
    heave, roll, pitch = motion[:, 0], motion[:, 1], motion[:, 2]
    cr, sr = np.cos(roll), np.sin(roll)
    cp, sp = np.cos(pitch), np.sin(pitch)
    zero, one = np.zeros(n), np.ones(n)
    rx = np.stack(
        (
            np.stack((one, zero, zero), -1),
            np.stack((zero, cr, -sr), -1),
            np.stack((zero, sr, cr), -1),
        ),
        -2,
    )
    ry = np.stack(
        (
            np.stack((cp, zero, sp), -1),
            np.stack((zero, one, zero), -1),
            np.stack((-sp, zero, cp), -1),
        ),
        -2,
    )
    kx = np.array([[0.0, 0.0, 0.0], [0.0, 0.0, -1.0], [0.0, 1.0, 0.0]])
    ky = np.array([[0.0, 0.0, 1.0], [0.0, 0.0, 0.0], [-1.0, 0.0, 0.0]])
    rot = ry @ rx
    trans = c - rot @ c
    trans[:, 2] += heave
    d_rot = np.zeros((n, 3, 3, 3))
    d_rot[:, 1] = rot @ kx
    d_rot[:, 2] = ky @ rot
    d_trans = -(d_rot @ c)
    d_trans[:, 0, 2] += 1.0
    return rot, trans, d_rot, d_trans


@dataclass(frozen=True)
class BodyDrive:
    """Chassis motion (B, 3) = heave (mm), roll (rad), pitch (rad), wheels on the ground."""

    parameters: Array
    centre_mm: tuple[float, float, float] = (0.0, 0.0, 0.0)

    @property
    def parameter_names(self) -> tuple[str, ...]:
        return ("heave", "roll", "pitch")

    def with_parameters(self, parameters: Array) -> BodyDrive:
        return BodyDrive(np.asarray(parameters, dtype=float), self.centre_mm)

    def _contact(self, link: Linkage, kin: Kinematics) -> tuple[Array, ...]:
        rot, trans, d_rot, d_trans = chassis_motion(self.parameters, np.array(self.centre_mm))
        up = rot[:, 2, :]  # ground's up direction in the chassis frame: rot^T z
        centre = kin.points[:, link.wheel_centre]  # (B, nc, 3)
        spin = (kin.rotation[:, link.corner_upright] @ link.spin_axis[..., None])[..., 0]
        na = np.einsum("bi,bci->bc", up, spin)
        sin = np.sqrt(np.maximum(1.0 - na**2, 1e-300))
        return rot, trans, d_rot, d_trans, up, centre, spin, na, sin

    def ground_height(self, link: Linkage) -> Array:
        """(G, nc) design height of each wheel's lowest point (mm)."""
        c0 = link.points[:, link.wheel_centre]
        a0z = link.spin_axis[:, 2]
        return c0[..., 2] - link.tyre_radius_mm * np.sqrt(1.0 - a0z**2)

    def contact_wrench(self, link: Linkage, kin: Kinematics) -> Array:
        """(B, nc, 6) each contact row's wrench ``[f, m]`` on its upright.

        It equals a unit force along the ground normal at the wheel's lowest point, so a
        row multiplier is the ground's normal force on the tyre.
        """
        _, _, _, _, up, centre, spin, na, sin = self._contact(link, kin)
        h = (link.tyre_radius_mm * na / sin)[..., None] * up[:, None, :]
        force = np.broadcast_to(up[:, None, :], centre.shape)
        return np.concatenate((force, cross(centre, force) + cross(spin, h)), axis=-1)

    def contact_levers(self, link: Linkage, kin: Kinematics) -> Array:
        """(B, nc, 3) d(row)/d(ground up direction): the wheel centre shifted for camber."""
        _, _, _, _, _, centre, spin, na, sin = self._contact(link, kin)
        return centre + (link.tyre_radius_mm * na / sin)[..., None] * spin

    def residual(self, link: Linkage, kin: Kinematics) -> Array:
        _, trans, _, _, up, centre, _, _, sin = self._contact(link, kin)
        return (
            np.einsum("bi,bci->bc", up, centre)
            - link.tyre_radius_mm * sin
            + trans[:, 2, None]
            - self.ground_height(link)
        )

    def rows(self, link: Linkage, kin: Kinematics) -> tuple[Array, Array]:
        phi = self.residual(link, kin)
        wrench = self.contact_wrench(link, kin)
        jac = kin.jacobian_rows(link, link.corner_upright[:, None], wrench[:, :, None, :])
        return phi, jac

    def parameter_jacobian(self, link: Linkage, kin: Kinematics) -> Array:
        _, _, d_rot, d_trans, _, _, _, _, _ = self._contact(link, kin)
        d_up = d_rot[:, :, 2, :]  # (B, 3 params, 3)
        lever = self.contact_levers(link, kin)
        return np.einsum("bki,bci->bck", d_up, lever) + d_trans[:, None, :, 2]


Drive = TravelDrive | BodyDrive
