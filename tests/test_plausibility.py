"""Unit-slip warnings: a tyre radius or a whole layout that reads like metres.

Trade fact (common practice, no source): a racing tyre's loaded radius is a few hundred
mm, a kart's about 130 mm; a car's hardpoints span more than a metre.
"""

from __future__ import annotations

import json
import os
import re
import subprocess
import sys
from pathlib import Path

import plumbrod
from designs import EXAMPLE, replace_once
from plumbrod.design.loading import parse_design
from plumbrod.design.plausibility import unit_slips

BASE = EXAMPLE.read_text(encoding="utf-8")


def test_the_examples_read_as_millimetres() -> None:
    assert unit_slips(parse_design(BASE)) == ()


def test_a_tyre_radius_in_metres_is_flagged() -> None:
    design = parse_design(replace_once(BASE, "tyre_radius_mm = 290.0", "tyre_radius_mm = 0.29"))
    notes = unit_slips(design)
    assert any("corners.front_left.tyre_radius_mm is 0.29 mm" in n for n in notes), notes
    assert all("metres" in n for n in notes)


def test_a_layout_in_metres_is_flagged() -> None:
    # every coordinate of every point divided by 1000 (the layout typed in metres)
    def shrink(match: re.Match[str]) -> str:
        return ", ".join(f"{float(v) / 1000.0:.6f}" for v in match[1].split(","))

    text = re.sub(r"(?<=\[)(-?[\d.]+(?:,\s*-?[\d.]+){2})(?=\])", shrink, BASE)
    design = parse_design(text)
    notes = unit_slips(design)
    assert any("span only" in n for n in notes), notes


def test_the_report_shows_the_warning_and_still_passes(tmp_path: Path) -> None:
    design = tmp_path / "d.toml"
    design.write_text(
        replace_once(BASE, "tyre_radius_mm = 290.0", "tyre_radius_mm = 0.29"), encoding="utf-8"
    )
    env = dict(os.environ)
    env["PYTHONPATH"] = str(Path(plumbrod.__file__).resolve().parents[1])
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "--json", str(design)],
        capture_output=True,
        text=True,
        env=env,
        timeout=300,
        check=False,
    )
    report = json.loads(done.stdout)
    assert any("tyre_radius_mm" in n for n in report["design"]["plausibility"])
    assert done.returncode in (0, 1)
