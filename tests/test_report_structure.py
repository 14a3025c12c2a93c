"""``plumbrod check --json`` on every shipped example: the structural part of the report.

Each example must report the buckling, tension and compliance checks with a status,
one ``members`` row per rod (mirrored copies included), and ``mass.corners`` for every
corner.  Every member row's figures are recomputed here from the design file's own
numbers (section, pickups) and published material figures, not from plumbrod.
"""

from __future__ import annotations

import functools
import json
import math
import os
import subprocess
import sys
import tomllib
from pathlib import Path
from typing import Any

import pytest

import plumbrod
from structure_designs import tube_area_mm2, tube_second_moment_mm4

EXAMPLES = sorted((Path(__file__).resolve().parents[1] / "examples").glob("*.toml"))
STATUSES = {"pass", "warn", "fail"}

# E (MPa), S_y (MPa), density (kg/m³) of the materials the examples use.
# source: 4130-N: ASM datasheet for AISI 4130 normalized 870 °C via MatWeb, pub;
# 6061-T6: Aluminum Association typical values via MatWeb, pub-copy (REFERENCES.md,
# Materials).
MATERIALS = {"4130-N": (205000.0, 435.0, 7850.0), "6061-T6": (68900.0, 276.0, 2700.0)}


def _env() -> dict[str, str]:
    """The subprocess imports the same plumbrod as this test process."""
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return env


@functools.cache
def _check_json(path: Path) -> tuple[int, str, str]:
    """Exit code, stdout and stderr of ``plumbrod check --json`` (run once per file)."""
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "--json", str(path)],
        capture_output=True,
        text=True,
        env=_env(),
        timeout=120,
        check=False,
    )
    return done.returncode, done.stdout, done.stderr


@pytest.fixture(params=EXAMPLES, ids=[p.stem for p in EXAMPLES])
def example(request: pytest.FixtureRequest) -> tuple[Path, int, dict[str, Any]]:
    path: Path = request.param
    code, out, err = _check_json(path)
    assert err == "", err
    return path, code, json.loads(out)


def test_there_are_examples() -> None:
    assert len(EXAMPLES) >= 4


def test_exit_code_follows_the_verdict(example: tuple[Path, int, dict[str, Any]]) -> None:
    _, code, report = example
    assert code == (1 if report["verdict"] == "fail" else 0)


def test_structural_checks_are_reported(example: tuple[Path, int, dict[str, Any]]) -> None:
    _, _, report = example
    checks = {c["id"]: c for c in report["checks"]}
    for check_id in ("buckling", "tension", "compliance"):
        assert check_id in checks, f"check {check_id!r} missing"
        check = checks[check_id]
        assert check["status"] in STATUSES
        assert check["where"]
    assert checks["buckling"]["limit_type"] == "min"
    assert checks["tension"]["limit_type"] == "min"
    assert checks["compliance"]["limit_type"] == "max"
    assert checks["compliance"]["unit"] == "mm"
    # every example has load cases, so the reserves are computed, not skipped
    assert report["load_cases"]
    for check_id in ("buckling", "tension", "compliance"):
        assert isinstance(checks[check_id]["value"], float)


def _point(doc: dict[str, Any], end: str) -> tuple[float, ...]:
    """A pickup's design position from the file's own tables."""
    parts = end.split(".")
    if parts[0] == "chassis":
        return tuple(doc["chassis"]["pickups"][parts[1]])
    if len(parts) == 3:
        return tuple(doc["corners"][parts[0]]["pickups"][parts[1]][parts[2]])
    for table in ("rockers", "elements"):
        if parts[0] in doc.get(table, {}):
            return tuple(doc[table][parts[0]]["pickups"][parts[1]])
    raise AssertionError(f"pickup {end!r} not found in the example")


def _file_rod(doc: dict[str, Any], name: str) -> dict[str, Any]:
    """The file's table of a rod; a mirrored copy (``right``) has its ``left`` original's
    section and length (mirroring negates y only)."""
    rods = doc["rods"]
    if name in rods:
        return rods[name]
    assert doc["design"].get("mirror"), f"rod {name!r} is not in the file"
    return rods[name.replace("right", "left")]


