"""Rod reserves on whole designs: the worst member forces against hand statics, the
buckling reserve against Euler's formula and the tension reserve against S_y·A/P.

The fixtures (tests/structure_designs.py) are planar designs whose forces follow by hand
at the design pose; their travel sweep stays within 1 mm of it, so the worst force over
the sweep equals the design-pose force to within a millionth (observed: 2e-7).  Section
and material figures are computed here, not taken from plumbrod:
A = π(D² − d²)/4, I = π(D⁴ − d⁴)/64 (section properties of a hollow circle, any
mechanics-of-materials text, from memory); 4130-N: E 205 GPa, S_y 435 MPa, ρ 7.85 g/cm³
(ASM datasheet via MatWeb, pub; REFERENCES.md, Materials).
"""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from pathlib import Path

import pytest

import plumbrod
from plumbrod.design.loading import parse_design
from plumbrod.verdict.findings import Findings, review
from structure_designs import (
    FEATHER,
    STEEL_4130N,
    Hang,
    RodSpec,
    Strut,
    hang_text,
    strut_text,
    tube_area_mm2,
    tube_second_moment_mm4,
)

# source: standard acceleration of gravity 9.80665 m/s² (3rd CGPM, 1901), pub.
G0_M_S2 = 9.80665
WORST_REL = 1e-6
"""Worst force over the ±1 mm travel sweep against the design-pose hand value."""


def _review(text: str) -> Findings:
    return review(parse_design(text, "<structure fixture>"))


def _euler_N(spec: RodSpec, length_mm: float) -> float:
    """P_cr = π²EI/(KL)².

    source: Euler column formula with effective length KL (e.g. Hibbeler, Mechanics of
    Materials, Example 13.1, pub-copy; REFERENCES.md, Columns).
    """
    inertia = tube_second_moment_mm4(spec.od_mm, spec.wall_mm)
    return math.pi**2 * spec.material.modulus_MPa * inertia / (spec.end_fixity * length_mm) ** 2


def _strut_force_N(s: Strut) -> float:
    """Design-pose strut force (+ tension): the aero load and the element's weight, plus
    the strut's own upper half, straight down its line; the guides are horizontal and
    weightless and carry nothing (vertical and moment equilibrium of the element)."""
    m_strut = s.strut.mass_kg(s.strut_length_mm)
    return -(s.force_N + (s.element_mass_kg + m_strut / 2.0) * G0_M_S2 * (1.0 + s.bump_g))


# ---------------------------------------------------------------------------------
# Buckling
# ---------------------------------------------------------------------------------


@pytest.mark.parametrize("end_fixity", [1.0, 0.8], ids=["K1.0", "K0.8"])
def test_strut_buckling_reserve_is_euler_load_over_the_worst_compression(end_fixity: float) -> None:
    # K 1.0: ball joints at both ends; K 0.8: the recommended design value for
    # fixed-pinned ends (source: AISC 360-22 Commentary, Table C-A-7.1, pub).
    s = Strut(
        strut=RodSpec(od_mm=12.0, wall_mm=1.0, material=STEEL_4130N, end_fixity=end_fixity),
        strut_length_mm=600.0,
        element_mass_kg=4.0,
        force_N=600.0,
    )
    findings = _review(strut_text(s))
    reserve = findings.reserves["strut"]

    area = tube_area_mm2(12.0, 1.0)
    radius = math.sqrt(tube_second_moment_mm4(12.0, 1.0) / area)
    slenderness = end_fixity * 600.0 / radius
    # source: transition slenderness (KL/r)_t = √(2π²E/S_y), above it Euler governs
    # (Shigley, Mechanical Engineering Design, 9th ed., §4-13, eq. 4-45 with C = 1/K²
    # folded into KL, pub; REFERENCES.md, Columns)
    transition = math.sqrt(2.0 * math.pi**2 * 205000.0 / 435.0)
    assert transition == pytest.approx(96.45, abs=0.01)
    assert slenderness > transition
    assert reserve.regime == "euler"
    assert reserve.slenderness == pytest.approx(slenderness, rel=1e-12)
    assert reserve.transition_slenderness == pytest.approx(transition, rel=1e-12)
    p_cr = _euler_N(s.strut, 600.0)
    assert reserve.critical_load_N == pytest.approx(p_cr, rel=1e-12)

    p_hand = _strut_force_N(s)
    assert reserve.compression is not None
    assert reserve.compression.force_N == pytest.approx(p_hand, rel=WORST_REL)
    design_pose = s.travel_steps // 2
    j = findings.analysis.link.rod_names.index("strut")
    assert findings.analysis.statics["travel"].rod_force_N[design_pose, 0, j] == (
        pytest.approx(p_hand, rel=1e-9)
    )
    assert reserve.buckling_rf == pytest.approx(p_cr / abs(p_hand), rel=WORST_REL)

    check = next(c for c in findings.checks if c.id == "buckling")
    assert "'strut'" in check.where
    assert check.value == pytest.approx(p_cr / abs(p_hand), rel=WORST_REL)
    assert check.limit == 3.0  # default buckling reserve: common practice, no source
    assert check.status == ("pass" if p_cr / abs(p_hand) > 3.0 / 0.8 else "warn")
    if end_fixity == 1.0:
        # 12 x 1 tube, 600 mm: I = 527.0 mm⁴, P_cr = π²·205000·527.0/600² = 2962 N;
        # load 600 N + 4 kg·g + half the strut's 0.163 kg = 640.0 N; RF 4.63
        assert p_cr == pytest.approx(2961.9, abs=0.1)
        assert check.value == pytest.approx(4.628, abs=1e-3)


