"""What the springs carry (DESIGN §5a): spring-load changes per axle and corner, the
bolted comparison, the floor, the virtual-work cross-check and the tyre-load sum,
against hand statics of invented fixtures (tests/spring_designs.py) and on every
example.
"""

from __future__ import annotations

import numpy as np
import pytest

from designs import EXAMPLES, parse
from plumbrod.design.car import car_layout
from plumbrod.design.loading import parse_design
from plumbrod.errors import DesignFileError
from plumbrod.mechanics.analysis import Analysis, analyse
from plumbrod.mechanics.springs import SpringLoads
from spring_designs import hand_case, overhang_text, roll_text, two_axle_text

F_N = 1000.0
TOL_N = 1e-6  # the hand cases are exact up to round-off (travel ±0.001 mm)


def _springs(text: str, source: str) -> tuple[Analysis, SpringLoads]:
    design, _ = parse(text, source)
    analysis = analyse(design)
    assert analysis.springs is not None
    return analysis, analysis.springs


def _design_pose(springs: SpringLoads) -> dict[str, np.ndarray]:
    d = springs.design
    return {
        "axle": d.axle_N[0, 0, 0],
        "bolted": d.axle_bolted_N[0, 0, 0],
        "floor": d.axle_floor_N[0, 0, 0],
        "vw": d.axle_virtual_work_N[0, 0, 0],
        "gain": d.tyre_gain_N[0, 0],
    }


# --- one axle: the overhang -------------------------------------------------------------


@pytest.mark.parametrize(("a_mm", "wheelbase_mm"), [(400.0, 2000.0), (600.0, 2300.0)])
def test_overhang_one_axle_route(a_mm: float, wheelbase_mm: float) -> None:
    # source: statics of a beam on two supports with an overhang (reactions from
    # ΣM = 0 about each support: Gere, Mechanics of Materials, or Hibbeler, Engineering
    # Mechanics: Statics, any edition; from memory, not checked against a copy). The
    # route carries F straight to the front wheel; the guides put the couple F·a into
    # the chassis, which stands on the axles L apart: rear −F·a/L, front +F·a/L.
    # Bolted, the chassis carries F itself a ahead of the front support:
    # front F·(1 + a/L), rear −F·a/L. No route on one axle can avoid the couple:
    # floor = share = a/L.
    text = overhang_text(a_mm, wheelbase_mm) + hand_case("wing", (0.0, 0.0, -F_N))
    _, springs = _springs(text, "overhang")
    got = _design_pose(springs)
    couple = F_N * a_mm / wheelbase_mm
    np.testing.assert_allclose(got["axle"], [couple, -couple], atol=TOL_N)
    np.testing.assert_allclose(got["bolted"], [F_N + couple, -couple], atol=TOL_N)
    np.testing.assert_allclose(got["floor"], [couple, -couple], atol=TOL_N)
    np.testing.assert_allclose(got["vw"], got["axle"], atol=TOL_N)
    es = springs.per_element["wing"]
    assert es.share == pytest.approx(a_mm / wheelbase_mm, abs=1e-9)
    assert es.floor == pytest.approx(a_mm / wheelbase_mm, abs=1e-9)
    assert es.share_bolted == pytest.approx(1.0 + a_mm / wheelbase_mm, abs=1e-9)
    assert es.avoidable == pytest.approx(0.0, abs=1e-9)
    assert es.lever_mm == pytest.approx(a_mm, abs=1e-9)


def test_design_worked_example() -> None:
    # source: DESIGN.md §5a worked example (common practice, hand-checked): 1,000 N,
    # 400 mm ahead of the front axle, 2,000 mm wheelbase, routed with ratio 1 to the
    # front uprights: front +200 N, rear −200 N (share 0.2 = the floor); bolted: front
    # +1,200 N, rear −200 N (share 1.2).
    text = overhang_text(400.0, 2000.0) + hand_case("wing", (0.0, 0.0, -1000.0))
    _, springs = _springs(text, "worked example")
    got = _design_pose(springs)
    np.testing.assert_allclose(got["axle"], [200.0, -200.0], atol=1e-6)
    np.testing.assert_allclose(got["bolted"], [1200.0, -200.0], atol=1e-6)
    es = springs.per_element["wing"]
    assert es.share == pytest.approx(0.2, abs=1e-9)
    assert es.floor == pytest.approx(0.2, abs=1e-9)
    assert es.share_bolted == pytest.approx(1.2, abs=1e-9)


