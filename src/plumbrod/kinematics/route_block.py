"""The route block's equations written out for its three kinds of body: fast Newton.

The route block of :mod:`plumbrod.kinematics.reduced` has only rods for rows, and every
rod end sits on one of: the chassis (fixed), a carrier (a corner body whose pose is
prescribed per pose), a rocker hinged to the chassis (one angle) or an aero element (a
free body).  For that shape the residual and its Jacobian have short closed forms, so
a Newton step costs a few array operations on (rows, ends, 3) instead of the general
linkage's twist columns over every coordinate:

* a rod's row is ``(|d|^2 - L^2) / 2L`` with ``d = p_a - p_b`` (mm), gradient ``g = d / L``
  for end ``a`` and ``-g`` for end ``b`` (the rows of
  :meth:`~plumbrod.kinematics.linkage.Linkage.member_rows`);
* an end on a rocker (unit axis ``u`` through ``a``) moves by ``u x (p - a)`` per radian,
  so its entry in the rocker's column is ``g . (u x (p - a))``;
* an end on a free body with reference point ``c`` moves by ``dc + dtheta x (p - c)``,
  so its entries are ``[g, (p - c) x g]`` (times the free-body basis: the in-plane
  coordinates of a planar design).

The coordinates and their order are the route linkage's, so the poses, Jacobians and
tangents are those of the general solver (tests compare them); only the arithmetic is
shorter.  :func:`route_block` returns None for any other shape (a slide, a ball joint,
a rocker on a moving body), and callers keep the general path.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.frames import Array, Pose, cross, skew
from plumbrod.kinematics.linkage import FREE, HINGE, Kinematics, Linkage

__all__ = ["BlockState", "RouteBlock", "route_block"]


@dataclass(frozen=True)
class RouteBlock:
    """Index maps of a route linkage's rods, ends and coordinates (built once)."""

    link: Linkage
    carriers: int  # the first ``carriers`` free slots are prescribed
    rockers: NDArray[np.intp]  # route body of each rocker
    rocker_cols: NDArray[np.intp]  # its unknown column
    elements: NDArray[np.intp]  # route body of each solved free body
    element_cols: NDArray[np.intp]  # (ne, k) its unknown columns
    end_point: NDArray[np.intp]  # (2m,) point of each rod end, end a then b per rod
    rocker_ends: NDArray[np.intp]  # ends on a rocker
    rocker_of_end: NDArray[np.intp]  # that rocker's index in ``rockers``
    free_ends: NDArray[np.intp]  # ends on an element
    element_of_end: NDArray[np.intp]  # the element's index in ``elements``
    carrier_ends: NDArray[np.intp]  # ends on a carrier
    carrier_of_end: NDArray[np.intp]  # the carrier's free slot
    carrier_end_cols: NDArray[np.intp]  # (ce, k) its columns among the carrier columns
    fixed_ends: NDArray[np.intp]  # ends on the chassis
    n_unknown: int
    n_carrier_cols: int
    selection: NDArray[np.intp]  # (k,) which of [dc, dtheta] each free coordinate is


@dataclass(frozen=True)
class BlockState:
    """Route-block pose of a batch of rows, rows on the last axis (structure of arrays:
    numpy's inner loops then run along the long axis)."""

    angle: Array  # (rockers, n) rad
    rotation: Array  # (3, 3, elements, n)
    centre: Array  # (3, elements, n) reference points, mm

    def take(self, rows: NDArray[np.intp]) -> BlockState:
        return BlockState(self.angle[:, rows], self.rotation[..., rows], self.centre[..., rows])

    def put(self, rows: NDArray[np.intp], other: BlockState) -> None:
        """Overwrite ``rows`` with ``other`` (in place)."""
        self.angle[:, rows] = other.angle
        self.rotation[..., rows] = other.rotation
        self.centre[..., rows] = other.centre


