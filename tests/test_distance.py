"""Least distance between solids: hand-computed cases, sampling, shapely, invariance."""

from __future__ import annotations

import tempfile
from pathlib import Path

import numpy as np
import pytest
import shapely
from hypothesis import configuration, example, given, settings
from hypothesis import strategies as st
from scipy.optimize import minimize
from scipy.spatial import cKDTree
from scipy.spatial.transform import Rotation

from plumbrod.clearance.distance import least_separation, least_separations, separation
from plumbrod.geometry.shapes import Box, Capsule, Cylinder, GeometryError, Plate, Prism

# pyproject's norecursedirs replaces pytest's defaults, so a '.hypothesis' folder in the
# work tree makes the next collection warn (an error under filterwarnings=error): keep
# hypothesis's files out of the work tree.
configuration.set_hypothesis_home_dir(Path(tempfile.gettempdir()) / "plumbrod-hypothesis")

# ----------------------------------------------------------------------------- helpers


def _unit(v):
    v = np.asarray(v, float)
    return v / np.linalg.norm(v)


def _perp_basis(a):
    a = _unit(a)
    t = np.eye(3)[np.argmin(np.abs(a))]
    u = _unit(np.cross(a, t))
    return u, np.cross(a, u)


def sample_surface(solid, spacing):
    """Points on the surface of a solid, about ``spacing`` mm apart (unbatched)."""
    if isinstance(solid, Capsule):
        d = solid.p1 - solid.p0
        length = np.linalg.norm(d)
        r = float(solid.radius)
        n_t = max(2, int(length / spacing) + 1)
        n_s = max(8, int(np.pi * r / spacing) + 1)
        # sphere points around the core samples cover the capsule surface
        th = np.linspace(0, np.pi, n_s)
        ph = np.linspace(0, 2 * np.pi, 2 * n_s, endpoint=False)
        th, ph = np.meshgrid(th, ph)
        sph = np.stack([np.sin(th) * np.cos(ph), np.sin(th) * np.sin(ph), np.cos(th)], -1)
        core = solid.p0 + np.linspace(0, 1, n_t)[:, None] * d
        return (core[:, None, None] + r * sph[None]).reshape(-1, 3)
    if isinstance(solid, Box):
        h = solid.half_size
        pts = []
        for k in range(3):
            i, j = [m for m in range(3) if m != k]
            a = np.linspace(-h[i], h[i], max(2, int(2 * h[i] / spacing) + 1))
            b = np.linspace(-h[j], h[j], max(2, int(2 * h[j] / spacing) + 1))
            a, b = np.meshgrid(a, b)
            for sgn in (-1, 1):
                p = np.zeros((a.size, 3))
                p[:, i], p[:, j], p[:, k] = a.ravel(), b.ravel(), sgn * h[k]
                pts.append(p)
        return np.concatenate(pts) @ solid.rotation.T + solid.centre
    if isinstance(solid, Cylinder):
        d = solid.p1 - solid.p0
        length = np.linalg.norm(d)
        r = float(solid.radius)
        u, v = _perp_basis(d)
        ph = np.linspace(0, 2 * np.pi, max(16, int(2 * np.pi * r / spacing)), endpoint=False)
        ring = np.cos(ph)[:, None] * u + np.sin(ph)[:, None] * v
        hs = np.linspace(0, 1, max(2, int(length / spacing) + 1))
        side = solid.p0 + hs[:, None, None] * d + r * ring[None]
        rr = np.linspace(0, r, max(2, int(r / spacing) + 1))
        disc = (rr[:, None, None] * ring[None]).reshape(-1, 3)
        return np.concatenate([side.reshape(-1, 3), solid.p0 + disc, solid.p1 + disc])
    if isinstance(solid, Plate):
        frame = np.stack([solid.axes[0], solid.axes[1], solid.axes[2]])
        pts2 = _fill_polygon(solid.polygon_uv, spacing)
        half = 0.5 * float(solid.thickness)
        out = []
        for z in (-half, half):
            out.append(solid.origin + np.c_[pts2, np.full(len(pts2), z)] @ frame)
        ring = _ring(solid.polygon_uv, spacing)
        for z in np.linspace(-half, half, max(2, int(2 * half / spacing) + 1)):
            out.append(solid.origin + np.c_[ring, np.full(len(ring), z)] @ frame)
        return np.concatenate(out)
    if isinstance(solid, Prism):
        frame = np.stack([solid.u, solid.v, solid.w])
        pts2 = _fill_polygon(solid.polygon_2d, spacing)
        out = [
            np.c_[pts2, np.full(len(pts2), z)] @ frame for z in (solid.depth_min, solid.depth_max)
        ]
        ring = _ring(solid.polygon_2d, spacing)
        for z in np.linspace(
            solid.depth_min,
            solid.depth_max,
            max(2, int((solid.depth_max - solid.depth_min) / spacing) + 1),
        ):
            out.append(np.c_[ring, np.full(len(ring), z)] @ frame)
        return np.concatenate(out)
    raise TypeError(solid)


def _ring(poly, spacing):
    pts = []
    for a, b in zip(poly, np.roll(poly, -1, axis=0), strict=True):
        n = max(2, int(np.linalg.norm(b - a) / spacing) + 1)
        pts.append(a + np.linspace(0, 1, n)[:, None] * (b - a))
    return np.concatenate(pts)


def _fill_polygon(poly, spacing):
    lo, hi = poly.min(0), poly.max(0)
    xs = np.arange(lo[0], hi[0] + spacing, spacing)
    ys = np.arange(lo[1], hi[1] + spacing, spacing)
    g = np.stack(np.meshgrid(xs, ys), -1).reshape(-1, 2)
    inside = shapely.contains_xy(shapely.Polygon(poly), g[:, 0], g[:, 1])
    return np.concatenate([g[inside], _ring(poly, spacing)])


