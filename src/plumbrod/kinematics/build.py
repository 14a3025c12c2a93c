"""Arrange a validated design as a :class:`~plumbrod.kinematics.linkage.Linkage`:
bodies in parent order, coordinates, named points, rods and ball joints."""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import CHASSIS, Design, Rocker
from plumbrod.kinematics.frames import Array
from plumbrod.kinematics.linkage import FIXED, FREE, HINGE, SLIDE, Linkage

__all__ = ["build_linkage"]


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

    def add_body(name: str, kind: str, how: int, par: str, axis: tuple[str, str], ref: str) -> None:
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
            front = add_point(
                CHASSIS, f"{corner.name}.{side}_front", getattr(w, f"{side}_front_mm")
            )
            rear = add_point(CHASSIS, f"{corner.name}.{side}_rear", getattr(w, f"{side}_rear_mm"))
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

    element_names = {e.name for e in design.elements}

    def add_rocker(rocker: Rocker) -> None:
        a = add_point(rocker.name, "axis_a", rocker.axis_a_mm)
        b = add_point(rocker.name, "axis_b", rocker.axis_b_mm)
        # the axis lies in the parent; the axis points are stored on the rocker, which
        # is fine because they do not move relative to the parent
        add_body(rocker.name, "rocker", HINGE, rocker.parent, (a, b), "")

    for rocker in design.rockers:
        if rocker.parent not in element_names:
            add_rocker(rocker)

    for element in design.elements:
        ref = add_point(element.name, "centre_of_pressure", element.centre_of_pressure_mm)
        add_point(element.name, "cg", element.cg_mm)
        add_body(element.name, "element", FREE, CHASSIS, ("", ""), ref)

    # equalisers: rockers that pivot on an element come after their parent
    for rocker in design.rockers:
        if rocker.parent in element_names:
            add_rocker(rocker)

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
    for ib in range(nb):
        if mount_arr[ib] in (HINGE, SLIDE):
            joint_index[ib] = n_joint
            n_joint += 1
        elif mount_arr[ib] == FREE:
            free_index[ib] = n_free
            n_free += 1

    basis = _free_basis(design.plane)
    k = basis.shape[1]
    nq = n_joint + n_free * k
    parent_arr = np.array(parent, dtype=np.intp)
    order = _topological_order(parent_arr, mount_arr)
    ancestors = np.zeros((nb, nq), dtype=bool)
    for ib in order[1:]:
        if mount_arr[ib] == FREE:
            f = free_index[ib]
            ancestors[ib, n_joint + f * k : n_joint + (f + 1) * k] = True
            continue
        ancestors[ib] = ancestors[parent_arr[ib]]
        ancestors[ib, joint_index[ib]] = True

    axis_idx = np.array([[index.get(a, 0), index.get(b, 0)] for a, b in axis_pts], dtype=np.intp)
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
        rod_ends=np.array([[index[a], index[b]] for a, b in rod_pairs], dtype=np.intp).reshape(
            -1, 2
        ),
        ball_names=tuple(ball_names),
        ball_ends=np.array([[index[a], index[b]] for a, b in ball_pairs], dtype=np.intp).reshape(
            -1, 2
        ),
        ball_components=components,
        corner_names=tuple(c.name for c in design.corners),
        wheel_centre=np.array(
            [index[f"{c.upright}.wheel_centre"] for c in design.corners], dtype=np.intp
        ),
        corner_upright=np.array([body_index[c.upright] for c in design.corners], dtype=np.intp),
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