def route_block(
    route: Linkage,
    carriers: int,
    unknown: NDArray[np.intp],
    carrier_cols: NDArray[np.intp],
) -> RouteBlock | None:
    """The closed-form block of ``route`` (rods only, rockers on the chassis), or None.

    ``unknown`` and ``carrier_cols`` are route coordinate columns in the order the
    caller's Jacobians use (those of :class:`~plumbrod.kinematics.reduced.Reduction`).
    """
    if len(route.ball_names) or not len(route.rod_names):
        return None
    k = route.free_basis.shape[1]
    col_of = {int(c): i for i, c in enumerate(unknown)}
    car_of = {int(c): i for i, c in enumerate(carrier_cols)}
    rockers: list[int] = []
    elements: list[int] = []
    for b in range(1, route.n_bodies):
        if route.mount[b] == HINGE and int(route.parent[b]) == 0:
            rockers.append(b)
        elif route.mount[b] == FREE:
            if int(route.free_index[b]) >= carriers:
                elements.append(b)
        else:
            return None

    def free_cols(b: int, table: dict[int, int]) -> list[int]:
        f = int(route.free_index[b])
        return [table[route.n_joint + f * k + j] for j in range(k)]

    ends = route.rod_ends.reshape(-1)
    groups: dict[str, list[int]] = {"rocker": [], "free": [], "carrier": [], "fixed": []}
    rocker_of: list[int] = []
    element_of: list[int] = []
    carrier_of: list[int] = []
    carrier_end_cols: list[list[int]] = []
    try:
        rocker_cols = [col_of[int(route.joint_index[b])] for b in rockers]
        element_cols = [free_cols(b, col_of) for b in elements]
        for e, body in enumerate(route.point_body[ends]):
            b = int(body)
            if b == 0:
                groups["fixed"].append(e)
            elif b in rockers:
                groups["rocker"].append(e)
                rocker_of.append(rockers.index(b))
            elif b in elements:
                groups["free"].append(e)
                element_of.append(elements.index(b))
            else:
                groups["carrier"].append(e)
                carrier_of.append(int(route.free_index[b]))
                carrier_end_cols.append(free_cols(b, car_of))
    except KeyError:
        return None
    if len(unknown) != len(rockers) + k * len(elements) or len(unknown) != len(route.rod_names):
        return None
    basis = route.free_basis
    selection = np.argmax(basis, axis=0)
    if not np.array_equal(basis, np.eye(6)[:, selection]):
        return None  # the free coordinates are not a plain selection of [dc, dtheta]

    def ix(values: list[int] | list[list[int]], width: int = 0) -> NDArray[np.intp]:
        out = np.array(values, dtype=np.intp)
        return out.reshape(-1, width) if width else out.reshape(-1)

    return RouteBlock(
        link=route,
        carriers=carriers,
        rockers=ix(rockers),
        rocker_cols=ix(rocker_cols),
        elements=ix(elements),
        element_cols=ix(element_cols, k),
        end_point=ends.astype(np.intp),
        rocker_ends=ix(groups["rocker"]),
        rocker_of_end=ix(rocker_of),
        free_ends=ix(groups["free"]),
        element_of_end=ix(element_of),
        carrier_ends=ix(groups["carrier"]),
        carrier_of_end=ix(carrier_of),
        carrier_end_cols=ix(carrier_end_cols, k),
        fixed_ends=ix(groups["fixed"]),
        n_unknown=len(unknown),
        n_carrier_cols=len(carrier_cols),
        selection=selection.astype(np.intp),
    )


