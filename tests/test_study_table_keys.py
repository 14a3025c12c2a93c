"""[tune], [car] and [tradeoff] read through the schema table, through the real command line.

A misspelt key gets "did you mean", a number outside its range names the range, and the
checks across keys (points or pivot, line or box, a bound from < to, damping and sprung
mass given one way) keep their own messages: one line naming the file and the key path,
exit 2, no traceback, nothing written.  Each bad file is one of the invented examples
with one line changed.
"""

from __future__ import annotations

import dataclasses
import os
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest

import plumbrod
from designs import EXAMPLES, SideChain, side_chain_text
from plumbrod.design.loading import parse_design
from plumbrod.design.model import Car
from plumbrod.design.schema import children, entry
from plumbrod.design.tradeoff_spec import TradeoffSpec
from plumbrod.design.tune_spec import TuneSpec, read_tune
from plumbrod.errors import DesignFileError
from plumbrod.kinematics.build import build_linkage

BY_NAME = {p.stem: p for p in EXAMPLES}
SPLITTER = BY_NAME["hillclimb_splitter"].read_text(encoding="utf-8")
TUNED = BY_NAME["tune_splitter"].read_text(encoding="utf-8")
LINE = "line = [0.0, 1.0, 0.0]\nrange_mm = [-30.0, 30.0]"