def sampled_distance(a, b, spacing):
    """Least distance between surface samples of two solids (an upper bound of the true
    distance of separated solids) -- the brute-force reference."""
    pa, pb = sample_surface(a, spacing), sample_surface(b, spacing)
    return float(cKDTree(pb).query(pa)[0].min())


def contains(solid, x, tol=1e-7):
    """Independent membership test of a point in a solid (tolerance tol mm)."""
    if isinstance(solid, Capsule):
        d = solid.p1 - solid.p0
        t = np.clip(np.dot(x - solid.p0, d) / max(np.dot(d, d), 1e-300), 0, 1)
        return np.linalg.norm(x - solid.p0 - t * d) <= float(solid.radius) + tol
    if isinstance(solid, Box):
        local = solid.rotation.T @ (x - solid.centre)
        return bool(np.all(np.abs(local) <= solid.half_size + tol))
    if isinstance(solid, Cylinder):
        d = solid.p1 - solid.p0
        a = _unit(d)
        h = np.dot(x - solid.p0, a)
        rho = np.linalg.norm(x - solid.p0 - h * a)
        return -tol <= h <= np.linalg.norm(d) + tol and rho <= float(solid.radius) + tol
    if isinstance(solid, Plate):
        local = solid.axes @ (x - solid.origin)
        poly = shapely.Polygon(solid.polygon_uv).buffer(tol)
        return abs(local[2]) <= 0.5 * float(solid.thickness) + tol and poly.contains(
            shapely.Point(local[:2])
        )
    raise TypeError(solid)


def support(solid, e):
    """Independent support function max over the solid of e·x (unit e)."""
    if isinstance(solid, Capsule):
        return max(np.dot(solid.p0, e), np.dot(solid.p1, e)) + float(solid.radius)
    if isinstance(solid, Box):
        corners = np.array([[sx, sy, sz] for sx in (-1, 1) for sy in (-1, 1) for sz in (-1, 1)])
        pts = solid.centre + (corners * solid.half_size) @ solid.rotation.T
        return float(np.max(pts @ e))
    if isinstance(solid, Cylinder):
        a = _unit(solid.p1 - solid.p0)
        top = max(np.dot(solid.p0, e), np.dot(solid.p1, e))
        return top + float(solid.radius) * np.linalg.norm(e - np.dot(e, a) * a)
    if isinstance(solid, Plate):
        w = solid.axes[2]
        half = 0.5 * float(solid.thickness)
        return float(np.max(solid.vertices @ e) + half * abs(np.dot(w, e)))
    raise TypeError(solid)


def random_rotation(seed):
    return Rotation.random(random_state=seed).as_matrix()


def random_capsule(rng, centre=None):
    c = rng.normal(size=3) * 20 if centre is None else centre
    return Capsule(c + rng.normal(size=3) * 15, c + rng.normal(size=3) * 15, rng.uniform(0.5, 6))


def random_box(rng):
    return Box(
        rng.normal(size=3) * 20, rng.uniform(3, 20, 3), random_rotation(int(rng.integers(1 << 30)))
    )


def random_cylinder(rng):
    p0 = rng.normal(size=3) * 20
    return Cylinder(p0, p0 + _unit(rng.normal(size=3)) * rng.uniform(5, 40), rng.uniform(3, 15))


def random_plate(rng):
    m = int(rng.integers(3, 8))
    ang = np.sort(rng.uniform(0, 2 * np.pi, m))
    if np.max(np.diff(np.r_[ang, ang[0] + 2 * np.pi])) > np.pi * 0.95:
        ang = np.linspace(0, 2 * np.pi, m, endpoint=False) + rng.uniform(0, 1)
    poly = np.c_[np.cos(ang), np.sin(ang)] * rng.uniform(8, 25)
    rot = random_rotation(int(rng.integers(1 << 30)))
    verts = np.c_[poly, np.zeros(m)] @ rot.T + rng.normal(size=3) * 20
    return Plate(verts, rng.uniform(2, 8))


MAKERS = {
    "capsule": random_capsule,
    "box": random_box,
    "cylinder": random_cylinder,
    "plate": random_plate,
}
PAIRS = [
    ("capsule", "capsule"),
    ("capsule", "box"),
    ("capsule", "cylinder"),
    ("plate", "box"),
    ("plate", "cylinder"),
    ("plate", "capsule"),
    ("plate", "plate"),
]


# ------------------------------------------------------------------ hand-computed cases


def test_capsule_parallel_to_box_face():
    # source: plane geometry, hand computation: a rod of radius 2 whose axis runs
    # parallel to the face x = 10 of the box, 15 mm from the box centre plane, clears
    # the face by 15 - 10 - 2 = 3 mm.
    box = Box([0, 0, 0], [10, 20, 30])
    rod = Capsule([15, -5, 0], [15, 5, 0], 2)
    sep = separation(rod, box)
    assert sep.distance_mm == pytest.approx(3.0, abs=1e-12)
    assert sep.point_a[0] == pytest.approx(13.0, abs=1e-12)
    assert sep.point_b[0] == pytest.approx(10.0, abs=1e-12)
    assert -5 <= sep.point_a[1] <= 5 and sep.point_a[1] == pytest.approx(sep.point_b[1])
    # the same scene turned 30 deg about z and moved: still 3 mm
    rot = Rotation.from_euler("z", 30, degrees=True).as_matrix()
    shift = np.array([100.0, -40.0, 7.0])
    turned = separation(
        Capsule(rot @ [15, -5, 0] + shift, rot @ [15, 5, 0] + shift, 2),
        Box(shift, [10, 20, 30], rot),
    )
    assert turned.distance_mm == pytest.approx(3.0, abs=1e-12)


