"""Rocker plates of a design: their cut outlines and masses.

A rocker with a ``[rockers.<name>.plate]`` table gets a cut outline
(:func:`plumbrod.geometry.plate_outline.plate_outline`) from its pivot axis, pickups, hole
diameters and edge margin.  Its mass is the given ``mass_kg``, or else the plate's
(net area × thickness × density of the plate material).
"""

from __future__ import annotations

import numpy as np

from plumbrod.design.model import Design, Rocker
from plumbrod.errors import DesignFileError
from plumbrod.geometry.plate_outline import PlateOutline, plate_outline
from plumbrod.geometry.shapes import GeometryError
from plumbrod.mechanics.members import rocker_material

__all__ = ["rocker_mass_kg", "rocker_outlines"]


def _outline(design: Design, rocker: Rocker) -> PlateOutline:
    assert rocker.plate is not None
    plate = rocker.plate
    pickups = {
        p.name: np.array(p.position_mm) for p in design.pickups.values() if p.body == rocker.name
    }
    holes = {name: plate.holes_mm.get(name, plate.hole_mm) for name in pickups}
    try:
        return plate_outline(
            np.array(rocker.axis_a_mm),
            np.array(rocker.axis_b_mm),
            pickups,
            pivot_hole_mm=plate.pivot_hole_mm,
            pickup_hole_mm=holes,
            edge_margin_mm=plate.edge_margin_mm,
            thickness_mm=plate.thickness_mm,
        )
    except GeometryError as exc:
        raise DesignFileError(
            design.source,
            f"rockers.{rocker.name}.plate",
            str(exc),
            "move the pickups apart or make the holes smaller",
        ) from None


def rocker_outlines(design: Design) -> dict[str, PlateOutline]:
    """Cut outline of every rocker that has plate data, by rocker name."""
    return {r.name: _outline(design, r) for r in design.rockers if r.plate is not None}


def rocker_mass_kg(
    design: Design, rocker: Rocker, outlines: dict[str, PlateOutline] | None = None
) -> float:
    """The rocker's mass: ``mass_kg`` when given, else its plate's, else 0."""
    if rocker.mass_kg is not None:
        return rocker.mass_kg
    if rocker.plate is None:
        return 0.0
    outline = (outlines or {}).get(rocker.name) or _outline(design, rocker)
    material = rocker_material(design, rocker.name)
    assert material is not None
    return outline.mass_kg(material.density_kg_m3)
