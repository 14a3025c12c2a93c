"""Least distance between solids, pose by pose and over a sweep of poses.

:func:`separation` measures a pair of solids (see :mod:`plumbrod.geometry.shapes`) at every pose
of a batch; :func:`least_separation` finds the pose of a sweep where a pair comes
closest; :func:`least_separations` does that for many pairs at once (a whole design),
sharing the work between pairs.

Pairs measured: capsule-capsule, capsule-box, capsule-cylinder, capsule-prism,
plate-box, plate-cylinder, plate-prism, plate-capsule, plate-plate, in either order
(box-box, box-cylinder and box-prism work too).  Cylinder-cylinder, cylinder-prism and
prism-prism pairs are not measured.

Distance (``distance_mm``) is surface to surface, mm.

- Apart: exact up to rounding (closed forms or exact convex minimisation in
  :mod:`plumbrod.clearance._distance_kernels`); ``point_a`` and ``point_b`` are the closest
  points.  For plates and boxes the kernel's answer is certified by a separating
  plane: the gap of the two solids' projections on the line joining the points equals
  the distance.
- Overlapping: the distance is negative, ``-depth``, and the depth is the minimum
  translation distance: the length of the shortest translation of A after which the
  two solids only touch, the least over unit directions e of h_A(e) + h_B(-e) (support
  functions), the same in every frame.  For a capsule against a convex zone whose core
  stays outside the zone it is ``radius - core distance``; for two capsules
  ``r_a + r_b - core distance``.  Otherwise :mod:`plumbrod.clearance._overlap_depth`
  takes the least over a finite set of directions that contains the minimiser (face
  normals and edge cross products for boxes, plates, convex prisms and capsule cores;
  against a cylinder also its axis, the radial and rim directions of the vertices and
  the normals to the ellipses its disc makes seen along each edge), so the depth is
  exact for every pair of convex solids.  Against a non-convex prism it is the least
  translation, along the directions of all its convex pieces, that clears A of all
  pieces at once: an upper bound of the minimum translation distance (it never
  understates the interference), fixed by the solids alone.  ``point_a`` is then the
  point of A deepest towards B along the chosen direction ``e``, and ``point_b`` the
  point of B nearest to ``point_a + distance * e`` (where A's deepest point has to go).

For separated solids, and for the exact overlaps of capsules described above,
``point_b - point_a = distance_mm * e`` with ``e`` the unit vector from A towards B;
for the other overlaps too whenever ``point_a + distance * e`` lies in B (a capsule
end inside a box face, for example).

References: C. Ericson, *Real-Time Collision Detection*, Morgan Kaufmann (2005),
§5.1.9 (closest points of two segments); S. Gottschalk, M. C. Lin, D. Manocha, "OBBTree:
a hierarchical structure for rapid interference detection", SIGGRAPH 1996
(separating axes).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from plumbrod.clearance import _distance_kernels as kern
from plumbrod.clearance import _overlap_depth as depth_of
from plumbrod.clearance import _solid_parts as parts
from plumbrod.geometry.shapes import Box, Capsule, Cylinder, GeometryError, Plate, Prism, Solid

__all__ = [
    "LeastSeparation",
    "Separation",
    "least_separation",
    "least_separations",
    "separation",
]

_CORE_MEETS_MM = 1e-11  # a capsule core closer than this to a zone counts as inside it
_TIE_MM = 1e-9  # least_separations: poses that can only tie the best within this are skipped


@dataclass(frozen=True, eq=False)
class Separation:
    """Least distance between two solids at each pose of a batch.

    ``distance_mm`` (...): surface to surface, negative when they overlap (then minus
    an interference depth); ``point_a``, ``point_b`` (..., 3): the closest points of
    the first and second solid (deepest points when overlapping), chassis frame, mm;
    ``normal`` (..., 3): the unit direction ``e`` from A towards B along which the
    distance is measured (moving A by ``distance_mm * normal`` closes a gap; when they
    overlap, moving A by ``distance_mm * normal`` (backwards) separates them).
    """

    distance_mm: np.ndarray
    point_a: np.ndarray
    point_b: np.ndarray
    normal: np.ndarray


@dataclass(frozen=True, eq=False)
class LeastSeparation:
    """The pose of a sweep where two solids come closest.

    ``distance_mm``: the least distance (negative = interference depth);
    ``pose_index``: its pose in the sweep; ``point_a``, ``point_b`` (3,): the closest
    (or deepest) points there, mm; ``poses_evaluated``: poses measured exactly (the
    others were ruled out by lower bounds); ``pose_count``: poses in the sweep.
    """

    distance_mm: float
    pose_index: int
    point_a: np.ndarray
    point_b: np.ndarray
    poses_evaluated: int
    pose_count: int


# ------------------------------------------------------------------------ pair set-up

_A_SIDE = (Capsule, Plate, Box)  # single-piece solids that can be measured first
_SUPPORTED = (Capsule, Plate, Box, Cylinder, Prism)


def _order(a: Solid, b: Solid) -> tuple[Solid, Solid, bool]:
    """Put the pair in kernel order: a capsule first, else a plate, else a box."""
    for solid in (a, b):
        if not isinstance(solid, _SUPPORTED):
            raise GeometryError(
                "separation", "solids from plumbrod.geometry.shapes", type(solid).__name__
            )
    rank = {Capsule: 0, Plate: 1, Box: 2, Cylinder: 3, Prism: 4}
    ra, rb = rank[type(a)], rank[type(b)]
    first, second, swapped = (a, b, False) if ra <= rb else (b, a, True)
    if not isinstance(first, _A_SIDE):
        raise GeometryError(
            "separation",
            "a pair with a Capsule, a Plate or a Box (cylinder-cylinder, cylinder-prism "
            "and prism-prism are not measured)",
            f"{type(a).__name__} and {type(b).__name__}",
        )
    return first, second, swapped


def _parts_for(a: Solid, b: Solid) -> tuple[parts.Part, parts.Part, tuple[int, ...], int]:
    """Parts of an ordered pair broadcast to their common batch; b gets a piece axis."""
    pa, a_pieces = parts.part_of(a)
    pb, b_pieces = parts.part_of(b)
    assert not a_pieces
    if not b_pieces:
        pb = parts.add_piece_axis(pb)
    batch = np.broadcast_shapes(parts.batch_of(pa, False), parts.batch_of(pb, True))
    count = pb[1][0].shape[-1 - parts.CORE_NDIM[pb[0]][0]]
    return (
        parts.broadcast_part(pa, batch, None),
        parts.broadcast_part(pb, batch, count),
        batch,
        count,
    )


def _own_part(solid: Solid, second: bool) -> tuple[parts.Part, int]:
    """A solid's part broadcast to its own batch; as the second of a pair it gets a
    piece axis.  Returns the part and its piece count."""
    part, has_pieces = parts.part_of(solid)
    if not second:
        return parts.broadcast_part(part, solid.batch_shape, None), 1
    if not has_pieces:
        part = parts.add_piece_axis(part)
    count = part[1][0].shape[-1 - parts.CORE_NDIM[part[0]][0]]
    return parts.broadcast_part(part, solid.batch_shape, count), count


# ------------------------------------------------------------------------- evaluation


def _flatten(part: parts.Part, extra: int) -> parts.Part:
    """Merge the batch axes of a part into one leading axis, keeping ``extra`` axes
    (the piece axis) after it."""
    kind, arrays = part
    out = []
    for arr, core in zip(arrays, parts.CORE_NDIM[kind], strict=True):
        keep = arr.shape[arr.ndim - core - extra :]
        out.append(np.reshape(arr, (-1, *keep)))
    return kind, tuple(out)


def _evaluate(
    a: parts.Part, b: parts.Part
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Signed distance, points and unit direction (A towards B) for N pose pairs.

    ``a`` arrays have a leading (N,) axis, ``b`` arrays (N, P) (P convex pieces).
    """
    ka, arr_a = a
    kb, arr_b = b
    n, p = arr_b[0].shape[:2]
    flat_a = tuple(
        np.broadcast_to(x[:, None], (n, p, *x.shape[1:])).reshape(n * p, *x.shape[1:])
        for x in arr_a
    )
    flat_b = tuple(x.reshape(n * p, *x.shape[2:]) for x in arr_b)
    ra = flat_a[2] if ka == "seg" else np.zeros(n * p)
    rb = flat_b[2] if kb == "seg" else np.zeros(n * p)
    if ka == "seg":
        if kb == "seg":
            x, y, dc = kern.seg_seg(flat_a[0], flat_a[1], flat_b[0], flat_b[1])
        elif kb == "prism":
            x, y, dc = kern.seg_prism(flat_a[0], flat_a[1], *flat_b)
        else:
            x, y, dc = kern.seg_cyl(flat_a[0], flat_a[1], *flat_b)
    elif kb == "prism":
        x, y, dc = kern.prism_prism(flat_a, flat_b)
    else:
        x, y, dc = kern.prism_cyl(flat_a, flat_b)
    e, e_ok = kern._unit(y - x)
    if ka == "seg" and kb == "seg":
        # two capsules: exact also when they overlap; crossing cores get the common normal
        d1 = flat_a[1] - flat_a[0]
        d2 = flat_b[1] - flat_b[0]
        e = np.where(e_ok[:, None], e, _crossing_normal(d1, d2))
        sd = dc - ra - rb
        return sd, x + ra[:, None] * e, y - rb[:, None] * e, e
    sd = dc - ra
    pa = x + ra[:, None] * e
    if ka == "seg":
        trouble = dc <= _CORE_MEETS_MM
        if p > 1:
            trouble = trouble | (sd <= 0.0)
    else:
        scale = np.maximum(np.max(np.abs(x), axis=1), np.max(np.abs(y), axis=1))
        h_a, _ = parts.support((ka, flat_a), e)
        h_b, _ = parts.support((kb, flat_b), -e)
        gap = -h_b - h_a
        trouble = ~e_ok | (gap < dc - (1e-10 + 1e-13 * scale))
    sd = sd.reshape(n, p)
    k = np.argmin(sd, axis=1)
    rows = np.arange(n)
    out_sd = sd[rows, k]
    pick = rows * p + k
    out_pa, out_pb, out_e = pa[pick], y[pick], e[pick]
    bad = np.flatnonzero(trouble.reshape(n, p).any(axis=1))
    if bad.size:
        dirs_kernel = e.reshape(n, p, 3)[bad]
        sub_a = (ka, tuple(arr[bad] for arr in arr_a))
        sub_b = (kb, tuple(arr[bad] for arr in arr_b))
        depth, e_ab, deep_a, deep_b = depth_of.overlap_depth(sub_a, sub_b, dirs_kernel)
        overlap = depth > 0.0
        idx = bad[overlap]
        out_sd[idx] = -depth[overlap]
        out_pa[idx] = deep_a[overlap]
        out_pb[idx] = deep_b[overlap]
        out_e[idx] = e_ab[overlap]
        # a separating direction exists: keep the kernel's (boundary) answer, >= 0
        sep = bad[~overlap]
        out_sd[sep] = np.maximum(out_sd[sep], 0.0)
    return out_sd, out_pa, out_pb, out_e