def test_rod_crossing_cylinder_axis_at_angle():
    # source: distance between two skew lines d = |(x3 - x1)·(b x d)| / |b x d|
    # (E. W. Weisstein, "Line-Line Distance", MathWorld, eq. 3, citing Gellert et al.
    # 1989 p. 538).  The rod line (-40, 30, 10) + t (80, 0, 80) and the cylinder axis
    # (0, 0, 0) + s (0, 0, 1): b x d = (0, -80, 0), so d = |(-40, 30, 10)·(0, -1, 0)|
    # = 30 mm, with the common perpendicular at x = 0, z = 50 (inside both).  The
    # surfaces clear by 30 - 20 (cylinder radius) - 3 (rod radius) = 7 mm.
    tube = Cylinder([0, 0, 0], [0, 0, 100], 20)
    rod = Capsule([-40, 30, 10], [40, 30, 90], 3)
    sep = separation(rod, tube)
    assert sep.distance_mm == pytest.approx(7.0, abs=1e-12)
    np.testing.assert_allclose(sep.point_a, [0, 27, 50], atol=1e-12)
    np.testing.assert_allclose(sep.point_b, [0, 20, 50], atol=1e-12)


def test_two_skew_rods():
    # source: distance between two skew lines (E. W. Weisstein, "Line-Line Distance",
    # MathWorld, eq. 3), applied when the feet of the common perpendicular fall inside
    # both segments; then the rods clear by that distance less both radii.
    x1, x2 = np.array([0.0, 0.0, 0.0]), np.array([100.0, 20.0, 10.0])
    x3, x4 = np.array([50.0, -40.0, 30.0]), np.array([30.0, 60.0, 45.0])
    b, d = x2 - x1, x4 - x3
    cross = np.cross(b, d)
    line_distance = abs(np.dot(x3 - x1, cross)) / np.linalg.norm(cross)
    # feet of the common perpendicular (inside both segments for these numbers)
    m = np.array([[b @ b, -(b @ d)], [b @ d, -(d @ d)]])
    s, t = np.linalg.solve(m, [(x3 - x1) @ b, (x3 - x1) @ d])
    assert 0 < s < 1 and 0 < t < 1
    sep = separation(Capsule(x1, x2, 4.0), Capsule(x3, x4, 6.0))
    assert sep.distance_mm == pytest.approx(line_distance - 10.0, abs=1e-9)
    np.testing.assert_allclose(
        sep.point_a,
        x1 + s * b + 4.0 * cross / np.linalg.norm(cross) * np.sign(np.dot(x3 - x1, cross)),
        atol=1e-9,
    )


def test_point_to_box_corner():
    # source: Pythagoras; the point (13, 24, 35) lies beyond the corner (10, 20, 30) of
    # the box, so the distance is sqrt(3² + 4² + 5²) = sqrt(50).
    box = Box([0, 0, 0], [10, 20, 30])
    point = Capsule([13, 24, 35], [13, 24, 35], 0.0)
    sep = separation(point, box)
    assert sep.distance_mm == pytest.approx(np.sqrt(50.0), abs=1e-12)
    np.testing.assert_allclose(sep.point_b, [10, 20, 30], atol=1e-12)
    ball = Capsule([13, 24, 35], [13, 24, 35], 1.5)
    assert separation(ball, box).distance_mm == pytest.approx(np.sqrt(50.0) - 1.5, abs=1e-12)


# ------------------------------------------------------------- certificate and sampling


def _check_certificate(a, b, sep, tol=1e-9):
    """For separated convex solids: the points lie on the solids, their distance is the
    reported one, and the projections of the solids on the line joining them are that
    far apart (a separating plane: no two points can be closer).
    source: convex analysis, the distance between two convex sets equals the largest
    gap of their projections on a direction (separating hyperplane theorem; Boyd &
    Vandenberghe, Convex Optimization (2004), §8.2, from memory)."""
    d = float(sep.distance_mm)
    assert contains(a, sep.point_a) and contains(b, sep.point_b)
    np.testing.assert_allclose(sep.point_b - sep.point_a, d * sep.normal, atol=1e-9)
    if d > 1e-6:
        e = (sep.point_b - sep.point_a) / d
        gap = -support(b, -e) - support(a, e)
        assert gap == pytest.approx(d, abs=tol)


@settings(max_examples=120, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1), kinds=st.sampled_from(PAIRS))
def test_separated_pairs_are_certified(seed, kinds):
    rng = np.random.default_rng(seed)
    a, b = MAKERS[kinds[0]](rng), MAKERS[kinds[1]](rng)
    sep = separation(a, b)
    if sep.distance_mm > 0:
        _check_certificate(a, b, sep)
    else:
        assert contains(a, sep.point_a, tol=1e-6) and contains(b, sep.point_b, tol=1e-6)


@settings(max_examples=20, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1), kinds=st.sampled_from(PAIRS))
def test_distance_against_dense_sampling(seed, kinds):
    # source: brute force -- the least distance between dense samples of both surfaces
    # (scipy.spatial.cKDTree as the reference nearest-neighbour search).
    rng = np.random.default_rng(seed)
    a, b = MAKERS[kinds[0]](rng), MAKERS[kinds[1]](rng)
    sep = separation(a, b)
    spacing = 0.6
    reference = sampled_distance(a, b, spacing)
    if sep.distance_mm > 0:
        assert sep.distance_mm <= reference + 1e-9
        assert reference - sep.distance_mm <= 2 * spacing
    else:
        # overlapping: the surfaces cross, so some samples nearly meet
        assert reference <= 2 * spacing