def test_overhang_without_a_wheelbase_reports_what_it_can() -> None:
    # The couple F·a (N·m) is known without the wheelbase; sharing it is not (issue 9 §1).
    text = overhang_text(400.0, None) + hand_case("wing", (0.0, 0.0, -F_N))
    _, springs = _springs(text, "no wheelbase")
    assert springs.layout.needs_wheelbase
    es = springs.per_element["wing"]
    assert es.share is None and es.floor is None and es.share_bolted is None
    assert es.avoidable == pytest.approx(0.0, abs=1e-9)  # the vertical part is known
    assert springs.design.floor_moment_Nm[0, 0, 0] == pytest.approx(F_N * 0.4, abs=1e-9)
    assert np.all(np.isnan(springs.design.axle_N))


# --- two axles: the lever rule -------------------------------------------------------------


@pytest.mark.parametrize("cp_x_mm", [-500.0, -1200.0, -2000.0])
def test_routes_to_both_axles_split_by_the_lever_rule(cp_x_mm: float) -> None:
    # source: lever rule, reactions of a simple beam (Gere or Hibbeler, any edition;
    # from memory): F at b behind the front support of a span L gives front F·(L − b)/L
    # and rear F·b/L. Hung straight above both wheel centres, the routes deliver that
    # to the tyres and the springs carry nothing: floor 0, share 0.
    wb = 2400.0
    text = two_axle_text(wb, cp_x_mm) + hand_case("tray", (0.0, 0.0, -F_N))
    _, springs = _springs(text, "two axles")
    got = _design_pose(springs)
    b = -cp_x_mm
    np.testing.assert_allclose(got["axle"], [0.0, 0.0], atol=TOL_N)
    np.testing.assert_allclose(got["floor"], [0.0, 0.0], atol=0.0)
    np.testing.assert_allclose(got["gain"], [F_N * (wb - b) / wb, F_N * b / wb], atol=TOL_N)
    # bolted: the chassis carries F itself, shared by the same rule
    np.testing.assert_allclose(got["bolted"], [F_N * (wb - b) / wb, F_N * b / wb], atol=TOL_N)
    es = springs.per_element["tray"]
    assert es.floor == 0.0
    assert es.axles == ("front", "rear")
    assert es.share == pytest.approx(0.0, abs=1e-9)


def test_hangers_off_the_wheel_centres_add_an_avoidable_couple() -> None:
    # Statics (common practice, no source): hangers 100 mm ahead of each wheel centre
    # put F_f·100 + F_r·100 = F·100 N·mm into the chassis through the uprights' guides
    # (a moment the slider carries); on a wheelbase L the springs carry F·100/L,
    # front +, rear −, none of it forced (floor 0).
    wb = 2400.0
    text = two_axle_text(wb, -1200.0, hanger_offset_mm=100.0) + hand_case("tray", (0.0, 0.0, -F_N))
    _, springs = _springs(text, "offset hangers")
    got = _design_pose(springs)
    couple = F_N * 100.0 / wb
    np.testing.assert_allclose(got["axle"], [couple, -couple], atol=TOL_N)
    es = springs.per_element["tray"]
    assert es.avoidable == pytest.approx(100.0 / wb, abs=1e-9)


# --- roll -------------------------------------------------------------------------------


@pytest.mark.parametrize(("share", "track_rear_mm"), [(0.5, 1400.0), (0.6, 1300.0)])
def test_roll_moment_split_by_roll_stiffness_and_tracks(share: float, track_rear_mm: float) -> None:
    # source: lateral load transfer, each axle's change = its roll-stiffness share of the
    # roll moment over its track (Milliken & Milliken, Race Car Vehicle Dynamics ch. 18;
    # Gillespie, Fundamentals of Vehicle Dynamics: from memory, neither read for this
    # test). Here the guides put the roll couple F·c into the chassis: front springs
    # ∓share·F·c/t_f (left less compressed), rear ∓(1 − share)·F·c/t_r; no pitch, so
    # no change between the axles and no wheelbase is needed in a front view.
    c = 250.0
    text = roll_text(c, share, track_rear_mm) + hand_case("wing", (0.0, 0.0, -F_N))
    _, springs = _springs(text, "roll")
    assert springs.spring_names == ("front_left", "front_right", "rear_left", "rear_right")
    d = springs.design
    moment = F_N * c  # N·mm, + lifts the left side
    front = share * moment / 1400.0
    rear = (1.0 - share) * moment / track_rear_mm
    np.testing.assert_allclose(d.spring_N[0, 0, 0], [-front, front, -rear, rear], atol=TOL_N)
    np.testing.assert_allclose(d.spring_virtual_work_N[0, 0, 0], d.spring_N[0, 0, 0], atol=TOL_N)
    np.testing.assert_allclose(d.axle_N[0, 0, 0], [0.0, 0.0], atol=TOL_N)
    # Newton: the tyres gain the whole load: the left front gets F from the route
    gain = d.tyre_gain_N[0, 0]
    np.testing.assert_allclose(gain, [F_N - front, front, -rear, rear], atol=TOL_N)
    assert gain.sum() == pytest.approx(F_N, abs=TOL_N)


