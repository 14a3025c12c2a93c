"""Redundant location solved elastically (DESIGN §4a), against outside references.

Fixture: tests/elastic_designs.py (invented): a rigid beam on three vertical rods from
three slider uprights, plus a guide; the uprights' travels move the rods' supports.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import minimize

from designs import load_cases_text
from elastic_designs import (
    E_4130_MPA,
    LENGTH_MM,
    X_MM,
    Z_BEAM,
    beam_text,
    closed_form,
    solve_moved,
    stiffness_of,
    tube_area_mm2,
)
from plumbrod.design.loading import parse_design
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.drives import TravelDrive
from plumbrod.kinematics.solver import solve_poses
from plumbrod.mechanics.analysis import analyse

MOVES = np.array(
    [
        [0.05, 0.05, -0.08],
        [-0.10, -0.10, 0.04],
        [0.00, 0.00, 0.03],
    ]
)
MIXED = ((16.0, 1.2), (12.0, 1.0), (20.0, 2.0))
MIXED_E = (E_4130_MPA, E_4130_MPA, 68_900.0)  # 6061-T6 (Aluminum Association, MatWeb), pub-copy


def _fight(link, result) -> np.ndarray:  # type: ignore[no-untyped-def]
    e = result.elastic
    assert e is not None
    return np.stack(
        [e.force_N[:, list(e.setup.rods).index(link.rod_names.index(n))] for n in "abc"], 1
    )


@pytest.mark.parametrize(
    ("sections", "moduli"),
    [(((16.0, 1.2),) * 3, (E_4130_MPA,) * 3), (MIXED, MIXED_E)],
    ids=["equal rods", "unequal rods"],
)
def test_supports_moved_under_a_rigid_bar_on_three_rods_match_the_closed_form(
    sections: tuple[tuple[float, float], ...], moduli: tuple[float, float, float]
) -> None:
    # Gere / Hibbeler, statically indeterminate rigid bar on three wires (see
    # elastic_designs.closed_form): compatibility (the bar stays straight) and
    # equilibrium (no load: the rod forces and their moments sum to zero).
    design, link, result = solve_moved(beam_text(sections, moduli), MOVES)
    k = stiffness_of(design, link)
    expected_k = np.array(
        [m * tube_area_mm2(od, w) / LENGTH_MM for (od, w), m in zip(sections, moduli, strict=True)]
    )
    np.testing.assert_allclose(k, expected_k, rtol=1e-12)
    got = _fight(link, result)
    for i, moves in enumerate(MOVES):
        expected = closed_form(k, moves)
        scale = np.abs(expected).max()
        np.testing.assert_allclose(got[i], expected, atol=1e-5 * scale)
        # equilibrium of the bar: no net force or moment from the rods
        assert abs(got[i].sum()) < 1e-6 * scale
        assert abs((got[i] * np.array(X_MM)).sum()) < 1e-6 * scale * 300.0
    # the beam's pose: height at each rod equals the support move minus the stretch
    pts = result.solved.kin.points
    for i, moves in enumerate(MOVES):
        w = np.array([pts[i, link.point(f"beam.{n}"), 2] - Z_BEAM for n in "abc"])
        np.testing.assert_allclose(w, moves - got[i] / k, atol=1e-9)
    assert result.solved.residual_max_mm.max() < 1e-9


def test_supports_moved_with_a_load_add_the_load_cases_elastic_forces() -> None:
    # The same closed form with a downward load W at x_W: superposition of the misfit
    # and the load (linear elasticity; Gere §2.4-2.5, from memory). The tool adds the
    # fight forces of the motion to each load case's elastic forces.
    w_N, at = 2000.0, 180.0
    cases = {"hand": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"beam": (0.0, 0.0, -w_N)}}}
    text = beam_text(MIXED, MIXED_E)
    design = parse_design(text + load_cases_text(cases), "beam")
    analysis = analyse(design)
    link = analysis.link
    k = stiffness_of(design, link)
    travel = analysis.sweeps["travel"].spec.values["travel_mm"]  # every upright alike
    total = analysis.rod_force_N("travel")[:, 0, [link.rod_names.index(n) for n in "abc"]]
    for i, s in enumerate(travel):
        expected = closed_form(k, np.full(3, s), w_N, at)
        np.testing.assert_allclose(total[i], expected, atol=1e-6 * w_N)
    # equal moves are compatible: no fight at all
    fight = analysis.redundancy
    assert fight is not None and abs(fight.largest[0]) < 1e-6  # type: ignore[index]


def test_the_energy_minimum_matches_scipy_minimize() -> None:
    # scipy.optimize.minimize (SLSQP) on the exact geometry: the beam's pose (x, z, θ)
    # minimising ½Σk(ℓ − ℓ₀)² with the guide's length held (equality constraint).
    moves = np.array([0.4, 0.4, -0.35])  # large enough for the geometry to matter
    design, link, result = solve_moved(beam_text(MIXED, MIXED_E), moves[None])
    k = stiffness_of(design, link)
    x = np.array(X_MM)
    beam = np.stack((x, np.full(3, Z_BEAM)), 1)
    tops = np.stack((x, Z_BEAM + LENGTH_MM + moves), 1)
    ref = np.array([180.0, Z_BEAM])
    guide_beam, guide_chassis = np.array([400.0, Z_BEAM]), np.array([700.0, Z_BEAM])

    def place(p: np.ndarray, q: np.ndarray) -> np.ndarray:
        c, s = math.cos(q[2]), math.sin(q[2])
        rot = np.array([[c, -s], [s, c]])
        return (p - ref) @ rot.T + ref + q[:2]

    def energy(q: np.ndarray) -> float:
        ell = np.linalg.norm(tops - place(beam, q), axis=1)
        return float(0.5 * np.sum(k * (ell - LENGTH_MM) ** 2))

    def guide(q: np.ndarray) -> float:
        return float(np.linalg.norm(place(guide_beam, q) - guide_chassis) - 300.0)

    best = minimize(
        energy,
        np.zeros(3),
        method="SLSQP",
        constraints=[{"type": "eq", "fun": guide}],
        options={"ftol": 1e-16, "maxiter": 500},
    )
    assert best.success
    ell = np.linalg.norm(tops - place(beam, best.x), axis=1)
    expected = k * (ell - LENGTH_MM)
    got = _fight(link, result)[0]
    np.testing.assert_allclose(got, expected, atol=1e-4 * np.abs(expected).max())
    pts = result.solved.kin.points[0]
    for n, p in zip("abc", place(beam, best.x), strict=True):
        np.testing.assert_allclose(pts[link.point(f"beam.{n}"), [0, 2]], p, atol=1e-6)
    # and the tool's pose has the lower (or equal) energy of the two
    tool = 0.5 * np.sum(k * (got / k) ** 2)
    assert tool <= energy(best.x) * (1 + 1e-9) + 1e-12


def test_stiffer_rods_take_the_elastic_answer_to_the_rigid_one() -> None:
    # As rods a and b grow stiffer than c, the beam must follow their supports: the
    # elastic pose tends to the rigid pose of the exactly located beam on a, b and the
    # guide (the straight line through the moved supports of a and b), the gap
    # shrinking like 1/factor (the closed form above with k_a, k_b -> infinity).
    moves = np.array([0.05, 0.05, -0.08])
    x = np.array(X_MM)
    slope = (moves[1] - moves[0]) / (x[1] - x[0])
    rigid_c = moves[0] + slope * (x[2] - x[0])  # the beam's height at rod c, rigid limit
    gaps = []
    for factor in (1.0, 10.0, 100.0, 1000.0):
        # rods a and b factor times stiffer than c (c's modulus lowered: the file's
        # moduli are bounded, and only the ratio matters for the pose)
        moduli = (E_4130_MPA, E_4130_MPA, E_4130_MPA / factor)
        design, link, result = solve_moved(beam_text(moduli_MPa=moduli), moves[None])
        z_c = result.solved.kin.points[0, link.point("beam.c"), 2] - Z_BEAM
        k = stiffness_of(design, link)
        assert z_c == pytest.approx((moves - closed_form(k, moves) / k)[2], abs=1e-9)
        gaps.append(abs(z_c - rigid_c))
    gaps_a = np.array(gaps)
    assert np.all(np.diff(gaps_a) < 0)
    assert gaps_a[-1] / gaps_a[-2] == pytest.approx(0.1, rel=0.05)  # the 1/factor law
    assert gaps_a[-1] < 5e-3 * abs(moves[2] - rigid_c)


def test_compatible_moves_give_zero_fight_and_the_rigid_pose() -> None:
    # Supports moved along one straight line (here: all by the same amount, the only
    # line the two uprights can make with a and b on one of them) are compatible with a
    # rigid beam: the elastic solution is the rigid one (common practice, no source: a
    # compatible redundant structure carries no self-stress), for any stiffness.
    moves = np.full(3, 0.7)
    text = beam_text(MIXED, MIXED_E)
    _, link, result = solve_moved(text, moves[None])
    assert np.abs(result.elastic.force_N).max() < 1e-6  # type: ignore[union-attr]
    # the rigid solution: compatible geometry lets the rigid solver close every rod
    rigid_link = build_linkage(parse_design(text, "beam"))
    solved = solve_poses(rigid_link, TravelDrive(moves[None, [0, 2]]))
    for n in "abc":
        i = link.point(f"beam.{n}")
        np.testing.assert_allclose(
            result.solved.kin.points[0, i], solved.kin.points[0, i], atol=1e-9
        )
        # and the beam simply rose with its supports
        assert solved.kin.points[0, i, 2] - Z_BEAM == pytest.approx(0.7, abs=1e-9)
