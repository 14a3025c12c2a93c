"""`plumbrod tradeoff`: the ride study of the bundled example, its bookkeeping, inputs,
outputs and exit codes.  The physics is tested in test_ride.py; here the study is held
to statics, Hooke's law and the quarter-car module it is built on."""

from __future__ import annotations

import csv
import io
import json
import math
from pathlib import Path

import pytest

from plumbrod.cli.main import main
from plumbrod.design.loading import parse_design
from plumbrod.mechanics.analysis import analyse
from plumbrod.mechanics.mass import mass_report
from plumbrod.mechanics.ride import QuarterCar, mean_squares
from plumbrod.mechanics.road import class_mean_m3, velocity_psd_m2_s
from plumbrod.verdict.tradeoff import study_tradeoff
from plumbrod.verdict.tradeoff_results import TradeoffStudy

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "examples" / "hillclimb_splitter.toml"
TEXT = EXAMPLE.read_text(encoding="utf-8")


def _study(text: str = TEXT) -> TradeoffStudy:
    analysis = analyse(parse_design(text, "example.toml"))
    return study_tradeoff(analysis, mass_report(analysis))


@pytest.fixture(scope="module")
def study() -> TradeoffStudy:
    return _study()


def _with(old: str, new: str) -> str:
    assert old in TEXT
    return TEXT.replace(old, new)


def test_example_front_axle_bookkeeping(study: TradeoffStudy) -> None:
    axle = study.axles["front"]
    assert list(study.axles) == ["front"]
    bolted, routed = axle.cases["bolted"], axle.cases["routed"]
    # statics of the car on its two axles (a beam on two supports, Gere or Hibbeler, any
    # edition; moments about the rear axle's ground line): the downforce F acts a = 600 mm
    # ahead of the front axle of a WB = 2300 mm car, the drag D at h = 70 mm above the
    # ground pitches the nose up: front share = (F·(WB + a) − D·h)/(WB·F)
    q = 0.5 * 1.225 * 50.0**2
    f, d = q * 0.6 * 1.2, q * 0.6 * 0.25
    assert axle.load_share == pytest.approx((f * 2900.0 - d * 70.0) / (2300.0 * f), rel=1e-9)
    # Newton: the tyres carry the same load either way; the route only moves it off the
    # springs
    assert routed.sprung_load_N + routed.unsprung_load_N == pytest.approx(
        bolted.sprung_load_N, rel=1e-9
    )
    assert bolted.unsprung_load_N == 0.0
    # the example's downforce: ½ρV²·S·C_L at 180 km/h (ρ 1.225, S 0.6 m², C_L 1.2)
    downforce = 0.5 * 1.225 * 50.0**2 * 0.6 * 1.2
    assert 2 * bolted.sprung_load_N == pytest.approx(downforce * axle.load_share, rel=1e-9)
    # the routed car carries the route's kinetic-equivalent mass at each corner
    assert routed.unsprung_mass_kg == pytest.approx(16.0 + axle.added_unsprung_kg)
    assert axle.added_unsprung_kg > 0.0


def test_example_uses_the_cars_wheel_rate(study: TradeoffStudy) -> None:
    bolted = study.axles["front"].cases["bolted"]
    assert bolted.rate_from == "given" and bolted.wheel_rate_N_per_mm == 60.0  # [car]
    # Hooke's law, spring and tyre in series: the body sinks S/k_s + S/k_t
    s = bolted.sprung_load_N
    assert bolted.ride_height_drop_mm[-1] == pytest.approx((s / 60e3 + s / 250e3) * 1e3)
    assert any("beyond the 8 mm budget" in note for note in study.notes)


