"""Clearance on whole designs: the least distance over every pose of every sweep.

The distance kernels are tested against hand-computed cases, dense sampling and shapely
in test_distance.py.  Here the reference is brute force over the solved poses: every
pose measured with :func:`plumbrod.clearance.distance.separation` (an exact per-pose kernel, no
pose skipped), compared with what the clearance report found while skipping poses.
"""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest

from designs import EXAMPLE, FrontChain, front_chain_text, replace_once
from plumbrod.clearance.distance import separation
from plumbrod.clearance.survey import ClearanceReport, clearance_report, zone_solids
from plumbrod.design.loading import parse_design
from plumbrod.geometry.shapes import Box, Capsule, Plate
from plumbrod.mechanics.analysis import analyse
from plumbrod.mechanics.plates import rocker_outlines


def _all_points(analysis):  # (poses of every sweep, np, 3), rotations, translations
    kins = [r.solved.kin for r in analysis.sweeps.values()]
    return (
        np.concatenate([k.points for k in kins]),
        np.concatenate([k.rotation for k in kins]),
        np.concatenate([k.translation for k in kins]),
    )


def _rod_capsule(analysis, name, points):
    rod = next(r for r in analysis.design.rods if r.name == name)
    a = points[:, analysis.link.point(rod.end_a)]
    b = points[:, analysis.link.point(rod.end_b)]
    return Capsule(a, b, rod.od_mm / 2.0)


def _pair(report: ClearanceReport, a: str, b: str):
    return next(p for p in report.pairs if p.a == a and p.b == b)


ZONE_INTO_DROP_ROD = """
[zones.intruder]
kind = "box"
centre_mm = [57.5, {y}, 200.0]
size_mm = [80.0, 100.0, 60.0]
"""


def test_a_zone_moved_into_a_rod_is_interference_at_least_as_deep_as_at_rest():
    # The drop rod (OD 16) stands at y = 514 at rest.  A box whose inner face is at
    # y = 514 + 8 - 3 overlaps the rod by 3 mm at rest (plane geometry: common
    # practice, no source); over the sweeps the least distance can only be as deep or
    # deeper, and it must equal the brute-force minimum over every solved pose.
    face = 514.0 + 8.0 - 3.0
    text = EXAMPLE.read_text() + ZONE_INTO_DROP_ROD.format(y=face + 50.0)
    analysis = analyse(parse_design(text, "intruder.toml"))
    report = clearance_report(analysis)
    pair = _pair(report, "rod 'drop_left'", "zone 'intruder'")
    assert pair.exact
    assert pair.distance_mm <= -3.0 + 1e-9
    points, _, _ = _all_points(analysis)
    zone = zone_solids(analysis)["zone 'intruder'"][0]
    brute = separation(_rod_capsule(analysis, "drop_left", points), zone).distance_mm
    assert pair.pose_distance_mm == pytest.approx(float(np.min(brute)), abs=1e-9)
    assert pair.distance_mm <= pair.pose_distance_mm  # between the poses: never more
    at_rest = separation(
        Capsule(np.array([57.5, 514.0, 147.0]), np.array([57.5, 514.0, 250.0]), 8.0), zone
    ).distance_mm
    assert float(at_rest) == pytest.approx(-3.0, abs=1e-9)
    assert report.pairs[0] == pair  # the worst pair is listed first


def test_the_clearance_check_fails_on_interference_through_the_command_line(tmp_path):
    face = 514.0 + 8.0 - 3.0
    path = tmp_path / "intruder.toml"
    path.write_text(EXAMPLE.read_text() + ZONE_INTO_DROP_ROD.format(y=face + 50.0))
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", str(path), "--json"],
        capture_output=True,
        text=True,
        check=False,
    )
    assert done.returncode == 1, done.stderr
    check = next(c for c in json.loads(done.stdout)["checks"] if c["id"] == "clearance")
    assert check["status"] == "fail"
    assert check["value"] < 0
    assert "drop_left" in check["where"] and "intruder" in check["where"]


def test_a_zone_clearance_limit_overrides_the_global_one():
    text = EXAMPLE.read_text().replace(
        '[zones.steering_rack]\nkind = "cylinder"',
        '[zones.steering_rack]\nkind = "cylinder"\nclearance_mm = 30.0',
    )
    analysis = analyse(parse_design(text, "rack.toml"))
    report = clearance_report(analysis)
    pair = _pair(report, "rod 'drag_high'", "zone 'steering_rack'")
    assert pair.limit_mm == 30.0
    other = _pair(report, "rod 'drag_low'", "zone 'tub'")
    assert other.limit_mm == analysis.design.limits.clearance_mm


PLATE = """
[rockers.lever_left.plate]
thickness_mm = 5.0
material = "7075-T6"
pivot_hole_mm = 10.0
hole_mm = 10.0
edge_margin_mm = 6.0
"""

CORNER_ZONE = """
[zones.corner_box]
kind = "box"
centre_mm = [0.0, 675.0, 700.0]
size_mm = [200.0, 200.0, 200.0]
"""