def test_seeded_random_pairs_against_sampling():
    rng = np.random.default_rng(20240611)
    for kinds in PAIRS:
        for _ in range(3):
            a, b = MAKERS[kinds[0]](rng), MAKERS[kinds[1]](rng)
            sep = separation(a, b)
            reference = sampled_distance(a, b, 0.5)
            if sep.distance_mm > 0:
                assert sep.distance_mm <= reference + 1e-9
                assert reference - sep.distance_mm <= 1.0, kinds


# --------------------------------------------------------------- planar cases: shapely


def _star_polygon(rng, m):
    ang = np.sort(rng.uniform(0, 2 * np.pi, m))
    rad = rng.uniform(10, 40, m)
    return np.c_[np.cos(ang) * rad, np.sin(ang) * rad]


@settings(max_examples=60, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1))
def test_segment_in_plane_against_shapely(seed):
    # source: shapely (GEOS) distance between a LineString and a Polygon as the
    # reference: a rod lying in the plane z = 0, inside the depth range of a top-view
    # prism, is as far from it as its 2D segment is from the polygon.
    rng = np.random.default_rng(seed)
    poly = _star_polygon(rng, int(rng.integers(5, 12)))
    polygon = shapely.Polygon(poly)
    if not polygon.is_valid:
        return
    zone = Prism(poly, "top", -5.0, 5.0)
    p0, p1 = rng.uniform(-70, 70, 2), rng.uniform(-70, 70, 2)
    radius = float(rng.uniform(0, 3))
    rod = Capsule(np.r_[p0, 0.0], np.r_[p1, 0.0], radius)
    expected = shapely.distance(shapely.LineString([p0, p1]), polygon)
    got = float(separation(rod, zone).distance_mm)
    if expected > radius:
        assert got == pytest.approx(expected - radius, abs=1e-9)
    else:
        assert got <= 1e-9


@settings(max_examples=40, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1))
def test_flat_plate_against_shapely_prism_section(seed):
    # source: shapely (GEOS) distance between two polygons as the reference: a plate
    # lying flat in z = 0 (thickness within the prism's depth range) against a
    # top-view prism, non-convex, is as far as the two 2D polygons.
    rng = np.random.default_rng(seed)
    poly = _star_polygon(rng, int(rng.integers(5, 12)))
    polygon = shapely.Polygon(poly)
    if not polygon.is_valid:
        return
    zone = Prism(poly, "top", -5.0, 5.0)
    m = int(rng.integers(3, 7))
    ang = np.linspace(0, 2 * np.pi, m, endpoint=False) + rng.uniform(0, 1)
    plate_2d = np.c_[np.cos(ang), np.sin(ang)] * rng.uniform(5, 15) + rng.uniform(-60, 60, 2)
    plate = Plate(np.c_[plate_2d, np.zeros(m)], 2.0)
    expected = shapely.distance(shapely.Polygon(plate_2d), polygon)
    got = float(separation(plate, zone).distance_mm)
    if expected > 0:
        assert got == pytest.approx(expected, abs=1e-9)
    else:
        assert got <= 1e-9


def test_prism_pieces_tile_the_polygon():
    # source: shapely as the reference for areas, unions and convexity.
    outline = [(0, 0), (100, 0), (100, 80), (80, 80), (80, 20), (20, 20), (20, 80), (0, 80)]
    zone = Prism(outline, "side", -10, 10)
    pieces = [shapely.Polygon(p) for p in zone.pieces]
    assert sum(p.area for p in pieces) == pytest.approx(shapely.Polygon(outline).area)
    assert shapely.union_all(pieces).symmetric_difference(shapely.Polygon(outline)).area < 1e-9
    for p in pieces:
        assert p.convex_hull.area == pytest.approx(p.area)
        assert shapely.is_ccw(p.exterior)


# ------------------------------------------------------------------------- invariance


def _moved(solid, rot, shift):
    if isinstance(solid, Capsule):
        return Capsule(rot @ solid.p0 + shift, rot @ solid.p1 + shift, solid.radius)
    if isinstance(solid, Box):
        return Box(rot @ solid.centre + shift, solid.half_size, rot @ solid.rotation)
    if isinstance(solid, Cylinder):
        return Cylinder(rot @ solid.p0 + shift, rot @ solid.p1 + shift, solid.radius)
    if isinstance(solid, Plate):
        return Plate(solid.vertices @ rot.T + shift, solid.thickness)
    raise TypeError(solid)


@settings(max_examples=150, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1), kinds=st.sampled_from(PAIRS))
# deep overlaps whose depth used to change with the frame (-4.75 against -3.65 mm, and
# -4.21 against -5.41 mm) while the least translation is 3.175 and 1.652 mm
@example(seed=4701, kinds=("plate", "cylinder"))
@example(seed=519, kinds=("capsule", "cylinder"))
def test_invariant_under_rigid_motion(seed, kinds):
    # source: Euclidean distance is invariant under rotations and translations
    # (isometries), a fact of geometry.
    rng = np.random.default_rng(seed)
    a, b = MAKERS[kinds[0]](rng), MAKERS[kinds[1]](rng)
    rot = random_rotation(int(rng.integers(1 << 30)))
    shift = rng.uniform(-500, 500, 3)
    before = separation(a, b)
    moved_a, moved_b = _moved(a, rot, shift), _moved(b, rot, shift)
    after = separation(moved_a, moved_b)
    assert after.distance_mm == pytest.approx(before.distance_mm, abs=1e-9)
    # closest points need not be unique (parallel faces); they must lie on the solids
    assert contains(moved_a, after.point_a, 1e-6) and contains(moved_b, after.point_b, 1e-6)


