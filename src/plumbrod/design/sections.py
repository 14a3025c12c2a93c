"""Cross-sections of rods: round tube (OD × wall) and solid round bar.

Array functions take ``od_mm`` and ``wall_mm`` of any broadcastable shapes and return
an array of the broadcast shape. A **solid bar is a tube with wall = OD/2** (inside
diameter 0): the array functions accept ``0 < wall_mm <= od_mm/2``, so one call can
mix tubes and bars. The :class:`Section` value is stricter: a ``"tube"`` needs
``wall_mm < od_mm/2`` and a ``"solid"`` bar has ``wall_mm = None``.

Formulas (thin or thick wall, exact for a circular annulus), with D the outside and
d = D − 2t the inside diameter:

* area A = π/4·(D² − d²) = π·t·(D − t)
* second moment of area about a diameter I = π/64·(D⁴ − d⁴) = A·(D² + d²)/16
* radius of gyration r = √(I/A) = √(D² + d²)/4
* mass per metre m' = ρ·A (kg/m with A in m²)

Units: mm, mm², mm⁴, kg/m³, kg/m.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from functools import cache
from importlib import resources
from typing import Protocol

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "SYSTEMS",
    "Section",
    "catalogue_sections",
    "tube_area_mm2",
    "tube_mass_per_m_kg",
    "tube_radius_of_gyration_mm",
    "tube_second_moment_mm4",
]

SYSTEMS: tuple[str, ...] = ("all", "metric", "inch")
"""Allowed values of ``system`` in :func:`catalogue_sections`."""


class _HasDensity(Protocol):
    @property
    def density_kg_m3(self) -> float: ...


def _tube_arrays(od_mm: ArrayLike, wall_mm: ArrayLike) -> tuple[NDArray[np.float64], ...]:
    """Broadcast and validate OD and wall; return (D, t)."""
    od, wall = np.broadcast_arrays(
        np.asarray(od_mm, dtype=np.float64), np.asarray(wall_mm, dtype=np.float64)
    )
    bad_od = ~(np.isfinite(od) & (od > 0.0))
    if bad_od.any():
        raise ValueError(f"od_mm: expected a positive finite diameter, got {od[bad_od].flat[0]!r}")
    bad_wall = ~(np.isfinite(wall) & (wall > 0.0) & (wall <= od / 2.0))
    if bad_wall.any():
        index = np.argwhere(bad_wall)[0]
        raise ValueError(
            f"wall_mm: expected 0 < wall_mm <= od_mm/2 "
            f"(od_mm {od[tuple(index)]!r}), got {wall[tuple(index)]!r}"
        )
    return od, wall


def tube_area_mm2(od_mm: ArrayLike, wall_mm: ArrayLike) -> NDArray[np.float64]:
    """Cross-section area A = π·t·(D − t), mm²; broadcasts; wall = OD/2 is a solid bar."""
    od, wall = _tube_arrays(od_mm, wall_mm)
    return np.pi * wall * (od - wall)


def tube_second_moment_mm4(od_mm: ArrayLike, wall_mm: ArrayLike) -> NDArray[np.float64]:
    """Second moment of area about a diameter I = π/64·(D⁴ − d⁴), mm⁴; broadcasts."""
    od, wall = _tube_arrays(od_mm, wall_mm)
    inner = od - 2.0 * wall
    return np.pi * wall * (od - wall) * (od**2 + inner**2) / 16.0


def tube_radius_of_gyration_mm(od_mm: ArrayLike, wall_mm: ArrayLike) -> NDArray[np.float64]:
    """Radius of gyration r = √(D² + d²)/4, mm; broadcasts."""
    od, wall = _tube_arrays(od_mm, wall_mm)
    inner = od - 2.0 * wall
    return np.sqrt(od**2 + inner**2) / 4.0


def tube_mass_per_m_kg(
    od_mm: ArrayLike, wall_mm: ArrayLike, density_kg_m3: ArrayLike
) -> NDArray[np.float64]:
    """Mass per metre of length ρ·A, kg/m (A converted from mm² to m²); broadcasts."""
    density = np.asarray(density_kg_m3, dtype=np.float64)
    if not np.all(np.isfinite(density) & (density > 0.0)):
        raise ValueError(f"density_kg_m3: expected a positive density, got {density_kg_m3!r}")
    return tube_area_mm2(od_mm, wall_mm) * 1e-6 * density


@dataclass(frozen=True)
class Section:
    """A round rod section: ``kind`` is ``"tube"`` (needs ``wall_mm``) or ``"solid"``.

    ``od_mm`` is the outside diameter (the bar diameter for a solid). ``designation``
    and ``system`` (``"metric"``/``"inch"``) are set for catalogue sizes.

    Raises
    ------
    ValueError
        For an unknown kind, a non-positive diameter or wall, a tube wall not below
        OD/2, or a wall given for a solid bar.
    """

    kind: str
    od_mm: float
    wall_mm: float | None = None
    designation: str = ""
    system: str = ""

    def __post_init__(self) -> None:
        if self.kind not in ("tube", "solid"):
            raise ValueError(f"kind: expected 'tube' or 'solid', got {self.kind!r}")
        if not (math.isfinite(self.od_mm) and self.od_mm > 0.0):
            raise ValueError(f"od_mm: expected a positive finite diameter, got {self.od_mm!r}")
        if self.kind == "solid":
            if self.wall_mm is not None:
                raise ValueError(f"wall_mm: expected None for a solid bar, got {self.wall_mm!r}")
            return
        if self.wall_mm is None:
            raise ValueError("wall_mm: expected a wall thickness for a tube, got None")
        if not (math.isfinite(self.wall_mm) and 0.0 < self.wall_mm < self.od_mm / 2.0):
            raise ValueError(
                f"wall_mm: expected 0 < wall < od_mm/2 = {self.od_mm / 2.0:g}, got {self.wall_mm!r}"
            )

    @classmethod
    def tube(cls, od_mm: float, wall_mm: float, designation: str = "") -> Section:
        """A round tube of outside diameter ``od_mm`` and wall ``wall_mm``."""
        return cls("tube", float(od_mm), float(wall_mm), designation)

    @classmethod
    def solid(cls, diameter_mm: float, designation: str = "") -> Section:
        """A solid round bar of diameter ``diameter_mm``."""
        return cls("solid", float(diameter_mm), None, designation)

    @property
    def effective_wall_mm(self) -> float:
        """The wall used in the formulas: ``wall_mm``, or OD/2 for a solid bar, mm."""
        return self.od_mm / 2.0 if self.wall_mm is None else self.wall_mm

    @property
    def id_mm(self) -> float:
        """Inside diameter, mm (0 for a solid bar)."""
        return self.od_mm - 2.0 * self.effective_wall_mm

    @property
    def area_mm2(self) -> float:
        """Cross-section area, mm²."""
        return float(tube_area_mm2(self.od_mm, self.effective_wall_mm))

    @property
    def second_moment_mm4(self) -> float:
        """Second moment of area about a diameter, mm⁴."""
        return float(tube_second_moment_mm4(self.od_mm, self.effective_wall_mm))

    @property
    def radius_of_gyration_mm(self) -> float:
        """Radius of gyration, mm."""
        return float(tube_radius_of_gyration_mm(self.od_mm, self.effective_wall_mm))

    def mass_per_m_kg(self, material: _HasDensity) -> float:
        """Mass per metre in ``material`` (anything with ``density_kg_m3``), kg/m."""
        return float(tube_mass_per_m_kg(self.od_mm, self.effective_wall_mm, material.density_kg_m3))

    def describe(self) -> str:
        """Short text, e.g. ``"tube 25 x 1.5 mm"`` or ``"solid bar 12 mm"``."""
        if self.designation:
            return f"{self.kind} {self.designation}"
        if self.kind == "solid":
            return f"solid bar {self.od_mm:g} mm"
        return f"tube {self.od_mm:g} x {self.wall_mm:g} mm"


@cache
def _catalogue() -> tuple[Section, ...]:
    """All catalogue sizes from ``data/tubes.toml``, metric then inch, in file order."""
    text = resources.files("plumbrod.design").joinpath("data", "tubes.toml").read_text("utf-8")
    data = tomllib.loads(text)
    sections: list[Section] = []
    for system in ("metric", "inch"):
        for index, row in enumerate(data.get(system, [])):
            try:
                section = Section(
                    "tube",
                    float(row["od_mm"]),
                    float(row["wall_mm"]),
                    str(row["designation"]),
                    system,
                )
            except (KeyError, TypeError, ValueError) as exc:
                raise ValueError(f"tubes.toml: {system}[{index}]: {exc}") from exc
            sections.append(section)
    return tuple(sections)


def catalogue_sections(system: str = "all") -> list[Section]:
    """Standard tube sizes, sorted by area (then OD), from the shipped catalogue.

    ``system`` is ``"all"``, ``"metric"`` or ``"inch"``. The catalogue is common
    practice (see ``data/tubes.toml``), not a published standard's table.

    Raises
    ------
    ValueError
        For any other ``system``.
    """
    if system not in SYSTEMS:
        raise ValueError(f"system: expected one of {', '.join(SYSTEMS)}, got {system!r}")
    chosen = [s for s in _catalogue() if system == "all" or s.system == system]
    return sorted(chosen, key=lambda s: (s.area_mm2, s.od_mm))