def test_lever_drive_rod_carries_the_load_times_the_ratio() -> None:
    # source: lever rule, moments about the rocker pivot: drive force · a = hanger
    # force · r·a (statics of a rigid body, any statics text, common practice)
    h = Hang(ratio=1.25, force_N=1000.0, element_mass_kg=5.0, rods=RodSpec(material=FEATHER))
    findings = _review(hang_text(h))
    load = 1000.0 + 5.0 * G0_M_S2
    drive = findings.reserves["drive"].compression
    assert drive is not None
    assert drive.force_N == pytest.approx(-1.25 * load, rel=WORST_REL)
    check = next(c for c in findings.checks if c.id == "buckling")
    assert "'drive'" in check.where


# ---------------------------------------------------------------------------------
# Tension
# ---------------------------------------------------------------------------------


@pytest.mark.parametrize("ratio", [None, 1.25], ids=["direct", "lever-1.25"])
def test_hanger_tension_reserve_is_yield_times_area_over_force(ratio: float | None) -> None:
    # source: tension reserve S_y·A/P (first yield of an axially loaded bar, σ = P/A:
    # any mechanics-of-materials text, from memory; DESIGN.md §5 item 7)
    rods = RodSpec(od_mm=12.0, wall_mm=1.0, material=STEEL_4130N)
    h = Hang(ratio=ratio, force_N=1000.0, element_mass_kg=5.0, rods=rods)
    findings = _review(hang_text(h))
    m_h = rods.mass_kg(h.hanger_length_mm)
    m_g = rods.mass_kg(h.guide_length_mm)
    # the hanger holds the element: aero load, element, the hanger's lower half and
    # each guide's element half (the guides are horizontal: no vertical share)
    tension = 1000.0 + (5.0 + m_h / 2.0 + m_g) * G0_M_S2
    capacity = 435.0 * tube_area_mm2(12.0, 1.0)
    reserve = findings.reserves["hanger"]
    assert reserve.tension is not None
    assert reserve.tension.force_N == pytest.approx(tension, rel=WORST_REL)
    assert reserve.tension_capacity_N == pytest.approx(capacity, rel=1e-12)
    assert reserve.tension_rf == pytest.approx(capacity / tension, rel=WORST_REL)
    check = next(c for c in findings.checks if c.id == "tension")
    assert "'hanger'" in check.where
    assert check.value == pytest.approx(capacity / tension, rel=WORST_REL)
    assert check.limit == 2.0  # default tension reserve: common practice, no source
    assert check.status == "pass"
    # 435 MPa · 34.5575 mm² = 15033 N over 1050 N: RF 14.3
    assert check.value == pytest.approx(14.32, abs=0.01)


# ---------------------------------------------------------------------------------
# Through the command line
# ---------------------------------------------------------------------------------


def _env() -> dict[str, str]:
    """The subprocess imports the same plumbrod as this test process."""
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return env


def _check_json(path: Path) -> tuple[int, dict]:
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "--json", str(path)],
        capture_output=True,
        text=True,
        env=_env(),
        timeout=120,
        check=False,
    )
    assert done.stderr == "", done.stderr
    return done.returncode, json.loads(done.stdout)


def test_long_slender_strut_fails_the_buckling_check(tmp_path: Path) -> None:
    slender = RodSpec(od_mm=6.0, wall_mm=None, material=STEEL_4130N)  # solid 6 mm bar
    s = Strut(strut=slender, strut_length_mm=600.0, element_mass_kg=4.0, force_N=600.0)
    path = tmp_path / "slender_strut.toml"
    path.write_text(strut_text(s), encoding="utf-8")
    code, report = _check_json(path)
    assert code == 1
    assert report["verdict"] == "fail"
    statuses = {c["id"]: c["status"] for c in report["checks"]}
    assert statuses["buckling"] == "fail"
    assert [k for k, v in statuses.items() if v == "fail"] == ["buckling"]

    buckling = next(c for c in report["checks"] if c["id"] == "buckling")
    row = next(m for m in report["members"] if m["name"] == "strut")
    # solid 6 mm bar, 600 mm: I = π·6⁴/64 = 63.62 mm⁴, KL/r = 600/1.5 = 400 (Euler);
    # P_cr = π²·205000·63.62/600² = 357.6 N against about 640 N: RF 0.56
    p_cr = _euler_N(slender, 600.0)
    assert p_cr == pytest.approx(357.55, abs=0.01)
    assert row["regime"] == "euler"
    assert row["critical_load_N"] == pytest.approx(p_cr, abs=1e-3)  # JSON keeps 3 decimals
    p_hand = _strut_force_N(s)
    assert row["min_force_N"] == pytest.approx(p_hand, rel=WORST_REL)
    assert buckling["value"] == pytest.approx(p_cr / abs(p_hand), rel=WORST_REL)
    assert buckling["value"] < 1.0  # it would buckle outright, not only lack margin
    assert "'strut'" in buckling["where"]


def test_the_same_strut_as_a_tube_passes(tmp_path: Path) -> None:
    # the counterpart of the failing design: only the strut's section differs, and the
    # design passes, so the exit code above comes from the slender strut alone
    s = Strut(
        strut=RodSpec(od_mm=16.0, wall_mm=1.2, material=STEEL_4130N),
        strut_length_mm=600.0,
        element_mass_kg=4.0,
        force_N=600.0,
    )
    path = tmp_path / "tube_strut.toml"
    path.write_text(strut_text(s), encoding="utf-8")
    code, report = _check_json(path)
    assert code == 0
    buckling = next(c for c in report["checks"] if c["id"] == "buckling")
    assert buckling["status"] == "pass"
    p_cr = _euler_N(s.strut, 600.0)
    assert buckling["value"] == pytest.approx(p_cr / abs(_strut_force_N(s)), rel=WORST_REL)
