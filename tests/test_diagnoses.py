"""Every way a design can fail to solve is named for its cause, through the command line
(DESIGN §3, §4): a true dead point, a rod that cannot reach, a redundancy conflict, a
branch change (each its own exit code and message), and three input mistakes (exit 2):
a rocker axis parallel to the only rod that could turn it, a *left* item on the
right-hand side of a mirrored design, and a mirrored name that doubles a rod.

Designs are invented test fixtures (tests/designs.py, tests/elastic_designs.py and the
examples, modified here).
"""

from __future__ import annotations

import math
import os
import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from designs import EXAMPLE, EXAMPLES, SideChain, replace_once, side_chain_text

ROOT = Path(__file__).resolve().parents[1]
FOUR_HANGERS = next(p for p in EXAMPLES if p.stem == "prototype_undertray_four_hangers")


def _run(tmp_path: Path, text: str) -> subprocess.CompletedProcess[str]:
    design = tmp_path / "design.toml"
    design.write_text(text)
    env = {**os.environ, "PYTHONPATH": str(ROOT / "src")}
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", str(design), "-o", str(tmp_path / "r.txt")],
        capture_output=True,
        text=True,
        check=False,
        env=env,
    )
    assert done.stdout == ""
    assert done.stderr.count("\n") == 1 and "Traceback" not in done.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["design.toml"]  # nothing written
    return done


def test_a_true_dead_point_names_the_rod_and_the_rocker(tmp_path: Path) -> None:
    # the side chain's drive rod and lever arm fall in line at s = 180 − √(260² − 80²)
    # (plane geometry, common practice, no source; see test_assembly_errors)
    text = side_chain_text(SideChain(travel_mm=(-80.0, 40.0), travel_steps=121), body_sweeps=False)
    done = _run(tmp_path, text)
    assert done.returncode == 1
    assert "plumbrod: fail (dead-point):" in done.stderr
    assert "dead point: rod 'drive' is in line with its arm on 'lever'" in done.stderr
    travel = float(re.search(r"travel ([+-]\d+\.\d+) mm", done.stderr).group(1))  # type: ignore[union-attr]
    assert travel == pytest.approx(180.0 - math.sqrt(260.0**2 - 80.0**2), abs=1.0)


def _short_guides(length_mm: float = 50.0) -> str:
    """A side-view element hung from a slider upright by a vertical hanger, held along
    x and in pitch by two horizontal guides of ``length_mm`` to the chassis: past a
    travel of ``length_mm`` the guides, standing vertical, cannot reach."""
    return f"""\
# Invented test fixture: an element on short guides.
[design]
name = "short guides (test fixture)"
plane = "side"

[chassis.pickups]
upper = [{300.0 + length_mm}, 220.0]
lower = [{300.0 + length_mm}, 120.0]

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
hanger = [100.0, 500.0]

[elements.wing]
kind = "wing"
mass_kg = 5.0
cg_mm = [200.0, 170.0]
centre_of_pressure_mm = [200.0, 170.0]

[elements.wing.pickups]
hanger = [100.0, 200.0]
upper = [300.0, 220.0]
lower = [300.0, 120.0]

[rods.hanger]
ends = ["front.upright.hanger", "wing.hanger"]
material = "4130-N"
od_mm = 16.0
wall_mm = 1.2

[rods.upper]
ends = ["chassis.upper", "wing.upper"]
material = "4130-N"
od_mm = 16.0
wall_mm = 1.2

[rods.lower]
ends = ["chassis.lower", "wing.lower"]
material = "4130-N"
od_mm = 16.0
wall_mm = 1.2

[sweeps.travel]
range_mm = [0.0, 80.0]
steps = 81

[sweeps.heave]
enabled = false

[sweeps.pitch]
enabled = false
"""


def test_a_rod_that_cannot_reach_is_named_with_how_much_it_lacks(tmp_path: Path) -> None:
    # plane geometry (common practice, no source): the parallel 50 mm guides let the
    # element translate by (dx, h) with (dx - 50)^2 + h^2 = 50^2; the 300 mm hanger from
    # the upright then needs a travel s(h) = h - 300 + sqrt(300^2 - dx^2), which peaks
    # before h = 50: past that peak no pose exists.
    h = np.linspace(0.0, 50.0, 500_001)
    dx = 50.0 - np.sqrt(2500.0 - h**2)
    s_max = float(np.max(h - 300.0 + np.sqrt(90000.0 - dx**2)))
    assert s_max == pytest.approx(46.41, abs=0.01)
    done = _run(tmp_path, _short_guides())
    assert done.returncode == 1
    assert "plumbrod: fail (cannot-reach):" in done.stderr
    assert "cannot reach" in done.stderr and "sweep 'travel'" in done.stderr
    assert re.search(r"rod '(upper|lower|hanger)' cannot reach: it would have to be", done.stderr)
    travel = float(re.search(r"travel ([+-]\d+\.\d+) mm", done.stderr).group(1))  # type: ignore[union-attr]
    assert s_max - 1.0 <= travel <= s_max + 0.01