# name: (verb, base text, old, new, key path in the message, words in the message)
CASES: dict[str, tuple[str, str, str, str, str, str]] = {
    "car: misspelt key": (
        "check",
        SPLITTER,
        "wheelbase_mm = 2300.0",
        "wheelbase_nm = 2300.0",
        "car.wheelbase_nm",
        "unknown key; did you mean 'wheelbase_mm'?",
    ),
    "car: wheelbase of 230 m": (
        "check",
        SPLITTER,
        "wheelbase_mm = 2300.0",
        "wheelbase_mm = 230000.0",
        "car.wheelbase_mm",
        "expected more than 0 and at most 20 000 mm, got 230000.0",
    ),
    "car: wheel rate as text": (
        "check",
        SPLITTER,
        "wheel_rate_rear_N_per_mm = 70.0",
        'wheel_rate_rear_N_per_mm = "70"',
        "car.wheel_rate_rear_N_per_mm",
        "expected a number, got a string '70'",
    ),
    "car: roll share of 1.5": (
        "check",
        SPLITTER,
        "roll_stiffness_front_share = 0.55",
        "roll_stiffness_front_share = 1.5",
        "car.roll_stiffness_front_share",
        "expected a share from 0 to 1, got 1.5; give the front axle's share",
    ),
    "tradeoff: misspelt key": (
        "tradeoff",
        SPLITTER,
        "tyre_rate_N_per_mm = 250.0",
        "tyre_rate_N_per_m = 250.0",
        "tradeoff.tyre_rate_N_per_m",
        "unknown key; did you mean 'tyre_rate_N_per_mm'?",
    ),
    "tradeoff: tyre rate of 2.5 MN/mm (check reads it too)": (
        "check",
        SPLITTER,
        "tyre_rate_N_per_mm = 250.0",
        "tyre_rate_N_per_mm = 2.5e6",
        "tradeoff.tyre_rate_N_per_mm",
        "expected more than 0 and at most 10 000 N/mm, got 2.5e+06",
    ),
    "tradeoff: damping ratio 7": (
        "tradeoff",
        SPLITTER,
        "damping_ratio = 0.5",
        "damping_ratio = 7",
        "tradeoff.damping_ratio",
        "7 of critical is not a car's damper; use a ratio of at most 5",
    ),
    "tradeoff: 1000 speeds": (
        "tradeoff",
        SPLITTER,
        'road_classes = ["A", "B", "C"]',
        'road_classes = ["A", "B", "C"]\nspeed_steps = 1000',
        "tradeoff.speed_steps",
        "expected at most 500, got 1000",
    ),
    "tradeoff: no road class": (
        "tradeoff",
        SPLITTER,
        'road_classes = ["A", "B", "C"]',
        "road_classes = []",
        "tradeoff.road_classes",
        "got an empty list",
    ),
    "tradeoff: road class listed twice": (
        "tradeoff",
        SPLITTER,
        'road_classes = ["A", "B", "C"]',
        'road_classes = ["A", "B", "A"]',
        "tradeoff.road_classes",
        "a class is listed twice",
    ),
    "tradeoff: sprung mass twice": (
        "tradeoff",
        SPLITTER,
        "tyre_rate_N_per_mm = 250.0",
        "tyre_rate_N_per_mm = 250.0\nsprung_mass_kg = 600.0\nsprung_mass_front_share = 0.4",
        "tradeoff.sprung_mass_kg",
        "given twice",
    ),
    "tune: misspelt key": (
        "tune",
        TUNED,
        "population = 16",
        "populaton = 16",
        "tune.populaton",
        "unknown key; did you mean 'population'?",
    ),
    "tune: population of 2": (
        "tune",
        TUNED,
        "population = 16",
        "population = 2",
        "tune.population",
        "expected at least 4, got 2; use a whole number of at least 4",
    ),
    "tune: misspelt variable key": (
        "tune",
        TUNED,
        "range_mm = [-30.0, 30.0]",
        "range = [-30.0, 30.0]",
        "tune.variables.drop.range",
        "unknown key; did you mean 'range_mm'?",
    ),
    "tune: offset of 3 m": (
        "tune",
        TUNED,
        "range_mm = [-30.0, 30.0]",
        "range_mm = [-30.0, 3000.0]",
        "tune.variables.drop.range_mm[1]",
        "expected -1000 to 1000 mm, got 3000.0",
    ),
    "tune: inverted bound": (
        "tune",
        TUNED,
        "range_mm = [-30.0, 30.0]",
        "range_mm = [30.0, -30.0]",
        "tune.variables.drop.range_mm",
        "inverted bound [30, -30]; put the smaller value first",
    ),
    "tune: line and box": (
        "tune",
        TUNED,
        "range_mm = [-30.0, 30.0]",
        "range_mm = [-30.0, 30.0]\nbox_mm = { x = [-1.0, 1.0] }",
        "tune.variables.drop",
        "line and box_mm are both given; keep one of them",
    ),
    "tune: a box axis that is not one": (
        "tune",
        TUNED,
        LINE,
        "box_mm = { x = [-1.0, 1.0], w = [0.0, 1.0] }",
        "tune.variables.drop.box_mm.w",
        "unknown key; allowed keys: x, y, z",
    ),
    "tune: a two-number line in a 3D design": (
        "tune",
        TUNED,
        LINE,
        "line = [0.0, 1.0]\nrange_mm = [-30.0, 30.0]",
        "tune.variables.drop.line",
        "expected a direction [dx, dy, dz], got 2 values",
    ),
    "tune: misspelt point": (
        "tune",
        TUNED,
        'points = ["front_left.lower.drop", "rocker_left.rear_arm"]',
        'points = ["front_left.lower.dorp", "rocker_left.rear_arm"]',
        "tune.variables.drop.points",
        "no pickup 'front_left.lower.dorp'; did you mean 'front_left.lower.drop'?",
    ),
    "tune: a point listed twice": (
        "tune",
        TUNED,
        'points = ["front_left.lower.drop", "rocker_left.rear_arm"]',
        'points = ["front_left.lower.drop", "front_left.lower.drop"]',
        "tune.variables.drop.points",
        "'front_left.lower.drop' is listed twice",
    ),
    "tune: negative weight": (
        "tune",
        TUNED,
        "mass = 0.05",
        "mass = -1",
        "tune.weights.mass",
        "expected zero or more, got -1",
    ),
    "tune: target outside its range": (
        "tune",
        TUNED,
        "[tune.weights]",
        "[tune.targets]\nline_of_action_deg = 120.0\n\n[tune.weights]",
        "tune.targets.line_of_action_deg",
        "expected more than 0 and at most 90 deg, got 120.0",
    ),
}


def _env() -> dict[str, str]:
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return env


