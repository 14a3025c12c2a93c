"""A linkage that stops assembling inside a sweep is reported with the member and pose."""

from __future__ import annotations

import math
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

from designs import SideChain, side_chain_text
from plumbrod.design.loading import parse_design
from plumbrod.errors import AssemblyError
from plumbrod.mechanics.analysis import analyse

SRC = Path(__file__).resolve().parents[1] / "src"


def _dead_point_travel() -> float:
    """Rebound where the drive rod and the lever arm fall in line (fully stretched).

    Plane geometry (common practice, no source): the upright pickup at (80, 340 + s)
    can be at most rod + arm = 180 + 80 = 260 mm from the lever pivot (0, 520), so
    80² + (180 − s)² = 260², s = 180 − √(260² − 80²).
    """
    return 180.0 - math.sqrt(260.0**2 - 80.0**2)


def _text() -> str:
    return side_chain_text(SideChain(travel_mm=(-80.0, 40.0), travel_steps=121), body_sweeps=False)


def test_a_rod_past_its_dead_point_is_named_with_the_travel() -> None:
    s_dead = _dead_point_travel()
    assert s_dead == pytest.approx(-67.386, abs=1e-3)
    with pytest.raises(AssemblyError) as caught:
        analyse(parse_design(_text(), "dead.toml"))
    error = caught.value
    assert error.member == "drive"
    assert error.sweep == "travel"
    travel = float(re.search(r"travel ([+-]\d+\.\d+) mm", error.driver).group(1))
    # the failure lies between the last pose reached and the dead point (1 mm poses)
    assert s_dead - 1.0 <= travel <= s_dead + 1e-9
    assert "dead point" in str(error) and "'lever'" in str(error)


def test_the_command_line_exits_3_with_one_line_and_writes_nothing(tmp_path: Path) -> None:
    design = tmp_path / "dead.toml"
    design.write_text(_text())
    env = {
        **os.environ,
        "PYTHONPATH": os.pathsep.join(p for p in (str(SRC), os.environ.get("PYTHONPATH", "")) if p),
    }
    done = subprocess.run(
        [
            sys.executable,
            "-m",
            "plumbrod",
            "check",
            str(design),
            "-o",
            str(tmp_path / "report.txt"),
        ],
        capture_output=True,
        text=True,
        check=False,
        env=env,
    )
    assert done.returncode == 1  # the design fails
    assert "plumbrod: fail (dead-point):" in done.stderr
    assert done.stdout == ""
    assert done.stderr.count("\n") == 1 and "Traceback" not in done.stderr
    assert "rod 'drive'" in done.stderr and "sweep 'travel'" in done.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["dead.toml"]
