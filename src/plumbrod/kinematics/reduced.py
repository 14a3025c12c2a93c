"""The designs × poses batch with the suspension solved once: block-triangular solving.

When candidate designs differ only in the route (rocker pivots, pickups on rockers,
elements, wishbones or uprights), the suspension's own equations (wishbone ball joints,
tie rods, the drivers) do not involve any moved point: the constraint Jacobian is block
lower-triangular, corners first.  So the corners are solved once per pose, for every
candidate at once, and each candidate solves only the route block: the rockers' angles
and the elements' poses, from the rods that have an end on them.

The route block is a small linkage of its own (built with
:func:`~plumbrod.kinematics.build.build_linkage` from a synthetic design) in which every
corner body a route rod or rocker hangs from is a "carrier": a free body whose pose is
prescribed per pose from the corner solution (its reference point is the origin, so its
coordinates are the body's translation and rotation) and whose coordinates never move in
the Newton step.  The tangent of the route block follows from the carriers' velocities:
``J_rr dq_r = -J_rc dq_c``.  The result is reassembled into the full linkage's arrays, so
every figure and the statics read it as they read a solved sweep.

:func:`reduce_linkage` returns None when the split does not apply (a moved point on a
suspension row, a ball joint in the route, a rocker pivoted on a corner body, a
non-square route block); callers then use
:func:`plumbrod.kinematics.design_grid.solve_grid`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import Design, Element, Pickup, Rocker, Rod
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.design_grid import GridSolution, _identity_like
from plumbrod.kinematics.drives import Drive
from plumbrod.kinematics.frames import Array, Pose, cross
from plumbrod.kinematics.linkage import FREE, Kinematics, Linkage
from plumbrod.kinematics.route_block import BlockRows, RouteBlock, newton, route_block
from plumbrod.kinematics.solver import _branch_sign, _solve_linear, solve_poses, tangent

__all__ = ["Reduction", "reduce_linkage", "solve_grid_reduced"]

TOL_MM = 1e-10
MAX_ITERATIONS = 25


@dataclass(frozen=True)
class Reduction:
    """The route block of a linkage and how its pieces map onto the full linkage."""

    full: Linkage
    corners: Linkage
    """The suspension alone (chassis and corner bodies)."""
    route: Linkage
    """The route block, carriers first among its free bodies."""
    route_points: NDArray[np.intp]  # route point -> full point (-1: a carrier's origin)
    carrier_bodies: NDArray[np.intp]  # full body index of each carrier
    carrier_in_corners: NDArray[np.intp]  # the same bodies in the corner linkage
    unknown: NDArray[np.intp]  # route coordinate columns solved for
    unknown_full: NDArray[np.intp]  # the same coordinates' columns in the full linkage
    carrier_cols: NDArray[np.intp]  # route columns of the carriers' coordinates
    body_full: NDArray[np.intp]  # route body -> full body
    corner_body_full: NDArray[np.intp]  # corner-linkage body -> full body
    corner_point_full: NDArray[np.intp]  # corner-linkage point -> full point
    corner_cols_full: NDArray[np.intp]  # corner-linkage coordinate -> full column
    block: RouteBlock | None = None
    """The route block's closed-form rows, when its shape allows them."""
    cache: dict[bytes, _Carriers] = field(default_factory=dict, compare=False, repr=False)
    """The suspension's solution per drive: the same for every candidate."""


