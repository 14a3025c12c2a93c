"""Design-file sections that hold the carried elements and the rods:
[elements.<name>] (aero data, inertia, envelope) and [rods.<name>]."""

from __future__ import annotations

from typing import Any

from plumbrod.design.model import AeroData, Element, Envelope, Rod, Strike
from plumbrod.design.reader import BuildState, as3, join_key, shown

ELEMENT_KINDS = ("wing", "splitter", "undertray", "other")


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
        r.keys(
            etable,
            key,
            (
                "kind",
                "mass_kg",
                "cg_mm",
                "centre_of_pressure_mm",
                "pickups",
                "aero",
                "inertia_kg_m2",
                "envelope",
                "strike",
            ),
            required=("mass_kg", "cg_mm", "centre_of_pressure_mm", "pickups"),
        )
        aero = None
        if "aero" in etable:
            akey = f"{key}.aero"
            atable = r.keys(
                etable["aero"],
                akey,
                ("reference_area_m2", "downforce_coefficient", "drag_coefficient"),
                required=("reference_area_m2", "downforce_coefficient", "drag_coefficient"),
            )
            aero = AeroData(
                reference_area_m2=r.number(
                    atable["reference_area_m2"], f"{akey}.reference_area_m2", positive=True
                ),
                downforce_coefficient=r.number(
                    atable["downforce_coefficient"], f"{akey}.downforce_coefficient"
                ),
                drag_coefficient=r.number(
                    atable["drag_coefficient"], f"{akey}.drag_coefficient", non_negative=True
                ),
            )
        inertia = None
        if "inertia_kg_m2" in etable:
            values = r.numbers(
                etable["inertia_kg_m2"], f"{key}.inertia_kg_m2", 3, "[Ixx, Iyy, Izz] in kg·m²"
            )
            for i, v in enumerate(values):
                if v < 0:
                    r.fail(
                        f"{key}.inertia_kg_m2[{i}]",
                        f"expected zero or more, got {v}",
                        "moments of inertia cannot be negative",
                    )
            inertia = as3(values)
        strike = None
        if "strike" in etable:
            skey = f"{key}.strike"
            stable = r.keys(
                etable["strike"], skey, ("strike_N", "at_mm"), required=("strike_N", "at_mm")
            )
            strike = Strike(
                force_N=r.number(stable["strike_N"], f"{skey}.strike_N", positive=True),
                at_mm=r.point(stable["at_mm"], f"{skey}.at_mm"),
            )
        envelope = None
        if "envelope" in etable:
            vkey = f"{key}.envelope"
            vtable = r.keys(
                etable["envelope"],
                vkey,
                ("centre_mm", "size_mm", "rotation_deg"),
                required=("centre_mm", "size_mm"),
            )
            size = r.numbers(vtable["size_mm"], f"{vkey}.size_mm", 3, "[lx, ly, lz] in mm")
            for i, v in enumerate(size):
                if v <= 0:
                    r.fail(
                        f"{vkey}.size_mm[{i}]",
                        f"expected a positive size, got {v}",
                        "give the box's full length along each axis",
                    )
            envelope = Envelope(
                centre_mm=r.zone_point(vtable["centre_mm"], f"{vkey}.centre_mm"),
                size_mm=as3(size),
                rotation_deg=as3(
                    r.numbers(
                        vtable.get("rotation_deg", [0, 0, 0]),
                        f"{vkey}.rotation_deg",
                        3,
                        "[about x, about y, about z] in degrees",
                    )
                ),
            )
        elements.append(
            Element(
                name=name,
                inertia_kg_m2=inertia,
                envelope=envelope,
                kind=r.string(etable.get("kind", "other"), f"{key}.kind", ELEMENT_KINDS),
                mass_kg=r.number(etable["mass_kg"], f"{key}.mass_kg", non_negative=True),
                cg_mm=r.point(etable["cg_mm"], f"{key}.cg_mm"),
                centre_of_pressure_mm=r.point(
                    etable["centre_of_pressure_mm"], f"{key}.centre_of_pressure_mm"
                ),
                aero=aero,
                strike=strike,
            )
        )
        s.add_pickups(name, etable["pickups"], f"{key}.pickups")
    return elements


# -- rods ---------------------------------------------------------------------
def read_rods(s: BuildState, table: Any) -> list[Rod]:
    r = s.r
    r.keys(table, "rods", tuple(table) if isinstance(table, dict) else ())
    rods = []
    for name, rtable in table.items():
        key = join_key("rods", name)
        r.name(name, key)
        r.keys(
            rtable,
            key,
            (
                "ends",
                "material",
                "od_mm",
                "wall_mm",
                "solid",
                "end_fixity",
                "rod_end_rating_N",
                "rod_end_allowance_mm",
            ),
            required=("ends", "material", "od_mm"),
        )
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
        od = r.number(rtable["od_mm"], f"{key}.od_mm", positive=True)
        solid = r.boolean(rtable.get("solid", False), f"{key}.solid")
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
            wall = r.number(rtable["wall_mm"], f"{key}.wall_mm", positive=True)
            if wall >= od / 2.0:
                r.fail(
                    f"{key}.wall_mm",
                    f"expected a wall below half the OD ({od / 2} mm), got {wall}",
                    "check the wall, or use solid = true",
                )
        rating = None
        if "rod_end_rating_N" in rtable:
            rating = r.number(rtable["rod_end_rating_N"], f"{key}.rod_end_rating_N", positive=True)
        rods.append(
            Rod(
                name=name,
                end_a=ends[0],
                end_b=ends[1],
                material=r.string(rtable["material"], f"{key}.material"),
                od_mm=od,
                wall_mm=wall,
                end_fixity=r.number(
                    rtable.get("end_fixity", 1.0), f"{key}.end_fixity", positive=True
                ),
                rod_end_rating_N=rating,
                rod_end_allowance_mm=r.number(
                    rtable.get("rod_end_allowance_mm", 0.0),
                    f"{key}.rod_end_allowance_mm",
                    non_negative=True,
                ),
            )
        )
    return rods
