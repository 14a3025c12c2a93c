"""The designs × poses batch: every design through every pose in one solve, agreeing with
solving each design alone; a design that cannot assemble is flagged, never raised."""

from __future__ import annotations

import numpy as np
import pytest

from designs import EXAMPLE
from plumbrod.design.loading import parse_design
from plumbrod.errors import AssemblyError
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.design_grid import solve_grid
from plumbrod.kinematics.drives import BodyDrive, TravelDrive
from plumbrod.kinematics.reduced import reduce_linkage, solve_grid_reduced
from plumbrod.kinematics.solver import solve_poses, tangent


def _designs(count: int, spread: float):
    link = build_linkage(parse_design(EXAMPLE.read_text(), "example"))
    rng = np.random.default_rng(5)
    points = np.repeat(link.points, count, axis=0)
    shift = rng.uniform(-spread, spread, size=count)
    for name, sign in (
        ("rocker_left.front_arm", 1),
        ("splitter.hanger_left", 1),
        ("rocker_right.front_arm", -1),
        ("splitter.hanger_right", -1),
    ):
        points[:, link.point(name), 1] += sign * shift
    return link, points


def test_grid_matches_each_design_solved_alone() -> None:
    link, points = _designs(4, 40.0)
    travel = np.linspace(-40.0, 40.0, 9)
    drives = [
        TravelDrive(np.repeat(travel[:, None], 2, axis=1)),
        BodyDrive(np.stack((np.linspace(-25, 25, 5), np.zeros(5), np.zeros(5)), axis=1)),
    ]
    for drive in drives:
        grid = solve_grid(link, points, drive)
        p = drive.parameters.shape[0]
        assert grid.assembled.all()
        for g in range(points.shape[0]):
            one = link.with_points(points[g : g + 1])
            alone = solve_poses(one, drive)
            rows = slice(g * p, (g + 1) * p)
            np.testing.assert_allclose(grid.kin.points[rows], alone.kin.points, atol=1e-9)
            tan = tangent(one, drive, alone.kin, alone.jacobian)
            np.testing.assert_allclose(grid.tangent[rows], tan, atol=1e-9)


def test_a_design_that_cannot_assemble_is_flagged_not_raised() -> None:
    link, points = _designs(3, 0.0)
    # the second design's rocker rear arm is 10 mm long (the drop link moved with it):
    # 40 mm of wheel travel would have to turn it past its dead point
    for name in ("front_left.lower.drop", "rocker_left.rear_arm"):
        points[1, link.point(name), 1] = 310.0
    drive = TravelDrive(np.repeat(np.linspace(-40, 40, 9)[:, None], 2, axis=1))
    grid = solve_grid(link, points, drive)
    assert grid.assembled.tolist() == [True, False, True]
    assert np.all(np.isfinite(grid.tangent))
    with pytest.raises(AssemblyError):  # solved alone, the same design is an error
        solve_poses(link.with_points(points[1:2]), drive)


def test_suspension_solved_once_matches_the_whole_batch() -> None:
    """The block split (corners once per pose, then each candidate's route) gives the
    poses and tangents of the full designs x poses solve."""
    link, points = _designs(5, 40.0)
    names = ("front_left.lower.drop", "rocker_left.rear_arm")
    for name in names:  # the drop link moves along the wishbone with its rocker arm
        points[:, link.point(name), 1] += np.linspace(-20.0, 20.0, 5)
    moved = np.flatnonzero(np.abs(points - link.points).max(axis=(0, 2)) > 0)
    red = reduce_linkage(link, moved)
    assert red is not None
    assert set(red.route.body_names) == {
        "chassis",
        "rocker_left",
        "rocker_right",
        "front_left.lower",
        "front_right.lower",
        "splitter",
    }
    drives = [
        TravelDrive(np.repeat(np.linspace(-40.0, 40.0, 7)[:, None], 2, axis=1)),
        BodyDrive(
            np.stack(
                (np.linspace(-25, 25, 5), np.radians(np.linspace(-1, 1, 5)), np.zeros(5)), axis=1
            )
        ),
    ]
    for drive in drives:
        whole = solve_grid(link, points, drive)
        split = solve_grid_reduced(red, points, drive)
        assert split.assembled.all() and whole.assembled.all()
        np.testing.assert_allclose(split.kin.points, whole.kin.points, atol=1e-8)
        np.testing.assert_allclose(split.kin.columns, whole.kin.columns, atol=1e-8)
        np.testing.assert_allclose(split.tangent, whole.tangent, atol=1e-9)
        np.testing.assert_allclose(split.pose.joint, whole.pose.joint, atol=1e-12)


def test_no_split_when_a_suspension_point_moves() -> None:
    link, _ = _designs(1, 0.0)
    assert reduce_linkage(link, np.array([link.point("front_left.upright.tie_rod_outer")])) is None


def test_no_split_for_a_rocker_pivoted_on_a_wishbone() -> None:
    text = EXAMPLE.read_text().replace('parent = "chassis"', 'parent = "front_left.upper"', 1)
    link = build_linkage(parse_design(text, "rocker on the upper wishbone"))
    assert reduce_linkage(link, np.array([link.point("rocker_left.front_arm")])) is None
