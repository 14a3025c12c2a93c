"""The design's rods as structural members: section, material, length, EA/L, mass.

Materials come from the shipped table (:mod:`plumbrod.design.materials`) with the design
file's ``[materials]`` rows added or overriding; an unknown material id is a design
file error naming the rod.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

from plumbrod.design.materials import (
    Material,
    UnknownMaterialError,
    load_materials,
    lookup_material,
)
from plumbrod.design.model import Design, Rod
from plumbrod.design.sections import Section
from plumbrod.errors import DesignFileError

__all__ = ["Member", "material_table", "resolve_members", "rocker_material"]


@dataclass(frozen=True)
class Member:
    """One design rod with what the structural figures need (mm, N, kg)."""

    rod: Rod
    section: Section
    material: Material
    length_mm: float

    @property
    def name(self) -> str:
        return self.rod.name

    @property
    def area_mm2(self) -> float:
        return float(self.section.area_mm2)

    @property
    def stiffness_N_per_mm(self) -> float:
        """Axial stiffness EA/L."""
        return self.material.modulus_MPa * self.area_mm2 / self.length_mm

    @property
    def mass_kg(self) -> float:
        """Mass of the tube or bar alone, ρ·A·L (rod ends not included)."""
        return self.material.density_kg_m3 * self.area_mm2 * 1e-9 * self.length_mm


def material_table(design: Design) -> Mapping[str, Material]:
    """The shipped materials with the design's own rows added or overriding."""
    table = dict(load_materials())
    for spec in design.materials:
        table[spec.id] = Material(
            id=spec.id,
            name=f"{spec.id} (from the design file)",
            modulus_MPa=spec.modulus_MPa,
            yield_MPa=spec.yield_MPa,
            ultimate_MPa=spec.ultimate_MPa,
            density_kg_m3=spec.density_kg_m3,
            basis="minimum" if "min" in spec.source.lower() else "typical",
            source=spec.source,
        )
    return table


def _material(
    design: Design, table: Mapping[str, Material], material_id: str, key: str
) -> Material:
    try:
        return lookup_material(material_id, table)
    except UnknownMaterialError as exc:
        hint = (
            f"did you mean '{exc.suggestions[0]}'?"
            if exc.suggestions
            else "see `plumbrod column --list-materials`, or add it under [materials]"
        )
        raise DesignFileError(
            design.source, key, f"unknown material '{material_id}'", hint
        ) from None


def resolve_members(design: Design) -> dict[str, Member]:
    """Every design rod as a :class:`Member`, keyed by rod name."""
    table = material_table(design)
    members: dict[str, Member] = {}
    for rod in design.rods:
        material = _material(design, table, rod.material, f"rods.{rod.name}.material")
        if rod.wall_mm is None:
            section = Section.solid(rod.od_mm)
        else:
            section = Section.tube(rod.od_mm, rod.wall_mm)
        a = design.pickups[rod.end_a].position_mm
        b = design.pickups[rod.end_b].position_mm
        members[rod.name] = Member(rod, section, material, math.dist(a, b))
    return members


def rocker_material(design: Design, rocker_name: str) -> Material | None:
    """The plate material of a rocker, when it has a plate."""
    rocker = next(r for r in design.rockers if r.name == rocker_name)
    if rocker.plate is None:
        return None
    return _material(
        design,
        material_table(design),
        rocker.plate.material,
        f"rockers.{rocker.name}.plate.material",
    )
