"""The element's attitude (DESIGN §5a): pitch and roll against the ground through the
sweeps, beside the bolted element, and the ``element-attitude`` check."""

from __future__ import annotations

import math

import numpy as np
import pytest

from designs import EXAMPLES, SideChain, body_sweep, parse, side_chain_text, travel_sweep
from plumbrod.kinematics.figures import element_attitudes
from plumbrod.mechanics.analysis import analyse
from plumbrod.verdict.checks import check_element_attitude


def _line_angle_deg(points: np.ndarray) -> np.ndarray:
    """Angle of the line from the first to the second point (B, 2, 3) in the x-z plane."""
    d = points[:, 1] - points[:, 0]
    return np.degrees(np.arctan2(d[:, 2], d[:, 0]))


def test_parallelogram_of_equal_guides_keeps_the_pitch_in_heave() -> None:
    # Plane geometry (common practice, no source): two parallel guides of equal length
    # form a parallelogram with the chassis, so the element only translates: with the
    # body level in heave its pitch against the ground stays zero.
    design, link = parse(side_chain_text(SideChain()), "parallelogram")
    heave = body_sweep(link, np.linspace(-25.0, 25.0, 11), np.zeros(11), np.zeros(11))
    att = element_attitudes(link, heave)["wing"]
    assert np.abs(att.pitch_deg).max() < 1e-9
    travel = travel_sweep(link, np.linspace(-40.0, 40.0, 9))
    assert np.abs(element_attitudes(link, travel)["wing"].pitch_deg).max() < 1e-9
    del design


def test_unequal_guides_pitch_the_element_as_plane_geometry_says() -> None:
    # The pitch is measured from the solved pickups: the angle of the line through the
    # element's two guide pickups, against its design angle (atan2 in the x-z plane);
    # + nose down is the line turning clockwise seen from +y (DESIGN §2).
    chain = SideChain(chassis_guide_lower=(470.0, 120.0))
    design, link = parse(side_chain_text(chain), "trapezoid")
    result = travel_sweep(link, np.linspace(-40.0, 40.0, 9))
    att = element_attitudes(link, result)["wing"]
    idx = [link.point("wing.guide_lower"), link.point("wing.guide_upper")]
    angle = _line_angle_deg(result.solved.kin.points[:, idx])
    design_angle = _line_angle_deg(link.points[:, idx])
    np.testing.assert_allclose(att.pitch_deg, -(angle - design_angle), atol=1e-9)
    assert np.abs(att.pitch_deg).max() > 0.1  # the trapezoid does turn the element
    del design


def test_bolted_pitch_and_roll_are_the_body_motion() -> None:
    # DESIGN §2: the body pose is Ry(pitch)·Rx(roll); a body-fixed fore-aft line turns
    # by the pitch exactly, a body-fixed left-right line by the roll when pitch is 0.
    path = next(p for p in EXAMPLES if p.stem == "hillclimb_splitter")
    analysis = analyse(parse(path.read_text(encoding="utf-8"), "splitter")[0])
    pitch = analysis.figures["pitch"]
    np.testing.assert_allclose(
        pitch.attitude["splitter"].bolted_pitch_deg,
        analysis.sweeps["pitch"].spec.values["pitch_deg"],
        atol=1e-12,
    )
    roll = analysis.figures["roll"]
    np.testing.assert_allclose(
        roll.attitude["splitter"].bolted_roll_deg,
        analysis.sweeps["roll"].spec.values["roll_deg"],
        atol=1e-12,
    )


def test_an_element_on_one_axle_pitches_with_the_body_and_the_check_warns() -> None:
    # Routes that land on the front axle only cannot hold the element's pitch: in the
    # pitch sweep its pitch equals the bolted one (rigid-body kinematics, no source
    # needed); the check warns rather than fails, and names why.
    path = next(p for p in EXAMPLES if p.stem == "hillclimb_splitter")
    analysis = analyse(parse(path.read_text(encoding="utf-8"), "splitter")[0])
    att = analysis.figures["pitch"].attitude["splitter"]
    np.testing.assert_allclose(att.pitch_deg, att.bolted_pitch_deg, atol=0.01)
    check = check_element_attitude(analysis)
    assert check.id == "element-attitude"
    assert check.limit == 0.5
    assert check.value == pytest.approx(1.0, abs=0.01)
    assert check.status == "warn"
    assert "cannot hold its pitch" in check.detail
    assert "own default" in check.detail


@pytest.mark.parametrize(("limit", "status"), [(0.3, "fail"), (0.38, "warn"), (1.0, "pass")])
def test_element_attitude_against_its_limit(limit: float, status: str) -> None:
    # The planar undertray lands on both axles and turns 0.32° when the body pitches 1°.
    path = next(p for p in EXAMPLES if p.stem == "planar_undertray")
    text = path.read_text(encoding="utf-8") + f"\n[limits]\nelement_attitude_deg = {limit}\n"
    analysis = analyse(parse(text, "undertray")[0])
    check = check_element_attitude(analysis)
    att = analysis.figures["pitch"].attitude["undertray"]
    assert check.value == pytest.approx(float(np.abs(att.pitch_deg).max()), abs=1e-12)
    assert 0.3 < check.value < 0.35
    assert check.status == status
    assert "own default" not in check.detail


def test_attitude_in_the_outputs() -> None:
    import json

    from plumbrod.outputs.report import as_json
    from plumbrod.outputs.table import pose_table
    from plumbrod.verdict.findings import review

    path = next(p for p in EXAMPLES if p.stem == "student_rear_wing")
    findings = review(parse(path.read_text(encoding="utf-8"), "wing")[0])
    columns, _ = pose_table(findings.analysis)
    for name in ("pitch_deg", "roll_deg", "pitch_bolted_deg", "roll_bolted_deg"):
        assert f"wing/{name}" in columns
    assert "wing/angle_of_attack_change_deg" in columns
    doc = json.loads(as_json(findings))
    pitch = doc["sweeps"]["pitch"]["attitude"]["wing"]
    assert pitch["angle_of_attack_change_deg"] == pitch["pitch_deg"]
    assert max(abs(v) for v in pitch["pitch_bolted_deg"]) == pytest.approx(1.0)
    assert math.isclose(max(pitch["pitch_deg"]), 1.0, abs_tol=0.01)