def _crossing_normal(d1: np.ndarray, d2: np.ndarray) -> np.ndarray:
    """A unit normal to two crossing segments (N, 3): d1 x d2, else normal to the
    longer one, else +z."""
    normal, ok = kern._unit(np.cross(d1, d2))
    longer = np.where((np.sum(d1 * d1, -1) >= np.sum(d2 * d2, -1))[:, None], d1, d2)
    axis = np.eye(3)[np.argmin(np.abs(longer), axis=-1)]
    perp, perp_ok = kern._unit(np.cross(longer, axis))
    fallback = np.where(perp_ok[:, None], perp, np.array([0.0, 0.0, 1.0]))
    return np.where(ok[:, None], normal, fallback)


def separation(a: Solid, b: Solid) -> Separation:
    """Least distance between solids ``a`` and ``b`` at every pose of their batch.

    The batch shapes of the two solids broadcast; the result has that shape.  See the
    module docstring for the meaning of negative distances and of the points.
    """
    first, second, swapped = _order(a, b)
    part_a, part_b, batch, _ = _parts_for(first, second)
    sd, pa, pb, e = _evaluate(_flatten(part_a, 0), _flatten(part_b, 1))
    if swapped:
        pa, pb, e = pb, pa, -e
    return Separation(
        sd.reshape(batch), pa.reshape(*batch, 3), pb.reshape(*batch, 3), e.reshape(*batch, 3)
    )


