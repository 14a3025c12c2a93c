"""Materials for rods and rockers: the shipped table and user-defined entries.

The shipped table lives in ``plumbrod/data/materials.toml``. Each row states whether its
values are *typical* (handbook averages, not design allowables) or specification
*minimum* values, and names its source. A design file can add or override rows with
:func:`material_from_values`; for sign-off use the supplier's certified values.

Units: moduli and strengths in MPa (N/mm²), density in kg/m³.
"""

from __future__ import annotations

import difflib
import math
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass
from functools import cache
from importlib import resources
from types import MappingProxyType

from plumbrod.errors import PlumbrodError

__all__ = [
    "BASES",
    "Material",
    "UnknownMaterialError",
    "load_materials",
    "lookup_material",
    "material_from_values",
]

BASES: tuple[str, ...] = ("typical", "minimum")
"""Allowed values of :attr:`Material.basis`."""


@dataclass(frozen=True)
class Material:
    """One material row.

    Attributes
    ----------
    id:
        Short identifier, e.g. ``"4130-N"``.
    name:
        Human-readable name with the condition (temper, heat treatment).
    modulus_MPa:
        Young's modulus E, MPa.
    yield_MPa:
        0.2 % offset yield strength S_y, MPa. For a composite, the row's ``note`` says
        what stands in for it (e.g. the axial compressive strength).
    ultimate_MPa:
        Ultimate tensile strength, MPa.
    density_kg_m3:
        Density, kg/m³.
    basis:
        ``"typical"`` (not a design allowable) or ``"minimum"`` (specification minima).
    source:
        Book, standard or datasheet with edition and table, tagged pub / pub-copy /
        memory.
    note:
        Optional remark (what a value means, how far to trust it).
    """

    id: str
    name: str
    modulus_MPa: float
    yield_MPa: float
    ultimate_MPa: float
    density_kg_m3: float
    basis: str
    source: str
    note: str = ""


class UnknownMaterialError(PlumbrodError, KeyError):
    """A material id that is not in the table.

    Attributes: ``material_id`` (as asked), ``known`` (ids available) and
    ``suggestions`` (close matches, best first).
    """

    def __init__(self, material_id: str, known: tuple[str, ...]) -> None:
        self.material_id = material_id
        self.known = known
        self.suggestions = tuple(difflib.get_close_matches(material_id, known, n=3, cutoff=0.5))
        super().__init__(material_id)

    def __str__(self) -> str:
        if self.suggestions:
            hint = "did you mean " + " or ".join(f"'{s}'" for s in self.suggestions) + "?"
        else:
            hint = "known: " + ", ".join(self.known)
        return f"unknown material '{self.material_id}'; {hint}"


def _positive_finite(field: str, value: object) -> float:
    """``value`` as a float, or ValueError naming ``field``."""
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise ValueError(f"{field}: expected a positive number, got {value!r}")
    number = float(value)
    if not math.isfinite(number) or number <= 0.0:
        raise ValueError(f"{field}: expected a positive finite number, got {value!r}")
    return number


def _text(field: str, value: object) -> str:
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"{field}: expected a non-empty string, got {value!r}")
    return value.strip()


def material_from_values(
    id: str,
    name: str,
    modulus_MPa: float,
    yield_MPa: float,
    ultimate_MPa: float,
    density_kg_m3: float,
    basis: str,
    source: str,
    note: str = "",
) -> Material:
    """Build a validated :class:`Material` (e.g. from a design file).

    Raises
    ------
    ValueError
        Naming the field: a non-positive or non-finite number, an empty id, name or
        source, or a basis other than ``"typical"`` / ``"minimum"``.
    """
    basis_text = _text("basis", basis)
    if basis_text not in BASES:
        raise ValueError(f"basis: expected one of {', '.join(BASES)}, got {basis!r}")
    if not isinstance(note, str):
        raise ValueError(f"note: expected a string, got {note!r}")
    return Material(
        id=_text("id", id),
        name=_text("name", name),
        modulus_MPa=_positive_finite("modulus_MPa", modulus_MPa),
        yield_MPa=_positive_finite("yield_MPa", yield_MPa),
        ultimate_MPa=_positive_finite("ultimate_MPa", ultimate_MPa),
        density_kg_m3=_positive_finite("density_kg_m3", density_kg_m3),
        basis=basis_text,
        source=_text("source", source),
        note=note.strip(),
    )


@cache
def load_materials() -> Mapping[str, Material]:
    """The shipped material table, keyed by id, in file order (read once, cached).

    Raises
    ------
    ValueError
        If a shipped row is malformed (a packaging defect), naming the row.
    """
    text = resources.files("plumbrod.design").joinpath("data", "materials.toml").read_text("utf-8")
    rows = tomllib.loads(text).get("material", [])
    table: dict[str, Material] = {}
    for index, row in enumerate(rows):
        try:
            material = material_from_values(**row)
        except (TypeError, ValueError) as exc:
            raise ValueError(f"materials.toml: material[{index}]: {exc}") from exc
        if material.id in table:
            raise ValueError(f"materials.toml: material[{index}]: duplicate id {material.id!r}")
        table[material.id] = material
    return MappingProxyType(table)


def lookup_material(material_id: str, table: Mapping[str, Material] | None = None) -> Material:
    """The material with this id from ``table`` (default: the shipped table).

    An exact id wins; otherwise a unique case-insensitive match is accepted.

    Raises
    ------
    UnknownMaterialError
        With close matches ("did you mean ...?") when there are any.
    """
    materials = load_materials() if table is None else table
    if material_id in materials:
        return materials[material_id]
    folded = [key for key in materials if key.casefold() == str(material_id).casefold()]
    if len(folded) == 1:
        return materials[folded[0]]
    raise UnknownMaterialError(str(material_id), tuple(materials))
