"""``plumbrod column`` through the real command line, as a subprocess."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

import plumbrod
from plumbrod.cli.column import END_NAMES
from plumbrod.design.materials import load_materials
from plumbrod.mechanics.columns import END_CONDITIONS

# source: 1 in = 25.4 mm and 1 lbf = 0.45359237 kg × 9.80665 m/s², both exact by
# definition (NIST SP 811, 2008 ed., Appendix B), pub.
IN_MM = 25.4
LBF_N = 0.45359237 * 9.80665
PSI_MPA = LBF_N / IN_MM**2
KSI_MPA = 1000.0 * PSI_MPA

REQUIRED_KEYS = {
    "area_mm2",
    "second_moment_mm4",
    "radius_of_gyration_mm",
    "slenderness",
    "transition_slenderness",
    "regime",
    "critical_load_N",
    "reserve_factor",
}


def _env() -> dict[str, str]:
    """The subprocess imports the same plumbrod as this test process."""
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return env


def plumbrod_column(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", "column", *args],
        capture_output=True,
        text=True,
        env=_env(),
        timeout=60,
        check=False,
    )


def column_json(*args: str) -> dict:
    done = plumbrod_column(*args, "--json")
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout)


def test_mott_euler_example_through_the_command_line() -> None:
    # source: Mott, Machine Elements in Mechanical Design, ch. 6 example, pub-copy
    # (REFERENCES.md C3): d 1.25 in, L 54 in, E 30e6 psi, S_y 51 ksi: KL/r 173,
    # transition 108, P_cr 12,169 lb.
    report = column_json(
        "--od", f"{1.25 * IN_MM}", "--solid", "--length", f"{54 * IN_MM}",
        "--modulus", f"{30e6 * PSI_MPA}", "--yield", f"{51 * KSI_MPA}",
    )  # fmt: skip
    assert REQUIRED_KEYS <= set(report)
    assert report["regime"] == "euler"
    assert report["slenderness"] == pytest.approx(173.0, abs=0.5)
    assert report["transition_slenderness"] == pytest.approx(108.0, abs=0.5)
    assert report["critical_load_N"] / LBF_N == pytest.approx(12169.0, abs=1.0)
    assert report["reserve_factor"] is None
    assert report["wall_mm"] is None and report["k"] == 1.0


def test_shigley_johnson_example_with_a_compressive_load() -> None:
    # source: Shigley 8th ed. solutions, Problem 4-77(b), pub-copy (REFERENCES.md C6):
    # d 0.875 in, l 18 in, S_y 37.5 kpsi, E 30e6 psi -> l/k 82.3, P_cr 17,714 lbf.
    load_N = -4000.0
    report = column_json(
        "--od", f"{0.875 * IN_MM}", "--solid", "--length", f"{18 * IN_MM}",
        "--modulus", f"{30e6 * PSI_MPA}", "--yield", f"{37.5 * KSI_MPA}",
        "--load", f"{load_N}", "--ends", "pinned-pinned",
    )  # fmt: skip
    assert report["regime"] == "johnson"
    assert report["slenderness"] == pytest.approx(82.3, abs=0.05)
    assert report["critical_load_N"] / LBF_N == pytest.approx(17714.0, rel=2e-4)
    assert report["load_kind"] == "compression"
    # Reserve factor in compression: P_cr/|P| (DESIGN.md §5 item 7).
    assert report["reserve_factor"] == pytest.approx(17714.0 * LBF_N / 4000.0, rel=2e-4)


def test_tension_load_gives_yield_reserve_factor_and_material_mass() -> None:
    report = column_json(
        "--od", "25", "--wall", "1.5", "--length", "400", "--material", "4130-N",
        "--load", "10000",
    )  # fmt: skip
    # source: ASM 4130 normalized datasheet, S_y 435 MPa, pub; RF = S_y*A/P.
    assert report["load_kind"] == "tension"
    assert report["reserve_factor"] == pytest.approx(435.0 * report["area_mm2"] / 10000.0)
    assert report["material"] == "4130-N" and report["material_basis"] == "typical"
    assert report["mass_per_m_kg"] == pytest.approx(7850.0 * report["area_mm2"] * 1e-6)


def test_gere_fixed_fixed_k_from_ends_option() -> None:
    # source: Gere, Mechanics of Materials, 7th ed., Problem 11.4-2, pub-copy
    # (REFERENCES.md C2): fixed-fixed (K 0.5) 249 kN; with --k 0.5 explicitly.
    # Yield set high (invented) so the short tube stays in the Euler range.
    report = column_json(
        "--od", "40", "--wall", "2", "--length", "1200", "--modulus", "210000",
        "--yield", "5000", "--k", "0.5",
    )  # fmt: skip
    assert report["regime"] == "euler"
    assert report["critical_load_N"] == pytest.approx(249e3, rel=4e-3)
    # --ends uses the AISC recommended design value: fixed-fixed K 0.65
    # (AISC 360-22 Commentary Table C-A-7.1, pub).
    assert column_json(
        "--od", "40", "--wall", "2", "--length", "1200", "--modulus", "210000",
        "--yield", "5000", "--ends", "fixed-fixed",
    )["k"] == 0.65  # fmt: skip


def test_required_reserve_factor_sets_exit_code() -> None:
    base = ("--od", "16", "--wall", "1", "--length", "600", "--material", "4130-N")
    ok = plumbrod_column(*base, "--load", "-1000", "--required", "3", "--json")
    assert ok.returncode == 0, ok.stderr
    report = json.loads(ok.stdout)
    assert report["passed"] is True
    assert report["margin_of_safety"] == pytest.approx(report["reserve_factor"] / 3 - 1)
    fail = plumbrod_column(*base, "--load", "-20000", "--required", "3")
    assert fail.returncode == 1
    assert "FAIL" in fail.stdout
    rod_end = plumbrod_column(*base, "--load", "-1000", "--rod-end-rating", "2000",
                              "--required", "3", "--json")  # fmt: skip
    assert rod_end.returncode == 1
    assert json.loads(rod_end.stdout)["rod_end_reserve_factor"] == pytest.approx(2.0)


def test_text_output_is_a_table_with_the_caution() -> None:
    done = plumbrod_column("--od", "20", "--wall", "1.5", "--length", "450",
                           "--material", "7075-T6", "--load", "-3000")  # fmt: skip
    assert done.returncode == 0, done.stderr
    for label in ("area A", "second moment I", "radius of gyration r", "slenderness KL/r",
                  "transition slenderness", "regime", "critical load Pcr",
                  "reserve factor RF"):  # fmt: skip
        assert label in done.stdout
    assert "qualified engineer" in done.stdout and "Caution" in done.stdout


def test_help_explains_load_sign_and_shows_the_caution() -> None:
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "column", "--help"],
        capture_output=True, text=True, env=_env(), timeout=60, check=False,
    )  # fmt: skip
    assert done.returncode == 0
    text = " ".join(done.stdout.split())
    assert "NEGATIVE = compression" in text
    assert "qualified engineer" in text


def test_list_materials_needs_no_other_option() -> None:
    done = plumbrod_column("--list-materials")
    assert done.returncode == 0, done.stderr
    for material_id in load_materials():
        assert material_id in done.stdout
    assert done.stdout.count("source:") == len(load_materials())
    listed = json.loads(plumbrod_column("--list-materials", "--json").stdout)["materials"]
    assert [row["id"] for row in listed] == list(load_materials())


@pytest.mark.parametrize(
    ("args", "option"),
    [
        (("--od", "25", "--wall", "1", "--length", "-300", "--material", "4130-N"), "--length"),
        (("--od", "0", "--wall", "1", "--length", "300", "--material", "4130-N"), "--od"),
        (("--od", "25", "--wall", "12.5", "--length", "300", "--material", "4130-N"), "--wall"),
        (("--od", "25", "--wall", "1", "--length", "300", "--material", "4310-N"), "--material"),
        (("--od", "25", "--solid", "--wall", "1", "--length", "300", "--material", "4130-N"),
         "--wall"),
        (("--od", "25", "--wall", "1", "--material", "4130-N"), "--length"),
        (("--od", "25", "--wall", "1", "--length", "300"), "--material"),
        (("--od", "25", "--wall", "1", "--length", "300", "--modulus", "200000"), "--yield"),
        (("--od", "25", "--wall", "1", "--length", "300", "--material", "4130-N", "--k", "1",
          "--ends", "fixed-fixed"), "--k"),
        (("--od", "25", "--wall", "1", "--length", "300", "--material", "4130-N", "--ends",
          "clamped"), "--ends"),
        (("--od", "abc", "--wall", "1", "--length", "300", "--material", "4130-N"), "--od"),
        (("--od", "25", "--wall", "1", "--length", "300", "--material", "4130-N", "--load",
          "0"), "--load"),
        (("--od", "25", "--wall", "1", "--length", "300", "--material", "4130-N",
          "--required", "3"), "--required"),
    ],
)  # fmt: skip
def test_bad_input_is_one_line_naming_the_option_exit_2(args: tuple[str, ...], option: str) -> None:
    done = plumbrod_column(*args)
    assert done.returncode == 2
    assert done.stdout == ""
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1, done.stderr
    assert lines[0].startswith(f"plumbrod: error: {option}: ")
    assert "Traceback" not in done.stderr


def test_ends_names_in_help_match_the_k_table() -> None:
    assert set(END_NAMES) == set(END_CONDITIONS)
