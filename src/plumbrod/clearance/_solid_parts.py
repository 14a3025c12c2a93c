"""Solids as convex parts for the distance kernels (private to plumbrod.clearance.distance).

A part is ``(kind, arrays)``:

- ``"seg"``: (p0 (…, 3), p1 (…, 3), radius (…)): a capsule's core segment and radius;
- ``"prism"``: (origin (…, 3), axes (…, 3, 3) rows u, v, w, poly (…, M, 2)
  counter-clockwise, edge_ok (…, M), zlo (…), zhi (…)): a right convex prism;
- ``"cyl"``: (c0 (…, 3), axis (…, 3) unit, length (…), radius (…)).

A :class:`~plumbrod.geometry.shapes.Prism` zone gives one ``"prism"`` part with a leading piece
axis (P, …), its convex pieces padded to a common vertex count.  Units are mm.
"""

from __future__ import annotations

import numpy as np

from plumbrod.clearance import _distance_kernels as kern
from plumbrod.geometry.shapes import Box, Capsule, Cylinder, Plate, Prism, Solid

__all__: list[str] = []

#: Number of trailing (non-batch) axes of each array of each part kind.
CORE_NDIM: dict[str, tuple[int, ...]] = {
    "seg": (1, 1, 0),
    "prism": (1, 2, 2, 1, 0, 0),
    "cyl": (1, 1, 0, 0),
}

Part = tuple[str, tuple[np.ndarray, ...]]


def part_of(solid: Solid) -> tuple[Part, bool]:
    """The convex part of a solid, and whether it has a leading piece axis (prisms)."""
    if isinstance(solid, Capsule):
        return ("seg", (solid.p0, solid.p1, np.asarray(solid.radius))), False
    if isinstance(solid, Box):
        assert solid.rotation is not None
        h = solid.half_size
        hx, hy, hz = h[..., 0], h[..., 1], h[..., 2]
        poly = np.stack(
            [
                np.stack([-hx, -hy], -1),
                np.stack([hx, -hy], -1),
                np.stack([hx, hy], -1),
                np.stack([-hx, hy], -1),
            ],
            axis=-2,
        )
        axes = np.swapaxes(solid.rotation, -1, -2)
        return ("prism", (solid.centre, axes, poly, np.ones(poly.shape[:-1], bool), -hz, hz)), False
    if isinstance(solid, Plate):
        half = 0.5 * np.asarray(solid.thickness)
        poly = solid.polygon_uv
        return (
            "prism",
            (solid.origin, solid.axes, poly, np.ones(poly.shape[:-1], bool), -half, half),
        ), False
    if isinstance(solid, Cylinder):
        d = solid.p1 - solid.p0
        length = np.linalg.norm(d, axis=-1)
        return ("cyl", (solid.p0, d / length[..., None], length, np.asarray(solid.radius))), False
    if isinstance(solid, Prism):
        m = max(len(p) for p in solid.pieces)
        count = len(solid.pieces)
        poly = np.empty((count, m, 2))
        edge_ok = np.zeros((count, m), bool)
        for i, piece in enumerate(solid.pieces):
            k = len(piece)
            poly[i, :k] = piece
            poly[i, k:] = piece[-1]  # padding: zero-length edges k-1 .. m-2
            edge_ok[i, : k - 1] = True
            edge_ok[i, m - 1] = True  # the closing edge, back to vertex 0
        axes = np.broadcast_to(np.stack([solid.u, solid.v, solid.w]), (count, 3, 3))
        origin = np.zeros((count, 3))
        zlo = np.full(count, solid.depth_min)
        zhi = np.full(count, solid.depth_max)
        return ("prism", (origin, axes, poly, edge_ok, zlo, zhi)), True
    raise TypeError(f"expected a plumbrod.geometry.shapes solid, got {type(solid).__name__}")


def batch_of(part: Part, has_pieces: bool) -> tuple[int, ...]:
    """Broadcast batch shape of a part (without its piece axis)."""
    kind, arrays = part
    shapes = [a.shape[: a.ndim - c] for a, c in zip(arrays, CORE_NDIM[kind], strict=True)]
    full = np.broadcast_shapes(*shapes)
    return full[:-1] if has_pieces else full


def broadcast_part(part: Part, batch: tuple[int, ...], pieces: int | None) -> Part:
    """Broadcast every array to ``batch`` (+ ``(pieces,)`` when given) + its core shape.

    A part without a piece axis gets one of length 1 when ``pieces`` is 1 and it
    has none (pass ``pieces=None`` to add no piece axis)."""
    kind, arrays = part
    out = []
    for arr, core in zip(arrays, CORE_NDIM[kind], strict=True):
        core_shape = arr.shape[arr.ndim - core :]
        lead = batch if pieces is None else (*batch, pieces)
        out.append(np.broadcast_to(arr, lead + core_shape))
    return kind, tuple(out)