# ------------------------------------------------------------------ least over a sweep


class _Group:
    """Pairs of one kernel signature, their solids stacked for gathering by pose."""

    def __init__(self, key: tuple, pose_count: int) -> None:
        self.key = key
        self.pose_count = pose_count
        self.pair_ids: list[int] = []
        self.a_index: list[int] = []
        self.b_index: list[int] = []
        self.a_parts: list[parts.Part] = []
        self.b_parts: list[parts.Part] = []
        self._a_seen: dict[int, int] = {}
        self._b_seen: dict[int, int] = {}

    def add(self, pair_id: int, a: Solid, b: Solid, pa: parts.Part, pb: parts.Part) -> None:
        self.pair_ids.append(pair_id)
        for solid, part, seen, index, store in (
            (a, pa, self._a_seen, self.a_index, self.a_parts),
            (b, pb, self._b_seen, self.b_index, self.b_parts),
        ):
            if id(solid) not in seen:
                seen[id(solid)] = len(store)
                store.append(part)
            index.append(seen[id(solid)])

    def freeze(self) -> None:
        """Stack the solids: arrays (solids, poses or 1, ...)."""
        self.a_stack, self.a_moving = self._stack(self.a_parts, 0)
        self.b_stack, self.b_moving = self._stack(self.b_parts, 1)
        self.a_idx = np.asarray(self.a_index)
        self.b_idx = np.asarray(self.b_index)
        self.ids = np.asarray(self.pair_ids)
        kind, arr = self.a_stack
        self.a_verts = (
            kern.prism_vertices(arr[0], arr[1], arr[2], arr[4], arr[5]) if kind == "prism" else None
        )

    def support_a(self, local: np.ndarray, pose: np.ndarray, e: np.ndarray) -> np.ndarray:
        """Support values (r, k) of the first solids of pairs ``local`` at ``pose`` along
        unit directions e (r, k, 3)."""
        solid = self.a_idx[local]
        at = pose if self.a_moving else np.zeros_like(pose)
        if self.a_verts is not None:
            verts = self.a_verts[solid, at]  # (r, V, 3)
            return np.max(np.einsum("rvj,rkj->rkv", verts, e), axis=-1)
        _, arr = self.a_stack
        p0, p1, radius = (x[solid, at] for x in arr)
        h0 = np.einsum("rj,rkj->rk", p0, e)
        h1 = np.einsum("rj,rkj->rk", p1, e)
        return np.maximum(h0, h1) + radius[:, None]

    def _stack(self, plist: list[parts.Part], extra: int) -> tuple[parts.Part, bool]:
        kind = plist[0][0]
        cores = parts.CORE_NDIM[kind]
        moving = any(p[1][0].ndim - cores[0] - extra > 0 for p in plist)
        poses = self.pose_count if moving else 1
        arrays = []
        for j, core in enumerate(cores):
            items = []
            for _, arrs in plist:
                arr = arrs[j]
                tail = arr.shape[arr.ndim - core - extra :]
                items.append(np.broadcast_to(arr, (poses, *tail)))
            arrays.append(np.stack(items))
        return (kind, tuple(arrays)), moving

    def low_b(self, local: np.ndarray, pose: np.ndarray, e: np.ndarray) -> np.ndarray:
        """Least projection min(e·y) (r, k) of the second solids of pairs ``local`` at
        ``pose`` on unit directions e (r, k, 3)."""
        solid = self.b_idx[local]
        at = pose if self.b_moving else np.zeros_like(pose)
        kind, arr = self.b_stack
        if kind == "seg":
            p0, p1, radius = (x[solid, at, 0] for x in arr)
            h0 = np.einsum("rj,rkj->rk", p0, e)
            h1 = np.einsum("rj,rkj->rk", p1, e)
            return np.minimum(h0, h1) - radius[:, None]
        if kind == "cyl":
            c0, axis, length, radius = (x[solid, at, 0] for x in arr)
            h, _ = kern.support_cyl(
                c0[:, None], axis[:, None], length[:, None], radius[:, None], -e
            )
            return -h
        b = (kind, tuple(x[solid, at][:, None] for x in arr))
        h, _ = parts.support(b, -e[:, :, None, :])
        return np.min(-h, axis=-1)

    def gather(self, local: np.ndarray, pose: np.ndarray) -> tuple[parts.Part, parts.Part]:
        """Parts for pairs ``local`` (indices into this group) at poses ``pose``."""
        pa = pose if self.a_moving else np.zeros_like(pose)
        pb = pose if self.b_moving else np.zeros_like(pose)
        a = parts.take(self.a_stack, (self.a_idx[local], pa))
        b = parts.take(self.b_stack, (self.b_idx[local], pb))
        return a, b


