"""Depth of two overlapping solids (private to plumbrod.clearance.distance).

The depth of overlapping convex solids A and B is their minimum translation distance:
the length of the shortest translation of A that leaves the two solids touching, not
overlapping.  With the support function h_S(e) = max over S of e·x, the translation
``-t e`` separates the projections of A and B on a unit direction e once
``t >= g(e) = h_A(e) + h_B(-e)``, and separated projections on some direction mean
separated solids, so

    depth = min over unit e of g(e),

a property of the two solids alone (the same in every frame).  ``g`` is the support
function of the Minkowski difference A - B, and the depth is the distance from the
origin to the boundary of A - B (the origin lies inside it while they overlap).

The minimum is found over a finite set of directions that is known to contain the
minimiser; every other direction only gives a larger ``g``:

- polytopes (boxes, plates, convex prism pieces, and capsule cores, whose radius adds a
  constant to ``g``): A - B is a polytope whose faces are normal to the faces of A and
  of B and to the cross products of an edge of A with an edge of B (separating axes;
  S. Gottschalk, M. C. Lin, D. Manocha, "OBBTree", SIGGRAPH 1996);
- a polytope or capsule core against a cylinder (base disc of radius R, unit axis a,
  length L): A - B = Q + disc, with Q the polytope A minus the axis segment.  The
  minimiser is a normal of the face of A - B nearest to the origin; that face is a
  flat face of Q moved by the disc (face normals of A, edge x axis, ±a), an edge of Q
  swept by the disc rim (e perpendicular to the edge: the normals from the origin to an
  ellipse, the disc seen along the edge, the roots of a quartic, plus the radial
  directions for edges along the axis), or a vertex v of Q with the disc rim around it
  (e along v ± R û, û the unit radial direction of v).  The depth is then exact;
- against a non-convex prism: the least translation that clears A of every convex
  piece of the prism at once along one direction, over the directions of all pieces
  (faces, edge cross products); an upper bound of the minimum translation distance,
  defined by those directions, which are the same in every frame.

Units are mm.
"""

from __future__ import annotations

import numpy as np

from plumbrod.clearance import _distance_kernels as kern
from plumbrod.clearance import _solid_parts as parts

__all__: list[str] = []

_NEWTON_STEPS = 4  # polishing steps on each quartic root (t in radians)


def prism_directions(arrays: tuple[np.ndarray, ...]) -> tuple[np.ndarray, np.ndarray]:
    """Face normals and edge directions (…, M + 1, 3) of right prisms (zero if padded)."""
    _, axes, poly, edge_ok, _, _ = arrays
    edge, _, normal = kern.prism_edges(poly)
    u, v, w = axes[..., None, 0, :], axes[..., None, 1, :], axes[..., None, 2, :]
    ok = edge_ok[..., None]
    n3 = np.where(ok, normal[..., 0, None] * u + normal[..., 1, None] * v, 0.0)
    e3 = np.where(ok, edge[..., 0, None] * u + edge[..., 1, None] * v, 0.0)
    return (np.concatenate([n3, axes[..., None, 2, :]], axis=-2), np.concatenate([e3, w], axis=-2))


def _radial(points: np.ndarray, c0: np.ndarray, axis: np.ndarray) -> np.ndarray:
    """Components of points - c0 (…, 3) perpendicular to the unit axis."""
    rel = points - c0
    return rel - np.sum(rel * axis, axis=-1, keepdims=True) * axis


def _rim_directions(verts: np.ndarray, axis: np.ndarray, radius: np.ndarray) -> np.ndarray:
    """Directions v ± R û (n, 2V, 3) for vertices v (n, V, 3) of Q (relative to the
    cylinder), û the unit radial direction of v: where g is stationary inside the cone
    of directions on which v supports Q."""
    a = axis[:, None, :]
    radial, _ = kern._unit(verts - kern._dot(verts, a)[..., None] * a)
    rim = radius[:, None, None] * radial
    return np.concatenate([verts + rim, verts - rim], axis=1)


