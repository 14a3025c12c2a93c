"""The quarter car: a sprung mass on a spring and damper at the wheel, an unsprung mass on
the tyre, driven by the road's height; its natural frequencies, static deflection under
constant loads, and the mean squares of its responses to a random road.

Model (SI units: kg, N/m, N·s/m, m, s).  Absolute heights ``z_s`` (body), ``z_u`` (wheel),
``z_r`` (road), + up::

    m_s·z_s'' = −k_s(z_s − z_u) − c(z_s' − z_u') − k_b(z_s − z_r)
    m_u·z_u'' = +k_s(z_s − z_u) + c(z_s' − z_u') − k_w(z_u − z_r)

with ``k_w = k_t`` and ``k_b = 0`` for a plain car.  An aero element whose downforce grows
by ``k_a`` per metre nearer the road acts as a negative spring ``−k_a`` to the road on the
mass that carries it (``k_b = −k_a`` on the body, or ``k_w = k_t − k_a`` on the wheel);
the tyre load stays ``k_t`` times the tyre's deflection.

Random road: with a white road-velocity input of one-sided density ``G_v`` (m²/s² per Hz;
ISO 8608 with w = 2, see :mod:`plumbrod.mechanics.road`) every output ``y`` with the
transfer function ``H(s) = b(s)/a(s)`` from the road velocity has the mean square
``G_v/2 · (1/2π)∫|H(jω)|²dω``, and that integral of a fourth-order rational function has
a closed form in the polynomial coefficients (the table of such integrals in Newland,
*An Introduction to Random Vibrations, Spectral and Wavelet Analysis*, 3rd ed., 1993,
Appendix 1; from memory, and checked in the tests against the Lyapunov solution).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.polynomial import Polynomial
from numpy.typing import NDArray

__all__ = [
    "OUTPUTS",
    "QuarterCar",
    "Unstable",
    "band_limited_mean_squares",
    "combined_mean_square",
    "gaussian_exceedance",
    "lyapunov_mean_squares",
    "mean_squares",
    "natural_frequencies_Hz",
    "ride_frequency_Hz",
    "simulate",
    "state_space",
    "static_drop_m",
    "transfer",
    "wheel_hop_estimate_Hz",
    "wheel_rate_for_ride_frequency",
]

Array = NDArray[np.float64]

OUTPUTS = (
    "travel",
    "travel_velocity",
    "tyre_load",
    "body_acceleration",
    "body_height",
    "wheel_height",
)
"""The responses: suspension travel z_s − z_u (m) and its velocity (m/s); dynamic tyre
load k_t(z_r − z_u) (N, + = more load); body acceleration (m/s²); body and wheel height
above the road, z_s − z_r and z_u − z_r (m)."""


class Unstable(ValueError):
    """The quarter car has no stationary response (an aero stiffness beats the springs)."""


@dataclass(frozen=True)
class QuarterCar:
    """One corner: masses (kg), wheel rate and tyre stiffness (N/m), damper (N·s/m) at
    the wheel, and an optional aero stiffness ``aero_N_m`` (+ = more downforce nearer
    the road) on the mass that carries the element."""

    sprung_kg: float
    unsprung_kg: float
    spring_N_m: float
    damper_N_s_m: float
    tyre_N_m: float
    aero_N_m: float = 0.0
    aero_on: Literal["sprung", "unsprung"] = "sprung"

    @property
    def body_to_road_N_m(self) -> float:
        """k_b: the stiffness from the body straight to the road (−k_a or 0)."""
        return -self.aero_N_m if self.aero_on == "sprung" else 0.0

    @property
    def wheel_to_road_N_m(self) -> float:
        """k_w: the stiffness from the wheel to the road (k_t, less k_a on the wheel)."""
        return self.tyre_N_m - (self.aero_N_m if self.aero_on == "unsprung" else 0.0)


# -- transfer functions --------------------------------------------------------------


def _polynomials(car: QuarterCar) -> tuple[Polynomial, Polynomial, Polynomial]:
    """Δ(s) and the numerators of Z_s/Z_r and Z_u/Z_r (Laplace, ascending coefficients)."""
    ms, mu, ks, c = car.sprung_kg, car.unsprung_kg, car.spring_N_m, car.damper_N_s_m
    kb, kw = car.body_to_road_N_m, car.wheel_to_road_N_m
    ps = Polynomial([ks + kb, c, ms])
    pu = Polynomial([ks + kw, c, mu])
    q = Polynomial([ks, c])
    delta = ps * pu - q * q
    ns = kb * pu + kw * q
    nu = kw * ps + kb * q
    return delta, ns, nu


def _over_s(p: Polynomial) -> Polynomial:
    """p(s)/s for a polynomial with p(0) = 0 (to rounding)."""
    coef = p.coef
    scale = max(float(np.max(np.abs(coef))), 1e-300)
    if abs(coef[0]) > 1e-9 * scale:
        raise ArithmeticError("the response to a white road velocity has no finite variance")
    return Polynomial(coef[1:]) if coef.size > 1 else Polynomial([0.0])


def transfer(car: QuarterCar, output: str) -> tuple[Polynomial, Polynomial]:
    """(b, a): the transfer function b(s)/a(s) from the road's vertical velocity to an
    output of :data:`OUTPUTS` (SI units)."""
    delta, ns, nu = _polynomials(car)
    s = Polynomial([0.0, 1.0])
    if output == "travel":
        num = _over_s(ns - nu)
    elif output == "travel_velocity":
        num = ns - nu
    elif output == "tyre_load":
        num = car.tyre_N_m * _over_s(delta - nu)
    elif output == "body_acceleration":
        num = s * ns
    elif output == "body_height":
        num = _over_s(ns - delta)
    elif output == "wheel_height":
        num = _over_s(nu - delta)
    else:
        raise KeyError(output)
    return num, delta


def _i4(b: Polynomial, a: Polynomial) -> float:
    """(1/2π)∫|b(jω)/a(jω)|² dω over all ω for deg a = 4, deg b ≤ 3; raises Unstable
    when a(s) has a root with a non-negative real part (Routh–Hurwitz)."""
    a0, a1, a2, a3, a4 = [float(v) for v in (*a.coef, 0.0, 0.0, 0.0, 0.0, 0.0)[:5]]
    b0, b1, b2, b3 = [float(v) for v in (*b.coef, 0.0, 0.0, 0.0, 0.0)[:4]]
    hurwitz = a1 * a2 * a3 - a0 * a3 * a3 - a1 * a1 * a4
    if min(a0, a1, a2, a3, a4) <= 0.0 or hurwitz <= 0.0:
        raise Unstable("the quarter car is unstable: the aero stiffness beats the springs")
    top = (
        b3 * b3 * (a0 * a1 * a2 - a0 * a0 * a3)
        + (b2 * b2 - 2.0 * b1 * b3) * a0 * a1 * a4
        + (b1 * b1 - 2.0 * b0 * b2) * a0 * a3 * a4
        + b0 * b0 * (a2 * a3 * a4 - a1 * a4 * a4)
    )
    return float(top / (2.0 * a0 * a4 * hurwitz))


def mean_squares(car: QuarterCar, velocity_psd: float) -> dict[str, float]:
    """Closed-form mean square of every output for a white road velocity of one-sided
    density ``velocity_psd`` (m²/s² per Hz); units: the outputs' squared."""
    return {name: 0.5 * velocity_psd * _i4(*transfer(car, name)) for name in OUTPUTS}


