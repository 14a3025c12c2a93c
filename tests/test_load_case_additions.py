"""Sweeps and load cases a user can trust (issue 9 §5): forces at a given point, speed
only where aero data needs it, the ground-strike case, and body-sweep poses that drive
a wheel beyond the travel sweep's range."""

from __future__ import annotations

import numpy as np
import pytest

from designs import EXAMPLES, parse
from plumbrod.design.loading import parse_design
from plumbrod.errors import DesignFileError
from plumbrod.kinematics.reach import wheels_beyond_travel
from plumbrod.mechanics.analysis import analyse
from spring_designs import hand_case, overhang_text

F_N = 1000.0


def test_a_force_at_a_given_point_acts_there() -> None:
    # Statics of a beam on two supports (Gere or Hibbeler; from memory): the same
    # 1000 N given at a point 400 mm ahead of the axle instead of at the centre of
    # pressure (here on the axle) loads the springs as the overhang does: ±F·a/L.
    text = overhang_text(0.0, 2000.0) + hand_case("wing", (0.0, 0.0, -F_N))
    text += "at_mm = { wing = [400.0, 100.0] }\n"
    springs = analyse(parse(text, "at")[0]).springs
    assert springs is not None
    np.testing.assert_allclose(springs.design.axle_N[0, 0, 0], [200.0, -200.0], atol=1e-6)
    np.testing.assert_allclose(springs.design.axle_bolted_N[0, 0, 0], [1200.0, -200.0], atol=1e-6)


def test_speed_is_needed_only_for_aero_data() -> None:
    text = overhang_text(400.0, 2000.0) + (
        "\n[load_cases.still]\nbump_g = -1.0\nforces_N = { wing = [0.0, 0.0, -1000.0] }\n"
    )
    design = parse_design(text, "t")
    assert design.load_cases[0].speed_kmh == 0.0
    aero = (
        overhang_text(400.0, 2000.0)
        + "\n[elements.wing.aero]\nreference_area_m2 = 0.5\ndownforce_coefficient = 1.0\n"
        "drag_coefficient = 0.1\n\n[load_cases.fast]\nbump_g = 1.0\n"
    )
    with pytest.raises(DesignFileError) as err:
        parse_design(aero, "t.toml")
    assert err.value.key == "load_cases.fast.speed_kmh"
    assert "aero data of 'wing'" in str(err.value)


def test_a_point_without_a_force_is_bad_input() -> None:
    text = overhang_text(400.0, 2000.0) + (
        "\n[load_cases.still]\nforces_N = { }\nat_mm = { wing = [400.0, 100.0] }\n"
    )
    with pytest.raises(DesignFileError) as err:
        parse_design(text, "t.toml")
    assert err.value.key == "load_cases.still.at_mm.wing"


def test_the_ground_strike_case_adds_an_upward_force_at_its_point() -> None:
    # Default off; when the design names one, a case '<element>-ground-strike' adds the
    # strike force straight up at its point to the other cases' loads (common practice
    # to confirm: the strike force is the user's figure). Its moment about the front
    # axle's ground line is −x·F (right hand about +y), so the floor couple changes by
    # −600 mm × 2000 N = −1200 N·m and the vertical load by +2000 N.
    still = "\n[load_cases.still]\nforces_N = { wing = [0.0, 0.0, -1000.0] }\n"  # weights in
    plain = parse_design(overhang_text(400.0, 2000.0) + still, "t")
    assert analyse(plain).loads.cases == ("still",)  # type: ignore[union-attr]
    text = overhang_text(400.0, 2000.0) + still
    text += "\n[elements.wing.strike]\nstrike_N = 2000.0\nat_mm = [600.0, 50.0]\n"
    analysis = analyse(parse(text, "strike")[0])
    assert analysis.loads is not None
    assert analysis.loads.cases == ("still", "wing-ground-strike")
    s = analysis.springs
    assert s is not None
    load = s.design.vertical_load_N[0, :, 0]
    assert load[1] - load[0] == pytest.approx(2000.0, abs=1e-9)
    couple = s.design.floor_moment_Nm[0, :, 0]
    assert couple[1] - couple[0] == pytest.approx(-1200.0, abs=1e-6)
    with pytest.raises(DesignFileError) as err:
        parse_design(text.replace("strike_N = 2000.0", "strike_N = -5.0"), "t.toml")
    assert err.value.key == "elements.wing.strike.strike_N"


def _splitter_text() -> str:
    path = next(p for p in EXAMPLES if p.stem == "hillclimb_splitter")
    return path.read_text(encoding="utf-8")


def test_grid_poses_beyond_the_travel_range_are_named() -> None:
    # Without its own ranges the grid takes the heave sweep's ±25 mm and the roll
    # sweep's ±1.5°: body up 25 mm and rolled 1.5° takes the right front wheel past
    # the travel sweep's −40 mm. The figure printed is the solved wheel travel itself.
    text = _splitter_text().replace("range_heave_mm = [-20.0, 20.0]", "")
    design, link = parse(text, "grid")
    analysis = analyse(design)
    notes = wheels_beyond_travel(link, analysis.sweeps, design.sweeps.travel_mm)
    assert len(notes) == 1
    note = notes[0]
    assert note.startswith("sweep 'heave_roll' at heave +25.00 mm, roll -1.50°")
    assert "wheel 'front_right'" in note and "rebound" in note
    grid = analysis.sweeps["heave_roll"]
    wc = link.wheel_centre[link.corner_names.index("front_right")]
    travel = grid.solved.kin.points[:, wc, 2] - link.points[0, wc, 2]
    assert f"travels {travel.min():+.1f} mm" in note
    assert travel.min() < -40.0
    # the bundled example gives the grid its own heave range: nothing beyond
    design, link = parse(_splitter_text(), "own ranges")
    analysis = analyse(design)
    assert wheels_beyond_travel(link, analysis.sweeps, design.sweeps.travel_mm) == []
    h = analysis.sweeps["heave_roll"].spec.values["heave_mm"]
    assert (h.min(), h.max()) == (-20.0, 20.0)