@settings(max_examples=60, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1), angle=st.floats(0, 360))
def test_prism_pair_invariant_under_motion_about_its_axis(seed, angle):
    # source: isometry invariance, as above; a prism turned about its extrusion axis is
    # the prism of the turned polygon.
    rng = np.random.default_rng(seed)
    poly = np.array([(0, 0), (60, 0), (60, 15), (15, 15), (15, 50), (0, 50)], float)
    rod = Capsule(
        np.r_[rng.uniform(-40, 90, 2), rng.uniform(-30, 30)],
        np.r_[rng.uniform(-40, 90, 2), rng.uniform(-30, 30)],
        2.0,
    )
    plate = random_plate(rng)
    c, s = np.cos(np.radians(angle)), np.sin(np.radians(angle))
    rot2 = np.array([[c, -s], [s, c]])
    shift = rng.uniform(-100, 100, 3)
    rot3 = np.eye(3)
    rot3[:2, :2] = rot2
    zone = Prism(poly, "top", -8, 8)
    moved = Prism(poly @ rot2.T + shift[:2], "top", -8 + shift[2], 8 + shift[2])
    for solid in (rod, plate):
        before = separation(solid, zone).distance_mm
        after = separation(_moved(solid, rot3, shift), moved).distance_mm
        assert after == pytest.approx(before, abs=1e-9)


# ----------------------------------------------------------------------- interference


def test_zone_moved_into_rod_turns_negative():
    # source: hand computation: a box (half size 10) slides along x through a rod of
    # radius 3 lying on the y axis.  Its face meets the rod surface at |c| = 13; while
    # |c| < 13 the box must be pushed back along x by 13 - |c| (the rod crosses the
    # whole box, so no other direction is shorter): distance = |c| - 13 throughout.
    rod = Capsule([0, -50, 0], [0, 50, 0], 3.0)
    centres = np.linspace(40, -40, 161)
    box = Box(np.c_[centres, np.zeros((161, 2))], [10, 10, 10])
    sep = separation(rod, box)
    np.testing.assert_allclose(sep.distance_mm, np.abs(centres) - 13, atol=1e-9)
    assert np.all(sep.distance_mm[np.abs(centres) < 13] < 0)


@pytest.mark.parametrize("entry", [-2.5, -1.0, 0.0, 0.5, 2.0, 4.0])
def test_depth_exact_for_capsule_entering_box_face(entry):
    # source: plane geometry, hand computation: a rod of radius 3 along the x axis whose
    # end reaches x = -10 + entry meets the face x = -10 of a box (half size 10);
    # pulling it back by entry + 3 along -x frees it, and no shorter move does.
    box = Box([0, 0, 0], [10, 10, 10])
    rod = Capsule([-60, 0, 0], [-10 + entry, 0, 0], 3.0)
    sep = separation(rod, box)
    assert sep.distance_mm == pytest.approx(-(entry + 3.0), abs=1e-12)
    np.testing.assert_allclose(sep.point_a, [-10 + entry + 3, 0, 0], atol=1e-12)
    np.testing.assert_allclose(sep.point_b, [-10, 0, 0], atol=1e-12)


def test_depth_exact_for_oblique_rod_end_in_box():
    # source: hand computation: the rod end (-7, 2, 1) lies 3 mm inside the face
    # x = -10 and further from every other face; radius 1.5 -> depth 4.5.
    box = Box([0, 0, 0], [10, 10, 10])
    rod = Capsule([-40, 20, 9], [-7, 2, 1], 1.5)
    # the rod enters through x = -10 at a shallow enough angle that its deepest point
    # into the face is its end cap
    assert separation(rod, box).distance_mm == pytest.approx(-4.5, abs=1e-12)


def test_point_inside_zones_depth_exact():
    # source: hand computation: a point inside a convex zone must move to the nearest
    # face; box: min(10 - 4, 20 - 3, 30 - 25) = 5; cylinder (axis z, 0..100, r 20): at
    # radius 12 and height 93 -> min(20 - 12, 93, 100 - 93) = 7.
    box = Box([0, 0, 0], [10, 20, 30])
    assert separation(Capsule([4, 3, 25], [4, 3, 25], 0), box).distance_mm == pytest.approx(-5)
    tube = Cylinder([0, 0, 0], [0, 0, 100], 20)
    point = Capsule([12, 0, 93], [12, 0, 93], 0)
    assert separation(point, tube).distance_mm == pytest.approx(-7, abs=1e-12)
    point = Capsule([0, -15, 50], [0, -15, 50], 0)
    assert separation(point, tube).distance_mm == pytest.approx(-5, abs=1e-12)


def test_crossing_capsules_depth_exact():
    # source: hand computation: cores 2 mm apart (skew, along x and y), radii 3 and 4:
    # they overlap by 3 + 4 - 2 = 5 mm along z.
    a = Capsule([-50, 0, 0], [50, 0, 0], 3)
    b = Capsule([0, -50, 2], [0, 50, 2], 4)
    sep = separation(a, b)
    assert sep.distance_mm == pytest.approx(-5, abs=1e-12)
    np.testing.assert_allclose(sep.point_a, [0, 0, 3], atol=1e-12)
    np.testing.assert_allclose(sep.point_b, [0, 0, -2], atol=1e-12)