class BlockRows:
    """The route block over ``n`` rows (design-major: row ``g * P + p``), to iterate on.

    ``points`` (G, np, 3) are the route linkage's design points of each candidate;
    ``carrier_rotation`` / ``carrier_centre`` (P, nc, 3, 3) / (P, nc, 3) the carriers'
    prescribed poses at each of the P poses.  Inside, arrays keep the rows on the last
    axis; :meth:`evaluate` takes ``rows`` (an index array, None for all) so converged
    rows drop out of the iteration, and returns row-first arrays.
    """

    def __init__(
        self,
        block: RouteBlock,
        points: Array,
        carrier_rotation: Array,
        carrier_centre: Array,
    ) -> None:
        self.block = b = block
        route = block.link
        g, p = points.shape[0], carrier_rotation.shape[0]
        self.n = n = g * p
        p0 = points[:, b.end_point]  # (G, 2m, 3)
        d0 = p0[:, 0::2] - p0[:, 1::2]
        self.length = _rows_last(np.linalg.norm(d0, axis=-1), p)  # (m, n)
        # ends that never move in the iteration: on the chassis and on the carriers
        static = np.zeros((n, b.end_point.size, 3))
        static[:, b.fixed_ends] = np.repeat(p0[:, b.fixed_ends], p, axis=0)
        lever = np.zeros((n, b.carrier_ends.size, 3))
        if b.carrier_ends.size:
            rot = carrier_rotation[:, b.carrier_of_end]  # (P, ce, 3, 3)
            cen = carrier_centre[:, b.carrier_of_end]
            local = p0[:, b.carrier_ends]  # (G, ce, 3), carrier reference at the origin
            lever = np.einsum("pcij,gcj->gpci", rot, local).reshape(n, -1, 3)
            static[:, b.carrier_ends] = lever + np.tile(cen, (g, 1, 1))
        self.static = _rows_last(static)  # (3, 2m, n)
        self.carrier_lever = _rows_last(lever)  # (3, ce, n) end minus carrier reference
        a = points[:, route.axis_points[b.rockers, 0]]  # (G, nr, 3) rocker axes
        u = points[:, route.axis_points[b.rockers, 1]] - a
        u = u / np.linalg.norm(u, axis=-1, keepdims=True)
        self.axis = np.repeat(u, p, axis=0)  # (n, nr, 3), row-first for the kinematics
        self.axis_origin = np.repeat(a, p, axis=0)
        # an end at v from its rocker's axis turns to c v + s (u x v) + (1 - c)(u.v) u
        ue = u[:, b.rocker_of_end]
        v = p0[:, b.rocker_ends] - a[:, b.rocker_of_end]
        along = np.sum(ue * v, axis=-1, keepdims=True) * ue
        self.rocker_cos = _rows_last(v - along, p)  # (3, re, n)
        self.rocker_sin = _rows_last(cross(ue, v), p)
        self.rocker_fixed = _rows_last(a[:, b.rocker_of_end] + along, p)
        refs = points[:, route.reference[b.elements]]  # (G, ne, 3)
        self.refs = np.repeat(refs, p, axis=0)  # (n, ne, 3)
        self.free_local = _rows_last(p0[:, b.free_ends] - refs[:, b.element_of_end], p)
        self.basis = route.free_basis  # (6, k)
        m = len(route.rod_names)
        self.end_rod = np.arange(m).repeat(2)
        self.end_sign = np.tile([1.0, -1.0], m)[:, None]

    # -- state ------------------------------------------------------------------------
    def design_state(self) -> BlockState:
        """Every row at the design pose."""
        b = self.block
        ne = b.elements.size
        eye = np.eye(3)[:, :, None, None]
        return BlockState(
            np.zeros((b.rockers.size, self.n)),
            np.broadcast_to(eye, (3, 3, ne, self.n)).copy(),
            _rows_last(self.refs),
        )

    def advance(self, state: BlockState, step: Array) -> BlockState:
        """``state`` moved by unknown-coordinate increments ``step`` (nu, n')."""
        b = self.block
        angle = state.angle + step[b.rocker_cols]
        if not b.elements.size:
            return BlockState(angle, state.rotation, state.centre)
        inc = np.zeros((6, b.elements.size, step.shape[1]))
        inc[b.selection] = np.swapaxes(step[b.element_cols], 0, 1)  # (k, ne, n')
        turn = _rotation_matrix(inc[3:6])
        rotation = np.einsum("ij...,jk...->ik...", turn, state.rotation)
        return BlockState(angle, rotation, state.centre + inc[0:3])

    def ends(self, state: BlockState, rows: NDArray[np.intp] | None = None) -> Array:
        """Positions (3, 2m, n') of every rod end, mm (``rows`` None: every row)."""
        b = self.block
        pick = _picker(rows)
        out = pick(self.static).copy()
        if b.rockers.size:
            ang = state.angle[b.rocker_of_end]  # (re, n')
            out[:, b.rocker_ends] = (
                pick(self.rocker_fixed)
                + np.cos(ang) * pick(self.rocker_cos)
                + np.sin(ang) * pick(self.rocker_sin)
            )
        if b.elements.size:
            rot = state.rotation[:, :, b.element_of_end]  # (3, 3, fe, n')
            local = pick(self.free_local)
            out[:, b.free_ends] = (
                rot[:, 0] * local[0] + rot[:, 1] * local[1] + rot[:, 2] * local[2]
            ) + state.centre[:, b.element_of_end]
        return out

    def evaluate(
        self, state: BlockState, rows: NDArray[np.intp] | None = None, carriers: bool = False
    ) -> tuple[Array, Array, Array | None, Array]:
        """Residual (n', m) mm, Jacobian on the unknowns (n', m, nu), on the carrier
        columns when ``carriers`` (n', m, ncc), and the end positions (3, 2m, n')."""
        b = self.block
        pick = _picker(rows)
        pts = self.ends(state, rows)
        d = pts[:, 0::2] - pts[:, 1::2]  # (3, m, n')
        length = pick(self.length)
        res = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2] - length * length) / (2.0 * length)
        grad = d / length
        m, n = res.shape
        jac = np.zeros((n, m, b.n_unknown))
        if b.rockers.size:
            # the end's rate per radian: u x (p - a) = c (u x v) - s (v - (u.v) u)
            e = b.rocker_ends
            g = grad[:, self.end_rod[e]] * self.end_sign[e]
            ang = state.angle[b.rocker_of_end]
            rate = np.cos(ang) * pick(self.rocker_sin) - np.sin(ang) * pick(self.rocker_cos)
            jac[:, self.end_rod[e], b.rocker_cols[b.rocker_of_end]] = np.sum(rate * g, axis=0).T
        if b.elements.size:
            e = b.free_ends
            lever = pts[:, e] - state.centre[:, b.element_of_end]
            value = self._free_entries(grad, e, lever)  # (fe, k, n')
            jac[:, self.end_rod[e][:, None], b.element_cols[b.element_of_end]] = value
        jac_c = None
        if carriers:
            jac_c = np.zeros((n, m, b.n_carrier_cols))
            if b.carrier_ends.size:
                e = b.carrier_ends
                value = self._free_entries(grad, e, pick(self.carrier_lever))
                jac_c[:, self.end_rod[e][:, None], b.carrier_end_cols] = value
        return res.T, jac, jac_c, pts

    def _free_entries(self, grad: Array, ends: NDArray[np.intp], lever: Array) -> Array:
        """(n', ends, k) row entries ``[g, lever x g]`` of ends on free bodies."""
        g = grad[:, self.end_rod[ends]] * self.end_sign[ends]  # (3, e, n')
        full = np.empty((6, *g.shape[1:]))
        full[0:3] = g
        full[3] = lever[1] * g[2] - lever[2] * g[1]
        full[4] = lever[2] * g[0] - lever[0] * g[2]
        full[5] = lever[0] * g[1] - lever[1] * g[0]
        return np.transpose(full[self.block.selection], (2, 1, 0))

    def pose(self, state: BlockState, carrier_rotation: Array, carrier_centre: Array) -> Pose:
        """The route linkage's pose at ``state`` (every row); carriers (P, nc, ...) tiled."""
        b = self.block
        route = b.link
        n = self.n
        joint = np.zeros((n, route.n_joint))
        joint[:, route.joint_index[b.rockers]] = state.angle.T
        rot = np.empty((n, route.n_free, 3, 3))
        cen = np.empty((n, route.n_free, 3))
        reps = n // carrier_rotation.shape[0]
        rot[:, : b.carriers] = np.tile(carrier_rotation, (reps, 1, 1, 1))
        cen[:, : b.carriers] = np.tile(carrier_centre, (reps, 1, 1))
        slots = route.free_index[b.elements]
        rot[:, slots] = np.transpose(state.rotation, (3, 2, 0, 1))
        cen[:, slots] = np.transpose(state.centre, (2, 1, 0))
        return Pose(joint, rot, cen)

    def kinematics(
        self, state: BlockState, carrier_rotation: Array, carrier_centre: Array, points: Array
    ) -> Kinematics:
        """The route linkage's body poses and points at ``state`` (every row), as
        :meth:`~plumbrod.kinematics.linkage.Linkage.kinematics` gives them, with the
        twist columns of the unknown coordinates only (the carriers' are zero).
        ``points`` (G, np, 3) are the candidates' route points."""
        b = self.block
        route = b.link
        n, nb = self.n, route.n_bodies
        g = points.shape[0]
        p = n // g
        rot = np.empty((n, nb, 3, 3))
        trans = np.empty((n, nb, 3))
        rot[:, 0] = np.eye(3)
        trans[:, 0] = 0.0
        carriers = np.flatnonzero((route.free_index >= 0) & (route.free_index < b.carriers))
        rot[:, carriers] = np.tile(carrier_rotation[:, route.free_index[carriers]], (g, 1, 1, 1))
        trans[:, carriers] = np.tile(carrier_centre[:, route.free_index[carriers]], (g, 1, 1))
        col = np.zeros((n, 6, route.n_coords))
        if b.rockers.size:
            u, a = self.axis, self.axis_origin
            c = np.cos(state.angle.T)[..., None, None]
            s = np.sin(state.angle.T)[..., None, None]
            uu = u[..., :, None] * u[..., None, :]
            turn = c * (np.eye(3) - uu) + s * skew(u) + uu
            rot[:, b.rockers] = turn
            trans[:, b.rockers] = a - _turn(turn, a)
            joint = route.joint_index[b.rockers]
            col[:, 0:3, joint] = np.swapaxes(cross(a, u), 1, 2)
            col[:, 3:6, joint] = np.swapaxes(u, 1, 2)
        if b.elements.size:
            rotation = np.transpose(state.rotation, (3, 2, 0, 1))  # (n, ne, 3, 3)
            centre = np.transpose(state.centre, (2, 1, 0))
            rot[:, b.elements] = rotation
            trans[:, b.elements] = centre - _turn(rotation, self.refs)
            ne = b.elements.size
            full = np.zeros((n, ne, 6, 6))
            idx = np.arange(3)
            full[:, :, idx, idx] = 1.0
            full[:, :, 3 + idx, 3 + idx] = 1.0
            full[:, :, 0:3, 3:6] = skew(centre)  # a turn about e_i moves the origin by c x e_i
            twists = full @ self.basis  # (n, ne, 6, k)
            k = self.basis.shape[1]
            for i, slot in enumerate(route.free_index[b.elements]):
                start = route.n_joint + int(slot) * k
                col[:, :, start : start + k] = twists[:, i]
        moved = np.empty((g, p, route.points.shape[1], 3))
        shaped_rot = rot.reshape(g, p, nb, 3, 3)
        shaped_trans = trans.reshape(g, p, nb, 3)
        for body, own in route._points_by_body():
            moved[:, :, own] = (
                _turn(shaped_rot[:, :, body, None], points[:, None, own])
                + shaped_trans[:, :, body, None]
            )
        return Kinematics(rot, trans, moved.reshape(n, -1, 3), col)