def reduce_linkage(link: Linkage, moved: NDArray[np.intp]) -> Reduction | None:
    """The block split of ``link`` for candidates that move the points ``moved``."""
    design = link.design
    kinds = link.body_kind
    shared = {i for i, k in enumerate(kinds) if k in ("upright", "wishbone")}
    body_name = link.body_names
    moved_set = {int(i) for i in moved}
    # suspension rows: ball joints and rods with both ends on the chassis or the corners
    route_rods = []
    for r, (a, b) in enumerate(link.rod_ends):
        ba, bb = int(link.point_body[a]), int(link.point_body[b])
        if (ba in shared or ba == 0) and (bb in shared or bb == 0):
            if {int(a), int(b)} & moved_set:
                return None
            continue
        route_rods.append(r)
    for a, b in link.ball_ends:
        if {int(link.point_body[a]), int(link.point_body[b])} - shared - {0}:
            return None
        if {int(a), int(b)} & moved_set:
            return None
    for c in link.wheel_centre:
        if int(c) in moved_set:
            return None
    for b in shared:
        if {int(p) for p in link.axis_points[b]} & moved_set and kinds[b] == "wishbone":
            return None
    route_bodies = [i for i in range(1, link.n_bodies) if i not in shared]
    if not route_bodies:
        return None
    # carriers: corner bodies holding a route rod's end or a route rocker's axis
    carriers: list[int] = []
    for r in route_rods:
        for p in link.rod_ends[r]:
            b = int(link.point_body[p])
            if b in shared and b not in carriers:
                carriers.append(b)
    for b in route_bodies:
        par = int(link.parent[b])
        if kinds[b] == "rocker" and par in shared and par not in carriers:
            carriers.append(par)
    carriers.sort()
    point_index = {n: i for i, n in enumerate(link.point_names)}
    origin = (0.0, 0.0, 0.0)
    pickups: dict[str, Pickup] = {}
    for r in route_rods:
        for p in link.rod_ends[r]:
            name = link.point_names[p]
            owner = body_name[int(link.point_body[p])]
            pickups[name] = Pickup(owner, name.rsplit(".", 1)[-1], origin)
    for b in route_bodies:  # every point of a route body, for the figures and loads
        for p in np.flatnonzero(link.point_body == b):
            name = link.point_names[p]
            if name.endswith((".axis_a", ".axis_b", ".centre_of_pressure", ".cg")):
                continue
            pickups.setdefault(name, Pickup(body_name[b], name.rsplit(".", 1)[-1], origin))
    rockers = tuple(
        Rocker(body_name[b], body_name[int(link.parent[b])], origin, origin)
        for b in route_bodies
        if kinds[b] == "rocker"
    )
    carrier_elements = tuple(Element(body_name[b], "other", 0.0, origin, origin) for b in carriers)
    elements = tuple(
        Element(body_name[b], "other", 0.0, origin, origin)
        for b in route_bodies
        if kinds[b] == "element"
    )
    rods = tuple(
        Rod(
            link.rod_names[r],
            link.point_names[link.rod_ends[r, 0]],
            link.point_names[link.rod_ends[r, 1]],
            "",
            1.0,
            None,
        )
        for r in route_rods
    )
    sub_design = Design(
        name=design.name,
        source=design.source,
        plane=design.plane,
        corners=(),
        rockers=rockers,
        rods=rods,
        elements=carrier_elements + elements,
        pickups=pickups,
    )
    if any(kinds[b] == "rocker" and int(link.parent[b]) != 0 for b in route_bodies):
        return None  # a rocker hung from a corner body or an element (an equaliser)
    try:
        route = build_linkage(sub_design)
    except ValueError:
        return None
    if route.n_rows != route.n_coords - len(carriers) * route.free_basis.shape[1]:
        return None
    # the route linkage's body order: chassis, rockers, carriers, elements
    body_full = np.array([body_name.index(n) for n in route.body_names], dtype=np.intp)
    route_points = np.array(
        [
            -1
            if (
                route.point_body[i]
                and body_full[route.point_body[i]] in carriers
                and (n.endswith(".centre_of_pressure") or n.endswith(".cg"))
            )
            else point_index[n]
            for i, n in enumerate(route.point_names)
        ],
        dtype=np.intp,
    )
    k = route.free_basis.shape[1]
    carrier_cols: list[int] = []
    unknown: list[int] = []
    unknown_full: list[int] = []
    for rb in range(1, route.n_bodies):
        fb = int(body_full[rb])
        if fb in carriers:
            f = int(route.free_index[rb])
            carrier_cols.extend(range(route.n_joint + f * k, route.n_joint + (f + 1) * k))
            continue
        if route.mount[rb] == FREE:
            f, ff = int(route.free_index[rb]), int(link.free_index[fb])
            unknown.extend(range(route.n_joint + f * k, route.n_joint + (f + 1) * k))
            unknown_full.extend(range(link.n_joint + ff * k, link.n_joint + (ff + 1) * k))
        else:
            unknown.append(int(route.joint_index[rb]))
            unknown_full.append(int(link.joint_index[fb]))
    if len(unknown) != route.n_rows:
        return None
    corner_design = Design(
        name=design.name,
        source=design.source,
        plane=design.plane,
        corners=design.corners,
        rockers=(),
        rods=(),
        elements=(),
        pickups={},
    )
    corners = build_linkage(corner_design)
    corner_body_full = np.array([body_name.index(n) for n in corners.body_names], dtype=np.intp)
    corner_point_full = np.array([point_index[n] for n in corners.point_names], dtype=np.intp)
    corner_cols = np.zeros(corners.n_coords, dtype=np.intp)
    for cb in range(1, corners.n_bodies):
        fb = int(corner_body_full[cb])
        if corners.mount[cb] == FREE:
            f, ff = int(corners.free_index[cb]), int(link.free_index[fb])
            corner_cols[corners.n_joint + f * k : corners.n_joint + (f + 1) * k] = range(
                link.n_joint + ff * k, link.n_joint + (ff + 1) * k
            )
        else:
            corner_cols[int(corners.joint_index[cb])] = int(link.joint_index[fb])
    carrier_in_corners = np.array(
        [list(corners.body_names).index(body_name[b]) for b in carriers], dtype=np.intp
    )
    return Reduction(
        full=link,
        corners=corners,
        route=route,
        route_points=route_points,
        carrier_bodies=np.array(carriers, dtype=np.intp),
        carrier_in_corners=carrier_in_corners,
        unknown=np.array(unknown, dtype=np.intp),
        unknown_full=np.array(unknown_full, dtype=np.intp),
        carrier_cols=np.array(carrier_cols, dtype=np.intp),
        body_full=body_full,
        corner_body_full=corner_body_full,
        corner_point_full=corner_point_full,
        corner_cols_full=corner_cols,
        block=route_block(
            route,
            len(carriers),
            np.array(unknown, dtype=np.intp),
            np.array(carrier_cols, dtype=np.intp),
        ),
    )


