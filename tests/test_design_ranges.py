"""Numbers out of their range, through the real command line: one line, exit 2.

The cases are the inputs that crashed or ran away before the schema gave every number a
range (huge coordinates, masses, diameters, step counts, speeds, margins, inertias).
Each bad file is one of the invented examples with one value changed.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

import plumbrod
from designs import EXAMPLE

ROOT = EXAMPLE.parent
SPLITTER = EXAMPLE.read_text(encoding="utf-8")
PLANAR = (ROOT / "planar_undertray.toml").read_text(encoding="utf-8")
DIGITS_400 = "1" + "0" * 399

CG = "cg_mm = [640.0, 0.0, 80.0]"
TUBE = "od_mm = 16.0\nwall_mm = 1.2"

# name: (base text, old, new, key path in the message, range text in the message)
CASES: dict[str, tuple[str, str, str, str, str]] = {
    "coordinate 1e308": (
        SPLITTER,
        "wheel_centre_mm = [0.0, 700.0, 290.0]",
        "wheel_centre_mm = [0.0, 1e308, 290.0]",
        "corners.front_left.wheel_centre_mm[1]",
        "-100 000 to 100 000 mm",
    ),
    "coordinate 1e200": (
        SPLITTER,
        "upper_outer_mm = [-10.0, 610.0, 420.0]",
        "upper_outer_mm = [-10.0, 610.0, 1e200]",
        "corners.front_left.wishbones.upper_outer_mm[2]",
        "-100 000 to 100 000 mm",
    ),
    "cg 1e300": (
        SPLITTER,
        CG,
        "cg_mm = [640.0, 0.0, 1e300]",
        "elements.splitter.cg_mm[2]",
        "-100 000 to 100 000 mm",
    ),
    "OD 1e300": (
        SPLITTER,
        "od_mm = 16.0",
        "od_mm = 1e300",
        "rods.drop_left.od_mm",
        "0.5 to 500 mm",
    ),
    "solid OD 1e-300": (
        SPLITTER,
        TUBE,
        "od_mm = 1e-300\nsolid = true",
        "rods.drop_left.od_mm",
        "0.5 to 500 mm",
    ),
    "400-digit integer": (
        SPLITTER,
        "top_speed_kmh = 180.0",
        f"top_speed_kmh = {DIGITS_400}",
        "design.top_speed_kmh",
        "more than 0 and at most 500 km/h",
    ),
    "400-digit integer in [tradeoff]": (
        (ROOT / "student_rear_wing.toml").read_text(encoding="utf-8"),
        "corner_sprung_mass_rear_kg = 62.0",
        f"corner_sprung_mass_rear_kg = {DIGITS_400}",
        "tradeoff.corner_sprung_mass_rear_kg",
        "a 400-digit number",
    ),
    "steps 1e30": (
        SPLITTER,
        "steps = 201",
        "steps = 1e30",
        "sweeps.travel.steps",
        "whole number",
    ),
    "steps 2^31": (
        SPLITTER,
        "steps = 201",
        f"steps = {2**31}",
        "sweeps.travel.steps",
        "at most 10001",
    ),
    "steps 2^63-1": (
        SPLITTER,
        "steps = 201",
        f"steps = {2**63 - 1}",
        "sweeps.travel.steps",
        "at most 10001",
    ),
    "grid over 250 000 poses": (
        SPLITTER,
        "steps = [41, 41]",
        "steps = [1001, 1001]",
        "sweeps.heave_roll.steps",
        "more than 250000",
    ),
    "top speed 1e154": (
        SPLITTER,
        "top_speed_kmh = 180.0",
        "top_speed_kmh = 1e154",
        "design.top_speed_kmh",
        "more than 0 and at most 500 km/h",
    ),
    "edge margin 1e300": (
        PLANAR,
        "edge_margin_mm = 8.0",
        "edge_margin_mm = 1e300",
        "rockers.crank_rear.plate.edge_margin_mm",
        "at most 100 mm",
    ),
    "edge margin 1e9": (
        PLANAR,
        "edge_margin_mm = 8.0",
        "edge_margin_mm = 1e9",
        "rockers.crank_rear.plate.edge_margin_mm",
        "at most 100 mm, got 1e+09",
    ),
    "inertia 1e308": (
        SPLITTER,
        CG,
        f"{CG}\ninertia_kg_m2 = [1e308, 1.0, 1.0]",
        "elements.splitter.inertia_kg_m2[0]",
        "0 to 10 000 kg·m²",
    ),
    "load-case speed over 500 km/h": (
        SPLITTER,
        "top_speed_kmh = 180.0",
        "top_speed_kmh = 501",
        "design.top_speed_kmh",
        "at most 500 km/h",
    ),
    "mass above its bound": (
        SPLITTER,
        "mass_kg = 7.5",
        "mass_kg = 1e12",
        "elements.splitter.mass_kg",
        "0 to 5000 kg, got 1e+12",
    ),
}


def _env() -> dict[str, str]:
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return env


@pytest.mark.parametrize("name", sorted(CASES))
def test_out_of_range_number_gives_one_line_and_exit_2(name: str, tmp_path: Path) -> None:
    base, old, new, key, bound = CASES[name]
    design = tmp_path / "design.toml"
    assert old in base
    design.write_text(base.replace(old, new, 1), encoding="utf-8")  # the first one
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "--json", str(design)],
        capture_output=True,
        text=True,
        env=_env(),
        timeout=120,
        check=False,
    )
    assert done.returncode == 2, (done.returncode, done.stderr[-500:])
    assert done.stdout == ""
    lines = done.stderr.splitlines()
    assert len(lines) == 1, done.stderr[-2000:]
    assert "Traceback" not in done.stderr
    assert f"{design}: {key}: " in lines[0], lines[0]
    assert bound in lines[0], lines[0]
    assert len(lines[0]) < 300, lines[0]


COLUMN = ("--od", "16", "--wall", "1", "--length", "500", "--material", "4130-N")


@pytest.mark.parametrize(
    ("option", "value", "bound"),
    [
        ("--od", "1e300", "0.5 to 500 mm"),
        ("--od", "1e-300", "0.5 to 500 mm"),
        ("--length", "1e308", "1 to 200 000 mm"),
        ("--k", "1e-300", "0.1 to 10"),
        ("--load", "-1e30", "-10 000 000 to 10 000 000 N"),
        ("--required", "1e9", "at most 1000"),
    ],
)
def test_column_options_have_the_same_ranges(option: str, value: str, bound: str) -> None:
    args = list(COLUMN)
    if option in args:
        args[args.index(option) + 1] = value
    else:
        args.append(f"{option}={value}")
    if option == "--required":
        args.append("--load=-1000")
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "column", *args],
        capture_output=True,
        text=True,
        env=_env(),
        timeout=120,
        check=False,
    )
    assert done.returncode == 2, (done.returncode, done.stderr)
    lines = done.stderr.splitlines()
    assert len(lines) == 1 and lines[0].startswith(f"plumbrod: error: {option}: "), done.stderr
    assert bound in lines[0], lines[0]
