"""Buckling and strength of straight two-force members (rods, pushrods, struts).

A rod loaded along its axis fails in compression by buckling and in tension by
yielding. This module gives the critical (buckling) load of a pin-ended or otherwise
restrained column, the tension capacity, and reserve factors, as pure functions on
numpy arrays that broadcast over any shape (poses × load cases × rods), plus a small
:class:`ColumnResult` for one rod.

Model
-----
With slenderness λ = K·L/r (K effective-length factor, L length between joint centres,
r radius of gyration), E Young's modulus and S_y yield strength:

* transition slenderness  λ_t = √(2π²E/S_y)
  (where the Euler stress equals S_y/2)
* Euler, λ ≥ λ_t:   P_cr = π²·E·I/(K·L)²
* Johnson, λ < λ_t: P_cr = A·[S_y − (S_y·λ/(2π))²/E]

The two agree at λ_t (both give A·S_y/2) and Johnson tends to the squash load A·S_y
as λ → 0. Reserve factors: compression RF = P_cr/|P|, tension RF = S_y·A/P, rod end
RF = rating/|P|, and margin of safety MS = RF/required − 1.

Sign convention: member force P in N, + tension, − compression.
Units: mm, mm², mm⁴, MPa (N/mm²), N.

The model is idealised: a straight, prismatic, centrally loaded member; no initial
crookedness, eccentricity, residual stress, joint friction, fatigue or dynamic load.
It does not replace a qualified engineer's sign-off or physical proof testing.

References
----------
Shigley's Mechanical Engineering Design, 9th ed. (Budynas, Nisbett), §4-13 "Long
columns with central loading" (Euler) and "Intermediate-length columns with central
loading", eqs. (4-45) and (4-46) (transition slenderness and the J. B. Johnson
parabola); Shigley's end-condition constant C equals 1/K².
AISC 360-22, Specification for Structural Steel Buildings, Commentary Table C-A-7.1:
theoretical and recommended design values of the effective length factor K.
"""

from __future__ import annotations

import difflib
from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType
from typing import Protocol

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "END_CONDITIONS",
    "ColumnResult",
    "EndCondition",
    "analyse_column",
    "compression_reserve_factor",
    "critical_load_N",
    "effective_length_factor",
    "euler_critical_load_N",
    "johnson_critical_load_N",
    "margin_of_safety",
    "member_reserve_factor",
    "rod_end_reserve_factor",
    "slenderness_ratio",
    "tension_capacity_N",
    "tension_reserve_factor",
    "transition_slenderness",
]


@dataclass(frozen=True)
class EndCondition:
    """Effective-length factor K for one pair of end conditions.

    ``k_theoretical`` is the ideal value; ``k_recommended`` the design value recommended
    when the ideal restraint is only approximated (AISC 360-22 Commentary Table C-A-7.1).
    """

    name: str
    description: str
    k_theoretical: float
    k_recommended: float


# source: AISC 360-22 Commentary, Table C-A-7.1 (theoretical / recommended design K).
END_CONDITIONS: Mapping[str, EndCondition] = MappingProxyType(
    {
        c.name: c
        for c in (
            EndCondition("pinned-pinned", "both ends pinned (ball joints at both ends)", 1.0, 1.0),
            EndCondition("fixed-fixed", "both ends fixed", 0.5, 0.65),
            EndCondition("fixed-pinned", "one end fixed, the other pinned", 0.7, 0.80),
            EndCondition(
                "fixed-sliding",
                "one end fixed, the other end rotation fixed but free to translate sideways",
                1.0,
                1.2,
            ),
            EndCondition("fixed-free", "one end fixed, the other free (flagpole)", 2.0, 2.10),
            EndCondition(
                "pinned-sliding",
                "one end pinned, the other end rotation fixed but free to translate sideways",
                2.0,
                2.0,
            ),
        )
    }
)
"""End conditions by name; a rod with a ball joint at each end is ``"pinned-pinned"``."""


def effective_length_factor(ends: str, basis: str = "recommended") -> float:
    """K for the named end conditions (see :data:`END_CONDITIONS`).

    ``basis`` is ``"recommended"`` (design value, default) or ``"theoretical"``.

    Raises
    ------
    ValueError
        For an unknown name (with close matches) or basis.
    """
    if basis not in ("recommended", "theoretical"):
        raise ValueError(f"basis: expected 'recommended' or 'theoretical', got {basis!r}")
    try:
        condition = END_CONDITIONS[ends]
    except KeyError:
        close = difflib.get_close_matches(str(ends), list(END_CONDITIONS), n=2, cutoff=0.5)
        hint = f"; did you mean {' or '.join(close)}?" if close else ""
        raise ValueError(
            f"ends: expected one of {', '.join(END_CONDITIONS)}, got {ends!r}{hint}"
        ) from None
    return condition.k_recommended if basis == "recommended" else condition.k_theoretical