@dataclass(frozen=True)
class _Carriers:
    """The carriers' prescribed poses and coordinate rates at each pose (P of them)."""

    rotation: Array  # (P, nc, 3, 3)
    centre: Array  # (P, nc, 3)
    rate: Array  # (P, nc * k, npar) carrier coordinates per unit parameter
    corner_kin: Kinematics
    corner_tangent: Array  # (P, nq_corners, npar)
    corner_pose: Pose


def _carriers(red: Reduction, drive: Drive) -> _Carriers:
    key = repr((type(drive).__name__, getattr(drive, "centre_mm", None))).encode()
    key += np.asarray(drive.parameters, dtype=float).tobytes()
    if key not in red.cache:
        red.cache[key] = _solve_carriers(red, drive)
    return red.cache[key]


def _solve_carriers(red: Reduction, drive: Drive) -> _Carriers:
    corners = red.corners
    solved = solve_poses(corners, drive, sweep_name="suspension")
    kin = solved.kin
    tan = tangent(corners, drive, kin, solved.jacobian)
    cb = red.carrier_in_corners
    rot = kin.rotation[:, cb]
    centre = kin.translation[:, cb]
    twists = kin.body_twists(corners, cb) @ tan[:, None]  # (P, nc, 6, npar) at the origin
    v, w = twists[:, :, 0:3], twists[:, :, 3:6]
    dc = v + np.swapaxes(cross(np.swapaxes(w, 2, 3), centre[:, :, None, :]), 2, 3)
    inc = np.concatenate((dc, w), axis=2)  # (P, nc, 6, npar): [dc, dtheta]
    basis = red.route.free_basis  # (6, k)
    rate = np.einsum("ij,pciz->pcjz", basis, inc)
    p = rot.shape[0]
    return _Carriers(rot, centre, rate.reshape(p, -1, inc.shape[-1]), kin, tan, solved.pose)


