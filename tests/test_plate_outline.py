"""Rocker plate outline: areas, webs, chord tolerance, orientation, frame, errors."""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely

from plumbrod.clearance.distance import separation
from plumbrod.geometry.plate_outline import plate_outline, quad_segs_for
from plumbrod.geometry.shapes import Box, GeometryError, Plate


def _stadium(d_hole=10.0, margin=5.0, spacing=80.0, tol=0.01):
    """Pivot and one pickup of equal holes: the outline is a stadium."""
    return plate_outline(
        [0, 0, 0],
        [0, 0, 10],
        {"push": [spacing, 0, 0]},
        pivot_hole_mm=d_hole,
        pickup_hole_mm=d_hole,
        edge_margin_mm=margin,
        thickness_mm=6.0,
        chord_tol_mm=tol,
    )


def test_two_equal_bosses_give_a_stadium():
    # source: plane geometry: the convex hull of two circles of radius R whose centres
    # are D apart is a stadium of area π R² + 2 R D.  R = 10/2 + 5 = 10, D = 80:
    # 100π + 1600 = 1914.159 mm².  The polygon is inscribed in the arcs: its area is
    # smaller, by at most the arc length times the chord tolerance.
    plate = _stadium()
    r, d = 10.0, 80.0
    exact = math.pi * r**2 + 2 * r * d
    arcs = 2 * math.pi * r
    gross = plate.outline.area
    assert exact - arcs * 0.01 <= gross <= exact
    holes = 2 * math.pi * 5.0**2
    assert plate.area_mm2 == pytest.approx(gross - holes, abs=1e-9)
    # 7075-T6 density 2.81 g/cm³ (REFERENCES.md, MatWeb, pub) -> 2810 kg/m³
    assert plate.mass_kg(2810.0) == pytest.approx(plate.area_mm2 * 6.0 * 1e-9 * 2810.0)
    assert plate.mass_kg(2810.0) == pytest.approx((exact - holes) * 6e-9 * 2810, rel=2e-3)


def test_ligaments_of_the_stadium():
    # source: plane geometry: between two holes of diameter 10 whose centres are 80
    # apart the web is 80 - 10 = 70 mm; each hole keeps the edge margin, 5 mm, to the
    # outline (less at most the chord tolerance, as the polygon is inscribed).
    plate = _stadium()
    webs = {lig.between: lig.width_mm for lig in plate.ligaments}
    assert webs[("pivot", "push")] == pytest.approx(70.0, abs=1e-12)
    for name in ("pivot", "push"):
        assert 5.0 - 0.01 - 1e-9 <= webs[(name, "edge")] <= 5.0 + 1e-9
    assert plate.least_ligament().between[1] == "edge"


def test_chord_tolerance_met():
    # source: plane geometry: an inscribed polygon with q segments per quarter circle
    # strays r(1 - cos(π/(4q))) from the circle at mid-chord.
    for r in (3.0, 10.0, 47.5, 200.0):
        for tol in (0.001, 0.01, 0.1):
            q = quad_segs_for(r, tol)
            assert r * (1 - math.cos(math.pi / (4 * q))) <= tol
            if q > 1:
                assert r * (1 - math.cos(math.pi / (4 * (q - 1)))) > tol
    plate = _stadium(tol=0.01)
    # every outline vertex lies on a boss circle or inside; every point of the true
    # boundary (the stadium) is within the tolerance of the polygon
    coords = np.asarray(plate.outline.exterior.coords)
    centres = np.array([h.centre_uv for h in plate.holes])
    radial = np.min(np.linalg.norm(coords[:, None] - centres[None], axis=-1), axis=1)
    assert np.all(radial <= 10.0 + 1e-9)
    ang = np.linspace(0, 2 * np.pi, 3601)
    arc = np.r_[
        np.c_[10 * np.cos(ang), 10 * np.sin(ang)], np.c_[80 + 10 * np.cos(ang), 10 * np.sin(ang)]
    ]
    hull = shapely.convex_hull(shapely.MultiPoint(arc))
    true_boundary = np.asarray(hull.exterior.coords)
    gaps = shapely.distance(shapely.points(true_boundary), plate.outline.exterior)
    assert np.max(gaps) <= 0.01 + 1e-6


def test_outline_orientation_and_holes_as_circles():
    # source: shapely's orientation predicate (shapely.is_ccw) as the reference, and
    # the shoelace formula: a counter-clockwise ring has positive signed area.
    plate = plate_outline(
        [10, 20, 30],
        [10, 20, 50],
        {"push": [70, 20, 41], "link": [10, 95, 39]},
        pivot_hole_mm=12,
        pickup_hole_mm={"push": 8, "link": 10},
        edge_margin_mm=6,
        thickness_mm=5,
    )
    ring = plate.outline.exterior
    assert shapely.is_ccw(ring)
    xy = np.asarray(ring.coords)
    signed = 0.5 * np.sum(xy[:-1, 0] * xy[1:, 1] - xy[1:, 0] * xy[:-1, 1])
    assert signed > 0
    assert len(plate.outline.interiors) == 0
    assert {h.name: h.diameter_mm for h in plate.holes} == {"pivot": 12, "push": 8, "link": 10}


