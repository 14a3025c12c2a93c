"""`plumbrod tune`: the search finds a known optimum, its answers pass `plumbrod check`,
it is repeatable, Ctrl-C keeps the best design, and bad [tune] bounds are one-line errors."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import tomllib
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import sympy as sp

from designs import ROOT, SideChain, side_chain_text
from plumbrod.cli.main import main
from plumbrod.design.loading import load_design, parse_design
from plumbrod.design.tune_spec import read_tune
from plumbrod.kinematics.build import build_linkage
from plumbrod.revise.text_edit import move_points
from plumbrod.revise.tuning import tune

TUNE_EXAMPLE = ROOT / "examples" / "tune_splitter.toml"

# The planar case: drive rod from the slider upright (60, 340) up to the lever's drive
# pickup (80, 540), lever pivot (0, 520); the hanger pickup (x, 580) on the lever hangs a
# vertical rod to the wing, which two parallel horizontal guides hold level.  The free
# variable moves the lever's hanger pickup and the wing's hanger pickup together along x.
CHAIN = replace(
    SideChain(),
    upright_drive=(60.0, 340.0),
    rocker_drive=(80.0, 540.0),
    rocker_hanger=(100.0, 580.0),
    element_hanger=(100.0, 200.0),
    travel_mm=(-0.01, 0.01),
    travel_steps=3,
)
PLANAR_TUNE = """
[tune]
seed = 3
population = 8
generations = 12

[tune.variables.hanger]
points = ["lever.hanger", "wing.hanger"]
line = [1.0, 0.0]
range_mm = [-40.0, 40.0]