def _front_plate_design():
    text = front_chain_text(FrontChain())
    text = replace_once(
        text, "[rockers.lever_left.pickups]", PLATE.strip() + "\n\n[rockers.lever_left.pickups]"
    )
    # only the roll sweep: the plate passes the box's edge as the body rolls
    for table in ("[sweeps.travel]", "[sweeps.heave]"):
        text = replace_once(text, table, table + "\nenabled = false")
    text = replace_once(text, "[sweeps.heave_roll]\nsteps = [5, 5]\n", "")
    text = replace_once(
        text, "range_deg = [-2.0, 2.0]\nsteps = 21", "range_deg = [-3.0, 3.0]\nsteps = 61"
    )
    return text + CORNER_ZONE


def test_a_rocker_plate_passing_a_zone_edge_in_roll_matches_brute_force():
    analysis = analyse(parse_design(_front_plate_design(), "plate.toml"))
    assert list(analysis.sweeps) == ["roll"]
    report = clearance_report(analysis)
    pair = _pair(report, "plate of rocker 'lever_left'", "zone 'corner_box'")
    assert pair.exact and pair.sweep == "roll"
    outline = rocker_outlines(analysis.design)["lever_left"]
    _, rot, trans = _all_points(analysis)
    b = analysis.link.body("lever_left")
    plate = Plate(
        outline.vertices_3d(rot[:, b], trans[:, b], chord_tol_mm=0.5), outline.thickness_mm
    )
    zone = zone_solids(analysis)["zone 'corner_box'"][0]
    brute = np.asarray(separation(plate, zone).distance_mm)
    assert pair.pose_distance_mm == pytest.approx(float(brute.min()), abs=1e-9)
    assert pair.distance_mm <= pair.pose_distance_mm  # between the poses: never more
    assert pair.pose == int(np.argmin(brute))
    # the plate really passes the edge: the distance has an interior minimum in roll
    assert 0 < int(np.argmin(brute)) < brute.size - 1
    assert brute.max() - brute.min() > 1.0


def test_far_pairs_are_lower_bounds_of_the_true_least_distance():
    analysis = analyse(parse_design(EXAMPLE.read_text(), "example.toml"))
    report = clearance_report(analysis)
    far = [p for p in report.pairs if not p.exact]
    assert far, "the example should have pairs far apart"
    points, _, _ = _all_points(analysis)
    zones = {**zone_solids(analysis)}
    checked = 0
    for pair in far:
        if not pair.a.startswith("rod") or pair.b not in zones:
            continue
        rod = pair.a.split("'")[1]
        exact = np.asarray(
            separation(_rod_capsule(analysis, rod, points), zones[pair.b][0]).distance_mm
        ).min()
        assert pair.distance_mm <= exact + 1e-9
        checked += 1
    assert checked > 0


def test_a_joint_inside_a_zone_is_listed_and_not_checked():
    # a zone around the chassis end of drag_low: that joint is meant to be there
    text = (
        EXAMPLE.read_text()
        + """
[zones.bracket]
kind = "box"
centre_mm = [120.0, 0.0, 75.0]
size_mm = [20.0, 20.0, 20.0]
"""
    )
    analysis = analyse(parse_design(text, "bracket.toml"))
    report = clearance_report(analysis)
    assert any("drag_low" in note and "bracket" in note for note in report.skipped)
    assert not any(p.a == "rod 'drag_low'" and p.b == "zone 'bracket'" for p in report.pairs)


def test_an_element_envelope_moves_with_the_element_and_is_checked():
    # a box fixed in the splitter near the radiator zone: the envelope's least distance
    # equals brute force over every pose (the box follows the element's pose)
    text = EXAMPLE.read_text().replace(
        "[elements.splitter.aero]",
        "[elements.splitter.envelope]\ncentre_mm = [600.0, 0.0, 120.0]\n"
        "size_mm = [300.0, 200.0, 140.0]\n\n[elements.splitter.aero]",
    )
    analysis = analyse(parse_design(text, "envelope.toml"))
    report = clearance_report(analysis)
    pair = _pair(report, "envelope of element 'splitter'", "zone 'radiator'")
    assert pair.exact
    _, rot, trans = _all_points(analysis)
    b = analysis.link.body("splitter")
    box = Box(
        rot[:, b] @ np.array([600.0, 0.0, 120.0]) + trans[:, b],
        np.array([150.0, 100.0, 70.0]),
        rot[:, b],
    )
    zone = zone_solids(analysis)["zone 'radiator'"][0]
    brute = np.asarray(separation(box, zone).distance_mm)
    assert pair.pose_distance_mm == pytest.approx(float(brute.min()), abs=1e-9)
    assert pair.distance_mm <= pair.pose_distance_mm  # between the poses: never more
    # rods joined to the splitter are not paired with its envelope
    assert not any("envelope" in p.a and p.b.startswith("rod") for p in report.pairs)