def test_frame_plane_and_spacers():
    # source: hand computation: pivot axis along +z through (10, 20, .); pickups at
    # z = 41 and 39 -> plate plane z = 40, spacers +1 and -1 mm; u points at the first
    # pickup, v = normal x u.
    plate = plate_outline(
        [10, 20, 30],
        [10, 20, 50],
        {"push": [70, 20, 41], "link": [10, 95, 39]},
        pivot_hole_mm=12,
        pickup_hole_mm=8,
        edge_margin_mm=6,
        thickness_mm=5,
    )
    np.testing.assert_allclose(plate.origin, [10, 20, 40], atol=1e-12)
    np.testing.assert_allclose(plate.normal, [0, 0, 1], atol=1e-12)
    np.testing.assert_allclose(plate.u, [1, 0, 0], atol=1e-12)
    np.testing.assert_allclose(plate.v, [0, 1, 0], atol=1e-12)
    holes = {h.name: h for h in plate.holes}
    assert holes["push"].centre_uv == pytest.approx((60, 0))
    assert holes["link"].centre_uv == pytest.approx((0, 75))
    assert holes["push"].axial_offset_mm == pytest.approx(1.0)
    assert holes["link"].axial_offset_mm == pytest.approx(-1.0)
    assert holes["pivot"].axial_offset_mm == 0.0


def test_vertices_in_3d_follow_the_rocker():
    # source: rotation about an axis (Rodrigues); a quarter turn about +z maps the
    # plate's u direction onto v and keeps every vertex in the plate plane.
    plate = _stadium()
    design = plate.vertices_3d()
    assert np.allclose(design[:, 2], 0.0)
    rot, shift = plate.rotation_about_axis(np.array([0.0, 90.0]))
    moved = plate.vertices_3d(rot, shift)
    assert moved.shape == (2, len(design), 3)
    np.testing.assert_allclose(moved[0], design, atol=1e-12)
    np.testing.assert_allclose(moved[1][:, 0], -design[:, 1], atol=1e-9)
    np.testing.assert_allclose(moved[1][:, 1], design[:, 0], atol=1e-9)
    solid = plate.plate(rot, shift)
    assert isinstance(solid, Plate) and solid.batch_shape == (2,)


def test_enclosing_polygon_contains_the_outline():
    # source: shapely containment as the reference: the coarse clearance polygon holds
    # the cut outline and strays from it by at most its tolerance.
    plate = _stadium()
    coarse = shapely.Polygon(plate.enclosing_uv(0.5))
    assert coarse.buffer(1e-9).contains(plate.outline)
    assert shapely.hausdorff_distance(coarse.exterior, plate.outline.exterior) <= 0.5 + 0.01
    assert len(plate.enclosing_uv(0.5)) < len(plate.outline.exterior.coords)


def test_plate_solid_clearance_to_a_box():
    # source: hand computation: the stadium plate (boss radius 10, thickness 6, in the
    # plane z = 0) above a box whose top face is z = -13 clears it by 13 - 3 = 10 mm.
    plate = _stadium()
    box = Box([40, 0, -63], [100, 50, 50])
    sep = separation(plate.plate(), box)
    assert sep.distance_mm == pytest.approx(10.0, abs=1e-9)


def test_overlapping_holes_are_named():
    with pytest.raises(GeometryError, match=r"holes 'pivot' and 'push' apart.*overlap"):
        plate_outline(
            [0, 0, 0],
            [0, 0, 1],
            {"push": [10, 0, 0]},
            pivot_hole_mm=12,
            pickup_hole_mm=8,
            edge_margin_mm=4,
            thickness_mm=5,
        )
    with pytest.raises(GeometryError, match=r"holes 'push' and 'link' apart"):
        plate_outline(
            [0, 0, 0],
            [0, 0, 1],
            {"push": [50, 0, 0], "link": [50, 7, 0]},
            pivot_hole_mm=12,
            pickup_hole_mm=8,
            edge_margin_mm=4,
            thickness_mm=5,
        )


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"pivot_hole_mm": 0}, r"pivot_hole_mm: expected a length > 0"),
        ({"edge_margin_mm": -1}, r"edge_margin_mm: expected a length > 0"),
        ({"pickup_hole_mm": {"other": 8}}, r"expected a diameter for every pickup"),
        ({"axis_p1": [0, 0, 0]}, r"axis_p1: expected a point distinct"),
        ({"pickups": {"push": [0, 0, 5]}}, r"expected a pickup off the pivot axis"),
    ],
)
def test_bad_values_raise(kwargs, match):
    args = {
        "axis_p0": [0, 0, 0],
        "axis_p1": [0, 0, 1],
        "pickups": {"push": [50, 0, 0]},
        "pivot_hole_mm": 12,
        "pickup_hole_mm": 8,
        "edge_margin_mm": 4,
        "thickness_mm": 5,
    }
    args.update(kwargs)
    with pytest.raises(GeometryError, match=match):
        plate_outline(args.pop("axis_p0"), args.pop("axis_p1"), args.pop("pickups"), **args)