def _ellipse_normals(
    alpha: np.ndarray, beta: np.ndarray, p: np.ndarray, q: np.ndarray
) -> np.ndarray:
    """Directions (…, 8, 2) from the origin normal to the ellipse (p cos t, q sin t)
    centred at (alpha, beta): the stationary points of its support function.

    The condition ``alpha p sin t - beta q cos t + (p² - q²) sin t cos t = 0`` becomes a
    quartic in u = tan(t / 2), solved by the eigenvalues of its companion matrix (in
    the parameter turned by a quarter turn when that is better conditioned) and
    polished by Newton steps; its four roots give the ellipse normals there.  The axes
    (1, 0), (0, 1) and the directions of the points at t = ±π/2 are added: they are
    the answers where the ellipse degenerates to a segment (p = 0) or the quartic to
    sin t cos t = 0.
    """
    c = p * p - q * q
    flip = np.abs(beta * q) < np.abs(alpha * p)  # turn by π/2: t = s + π/2
    big = np.where(flip, -alpha * p, beta * q)
    lin = np.where(flip, beta * q, alpha * p)
    cc = np.where(flip, -c, c)
    scale = np.maximum(np.maximum(np.abs(big), np.abs(lin)), np.abs(cc))
    ok = np.abs(big) > 1e-12 * scale
    safe = np.where(ok, big, 1.0)
    # monic quartic u^4 + k3 u^3 + k1 u - 1 (u^4 - 1 where degenerate: the axes cover it)
    k3 = np.where(ok, 2.0 * (lin - cc) / safe, 0.0)
    k1 = np.where(ok, 2.0 * (lin + cc) / safe, 0.0)
    comp = np.zeros((*alpha.shape, 4, 4))
    comp[..., 0, 0] = -k3
    comp[..., 0, 2] = -k1
    comp[..., 0, 3] = 1.0
    comp[..., 1, 0] = comp[..., 2, 1] = comp[..., 3, 2] = 1.0
    roots = np.linalg.eigvals(comp).real
    t = 2.0 * np.arctan(roots) + np.where(flip, 0.5 * np.pi, 0.0)[..., None]
    ap, bq, cx = (x[..., None] for x in (alpha * p, beta * q, c))
    for _ in range(_NEWTON_STEPS):
        s, k = np.sin(t), np.cos(t)
        h = ap * s - bq * k + cx * s * k
        dh = ap * k + bq * s + cx * (k * k - s * s)
        with np.errstate(invalid="ignore", divide="ignore"):
            step = np.where(np.abs(dh) > 1e-300, h / dh, 0.0)
        new = t - np.clip(step, -0.5, 0.5)
        sn, kn = np.sin(new), np.cos(new)
        better = np.abs(ap * sn - bq * kn + cx * sn * kn) < np.abs(h)
        t = np.where(better, new, t)
    normal = np.stack([q[..., None] * np.cos(t), p[..., None] * np.sin(t)], axis=-1)
    one, zero = np.ones_like(alpha), np.zeros_like(alpha)
    fixed = np.stack(
        [
            np.stack([one, zero], axis=-1),
            np.stack([zero, one], axis=-1),
            np.stack([alpha, beta + q], axis=-1),
            np.stack([alpha, beta - q], axis=-1),
        ],
        axis=-2,
    )
    return np.concatenate([normal, fixed], axis=-2)


def _edge_directions(
    start: np.ndarray, edge: np.ndarray, axis: np.ndarray, radius: np.ndarray
) -> np.ndarray:
    """Stationary directions of g perpendicular to edges of Q (n, E, 3 each: a point on
    the edge relative to the cylinder, the edge vector): where an edge swept by the
    disc rim is the face of A - B nearest to the origin.  Edges along the axis give
    zeros (their directions are the radial ones)."""
    d, _ = kern._unit(edge)
    a = axis[:, None, :]
    ad = kern._dot(d, a)
    b1, b1_ok = kern._unit(a - ad[..., None] * d)
    b2 = np.cross(d, b1)
    r = radius[:, None]
    out = _ellipse_normals(
        kern._dot(start, b1), kern._dot(start, b2), r * np.abs(ad), np.broadcast_to(r, ad.shape)
    )  # (n, E, 8, 2)
    dirs = out[..., 0, None] * b1[..., None, :] + out[..., 1, None] * b2[..., None, :]
    dirs = np.where(b1_ok[..., None, None], dirs, 0.0)
    return dirs.reshape(len(dirs), -1, 3)


def _cylinder_directions(
    pts: np.ndarray, edges: np.ndarray, cyl: tuple[np.ndarray, ...]
) -> list[np.ndarray]:
    """Candidate directions (lists of (n, K, 3)) of a convex part with vertices pts
    (n, V, 3) and edges (E, 2) against a cylinder (c0, axis, length, radius) (n, …)."""
    c0, axis, length, radius = cyl
    rel = pts - c0[:, None]
    top = rel - (length[:, None] * axis)[:, None]  # the vertices less the other axis end
    verts = np.concatenate([rel, top], axis=1)
    found = [
        axis[:, None],
        _radial(pts, c0[:, None], axis[:, None]),
        _rim_directions(verts, axis, radius),
    ]
    if len(edges):
        vec = pts[:, edges[:, 1]] - pts[:, edges[:, 0]]
        for base in (rel, top):
            found.append(_edge_directions(base[:, edges[:, 0]], vec, axis, radius))
    return found