def test_example_wheel_rates_meet_the_budget() -> None:
    # Hooke's law, spring and tyre in series: the bolted body sinks S/k_s + S/k_t; the
    # softest rate for a budget B is k_s = S/(B − S/k_t)
    study = _study(_with("wheel_rate_front_N_per_mm = 60.0\n", ""))
    axle = study.axles["front"]
    bolted, routed = axle.cases["bolted"], axle.cases["routed"]
    b, kt = 8e-3, 250e3
    s = bolted.sprung_load_N
    assert bolted.rate_from == "budget"
    assert bolted.wheel_rate_N_per_mm * 1e3 == pytest.approx(s / (b - s / kt), rel=1e-8)
    assert bolted.ride_height_drop_mm[-1] == pytest.approx(8.0, rel=1e-8)
    assert routed.ride_height_drop_mm[-1] <= 8.0 + 1e-9
    assert routed.wheel_rate_N_per_mm < bolted.wheel_rate_N_per_mm
    # the routed element follows the wheel by its route ratio R (near 1 here): it sinks by
    # R × the tyre's deflection + (1 − R) × the body's drop
    total = routed.sprung_load_N + routed.unsprung_load_N
    r = routed.follows_wheel
    assert r == pytest.approx(1.0, abs=0.05)
    tyre_mm = total / kt * 1e3
    assert routed.element_drop_mm[-1] == pytest.approx(
        r * tyre_mm + (1.0 - r) * routed.ride_height_drop_mm[-1], rel=1e-9
    )
    assert bolted.follows_wheel == 0.0


def test_example_figures_come_from_the_quarter_car(study: TradeoffStudy) -> None:
    for case in study.axles["front"].cases.values():
        v = study.speeds_kmh[-1] / 3.6
        for cls in study.road_classes:
            ms = mean_squares(case.car, velocity_psd_m2_s(class_mean_m3(cls), v))
            out = case.classes[cls]
            assert out["tyre_load_rms_N"][-1] == pytest.approx(math.sqrt(ms["tyre_load"]))
            assert out["travel_rms_mm"][-1] == pytest.approx(math.sqrt(ms["travel"]) * 1e3)
        # RMS ∝ √Gd(n0): each class is twice the RMS of the one before (ISO 8608)
        a, b = case.classes["A"]["tyre_load_rms_N"], case.classes["B"]["tyre_load_rms_N"]
        assert b[-1] / a[-1] == pytest.approx(2.0, rel=1e-12)


def test_example_verdict_sentence(study: TradeoffStudy) -> None:
    sentence = study.axles["front"].sentence
    assert sentence.startswith("on a class-A road the routed splitter holds its height")
    hr = study.axles["front"].cases["routed"].classes["A"]["element_height_rms_mm"][-1]
    assert f"±{hr:.1f} mm" in sentence
    assert "front wheel rate drop from" in sentence
    # what the added mass alone does: the routed unsprung mass on the bolted spring
    axle = study.axles["front"]
    b, r = axle.cases["bolted"], axle.cases["routed"]
    alone = QuarterCar(
        b.sprung_mass_kg,
        r.unsprung_mass_kg,
        b.wheel_rate_N_per_mm * 1e3,
        b.damper_N_s_per_mm * 1e3,
        250e3,
    )
    psd = velocity_psd_m2_s(class_mean_m3("A"), 50.0)
    rms = math.sqrt(mean_squares(alone, psd)["tyre_load"])
    assert axle.tyre_load_rms_mass_only_N == pytest.approx(rms, rel=1e-9)
    assert rms > b.classes["A"]["tyre_load_rms_N"][-1]  # more unsprung mass, more variation
    assert f"{rms / b.classes['A']['tyre_load_rms_N'][-1] - 1:+.0%} from the mass alone" in sentence


def test_command_writes_json_and_csv_with_the_published_names(tmp_path: Path) -> None:
    out_json, out_csv = tmp_path / "t.json", tmp_path / "t.csv"
    assert main(["tradeoff", str(EXAMPLE), "--json", str(out_json), "--csv", str(out_csv)]) == 0
    doc = json.loads(out_json.read_text())
    speeds = doc["speeds_kmh"]
    assert speeds[-1] == pytest.approx(180.0) and len(speeds) == 12
    for case in ("bolted", "routed"):
        node = doc["axles"]["front"][case]
        for key in (
            "tyre_load_rms_N",
            "element_height_rms_mm",
            "body_acceleration_rms_m_s2",
            "travel_rms_mm",
        ):
            assert len(node[key]) == len(speeds) and all(v > 0 for v in node[key])
        for key in (
            "wheel_rate_N_per_mm",
            "unsprung_mass_kg",
            "body_frequency_Hz",
            "wheel_hop_frequency_Hz",
        ):
            assert isinstance(node[key], float) and node[key] > 0
    rows = list(csv.DictReader(io.StringIO(out_csv.read_text())))
    assert len(rows) == 3 * 12  # classes A, B, C × speeds
    assert float(rows[11]["front/routed/tyre_load_rms_N"]) == pytest.approx(
        doc["axles"]["front"]["routed"]["tyre_load_rms_N"][-1], rel=1e-5
    )


