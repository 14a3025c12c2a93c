"""Array kernels for least distance between convex parts (private to plumbrod.clearance.distance).

Three convex part kinds cover every solid:

- segment ``p0``-``p1`` (the core of a capsule; the radius is added by the caller);
- right convex prism: a convex polygon (M, 2) in the (u, v) plane of a frame, extruded
  between ``zlo`` and ``zhi`` along w (boxes, convex prism pieces, plates);
- cylinder: base centre ``c0``, unit axis ``a``, length ``L``, radius ``r``.

All arrays carry a leading batch; polygons may be padded with repeated vertices
(``edge_ok`` false for the zero-length edges).  Units are mm.

Methods (all exact for separated parts, up to rounding):

- segment-segment: the closed form of Ericson, *Real-Time Collision Detection*
  (2005), §5.1.9.
- point-prism: the prism is the Cartesian product of a convex polygon and an interval,
  so the nearest point is (nearest polygon point, clamped depth).
- segment-prism: a segment that misses the prism (clipped by the faces' half-spaces,
  Cyrus and Beck 1978) is closest at an end point or against a prism edge
  (:func:`seg_prism`).  A second method cross-checks it (:func:`seg_prism_slopes`).
- segment-cylinder (and the second segment-prism method): the squared distance from
  the point x(t) of the segment to a convex set is a convex C¹ function of t.  Its
  derivative changes form only at known break points (where x(t) crosses an edge
  line, an edge-end normal line, a cap plane, the cylinder surface); the minimum lies
  where the derivative changes sign.  For the prism the derivative is linear between
  break points (linear interpolation is exact); for the cylinder a safeguarded Newton
  iteration in the bracketing interval converges to machine precision.
- prism-prism: the closest points of two convex polyhedra lie on an edge pair or on a
  vertex and the other solid, so the least of the edge-edge and vertex-solid
  distances (edge pairs that cannot beat the best vertex are skipped).
- prism-cylinder: the least of the prism edges to the cylinder and of each prism face
  to the cylinder's support point in the direction opposite to the face normal (taken
  only when that point lies over the face).

These feature methods measure boundary to boundary; whether two parts overlap is
decided by the caller with :func:`separation_gap` (a separating plane certifies the
distance) and the depth of an overlap by :func:`overlap_depth`.
"""

from __future__ import annotations

import numpy as np

__all__: list[str] = []

_TINY2 = 1e-24  # squared length (mm²) below which a segment is taken as a point