def _positive(name: str, value: ArrayLike) -> NDArray[np.float64]:
    """``value`` as a float array, or ValueError naming ``name`` if any entry is ≤ 0."""
    array = np.asarray(value, dtype=np.float64)
    bad = ~(np.isfinite(array) & (array > 0.0))
    if bad.any():
        raise ValueError(f"{name}: expected a positive finite value, got {array[bad].flat[0]!r}")
    return array


def _finite(name: str, value: ArrayLike) -> NDArray[np.float64]:
    array = np.asarray(value, dtype=np.float64)
    bad = ~np.isfinite(array)
    if bad.any():
        raise ValueError(f"{name}: expected a finite value, got {array[bad].flat[0]!r}")
    return array


def transition_slenderness(modulus_MPa: ArrayLike, yield_MPa: ArrayLike) -> NDArray[np.float64]:
    """λ_t = √(2π²E/S_y), dimensionless; broadcasts (Shigley 9th ed., eq. 4-45 with C = 1)."""
    modulus = _positive("modulus_MPa", modulus_MPa)
    strength = _positive("yield_MPa", yield_MPa)
    return np.sqrt(2.0 * np.pi**2 * modulus / strength)


def slenderness_ratio(
    length_mm: ArrayLike, k: ArrayLike, radius_of_gyration_mm: ArrayLike
) -> NDArray[np.float64]:
    """λ = K·L/r, dimensionless; broadcasts."""
    length = _positive("length_mm", length_mm)
    factor = _positive("k", k)
    radius = _positive("radius_of_gyration_mm", radius_of_gyration_mm)
    return factor * length / radius


def euler_critical_load_N(
    second_moment_mm4: ArrayLike, length_mm: ArrayLike, k: ArrayLike, modulus_MPa: ArrayLike
) -> NDArray[np.float64]:
    """Euler buckling load P = π²·E·I/(K·L)², N, at any slenderness; broadcasts."""
    inertia = _positive("second_moment_mm4", second_moment_mm4)
    length = _positive("length_mm", length_mm)
    factor = _positive("k", k)
    modulus = _positive("modulus_MPa", modulus_MPa)
    return np.pi**2 * modulus * inertia / (factor * length) ** 2


def johnson_critical_load_N(
    area_mm2: ArrayLike, slenderness: ArrayLike, modulus_MPa: ArrayLike, yield_MPa: ArrayLike
) -> NDArray[np.float64]:
    """Johnson parabola P = A·[S_y − (S_y·λ/(2π))²/E], N; broadcasts.

    Valid below the transition slenderness (Shigley 9th ed., eq. 4-46 with C = 1/K²
    folded into λ = K·L/r).
    """
    area = _positive("area_mm2", area_mm2)
    lam = _positive("slenderness", slenderness)
    modulus = _positive("modulus_MPa", modulus_MPa)
    strength = _positive("yield_MPa", yield_MPa)
    return area * (strength - (strength * lam / (2.0 * np.pi)) ** 2 / modulus)


def critical_load_N(
    area_mm2: ArrayLike,
    second_moment_mm4: ArrayLike,
    length_mm: ArrayLike,
    k: ArrayLike,
    modulus_MPa: ArrayLike,
    yield_MPa: ArrayLike,
) -> NDArray[np.float64]:
    """Critical compressive load of a column, N: Euler at λ ≥ λ_t, Johnson below.

    All arguments broadcast against each other (e.g. shape ``(poses, cases, rods)``
    for the length and ``(rods,)`` for the section); the result has the broadcast
    shape. λ = K·L/r with r = √(I/A); λ_t = √(2π²E/S_y).
    """
    area = _positive("area_mm2", area_mm2)
    inertia = _positive("second_moment_mm4", second_moment_mm4)
    length = _positive("length_mm", length_mm)
    factor = _positive("k", k)
    modulus = _positive("modulus_MPa", modulus_MPa)
    strength = _positive("yield_MPa", yield_MPa)
    lam = factor * length / np.sqrt(inertia / area)
    lam_t = np.sqrt(2.0 * np.pi**2 * modulus / strength)
    euler = np.pi**2 * modulus * inertia / (factor * length) ** 2
    johnson = area * (strength - (strength * lam / (2.0 * np.pi)) ** 2 / modulus)
    return np.where(lam >= lam_t, euler, johnson)


def tension_capacity_N(area_mm2: ArrayLike, yield_MPa: ArrayLike) -> NDArray[np.float64]:
    """Tension load at first yield S_y·A, N; broadcasts."""
    return _positive("area_mm2", area_mm2) * _positive("yield_MPa", yield_MPa)


