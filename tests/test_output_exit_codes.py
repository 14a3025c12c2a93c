"""``plot`` and ``export`` write their files, print the verdict line and exit like
``check``: 0 when nothing fails, 1 when a check fails (the failing example fails on
purpose: its own header says so)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
FAILING = ROOT / "examples" / "failing_short_lever.toml"
PASSING = ROOT / "examples" / "hillclimb_splitter.toml"


def _run(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", *args],
        capture_output=True,
        text=True,
        check=False,
        timeout=300,
    )


@pytest.mark.parametrize("verb", ["plot", "export"])
def test_failing_design_writes_files_and_exits_1(tmp_path: Path, verb: str) -> None:
    check = _run("check", str(FAILING))
    assert check.returncode == 1  # the reference: `check` on the same file
    done = _run(verb, str(FAILING), "--output-dir", str(tmp_path))
    assert done.returncode == 1, done.stderr
    last = done.stdout.strip().splitlines()[-1]
    assert last.startswith("verdict: FAIL (") and "failed: " in last
    assert "route-ratio" in last  # the example's header names its failing checks
    assert any(tmp_path.iterdir())  # the files are written all the same


@pytest.mark.parametrize("verb", ["plot", "export"])
def test_passing_design_exits_0_with_its_verdict(tmp_path: Path, verb: str) -> None:
    done = _run(verb, str(PASSING), "--output-dir", str(tmp_path))
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip().splitlines()[-1].startswith("verdict: ")
    assert "verdict: FAIL" not in done.stdout
