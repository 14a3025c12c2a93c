"""The quarter car and the ISO 8608 road against published values and reference solvers.

Sources are named beside each check, tagged as in the project's reference list: pub
(stated in the cited source), memory (recalled, recomputed here where possible).
"""

from __future__ import annotations

import dataclasses
import itertools
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate, stats

from plumbrod.mechanics.ride import (
    OUTPUTS,
    QuarterCar,
    Unstable,
    band_limited_mean_squares,
    combined_mean_square,
    gaussian_exceedance,
    lyapunov_mean_squares,
    mean_squares,
    natural_frequencies_Hz,
    ride_frequency_Hz,
    simulate,
    state_space,
    static_drop_m,
    transfer,
    wheel_hop_estimate_Hz,
    wheel_rate_for_ride_frequency,
)
from plumbrod.mechanics.road import (
    ISO_8608_CLASS_MEANS_M3,
    ISO_8608_N0_CYCLES_PER_M,
    class_mean_m3,
    displacement_psd_m3,
    synthesise_profile,
    velocity_psd_m2_s,
)

INVENTED = QuarterCar(250.0, 20.0, 30e3, 2000.0, 250e3)
"""An invented corner (numbers for the tests only)."""


# -- ISO 8608 ------------------------------------------------------------------------


def test_iso_8608_class_means_at_n0() -> None:
    # source: ISO 8608 (1995/2016), classification of roads, Gd(n0) at n0 = 0.1 cycles/m,
    # the geometric mean of each class's bounds; memory (the standard not seen here)
    assert ISO_8608_N0_CYCLES_PER_M == 0.1
    expected = {"A": 16e-6, "B": 64e-6, "C": 256e-6, "D": 1024e-6, "E": 4096e-6}
    for name, value in expected.items():
        assert class_mean_m3(name) == pytest.approx(value, rel=1e-12)
        assert class_mean_m3(name.lower()) == class_mean_m3(name)
    # class bounds are a factor 2 either side of the mean: A runs from 0 to 32e-6 and B
    # from 32e-6 to 128e-6, so the mean is the geometric mean of 32e-6 and 128e-6 for B
    assert ISO_8608_CLASS_MEANS_M3["B"] == pytest.approx(math.sqrt(32e-6 * 128e-6))


def test_class_means_are_not_the_per_radian_column() -> None:
    # source: ISO 8608, the same classes over the angular spatial frequency Ω (rad/m) at
    # Ω0 = 1 rad/m: 1, 4, 16, 64, 256 ×10⁻⁶ m³ for A to E (memory). Φ(Ω) = Gd(n)/(2π)
    # at Ω = 2πn, with the w = 2 slope, gives Φ(Ω0) = Gd(n0)·(2π·n0)²/(2π); the standard
    # rounds the column (16 × 0.0628 = 1.005)
    for i, name in enumerate("ABCDE"):
        n_at_omega0 = 1.0 / (2.0 * math.pi)
        phi = float(displacement_psd_m3(n_at_omega0, class_mean_m3(name))) / (2.0 * math.pi)
        assert phi == pytest.approx(1e-6 * 4.0**i, rel=0.006)


def test_road_velocity_is_white_for_w_2() -> None:
    # follows from the definition (ISO 8608, w = 2): at speed V the time spectrum of the
    # height is G(f) = Gd(f/V)/V and of the velocity (2πf)²·G(f), the same at every f
    gd, speed = class_mean_m3("C"), 25.0
    f = np.array([0.1, 1.0, 7.0, 60.0])
    velocity = (2.0 * np.pi * f) ** 2 * displacement_psd_m3(f / speed, gd) / speed
    assert np.allclose(velocity, velocity_psd_m2_s(gd, speed), rtol=1e-12)


