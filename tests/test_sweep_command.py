"""``plumbrod sweep`` through the real command line, as a subprocess.

The design is the invented side-view lever fixture (tests/designs.py) with two load
cases whose forces are solved by hand in tests/test_statics.py::test_lever_route_by_hand.
"""

from __future__ import annotations

import csv
import io
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

import plumbrod
from designs import SideChain, load_cases_text, side_chain_text

CASES = {
    "hand": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"wing": (0.0, 0.0, -1000.0)}},
    "double": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"wing": (0.0, 0.0, -2000.0)}},
}
RODS = ("drive", "hanger", "guide_upper", "guide_lower")
POSES = {"travel": 5, "heave": 21, "pitch": 21}
UNITS = ("_mm", "_deg", "_N", "_Nm")
DIMENSIONLESS = (
    "route_ratio",
    "leak_fraction",
    "spring_share",
    "spring_share_floor",
    "spring_share_bolted",
)


def _env() -> dict[str, str]:
    """The subprocess imports the same plumbrod as this test process."""
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return env


def plumbrod_sweep(cwd: Path, *args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", "sweep", *args],
        capture_output=True,
        text=True,
        env=_env(),
        cwd=cwd,
        timeout=120,
        check=False,
    )


@pytest.fixture
def design_file(tmp_path: Path) -> Path:
    chain = SideChain(travel_mm=(-10.0, 10.0), travel_steps=POSES["travel"])
    path = tmp_path / "lever.toml"
    path.write_text(side_chain_text(chain) + load_cases_text(CASES), encoding="utf-8")
    return path


def _files(folder: Path) -> set[str]:
    return {str(p.relative_to(folder)) for p in folder.rglob("*")}


def _hand_row_checks(row: dict[str, float | None]) -> None:
    """The lever's design pose by hand (common practice, no source; derivation in
    test_statics.py): a = 80, b = 100, W at x = 200 mm."""
    for case, w in (("hand", 1000.0), ("double", 2000.0)):
        expected = {
            f"{case}/drive/force_N": -w * 100.0 / 80.0,
            f"{case}/hanger/force_N": w,
            f"{case}/guide_upper/force_N": -w * 100.0 / 90.0,
            f"{case}/guide_lower/force_N": w * 100.0 / 90.0,
            f"{case}/wing.hanger/upright_Fz_N": -w * 100.0 / 80.0,
            f"{case}/wing.hanger/upright_My_Nm": w * 100.0 / 1000.0,
            f"{case}/wing/leak_heave_N": w * 0.25,
            f"{case}/wing/leak_pitch_Nm": w * 200.0 / 1000.0,
            f"{case}/wing/leak_fraction": -0.25,  # leak / load: 250 N up for 1000 N down
        }
        for column, value in expected.items():
            assert row[column] == pytest.approx(value, abs=2e-6), column
    assert row["wing.hanger/route_ratio"] == pytest.approx(1.25, abs=2e-6)


def test_sweep_writes_one_csv_row_per_pose_with_units_and_case_columns(
    design_file: Path, tmp_path: Path
) -> None:
    out = tmp_path / "table.csv"
    done = plumbrod_sweep(tmp_path, str(design_file), "--csv", str(out))
    assert done.returncode == 0, done.stderr
    n_poses = sum(POSES.values())
    assert done.stdout.startswith(f"wrote {out}: {n_poses} poses x ")
    reader = csv.reader(io.StringIO(out.read_text(encoding="utf-8")))
    header, *rows = list(reader)
    assert len(rows) == n_poses
    assert [r[0] for r in rows] == [s for s, n in POSES.items() for _ in range(n)]
    assert [int(r[1]) for r in rows] == [i for n in POSES.values() for i in range(n)]
    assert header[:2] == ["sweep", "pose"]
    for column in header[2:]:  # DESIGN §2: every column that carries a unit says it
        assert column.endswith(UNITS) or column.endswith(DIMENSIONLESS), column
    for case in CASES:
        for rod in RODS:
            assert f"{case}/{rod}/force_N" in header
    assert len(header) == len(set(header))
    table = [
        {
            c: (float(v) if v not in ("", "travel", "heave", "pitch") else None)
            for c, v in zip(header, r, strict=True)
        }
        for r in rows
    ]
    design_pose = next(r for r in table if r["travel_mm"] == 0.0)
    _hand_row_checks(design_pose)
    assert _files(tmp_path) == {"lever.toml", "table.csv"}