[tune.targets]
line_of_action_deg = 10.0  # the drive rod leans 5.7 degrees by design
"""


def _planar_text() -> str:
    return side_chain_text(CHAIN, body_sweeps=False) + PLANAR_TUNE


def _closed_form_hanger_x() -> float:
    """The hanger pickup's x (mm) that makes the route ratio exactly 1 at the design pose.

    Derived here with sympy from the loop-closure equation of the drive rod and the
    velocity of a point on a link turning about a fixed pivot, v = omega x r (source:
    R. L. Norton, Design of Machinery, 5th ed., ch. 6, velocity analysis): the lever
    angle theta(s) keeps |D(theta) - U(s)| constant, with U the upright pickup lifted by
    the travel s; implicit differentiation gives dtheta/ds at s = 0, and a vertical hanger
    passes the pickup's vertical velocity x_h * dtheta/ds (x_h from the pivot) to the
    wing, which its parallel horizontal guides let move only vertically.
    """
    s, th, xh = sp.symbols("s theta x_h", real=True)
    px, pz = sp.Rational(0), sp.Rational(520)
    dx, dz = sp.Rational(80) - px, sp.Rational(540) - pz
    ux, uz = sp.Rational(60), sp.Rational(340)
    dxt = px + dx * sp.cos(th) - dz * sp.sin(th)
    dzt = pz + dx * sp.sin(th) + dz * sp.cos(th)
    closure = (dxt - ux) ** 2 + (dzt - (uz + s)) ** 2
    dtheta = -sp.diff(closure, s) / sp.diff(closure, th)  # implicit differentiation
    ratio = ((xh - px) * dtheta).subs({th: 0, s: 0})
    (solution,) = sp.solve(sp.Eq(ratio, 1), xh)
    return float(solution)


def _spec(text: str, source: str = "planar") -> tuple:
    design = parse_design(text, source)
    spec = read_tune(design, tomllib.loads(text), build_linkage(design).point_names)
    return design, spec


def test_planar_optimum_matches_the_closed_form_arm_length() -> None:
    expected = _closed_form_hanger_x()
    assert expected == pytest.approx(78.0)  # 80 - 20 * (20 / 200): moment-arm check
    design, spec = _spec(_planar_text())
    result = tune(design, spec)
    found = 100.0 + result.x[0]
    assert abs(found - expected) < 1e-3
    # the written file carries the same point
    text = move_points(
        _planar_text(),
        design,
        {"lever.hanger": (found, 0.0, 580.0), "wing.hanger": (found, 0.0, 200.0)},
    )
    again = parse_design(text, "tuned")
    assert abs(again.pickups["lever.hanger"].position_mm[0] - expected) < 1e-3
    assert "# Invented test fixture" in text and "[tune.variables.hanger]" in text


def test_same_seed_gives_the_same_result() -> None:
    design, spec = _spec(_planar_text())
    spec = replace(spec, generations=4, polish=0)
    a = tune(design, spec, seed=11)
    b = tune(design, spec, seed=11)
    np.testing.assert_array_equal(a.x, b.x)
    assert a.objective == b.objective and a.evaluations == b.evaluations


def test_tuned_example_passes_plumbrod_check_afresh(tmp_path: Path) -> None:
    out = tmp_path / "tuned.toml"
    before = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", str(TUNE_EXAMPLE)], capture_output=True
    )
    assert before.returncode == 1 and b"route-ratio" in before.stdout
    assert main(["tune", str(TUNE_EXAMPLE), "-o", str(out), "--generations", "6"]) == 0
    after = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "--json", str(out)], capture_output=True
    )
    assert after.returncode == 0, after.stdout.decode()
    text = out.read_text()
    assert "[tune.variables.front_arm]" in text and "# What `plumbrod tune` may change" in text
    assert TUNE_EXAMPLE.read_text() != text  # the input was not touched, the copy moved


def test_ctrl_c_keeps_the_best_design_so_far(tmp_path: Path) -> None:
    out = tmp_path / "interrupted.toml"
    env = dict(os.environ, PYTHONUNBUFFERED="1")
    proc = subprocess.Popen(
        [
            sys.executable,
            "-m",
            "plumbrod",
            "tune",
            str(TUNE_EXAMPLE),
            "-o",
            str(out),
            "--generations",
            "100000",
            "--progress",
        ],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env=env,
    )
    assert proc.stderr is not None
    line = proc.stderr.readline()  # the first progress line: the search is running
    assert line.startswith(b"search 1/"), line
    proc.send_signal(signal.SIGINT)
    stdout, stderr = proc.communicate(timeout=120)
    assert proc.returncode == 130, stderr.decode()
    assert b"interrupted" in stdout
    kept = load_design(out)  # a whole, valid design file
    assert kept.pickups["rocker_left.front_arm"].position_mm[0] == 600.0


@pytest.mark.parametrize(
    ("bound", "problem"),
    [("[10.0, 10.0]", "empty bound"), ("[30.0, -30.0]", "inverted bound")],
)
def test_bad_bound_is_a_one_line_error_naming_the_key(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], bound: str, problem: str
) -> None:
    text = TUNE_EXAMPLE.read_text().replace("range_mm = [-30.0, 30.0]", f"range_mm = {bound}")
    path = tmp_path / "bad.toml"
    path.write_text(text)
    assert main(["tune", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err
    assert "tune.variables.drop.range_mm" in err and problem in err
    assert not list(tmp_path.glob("bad-tuned*"))


def test_moved_points_are_written_in_place_keeping_comments() -> None:
    text = TUNE_EXAMPLE.read_text()
    design = load_design(TUNE_EXAMPLE)
    moved = {
        "rocker_left.axis_a": (0.0, 305.0, 252.5),
        "rocker_left.axis_b": (600.0, 305.0, 252.5),
        "front_left.lower.drop": (57.5, 520.25, 147.0),
    }
    new = move_points(text, design, moved)
    again = parse_design(new, "moved")
    rocker = next(r for r in again.rockers if r.name == "rocker_left")
    assert rocker.axis_a_mm == (0.0, 305.0, 252.5) and rocker.axis_b_mm == (600.0, 305.0, 252.5)
    assert again.pickups["front_left.lower.drop"].position_mm == (57.5, 520.25, 147.0)
    # the mirrored copy follows its original when the file is read
    assert again.pickups["front_right.lower.drop"].position_mm == (57.5, -520.25, 147.0)
    old_lines, new_lines = text.splitlines(), new.splitlines()
    assert len(old_lines) == len(new_lines)
    changed = [(a, b) for a, b in zip(old_lines, new_lines, strict=True) if a != b]
    assert len(changed) == 2  # the axis line and the drop line, nothing else
    assert all(line in new_lines for line in old_lines if line.lstrip().startswith("#"))