def newton(
    rows: BlockRows, state: BlockState, tol_mm: float, iterations: int
) -> tuple[BlockState, Array, Array, Array, Array]:
    """Newton's method on every row from ``state`` (changed in place), dropping rows as
    they converge.  Returns the state and, row-first, the residual (n, m), Jacobians on
    the unknowns (n, m, nu) and on the carrier columns (n, m, ncc), and the residual
    norm (n,).  A step that does not lower a row's residual is refused and the row stops
    there (it then fails the caller's tolerance check)."""
    res, jac, jac_c, _ = rows.evaluate(state, carriers=True)
    assert jac_c is not None
    norm = np.abs(res).max(axis=1)
    live = np.arange(rows.n)
    for _ in range(iterations):
        live = live[norm[live] > tol_mm]
        if not live.size:
            break
        system, rhs = jac[live], -res[live][..., None]
        try:
            step = np.linalg.solve(system, rhs)[..., 0]
        except np.linalg.LinAlgError:
            step = (np.linalg.pinv(system, rcond=1e-12) @ rhs)[..., 0]
        trial = rows.advance(state.take(live), step.T)
        t_res, t_jac, t_jac_c, _ = rows.evaluate(trial, live, carriers=True)
        assert t_jac_c is not None
        t_norm = np.abs(t_res).max(axis=1)
        better = (t_norm < norm[live]) | (t_norm <= tol_mm)
        if not better.any():
            break
        keep = live[better]
        state.put(keep, trial.take(np.flatnonzero(better)))
        res[keep], jac[keep], norm[keep] = t_res[better], t_jac[better], t_norm[better]
        jac_c[keep] = t_jac_c[better]
        live = keep
    return state, res, jac, jac_c, norm


