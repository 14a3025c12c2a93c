"""Random road profiles of ISO 8608: the roughness classes, their spectra and a synthesised
profile.

ISO 8608 gives the one-sided displacement spectral density of a road's height over the
spatial frequency ``n`` (cycles/m) as ``Gd(n) = Gd(n0)·(n/n0)^-w`` with ``n0 = 0.1``
cycles/m and the waviness ``w = 2``; a class is named by ``Gd(n0)``, the geometric mean
of its bounds (A 16, B 64, C 256, D 1024, E 4096 ×10⁻⁶ m³; each class four times the
last).  With ``w = 2`` the road's *vertical velocity* seen at speed ``V`` is white: its
one-sided spectral density over time frequency is ``(2π·n0)²·Gd(n0)·V`` (m²/s² per Hz)
at every frequency, so every variance of a linear car on it is proportional to
``Gd(n0)·V``.

Units: SI throughout (m, s, m/s); spatial frequencies in cycles/m.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = [
    "ISO_8608_BAND_CYCLES_PER_M",
    "ISO_8608_CLASS_MEANS_M3",
    "ISO_8608_N0_CYCLES_PER_M",
    "RoadProfile",
    "class_mean_m3",
    "displacement_psd_m3",
    "synthesise_profile",
    "velocity_psd_m2_s",
]

Array = NDArray[np.float64]

ISO_8608_N0_CYCLES_PER_M = 0.1
"""Reference spatial frequency n0 of ISO 8608 (cycles/m)."""

ISO_8608_CLASS_MEANS_M3: dict[str, float] = {
    name: 16e-6 * 4.0**i for i, name in enumerate("ABCDEFGH")
}
"""Gd(n0) of each class, the geometric mean of its bounds (m³ = m² per cycle/m)."""

ISO_8608_BAND_CYCLES_PER_M = (0.011, 2.83)
"""The band of spatial frequencies ISO 8608 classifies (wavelengths about 0.35 m to
90 m)."""


def class_mean_m3(road_class: str) -> float:
    """Gd(n0) of an ISO 8608 class 'A' to 'H' (m³); raises KeyError for another name."""
    return ISO_8608_CLASS_MEANS_M3[road_class.upper()]


def displacement_psd_m3(n: Array | float, gd_n0_m3: float, waviness: float = 2.0) -> Array:
    """One-sided displacement spectral density Gd(n) = Gd(n0)(n/n0)^-w (m³)."""
    n_arr = np.asarray(n, dtype=float)
    return gd_n0_m3 * (n_arr / ISO_8608_N0_CYCLES_PER_M) ** (-waviness)


def velocity_psd_m2_s(gd_n0_m3: float, speed_m_s: float) -> float:
    """One-sided spectral density of the road's vertical velocity at speed V, for w = 2:
    (2π·n0)²·Gd(n0)·V, the same at every time frequency (m²/s² per Hz)."""
    return (2.0 * math.pi * ISO_8608_N0_CYCLES_PER_M) ** 2 * gd_n0_m3 * speed_m_s


@dataclass(frozen=True)
class RoadProfile:
    """A sampled road: height ``z_m`` at distance ``x_m`` (both m), periodic over
    ``length_m``, with its components' spatial frequencies (cycles/m)."""

    x_m: Array
    z_m: Array
    length_m: float
    band_cycles_per_m: tuple[float, float]

    def variance_m2(self) -> float:
        """The profile's mean square height (m²)."""
        return float(np.mean(self.z_m**2))


def synthesise_profile(
    gd_n0_m3: float,
    length_m: float,
    step_m: float,
    band_cycles_per_m: tuple[float, float] = ISO_8608_BAND_CYCLES_PER_M,
    seed: int = 0,
    waviness: float = 2.0,
) -> RoadProfile:
    """A road profile with the spectrum Gd(n) over the band: a sum of cosines at the
    spatial frequencies k/L, amplitudes √(2·Gd(n_k)·Δn), random phases (an inverse FFT).

    The profile repeats after ``length_m``; its mean square equals the spectrum's
    integral over the band (as a sum over the frequencies k/L).
    """
    if length_m <= 0.0 or step_m <= 0.0 or step_m >= length_m:
        raise ValueError("need 0 < step < length")
    count = round(length_m / step_m)
    if count % 2:
        count += 1
    dx = length_m / count
    dn = 1.0 / length_m
    n: Array = np.arange(count // 2 + 1, dtype=float) * dn
    lo, hi = band_cycles_per_m
    if hi >= 0.5 / dx:
        raise ValueError(
            f"the band reaches {hi} cycles/m; a step of {dx:.4g} m resolves only "
            f"{0.5 / dx:.4g}: use a finer step"
        )
    inside = (n >= lo) & (n <= hi) & (n > 0.0)
    amplitude = np.zeros_like(n)
    amplitude[inside] = np.sqrt(2.0 * displacement_psd_m3(n[inside], gd_n0_m3, waviness) * dn)
    rng = np.random.default_rng(seed)
    phase = rng.uniform(0.0, 2.0 * math.pi, size=n.size)
    # irfft of X gives (1/N)·Σ X_k e^{i2πkj/N} with the conjugate half: a cosine of
    # amplitude A needs |X_k| = A·N/2
    spectrum = amplitude * count / 2.0 * np.exp(1j * phase)
    z = np.fft.irfft(spectrum, n=count)
    x: Array = np.arange(count, dtype=float) * dx
    return RoadProfile(x_m=x, z_m=z, length_m=length_m, band_cycles_per_m=(lo, hi))