def combined_mean_square(car: QuarterCar, velocity_psd: float, weights: dict[str, float]) -> float:
    """Closed-form mean square of a weighted sum of outputs, Σ wᵢ·yᵢ (e.g. a point that
    moves with a share R of the wheel: (1 − R)·body_height + R·wheel_height)."""
    total = Polynomial([0.0])
    delta = None
    for name, weight in weights.items():
        num, delta = transfer(car, name)
        total = total + weight * num
    if delta is None:
        return 0.0
    return 0.5 * velocity_psd * _i4(total, delta)


# -- state space, the reference solutions --------------------------------------------


def state_space(car: QuarterCar) -> tuple[Array, Array, dict[str, Array]]:
    """(A, B, C): x' = A x + B v with x = [z_s − z_u, z_s', z_u − z_r, z_u'] and the
    road velocity v; each output of :data:`OUTPUTS` is C[name] @ x."""
    ms, mu, ks, c = car.sprung_kg, car.unsprung_kg, car.spring_N_m, car.damper_N_s_m
    kb, kw = car.body_to_road_N_m, car.wheel_to_road_N_m
    a = np.array(
        [
            [0.0, 1.0, 0.0, -1.0],
            [-(ks + kb) / ms, -c / ms, -kb / ms, c / ms],
            [0.0, 0.0, 0.0, 1.0],
            [ks / mu, c / mu, -kw / mu, -c / mu],
        ]
    )
    b = np.array([0.0, 0.0, -1.0, 0.0])
    outputs = {
        "travel": np.array([1.0, 0.0, 0.0, 0.0]),
        "travel_velocity": np.array([0.0, 1.0, 0.0, -1.0]),
        "tyre_load": np.array([0.0, 0.0, -car.tyre_N_m, 0.0]),
        "body_acceleration": a[1].copy(),
        "body_height": np.array([1.0, 0.0, 1.0, 0.0]),
        "wheel_height": np.array([0.0, 0.0, 1.0, 0.0]),
    }
    return a, b, outputs