def solve_grid_reduced(red: Reduction, points: Array, drive: Drive) -> GridSolution:
    """Like :func:`~plumbrod.kinematics.design_grid.solve_grid`, the suspension solved once."""
    route = red.route
    points = np.asarray(points, dtype=float)
    g = points.shape[0]
    params = np.asarray(drive.parameters, dtype=float)
    p = params.shape[0]
    npar = params.shape[1]
    zero_drive = drive.with_parameters(np.zeros((1, npar)))
    carriers = _carriers(red, drive)
    at_zero = _carriers(red, zero_drive)

    sub_pts = np.where(
        (red.route_points >= 0)[None, :, None], points[:, np.maximum(red.route_points, 0)], 0.0
    )
    if red.block is not None:
        return _solve_block(red, red.block, points, sub_pts, params, carriers, at_zero)
    nc = red.carrier_bodies.size
    n_el = route.n_free - nc

    def pose_of(link: Linkage, rows: int, car: _Carriers, tile: int) -> Pose:
        refs = link.points[:, route.reference[route.free_index >= 0]][:, nc:]
        rot = np.empty((rows, route.n_free, 3, 3))
        cen = np.empty((rows, route.n_free, 3))
        rot[:, :nc] = np.tile(car.rotation, (tile, 1, 1, 1))
        cen[:, :nc] = np.tile(car.centre, (tile, 1, 1))
        rot[:, nc:] = np.eye(3)
        cen[:, nc:] = np.broadcast_to(refs, (rows, n_el, 3))
        return Pose(np.zeros((rows, route.n_joint)), rot, cen)

    # design pose of every candidate: rows, branch sign and tangent, once per design
    designs = route.with_points(sub_pts)
    base = pose_of(designs, g, at_zero, g)
    kin0 = designs.kinematics(base)
    _, jac0 = designs.residual_and_jacobian(kin0)
    j_rr0 = jac0[:, :, red.unknown]
    j_rc0 = jac0[:, :, red.carrier_cols]
    ok = np.all(np.isfinite(j_rr0), axis=(1, 2))
    rows_all = np.arange(j_rr0.shape[1])
    sign0 = _branch_sign(np.where(ok[:, None, None], j_rr0, 0.0), rows_all)
    ok &= sign0 != 0
    safe0 = np.where(ok[:, None, None], j_rr0, _identity_like(j_rr0))
    rate0 = np.broadcast_to(at_zero.rate, (g, *at_zero.rate.shape[1:]))
    tan0 = -np.linalg.solve(safe0, j_rc0 @ rate0)  # (G, nu, npar)

    flat = route.with_points(np.repeat(sub_pts, p, axis=0))
    n = g * p
    pose = pose_of(flat, n, carriers, g)
    step = np.zeros((n, route.n_coords))
    step[:, red.unknown] = np.einsum("gup,kp->gku", tan0, params).reshape(n, -1)
    pose = _advance_unknown(flat, pose, step, nc)
    kin = flat.kinematics(pose)
    res, jac = flat.residual_and_jacobian(kin)
    norm = np.abs(res).max(axis=1)
    for _ in range(MAX_ITERATIONS):
        active = norm > TOL_MM
        if not active.any():
            break
        step = np.zeros((n, route.n_coords))
        sub = _solve_linear(jac[active][:, :, red.unknown], -res[active])
        full_step = np.zeros((int(active.sum()), route.n_coords))
        full_step[:, red.unknown] = sub
        step[active] = full_step
        trial = _advance_unknown(flat, pose, step, nc)
        t_kin = flat.kinematics(trial)
        t_res, t_jac = flat.residual_and_jacobian(t_kin)
        t_norm = np.abs(t_res).max(axis=1)
        better = ~active | (t_norm < norm) | (t_norm <= TOL_MM)
        if not better[active].any():
            break
        if better.all():
            pose, kin, res, jac, norm = trial, t_kin, t_res, t_jac, t_norm
            continue
        pose = _where_pose(better, trial, pose)
        kin = _where_kin(better, t_kin, kin)
        res = np.where(better[:, None], t_res, res)
        jac = np.where(better[:, None, None], t_jac, jac)
        norm = np.where(better, t_norm, norm)
    j_rr = jac[:, :, red.unknown]
    good = (norm <= 1e-8) & np.all(np.isfinite(res), axis=1)
    good &= _branch_sign(np.where(good[:, None, None], j_rr, 0.0), rows_all) == np.repeat(sign0, p)
    assembled = good.reshape(g, p).all(axis=1) & ok
    safe = np.where(np.repeat(assembled, p)[:, None, None], j_rr, _identity_like(j_rr))
    rate = np.tile(carriers.rate, (g, 1, 1))
    t_route = np.asarray(-np.linalg.solve(safe, jac[:, :, red.carrier_cols] @ rate), dtype=float)
    return _assemble(red, points, carriers, kin, pose, t_route, assembled, g, p)


