"""The route block's closed-form rows (kinematics/route_block.py) against the general
linkage solver, finite differences and scipy's rotations.

The closed forms are only a shorter way of computing the same equations; these tests
hold them to the general path (every example whose route block has that shape) and to
two references outside the project: central finite differences of the residual
(calculus: the Jacobian is the residual's derivative) and
``scipy.spatial.transform.Rotation.from_rotvec`` for the rotation-vector formula.
"""

from __future__ import annotations

import numpy as np
import pytest

from designs import EXAMPLES
from plumbrod.design.loading import load_design
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.design_grid import solve_grid
from plumbrod.kinematics.drives import BodyDrive, TravelDrive
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.reduced import (
    Reduction,
    _carriers,
    reduce_linkage,
    solve_grid_reduced,
)
from plumbrod.kinematics.route_block import BlockRows, _rotation_matrix


def _route_points(link: Linkage) -> np.ndarray:
    """Points on rockers and elements (what a tune moves), without the axis ends."""
    kinds = link.body_kind
    return np.array(
        [
            i
            for i, b in enumerate(link.point_body)
            if kinds[b] in ("rocker", "element")
            and not link.point_names[i].endswith((".axis_a", ".axis_b"))
        ],
        dtype=np.intp,
    )


def _blocks() -> list[tuple[str, Linkage, Reduction]]:
    out = []
    for path in EXAMPLES:
        link = build_linkage(load_design(path))
        red = reduce_linkage(link, _route_points(link))
        if red is not None and red.block is not None:
            out.append((path.stem, link, red))
    return out


BLOCKS = _blocks()


def _candidates(link: Linkage, moved: np.ndarray, count: int, spread: float) -> np.ndarray:
    rng = np.random.default_rng(11)
    points = np.repeat(link.points, count, axis=0)
    shift = rng.uniform(-spread, spread, size=(count, moved.size, 3))
    if link.plane is not None:  # planar: keep the points in their plane
        shift[..., 1] = 0.0
    points[:, moved] += shift
    return points


def test_the_closed_form_block_covers_3d_and_planar_examples() -> None:
    names = {name for name, _, _ in BLOCKS}
    assert "tune_splitter" in names and "hillclimb_splitter" in names
    assert any(link.plane is not None for _, link, _ in BLOCKS)


@pytest.mark.parametrize(("name", "link", "red"), BLOCKS, ids=[b[0] for b in BLOCKS])
def test_block_solution_matches_the_general_solver(
    name: str, link: Linkage, red: Reduction
) -> None:
    moved = _route_points(link)
    points = _candidates(link, moved, 4, 3.0)
    nc = len(link.corner_names)
    travel = np.linspace(-30.0, 30.0, 7)
    drives = [
        TravelDrive(np.repeat(travel[:, None], nc, axis=1)),
        BodyDrive(np.stack((np.linspace(-20, 20, 5), np.zeros(5), np.zeros(5)), axis=1)),
    ]
    for drive in drives:
        whole = solve_grid(link, points, drive)
        split = solve_grid_reduced(red, points, drive)
        assert split.assembled.tolist() == whole.assembled.tolist()
        rows = np.repeat(whole.assembled, drive.parameters.shape[0])
        assert rows.any()
        np.testing.assert_allclose(split.kin.points[rows], whole.kin.points[rows], atol=1e-8)
        np.testing.assert_allclose(split.kin.columns[rows], whole.kin.columns[rows], atol=1e-8)
        np.testing.assert_allclose(split.tangent[rows], whole.tangent[rows], atol=1e-8)


