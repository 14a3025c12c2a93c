"""Equalisers: a rocker whose parent is an element (DESIGN §3, §4a).

The bundled example prototype_undertray_equaliser.toml (invented) hangs a floor from four
double-wishbone corners with an equaliser across the rear axle.  The checks here: the
floor is exactly located, the rear routes run through the equaliser, and the equaliser
shares its load between its two rods by the lever rule, whatever the body roll.
"""

from __future__ import annotations

import numpy as np
import pytest

from designs import EXAMPLES, load_cases_text, parse, replace_once
from plumbrod.mechanics.analysis import analyse
from plumbrod.verdict.findings import review

EXAMPLE = next(p for p in EXAMPLES if p.stem == "prototype_undertray_equaliser")


def test_the_equaliser_example_is_exactly_located_and_passes() -> None:
    design, link = parse(EXAMPLE.read_text(), str(EXAMPLE))
    equaliser = link.body("equaliser_rear")
    assert link.parent[equaliser] == link.body("floor")
    findings = review(design)
    m = findings.analysis.mobility
    assert m.exact and m.rank == m.n_coords
    routes = {r.pickup: r for r in findings.analysis.routes.routes}
    assert set(routes) == {
        "floor.hanger_front_left",
        "floor.hanger_front_right",
        "equaliser_rear.end_left",
        "equaliser_rear.end_right",
    }
    assert routes["equaliser_rear.end_left"].element == "floor"
    assert routes["equaliser_rear.end_left"].corner == "rear_left"
    assert {c.status for c in findings.checks} == {"pass"}
    # the equaliser's mass is part of the route and of the floor's load
    assert findings.mass.bodies_kg["equaliser_rear"] == pytest.approx(1.4)
    assert findings.analysis.loads is not None
    label = findings.analysis.loads.labels.index("equaliser_rear mass")
    assert findings.analysis.loads.owner[label] == 0  # counted with the floor
    # its plate is a moving solid: measured against the tyres it passes
    plate = [p for p in findings.clearance.pairs if p.a == "plate of rocker 'equaliser_rear'"]
    assert {p.b for p in plate} >= {"tyre 'rear_left'", "tyre 'rear_right'"}
    assert min(p.distance_mm for p in plate) > 5.0


def _unequal_arms() -> str:
    """The example with the equaliser pivot moved 100 mm to the left (arms 445 and 645
    mm), without its own mass, and one load case of a pure downward force on the floor
    with gravity cancelled (bump_g = -1), so only rod forces act on the equaliser."""
    text = EXAMPLE.read_text()
    text = replace_once(
        text,
        "axis_mm = [[-2640.0, 0.0, 75.0], [-2760.0, 0.0, 75.0]]\nmass_kg = 1.4",
        "axis_mm = [[-2640.0, 100.0, 75.0], [-2760.0, 100.0, 75.0]]",
    )
    cases = {"pure": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"floor": (0.0, 0.0, -8000.0)}}}
    return text + load_cases_text(cases)


def test_an_equaliser_splits_its_load_by_its_arm_lengths_whatever_the_roll() -> None:
    # Lever rule (Archimedes, On the Equilibrium of Planes I, props. 6-7; any statics
    # text, e.g. Hibbeler, Engineering Mechanics: Statics, moment about an axis): a beam
    # turning freely about its pivot axis balances when the moments of its two rod
    # forces about the axis cancel, T_l*m_l + T_r*m_r = 0 with m the moment arm of each
    # rod's line about the axis. With rods square to a straight beam, |m| are the arm
    # lengths, so T_l/T_r = b/a: here 645/445.
    design, _ = parse(_unequal_arms(), "unequal equaliser")
    analysis = analyse(design)
    link = analysis.link
    st = analysis.statics["roll"]
    kin = analysis.sweeps["roll"].solved.kin
    body = link.body("equaliser_rear")
    axis = kin.rotation[:, body] @ link.axis_direction[0, body]
    origin = (kin.rotation[:, body] @ link.axis_origin[0, body]) + kin.translation[:, body]
    torque = np.zeros(kin.points.shape[0])
    forces = {}
    for side in ("left", "right"):
        rod = f"hanger_rear_{side}"
        r = link.rod_names.index(rod)
        here = link.point(f"equaliser_rear.end_{side}")
        there = link.point(f"rear_{side}.upright.hanger")
        d = kin.points[:, there] - kin.points[:, here]
        d /= np.linalg.norm(d, axis=1, keepdims=True)
        tension = st.rod_force_N[:, 0, r]  # + pulls the pickup towards the upright
        lever = kin.points[:, here] - origin
        torque += np.einsum("bi,bi->b", np.cross(lever, tension[:, None] * d), axis)
        forces[side] = tension
    scale = 8000.0 * 645.0
    np.testing.assert_allclose(torque, 0.0, atol=1e-9 * scale)
    ratio = forces["left"] / forces["right"]
    assert np.all(forces["left"] > 0) and np.all(forces["right"] > 0)
    # the rods stay within a fraction of a degree of square to the beam through +-2 deg
    # of roll, so the split stays at the arm ratio to a part in a thousand
    np.testing.assert_allclose(ratio, 645.0 / 445.0, rtol=1e-3)
    assert np.ptp(analysis.sweeps["roll"].spec.values["roll_deg"]) == pytest.approx(4.0)