# --- every example ------------------------------------------------------------------------


@pytest.fixture(scope="module", params=EXAMPLES, ids=[p.stem for p in EXAMPLES])
def example(request: pytest.FixtureRequest) -> Analysis:
    design, _ = parse(request.param.read_text(encoding="utf-8"), request.param.stem)
    return analyse(design)


def test_virtual_work_agrees_with_the_closed_form_on_every_example(example: Analysis) -> None:
    # Virtual work (a virtual heave, roll and pitch of the chassis on its springs)
    # against the closed form of DESIGN §5a, relative to the load: within 1e-9
    # (issue 9 §2; the principle of virtual work, any statics text).
    springs = example.springs
    assert springs is not None
    for s in (*springs.sweeps.values(), springs.design):
        scale = np.abs(s.vertical_load_N)[..., None]
        assert np.all(scale > 1.0)
        gap = np.abs(s.spring_N - s.spring_virtual_work_N) / scale
        assert np.all(np.isfinite(gap)), s.sweep
        assert gap.max() < 1e-9, s.sweep
        assert np.abs(s.spring_N).max() > 1.0  # something to compare


def test_tyre_load_gains_sum_to_the_load_on_every_example(example: Analysis) -> None:
    # Newton's first law for the whole car: what the four tyres gain from the elements
    # (route delivery + spring change) equals the elements' vertical load, at every
    # pose and load case.
    springs = example.springs
    assert springs is not None
    for s in (*springs.sweeps.values(), springs.design):
        total = -s.vertical_load_N.sum(axis=2)  # (B, K)
        np.testing.assert_allclose(s.tyre_gain_N.sum(axis=2), total, rtol=1e-9)


def test_axle_changes_are_the_sum_of_their_springs(example: Analysis) -> None:
    springs = example.springs
    assert springs is not None
    axle = np.array(springs.spring_axle)
    for s in springs.sweeps.values():
        for a in (0, 1):
            np.testing.assert_allclose(
                s.spring_N[..., axle == a].sum(axis=-1), s.axle_N[..., a], atol=1e-9
            )


# --- [car] --------------------------------------------------------------------------------


def _with_car(text: str, car: str) -> str:
    return text + f"\n[car]\n{car}\n"


def test_wheelbase_from_the_corners_and_the_1_mm_agreement() -> None:
    base = two_axle_text(2400.0, -1000.0)
    layout = car_layout(parse_design(base, "t"))
    assert layout.wheelbase_mm == pytest.approx(2400.0)
    assert layout.wheelbase_from == "corners"
    assert car_layout(parse_design(_with_car(base, "wheelbase_mm = 2400.9"), "t"))
    with pytest.raises(DesignFileError) as err:
        parse_design(_with_car(base, "wheelbase_mm = 2401.5"), "t.toml")
    assert err.value.key == "car.wheelbase_mm"
    assert "2400.0 mm apart" in str(err.value)


@pytest.mark.parametrize(
    ("car", "key", "problem"),
    [
        ("roll_stiffness_front_share = 1.2", "car.roll_stiffness_front_share", "from 0 to 1"),
        ("wheelbase_mm = -5.0", "car.wheelbase_mm", "positive"),
        ("wheel_rate_front_N_per_mm = 0.0", "car.wheel_rate_front_N_per_mm", "positive"),
        ("whelbase_mm = 2000.0", "car.whelbase_mm", "did you mean 'wheelbase_mm'"),
    ],
)
def test_bad_car_values_name_the_key(car: str, key: str, problem: str) -> None:
    with pytest.raises(DesignFileError) as err:
        parse_design(_with_car(overhang_text(400.0, None), car), "t.toml")
    assert err.value.key == key
    assert problem in str(err.value)


def test_tracks_and_axles_from_the_corners() -> None:
    path = next(p for p in EXAMPLES if p.stem == "student_rear_wing")
    layout = car_layout(parse_design(path.read_text(encoding="utf-8"), "wing"))
    # the rear corners (wheel centres at y = ±600 mm) make the rear axle
    assert layout.rear.corners == ("rear_left", "rear_right")
    assert layout.rear.track_mm == pytest.approx(1200.0)
    assert layout.front.corners == ()
    assert layout.front.track_mm == pytest.approx(1240.0)  # given in [car]
    assert layout.front.x_mm == pytest.approx(-1550.0 + 1550.0)
    assert [s.name for s in layout.front.springs] == ["front_left", "front_right"]


def test_corners_on_three_axles_are_bad_input() -> None:
    text = two_axle_text(2400.0, -1000.0).replace(
        "[elements.tray]",
        "[corners.middle]\nwheel_centre_mm = [-1200.0, 300.0]\ntyre_radius_mm = 300.0\n"
        'tyre_width_mm = 240.0\nsuspension = "slider"\n\n[elements.tray]',
    )
    with pytest.raises(DesignFileError) as err:
        parse_design(text, "t.toml")
    assert err.value.key == "corners"
    assert "3 axles" in str(err.value)