def test_an_absurd_redundancy_strain_names_the_rods_and_the_mismatch(tmp_path: Path) -> None:
    # Four hangers to a rigid floor: in 6° of roll the front and rear uprights tilt so
    # differently that the springs would strain past 1 % (beyond any metal's elastic
    # range): not a fight, a geometry conflict.
    text = replace_once(
        FOUR_HANGERS.read_text(),
        "[sweeps.roll]\nrange_deg = [-2.0, 2.0]",
        "[sweeps.roll]\nrange_deg = [-6.0, 6.0]",
    )
    done = _run(tmp_path, text)
    assert done.returncode == 1
    assert "plumbrod: fail (redundancy-conflict):" in done.stderr
    assert "redundancy conflict" in done.stderr and "sweep 'roll'" in done.stderr
    for rod in ("hanger_front_left", "hanger_rear_left", "hanger_front_right"):
        assert f"'{rod}'" in done.stderr
    assert re.search(r"rigid rods would need '\w+' [+-]\d+\.\d\d mm", done.stderr)


def _folding_dyad() -> str:
    """The element pickup hangs from the upright and from the chassis by two rods of
    equal length whose far ends meet when the upright has risen 100 mm: there the two
    rods fold onto each other and the element can go on either way."""
    return """\
# Invented test fixture: two equal rods that fold onto each other.
[design]
name = "folding dyad (test fixture)"
plane = "side"

[chassis.pickups]
fold = [0.0, 300.0]
pitch = [400.0, 450.0]

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
hanger = [0.0, 200.0]

[elements.wing]
kind = "wing"
mass_kg = 5.0
cg_mm = [250.0, 250.0]
centre_of_pressure_mm = [250.0, 250.0]

[elements.wing.pickups]
joint = [100.0, 250.0]
pitch = [400.0, 250.0]
joint_b = [100.0, 250.0]

[rods.hanger]
ends = ["front.upright.hanger", "wing.joint"]
material = "4130-N"
od_mm = 16.0
wall_mm = 1.2

[rods.fold]
ends = ["chassis.fold", "wing.joint_b"]
material = "4130-N"
od_mm = 16.0
wall_mm = 1.2

[rods.pitch]
ends = ["chassis.pitch", "wing.pitch"]
material = "4130-N"
od_mm = 16.0
wall_mm = 1.2

[sweeps.travel]
range_mm = [0.0, 160.0]
steps = 81

[sweeps.heave]
enabled = false

[sweeps.pitch]
enabled = false
"""


def test_a_branch_change_is_named_as_such(tmp_path: Path) -> None:
    # plane geometry (common practice, no source): two rods of equal length from points
    # U and C to one point P fold onto each other when U reaches C (travel +100 mm);
    # past it P can go on to either side, and the triangle U-C-P turns over.
    done = _run(tmp_path, _folding_dyad())
    assert done.returncode == 1, done.stderr
    assert "plumbrod: fail (branch-change):" in done.stderr
    assert "branch change" in done.stderr
    travel = float(re.search(r"travel ([+-]\d+\.\d+) mm", done.stderr).group(1))  # type: ignore[union-attr]
    assert 98.0 <= travel <= 104.0


def test_a_rocker_axis_parallel_to_its_only_rod_names_the_axis(tmp_path: Path) -> None:
    # statics of a hinge (common practice, no source): a force parallel to a hinge axis,
    # or whose line meets it, has no moment about it, so it cannot turn the rocker.
    text = replace_once(
        EXAMPLE.read_text(),
        "axis_mm = [[0.0, 300.0, 250.0], [600.0, 300.0, 250.0]]",
        "axis_mm = [[57.5, 514.0, 150.0], [57.5, 514.0, 350.0]]",
    )
    done = _run(tmp_path, text)
    assert done.returncode == 2
    assert "rocker 'rocker_left' is free to turn about its own pivot axis" in done.stderr
    assert "rod 'drop_left'" in done.stderr and "axis_mm" in done.stderr


def test_a_left_item_on_the_right_hand_side_of_a_mirrored_design(tmp_path: Path) -> None:
    text = replace_once(
        EXAMPLE.read_text(),
        "hanger_left = [600.0, 620.0, 75.0]",
        "hanger_left = [600.0, -620.0, 75.0]",
    )
    done = _run(tmp_path, text)
    assert done.returncode == 2
    assert "elements.splitter.pickups.hanger_left" in done.stderr
    assert "named left but lies at y = -620.0 mm, on the right-hand side" in done.stderr


def test_a_mirrored_name_that_doubles_a_rod(tmp_path: Path) -> None:
    # the guide 'drag_low' renamed 'drag_low_left': its ends are on the centre plane and
    # not named left, so its mirrored copy joins the very same points
    text = EXAMPLE.read_text().replace("[rods.drag_low]", "[rods.drag_low_left]")
    done = _run(tmp_path, text)
    assert done.returncode == 2
    assert "rods.drag_low_left" in done.stderr
    assert "would double one rod" in done.stderr