def _rows_last(a: Array, repeat: int = 1) -> Array:
    """``a`` (rows, entities, 3) or (rows, entities) as (3, entities, rows) or
    (entities, rows), each design's row repeated ``repeat`` times (contiguous)."""
    if repeat > 1:
        a = np.repeat(a, repeat, axis=0)
    return np.ascontiguousarray(a.T if a.ndim == 2 else np.transpose(a, (2, 1, 0)))


def _picker(rows: NDArray[np.intp] | None):  # type: ignore[no-untyped-def]
    """A function taking the ``rows`` of a rows-last array (all when None)."""
    if rows is None:
        return lambda a: a
    return lambda a: a[..., rows]


def _rotation_matrix(rotvec: Array) -> Array:
    """Rotation matrices (3, 3, ...) of rotation vectors (3, ...) (rad), rows last."""
    x, y, z = rotvec
    angle2 = x * x + y * y + z * z
    angle = np.sqrt(angle2)
    small = angle < 1e-4
    safe = np.where(small, 1.0, angle)
    # sin(t)/t and (1 - cos t)/t^2, by their series below 1e-4 rad
    a = np.where(small, 1.0 - angle2 / 6.0, np.sin(safe) / safe)
    b = np.where(small, 0.5 - angle2 / 24.0, (1.0 - np.cos(safe)) / (safe * safe))
    out = np.empty((3, 3, *x.shape))
    out[0, 0] = 1.0 - b * (y * y + z * z)
    out[1, 1] = 1.0 - b * (x * x + z * z)
    out[2, 2] = 1.0 - b * (x * x + y * y)
    out[0, 1] = b * x * y - a * z
    out[1, 0] = b * x * y + a * z
    out[0, 2] = b * x * z + a * y
    out[2, 0] = b * x * z - a * y
    out[1, 2] = b * y * z - a * x
    out[2, 1] = b * y * z + a * x
    return out


def _turn(rotation: Array, vector: Array) -> Array:
    """``rotation @ vector`` over the last axes, (..., 3, 3) and (..., 3), written out
    (numpy's batched matmul on 3 x 3 blocks is slower)."""
    return (
        rotation[..., 0] * vector[..., 0, None]
        + rotation[..., 1] * vector[..., 1, None]
        + rotation[..., 2] * vector[..., 2, None]
    )
