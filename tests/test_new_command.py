"""``plumbrod new`` writes a starter design that reads and passes ``plumbrod check``."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

SRC = Path(__file__).resolve().parents[1] / "src"


def _run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    # run from another folder: make sure this checkout's plumbrod is the one imported
    env = {
        **os.environ,
        "PYTHONPATH": os.pathsep.join(p for p in (str(SRC), os.environ.get("PYTHONPATH", "")) if p),
    }
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", *args],
        capture_output=True,
        text=True,
        check=False,
        cwd=cwd,
        env=env,
    )


def test_the_starter_design_passes_its_checks(tmp_path: Path) -> None:
    done = _run("new", "mine.toml", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    text = (tmp_path / "mine.toml").read_text()
    assert "Invented" in text  # the starter says its values are invented
    checked = _run("check", "mine.toml", "--json", cwd=tmp_path)
    assert checked.returncode == 0, checked.stderr
    report = json.loads(checked.stdout)
    assert report["verdict"] in ("pass", "warn")
    ids = {c["id"] for c in report["checks"]}
    assert {
        "route-ratio",
        "line-of-action",
        "transmission-angle",
        "ride-height-sensitivity",
        "member-force",
        "sprung-leakage",
        "buckling",
        "tension",
        "compliance",
        "clearance",
    } <= ids


def test_new_refuses_to_overwrite_without_force(tmp_path: Path) -> None:
    target = tmp_path / "mine.toml"
    target.write_text("# my own work\n")
    done = _run("new", "mine.toml", cwd=tmp_path)
    assert done.returncode == 2
    assert "already exists" in done.stderr and "--force" in done.stderr
    assert target.read_text() == "# my own work\n"
    forced = _run("new", "mine.toml", "--force", cwd=tmp_path)
    assert forced.returncode == 0
    assert target.read_text() != "# my own work\n"
