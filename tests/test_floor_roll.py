"""The floor of the equaliser example on slider corners, through body roll: its ride
height follows the exact positions of the uprights' pickups.

With slider corners an upright slides along the chassis z axis, so it turns with the
body: in roll its pickups move in the ground frame, and the floor (exactly located by
two front hangers, the rear equaliser and three guides) is not quite at a constant
height.  The references: the sliders' travel in closed form (the tyre disc's lowest
point stays on the ground), and the floor's pose found from those pickups alone by
scipy.optimize.least_squares on the rods' lengths (an independent solve).
"""

from __future__ import annotations

import math
import re

import numpy as np
from scipy.optimize import least_squares
from scipy.spatial.transform import Rotation

from designs import EXAMPLES, parse
from plumbrod.mechanics.analysis import analyse

EXAMPLE = next(p for p in EXAMPLES if p.stem == "prototype_undertray_equaliser")


def _on_sliders() -> str:
    """The example with both corners on sliders (wishbone tables removed)."""
    text = EXAMPLE.read_text()
    text = text.replace('suspension = "double_wishbone"', 'suspension = "slider"')
    text = re.sub(r"\[corners\.\w+\.wishbones\]\n(?:[a-z_]+ = \[[^\]]*\]\n)+", "", text)
    assert "wishbones" not in text.split("[rockers")[0].replace("wishbones would", "")
    return text


def _slider_travel(centre: np.ndarray, radius: float, c: np.ndarray, roll: float) -> float:
    # Slider upright (DESIGN §3): the wheel centre moves by s along chassis z; the body
    # rolls by φ about the x axis through c (ISO 8855, exact rotation, DESIGN §2); the
    # tyre is a rigid disc whose spin axis (chassis y) turns with the body, so its lowest
    # point lies R·cos φ below its centre and stays on the ground (z = z₀ − R):
    #   sin φ·(y − c_y) + cos φ·(z₀ + s − c_z) + c_z = z₀ − R + R·cos φ.
    y, z0 = centre[1], centre[2]
    return (
        (z0 - radius + radius * math.cos(roll) - c[2] - math.sin(roll) * (y - c[1]))
        / math.cos(roll)
        - z0
        + c[2]
    )


def test_the_floor_ride_height_through_roll_follows_the_slider_pickups() -> None:
    design, link = parse(_on_sliders(), "floor on sliders")
    analysis = analyse(design)
    assert analysis.mobility.exact
    result = analysis.sweeps["roll"]
    kin = result.solved.kin
    centre = np.array(design.sweeps.motion_centre_mm)
    rolls = np.radians(result.spec.values["roll_deg"])
    # 1. each upright's travel (so each pickup: p + s·z in the chassis frame)
    travel = {}
    for corner in design.corners:
        i = link.point(f"{corner.upright}.wheel_centre")
        got = kin.points[:, i, 2] - link.points[0, i, 2]
        want = np.array(
            [
                _slider_travel(np.array(corner.wheel_centre_mm), corner.tyre_radius_mm, centre, r)
                for r in rolls
            ]
        )
        np.testing.assert_allclose(got, want, atol=1e-9)
        travel[corner.name] = want
    # 2. the floor's pose from the closed-form pickups alone
    rods = [(r.name, r.end_a, r.end_b) for r in design.rods]
    eq = next(r for r in design.rockers if r.name == "equaliser_rear")
    axis_a, axis_b = np.array(eq.axis_a_mm), np.array(eq.axis_b_mm)
    u = (axis_b - axis_a) / np.linalg.norm(axis_b - axis_a)
    lengths = {
        n: math.dist(design.pickups[a].position_mm, design.pickups[b].position_mm)
        for n, a, b in rods
    }
    cop = np.array(design.elements[0].centre_of_pressure_mm)

    def place(key: str, q: np.ndarray, pose: int) -> np.ndarray:
        p = np.array(design.pickups[key].position_mm)
        body = design.pickups[key].body
        if body == "chassis":
            return p
        if body.endswith(".upright"):
            return p + np.array([0.0, 0.0, travel[body.split(".")[0]][pose]])
        if body == "equaliser_rear":
            p = axis_a + Rotation.from_rotvec(q[6] * u).apply(p - axis_a)
        return Rotation.from_rotvec(q[3:6]).apply(p - cop) + cop + q[0:3]

    heights = []
    q = np.zeros(7)
    for pose, roll in enumerate(rolls):

        def residual(q: np.ndarray, pose: int = pose) -> np.ndarray:
            return np.array(
                [
                    np.linalg.norm(place(a, q, pose) - place(b, q, pose)) - lengths[n]
                    for n, a, b in rods
                ]
            )

        fit = least_squares(residual, q, xtol=1e-15, ftol=1e-15, gtol=1e-15)
        assert np.abs(fit.fun).max() < 1e-9
        q = fit.x
        moved = Rotation.from_rotvec(q[3:6]).apply(np.zeros(3)) + cop + q[0:3]
        ground = Rotation.from_rotvec([roll, 0.0, 0.0]).apply(moved - centre) + centre
        heights.append(ground[2])
    tool = analysis.figures["roll"].ride_height["floor"].height_mm
    np.testing.assert_allclose(tool, heights, atol=1e-6)
    # the sliders turn with the body, so the floor's height is not quite constant
    assert np.ptp(tool) > 0.01