@pytest.mark.parametrize("name", sorted(CASES))
def test_bad_key_gives_one_line_and_exit_2(name: str, tmp_path: Path) -> None:
    verb, base, old, new, key, words = CASES[name]
    assert base.count(old) == 1, old
    design = tmp_path / "design.toml"
    design.write_text(base.replace(old, new), encoding="utf-8")
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", verb, str(design)],
        capture_output=True,
        text=True,
        env=_env(),
        cwd=tmp_path,
        timeout=120,
        check=False,
    )
    assert done.returncode == 2, (done.returncode, done.stderr[-500:])
    assert done.stdout == ""
    lines = done.stderr.splitlines()
    assert len(lines) == 1, done.stderr[-2000:]
    assert "Traceback" not in done.stderr
    assert f"{design}: {key}: " in lines[0], lines[0]
    assert words in lines[0], lines[0]
    assert [p.name for p in tmp_path.iterdir()] == ["design.toml"]  # nothing written


# -- planar designs: a line and a box take the view's coordinates ------------------------
PLANAR_TUNE = """
[tune]
[tune.variables.hanger]
points = ["lever.hanger", "wing.hanger"]
{how}
"""


def _planar_tune(how: str) -> TuneSpec:
    text = side_chain_text(SideChain(), body_sweeps=False) + PLANAR_TUNE.format(how=how)
    design = parse_design(text, "side.toml")
    return read_tune(design, tomllib.loads(text), build_linkage(design).point_names)


def test_a_side_view_line_and_box_take_x_and_z() -> None:
    spec = _planar_tune("line = [3.0, 4.0]\nrange_mm = [-10.0, 10.0]")
    (variable,) = spec.variables
    assert variable.directions[0] == pytest.approx((0.6, 0.0, 0.8))  # the 3-4-5 triangle
    spec = _planar_tune("box_mm = { x = [-5.0, 5.0], z = [-2.0, 2.0] }")
    assert [(v.name, v.low, v.high) for v in spec.variables] == [
        ("hanger.x", -5.0, 5.0),
        ("hanger.z", -2.0, 2.0),
    ]


@pytest.mark.parametrize(
    ("how", "key", "words"),
    [
        ("box_mm = { y = [-5.0, 5.0] }", "tune.variables.hanger.box_mm.y", "allowed keys: x, z"),
        (
            "line = [0.0, 1.0, 0.0]\nrange_mm = [-1.0, 1.0]",
            "tune.variables.hanger.line",
            "expected a direction [dx, dz] (planar side view), got 3 values",
        ),
        ("line = [0.0, 0.0]\nrange_mm = [-1.0, 1.0]", "tune.variables.hanger.line", "zero"),
        ("range_mm = [-1.0, 1.0]", "tune.variables.hanger", "give either line or box_mm"),
    ],
)
def test_a_side_view_tune_refuses_what_the_view_lacks(how: str, key: str, words: str) -> None:
    with pytest.raises(DesignFileError) as caught:
        _planar_tune(how)
    assert caught.value.key == key
    assert words in str(caught.value)


# -- the schema's defaults are the readers' -----------------------------------------------
def test_the_defaults_in_the_table_are_the_models() -> None:
    car = Car()
    for key in children("car"):
        assert key.default == getattr(car, key.name), key.path
    fields = {f.name: f.default for f in dataclasses.fields(TradeoffSpec)}
    for key in children("tradeoff"):
        if key.name.startswith("corner_sprung_mass") or key.required:
            continue  # held per axle in corner_sprung_mass_kg; required: no default
        assert key.default == fields[key.name], key.path
    fields = {f.name: f.default for f in dataclasses.fields(TuneSpec)}
    for name in ("population", "generations", "screen_steps", "polish"):
        assert entry(f"tune.{name}").default == fields[name], name
    assert entry("tune.seed").default == 0  # what plumbrod tune uses when none is given


def test_a_tune_table_without_targets_or_weights_takes_the_table_defaults() -> None:
    spec = _planar_tune("line = [1.0, 0.0]\nrange_mm = [-10.0, 10.0]")
    assert spec.weights == {k.name: k.default for k in children("tune.weights")}
    assert (spec.population, spec.generations, spec.screen_steps, spec.polish) == (
        24,
        40,
        33,
        3,
    )
    assert spec.seed is None