def _motion_bounds(solid: Solid, reference: np.ndarray) -> np.ndarray:
    """Upper bound (n,) of how far any point of ``solid`` moves between pose i and pose
    ``reference[i]``; zeros for a fixed solid."""
    keys = parts.motion_keypoints(solid)
    if keys is None:
        return np.zeros(len(reference))
    pts, lengths, turn = keys
    step = pts - pts[reference]
    move = np.sqrt(np.max(np.einsum("nkj,nkj->nk", step, step), axis=-1))
    move = move + np.abs(lengths - lengths[reference])
    turned = turn - turn[reference]
    return move + np.sqrt(np.einsum("nj,nj->n", turned, turned))


def _pose_count(pairs: Sequence[tuple[Solid, Solid]]) -> int:
    counts = set()
    for a, b in pairs:
        for solid in (a, b):
            shape = solid.batch_shape
            if len(shape) > 1:
                raise GeometryError(
                    "least_separation",
                    "solids with a pose batch (n,) or ()",
                    f"batch shape {shape}",
                )
            if shape:
                counts.add(shape[0])
    if len(counts) > 1:
        raise GeometryError(
            "least_separations",
            "one pose count for every moving solid",
            f"pose counts {sorted(counts)}",
        )
    return counts.pop() if counts else 1