def test_overlapping_depth_is_conservative_against_sampling():
    # source: brute force: moving A by the reported depth along the reported direction
    # must separate the solids (sampled surfaces no longer meet, dense sampling).
    rng = np.random.default_rng(7)
    checked = 0
    for kinds in PAIRS:
        for _ in range(40):
            a, b = MAKERS[kinds[0]](rng), MAKERS[kinds[1]](rng)
            sep = separation(a, b)
            d = float(sep.distance_mm)
            if d >= -0.5:
                continue
            moved = _moved(a, np.eye(3), (d - 1e-6) * sep.normal)
            assert separation(moved, b).distance_mm >= -1e-6, kinds
            checked += 1
            break
    assert checked >= 5


def support_many(solid, e):
    """Independent support values max over the solid of e·x for unit directions e (K, 3)."""
    if isinstance(solid, Capsule):
        return np.maximum(e @ solid.p0, e @ solid.p1) + float(solid.radius)
    if isinstance(solid, Box):
        corners = np.array([[sx, sy, sz] for sx in (-1, 1) for sy in (-1, 1) for sz in (-1, 1)])
        pts = solid.centre + (corners * solid.half_size) @ solid.rotation.T
        return np.max(e @ pts.T, axis=1)
    if isinstance(solid, Cylinder):
        a = _unit(solid.p1 - solid.p0)
        perp = e - (e @ a)[:, None] * a
        top = np.maximum(e @ solid.p0, e @ solid.p1)
        return top + float(solid.radius) * np.linalg.norm(perp, axis=1)
    if isinstance(solid, Plate):
        half = 0.5 * float(solid.thickness)
        return np.max(e @ solid.vertices.T, axis=1) + half * np.abs(e @ solid.axes[2])
    raise TypeError(solid)


def _fibonacci_sphere(n):
    k = np.arange(n) + 0.5
    z = 1 - 2 * k / n
    phi = np.pi * (1 + 5**0.5) * k
    rho = np.sqrt(1 - z * z)
    return np.c_[rho * np.cos(phi), rho * np.sin(phi), z]


def least_translation_reference(a, b):
    """The minimum translation distance of two overlapping convex solids, as the least
    over unit e of h_A(e) + h_B(-e) (support functions): 20,000 directions on a
    Fibonacci sphere, then scipy.optimize.minimize (Nelder-Mead) from the 12 best.
    Returns (least sampled value, refined value).
    source: the support-function form of the penetration depth (distance from the
    origin to the boundary of the Minkowski difference A - B; G. van den Bergen,
    Collision Detection in Interactive 3D Environments (2004), §4.3.4, from memory),
    scipy.optimize as the minimiser."""

    def g(e):
        e = np.atleast_2d(e)
        e = e / np.linalg.norm(e, axis=1)[:, None]
        return support_many(a, e) + support_many(b, -e)

    dirs = _fibonacci_sphere(20000)
    values = g(dirs)
    best = float(values.min())
    for k in np.argsort(values)[:12]:
        t1, t2 = _perp_basis(dirs[k])
        res = minimize(
            lambda x, k=k, t1=t1, t2=t2: float(g(dirs[k] + x[0] * t1 + x[1] * t2)[0]),
            np.zeros(2),
            method="Nelder-Mead",
            options={"xatol": 1e-12, "fatol": 1e-13, "maxiter": 4000},
        )
        best = min(best, float(res.fun))
    return float(values.min()), best


def _overlapping_pair(rng, kinds):
    """A random pair of the given kinds whose solids overlap (B moved onto A)."""
    a = MAKERS[kinds[0]](rng)
    centre = {
        Capsule: lambda s: 0.5 * (s.p0 + s.p1),
        Box: lambda s: s.centre,
        Cylinder: lambda s: 0.5 * (s.p0 + s.p1),
        Plate: lambda s: s.vertices.mean(axis=0),
    }
    while True:
        b = MAKERS[kinds[1]](rng)
        shift = centre[type(a)](a) - centre[type(b)](b) + rng.normal(size=3) * 4
        b = _moved(b, np.eye(3), shift)
        if float(separation(a, b).distance_mm) < -0.05:
            return a, b


@settings(max_examples=30, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1), kinds=st.sampled_from(PAIRS))
@example(seed=519, kinds=("capsule", "cylinder"))
@example(seed=4701, kinds=("plate", "cylinder"))
def test_depth_is_the_least_translation(seed, kinds):
    # source: scipy.optimize over the support-function form of the penetration depth
    # (see least_translation_reference): no direction needs a shorter move.
    rng = np.random.default_rng(seed)
    a, b = _overlapping_pair(rng, kinds)
    sep = separation(a, b)
    depth = -float(sep.distance_mm)
    e = sep.normal
    own = support_many(a, e[None])[0] + support_many(b, -e[None])[0]
    assert own == pytest.approx(depth, abs=1e-9)  # the depth is the move along normal
    sampled, refined = least_translation_reference(a, b)
    assert depth <= sampled + 1e-9  # no sampled direction needs a shorter move
    assert depth <= refined + 1e-9  # nor does the minimiser find one
    assert refined - depth <= 1e-6


def _section_depth_reference(a_points_2d, b_points_2d, radius):
    """2D minimum translation distance of two overlapping convex sets, the hull of
    a_points grown by ``radius`` and the hull of b_points, by shapely: the distance from
    the origin to the boundary of their Minkowski difference (the hull of all point
    differences, grown by the radius).  source: shapely (GEOS) convex hull and distance."""
    diff = (a_points_2d[:, None, :] - b_points_2d[None, :, :]).reshape(-1, 2)
    hull = shapely.MultiPoint(diff).convex_hull
    origin = shapely.Point(0.0, 0.0)
    if hull.contains(origin):
        return radius + float(shapely.distance(origin, hull.exterior))
    return radius - float(shapely.distance(origin, hull))