def lyapunov_mean_squares(car: QuarterCar, velocity_psd: float) -> dict[str, float]:
    """The same mean squares from the state covariance P, A P + P Aᵀ + B q Bᵀ = 0 with
    q = G_v/2 (scipy.linalg.solve_continuous_lyapunov)."""
    from scipy.linalg import solve_continuous_lyapunov

    a, b, outputs = state_space(car)
    if np.max(np.linalg.eigvals(a).real) >= 0.0:
        raise Unstable("the quarter car is unstable: the aero stiffness beats the springs")
    p = solve_continuous_lyapunov(a, -0.5 * velocity_psd * np.outer(b, b))
    return {name: float(row @ p @ row) for name, row in outputs.items()}


def band_limited_mean_squares(
    car: QuarterCar,
    velocity_psd: float,
    band_Hz: tuple[float, float],
    points: int = 4001,
) -> dict[str, float]:
    """Mean squares from ∫|H(j2πf)|²·G_v df over a band of time frequencies (Hz), by
    Simpson's rule on a geometric grid (the road's spectrum is zero outside the band)."""
    lo, hi = band_Hz
    if not 0.0 < lo < hi:
        raise ValueError("need 0 < low < high")
    u = np.linspace(math.log(lo), math.log(hi), points | 1)
    f = np.exp(u)
    s = 2j * math.pi * f
    out = {}
    for name in OUTPUTS:
        b, a = transfer(car, name)
        gain = np.abs(b(s) / a(s)) ** 2 * velocity_psd * f  # df = f du
        h = u[1] - u[0]
        out[name] = float(
            h / 3.0 * (gain[0] + gain[-1] + 4.0 * gain[1:-1:2].sum() + 2.0 * gain[2:-1:2].sum())
        )
    return out


# -- natural frequencies, statics ----------------------------------------------------


def natural_frequencies_Hz(car: QuarterCar) -> tuple[float, float, float]:
    """Undamped body and wheel-hop frequencies (Hz) of the coupled two-mass system, and
    the body mode's wheel-to-body amplitude ratio.  Raises Unstable when the stiffness
    matrix is not positive definite (the aero stiffness wins statically)."""
    ms, mu, ks = car.sprung_kg, car.unsprung_kg, car.spring_N_m
    kb, kw = car.body_to_road_N_m, car.wheel_to_road_N_m
    k11, k22 = ks + kb, ks + kw
    det_k = k11 * k22 - ks * ks
    if k11 <= 0.0 or det_k <= 0.0:
        raise Unstable("the aero stiffness beats the springs: no static equilibrium")
    b = ms * k22 + mu * k11
    disc = math.sqrt(max(b * b - 4.0 * ms * mu * det_k, 0.0))
    w_lo = (b - disc) / (2.0 * ms * mu)
    w_hi = (b + disc) / (2.0 * ms * mu)
    ratio = (k11 - ms * w_lo) / ks
    return math.sqrt(w_lo) / (2.0 * math.pi), math.sqrt(w_hi) / (2.0 * math.pi), ratio


