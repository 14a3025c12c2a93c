"""Kinematic figures through the sweeps (DESIGN §5 items 1, 2, 3 and 6).

* Route ratio ``R = dz_pickup / ds``: vertical motion of the element pickup where a
  route arrives, relative to the chassis, per unit travel of the route's own wheel
  (other wheels held), from the solved tangent at every pose of the travel sweep.
* Ride height of each element (its centre of pressure above the ground) through the
  body sweeps, its sensitivity to heave (mm/mm), roll and pitch (mm/deg) with the
  wheels on the ground, and the same for the element bolted to the chassis.
* Line of action: each route rod's angle from the ground vertical.
* Transmission angles at rod ends on hinged bodies (:mod:`plumbrod.kinematics.transmission`).
* Attitude of each element relative to the ground (DESIGN §5a): the pitch of its
  fore-aft line (+ nose down) and the roll of its left-right line (+ left side up) from
  the design attitude, in every sweep, beside the same element bolted to the chassis.
  For a wing, whose air flows along the ground, the pitch change is the change of its
  angle of attack (+ = leading edge down: more downforce for a downforce wing).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.drives import TravelDrive, chassis_motion
from plumbrod.kinematics.linkage import Kinematics, Linkage
from plumbrod.kinematics.routes import RouteMap
from plumbrod.kinematics.sweeps import SweepResult
from plumbrod.kinematics.transmission import joint_labels, transmission_angles

__all__ = [
    "Attitude",
    "RideHeight",
    "SweepFigures",
    "element_attitudes",
    "ground_frame",
    "line_of_action",
    "ride_heights",
    "route_ratios",
    "sweep_figures",
]

Array = NDArray[np.float64]
_PARAMETER_INDEX = {"heave": 0, "roll": 1, "pitch": 2}
_PER_UNIT = {"heave": 1.0, "roll": np.pi / 180.0, "pitch": np.pi / 180.0}


@dataclass(frozen=True)
class RideHeight:
    """One element's centre-of-pressure height above the ground through a body sweep."""

    element: str
    height_mm: Array  # (B,)
    bolted_height_mm: Array  # (B,)
    sensitivity: dict[str, Array]
    """Per parameter of the sweep: mm per mm (heave) or mm per degree (roll, pitch)."""
    bolted_sensitivity: dict[str, Array]


@dataclass(frozen=True)
class Attitude:
    """One element's attitude relative to the ground through a sweep (deg, from the
    design attitude): pitch + nose down, roll + left side up; bolted beside it."""

    element: str
    pitch_deg: Array  # (B,)
    roll_deg: Array  # (B,)
    bolted_pitch_deg: Array  # (B,)
    bolted_roll_deg: Array  # (B,)


@dataclass(frozen=True)
class SweepFigures:
    """Every kinematic figure of one sweep."""

    sweep: str
    route_ratio: dict[str, Array]  # route name -> (B,), travel sweep only
    pickup_travel_mm: dict[str, Array]  # route name -> (B,) pickup z change (chassis)
    line_of_action_deg: dict[str, Array]  # rod -> (B,)
    transmission_labels: tuple[tuple[str, str], ...]
    transmission_deg: Array  # (B, n)
    rod_tilt_deg: Array  # (B, n)
    ride_height: dict[str, RideHeight]  # body sweeps only
    attitude: dict[str, Attitude] = field(default_factory=dict)


def ground_frame(result: SweepResult) -> tuple[Array, Array, Array, Array]:
    """The chassis pose in the ground frame at every pose, and its derivatives."""
    drive = result.spec.drive
    n = result.spec.size
    if isinstance(drive, TravelDrive):  # the spec's is_travel
        eye = np.broadcast_to(np.eye(3), (n, 3, 3)).copy()
        return eye, np.zeros((n, 3)), np.zeros((n, 3, 3, 3)), np.zeros((n, 3, 3))
    return chassis_motion(drive.parameters, np.array(drive.centre_mm))


def route_ratios(link: Linkage, routes: RouteMap, result: SweepResult) -> dict[str, Array]:
    """Route ratio (B,) of every route through a travel sweep."""
    out: dict[str, Array] = {}
    if not routes.routes:
        return out
    idx = np.array([link.point(r.pickup) for r in routes.routes])
    jz = result.solved.kin.point_jacobian(link, idx)[:, :, 2, :]  # (B, n, nq)
    for i, route in enumerate(routes.routes):
        corner = link.corner_names.index(route.corner)
        out[route.name] = np.einsum("bk,bk->b", jz[:, i, :], result.tangent[:, :, corner])
    return out