def _cylinder_section(cyl, e1, e2, n=4000):
    """Dense rim points of a cylinder's end discs, in the plane basis (e1, e2)."""
    u, v = _perp_basis(cyl.p1 - cyl.p0)
    ph = np.linspace(0, 2 * np.pi, n, endpoint=False)
    ring = float(cyl.radius) * (np.cos(ph)[:, None] * u + np.sin(ph)[:, None] * v)
    rim = np.concatenate([cyl.p0 + ring, cyl.p1 + ring])
    return np.c_[rim @ e1, rim @ e2]


@settings(max_examples=12, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1), long_one=st.sampled_from(["capsule", "plate"]))
def test_depth_of_long_part_through_cylinder_against_shapely(seed, long_one):
    # A rod or a plate strip 4 m long crossing a cylinder at an oblique angle: moving it
    # along its length cannot help, so its least translation lies in the plane across
    # its length and equals the depth of the two sections there (the cylinder's is two
    # ellipses and their hull).  source: shapely (GEOS) on the sections, see
    # _section_depth_reference.
    rng = np.random.default_rng(seed)
    d = _unit(rng.normal(size=3))
    e1, e2 = _perp_basis(d)
    axis = _unit(rng.normal(size=3))
    if abs(axis @ d) > 0.95:  # nearly along the part: the section is not the answer
        axis = _unit(np.cross(d, axis))
    length, radius = rng.uniform(10, 40), rng.uniform(5, 15)
    centre = rng.normal(size=3) * 3
    cyl = Cylinder(centre - 0.5 * length * axis, centre + 0.5 * length * axis, radius)
    mid = centre + rng.uniform(-0.7, 0.7) * radius * e1 + rng.uniform(-0.7, 0.7) * radius * e2
    if long_one == "capsule":
        r = rng.uniform(0.5, 4)
        part = Capsule(mid - 2000 * d, mid + 2000 * d, r)
        section = np.array([[mid @ e1, mid @ e2]])  # the core; its radius is added
    else:
        width, thick = rng.uniform(4, 20), rng.uniform(2, 6)
        across = _unit(np.cross(d, rng.normal(size=3)))  # in the plate, across its length
        corners = [
            mid + sl * 2000 * d + sw * 0.5 * width * across
            for sl, sw in ((-1, -1), (1, -1), (1, 1), (-1, 1))
        ]
        part, r = Plate(np.array(corners), thick), 0.0
        normal = part.axes[2]
        pts = np.array(
            [
                mid + sw * 0.5 * width * across + st_ * 0.5 * thick * normal
                for sw in (-1, 1)
                for st_ in (-1, 1)
            ]
        )
        section = np.c_[pts @ e1, pts @ e2]
    got = -float(separation(part, cyl).distance_mm)
    assert got > 0
    expected = _section_depth_reference(section, _cylinder_section(cyl, e1, e2), r)
    # the dense polygons lie inside the true curves by at most r (1 - cos(pi / 4000))
    assert got == pytest.approx(expected, abs=1e-5)


# ------------------------------------------------------------------ sweeps of poses


def test_plate_passing_zone_edge_against_sampling():
    # source: brute force, dense surface samples (scipy cKDTree) at each pose: a
    # rocker plate turning about x sweeps past the top edge of a box.
    box = Box([0, 0, 0], [40, 40, 20])
    base = np.array([[-20, 0, -15], [20, 0, -15], [25, 0, 15], [-25, 0, 15.0]])
    angles = np.radians(np.linspace(-40, 40, 9))
    verts = []
    for ang in angles:
        rot = Rotation.from_euler("x", ang).as_matrix()
        verts.append(base @ rot.T + [0, 0, 48])
    plate = Plate(np.array(verts), 4.0)
    sep = separation(plate, box)
    for k in range(len(angles)):
        single = Plate(plate.vertices[k], 4.0)
        reference = sampled_distance(single, box, 0.4)
        assert sep.distance_mm[k] <= reference + 1e-9
        assert reference - sep.distance_mm[k] <= 0.8
        _check_certificate(single, box, separation(single, box))


def _smooth_track(rng, start, amplitude, n):
    tau = np.linspace(0, 1, n)[:, None]
    phase = rng.uniform(0, 2 * np.pi, 3)
    freq = rng.uniform(0.5, 2.0, 3)
    return start + amplitude * np.sin(2 * np.pi * freq * tau + phase)


@settings(max_examples=15, deadline=None, database=None)
@given(seed=st.integers(0, 2**31 - 1))
def test_least_separation_is_the_minimum_over_poses(seed):
    rng = np.random.default_rng(seed)
    n = 400
    rod = Capsule(
        _smooth_track(rng, rng.normal(size=3) * 30, 20, n),
        _smooth_track(rng, rng.normal(size=3) * 30, 20, n),
        4.0,
    )
    rot = Rotation.from_euler("z", np.linspace(-20, 20, n)[:, None], degrees=True).as_matrix()
    square = np.array([[-15, -10, 0], [15, -10, 0], [15, 10, 0], [-15, 10, 0.0]])
    plate = Plate(
        np.einsum("nij,kj->nki", rot, square)
        + _smooth_track(rng, np.array([0, 0, 40.0]), 15, n)[:, None],
        5.0,
    )
    tyre = Cylinder(
        _smooth_track(rng, np.array([0, 90, -40.0]), 10, n),
        _smooth_track(rng, np.array([0, 130, -40.0]), 10, n),
        60.0,
    )
    zones = [
        random_box(rng),
        random_cylinder(rng),
        tyre,
        Prism([(0, 0), (60, 0), (60, 15), (15, 15), (15, 50), (0, 50)], "front", -20, 5),
    ]
    pairs = [(rod, z) for z in zones] + [(plate, z) for z in zones] + [(plate, rod)]
    for (a, b), least in zip(pairs, least_separations(pairs), strict=True):
        full = separation(a, b).distance_mm
        assert least.distance_mm == pytest.approx(full.min(), abs=1e-9)
        assert full[least.pose_index] == pytest.approx(least.distance_mm, abs=1e-12)
        assert least.pose_count == n