def test_sweep_prints_json_with_columns_and_rows(design_file: Path, tmp_path: Path) -> None:
    done = plumbrod_sweep(tmp_path, str(design_file), "--json", "-")
    assert done.returncode == 0, done.stderr
    doc = json.loads(done.stdout)  # stdout holds the JSON document and nothing else
    assert doc["load_cases"] == list(CASES)
    assert doc["design"]["file"] == str(design_file)
    columns, rows = doc["columns"], doc["rows"]
    assert len(rows) == sum(POSES.values())
    assert all(len(r) == len(columns) for r in rows)
    travel = [dict(zip(columns, r, strict=True)) for r in rows if r[0] == "travel"]
    assert len(travel) == POSES["travel"]
    assert all(r["heave_mm"] == 0.0 and r["travel_mm"] is not None for r in travel)
    _hand_row_checks(next(r for r in travel if r["travel_mm"] == 0.0))
    heave = [dict(zip(columns, r, strict=True)) for r in rows if r[0] == "heave"]
    assert all(r["travel_mm"] is None for r in heave)  # null where it does not apply
    assert _files(tmp_path) == {"lever.toml"}  # printing writes no file


def test_sweep_json_and_csv_hold_the_same_table(design_file: Path, tmp_path: Path) -> None:
    done = plumbrod_sweep(tmp_path, str(design_file), "--csv", "t.csv", "--json", "t.json")
    assert done.returncode == 0, done.stderr
    doc = json.loads((tmp_path / "t.json").read_text(encoding="utf-8"))
    header, *rows = list(csv.reader(io.StringIO((tmp_path / "t.csv").read_text(encoding="utf-8"))))
    assert header == doc["columns"]
    for line, row in zip(rows, doc["rows"], strict=True):
        as_json = ["" if v is None else v for v in row]
        assert line[:2] == [str(as_json[0]), str(as_json[1])]
        for text, value in zip(line[2:], as_json[2:], strict=True):
            assert (text == "" and value == "") or float(text) == value


def test_sweep_with_a_missing_design_exits_2_and_writes_nothing(tmp_path: Path) -> None:
    done = plumbrod_sweep(tmp_path, "missing.toml", "--csv", "out.csv")
    assert done.returncode == 2
    assert done.stderr.startswith("plumbrod: error: missing.toml")
    assert len(done.stderr.strip().splitlines()) == 1
    assert done.stdout == ""
    assert _files(tmp_path) == set()


@pytest.mark.parametrize(
    "outputs",
    [
        ("--csv", "blocker/out.csv"),
        ("--json", "blocker/out.json"),
        ("--csv", "good.csv", "--json", "blocker/out.json"),
    ],
    ids=["csv", "json", "csv then json"],
)
def test_sweep_with_an_unwritable_output_path_exits_2_and_writes_nothing(
    design_file: Path, tmp_path: Path, outputs: tuple[str, ...]
) -> None:
    # An output path under a regular file cannot be created. README "Bad input": one
    # line naming the problem, exit code 2, and nothing is written.
    (tmp_path / "blocker").write_text("a file, not a folder\n", encoding="utf-8")
    done = plumbrod_sweep(tmp_path, str(design_file), *outputs)
    last = (done.stderr.strip().splitlines() or [""])[-1]
    written = _files(tmp_path) - {"lever.toml", "blocker"}
    assert done.returncode == 2, f"exit {done.returncode}: {last}; wrote {sorted(written)}"
    assert done.stderr.startswith("plumbrod: error: ")
    assert len(done.stderr.strip().splitlines()) == 1
    assert written == set()