def line_of_action(link: Linkage, kin: Kinematics, up: Array, rods: list[str]) -> dict[str, Array]:
    """Angle (deg) of each named rod from the ground vertical ``up`` (B, 3)."""
    out: dict[str, Array] = {}
    for name in rods:
        a, b = link.rod_ends[link.rod_names.index(name)]
        d = kin.points[:, a] - kin.points[:, b]
        cos = np.abs(np.sum(d * up, axis=-1)) / np.linalg.norm(d, axis=-1)
        out[name] = np.degrees(np.arccos(np.clip(cos, 0.0, 1.0)))
    return out


def ride_heights(link: Linkage, result: SweepResult) -> dict[str, RideHeight]:
    """Centre-of-pressure height of each element through a body sweep."""
    rot, trans, d_rot, d_trans = ground_frame(result)
    up = rot[:, 2, :]
    kin = result.solved.kin
    params = [
        p
        for p in ("heave", "roll", "pitch")
        if np.any(result.spec.drive.parameters[:, _PARAMETER_INDEX[p]] != 0)
    ]
    out: dict[str, RideHeight] = {}
    for element in link.design.elements:
        idx = link.point(f"{element.name}.centre_of_pressure")
        p = kin.points[:, idx]
        p0 = link.points[0, idx]
        jp = kin.point_jacobian(link, np.array([idx]))[:, 0]  # (B, 3, nq)
        sens: dict[str, Array] = {}
        bolted: dict[str, Array] = {}
        for name in params:
            k = _PARAMETER_INDEX[name]
            d_up = d_rot[:, k, 2, :]
            moved = np.einsum("bik,bk->bi", jp, result.tangent[:, :, k])
            sens[name] = (
                np.sum(d_up * p, -1) + np.sum(up * moved, -1) + d_trans[:, k, 2]
            ) * _PER_UNIT[name]
            bolted[name] = (d_up @ p0 + d_trans[:, k, 2]) * _PER_UNIT[name]
        out[element.name] = RideHeight(
            element=element.name,
            height_mm=np.sum(up * p, -1) + trans[:, 2],
            bolted_height_mm=up @ p0 + trans[:, 2],
            sensitivity=sens,
            bolted_sensitivity=bolted,
        )
    return out


def _pitch_roll(r: Array) -> tuple[Array, Array]:
    """Pitch (+ nose down) of the turned x axis and roll (+ left up) of the turned y
    axis against the ground plane, deg, for rotations (B, 3, 3) in the ground frame."""
    pitch = np.degrees(np.arctan2(-r[:, 2, 0], np.hypot(r[:, 0, 0], r[:, 1, 0])))
    roll = np.degrees(np.arctan2(r[:, 2, 1], np.hypot(r[:, 0, 1], r[:, 1, 1])))
    return pitch, roll


def element_attitudes(link: Linkage, result: SweepResult) -> dict[str, Attitude]:
    """Pitch and roll of each element against the ground through a sweep, and bolted."""
    rot = ground_frame(result)[0]
    kin = result.solved.kin
    bolted = _pitch_roll(rot)
    out: dict[str, Attitude] = {}
    for element in link.design.elements:
        turned = rot @ kin.rotation[:, link.body(element.name)]
        pitch, roll = _pitch_roll(turned)
        out[element.name] = Attitude(element.name, pitch, roll, bolted[0], bolted[1])
    return out


def sweep_figures(link: Linkage, routes: RouteMap, result: SweepResult) -> SweepFigures:
    """All kinematic figures of one solved sweep."""
    kin = result.solved.kin
    rot = ground_frame(result)[0]
    up = rot[:, 2, :]
    rods: list[str] = []
    for route in routes.routes:
        for rod in (*route.receiving_rods, *route.delivering_rods):
            if rod not in rods:
                rods.append(rod)
    mu, tilt = transmission_angles(link, kin)
    ratios: dict[str, Array] = {}
    travel: dict[str, Array] = {}
    if result.spec.is_travel:
        ratios = route_ratios(link, routes, result)
        for route in routes.routes:
            i = link.point(route.pickup)
            travel[route.name] = kin.points[:, i, 2] - link.points[0, i, 2]
    heights = {} if result.spec.is_travel else ride_heights(link, result)
    return SweepFigures(
        sweep=result.name,
        route_ratio=ratios,
        pickup_travel_mm=travel,
        line_of_action_deg=line_of_action(link, kin, up, rods),
        transmission_labels=tuple(joint_labels(link)),
        transmission_deg=mu,
        rod_tilt_deg=tilt,
        ride_height=heights,
        attitude=element_attitudes(link, result),
    )
