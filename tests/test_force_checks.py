"""The force checks (``member-force``, ``sprung-leakage``, ``line-of-action`` with the
resultant on each upright) against hand-solved fixtures and the invented examples.

Fixtures are invented (tests/designs.py); the hand solution of the lever route is
derived in tests/test_statics.py::test_lever_route_by_hand and repeated briefly here.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from designs import (
    EXAMPLES,
    SideChain,
    load_cases_text,
    parse,
    replace_once,
    side_chain_text,
    splayed_struts_text,
)
from plumbrod.mechanics.analysis import Analysis, analyse
from plumbrod.verdict.checks import (
    WARN_FRACTION,
    check_line_of_action,
    check_member_force,
    check_sprung_leakage,
)

W_N = 1000.0
VERTICAL_ONLY = {"hand": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"wing": (0.0, 0.0, -W_N)}}}
"""1000 N straight down at the wing's centre of pressure; 1 + bump_g = 0 takes the
weights out (DESIGN §6), so the hand solution holds exactly."""


def _lever(
    b_mm: float = 100.0, *, rated: tuple[str, float] | None = None, limits: str = ""
) -> Analysis:
    """The side-view lever route (drive arm a = 80 mm, hanger arm ``b_mm``) at the design
    pose, ±0.001 mm of travel around it, under :data:`VERTICAL_ONLY`.

    Hand solution (common practice, no source; derived in test_statics.py): drive rod
    −W·b/a, hanger +W, heave leakage W·(b/a − 1), i.e. a share b/a − 1 of the load.
    """
    chain = SideChain(
        rocker_hanger=(b_mm, 580.0),
        element_hanger=(b_mm, 200.0),
        travel_mm=(-1e-3, 1e-3),
        travel_steps=3,
    )
    text = side_chain_text(chain, body_sweeps=False)
    if rated is not None:
        rod, rating = rated
        text = replace_once(
            text, f"[rods.{rod}]\n", f"[rods.{rod}]\nrod_end_rating_N = {rating!r}\n"
        )
    text += load_cases_text(VERTICAL_ONLY)
    if limits:
        text += f"\n[limits]\n{limits}\n"
    design, _ = parse(text, "lever")
    return analyse(design)


# --- member-force -------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("rod", "hand_N", "rating_N", "status"),
    [
        ("drive", -1250.0, 2500.0, "pass"),  # 50 % of the rating
        ("drive", -1250.0, 1500.0, "warn"),  # 83 %: above the warning fraction
        ("drive", -1250.0, 1200.0, "fail"),  # 104 %
        ("hanger", 1000.0, 1300.0, "pass"),  # 77 %
        ("hanger", 1000.0, 990.0, "fail"),  # 101 %
    ],
)
def test_member_force_fails_above_the_rod_end_rating(
    rod: str, hand_N: float, rating_N: float, status: str
) -> None:
    # Hand solution of the lever (common practice, no source): drive rod −W·b/a =
    # −1250 N (compression), hanger +W = +1000 N. A rod end is overloaded when the
    # force's magnitude exceeds its rated load (common practice, no source).
    check = check_member_force(_lever(rated=(rod, rating_N)))
    assert check.id == "member-force"
    assert check.status == status
    assert check.limit == rating_N
    assert check.value == pytest.approx(hand_N, abs=0.05)  # ±0.001 mm of travel
    assert f"rod '{rod}'" in check.where
    used = abs(hand_N) / rating_N
    assert (used > 1.0) == (status == "fail")
    assert (WARN_FRACTION < used <= 1.0) == (status == "warn")


def test_member_force_without_a_rating_reports_the_largest_force() -> None:
    # Hand solution as above: the largest magnitude is the drive rod's −1250 N; the
    # guides carry ±W·(200 − 100)/90 = ±1111.1 N.
    check = check_member_force(_lever())
    assert check.status == "pass"
    assert check.limit is None
    assert check.value == pytest.approx(-1250.0, abs=0.05)
    assert "rod 'drive'" in check.where
    assert "+1111.1 N" in check.detail  # the largest tension, the lower guide


# --- sprung-leakage ------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("b_mm", "limits", "status"),
    [
        (100.0, "", "fail"),  # share 0.25 against the default 0.05
        (100.0, "sprung_leakage = 0.3", "warn"),  # 83 % of the limit
        (100.0, "sprung_leakage = 0.5", "pass"),
        (120.0, "sprung_leakage = 0.4", "fail"),  # share 0.5
        (80.0, "", "pass"),  # equal arms: R = 1, nothing leaks
    ],
)
def test_sprung_leakage_against_the_hand_share(b_mm: float, limits: str, status: str) -> None:
    # Hand solution (common practice, no source; derived in test_statics.py): the lever
    # pivot passes W·(b/a − 1) into the chassis, a share |b/a − 1| of the load; by
    # virtual work the same share is |1 − R| with route ratio R = b/a.
    a_mm = 80.0
    check = check_sprung_leakage(_lever(b_mm, limits=limits))
    assert check.id == "sprung-leakage"
    share = abs(b_mm / a_mm - 1.0)
    assert check.value == pytest.approx(share, abs=1e-4)
    assert check.status == status
    assert "agree within" in check.detail  # direct and virtual work agree


@pytest.mark.parametrize(
    ("stem", "status"),
    [
        ("failing_short_lever", "fail"),
        ("hillclimb_splitter", "pass"),
    ],
)
def test_sprung_leakage_on_the_examples(stem: str, status: str) -> None:
    # The short rocker arm moves the splitter about 80 % of the wheel travel, so about
    # a fifth of the load leaks (|1 − R| by virtual work, common practice, no source);
    # the bundled example's route ratio stays within 1 ± 0.05 and so does its leakage.
    path = next(p for p in EXAMPLES if p.stem == stem)
    design, _ = parse(path.read_text(encoding="utf-8"), stem)
    analysis = analyse(design)
    check = check_sprung_leakage(analysis)
    assert check.status == status
    limit = design.limits.sprung_leakage
    assert check.limit == limit == 0.05
    ratio = analysis.figures["travel"].route_ratio
    worst_ratio_gap = max(float(np.abs(1.0 - r).max()) for r in ratio.values())
    if status == "fail":
        assert check.value > limit
        assert worst_ratio_gap > 0.15  # the route ratio is far from 1
    else:
        assert check.value <= WARN_FRACTION * limit
        assert worst_ratio_gap < 0.05


# --- line-of-action: the resultant on the upright ----------------------------------------


def _splayed(splay_deg: float, limits: str = "") -> Analysis:
    cases = {"hand": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"wing": (0.0, 0.0, -2000.0)}}}
    design, _ = parse(
        splayed_struts_text(splay_deg, limits=limits) + load_cases_text(cases), "splayed struts"
    )
    return analyse(design)


def _hand_resultant(splay_deg: float, w: float = 2000.0) -> np.ndarray:
    """Force (x, z) the two struts put on the upright at the design pose, by hand.

    Element equilibrium (common practice, no source): every pickup and the load sit at
    z = 200 mm, so about (0, 200) only the vertical forces have moments, M = −x·F_z.
    Strut pull directions from the element towards the upright: (±t, 300)/L with
    t = 300·tan(splay); the guide pulls along +x towards the chassis.
    """
    t = 300.0 * math.tan(math.radians(splay_deg))
    length = math.hypot(t, 300.0)
    u_rear, u_front = np.array([t, 300.0]) / length, np.array([-t, 300.0]) / length
    x_rear, x_front, x_load = -100.0 - t, 100.0 + t, 400.0
    a = np.array(
        [
            [u_rear[0], u_front[0], 1.0],
            [u_rear[1], u_front[1], 0.0],
            [-x_rear * u_rear[1], -x_front * u_front[1], 0.0],
        ]
    )
    rhs = np.array([0.0, w, -x_load * w])  # ΣF_x, ΣF_z and ΣM of the rods = −(the load's)
    t_rear, t_front, _ = np.linalg.solve(a, rhs)
    return -(t_rear * u_rear + t_front * u_front)  # tension pulls the upright down


def _resultant_angles_deg(analysis: Analysis) -> np.ndarray:
    out = []
    for st in analysis.statics.values():
        for force in st.corner_force_N.values():
            size = np.linalg.norm(force, axis=-1)
            out.append(np.degrees(np.arccos(np.abs(force[..., 2]) / size)).ravel())
    return np.concatenate(out)


def test_line_of_action_includes_the_resultant_on_the_upright() -> None:
    # Struts 2° from vertical, but one pulls and one pushes: their resultant on the
    # upright leans atan(T_guide/W) ≈ 7.2° (hand solution above; common practice, no
    # source). DESIGN §5 item 3 checks the resultant as well as the rods.
    analysis = _splayed(2.0)
    st = analysis.statics["travel"]
    hand = _hand_resultant(2.0)
    hand_angle = math.degrees(math.atan2(abs(hand[0]), abs(hand[1])))
    assert 7.0 < hand_angle < 7.4
    # both strut routes reach one upright: their resultant on it is the hand figure,
    # and each route's own force is its strut's
    (force,) = st.corner_force_N.values()
    np.testing.assert_allclose(force[1, 0, [0, 2]], hand, rtol=0.0, atol=1e-9 * 2000.0)
    assert force[1, 0, 1] == 0.0
    np.testing.assert_allclose(
        sum(st.upright_force_N.values())[1, 0], force[1, 0], rtol=0.0, atol=1e-9 * 2000.0
    )
    rods = max(float(a.max()) for a in analysis.figures["travel"].line_of_action_deg.values())
    assert rods == pytest.approx(2.0, abs=0.05)  # every rod alone is within 3°
    check = check_line_of_action(analysis)
    assert check.status == "fail"
    assert check.value == pytest.approx(float(_resultant_angles_deg(analysis).max()), rel=1e-9)
    assert check.value >= hand_angle
    assert "resultant force" in check.where
    relaxed = check_line_of_action(_splayed(2.0, "line_of_action_deg = 10.0"))
    assert relaxed.status == "pass"
    assert relaxed.value == pytest.approx(check.value, rel=1e-12)


def test_line_of_action_passes_when_the_struts_and_their_resultant_are_vertical() -> None:
    # Vertical struts under a vertical load carry it vertically; the horizontal guide
    # carries nothing (hand solution above with t = 0).
    analysis = _splayed(0.0)
    np.testing.assert_allclose(_hand_resultant(0.0), [0.0, -2000.0], atol=1e-9)
    check = check_line_of_action(analysis)
    assert check.status == "pass"
    assert check.value == pytest.approx(0.0, abs=0.05)  # ±10 mm of travel tilts the rods