def _solve_block(
    red: Reduction,
    block: RouteBlock,
    points: Array,
    sub_pts: Array,
    params: Array,
    carriers: _Carriers,
    at_zero: _Carriers,
) -> GridSolution:
    """:func:`solve_grid_reduced` on the closed-form route block (same steps, less work)."""
    g, p = points.shape[0], params.shape[0]
    n = g * p
    # design pose of every candidate: branch sign and tangent, once per design
    rows0 = BlockRows(block, sub_pts, at_zero.rotation, at_zero.centre)
    _, j_rr0, j_rc0, _ = rows0.evaluate(rows0.design_state(), carriers=True)
    assert j_rc0 is not None
    ok = np.all(np.isfinite(j_rr0), axis=(1, 2)) & np.all(np.isfinite(j_rc0), axis=(1, 2))
    sign0 = np.linalg.slogdet(np.where(ok[:, None, None], j_rr0, 0.0))[0]
    ok &= sign0 != 0
    safe0 = np.where(ok[:, None, None], j_rr0, _identity_like(j_rr0))
    rate0 = np.broadcast_to(at_zero.rate, (g, *at_zero.rate.shape[1:]))
    tan0 = -np.linalg.solve(safe0, np.where(ok[:, None, None], j_rc0, 0.0) @ rate0)

    rows = BlockRows(block, sub_pts, carriers.rotation, carriers.centre)
    guess = np.einsum("gup,kp->gku", tan0, params).reshape(n, -1)
    state = rows.advance(rows.design_state(), guess.T)
    state, res, jac, jac_c, norm = newton(rows, state, TOL_MM, MAX_ITERATIONS)
    good = (norm <= 1e-8) & np.all(np.isfinite(res), axis=1)
    sign = np.linalg.slogdet(np.where(good[:, None, None], jac, 0.0))[0]
    good &= sign == np.repeat(sign0, p)
    assembled = good.reshape(g, p).all(axis=1) & ok
    every = np.repeat(assembled, p)
    safe = np.where(every[:, None, None], jac, _identity_like(jac))
    rate = np.tile(carriers.rate, (g, 1, 1))
    jac_c = np.where(every[:, None, None], jac_c, 0.0)
    t_route = np.asarray(-np.linalg.solve(safe, jac_c @ rate), dtype=float)
    pose = rows.pose(state, carriers.rotation, carriers.centre)
    kin = rows.kinematics(state, carriers.rotation, carriers.centre, sub_pts)
    return _assemble(red, points, carriers, kin, pose, t_route, assembled, g, p)


