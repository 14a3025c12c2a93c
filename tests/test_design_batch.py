"""A stack of candidate designs solves in one batch, pose i on design i, and agrees with
solving each design alone (the batch axis is only a way to compute, not a new model)."""

from __future__ import annotations

import numpy as np
import pytest

from designs import EXAMPLE
from plumbrod.design.loading import parse_design
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.drives import BodyDrive, TravelDrive
from plumbrod.kinematics.solver import solve_poses


def _candidates():
    link = build_linkage(parse_design(EXAMPLE.read_text(), "example"))
    rng = np.random.default_rng(7)
    count = 6
    points = np.repeat(link.points, count, axis=0)
    moved = [
        link.point(n)
        for n in (
            "rocker_left.front_arm",
            "splitter.hanger_left",
            "rocker_right.front_arm",
            "splitter.hanger_right",
        )
    ]
    # move each hanger and its rocker arm together, so the hangers stay vertical
    shift = rng.uniform(-15.0, 15.0, size=(count, 2))
    for k, idx in enumerate(moved):
        points[:, idx, 1] += shift[:, k // 2] * (1 if k < 2 else -1)
    return link, link.with_points(points), points


@pytest.mark.parametrize("kind", ["travel", "body"])
def test_a_batch_of_designs_matches_each_design_solved_alone(kind: str) -> None:
    link, batch, points = _candidates()
    count = points.shape[0]
    if kind == "travel":
        params = np.repeat(np.linspace(-35.0, 35.0, count)[:, None], 2, axis=1)
        drive = TravelDrive(params)
    else:
        params = np.stack(
            (
                np.linspace(-20, 20, count),
                np.radians(np.linspace(1.5, -1.5, count)),
                np.radians(np.linspace(-1.0, 1.0, count)),
            ),
            axis=1,
        )
        drive = BodyDrive(params)
    together = solve_poses(batch, drive)
    assert together.residual_max_mm.max() <= 1e-9
    for i in range(count):
        alone = solve_poses(
            link.with_points(points[i : i + 1]), drive.with_parameters(params[i : i + 1])
        )
        np.testing.assert_allclose(together.kin.points[i], alone.kin.points[0], rtol=0, atol=1e-9)
    # the candidates really differ: their element pickups are not all in the same place
    hanger = batch.point("splitter.hanger_left")
    assert np.ptp(together.kin.points[:, hanger, 1]) > 5.0


def test_a_design_batch_must_match_the_pose_count() -> None:
    _, batch, points = _candidates()
    with pytest.raises(ValueError, match="one per pose"):
        solve_poses(batch, TravelDrive(np.zeros((points.shape[0] + 1, 2))))