def test_member_rows_match_hand_figures(example: tuple[Path, int, dict[str, Any]]) -> None:
    path, _, report = example
    doc = tomllib.loads(path.read_text(encoding="utf-8"))
    rows = {m["name"]: m for m in report["members"]}
    assert list(rows) == report["design"]["rods"]
    assert set(doc["rods"]) <= set(rows)
    for name, row in rows.items():
        rod = _file_rod(doc, name)
        modulus, yield_, density = MATERIALS[rod["material"]]
        assert row["material"] == rod["material"]
        wall = None if rod.get("solid") else rod["wall_mm"]
        length = math.dist(_point(doc, rod["ends"][0]), _point(doc, rod["ends"][1]))
        area = tube_area_mm2(rod["od_mm"], wall)
        inertia = tube_second_moment_mm4(rod["od_mm"], wall)
        k = rod.get("end_fixity", 1.0)  # K = 1 for ball joints at both ends (DESIGN §5.7)
        # JSON keeps 6 decimals (3 for N/mm and N): absolute tolerances at that rounding
        assert row["length_mm"] == pytest.approx(length, abs=1e-6), name
        assert row["mass_kg"] == pytest.approx(density * area * length * 1e-9, abs=1e-6), name
        assert row["stiffness_N_per_mm"] == pytest.approx(modulus * area / length, abs=1e-3)
        # source: transition slenderness √(2π²E/S_y); Euler π²EI/(KL)² above it, Johnson
        # P = A[S_y − (S_y·KL/(2πr))²/E] below it (Shigley, Mechanical Engineering
        # Design, 9th ed., §4-13, eqs. 4-45 and 4-46, pub; REFERENCES.md, Columns)
        slender = k * length / math.sqrt(inertia / area)
        transition = math.sqrt(2.0 * math.pi**2 * modulus / yield_)
        if slender >= transition:
            regime = "euler"
            p_cr = math.pi**2 * modulus * inertia / (k * length) ** 2
        else:
            regime = "johnson"
            p_cr = area * (yield_ - (yield_ * slender / (2.0 * math.pi)) ** 2 / modulus)
        assert row["regime"] == regime, name
        assert row["slenderness"] == pytest.approx(slender, abs=1e-4), name
        assert row["critical_load_N"] == pytest.approx(p_cr, abs=1e-3), name
        low, high = row["min_force_N"], row["max_force_N"]
        if low is None:
            assert row["buckling_reserve"] is None
        else:
            assert low < 0
            assert row["buckling_reserve"] == pytest.approx(p_cr / abs(low), rel=1e-5), name
        if high is None:
            assert row["tension_reserve"] is None
        else:
            assert high > 0
            # source: S_y·A/P (σ = P/A against yield; DESIGN §5 item 7)
            assert row["tension_reserve"] == pytest.approx(yield_ * area / high, rel=1e-5)


def test_reserve_checks_report_the_weakest_row(example: tuple[Path, int, dict[str, Any]]) -> None:
    _, _, report = example
    checks = {c["id"]: c for c in report["checks"]}
    for check_id, key in (("buckling", "buckling_reserve"), ("tension", "tension_reserve")):
        rfs = [m[key] for m in report["members"] if m[key] is not None]
        assert rfs, f"no rod with a {key}"
        assert checks[check_id]["value"] == pytest.approx(min(rfs), abs=1e-6)
        weakest = min((m for m in report["members"] if m[key] is not None), key=lambda m: m[key])
        assert f"rod '{weakest['name']}'" in checks[check_id]["where"]
        limit = checks[check_id]["limit"]
        expected = "fail" if min(rfs) < limit else ("warn" if min(rfs) < limit / 0.8 else "pass")
        assert checks[check_id]["status"] == expected


def test_mass_corners_and_bodies(example: tuple[Path, int, dict[str, Any]]) -> None:
    _, _, report = example
    corners = report["mass"]["corners"]
    assert [c["corner"] for c in corners] == report["design"]["corners"]
    for c in corners:
        for key in ("static_share_kg", "kinetic_single_wheel_kg", "kinetic_heave_kg"):
            assert isinstance(c[key], float) and math.isfinite(c[key]) and c[key] > 0.0
    bodies = report["mass"]["bodies_kg"]
    for row in report["members"]:
        assert bodies[row["name"]] == row["mass_kg"]
    assert set(report["design"]["elements"]) <= set(bodies)


def test_route_stiffness_for_every_route(example: tuple[Path, int, dict[str, Any]]) -> None:
    _, _, report = example
    stiffness = report["compliance"]["route_stiffness_N_per_mm"]
    assert set(stiffness) == {r["name"] for r in report["routes"]}
    for value in stiffness.values():
        assert value is not None and value > 0.0


def test_vertical_strut_route_stiffness_is_its_ea_over_l() -> None:
    # The student wing stands on vertical struts straight from the uprights: with the
    # wheel held, the wing's pickup moves only by the strut's stretch, so k = EA/L
    # (hand derivation in test_compliance.py; axial stiffness of a bar, from memory).
    path = next(p for p in EXAMPLES if p.stem == "student_rear_wing")
    doc = tomllib.loads(path.read_text(encoding="utf-8"))
    rod = doc["rods"]["strut_left"]
    a, b = (_point(doc, end) for end in rod["ends"])
    assert a[0] == b[0] and a[1] == b[1]  # vertical in the file
    modulus = MATERIALS[rod["material"]][0]
    expected = modulus * tube_area_mm2(rod["od_mm"], rod["wall_mm"]) / math.dist(a, b)
    stiffness = json.loads(_check_json(path)[1])["compliance"]["route_stiffness_N_per_mm"]
    assert stiffness["wing.strut_left"] == pytest.approx(expected, abs=1e-5)
    assert stiffness["wing.strut_right"] == pytest.approx(expected, abs=1e-5)
