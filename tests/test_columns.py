"""Column buckling against textbook worked examples, the AISC K table and properties."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import brentq

from plumbrod.design.sections import Section, tube_area_mm2, tube_second_moment_mm4
from plumbrod.mechanics.columns import (
    END_CONDITIONS,
    ColumnResult,
    analyse_column,
    compression_reserve_factor,
    critical_load_N,
    effective_length_factor,
    euler_critical_load_N,
    johnson_critical_load_N,
    margin_of_safety,
    member_reserve_factor,
    rod_end_reserve_factor,
    slenderness_ratio,
    tension_capacity_N,
    tension_reserve_factor,
    transition_slenderness,
)

# source: 1 in = 25.4 mm and 1 lbf = 0.45359237 kg × 9.80665 m/s², both exact by
# definition (NIST SP 811, 2008 ed., Appendix B), pub.
IN_MM = 25.4
LBF_N = 0.45359237 * 9.80665
PSI_MPA = LBF_N / IN_MM**2
KSI_MPA = 1000.0 * PSI_MPA


# --- Euler: worked examples -------------------------------------------------------------


def test_c1_hibbeler_example_13_1_euler_tube() -> None:
    # source: Hibbeler, Mechanics of Materials, Example 13.1 (SI), pub-copy
    # (REFERENCES.md C1): OD 150 mm, ID 140 mm, L 7.2 m, E 200 GPa, pinned ends:
    # P_cr = 228.2 kN, sigma_cr = 100.2 MPa.
    section = Section.tube(150.0, 5.0)
    load = float(euler_critical_load_N(section.second_moment_mm4, 7200.0, 1.0, 200e3))
    assert load == pytest.approx(228.2e3, abs=50.0)
    assert load / section.area_mm2 == pytest.approx(100.2, abs=0.05)
    # The example's A-36 steel has S_y 250 MPa (from memory); the tube is then in the
    # Euler range and the combined function gives the same load.
    result = analyse_column(section, 7200.0, 200e3, 250.0)
    assert result.regime == "euler"
    assert result.critical_load_N == pytest.approx(load, rel=1e-12)


@pytest.mark.parametrize(
    ("ends", "k", "published_kN", "rel"),
    [
        # source: Gere, Mechanics of Materials, 7th ed., Problem 11.4-2, pub-copy
        # (REFERENCES.md C2): OD 40, ID 36 mm, L 1.2 m, E 210 GPa.
        ("pinned-pinned", effective_length_factor("pinned-pinned", "theoretical"), 62.2, 1e-3),
        ("fixed-free", effective_length_factor("fixed-free", "theoretical"), 15.6, 5e-3),
        # Gere's fixed-pinned coefficient 2.046 (P = 2.046 π²EI/L²) means K = 1/√2.046.
        ("fixed-pinned (2.046)", 1.0 / math.sqrt(2.046), 127.0, 4e-3),
        (
            "fixed-pinned (AISC 0.7)",
            effective_length_factor("fixed-pinned", "theoretical"),
            127.0,
            4e-3,
        ),
        ("fixed-fixed", effective_length_factor("fixed-fixed", "theoretical"), 249.0, 4e-3),
    ],
)
def test_c2_gere_four_end_conditions(ends: str, k: float, published_kN: float, rel: float) -> None:
    section = Section.tube(40.0, 2.0)
    # source: same problem, I = 43.22e3 mm^4.
    assert section.second_moment_mm4 == pytest.approx(43.22e3, abs=5.0)
    load = float(euler_critical_load_N(section.second_moment_mm4, 1200.0, k, 210e3))
    assert load == pytest.approx(published_kN * 1e3, rel=rel), ends


def test_c3_mott_solid_bar_euler() -> None:
    # source: Mott, Machine Elements in Mechanical Design, ch. 6 example, pub-copy
    # (REFERENCES.md C3): d 1.25 in, L 54 in, E 30e6 psi, S_y 51 ksi: KL/r 173,
    # transition 108, I 0.1198 in^4, P_cr 12,169 lb.
    bar = Section.solid(1.25 * IN_MM)
    result = analyse_column(bar, 54.0 * IN_MM, 30e6 * PSI_MPA, 51.0 * KSI_MPA, k=1.0)
    assert result.slenderness == pytest.approx(173.0, abs=0.5)
    assert result.transition_slenderness == pytest.approx(108.0, abs=0.5)
    assert result.second_moment_mm4 == pytest.approx(0.1198 * IN_MM**4, abs=0.00005 * IN_MM**4)
    assert result.regime == "euler"
    assert result.critical_load_N / LBF_N == pytest.approx(12169.0, abs=1.0)


# --- transition slenderness -------------------------------------------------------------


def test_c4_shigley_example_4_17_transition() -> None:
    # source: Shigley, Mechanical Engineering Design, 9th ed., Example 4-17, pub
    # (REFERENCES.md C4): E 207 GPa, S_y 500 MPa -> (l/k)_1 = 90.4.
    assert float(transition_slenderness(207e3, 500.0)) == pytest.approx(90.4, abs=0.05)


@pytest.mark.parametrize(("fy_ksi", "cc"), [(36.0, 126.1), (50.0, 107.0)])
def test_c5_aisc_asd_column_constant(fy_ksi: float, cc: float) -> None:
    # source: AISC allowable-stress design column constant C_c = sqrt(2 pi^2 E / F_y),
    # E 29,000 ksi: 126.1 for F_y 36 ksi, 107 for 50 ksi, pub (REFERENCES.md C5).
    value = float(transition_slenderness(29000.0 * KSI_MPA, fy_ksi * KSI_MPA))
    assert value == pytest.approx(cc, abs=0.05 if fy_ksi == 36.0 else 0.5)


# --- Johnson: worked examples -----------------------------------------------------------


def test_c6_shigley_problem_4_77b_johnson() -> None:
    # source: Shigley 8th ed. solutions, Problem 4-77(b), pub-copy (REFERENCES.md C6):
    # d 0.875 in, l 18 in, C 1, S_y 37.5 kpsi, E 30e6 psi -> l/k 82.3, P_cr 17,714 lbf
    # (the source rounds l/k, so compare to 0.02 %).
    bar = Section.solid(0.875 * IN_MM)
    result = analyse_column(bar, 18.0 * IN_MM, 30e6 * PSI_MPA, 37.5 * KSI_MPA)
    assert result.regime == "johnson"
    assert result.slenderness == pytest.approx(82.3, abs=0.05)
    assert result.critical_load_N / LBF_N == pytest.approx(17714.0, rel=2e-4)
    johnson = johnson_critical_load_N(
        bar.area_mm2, result.slenderness, 30e6 * PSI_MPA, 37.5 * KSI_MPA
    )
    assert float(johnson) == pytest.approx(result.critical_load_N, rel=1e-12)


def test_c7_faires_johnson_sizing_round_trip() -> None:
    # source: Faires, Design of Machine Elements, Problem 334(a), pub-copy
    # (REFERENCES.md C7): S_y 48 ksi, E 30e3 ksi, N*F = 30 kip, L_e 25 in, solid
    # round -> D = 1.096 in.
    modulus, strength = 30e3 * KSI_MPA, 48.0 * KSI_MPA
    length, target = 25.0 * IN_MM, 30.0 * 1000.0 * LBF_N

    def shortfall(d_mm: float) -> float:
        area = tube_area_mm2(d_mm, d_mm / 2)
        inertia = tube_second_moment_mm4(d_mm, d_mm / 2)
        return float(critical_load_N(area, inertia, length, 1.0, modulus, strength)) - target

    d_mm = brentq(shortfall, 10.0, 60.0, xtol=1e-9)
    assert d_mm / IN_MM == pytest.approx(1.096, abs=0.0005)
    assert analyse_column(Section.solid(d_mm), length, modulus, strength).regime == "johnson"


def test_c8_gere_euler_tube_wall_sizing_round_trip() -> None:
    # source: Gere, Mechanics of Materials, 7th ed., Problem 11.3-15, pub-copy
    # (REFERENCES.md C8): P_cr 8 kip, L 72 in, E 10,400 ksi, OD 2 in -> t = 0.165 in.
    od, length, modulus, target = 2.0 * IN_MM, 72.0 * IN_MM, 10400.0 * KSI_MPA, 8000.0 * LBF_N

    def shortfall(wall_mm: float) -> float:
        inertia = tube_second_moment_mm4(od, wall_mm)
        return float(euler_critical_load_N(inertia, length, 1.0, modulus)) - target

    wall_mm = brentq(shortfall, 0.1, od / 2, xtol=1e-9)
    assert wall_mm / IN_MM == pytest.approx(0.165, abs=0.0005)


# --- effective length factor ------------------------------------------------------------


def test_k_values_equal_aisc_table() -> None:
    # source: AISC 360-22 Commentary, Table C-A-7.1 (REFERENCES.md), pub:
    # theoretical / recommended design K.
    published = {
        "fixed-fixed": (0.5, 0.65),
        "fixed-pinned": (0.7, 0.80),
        "fixed-sliding": (1.0, 1.2),  # rotation fixed, translation free
        "pinned-pinned": (1.0, 1.0),
        "fixed-free": (2.0, 2.10),
        "pinned-sliding": (2.0, 2.0),  # rotation fixed, translation free
    }
    assert set(END_CONDITIONS) == set(published)
    for name, (theoretical, recommended) in published.items():
        assert effective_length_factor(name, "theoretical") == theoretical
        assert effective_length_factor(name) == recommended
    # Ball joints at both ends: pinned-pinned, K = 1.
    assert effective_length_factor("pinned-pinned") == 1.0


def test_unknown_end_condition_suggests_a_name() -> None:
    with pytest.raises(ValueError, match=r"ends: expected one of .* did you mean pinned-pinned"):
        effective_length_factor("pinned-pined")
    with pytest.raises(ValueError, match=r"basis: expected 'recommended' or 'theoretical'"):
        effective_length_factor("fixed-fixed", "design")


# --- arrays, result value, reserve factors ----------------------------------------------


@pytest.mark.parametrize("ndim", [1, 2, 3, 4])
def test_critical_load_broadcasts_and_matches_scalar_calls(ndim: int) -> None:
    rng = np.random.default_rng(11)
    shape = (3, 2, 4, 2)[:ndim]
    od = rng.uniform(12.0, 40.0, size=shape[-1:])  # one size per rod (last axis)
    wall = od * 0.06
    length = rng.uniform(100.0, 1500.0, size=shape)  # poses x cases x rods
    area, inertia = tube_area_mm2(od, wall), tube_second_moment_mm4(od, wall)
    loads = critical_load_N(area, inertia, length, 1.0, 205e3, 435.0)
    assert loads.shape == shape
    for index in np.ndindex(shape):
        rod = index[-1]
        ref = analyse_column(Section.tube(od[rod], wall[rod]), length[index], 205e3, 435.0)
        assert loads[index] == pytest.approx(ref.critical_load_N, rel=1e-12)


def test_column_result_is_frozen_and_consistent() -> None:
    result = analyse_column(Section.tube(25.0, 1.5), 500.0, 205e3, 435.0, k=1.0)
    assert isinstance(result, ColumnResult)
    assert result.radius_of_gyration_mm == pytest.approx(
        math.sqrt(result.second_moment_mm4 / result.area_mm2)
    )
    assert result.slenderness == pytest.approx(500.0 / result.radius_of_gyration_mm)
    with pytest.raises(AttributeError):
        result.k = 2.0  # type: ignore[misc]


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: critical_load_N(100.0, 1e4, -5.0, 1.0, 2e5, 300.0), r"length_mm: expected a pos"),
        (lambda: critical_load_N(100.0, 1e4, 500.0, 0.0, 2e5, 300.0), r"k: expected a positive"),
        (lambda: transition_slenderness(2e5, 0.0), r"yield_MPa: expected a positive"),
        (lambda: slenderness_ratio(500.0, 1.0, np.nan), r"radius_of_gyration_mm: expected"),
        (lambda: euler_critical_load_N(1e4, 500.0, 1.0, -1.0), r"modulus_MPa: expected a pos"),
    ],
)
def test_bad_arguments_raise_value_errors_naming_them(call, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        call()


def test_reserve_factors_follow_their_definitions() -> None:
    # Definitions of DESIGN.md §5 item 7 (compression P_cr/|P|, tension S_y*A/P,
    # rod end rating/|P|, MS = RF/required - 1); force + tension, - compression.
    assert compression_reserve_factor(12000.0, -3000.0) == pytest.approx(4.0)
    assert compression_reserve_factor(12000.0, 3000.0) == np.inf
    assert tension_capacity_N(100.0, 400.0) == pytest.approx(40000.0)
    assert tension_reserve_factor(100.0, 400.0, 8000.0) == pytest.approx(5.0)
    assert tension_reserve_factor(100.0, 400.0, -8000.0) == np.inf
    forces = np.array([-3000.0, 0.0, 8000.0])
    np.testing.assert_allclose(
        member_reserve_factor(forces, 12000.0, 100.0, 400.0), [4.0, np.inf, 5.0]
    )
    np.testing.assert_allclose(rod_end_reserve_factor(24000.0, forces), [8.0, np.inf, 3.0])
    assert margin_of_safety(4.5, 3.0) == pytest.approx(0.5)
    assert margin_of_safety(2.4, 3.0) == pytest.approx(-0.2)


# --- properties -------------------------------------------------------------------------

moduli = st.floats(40e3, 250e3)
strengths = st.floats(150.0, 1200.0)


@given(
    od=st.floats(6.0, 60.0),
    ratio=st.floats(0.03, 0.49),
    l1=st.floats(20.0, 3000.0),
    l2=st.floats(20.0, 3000.0),
    k=st.floats(0.5, 2.1),
    e=moduli,
    sy=strengths,
)
def test_longer_column_never_carries_more(od, ratio, l1, l2, k, e, sy) -> None:
    short, long_ = sorted((l1, l2))
    wall = od * ratio
    area, inertia = tube_area_mm2(od, wall), tube_second_moment_mm4(od, wall)
    p_short = critical_load_N(area, inertia, short, k, e, sy)
    p_long = critical_load_N(area, inertia, long_, k, e, sy)
    assert p_long <= p_short * (1 + 1e-12)


@given(
    od=st.floats(6.0, 60.0),
    r1=st.floats(0.02, 0.5),
    r2=st.floats(0.02, 0.5),
    length=st.floats(20.0, 3000.0),
    e=moduli,
    sy=strengths,
)
def test_thicker_wall_same_od_never_carries_less(od, r1, r2, length, e, sy) -> None:
    thin, thick = sorted((r1 * od, r2 * od))
    p_thin = critical_load_N(
        tube_area_mm2(od, thin), tube_second_moment_mm4(od, thin), length, 1.0, e, sy
    )
    p_thick = critical_load_N(
        tube_area_mm2(od, thick), tube_second_moment_mm4(od, thick), length, 1.0, e, sy
    )
    assert p_thick >= p_thin * (1 - 1e-12)


@given(od=st.floats(6.0, 60.0), ratio=st.floats(0.03, 0.5), e=moduli, sy=strengths)
def test_euler_and_johnson_meet_at_the_transition(od, ratio, e, sy) -> None:
    wall = od * ratio
    area, inertia = tube_area_mm2(od, wall), tube_second_moment_mm4(od, wall)
    r = math.sqrt(inertia / area)
    lam_t = float(transition_slenderness(e, sy))
    length_t = lam_t * r
    euler = euler_critical_load_N(inertia, length_t, 1.0, e)
    johnson = johnson_critical_load_N(area, lam_t, e, sy)
    # Both equal half the squash load at the transition (Shigley 9th ed. §4-13).
    assert euler == pytest.approx(area * sy / 2, rel=1e-9)
    assert johnson == pytest.approx(area * sy / 2, rel=1e-9)
    below = critical_load_N(area, inertia, length_t * (1 - 1e-9), 1.0, e, sy)
    above = critical_load_N(area, inertia, length_t * (1 + 1e-9), 1.0, e, sy)
    assert below == pytest.approx(above, rel=1e-7)
    assert below >= above