def test_synthesised_profile_has_the_spectrum_in_its_band() -> None:
    # random-phase sum of cosines: mean square = Σ A_k²/2 exactly (Parseval), and the
    # sum approximates ∫ Gd dn = Gd(n0)·n0²·(1/n_lo − 1/n_hi) over the band
    gd = class_mean_m3("B")
    band = (0.05, 2.0)
    road = synthesise_profile(gd, 2000.0, 0.05, band, seed=3)
    dn = 1.0 / 2000.0
    n = np.arange(1, round(2000.0 / 0.05) // 2 + 1) * dn
    inside = (n >= band[0]) & (n <= band[1])
    exact = float(np.sum(displacement_psd_m3(n[inside], gd) * dn))
    assert road.variance_m2() == pytest.approx(exact, rel=1e-9)
    integral = gd * 0.01 * (1.0 / band[0] - 1.0 / band[1])
    assert road.variance_m2() == pytest.approx(integral, rel=0.02)
    # another seed changes the phases, not the mean square
    other = synthesise_profile(gd, 2000.0, 0.05, band, seed=4)
    assert not np.allclose(other.z_m, road.z_m)
    assert other.variance_m2() == pytest.approx(road.variance_m2(), rel=1e-9)


# -- natural frequencies -------------------------------------------------------------


def test_barton_fieldhouse_quarter_car_frequencies() -> None:
    # source: Barton & Fieldhouse, Automotive Chassis Engineering (Springer 2018), §3.13,
    # quarter car m_s 317.5 kg, m_u 45.4 kg, k_s 22 kN/m, k_t 192 kN/m: 1.25 Hz and
    # 10.9 Hz, amplitude ratio 0.104 (as cited in the project's issue; the book rounds,
    # hence 0.5 %; pub-copy not seen here: memory)
    car = QuarterCar(317.5, 45.4, 22e3, 0.0, 192e3)
    body, hop, ratio = natural_frequencies_Hz(car)
    assert body == pytest.approx(1.25, rel=0.005)
    assert hop == pytest.approx(10.9, rel=0.005)
    assert ratio == pytest.approx(0.104, rel=0.005)
    # the uncoupled estimates of common practice (ride rate k_s·k_t/(k_s + k_t) on m_s;
    # k_s + k_t on m_u) give the same to the book's rounding
    assert ride_frequency_Hz(317.5, 22e3, 192e3) == pytest.approx(1.25, rel=0.005)
    assert wheel_hop_estimate_Hz(45.4, 22e3, 192e3) == pytest.approx(10.9, rel=0.005)


def test_barton_fieldhouse_wheel_hop() -> None:
    # source: Barton & Fieldhouse 2018, §3.13 (as cited in the issue; memory): wheel hop
    # 14.25 Hz for k_s 20.63 kN/m, k_t 300 kN/m, m_u 40 kg; the coupled model tends to it
    # as the body's mass grows (the body then stands still)
    assert wheel_hop_estimate_Hz(40.0, 20.63e3, 300e3) == pytest.approx(14.25, rel=0.001)
    heavy = QuarterCar(1e9, 40.0, 20.63e3, 0.0, 300e3)
    assert natural_frequencies_Hz(heavy)[1] == pytest.approx(14.25, rel=0.001)


def test_wheel_rate_for_a_ride_frequency_inverts_the_ride_frequency() -> None:
    # springs in series (Hooke): 1/k_ride = 1/k_s + 1/k_t, f = √(k_ride/m_s)/2π
    k = wheel_rate_for_ride_frequency(300.0, 2.5, 250e3)
    assert ride_frequency_Hz(300.0, k, 250e3) == pytest.approx(2.5, rel=1e-12)
    with pytest.raises(ValueError):
        wheel_rate_for_ride_frequency(300.0, 6.0, 250e3)  # the tyre alone is softer


# -- the invariant points ------------------------------------------------------------


@settings(max_examples=40, deadline=None)
@given(
    ks=st.floats(5e3, 200e3),
    c=st.floats(200.0, 20e3),
)
def test_invariant_points(ks: float, c: float) -> None:
    # source: Hedrick & Butsuen, "Invariant properties of automotive suspensions", Proc.
    # IMechE D 204 (1990) (from memory): at ω = √(k_t/m_u) the body acceleration per
    # road height is k_t/m_s, and at ω = √(k_t/(m_s + m_u)) the suspension travel per
    # road height is (m_s + m_u)/m_s, whatever the spring and damper
    car = dataclasses.replace(INVENTED, spring_N_m=ks, damper_N_s_m=c)
    ms, mu, kt = car.sprung_kg, car.unsprung_kg, car.tyre_N_m
    w1 = math.sqrt(kt / mu)
    b, a = transfer(car, "body_acceleration")  # per road velocity: × jω per height
    assert abs(b(1j * w1) / a(1j * w1) * 1j * w1) == pytest.approx(kt / ms, rel=1e-9)
    w2 = math.sqrt(kt / (ms + mu))
    b, a = transfer(car, "travel")
    assert abs(b(1j * w2) / a(1j * w2) * 1j * w2) == pytest.approx((ms + mu) / ms, rel=1e-9)


# -- mean squares ----------------------------------------------------------------------


@settings(max_examples=60, deadline=None)
@given(
    ms=st.floats(80.0, 800.0),
    mu=st.floats(8.0, 80.0),
    ks=st.floats(5e3, 300e3),
    zeta=st.floats(0.05, 1.5),
    kt=st.floats(80e3, 600e3),
    aero=st.floats(0.0, 0.6),
    on=st.sampled_from(["sprung", "unsprung"]),
)
def test_closed_form_equals_lyapunov(
    ms: float, mu: float, ks: float, zeta: float, kt: float, aero: float, on: str
) -> None:
    # reference: scipy.linalg.solve_continuous_lyapunov on the state-space model; the
    # aero stiffness is a share of the softer of the spring and the tyre (stable)
    c = 2.0 * zeta * math.sqrt(ks * ms)
    k_aero = aero * min(ks * kt / (ks + kt), kt) * 0.5
    car = QuarterCar(ms, mu, ks, c, kt, k_aero, on)  # type: ignore[arg-type]
    g = velocity_psd_m2_s(class_mean_m3("C"), 30.0)
    closed, lyap = mean_squares(car, g), lyapunov_mean_squares(car, g)
    for name in OUTPUTS:
        assert closed[name] == pytest.approx(lyap[name], rel=1e-9), name


def test_weighted_sum_of_outputs_against_lyapunov() -> None:
    # reference: the state covariance P of solve_continuous_lyapunov, var(cᵀx) = cᵀPc,
    # for a point that moves with 80 % of the wheel (route ratio 0.8)
    from scipy.linalg import solve_continuous_lyapunov

    car = dataclasses.replace(INVENTED, aero_N_m=3e3, aero_on="unsprung")
    g = velocity_psd_m2_s(class_mean_m3("B"), 35.0)
    a, b, rows = state_space(car)
    p = solve_continuous_lyapunov(a, -0.5 * g * np.outer(b, b))
    row = 0.2 * rows["body_height"] + 0.8 * rows["wheel_height"]
    weights = {"body_height": 0.2, "wheel_height": 0.8}
    assert combined_mean_square(car, g, weights) == pytest.approx(row @ p @ row, rel=1e-9)


def test_closed_form_against_the_frequency_domain_integral() -> None:
    # reference: scipy.integrate.quad of |H(j2πf)|²·G_v over f, split at the modes
    car = dataclasses.replace(INVENTED, aero_N_m=4e3, aero_on="unsprung")
    g = velocity_psd_m2_s(class_mean_m3("A"), 40.0)
    closed = mean_squares(car, g)
    body, hop, _ = natural_frequencies_Hz(car)
    for name in OUTPUTS:
        b, a = transfer(car, name)

        def density(f: float, b=b, a=a) -> float:
            s = 2j * math.pi * f
            return float(abs(b(s) / a(s)) ** 2 * g)

        edges = [0.0, body / 2, body, 2 * body, hop / 2, hop, 2 * hop, 20 * hop]
        total = sum(
            integrate.quad(density, lo, hi, limit=200, epsabs=0.0, epsrel=1e-11)[0]
            for lo, hi in itertools.pairwise(edges)
        )
        total += integrate.quad(density, edges[-1], np.inf, epsabs=0.0, epsrel=1e-11)[0]
        assert closed[name] == pytest.approx(total, rel=1e-7), name
    # the band-limited integral approaches the closed form as the band widens, from below
    wide = band_limited_mean_squares(car, g, (1e-4, 1e5), points=40001)
    narrow = band_limited_mean_squares(car, g, (0.5, 60.0))
    for name in OUTPUTS:
        assert wide[name] == pytest.approx(closed[name], rel=1e-4), name
        assert narrow[name] < wide[name]


def test_exact_scaling_with_speed_and_class() -> None:
    # follows from the white road velocity (ISO 8608, w = 2): every mean square is
    # proportional to Gd(n0)·V, so RMS ∝ √V and ∝ √Gd(n0)
    base = mean_squares(INVENTED, velocity_psd_m2_s(class_mean_m3("A"), 10.0))
    faster = mean_squares(INVENTED, velocity_psd_m2_s(class_mean_m3("A"), 40.0))
    rougher = mean_squares(INVENTED, velocity_psd_m2_s(class_mean_m3("D"), 10.0))
    for name in OUTPUTS:
        assert math.sqrt(faster[name] / base[name]) == pytest.approx(2.0, rel=1e-12)
        assert math.sqrt(rougher[name] / base[name]) == pytest.approx(8.0, rel=1e-12)


def test_travel_mean_square_closed_form() -> None:
    # the travel variance of the quarter car on a white road velocity depends on the
    # masses and the damper only, not on either stiffness (Gobbi & Mastinu, J. Sound
    # Vib. 245 (2001), from memory); with the white intensity q = G_v/2 the Lyapunov
    # equation gives σ² = q·(m_s + m_u)/(2c) (recomputed by hand)
    g = velocity_psd_m2_s(class_mean_m3("B"), 20.0)
    for ks in (10e3, 40e3, 160e3):
        car = dataclasses.replace(INVENTED, spring_N_m=ks)
        ms, mu, c = car.sprung_kg, car.unsprung_kg, car.damper_N_s_m
        assert mean_squares(car, g)["travel"] == pytest.approx(
            0.5 * g * (ms + mu) / (2.0 * c), rel=1e-12
        )


def test_international_roughness_index_of_the_reference_car() -> None:
    # source: the reference quarter car of the IRI (ASTM E1926; Sayers, "On the
    # calculation of International Roughness Index from longitudinal road profile",
    # TRR 1501, 1995; memory): per unit sprung mass k_s 63.3, c 6.0, k_t 653 (s⁻², s⁻¹),
    # m_u 0.15, driven at 80 km/h; IRI = mean |travel velocity| / V. On ISO 8608 class
    # means (Gaussian: mean |x| = σ√(2/π)) about 2.22 m/km for class A and 8.9 for C, as
    # used in public road-roughness generators (memory)
    golden = QuarterCar(1.0, 0.15, 63.3, 6.0, 653.0)
    speed = 80.0 / 3.6

    def iri(road_class: str) -> float:
        var = mean_squares(golden, velocity_psd_m2_s(class_mean_m3(road_class), speed))
        return math.sqrt(2.0 / math.pi) * math.sqrt(var["travel_velocity"]) / speed * 1000.0

    assert iri("A") == pytest.approx(2.22, rel=0.01)
    assert iri("C") == pytest.approx(8.9, rel=0.01)


# -- time simulation -----------------------------------------------------------------


def test_time_simulation_over_one_kilometre() -> None:
    # reference: the frequency-domain integral over the same road band (every output),
    # and the closed form where the band holds the response (travel, body); the issue's
    # tolerance, 3 % over 1 km
    speed = 80.0 / 3.6
    gd = class_mean_m3("B")
    step = 0.02
    road = synthesise_profile(gd, 1000.0, step, (0.011, 2.83), seed=11)
    trace = simulate(INVENTED, road.z_m, step / speed)
    g = velocity_psd_m2_s(gd, speed)
    band = band_limited_mean_squares(INVENTED, g, (0.011 * speed, 2.83 * speed))
    closed = mean_squares(INVENTED, g)
    for name in OUTPUTS:
        rms = float(np.sqrt(np.mean(trace[name] ** 2)))
        assert rms == pytest.approx(math.sqrt(band[name]), rel=0.03), name
    for name in ("travel", "body_acceleration", "body_height"):
        rms = float(np.sqrt(np.mean(trace[name] ** 2)))
        assert rms == pytest.approx(math.sqrt(closed[name]), rel=0.03), name


# -- statics, stability, probabilities -----------------------------------------------


def test_static_drop_spring_and_tyre_in_series() -> None:
    # Hooke's law, springs in series: a load F on the body sinks it F/k_s + F/k_t; a
    # load on the wheel sinks both by F/k_t
    car = INVENTED
    body, wheel = static_drop_m(car, 600.0, 0.0)
    assert body == pytest.approx(600.0 / 30e3 + 600.0 / 250e3, rel=1e-12)
    assert wheel == pytest.approx(600.0 / 250e3, rel=1e-12)
    body, wheel = static_drop_m(car, 0.0, 600.0)
    assert body == pytest.approx(600.0 / 250e3, rel=1e-12)
    assert wheel == pytest.approx(600.0 / 250e3, rel=1e-12)
    # an aero stiffness k_a on the wheel: F/(k_t − k_a), the downforce growing as it sinks
    aero = dataclasses.replace(car, aero_N_m=50e3, aero_on="unsprung")
    assert static_drop_m(aero, 0.0, 600.0)[1] == pytest.approx(600.0 / 200e3, rel=1e-12)
    # on the body: the series rate less k_a
    aero = dataclasses.replace(car, aero_N_m=5e3, aero_on="sprung")
    series = 30e3 * 250e3 / 280e3
    assert static_drop_m(aero, 600.0, 0.0)[0] == pytest.approx(600.0 / (series - 5e3))


def test_an_aero_stiffness_beyond_the_springs_is_unstable() -> None:
    series = 30e3 * 250e3 / 280e3
    car = dataclasses.replace(INVENTED, aero_N_m=1.01 * series, aero_on="sprung")
    g = velocity_psd_m2_s(class_mean_m3("A"), 30.0)
    for call in (
        lambda: mean_squares(car, g),
        lambda: lyapunov_mean_squares(car, g),
        lambda: natural_frequencies_Hz(car),
        lambda: static_drop_m(car, 100.0, 0.0),
    ):
        with pytest.raises(Unstable):
            call()
    stable = dataclasses.replace(car, aero_N_m=0.99 * series)
    assert natural_frequencies_Hz(stable)[0] > 0.0


def test_gaussian_exceedance_against_scipy() -> None:
    # reference: scipy.stats.norm.sf
    for margin, sigma in ((1.0, 1.0), (2.5, 0.7), (-0.3, 2.0), (6.0, 1.0)):
        assert gaussian_exceedance(margin, sigma) == pytest.approx(
            float(stats.norm.sf(margin / sigma)), rel=1e-12
        )