def ride_frequency_Hz(sprung_kg: float, spring_N_m: float, tyre_N_m: float) -> float:
    """The ride frequency of common practice: √(k_ride/m_s)/2π with the ride rate
    k_ride = k_s·k_t/(k_s + k_t), spring and tyre in series (Hz)."""
    ride = spring_N_m * tyre_N_m / (spring_N_m + tyre_N_m)
    return math.sqrt(ride / sprung_kg) / (2.0 * math.pi)


def wheel_hop_estimate_Hz(unsprung_kg: float, spring_N_m: float, tyre_N_m: float) -> float:
    """The wheel-hop estimate of common practice, body held: √((k_s + k_t)/m_u)/2π (Hz)."""
    return math.sqrt((spring_N_m + tyre_N_m) / unsprung_kg) / (2.0 * math.pi)


def wheel_rate_for_ride_frequency(sprung_kg: float, frequency_Hz: float, tyre_N_m: float) -> float:
    """The wheel rate (N/m) that gives a ride frequency on a tyre, the inverse of
    :func:`ride_frequency_Hz`; ValueError when even a rigid spring is too soft."""
    ride = sprung_kg * (2.0 * math.pi * frequency_Hz) ** 2
    if ride >= tyre_N_m:
        raise ValueError(
            f"a ride frequency of {frequency_Hz:g} Hz needs a ride rate of {ride / 1e3:.1f} "
            f"N/mm, stiffer than the tyre alone ({tyre_N_m / 1e3:.1f} N/mm)"
        )
    return ride * tyre_N_m / (tyre_N_m - ride)


def static_drop_m(
    car: QuarterCar, sprung_load_N: float, unsprung_load_N: float
) -> tuple[float, float]:
    """How far the body and the wheel sink (m, + = down) under constant downward loads on
    each mass, with the aero stiffness included; raises Unstable without equilibrium."""
    ks = car.spring_N_m
    k = np.array([[ks + car.body_to_road_N_m, -ks], [-ks, ks + car.wheel_to_road_N_m]], dtype=float)
    if k[0, 0] <= 0.0 or np.linalg.det(k) <= 0.0:
        raise Unstable("the aero stiffness beats the springs: no static equilibrium")
    z = np.linalg.solve(k, -np.array([sprung_load_N, unsprung_load_N]))
    return float(-z[0]), float(-z[1])


def gaussian_exceedance(margin: float, sigma: float) -> float:
    """P(X > margin) for a zero-mean Gaussian X of standard deviation sigma: Φ(−margin/σ)."""
    if sigma <= 0.0:
        return 0.0 if margin > 0.0 else 1.0
    return 0.5 * math.erfc(margin / (sigma * math.sqrt(2.0)))


# -- time simulation -----------------------------------------------------------------


def simulate(car: QuarterCar, road_m: Array, dt_s: float) -> dict[str, Array]:
    """Every output over time for a road height sampled every ``dt_s`` seconds, exact
    for a road that is straight between samples (zero-order hold on its velocity).

    The road is taken as periodic: the run goes round twice and returns the second
    lap, so the start-up transient is gone.
    """
    from scipy.linalg import expm

    a, b, outputs = state_space(car)
    n = road_m.size
    aug = np.zeros((5, 5))
    aug[:4, :4] = a * dt_s
    aug[:4, 4] = b * dt_s
    phi = expm(aug)
    ad, bd = phi[:4, :4], phi[:4, 4]
    velocity = (np.roll(road_m, -1) - road_m) / dt_s
    x = np.zeros(4)  # at rest on the road
    states = np.empty((n, 4))
    for lap in range(2):
        for i in range(n):
            if lap == 1:
                states[i] = x
            x = ad @ x + bd * velocity[i]
    return {name: states @ row for name, row in outputs.items()}