def test_a_candidate_that_cannot_assemble_is_flagged_by_both_paths() -> None:
    _, link, red = next(b for b in BLOCKS if b[0] == "hillclimb_splitter")
    points = np.repeat(link.points, 3, axis=0)
    # the middle candidate's rocker rear arm is 10 mm long (its drop pickup moved with
    # it): 40 mm of wheel travel would turn it past its dead point
    for point in ("front_left.lower.drop", "rocker_left.rear_arm"):
        points[1, link.point(point), 1] = 310.0
    drive = TravelDrive(np.repeat(np.linspace(-40, 40, 9)[:, None], 2, axis=1))
    split = solve_grid_reduced(red, points, drive)
    whole = solve_grid(link, points, drive)
    assert split.assembled.tolist() == whole.assembled.tolist() == [True, False, True]
    assert np.all(np.isfinite(split.tangent))


@pytest.mark.parametrize(("name", "link", "red"), BLOCKS, ids=[b[0] for b in BLOCKS])
def test_block_jacobian_is_the_residuals_derivative(
    name: str, link: Linkage, red: Reduction
) -> None:
    """Central differences of the residual along each unknown coordinate (step 1e-6,
    error O(h^2)) agree with the closed-form Jacobian."""
    block = red.block
    assert block is not None
    points = _candidates(link, _route_points(link), 2, 3.0)
    sub = np.where(
        (red.route_points >= 0)[None, :, None], points[:, np.maximum(red.route_points, 0)], 0.0
    )
    nc = len(link.corner_names)
    drive = TravelDrive(np.repeat(np.array([[-25.0], [10.0]]), nc, axis=1))
    car = _carriers(red, drive)
    rows = BlockRows(block, sub, car.rotation, car.centre)
    rng = np.random.default_rng(3)
    # an off-solution state: the design pose nudged along every unknown
    state = rows.advance(rows.design_state(), rng.normal(0.0, 0.02, (block.n_unknown, rows.n)))
    _, jac, _, _ = rows.evaluate(state)
    h = 1e-6
    for col in range(block.n_unknown):
        step = np.zeros((block.n_unknown, rows.n))
        step[col] = h
        up, _, _, _ = rows.evaluate(rows.advance(state, step))
        down, _, _, _ = rows.evaluate(rows.advance(state, -step))
        np.testing.assert_allclose(jac[:, :, col], (up - down) / (2 * h), atol=1e-6)


def test_rotation_vector_formula_matches_scipy() -> None:
    from scipy.spatial.transform import Rotation

    rng = np.random.default_rng(8)
    vectors = np.concatenate(
        (
            rng.normal(0.0, 1.0, (40, 3)),  # large turns
            rng.normal(0.0, 1e-5, (40, 3)),  # below the series threshold
            np.zeros((1, 3)),
        )
    )
    ours = np.transpose(_rotation_matrix(vectors.T), (2, 0, 1))
    np.testing.assert_allclose(ours, Rotation.from_rotvec(vectors).as_matrix(), atol=1e-14)


def test_screening_on_the_block_matches_the_general_route_solve() -> None:
    """The tune's screening figures through the closed-form block and through the
    general Newton on the route linkage (the block switched off) agree."""
    import dataclasses
    import tomllib

    from designs import ROOT
    from plumbrod.design.tune_spec import read_tune
    from plumbrod.revise.candidates import Screening

    path = ROOT / "examples" / "tune_splitter.toml"
    design = load_design(path)
    spec = read_tune(design, tomllib.loads(path.read_text()), build_linkage(design).point_names)
    fast = Screening(design, spec)
    general = Screening(design, spec)
    assert fast.reduction is not None and fast.reduction.block is not None
    general.reduction = dataclasses.replace(fast.reduction, block=None, cache={})
    bounds = np.array(spec.bounds)
    x = np.random.default_rng(4).uniform(bounds[:, 0] - 20, bounds[:, 1] + 20, (24, 2))
    a, b = fast(x), general(x)
    assert a.assembled.tolist() == b.assembled.tolist()
    np.testing.assert_allclose(a.constraints, b.constraints, rtol=1e-9, atol=1e-9)
    np.testing.assert_allclose(a.objective, b.objective, rtol=1e-9, atol=1e-12)