def test_motion_centre_defaults_to_mid_wheelbase_on_the_ground() -> None:
    # issue 9 §5: with a wheelbase the default pitch and roll centre is mid-wheelbase
    text = overhang_text(400.0, 2000.0)
    assert parse_design(text, "t").sweeps.motion_centre_mm == (-1000.0, 0.0, 0.0)
    assert parse_design(overhang_text(400.0, None), "t").sweeps.motion_centre_mm == (
        0.0,
        0.0,
        0.0,
    )
    given = text.replace(
        "[sweeps.travel]", "[sweeps]\nmotion_centre_mm = [50.0, 0.0]\n\n[sweeps.travel]"
    )
    assert parse_design(given, "t").sweeps.motion_centre_mm == (50.0, 0.0, 0.0)


# --- the names other programs read (issue 9 §2: keep these names) ----------------------


def test_json_springs_object_and_csv_columns_on_the_splitter() -> None:
    import json

    from plumbrod.outputs.report import as_json
    from plumbrod.outputs.table import pose_table
    from plumbrod.verdict.findings import review

    path = next(p for p in EXAMPLES if p.stem == "hillclimb_splitter")
    findings = review(parse_design(path.read_text(encoding="utf-8"), str(path)))
    assert findings.springs is findings.analysis.springs  # for the figures
    doc = json.loads(as_json(findings))
    springs = doc["springs"]
    cases = doc["load_cases"]
    assert cases == ["top-speed", "top-speed-bump-3g"]
    s = findings.analysis.springs
    assert s is not None
    for a, axle in enumerate(("front", "rear")):
        entry = springs["axles"][axle]
        for case in cases:
            k = cases.index(case)
            assert entry["design_pose"]["delta_N"][case] == pytest.approx(
                s.design.axle_N[0, k, 0, a], abs=1e-5
            )
            assert entry["design_pose"]["delta_bolted_N"][case] == pytest.approx(
                s.design.axle_bolted_N[0, k, 0, a], abs=1e-5
            )
            worst = entry["worst"]["delta_N"][case]
            assert abs(worst) >= abs(entry["design_pose"]["delta_N"][case]) - 1e-9
            assert "delta_bolted_N" in entry["worst"]
            # per corner, half the axle's change over the wheel rate, − = lower
            rate = {"front": 60.0, "rear": 70.0}[axle]
            assert entry["ride_height_change_mm"][case] == pytest.approx(
                -s.design.axle_N[0, k, 0, a] / 2.0 / rate, abs=1e-5
            )
            assert "ride_height_change_bolted_mm" in entry
    element = springs["elements"]["splitter"]
    assert set(element) >= {"share", "share_bolted", "floor", "avoidable"}
    assert element["floor"] <= element["share"] <= element["floor"] + element["avoidable"] + 1e-6
    assert element["share_bolted"] > 1.0  # bolted, the whole load and its couple
    assert springs["car"]["wheelbase_mm"] == 2300.0
    checks = {c["id"]: c for c in doc["checks"]}
    assert checks["sprung-leakage"]["value"] == pytest.approx(element["avoidable"], abs=1e-6)

    columns, _ = pose_table(findings.analysis)
    for case in cases:
        for name in (
            "front_axle/spring_delta_N",
            "rear_axle/spring_delta_N",
            "front_axle/spring_delta_bolted_N",
            "rear_axle/spring_delta_bolted_N",
            "front_left/spring_delta_N",
            "front_right/spring_delta_N",
            "rear_left/spring_delta_N",  # corners not in the design, by their usual names
            "rear_right/spring_delta_N",
            "splitter/spring_share",
            "splitter/spring_share_floor",
        ):
            assert f"{case}/{name}" in columns, name


def test_without_a_wheelbase_the_json_says_what_needs_it() -> None:
    import json

    from plumbrod.outputs.report import as_json
    from plumbrod.verdict.findings import review

    path = next(p for p in EXAMPLES if p.stem == "hillclimb_splitter")
    text = path.read_text(encoding="utf-8")
    start = text.index("[car]")
    end = text.index("\n[sweeps.travel]")
    findings = review(parse_design(text[:start] + text[end:], "no car"))
    doc = json.loads(as_json(findings))
    springs = doc["springs"]
    assert springs["needs"]
    assert springs["elements"]["splitter"]["share"] is None
    assert springs["axles"]["front"]["design_pose"]["delta_N"]["top-speed"] is None
    detail = next(c for c in doc["checks"] if c["id"] == "sprung-leakage")["detail"]
    assert "wheelbase_mm" in detail
