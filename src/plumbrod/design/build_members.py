"""Design-file sections that hold the carried elements and the rods:
[elements.<name>] (aero data, inertia, envelope) and [rods.<name>]."""

from __future__ import annotations

from typing import Any

from plumbrod.design.model import AeroData, Element, Envelope, Rod, Strike
from plumbrod.design.reader import BuildState, join_key, shown
from plumbrod.design.schema import entry

ELEMENT_KINDS = entry("elements.*.kind").choices


# -- elements -----------------------------------------------------------------
def read_elements(s: BuildState, table: Any) -> list[Element]:
    r = s.r
    if not isinstance(table, dict) or not table:
        r.fail(
            "elements",
            "expected at least one [elements.<name>] table",
            "add the wing, splitter or undertray the routes carry",
        )
    elements = []
    for name, etable in table.items():
        key = join_key("elements", name)
        r.name(name, key)
        r.table(etable, key, "elements.*")
        aero = None
        if "aero" in etable:
            akey = f"{key}.aero"
            atable = r.table(etable["aero"], akey, "elements.*.aero")
            path = "elements.*.aero"
            aero = AeroData(
                reference_area_m2=r.value(atable, akey, f"{path}.reference_area_m2"),
                downforce_coefficient=r.value(atable, akey, f"{path}.downforce_coefficient"),
                drag_coefficient=r.value(atable, akey, f"{path}.drag_coefficient"),
            )
        inertia = r.value(etable, key, "elements.*.inertia_kg_m2")
        strike = None
        if "strike" in etable:
            skey = f"{key}.strike"
            stable = r.table(etable["strike"], skey, "elements.*.strike")
            strike = Strike(
                force_N=r.value(stable, skey, "elements.*.strike.strike_N"),
                at_mm=r.value(stable, skey, "elements.*.strike.at_mm"),
            )
        envelope = None
        if "envelope" in etable:
            vkey = f"{key}.envelope"
            vtable = r.table(etable["envelope"], vkey, "elements.*.envelope")
            path = "elements.*.envelope"
            size = r.value(vtable, vkey, f"{path}.size_mm")
            envelope = Envelope(
                centre_mm=r.value(vtable, vkey, f"{path}.centre_mm"),
                size_mm=size,
                rotation_deg=r.value(vtable, vkey, f"{path}.rotation_deg"),
            )
        elements.append(
            Element(
                name=name,
                inertia_kg_m2=inertia,
                envelope=envelope,
                kind=r.value(etable, key, "elements.*.kind"),
                mass_kg=r.value(etable, key, "elements.*.mass_kg"),
                cg_mm=r.value(etable, key, "elements.*.cg_mm"),
                centre_of_pressure_mm=r.value(etable, key, "elements.*.centre_of_pressure_mm"),
                aero=aero,
                strike=strike,
            )
        )
        s.add_pickups(name, etable["pickups"], f"{key}.pickups")
    return elements


# -- rods ---------------------------------------------------------------------
def read_rods(s: BuildState, table: Any) -> list[Rod]:
    r = s.r
    r.named(table, "rods")
    rods = []
    for name, rtable in table.items():
        key = join_key("rods", name)
        r.name(name, key)
        r.table(rtable, key, "rods.*")
        ends = rtable["ends"]
        if (
            not isinstance(ends, list)
            or len(ends) != 2
            or not all(isinstance(e, str) for e in ends)
        ):
            r.fail(
                f"{key}.ends",
                f"expected two pickup names, got {shown(ends)}",
                'write ends = ["body.pickup", "body.pickup"]',
            )
        od = r.value(rtable, key, "rods.*.od_mm")
        solid = r.value(rtable, key, "rods.*.solid")
        wall: float | None
        if solid:
            if "wall_mm" in rtable:
                r.fail(
                    f"{key}.wall_mm",
                    "a solid bar has no wall",
                    "remove wall_mm, or remove solid = true for a tube",
                )
            wall = None
        else:
            if "wall_mm" not in rtable:
                r.fail(
                    f"{key}.wall_mm",
                    "missing key",
                    "add the tube wall in mm, or solid = true for a bar",
                )
            wall = r.value(rtable, key, "rods.*.wall_mm")
            if wall >= od / 2.0:
                r.fail(
                    f"{key}.wall_mm",
                    f"expected a wall below half the OD ({od / 2} mm), got {wall}",
                    "check the wall, or use solid = true",
                )
        rating = r.value(rtable, key, "rods.*.rod_end_rating_N")
        rods.append(
            Rod(
                name=name,
                end_a=ends[0],
                end_b=ends[1],
                material=r.material(r.value(rtable, key, "rods.*.material"), f"{key}.material"),
                od_mm=od,
                wall_mm=wall,
                end_fixity=r.value(rtable, key, "rods.*.end_fixity"),
                rod_end_rating_N=rating,
                rod_end_allowance_mm=r.value(rtable, key, "rods.*.rod_end_allowance_mm"),
            )
        )
    return rods