def add_piece_axis(part: Part) -> Part:
    """Insert a piece axis of length 1 before the core axes."""
    kind, arrays = part
    out = tuple(
        np.expand_dims(a, axis=a.ndim - c) for a, c in zip(arrays, CORE_NDIM[kind], strict=True)
    )
    return kind, out


def take(part: Part, index: tuple[np.ndarray, ...]) -> Part:
    """Index the leading axes of every array (fancy indexing)."""
    kind, arrays = part
    return kind, tuple(a[index] for a in arrays)


def support(part: Part, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Support value max(e·x) and a support point along unit directions e (…, 3)."""
    kind, arr = part
    if kind == "seg":
        return kern.support_seg(arr[0], arr[1], arr[2], e)
    if kind == "prism":
        verts = kern.prism_vertices(arr[0], arr[1], arr[2], arr[4], arr[5])
        return kern.support_points(verts, e)
    return kern.support_cyl(arr[0], arr[1], arr[2], arr[3], e)


def projection_range(part: Part, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Largest and least of e·x over a part along unit directions e (…, 3): the support
    values along e and minus those along -e (values only, no points)."""
    kind, arr = part
    if kind == "seg":
        h0 = kern._dot(arr[0], e)
        h1 = kern._dot(arr[1], e)
        return np.maximum(h0, h1) + arr[2], np.minimum(h0, h1) - arr[2]
    if kind == "prism":
        verts = kern.prism_vertices(arr[0], arr[1], arr[2], arr[4], arr[5])
        h = np.einsum("...vk,...k->...v", verts, e)
        return np.max(h, axis=-1), np.min(h, axis=-1)
    c0, axis, length, radius = arr
    mid = kern._dot(c0, e)
    along = length * kern._dot(axis, e)
    perp = e - kern._dot(e, axis)[..., None] * axis
    perp = perp - kern._dot(perp, axis)[..., None] * axis  # no cancellation near ±axis
    rim = radius * kern._norm(perp)
    return mid + np.maximum(along, 0.0) + rim, mid + np.minimum(along, 0.0) - rim


def motion_keypoints(solid: Solid) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    """Points and scalars that bound how far any point of a moving solid travels.

    Returns ``(points (n, K, 3), lengths (n,), turn (n, 3))`` so that between poses i
    and j every point moves at most ``max_k |points_i,k - points_j,k| +
    |lengths_i - lengths_j| + scale * |turn_i - turn_j|`` with ``scale`` folded into
    ``turn``; or None for a solid that does not move (batch shape ``()``).
    """
    if solid.batch_shape == ():
        return None
    n = solid.batch_shape
    if isinstance(solid, Capsule):
        pts = np.stack(np.broadcast_arrays(solid.p0, solid.p1), axis=-2)
        return (
            np.broadcast_to(pts, (*n, 2, 3)),
            np.broadcast_to(solid.radius, n),
            np.zeros((*n, 3)),
        )
    if isinstance(solid, Cylinder):
        (_, arr), _ = part_of(solid)
        pts = np.stack(np.broadcast_arrays(solid.p0, solid.p1), axis=-2)
        radius = np.broadcast_to(solid.radius, n)
        # a rim point c + r·ρ̂ moves by at most |Δc| + r|Δaxis| + |Δr|
        turn = np.broadcast_to(arr[1], (*n, 3)) * np.max(radius)
        return np.broadcast_to(pts, (*n, 2, 3)), radius, turn
    if isinstance(solid, Box):
        (_, arr), _ = part_of(solid)
        verts = kern.prism_vertices(
            np.broadcast_to(arr[0], (*n, 3)),
            np.broadcast_to(arr[1], (*n, 3, 3)),
            np.broadcast_to(arr[2], (*n, 4, 2)),
            np.broadcast_to(arr[4], n),
            np.broadcast_to(arr[5], n),
        )
        return verts, np.zeros(n), np.zeros((*n, 3))
    if isinstance(solid, Plate):
        half = np.broadcast_to(0.5 * solid.thickness, n)
        verts = np.broadcast_to(solid.vertices, (*n, *solid.vertices.shape[-2:]))
        # a point x = Σλ v_k + s·(t/2)·w moves by at most max|Δv| + (t/2)|Δw| + |Δt|/2
        turn = np.broadcast_to(solid.axes[..., 2, :], (*n, 3)) * np.max(half)
        return verts, half, turn
    raise TypeError(f"expected a moving solid, got {type(solid).__name__}")