def test_command_prints_json_and_text(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["tradeoff", str(EXAMPLE), "--json", "-"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["road_class"] == "A"
    assert main(["tradeoff", str(EXAMPLE)]) == 0
    text = capsys.readouterr().out
    assert "verdict: on a class-A road" in text
    assert "idealised linear quarter car" in text and "ban aero devices" in text


def test_plots_against_speed_and_trace(tmp_path: Path) -> None:
    assert main(["tradeoff", str(EXAMPLE), "--plots", str(tmp_path), "--trace"]) == 0
    for name in ("hillclimb_splitter-tradeoff-front.png", "hillclimb_splitter-tradeoff-trace.png"):
        assert (tmp_path / name).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def _bad(tmp_path: Path, text: str, capsys: pytest.CaptureFixture[str]) -> str:
    path = tmp_path / "d.toml"
    path.write_text(text)
    assert main(["tradeoff", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert "Traceback" not in err and len(err.splitlines()) == 1
    return err


def test_bad_inputs_name_the_key(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    head = TEXT.split("\n[tradeoff]")[0]
    assert "no [tradeoff] table" in _bad(tmp_path, head, capsys)
    err = _bad(tmp_path, _with("tyre_rate_N_per_mm = 250.0", ""), capsys)
    assert "tradeoff.tyre_rate_N_per_mm: missing key" in err
    err = _bad(tmp_path, _with("damping_ratio = 0.5", ""), capsys)
    assert "tradeoff.damping_ratio" in err
    err = _bad(
        tmp_path,
        _with("damping_ratio = 0.5", "damping_ratio = 0.5\ndamper_rate_N_s_per_mm = 2"),
        capsys,
    )
    assert "both" in err
    err = _bad(tmp_path, _with('road_classes = ["A", "B", "C"]', 'road_classes = ["Z"]'), capsys)
    assert "tradeoff.road_classes[0]" in err
    err = _bad(
        tmp_path, _with("ride_height_budget_mm = 8.0", "ride_height_budget_mm = 2.0"), capsys
    )
    assert "tradeoff.ride_height_budget_mm" in err and "tyres alone" in err
    err = _bad(tmp_path, _with("unsprung_mass_kg = 16.0", ""), capsys)
    assert "corners.front_left.unsprung_mass_kg" in err
    err = _bad(tmp_path, _with("corner_sprung_mass_front_kg", "corner_sprung_mas_front_kg"), capsys)
    assert "unknown key" in err
    assert main(["tradeoff", str(EXAMPLE), "--trace"]) == 2


def test_aero_stiffness_lowers_the_body_frequency_and_can_go_unstable(
    tmp_path: Path,
) -> None:
    # an aero stiffness is a negative spring: more downforce nearer the road softens the
    # mass that carries the element; beyond the springs in series it diverges
    anchor = "target_ride_frequency_Hz = 2.0"  # a line of [tradeoff] only
    soft = _study(_with(anchor, f"{anchor}\ndownforce_per_mm = 20.0"))
    plain = _study()
    for case in ("bolted", "routed"):
        assert soft.axles["front"].cases[case].stable.all()
        assert (
            soft.axles["front"].cases[case].ride_height_drop_mm[-1]
            >= plain.axles["front"].cases[case].ride_height_drop_mm[-1] - 1e-9
        )
    text = _with(
        anchor,
        f"{anchor}\ndownforce_per_mm = 100.0",  # on the [car] front rate of 60 N/mm
    )
    path = tmp_path / "unstable.toml"
    path.write_text(text)
    out = tmp_path / "u.json"
    assert main(["tradeoff", str(path), "--json", str(out)]) == 0
    doc = json.loads(out.read_text())
    bolted = doc["axles"]["front"]["bolted"]
    assert bolted["stable"][-1] is False and bolted["tyre_load_rms_N"][-1] is None
    assert "unstable" in doc["axles"]["front"]["verdict"]
    # the series rate of 60 N/mm and 250 N/mm is 48.4 N/mm; the body carries 100 N/mm ×
    # 1.26 / 2 = 63 N/mm at top speed, growing with V²: divergence above 158 km/h
    first = bolted["stable"].index(False)
    assert doc["speeds_kmh"][first - 1] < 158.0 < doc["speeds_kmh"][first]
    assert all(doc["axles"]["front"]["routed"]["stable"])


def test_demo_prints_the_verdict(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["demo", "--output-dir", str(tmp_path)]) == 0
    assert "on a class-A road the routed splitter" in capsys.readouterr().out


@pytest.mark.parametrize(
    "name", ["hillclimb_splitter", "failing_short_lever", "student_rear_wing", "planar_undertray"]
)
def test_every_example_runs(name: str, tmp_path: Path) -> None:
    out = tmp_path / "t.json"
    assert main(["tradeoff", str(ROOT / "examples" / f"{name}.toml"), "--json", str(out)]) == 0
    doc = json.loads(out.read_text())
    shares = [a["load_share"] for a in doc["axles"].values()]
    if len(shares) == 2:
        # lever rule, both axles in the design: the shares add up to the whole load
        assert sum(shares) == pytest.approx(1.0, rel=1e-12)
    for axle in doc["axles"].values():
        # the routed element rides on the wheel, the bolted one on the body
        assert (
            axle["routed"]["element_height_rms_mm"][-1]
            < axle["bolted"]["element_height_rms_mm"][-1]
        )
        assert axle["verdict"].startswith("on a class-A road")


def test_probabilities_are_the_gaussian_tails(study: TradeoffStudy) -> None:
    # Gaussian response (linear car, Gaussian road): P(unload) = Φ(−F_static/σ_F) with
    # F_static = (m_s + m_u)·g + the downforce on the tyre; P(bump stop) = Φ(−(travel to
    # the stop − static compression)/σ_travel); reference: scipy.stats.norm.sf
    from scipy import stats

    axle = study.axles["front"]
    b = axle.cases["bolted"]
    out = b.classes["B"]
    f_static = (110.0 + 16.0) * 9.80665 + b.sprung_load_N
    sigma = out["tyre_load_rms_N"][-1]
    assert out["unloading_probability"][-1] == pytest.approx(
        float(stats.norm.sf(f_static / sigma)), rel=1e-9
    )
    margin = axle.bump_travel_mm - b.spring_compression_mm[-1]
    assert axle.bump_travel_mm == 40.0  # the travel sweep's bump end
    assert out["bump_stop_probability"][-1] == pytest.approx(
        float(stats.norm.sf(margin / out["travel_rms_mm"][-1])), rel=1e-9
    )


def test_other_ways_to_give_masses_and_damping() -> None:
    # the car's sprung mass and its front share give the same corner mass; a damper rate
    # instead of a ratio keeps the damper the same in both cases
    total = _study(
        _with(
            "corner_sprung_mass_front_kg = 110.0   # the front axle's sprung mass per corner\n"
            "corner_sprung_mass_rear_kg = 135.0",
            "sprung_mass_kg = 490.0\nsprung_mass_front_share = 0.4489795918367347",
        )
    )
    plain = _study()
    a, b = total.axles["front"].cases["routed"], plain.axles["front"].cases["routed"]
    assert a.sprung_mass_kg == pytest.approx(110.0, rel=1e-12)
    assert a.classes["A"]["tyre_load_rms_N"][-1] == pytest.approx(
        b.classes["A"]["tyre_load_rms_N"][-1], rel=1e-9
    )
    rate = _study(_with("damping_ratio = 0.5", "damper_rate_N_s_per_mm = 2.5\nbump_travel_mm = 30"))
    cases = rate.axles["front"].cases
    assert cases["bolted"].damper_N_s_per_mm == cases["routed"].damper_N_s_per_mm == 2.5
    assert rate.axles["front"].bump_travel_mm == 30.0


def test_without_a_wheelbase_the_axle_takes_the_whole_load() -> None:
    study = _study(_with("wheelbase_mm = 2300.0\n", ""))
    axle = study.axles["front"]
    assert axle.load_share == pytest.approx(1.0, rel=1e-12)
    assert any("give [car] wheelbase_mm" in note for note in study.notes)
    # the route still delivers the same load to the tyres (its statics needs no wheelbase)
    plain = _study()
    assert axle.cases["routed"].unsprung_load_N == pytest.approx(
        plain.axles["front"].cases["routed"].unsprung_load_N, rel=1e-6
    )