def test_least_separation_skips_most_poses_on_smooth_tracks():
    rng = np.random.default_rng(3)
    n = 2000
    rod = Capsule(
        _smooth_track(rng, np.array([0, 0, 80.0]), 25, n),
        _smooth_track(rng, np.array([50, 30, 120.0]), 25, n),
        5.0,
    )
    box = Box([0, 0, 0], [40, 40, 20])
    least = least_separation(rod, box)
    full = separation(rod, box).distance_mm
    assert least.distance_mm == pytest.approx(full.min(), abs=1e-9)
    assert least.poses_evaluated < n // 5


# ---------------------------------------------------------------- batches and errors


def test_batch_shapes_broadcast():
    rng = np.random.default_rng(1)
    p0 = rng.normal(size=(2, 3, 3)) * 30
    rod = Capsule(p0, p0 + 10, 2.0)
    box = Box(rng.normal(size=(3, 3)), [5, 5, 5])
    sep = separation(rod, box)
    assert sep.distance_mm.shape == (2, 3)
    assert sep.point_a.shape == (2, 3, 3)
    one = separation(Capsule(p0[1, 2], p0[1, 2] + 10, 2.0), Box(box.centre[2], [5, 5, 5]))
    assert sep.distance_mm[1, 2] == pytest.approx(float(one.distance_mm), abs=1e-12)
    assert separation(Capsule(p0[0, 0], p0[0, 0] + 1, 1), box).distance_mm.shape == (3,)


def test_swapped_order_swaps_points():
    box = Box([0, 0, 0], [10, 20, 30])
    rod = Capsule([15, -5, 0], [15, 5, 0], 2)
    one, two = separation(rod, box), separation(box, rod)
    assert one.distance_mm == two.distance_mm
    np.testing.assert_array_equal(one.point_a, two.point_b)


@pytest.mark.parametrize(
    ("make", "match"),
    [
        (lambda: Capsule([0, 0], [1, 1, 1], 1), r"Capsule.p0: expected an array of shape"),
        (lambda: Capsule([0, 0, 0], [1, 1, 1], -1), r"Capsule.radius: expected values >= 0"),
        (lambda: Box([0, 0, 0], [1, 0, 1]), r"Box.half_size: expected values > 0"),
        (
            lambda: Box([0, 0, 0], [1, 1, 1], np.diag([1, 1, -1.0])),
            r"Box.rotation: expected a proper rotation",
        ),
        (
            lambda: Box([0, 0, 0], [1, 1, 1], np.ones((3, 3))),
            r"Box.rotation: expected an orthonormal matrix",
        ),
        (lambda: Cylinder([0, 0, 0], [0, 0, 0], 1), r"Cylinder.p1: expected an end point"),
        (
            lambda: Prism([(0, 0), (1, 1), (1, 0), (0, 1)], "top", 0, 1),
            r"Prism.polygon_2d: expected a simple polygon",
        ),
        (lambda: Prism([(0, 0), (1, 0), (0, 1)], "back", 0, 1), r"Prism.plane: expected one of"),
        (
            lambda: Prism([(0, 0), (1, 0), (0, 1)], "top", 1, 1),
            r"Prism.depth_max: expected a depth greater than",
        ),
        (
            lambda: Plate([[0, 0, 0], [10, 0, 0], [10, 10, 0], [5, 2, 0], [0, 10, 0]], 2),
            r"Plate.vertices: expected a convex polygon",
        ),
        (
            lambda: Plate([[0, 0, 0], [10, 0, 0], [10, 10, 1], [0, 10, 0]], 2),
            r"Plate.vertices: expected coplanar vertices",
        ),
        (
            lambda: separation(
                Cylinder([0, 0, 0], [0, 0, 1], 1), Cylinder([5, 0, 0], [5, 0, 1], 1)
            ),
            r"separation: expected a pair with a Capsule",
        ),
    ],
)
def test_bad_inputs_raise(make, match):
    with pytest.raises(GeometryError, match=match):
        make()
    with pytest.raises(ValueError):
        make()


def test_segment_prism_kernels_agree():
    # two independent exact methods inside the package (edge features with clipping, and
    # the break points of the squared distance along the segment) must agree
    from plumbrod.clearance import _distance_kernels as kern

    rng = np.random.default_rng(11)
    n, m = 4000, 5
    ang = np.sort(rng.uniform(0, 2 * np.pi, (n, m)), axis=1)
    poly = np.stack([np.cos(ang), np.sin(ang)], -1) * rng.uniform(5, 15, (n, 1, 1))
    origin = rng.normal(size=(n, 3)) * 5
    axes = Rotation.random(n, random_state=1).as_matrix()
    ok = np.ones((n, m), bool)
    zlo, zhi = -rng.uniform(0.5, 5, n), rng.uniform(0.5, 5, n)
    p0 = rng.normal(size=(n, 3)) * 20
    p1 = p0 + rng.normal(size=(n, 3)) * rng.choice([0.0, 1e-9, 1.0, 20.0], (n, 1))
    _, _, d1 = kern.seg_prism(p0, p1, origin, axes, poly, ok, zlo, zhi)
    _, _, d2 = kern.seg_prism_slopes(p0, p1, origin, axes, poly, ok, zlo, zhi)
    np.testing.assert_allclose(d1, d2, atol=1e-9)