def _dot(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Dot products over the last axis (einsum: much faster than sum over a short axis)."""
    a, b = np.broadcast_arrays(a, b)
    return np.einsum("...k,...k->...", a, b)


def _dot2(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Dot products of 2D vectors (…, 2)."""
    return a[..., 0] * b[..., 0] + a[..., 1] * b[..., 1]


def _norm(v: np.ndarray) -> np.ndarray:
    return np.sqrt(_dot(v, v))


def _unit(v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Unit vectors and a mask of the non-zero ones (zero vectors stay zero)."""
    n = _norm(v)
    ok = n > 1e-300
    with np.errstate(invalid="ignore", divide="ignore"):
        out = np.where(ok[..., None], v / np.where(ok, n, 1.0)[..., None], 0.0)
    return out, ok


# --------------------------------------------------------------------------- segments


def seg_seg(
    p0: np.ndarray, p1: np.ndarray, q0: np.ndarray, q1: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Closest points of segments p0-p1 and q0-q1 (broadcasting).

    Returns (x on the first, y on the second, distance).  Ericson (2005) §5.1.9.
    """
    d1 = p1 - p0
    d2 = q1 - q0
    r = p0 - q0
    a = _dot(d1, d1)
    e = _dot(d2, d2)
    f = _dot(d2, r)
    c = _dot(d1, r)
    b = _dot(d1, d2)
    a_ok = a > _TINY2
    e_ok = e > _TINY2
    a_safe = np.where(a_ok, a, 1.0)
    e_safe = np.where(e_ok, e, 1.0)
    denom = a * e - b * b
    par = denom <= 0.0  # exactly parallel: start from s = 0 (Ericson)
    with np.errstate(invalid="ignore", divide="ignore"):
        s = np.where(par, 0.0, np.clip((b * f - c * e) / np.where(par, 1.0, denom), 0.0, 1.0))
    t = (b * s + f) / e_safe
    s = np.where(t < 0.0, np.clip(-c / a_safe, 0.0, 1.0), s)
    s = np.where(t > 1.0, np.clip((b - c) / a_safe, 0.0, 1.0), s)
    t = np.clip(t, 0.0, 1.0)
    # degenerate segments
    s = np.where(a_ok, s, 0.0)
    t = np.where(a_ok, t, np.clip(f / e_safe, 0.0, 1.0))
    s = np.where(a_ok & ~e_ok, np.clip(-c / a_safe, 0.0, 1.0), s)
    t = np.where(e_ok, t, 0.0)
    x = p0 + s[..., None] * d1
    y = q0 + t[..., None] * d2
    return x, y, _norm(y - x)


# ----------------------------------------------------------------------------- prisms


def prism_edges(poly: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Edge vectors (…, M, 2), squared lengths (…, M) and outward normals (…, M, 2)
    of counter-clockwise polygons."""
    edge = np.roll(poly, -1, axis=-2) - poly
    normal = np.stack([edge[..., 1], -edge[..., 0]], axis=-1)
    return edge, _dot2(edge, edge), normal


def polygon_project(
    q: np.ndarray, poly: np.ndarray, edge: np.ndarray, elen2: np.ndarray, edge_ok: np.ndarray
) -> np.ndarray:
    """Nearest point of a convex polygon (filled) to 2D points q (…, 2); polygon arrays
    broadcast against q with an extra vertex axis."""
    qx, qy = q[..., 0, None], q[..., 1, None]
    wx, wy = qx - poly[..., 0], qy - poly[..., 1]
    ex, ey = edge[..., 0], edge[..., 1]
    with np.errstate(invalid="ignore", divide="ignore"):
        s = np.where(elen2 > 0, (wx * ex + wy * ey) / np.where(elen2 > 0, elen2, 1.0), 0.0)
    np.clip(s, 0.0, 1.0, out=s)
    fx, fy = poly[..., 0] + s * ex, poly[..., 1] + s * ey
    d2 = (qx - fx) ** 2 + (qy - fy) ** 2
    inside = np.all((ex * wy - ey * wx >= 0.0) | ~edge_ok, axis=-1)
    k = np.argmin(d2, axis=-1)[..., None]
    bx = np.take_along_axis(fx, k, axis=-1)[..., 0]
    by = np.take_along_axis(fy, k, axis=-1)[..., 0]
    return np.where(inside[..., None], q, np.stack([bx, by], axis=-1))


def point_prism(
    x: np.ndarray,
    origin: np.ndarray,
    axes: np.ndarray,
    poly: np.ndarray,
    edge_ok: np.ndarray,
    zlo: np.ndarray,
    zhi: np.ndarray,
) -> tuple[np.ndarray, np.ndarray]:
    """Nearest point of a right convex prism to points x (…, 3) and the distance.

    Prism arrays broadcast against x (``poly`` with its vertex axis last but one)."""
    local = np.einsum("...ij,...j->...i", axes, x - origin)
    edge, elen2, _ = prism_edges(poly)
    q = polygon_project(local[..., :2], poly, edge, elen2, edge_ok)
    z = np.clip(local[..., 2], zlo, zhi)
    y = origin + q[..., 0, None] * axes[..., 0, :] + q[..., 1, None] * axes[..., 1, :]
    y = y + z[..., None] * axes[..., 2, :]
    return y, _norm(y - x)


def seg_prism_slopes(
    p0: np.ndarray,
    p1: np.ndarray,
    origin: np.ndarray,
    axes: np.ndarray,
    poly: np.ndarray,
    edge_ok: np.ndarray,
    zlo: np.ndarray,
    zhi: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Closest points of segments (N, 3) and right convex prisms (N, …); exact, by the
    break points of the squared distance along the segment (see the module notes).

    Returns (x on the segment, y on the prism, distance); distance 0 when they meet.
    A second, independent method beside :func:`seg_prism` (used to cross-check it).
    """
    l0 = np.einsum("nij,nj->ni", axes, p0 - origin)
    dl = np.einsum("nij,nj->ni", axes, p1 - p0)
    q0, dq = l0[:, :2], dl[:, :2]
    z0, dz = l0[:, 2], dl[:, 2]
    edge, elen2, normal = prism_edges(poly)
    nxt = np.roll(poly, -1, axis=-2)
    with np.errstate(invalid="ignore", divide="ignore"):
        den_n = np.einsum("nmk,nk->nm", normal, dq)
        den_e = np.einsum("nmk,nk->nm", edge, dq)
        cuts = [
            np.einsum("nmk,nmk->nm", normal, poly - q0[:, None]) / den_n,
            np.einsum("nmk,nmk->nm", edge, poly - q0[:, None]) / den_e,
            np.einsum("nmk,nmk->nm", edge, nxt - q0[:, None]) / den_e,
            ((zlo - z0) / dz)[:, None],
            ((zhi - z0) / dz)[:, None],
        ]
    n = len(p0)
    cuts = [np.where(np.isfinite(c), c, 0.0) for c in cuts]
    cuts[:3] = [np.where(edge_ok, c, 0.0) for c in cuts[:3]]
    bounds = np.concatenate([np.zeros((n, 1)), np.ones((n, 1)), *cuts], axis=1)
    tk = np.sort(np.clip(bounds, 0.0, 1.0), axis=1)
    qk = q0[:, None] + tk[..., None] * dq[:, None]
    zk = z0[:, None] + tk * dz[:, None]
    proj = polygon_project(qk, poly[:, None], edge[:, None], elen2[:, None], edge_ok[:, None])
    gz = zk - np.clip(zk, zlo[:, None], zhi[:, None])
    slope = np.einsum("nkj,nj->nk", qk - proj, dq) + gz * dz[:, None]
    t = _root_of_slope(tk, slope)
    x = p0 + t[:, None] * (p1 - p0)
    y, dist = point_prism(x, origin, axes, poly, edge_ok, zlo, zhi)
    return x, y, dist


def seg_prism(
    p0: np.ndarray,
    p1: np.ndarray,
    origin: np.ndarray,
    axes: np.ndarray,
    poly: np.ndarray,
    edge_ok: np.ndarray,
    zlo: np.ndarray,
    zhi: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Closest points of segments (N, 3) and right convex prisms (N, …); exact.

    Returns (x on the segment, y on the prism, distance); distance 0 when they meet.
    Features: a segment that misses the prism (clipped by its faces' half-spaces, Cyrus
    and Beck 1978) is closest either at an end point or against a prism edge; the ends
    give an upper bound u and a direction e, and only edges whose projection on e comes
    within u of the segment's are measured.
    """
    n = len(p0)
    rows = np.arange(n)
    prism = (origin, axes, poly, edge_ok, zlo, zhi)
    ends = np.stack([p0, p1], axis=1)
    y_end, d_end = point_prism(ends, *(_expand(arr) for arr in prism))
    k = np.argmin(d_end, axis=1)
    x, y, best = ends[rows, k], y_end[rows, k], d_end[rows, k]
    # does the segment cross the prism?  clip it in the prism frame
    l0 = np.einsum("nij,nj->ni", axes, p0 - origin)
    dl = np.einsum("nij,nj->ni", axes, p1 - p0)
    _, _, normal = prism_edges(poly)
    num = np.einsum("nmk,nmk->nm", normal, poly - l0[:, None, :2])  # >= 0 inside
    den = np.einsum("nmk,nk->nm", normal, dl[:, :2])
    num = np.concatenate([num, (zhi - l0[:, 2])[:, None], (l0[:, 2] - zlo)[:, None]], axis=1)
    den = np.concatenate([den, dl[:, 2, None], -dl[:, 2, None]], axis=1)
    ok = np.concatenate([edge_ok, np.ones((n, 2), bool)], axis=1)
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = num / den
    t_in = np.max(np.where(ok & (den < 0), ratio, 0.0), axis=1)
    t_out = np.min(np.where(ok & (den > 0), ratio, 1.0), axis=1)
    miss = np.any(ok & (den == 0) & (num < 0), axis=1)
    meet = ~miss & (t_in <= t_out)
    hit = p0 + t_in[:, None] * (p1 - p0)
    x = np.where(meet[:, None], hit, x)
    y = np.where(meet[:, None], hit, y)
    best = np.where(meet, 0.0, best)
    # prism edges that may come closer than the end points
    verts = prism_vertices(origin, axes, poly, zlo, zhi)
    ei = prism_edge_index(poly.shape[-2])
    e, e_ok = _unit(y - x)
    pv = np.einsum("nvk,nk->nv", verts, e)
    low = np.minimum(pv[:, ei[:, 0]], pv[:, ei[:, 1]])
    top = np.maximum(_dot(p0, e), _dot(p1, e))
    keep = ((low - top[:, None] < best[:, None]) | ~e_ok[:, None]) & ~meet[:, None]
    r, ie = np.nonzero(keep)
    if r.size:
        xs, ys, ds = seg_seg(p0[r], p1[r], verts[r, ei[ie, 0]], verts[r, ei[ie, 1]])
        x, y, best = _merge_best(x, y, best, r, xs, ys, ds)
    return x, y, best


def _root_of_slope(tk: np.ndarray, slope: np.ndarray) -> np.ndarray:
    """Where a non-decreasing piecewise-linear slope, known at sorted tk (N, K), first
    reaches 0 (0 or 1 when it does not change sign)."""
    n = len(tk)
    rows = np.arange(n)
    pos = slope >= 0.0
    idx = np.argmax(pos, axis=1)
    none = ~pos[rows, idx]
    i1 = np.maximum(idx, 1)
    ta, tb = tk[rows, i1 - 1], tk[rows, i1]
    fa, fb = slope[rows, i1 - 1], slope[rows, i1]
    with np.errstate(invalid="ignore", divide="ignore"):
        frac = np.clip(np.where(fb > fa, fa / (fa - fb), 1.0), 0.0, 1.0)
    t = ta + (tb - ta) * frac
    t = np.where(idx == 0, tk[:, 0], t)
    return np.where(none, tk[:, -1], t)


def prism_vertices(
    origin: np.ndarray, axes: np.ndarray, poly: np.ndarray, zlo: np.ndarray, zhi: np.ndarray
) -> np.ndarray:
    """Corners (…, 2M, 3) of right prisms: the zlo ring, then the zhi ring."""
    base = (
        origin[..., None, :]
        + poly[..., 0, None] * axes[..., None, 0, :]
        + poly[..., 1, None] * axes[..., None, 1, :]
    )
    w = axes[..., None, 2, :]
    return np.concatenate(
        [base + zlo[..., None, None] * w, base + zhi[..., None, None] * w], axis=-2
    )


def prism_edge_index(m: int) -> np.ndarray:
    """Vertex index pairs (3M, 2) of a prism's edges: bottom ring, top ring, sides."""
    k = np.arange(m)
    k1 = (k + 1) % m
    return np.concatenate(
        [np.stack([k, k1], 1), np.stack([k + m, k1 + m], 1), np.stack([k, k + m], 1)]
    )


def prism_prism(
    a: tuple[np.ndarray, ...], b: tuple[np.ndarray, ...]
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Boundary-to-boundary closest points of two right convex prisms (N, …).

    ``a``, ``b``: (origin, axes, poly, edge_ok, zlo, zhi).  Exact when they are apart.
    Vertex-solid distances come first; their best gives an upper bound u and a
    direction e, and an edge pair is measured only when the gap of the two edges'
    projections on e (a lower bound of their distance) is below u.
    """
    va = prism_vertices(a[0], a[1], a[2], a[4], a[5])
    vb = prism_vertices(b[0], b[1], b[2], b[4], b[5])
    n = len(va)
    rows = np.arange(n)
    yb, db = point_prism(va, *(_expand(arr) for arr in b))
    xa, da = point_prism(vb, *(_expand(arr) for arr in a))
    x_v = np.concatenate([va, xa], axis=1)
    y_v = np.concatenate([yb, vb], axis=1)
    d_v = np.concatenate([db, da], axis=1)
    k = np.argmin(d_v, axis=1)
    x, y, best = x_v[rows, k], y_v[rows, k], d_v[rows, k]
    ea = prism_edge_index(a[2].shape[-2])
    eb = prism_edge_index(b[2].shape[-2])
    e, ok = _unit(y - x)
    pa = np.einsum("nvk,nk->nv", va, e)
    pb = np.einsum("nvk,nk->nv", vb, e)
    top_a = np.maximum(pa[:, ea[:, 0]], pa[:, ea[:, 1]])
    low_b = np.minimum(pb[:, eb[:, 0]], pb[:, eb[:, 1]])
    keep = (low_b[:, None, :] - top_a[:, :, None] < best[:, None, None]) | ~ok[:, None, None]
    r, ia, ib = np.nonzero(keep)
    if r.size:
        xs, ys, ds = seg_seg(va[r, ea[ia, 0]], va[r, ea[ia, 1]], vb[r, eb[ib, 0]], vb[r, eb[ib, 1]])
        x, y, best = _merge_best(x, y, best, r, xs, ys, ds)
    return x, y, best


def _merge_best(
    x: np.ndarray,
    y: np.ndarray,
    best: np.ndarray,
    r: np.ndarray,
    xs: np.ndarray,
    ys: np.ndarray,
    ds: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Replace row r's (x, y, best) by candidates (xs, ys, ds) that are closer."""
    order = np.lexsort((ds, r))
    first = np.ones(len(order), bool)
    first[1:] = r[order][1:] != r[order][:-1]
    pick = order[first]
    rows = r[pick]
    better = ds[pick] < best[rows]
    rows, pick = rows[better], pick[better]
    x, y, best = x.copy(), y.copy(), best.copy()
    x[rows], y[rows], best[rows] = xs[pick], ys[pick], ds[pick]
    return x, y, best


def _expand(arr: np.ndarray) -> np.ndarray:
    return arr[:, None]


# -------------------------------------------------------------------------- cylinders


def seg_cyl(
    p0: np.ndarray,
    p1: np.ndarray,
    c0: np.ndarray,
    axis: np.ndarray,
    length: np.ndarray,
    radius: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Closest points of segments (N, 3) and capped cylinders (N, …); exact.

    Returns (x on the segment, y on the cylinder, distance); 0 when they meet.
    """
    n = len(p0)
    d = p1 - p0
    rel = p0 - c0
    h0 = _dot(rel, axis)
    dh = _dot(d, axis)
    rho0 = rel - h0[:, None] * axis
    drho = d - dh[:, None] * axis
    qa = _dot(drho, drho)
    qb = _dot(rho0, drho)
    qc = _dot(rho0, rho0) - radius**2
    with np.errstate(invalid="ignore", divide="ignore"):
        disc = np.sqrt(np.maximum(qb * qb - qa * qc, 0.0))
        qq = -(qb + np.where(qb >= 0, disc, -disc))
        roots = [qq / qa, qc / qq]
        cuts = [-h0 / dh, (length - h0) / dh, *roots]
    cuts = [np.where(np.isfinite(c), c, 0.0) for c in cuts]
    bounds = np.stack([np.zeros(n), np.ones(n), *cuts], axis=1)
    tk = np.sort(np.clip(bounds, 0.0, 1.0), axis=1)
    slope, _ = _cyl_slope(
        tk,
        h0[:, None],
        dh[:, None],
        rho0[:, None],
        drho[:, None],
        qa[:, None],
        length[:, None],
        radius[:, None],
    )
    rows = np.arange(n)
    pos = slope >= 0.0
    idx = np.argmax(pos, axis=1)
    none = ~pos[rows, idx]
    t = np.where(none, 1.0, np.where(idx == 0, 0.0, np.nan))
    todo = np.flatnonzero(np.isnan(t))
    if todo.size:
        i1 = idx[todo]
        lo, hi = tk[todo, i1 - 1], tk[todo, i1]
        fa, fb = slope[todo, i1 - 1], slope[todo, i1]
        guess = lo + (hi - lo) * np.clip(fa / (fa - fb), 0.0, 1.0)
        t[todo] = _newton_in_bracket(
            guess,
            lo,
            hi,
            h0[todo],
            dh[todo],
            rho0[todo],
            drho[todo],
            qa[todo],
            length[todo],
            radius[todo],
        )
    x = p0 + t[:, None] * d
    y, dist = point_cyl(x, c0, axis, length, radius)
    return x, y, dist


def _cyl_slope(
    t: np.ndarray,
    h0: np.ndarray,
    dh: np.ndarray,
    rho0: np.ndarray,
    drho: np.ndarray,
    qa: np.ndarray,
    length: np.ndarray,
    radius: np.ndarray,
) -> tuple[np.ndarray, np.ndarray]:
    """Half the first and second derivatives of the squared distance from x(t) to the
    cylinder."""
    h = h0 + t * dh
    rv = rho0 + t[..., None] * drho
    rho = _norm(rv)
    er = np.maximum(rho - radius, 0.0)
    eh = np.where(h < 0.0, h, np.where(h > length, h - length, 0.0))
    radial = er > 0.0
    with np.errstate(invalid="ignore", divide="ignore"):
        rho_safe = np.where(radial, rho, 1.0)
        drho_dt = _dot(rv, drho) / rho_safe
        d2rho = (qa - drho_dt**2) / rho_safe
    slope = np.where(radial, er * drho_dt, 0.0) + eh * dh
    curve = np.where(radial, drho_dt**2 + er * d2rho, 0.0) + np.where(eh != 0.0, dh**2, 0.0)
    return slope, curve


def _newton_in_bracket(
    t: np.ndarray,
    lo: np.ndarray,
    hi: np.ndarray,
    h0: np.ndarray,
    dh: np.ndarray,
    rho0: np.ndarray,
    drho: np.ndarray,
    qa: np.ndarray,
    length: np.ndarray,
    radius: np.ndarray,
    max_iter: int = 100,
) -> np.ndarray:
    """Root of the (non-decreasing) slope in [lo, hi]: Newton steps, bisection when a
    step leaves the bracket (Press et al., *Numerical Recipes*, ``rtsafe``)."""
    t = t.copy()
    lo = lo.copy()
    hi = hi.copy()
    act = np.arange(len(t))
    for _ in range(max_iter):
        if act.size == 0:
            break
        ta = t[act]
        slope, curve = _cyl_slope(
            ta, h0[act], dh[act], rho0[act], drho[act], qa[act], length[act], radius[act]
        )
        neg = slope < 0.0
        lo[act] = np.where(neg, ta, lo[act])
        hi[act] = np.where(neg, hi[act], ta)
        with np.errstate(invalid="ignore", divide="ignore"):
            step = ta - slope / curve
        bad = ~(curve > 0.0) | ~(step > lo[act]) | ~(step < hi[act])
        new = np.where(bad, 0.5 * (lo[act] + hi[act]), step)
        new = np.where(slope == 0.0, ta, new)
        t[act] = new
        done = (slope == 0.0) | (np.abs(new - ta) <= 1e-16) | (hi[act] - lo[act] <= 1e-16)
        act = act[~done]
    return t


def point_cyl(
    x: np.ndarray, c0: np.ndarray, axis: np.ndarray, length: np.ndarray, radius: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Nearest point of a solid capped cylinder to points x (…, 3) and the distance."""
    rel = x - c0
    h = _dot(rel, axis)
    rv = rel - h[..., None] * axis
    rho = _norm(rv)
    with np.errstate(invalid="ignore", divide="ignore"):
        scale = np.where(rho > radius, radius / np.where(rho > 0, rho, 1.0), 1.0)
    y = c0 + np.clip(h, 0.0, length)[..., None] * axis + scale[..., None] * rv
    return y, _norm(y - x)


def prism_cyl(
    a: tuple[np.ndarray, ...], c: tuple[np.ndarray, ...]
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Boundary-to-boundary closest points of right convex prisms and cylinders (N, …).

    ``a``: (origin, axes, poly, edge_ok, zlo, zhi); ``c``: (c0, axis, length, radius).
    Exact when they are apart.  Vertex and face candidates come first; their best gives
    an upper bound u and a direction e, and an edge is measured only when the gap of
    its projection and the cylinder's on e is below u.
    """
    origin, axes, poly, edge_ok, zlo, zhi = a
    n, m = poly.shape[:2]
    rows = np.arange(n)
    va = prism_vertices(origin, axes, poly, zlo, zhi)
    yv, dv = point_cyl(va, *(arr[:, None] for arr in c))
    # faces: outward unit normals (n, m + 2, 3)
    edge, elen2, normal = prism_edges(poly)
    nlen = np.sqrt(np.where(edge_ok, elen2, 1.0))
    side_n = normal[..., 0, None] * axes[:, None, 0] + normal[..., 1, None] * axes[:, None, 1]
    side_n = side_n / nlen[..., None]
    w = axes[:, 2]
    normals = np.concatenate([side_n, w[:, None], -w[:, None]], axis=1)
    c0, c_axis, c_len, c_rad = c
    _, yf = support_cyl(c0[:, None], c_axis[:, None], c_len[:, None], c_rad[:, None], -normals)
    local = np.einsum("nij,nfj->nfi", axes, yf - origin[:, None])
    q, z = local[..., :2], local[..., 2]
    qs = q[:, :m]
    along = np.einsum("nmk,nmk->nm", qs - poly, edge)
    height = np.einsum("nmk,nmk->nm", qs - poly, normal) / nlen
    side_ok = (
        edge_ok
        & (along >= 0.0)
        & (along <= elen2)
        & (z[:, :m] >= zlo[:, None])
        & (z[:, :m] <= zhi[:, None])
    )
    cap_q = q[:, m:]
    inside = np.all(
        (
            edge[:, None, :, 0] * (cap_q[:, :, None, 1] - poly[:, None, :, 1])
            - edge[:, None, :, 1] * (cap_q[:, :, None, 0] - poly[:, None, :, 0])
            >= 0.0
        )
        | ~edge_ok[:, None],
        axis=-1,
    )
    gap = np.concatenate([height, (z[:, m] - zhi)[:, None], (zlo - z[:, m + 1])[:, None]], axis=1)
    ok = np.concatenate([side_ok, inside], axis=1)
    xf = yf - gap[..., None] * normals
    df = np.where(ok, np.abs(gap), np.inf)
    x_all = np.concatenate([va, xf], axis=1)
    y_all = np.concatenate([yv, yf], axis=1)
    d_all = np.concatenate([dv, df], axis=1)
    k = np.argmin(d_all, axis=1)
    x, y, best = x_all[rows, k], y_all[rows, k], d_all[rows, k]
    # edges that may come closer than the best so far
    ei = prism_edge_index(m)
    e, e_ok = _unit(y - x)
    low_c = -support_cyl(c0, c_axis, c_len, c_rad, -e)[0]
    pa = np.einsum("nvk,nk->nv", va, e)
    top = np.maximum(pa[:, ei[:, 0]], pa[:, ei[:, 1]])
    keep = (low_c[:, None] - top < best[:, None]) | ~e_ok[:, None]
    r, ie = np.nonzero(keep)
    if r.size:
        xs, ys, ds = seg_cyl(va[r, ei[ie, 0]], va[r, ei[ie, 1]], *(arr[r] for arr in c))
        x, y, best = _merge_best(x, y, best, r, xs, ys, ds)
    return x, y, best


# ------------------------------------------------------------------- support functions


def support_seg(
    p0: np.ndarray, p1: np.ndarray, radius: np.ndarray, e: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Support value max(e·x) and a support point of capsules along unit directions e."""
    h0 = _dot(p0, e)
    h1 = _dot(p1, e)
    point = np.where((h1 > h0)[..., None], p1, p0) + radius[..., None] * e
    return np.maximum(h0, h1) + radius, point


def support_points(verts: np.ndarray, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Support value and point of the convex hull of verts (…, V, 3) along e (…, 3)."""
    h = np.einsum("...vk,...k->...v", verts, e)
    k = np.argmax(h, axis=-1)
    point = np.take_along_axis(verts, k[..., None, None], axis=-2)[..., 0, :]
    return np.take_along_axis(h, k[..., None], axis=-1)[..., 0], point


def support_cyl(
    c0: np.ndarray, axis: np.ndarray, length: np.ndarray, radius: np.ndarray, e: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Support value and point of capped cylinders along unit directions e."""
    ea = _dot(e, axis)
    along = np.where(ea > 0.0, length, np.where(ea < 0.0, 0.0, 0.5 * length))
    perp = e - ea[..., None] * axis
    perp = perp - _dot(perp, axis)[..., None] * axis
    size = _norm(perp)
    flat = size <= 1e-12 * _norm(e)  # e along the axis: a cap centre
    with np.errstate(invalid="ignore", divide="ignore"):
        radial = np.where(flat[..., None], 0.0, perp / np.where(flat, 1.0, size)[..., None])
    point = c0 + along[..., None] * axis + radius[..., None] * radial
    return _dot(point, e), point
