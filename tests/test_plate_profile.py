"""Exact plate profile (hull of the boss circles as arcs and tangent lines) against plane
geometry and against shapely's polygonised hull as the reference library."""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from plumbrod.geometry.plate_outline import plate_outline
from plumbrod.geometry.shapes import GeometryError
from plumbrod.outputs.plate_profile import circle_hull, plate_profile


def _reference_hull(centres: np.ndarray, radii: np.ndarray, quad_segs: int) -> shapely.Polygon:
    """shapely's hull of the circles, each polygonised with ``quad_segs`` per quarter."""
    discs = shapely.buffer(shapely.points(centres), radii, quad_segs=quad_segs)
    return shapely.convex_hull(shapely.union_all(discs))


def test_stadium_area_and_length():
    # source: plane geometry: the convex hull of two circles of radius R whose centres
    # are D apart is a stadium: area π R² + 2 R D, perimeter 2π R + 2 D.
    profile = circle_hull([[0.0, 0.0], [80.0, 0.0]], [10.0, 10.0], ["pivot", "push"])
    assert profile.area_mm2 == pytest.approx(math.pi * 100.0 + 1600.0, rel=1e-14)
    assert profile.length_mm == pytest.approx(2 * math.pi * 10.0 + 160.0, rel=1e-14)
    assert [a.hole for a in profile.arcs] == ["pivot", "push"]
    assert all(a.sweep_rad == pytest.approx(math.pi, abs=1e-12) for a in profile.arcs)


def test_unequal_circles_tangent_lines():
    # source: plane geometry: the outer common tangents of circles r1, r2 with centres
    # D apart have length √(D² − (r1 − r2)²); the arc on the larger circle sweeps
    # π + 2·asin((r1 − r2)/D), on the smaller π − 2·asin((r1 − r2)/D).
    r1, r2, d = 20.0, 8.0, 100.0
    profile = circle_hull([[0.0, 0.0], [d, 0.0]], [r1, r2])
    tangent = math.sqrt(d**2 - (r1 - r2) ** 2)
    for start, end in profile.lines:
        assert math.dist(start, end) == pytest.approx(tangent, rel=1e-13)
    big, small = profile.arcs
    delta = math.asin((r1 - r2) / d)
    assert big.sweep_rad == pytest.approx(math.pi + 2 * delta, rel=1e-13)
    assert small.sweep_rad == pytest.approx(math.pi - 2 * delta, rel=1e-13)
    expected_length = r1 * big.sweep_rad + r2 * small.sweep_rad + 2 * tangent
    assert profile.length_mm == pytest.approx(expected_length, rel=1e-13)


def test_profile_is_tangent_continuous_and_counter_clockwise():
    # common practice, no source: the hull of circles has no corners: every line leaves
    # its arc along the arc's tangent, and the profile turns left all the way round.
    rng = np.random.default_rng(7)
    centres = rng.uniform(-80.0, 80.0, (6, 2))
    radii = rng.uniform(5.0, 25.0, 6)
    profile = circle_hull(centres, radii)
    for arc, (start, end) in zip(profile.arcs, profile.lines, strict=True):
        direction = np.subtract(end, start)
        if np.linalg.norm(direction) < 1e-9:
            continue
        radial = np.subtract(start, arc.centre_uv)
        assert abs(float(direction @ radial)) <= 1e-9 * np.linalg.norm(direction) * arc.radius_mm
        assert radial[0] * direction[1] - radial[1] * direction[0] > 0  # counter-clockwise
    assert sum(a.sweep_rad for a in profile.arcs) == pytest.approx(2 * math.pi, abs=1e-12)


def test_single_and_contained_circles():
    one = circle_hull([[3.0, 4.0]], [5.0])
    assert one.area_mm2 == pytest.approx(math.pi * 25.0, rel=1e-14)
    inner = circle_hull([[0.0, 0.0], [1.0, 0.0]], [10.0, 2.0], ["big", "small"])
    assert [a.hole for a in inner.arcs] == ["big"]
    with pytest.raises(GeometryError, match="radii > 0"):
        circle_hull([[0.0, 0.0]], [0.0])


_MM = st.floats(-200, 200).map(lambda v: round(v, 6))


@settings(max_examples=40, deadline=None)
@given(
    st.lists(
        # centres to 1 µm: shapely's densified Hausdorff distance divides by zero for
        # centres 1e-240 mm apart (a warning, an error here), far below any drawing
        st.tuples(_MM, _MM, st.floats(1.0, 60.0)),
        min_size=1,
        max_size=7,
    )
)
def test_hull_against_shapely(circles):
    # reference library: shapely's convex hull of finely polygonised discs is inscribed
    # in the true hull, at most r·(1 − cos(π/(4q))) inside it (plane geometry).
    data = np.array(circles)
    centres, radii = data[:, :2], data[:, 2]
    q = 256
    chord = float(radii.max()) * (1.0 - math.cos(math.pi / (4 * q)))
    reference = _reference_hull(centres, radii, q)
    profile = circle_hull(centres, radii)
    assert reference.area - 1e-6 <= profile.area_mm2
    assert profile.area_mm2 <= reference.area + reference.length * chord + 1e-6
    sampled = shapely.Polygon(profile.sample_uv(1e-4))
    # circles a hair apart leave a zero-length edge in the reference hull, which
    # shapely's densified Hausdorff distance would divide by: drop repeated points
    reference = shapely.remove_repeated_points(reference, 1e-12)
    assert (
        shapely.hausdorff_distance(sampled.exterior, reference.exterior, densify=0.5)
        <= chord + 1e-4 + 1e-6
    )


def test_plate_profile_matches_its_outline():
    # reference library: the plate outline is shapely's polygon inscribed in the same
    # hull, within its chord tolerance; the exact area is a little larger.
    outline = plate_outline(
        [0, 0, 0],
        [0, 0, 1],
        {"input": [130.0, 0, 0], "output": [0, -130.0, 0]},
        pivot_hole_mm=12.0,
        pickup_hole_mm=10.0,
        edge_margin_mm=8.0,
        thickness_mm=6.0,
    )
    profile = plate_profile(outline)
    assert {a.hole for a in profile.arcs} == {"pivot", "input", "output"}
    gross = outline.outline.area
    assert gross <= profile.area_mm2 <= gross + outline.outline.length * outline.chord_tol_mm
    for arc in profile.arcs:
        hole = next(h for h in outline.holes if h.name == arc.hole)
        assert arc.radius_mm == hole.boss_radius_mm
        assert arc.centre_uv == hole.centre_uv