def _advance_unknown(link: Linkage, pose: Pose, step: Array, carriers: int) -> Pose:
    """Advance the route coordinates, keeping the carriers' prescribed poses exactly."""
    moved = link.advance(pose, step)
    rot = moved.rotation.copy()
    cen = moved.centre.copy()
    rot[:, :carriers] = pose.rotation[:, :carriers]
    cen[:, :carriers] = pose.centre[:, :carriers]
    return Pose(moved.joint, rot, cen)


def _where_pose(mask: NDArray[np.bool_], a: Pose, b: Pose) -> Pose:
    return Pose(
        np.where(mask[:, None], a.joint, b.joint),
        np.where(mask[:, None, None, None], a.rotation, b.rotation),
        np.where(mask[:, None, None], a.centre, b.centre),
    )


def _where_kin(mask: NDArray[np.bool_], a: Kinematics, b: Kinematics) -> Kinematics:
    return Kinematics(
        np.where(mask[:, None, None, None], a.rotation, b.rotation),
        np.where(mask[:, None, None], a.translation, b.translation),
        np.where(mask[:, None, None], a.points, b.points),
        np.where(mask[:, None, None], a.columns, b.columns),
    )


def _assemble(
    red: Reduction,
    points: Array,
    car: _Carriers,
    kin: Kinematics,
    pose: Pose,
    t_route: Array,
    assembled: NDArray[np.bool_],
    g: int,
    p: int,
) -> GridSolution:
    """The full linkage's pose, kinematics and tangents of every candidate and pose."""
    full = red.full
    route = red.route
    n = g * p
    ck = car.corner_kin
    rot = np.empty((n, full.n_bodies, 3, 3))
    trans = np.empty((n, full.n_bodies, 3))
    rot[:, red.corner_body_full] = np.tile(ck.rotation, (g, 1, 1, 1))
    trans[:, red.corner_body_full] = np.tile(ck.translation, (g, 1, 1))
    mine = np.arange(1, route.n_bodies)
    rot[:, red.body_full[mine]] = kin.rotation[:, mine]
    trans[:, red.body_full[mine]] = kin.translation[:, mine]
    pts = np.empty((n, full.points.shape[1], 3))
    pts[:, red.corner_point_full] = np.tile(ck.points, (g, 1, 1))
    have = red.route_points >= 0
    pts[:, red.route_points[have]] = kin.points[:, have]
    cols = np.zeros((n, 6, full.n_coords))
    cols[:, :, red.corner_cols_full] = np.tile(ck.columns, (g, 1, 1))
    cols[:, :, red.unknown_full] = kin.columns[:, :, red.unknown]
    npar = t_route.shape[2]
    tan = np.zeros((n, full.n_coords, npar))
    tan[:, red.corner_cols_full] = np.tile(car.corner_tangent, (g, 1, 1))
    tan[:, red.unknown_full] = t_route
    joint = np.zeros((n, full.n_joint))
    centre = np.zeros((n, full.n_free, 3))
    frot = np.broadcast_to(np.eye(3), (n, full.n_free, 3, 3)).copy()
    for fb in range(1, full.n_bodies):
        if full.mount[fb] == FREE:
            f = full.free_index[fb]
            frot[:, f] = rot[:, fb]
            ref = points[:, full.reference[fb]]
            centre[:, f] = (rot[:, fb] @ np.repeat(ref, p, axis=0)[..., None])[..., 0] + trans[
                :, fb
            ]
    joint[:, full.joint_index[red.body_full[1 : 1 + route.n_joint]]] = pose.joint
    joint[:, red.corner_cols_full[: red.corners.n_joint]] = np.tile(car.corner_pose.joint, (g, 1))
    link_full = full.with_points(np.repeat(points, p, axis=0))
    full_pose = Pose(joint, frot, centre)
    full_kin = Kinematics(rot, trans, pts, cols)
    empty = np.zeros((n, 0, full.n_coords))
    return GridSolution(link_full, full_pose, full_kin, empty, tan, assembled, g, p)