def _ratio_or_inf(
    numerator: NDArray[np.float64], denominator: NDArray[np.float64], mask: NDArray[np.bool_]
) -> NDArray[np.float64]:
    numerator, denominator, mask = np.broadcast_arrays(numerator, denominator, mask)
    out = np.full(numerator.shape, np.inf)
    np.divide(numerator, denominator, out=out, where=mask)
    return out


def compression_reserve_factor(
    critical_load_N: ArrayLike, member_force_N: ArrayLike
) -> NDArray[np.float64]:
    """Buckling reserve factor P_cr/|P| where P < 0 (compression); ``inf`` where P ≥ 0."""
    critical = _positive("critical_load_N", critical_load_N)
    force = _finite("member_force_N", member_force_N)
    return _ratio_or_inf(critical, np.abs(force), force < 0.0)


def tension_reserve_factor(
    area_mm2: ArrayLike, yield_MPa: ArrayLike, member_force_N: ArrayLike
) -> NDArray[np.float64]:
    """Tension reserve factor S_y·A/P where P > 0 (tension); ``inf`` where P ≤ 0."""
    capacity = tension_capacity_N(area_mm2, yield_MPa)
    force = _finite("member_force_N", member_force_N)
    return _ratio_or_inf(capacity, force, force > 0.0)


def member_reserve_factor(
    member_force_N: ArrayLike,
    critical_load_N: ArrayLike,
    area_mm2: ArrayLike,
    yield_MPa: ArrayLike,
) -> NDArray[np.float64]:
    """The reserve factor that applies to each force: buckling in compression, yield in
    tension, ``inf`` for zero force; broadcasts."""
    force = _finite("member_force_N", member_force_N)
    buckling = compression_reserve_factor(critical_load_N, force)
    tension = tension_reserve_factor(area_mm2, yield_MPa, force)
    return np.minimum(buckling, tension)


def rod_end_reserve_factor(rating_N: ArrayLike, member_force_N: ArrayLike) -> NDArray[np.float64]:
    """Rod-end (ball joint) reserve factor rating/|P|; ``inf`` for zero force; broadcasts."""
    rating = _positive("rating_N", rating_N)
    force = _finite("member_force_N", member_force_N)
    return _ratio_or_inf(rating, np.abs(force), force != 0.0)


def margin_of_safety(reserve_factor: ArrayLike, required: ArrayLike) -> NDArray[np.float64]:
    """Margin of safety MS = RF/required − 1 (negative means below the requirement)."""
    factor = np.asarray(reserve_factor, dtype=np.float64)
    if np.any(np.isnan(factor) | (factor <= 0.0)):
        raise ValueError(f"reserve_factor: expected positive values, got {reserve_factor!r}")
    return factor / _positive("required", required) - 1.0


class _SectionLike(Protocol):
    @property
    def area_mm2(self) -> float: ...
    @property
    def second_moment_mm4(self) -> float: ...


@dataclass(frozen=True)
class ColumnResult:
    """Buckling result for one rod.

    Attributes: ``area_mm2``, ``second_moment_mm4``, ``radius_of_gyration_mm``,
    ``length_mm``, ``k``, ``slenderness`` (K·L/r), ``transition_slenderness``
    (√(2π²E/S_y)), ``regime`` (``"euler"`` or ``"johnson"``) and ``critical_load_N``.
    """

    area_mm2: float
    second_moment_mm4: float
    radius_of_gyration_mm: float
    length_mm: float
    k: float
    slenderness: float
    transition_slenderness: float
    regime: str
    critical_load_N: float


def analyse_column(
    section: _SectionLike,
    length_mm: float,
    modulus_MPa: float,
    yield_MPa: float,
    k: float = 1.0,
) -> ColumnResult:
    """Critical load of one rod of ``section`` (a :class:`plumbrod.design.sections.Section`).

    ``k`` defaults to 1 (ball joints at both ends, pinned–pinned).

    Raises
    ------
    ValueError
        Naming the argument, for a non-positive length, K, modulus or yield.
    """
    area = float(section.area_mm2)
    inertia = float(section.second_moment_mm4)
    radius = float(np.sqrt(inertia / area))
    lam = float(slenderness_ratio(length_mm, k, radius))
    lam_t = float(transition_slenderness(modulus_MPa, yield_MPa))
    load = float(critical_load_N(area, inertia, length_mm, k, modulus_MPa, yield_MPa))
    return ColumnResult(
        area_mm2=area,
        second_moment_mm4=inertia,
        radius_of_gyration_mm=radius,
        length_mm=float(length_mm),
        k=float(k),
        slenderness=lam,
        transition_slenderness=lam_t,
        regime="euler" if lam >= lam_t else "johnson",
        critical_load_N=load,
    )