def least_separations(
    pairs: Sequence[tuple[Solid, Solid]], *, sample_every: int | None = None
) -> list[LeastSeparation]:
    """The least separation over a sweep of poses for each pair of solids.

    Every moving solid carries the same pose batch (n,); fixed solids have batch
    ``()``.  The answer is exactly the minimum of :func:`separation` over the poses,
    found without measuring most poses:

    1. measure every pair at every ``sample_every``-th pose (and the last);
    2. bound each other pose i from below by the nearest samples j: the distance at j
       minus how far each solid can move between j and i (largest travel of its
       defining points), and the gap of the two solids' projections at pose i on the
       direction that separated them at j;
    3. measure only the poses whose lower bound is below the least distance found
       (or below 0, so that every possible interference is measured).

    Poses whose bound is within 1e-9 mm of the least distance can only tie with it and
    are not measured: when several poses tie, the one reported may not be the first.
    """
    n = _pose_count(pairs)
    step = sample_every if sample_every is not None else max(1, n // 48)
    if step < 1:
        raise GeometryError("least_separations.sample_every", "an integer >= 1", f"{step}")
    samples = np.arange(0, n, step)
    if samples[-1] != n - 1:
        samples = np.append(samples, n - 1)
    ns = len(samples)
    left = np.minimum(np.arange(n) // step, ns - 1)
    right = np.minimum(left + 1, ns - 1)

    groups: dict[tuple, _Group] = {}
    swapped = np.zeros(len(pairs), bool)
    solid_ids: list[tuple[Solid, Solid]] = []
    cache: dict[tuple[int, bool], tuple[parts.Part, int]] = {}
    for i, (a, b) in enumerate(pairs):
        first, second, swapped[i] = _order(a, b)
        for solid, role in ((first, False), (second, True)):
            if (id(solid), role) not in cache:
                cache[id(solid), role] = _own_part(solid, role)
        part_a, _ = cache[id(first), False]
        part_b, count = cache[id(second), True]
        m_a = part_a[1][2].shape[-2] if part_a[0] == "prism" else 0
        m_b = part_b[1][2].shape[-2] if part_b[0] == "prism" else 0
        key = (part_a[0], part_b[0], m_a, m_b, count, bool(second.batch_shape))
        groups.setdefault(key, _Group(key, n)).add(i, first, second, part_a, part_b)
        solid_ids.append((first, second))
    for group in groups.values():
        group.freeze()

    npairs = len(pairs)
    sd_s = np.empty((npairs, ns))
    pa_s = np.empty((npairs, ns, 3))
    pb_s = np.empty((npairs, ns, 3))
    e_s = np.empty((npairs, ns, 3))
    low_b_s = np.empty((npairs, ns))  # min over B of e·y at the samples (fixed zones)
    for group in groups.values():
        g = len(group.ids)
        local = np.repeat(np.arange(g), ns)
        pose = np.tile(samples, g)
        part_a, part_b = group.gather(local, pose)
        sd, pa, pb, e = _evaluate(part_a, part_b)
        if not group.b_moving:
            h_b, _ = parts.support(part_b, -e[:, None, :])
            low_b_s[group.ids] = np.min(-h_b, axis=1).reshape(g, ns)
        sd_s[group.ids] = sd.reshape(g, ns)
        pa_s[group.ids] = pa.reshape(g, ns, 3)
        pb_s[group.ids] = pb.reshape(g, ns, 3)
        e_s[group.ids] = e.reshape(g, ns, 3)
    best = np.min(sd_s, axis=1)
    threshold = np.maximum(best, 0.0)

    # lower bounds from motion: d_i >= d_j - travel_a(i, j) - travel_b(i, j)
    bounds: dict[int, tuple[np.ndarray, np.ndarray]] = {}
    for first, second in solid_ids:
        for solid in (first, second):
            if id(solid) not in bounds:
                bounds[id(solid)] = (
                    _motion_bounds(solid, samples[left]),
                    _motion_bounds(solid, samples[right]),
                )
    travel_l = np.stack([bounds[id(f)][0] + bounds[id(s)][0] for f, s in solid_ids])
    travel_r = np.stack([bounds[id(f)][1] + bounds[id(s)][1] for f, s in solid_ids])
    lower = np.maximum(sd_s[:, left] - travel_l, sd_s[:, right] - travel_r)
    # poses bounded within _TIE_MM of the best could only tie with it: not measured
    threshold = threshold - _TIE_MM
    todo = lower < threshold[:, None]
    todo[:, samples] = False

    extra_sd: list[np.ndarray] = []
    extra_pa: list[np.ndarray] = []
    extra_pb: list[np.ndarray] = []
    extra_pair: list[np.ndarray] = []
    extra_pose: list[np.ndarray] = []
    for group in groups.values():
        local, pose = np.nonzero(todo[group.ids])
        if local.size == 0:
            continue
        pid = group.ids[local]
        # lower bound from the separating directions found at the neighbouring samples
        jl, jr = left[pose], right[pose]
        dirs = np.stack([e_s[pid, jl], e_s[pid, jr]], axis=1)  # (r, 2, 3)
        h_a = group.support_a(local, pose, dirs)
        if group.b_moving:
            low_b = group.low_b(local, pose, dirs)
        else:
            low_b = np.stack([low_b_s[pid, jl], low_b_s[pid, jr]], axis=1)
        gap = np.max(low_b - h_a, axis=1)
        keep = gap < threshold[pid]
        if not np.any(keep):
            continue
        local, pose, pid = local[keep], pose[keep], pid[keep]
        sd, pa, pb, _ = _evaluate(*group.gather(local, pose))
        extra_sd.append(sd)
        extra_pa.append(pa)
        extra_pb.append(pb)
        extra_pair.append(pid)
        extra_pose.append(pose)

    all_sd = np.concatenate([sd_s.ravel(), *extra_sd])
    all_pa = np.concatenate([pa_s.reshape(-1, 3), *extra_pa])
    all_pb = np.concatenate([pb_s.reshape(-1, 3), *extra_pb])
    all_pair = np.concatenate([np.repeat(np.arange(npairs), ns), *extra_pair])
    all_pose = np.concatenate([np.tile(samples, npairs), *extra_pose])
    order = np.lexsort((all_pose, all_sd, all_pair))
    first_of = np.searchsorted(all_pair[order], np.arange(npairs))
    pick = order[first_of]
    counts = np.bincount(all_pair, minlength=npairs)
    out = []
    for i in range(npairs):
        k = pick[i]
        pa, pb = all_pa[k], all_pb[k]
        if swapped[i]:
            pa, pb = pb, pa
        out.append(
            LeastSeparation(
                float(all_sd[k]), int(all_pose[k]), pa.copy(), pb.copy(), int(counts[i]), n
            )
        )
    return out


def least_separation(a: Solid, b: Solid, *, sample_every: int | None = None) -> LeastSeparation:
    """The pose of a sweep where solids ``a`` and ``b`` come closest (or interfere most).

    Moving solids carry a pose batch (n,); fixed ones have batch ``()``.  Equals the
    minimum of :func:`separation` over the poses; see :func:`least_separations`.
    """
    return least_separations([(a, b)], sample_every=sample_every)[0]