def candidate_directions(
    a: parts.Part, b: parts.Part, dirs_kernel: np.ndarray
) -> tuple[np.ndarray, int]:
    """Candidate directions (N, K, 3) for the pairs that may overlap: first the
    kernel's directions (N, P) (kept only to find a separating direction), then the
    directions that define the depth.  Returns the directions and P."""
    ka, arr_a = a
    kb, arr_b = b
    n = arr_b[0].shape[0]
    found = [dirs_kernel]
    if kb == "prism":
        faces_b, edges_b = prism_directions(arr_b)  # (n, p, mb + 1, 3)
        found.append(faces_b.reshape(n, -1, 3))
        if ka == "seg":
            d = (arr_a[1] - arr_a[0])[:, None, None, :]
            found.append(np.cross(d, edges_b).reshape(n, -1, 3))
        else:
            faces_a, edges_a = prism_directions(arr_a)  # (n, ma + 1, 3)
            found.append(faces_a)
            cross = np.cross(edges_a[:, None, :, None, :], edges_b[:, :, None, :, :])
            found.append(cross.reshape(n, -1, 3))
    else:  # cylinder, one piece
        cyl = tuple(arr[:, 0] for arr in arr_b)
        axis = cyl[1]
        if ka == "seg":
            d = arr_a[1] - arr_a[0]
            found.append(np.cross(d, axis)[:, None])
            pts = np.stack([arr_a[0], arr_a[1]], axis=1)
            edges = np.array([[0, 1]])
        else:
            faces_a, edges_a = prism_directions(arr_a)
            found.append(faces_a)
            found.append(np.cross(edges_a, axis[:, None]))
            pts = kern.prism_vertices(arr_a[0], arr_a[1], arr_a[2], arr_a[4], arr_a[5])
            edges = kern.prism_edge_index(arr_a[2].shape[-2])
        found.extend(_cylinder_directions(pts, edges, cyl))
    dirs, _ = kern._unit(np.concatenate(found, axis=1))
    return dirs, dirs_kernel.shape[1]


def overlap_depth(
    a: parts.Part, b: parts.Part, dirs_kernel: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Depth of A in B (every piece of B counted), see the module notes.

    ``a`` arrays have a leading (N,) axis, ``b`` arrays (N, P); ``dirs_kernel`` (N, P,
    3) are the kernel's directions.  Returns (depth (N,), e_ab (N, 3) unit from A
    towards B, the point of A deepest along e_ab, the point of B nearest to that point
    moved back by the depth); depth 0 where some direction separates them.
    """
    ka, arr_a = a
    kb, arr_b = b
    n, p = arr_b[0].shape[:2]
    dirs, first = candidate_directions(a, b, dirs_kernel)  # (n, K, 3)
    valid = np.linalg.norm(dirs, axis=-1) > 0.5
    a_exp = (ka, tuple(arr[:, None] for arr in arr_a))
    a_hi, a_lo = parts.projection_range(a_exp, dirs)
    b_exp = (kb, tuple(arr[:, None] for arr in arr_b))  # (n, 1, p, ...)
    b_hi, b_lo = parts.projection_range(b_exp, dirs[:, :, None, :])
    # translations t of A along the direction that keep A on piece i: (b_lo - a_hi, b_hi - a_lo)
    f_lo = b_lo - a_hi[..., None]
    f_hi = b_hi - a_lo[..., None]
    lo = np.zeros(f_lo.shape[:2])
    hi = np.zeros(f_lo.shape[:2])
    for _ in range(p):
        touch = (f_lo < hi[..., None]) & (f_hi > lo[..., None])
        lo = np.minimum(lo, np.min(np.where(touch, f_lo, 0.0), axis=-1))
        hi = np.maximum(hi, np.max(np.where(touch, f_hi, 0.0), axis=-1))
    forward = hi <= -lo
    depth = np.where(forward, hi, -lo)
    depth = np.where(valid, depth, np.inf)
    apart = np.any(depth[:, :first] <= 0.0, axis=1)
    k = first + np.argmin(depth[:, first:], axis=1)
    rows = np.arange(n)
    best = np.where(apart, 0.0, depth[rows, k])
    sign = np.where(forward[rows, k], -1.0, 1.0)
    e_ab = sign[:, None] * dirs[rows, k]
    _, deep_a = parts.support((ka, arr_a), e_ab)
    # the point of B nearest to where A's deepest point must go
    target = (deep_a - best[:, None] * e_ab)[:, None, :]
    if kb == "prism":
        near, gap = kern.point_prism(target, *arr_b)
    else:
        near, gap = kern.point_cyl(target, *arr_b)
    deep_b = near[rows, np.argmin(gap, axis=1)]
    return best, e_ab, deep_a, deep_b
