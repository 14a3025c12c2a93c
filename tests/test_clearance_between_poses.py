"""Clearance between the sweep poses: the least distance over the continuous sweep.

The case: in the invented planar undertray, the fore-aft floor link (length L, radius r)
turns about its chassis end O as the wheels travel.  A box zone has a corner edge C at
distance rho from O, with its faces turned away from O, in a direction the link points
to between two sweep poses.  Plane geometry (common practice, no source): every point of
the link is within L of O and the box lies beyond the line through C normal to OC, so the
least distance over the continuous sweep is rho - L - r, reached where the link points at
C; at a pose where the link is at angle d from OC, the end is sqrt(rho² + L² - 2 rho L
cos d) from C (law of cosines).
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from designs import ROOT
from plumbrod.clearance.survey import clearance_report
from plumbrod.design.loading import parse_design
from plumbrod.mechanics.analysis import analyse

PLANAR = ROOT / "examples" / "planar_undertray.toml"
GAP_MM = 34.0


def _travel_only(steps: int) -> str:
    text = PLANAR.read_text()
    text = text.replace(
        "[sweeps.travel]\nrange_mm = [-40.0, 40.0]\nsteps = 161",
        f"[sweeps.travel]\nrange_mm = [-40.0, 40.0]\nsteps = {steps}",
    )
    assert f"steps = {steps}\n" in text
    for table in ("heave", "pitch"):
        text = text.replace(f"[sweeps.{table}]\n", f"[sweeps.{table}]\nenabled = false\n", 1)
    return text


def _corner_case(steps: int = 9) -> tuple[str, dict[str, object]]:
    """The design text with the corner zone, and the closed-form figures."""
    text = _travel_only(steps)
    bare = analyse(parse_design(text, "bare.toml"))
    rod = next(r for r in bare.design.rods if r.name == "floor_link")
    origin = np.array([-300.0, 0.0, 60.0])  # chassis.floor_link
    end = bare.sweeps["travel"].solved.kin.points[:, bare.link.point(rod.end_b)]
    alpha = np.arctan2(end[:, 2] - origin[2], -(end[:, 0] - origin[0]))  # from -x, up
    length = float(np.linalg.norm(end[0] - origin))
    radius = rod.od_mm / 2.0
    rho = length + radius + GAP_MM
    aim = 0.5 * (alpha[5] + alpha[6])  # between poses 5 and 6
    corner = origin + rho * np.array([-math.cos(aim), 0.0, math.sin(aim)])
    toward = (origin - corner) / rho
    centre = corner - 20.0 * math.sqrt(2.0) * toward  # a 40 mm square, corner towards O
    turn = 45.0 - math.degrees(math.atan2(toward[2], toward[0]))
    zone = (
        '\n[zones.corner]\nkind = "box"\n'
        f"centre_mm = [{centre[0]:.12f}, {centre[2]:.12f}]\n"
        "size_mm = [40.0, 100.0, 40.0]\n"
        f"rotation_deg = [0.0, {turn:.12f}, 0.0]\n"
    )
    at_poses = np.sqrt(rho**2 + length**2 - 2.0 * rho * length * np.cos(alpha - aim)) - radius
    facts = {"corner": corner, "at_poses": at_poses, "true": rho - length - radius}
    return text + zone, facts


def _pair(report, b: str):
    return next(p for p in report.pairs if p.a == "rod 'floor_link'" and p.b == b)


def test_a_rod_passing_a_box_corner_reports_the_minimum_between_the_poses() -> None:
    text, facts = _corner_case(steps=9)
    analysis = analyse(parse_design(text, "corner.toml"))
    pair = _pair(clearance_report(analysis), "zone 'corner'")
    at_poses = facts["at_poses"]
    assert isinstance(at_poses, np.ndarray)
    # over the 9 poses alone the corner seems 0.35 mm further away than it comes
    assert pair.pose_distance_mm == pytest.approx(float(at_poses.min()), abs=1e-6)
    assert pair.pose_distance_mm > GAP_MM + 0.3
    assert pair.pose in (5, 6)
    # between the poses: the closed-form minimum rho - L - r, to 0.01 mm
    assert facts["true"] == pytest.approx(GAP_MM)
    assert pair.between_poses and pair.exact
    assert pair.distance_mm == pytest.approx(GAP_MM, abs=0.01)
    assert pair.distance_mm <= pair.pose_distance_mm
    # found at the corner, at a travel between the poses 5 and 6 (10 and 20 mm)
    assert np.allclose(pair.point_b, facts["corner"], atol=0.05)
    assert 10.0 < pair.driver["travel_mm"] < 20.0
    assert pair.at.startswith("travel +1")


def test_the_refined_minimum_agrees_with_a_dense_sweep() -> None:
    # the same corner swept with 2001 poses (40 um of travel apart): its least distance
    # over the poses is within 0.01 mm of the 9-pose sweep refined between its poses
    text, _ = _corner_case(steps=9)
    coarse = _pair(clearance_report(analyse(parse_design(text, "c.toml"))), "zone 'corner'")
    dense_text = text.replace("steps = 9\n", "steps = 2001\n", 1)
    dense = analyse(parse_design(dense_text, "d.toml"))
    fine = _pair(clearance_report(dense, between_poses=False), "zone 'corner'")
    assert not fine.between_poses
    assert fine.distance_mm == pytest.approx(coarse.distance_mm, abs=0.01)
    assert fine.distance_mm >= coarse.distance_mm - 1e-9


def test_pairs_far_from_their_limit_keep_the_least_over_the_poses() -> None:
    text, _ = _corner_case(steps=9)
    report = clearance_report(analyse(parse_design(text, "corner.toml")))
    for pair in report.pairs:
        if pair.exact and not pair.between_poses:
            assert pair.distance_mm == pair.pose_distance_mm
            assert pair.margin_mm > 50.0
        if not pair.exact:
            assert not pair.between_poses and pair.pose == -1


def test_the_json_report_carries_the_refined_figure(tmp_path: Path) -> None:
    text, _ = _corner_case(steps=9)
    (tmp_path / "corner.toml").write_text(text)
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "corner.toml", "--json"],
        capture_output=True,
        text=True,
        cwd=tmp_path,
        check=False,
    )
    assert done.returncode in (0, 1), done.stderr
    pair = next(
        p for p in json.loads(done.stdout)["clearance"]["pairs"] if p["b"] == "zone 'corner'"
    )
    assert pair["exact"] is True and pair["between_poses"] is True
    assert pair["distance_mm"] == pytest.approx(GAP_MM, abs=0.01)
    assert pair["pose_distance_mm"] > GAP_MM + 0.3
    assert 10.0 < pair["driver"]["travel_mm"] < 20.0


def test_on_a_grid_sweep_the_search_is_at_least_as_close_as_a_fine_grid() -> None:
    text = (ROOT / "examples" / "hillclimb_splitter.toml").read_text()
    coarse_text = text.replace(
        "[sweeps.heave_roll]\nsteps = [41, 41]", "[sweeps.heave_roll]\nsteps = [5, 5]"
    )
    fine_text = text.replace(
        "[sweeps.heave_roll]\nsteps = [41, 41]", "[sweeps.heave_roll]\nsteps = [81, 81]"
    )
    coarse = clearance_report(analyse(parse_design(coarse_text, "coarse.toml")))
    fine = clearance_report(analyse(parse_design(fine_text, "fine.toml")), between_poses=False)
    checked = 0
    for pair in coarse.pairs:
        if not pair.between_poses:
            continue
        other = next(p for p in fine.pairs if (p.a, p.b) == (pair.a, pair.b))
        # the other sweeps are the same in both; searched between the 5 x 5 grid poses,
        # the least distance is never further than the 81 x 81 poses show
        assert pair.distance_mm <= other.distance_mm + 0.01
        assert pair.distance_mm <= pair.pose_distance_mm
        checked += 1
    assert checked > 0
