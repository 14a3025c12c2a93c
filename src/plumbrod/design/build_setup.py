"""Design-file sections around the linkage: [sweeps], [limits], [materials],
[load_cases] and [zones]."""

from __future__ import annotations

from typing import Any

from plumbrod.design.model import Element, Limits, LoadCase, MaterialSpec, Sweeps, Zone
from plumbrod.design.reader import MIN_LENGTH_MM, BuildState, as3, join_key, norm, shown, sub


# -- sweeps and limits --------------------------------------------------------
def read_sweeps(s: BuildState, table: Any, plane: str | None) -> Sweeps:
    r = s.r
    r.keys(table, "sweeps", ("travel", "heave", "roll", "pitch", "heave_roll", "motion_centre_mm"))
    defaults = Sweeps()
    values: dict[str, Any] = {}
    for kind, unit in (("travel", "mm"), ("heave", "mm"), ("roll", "deg"), ("pitch", "deg")):
        range_key = f"range_{unit}"
        if kind not in table:
            continue
        key = f"sweeps.{kind}"
        sub = r.keys(table[kind], key, (range_key, "steps", "enabled"))
        if not r.boolean(sub.get("enabled", True), f"{key}.enabled"):
            values[f"{kind}_{unit}"] = None
            continue
        if range_key in sub:
            values[f"{kind}_{unit}"] = r.range_(sub[range_key], f"{key}.{range_key}")
        if "steps" in sub:
            values[f"{kind}_steps"] = r.integer(sub["steps"], f"{key}.steps", minimum=3)
    if plane == "side":
        if table.get("roll", {}).get("enabled", False):
            r.fail("sweeps.roll", "a side-view planar design cannot roll", "remove [sweeps.roll]")
        values["roll_deg"] = None
    if plane == "front":
        if table.get("pitch", {}).get("enabled", False):
            r.fail(
                "sweeps.pitch",
                "a front-view planar design cannot pitch",
                "remove [sweeps.pitch]",
            )
        values["pitch_deg"] = None
    if "heave_roll" in table:
        key = "sweeps.heave_roll"
        sub = r.keys(
            table["heave_roll"],
            key,
            ("steps", "range_heave_mm", "range_roll_deg"),
            required=("steps",),
        )
        if "range_heave_mm" in sub:
            values["heave_roll_heave_mm"] = r.range_(sub["range_heave_mm"], f"{key}.range_heave_mm")
        if "range_roll_deg" in sub:
            values["heave_roll_roll_deg"] = r.range_(sub["range_roll_deg"], f"{key}.range_roll_deg")
        steps = sub["steps"]
        if not isinstance(steps, list) or len(steps) != 2:
            r.fail(
                f"{key}.steps",
                f"expected [heave steps, roll steps], got {shown(steps)}",
                "write steps = [41, 41]",
            )
        if plane == "side":
            r.fail(key, "a side-view planar design cannot roll", "remove [sweeps.heave_roll]")
        values["heave_roll_steps"] = (
            r.integer(steps[0], f"{key}.steps[0]", minimum=3),
            r.integer(steps[1], f"{key}.steps[1]", minimum=3),
        )
    if "motion_centre_mm" in table:
        values["motion_centre_mm"] = r.point(table["motion_centre_mm"], "sweeps.motion_centre_mm")
    sweeps = Sweeps(**{**defaults.__dict__, **values})
    if sweeps.heave_roll_steps and (sweeps.grid_heave_mm is None or sweeps.grid_roll_deg is None):
        r.fail(
            "sweeps.heave_roll",
            "the grid needs both the heave and the roll range",
            "enable [sweeps.heave] and [sweeps.roll], or give range_heave_mm and "
            "range_roll_deg under [sweeps.heave_roll]",
        )
    return sweeps


def read_limits(s: BuildState, table: Any) -> Limits:
    r = s.r
    fields = Limits.__dataclass_fields__
    r.keys(table, "limits", tuple(fields))
    values: dict[str, Any] = {}
    for name, value in table.items():
        key = f"limits.{name}"
        if name in ("route_ratio", "transmission_angle_deg"):
            values[name] = r.range_(value, key)
        else:
            values[name] = r.number(value, key, positive=True)
    return Limits(**values)


# -- materials, load cases, zones ------------------------------------------------
def read_materials(s: BuildState, table: Any) -> list[MaterialSpec]:
    r = s.r
    r.keys(table, "materials", tuple(table) if isinstance(table, dict) else ())
    specs = []
    for mid, mtable in table.items():
        key = join_key("materials", mid)
        fields = ("modulus_MPa", "yield_MPa", "ultimate_MPa", "density_kg_m3")
        r.keys(mtable, key, (*fields, "source"), required=(*fields, "source"))
        v = {f: r.number(mtable[f], f"{key}.{f}", positive=True) for f in fields}
        specs.append(MaterialSpec(id=mid, source=r.string(mtable["source"], f"{key}.source"), **v))
    return specs


def read_load_cases(s: BuildState, table: Any, elements: list[Element]) -> list[LoadCase]:
    r = s.r
    r.keys(table, "load_cases", tuple(table) if isinstance(table, dict) else ())
    names = [e.name for e in elements]
    cases = []
    for cname, ctable in table.items():
        key = join_key("load_cases", cname)
        r.keys(
            ctable,
            key,
            (
                "speed_kmh",
                "bump_g",
                "longitudinal_g",
                "lateral_g",
                "air_density_kg_m3",
                "forces_N",
                "at_mm",
            ),
        )
        forces = ctable.get("forces_N", {})
        r.keys(forces, f"{key}.forces_N", names)
        needs_speed = [e.name for e in elements if e.name not in forces and e.aero is not None]
        if "speed_kmh" not in ctable and needs_speed:
            r.fail(
                f"{key}.speed_kmh",
                "missing key",
                f"add the speed in km/h for the aero data of '{needs_speed[0]}', "
                "or give forces_N for every element",
            )
        at = ctable.get("at_mm", {})
        r.keys(at, f"{key}.at_mm", names)
        for e in at:
            if e not in forces:
                r.fail(
                    f"{key}.at_mm.{e}",
                    "a point without a force",
                    f"give forces_N.{e} too, or remove the point (the aero force acts at "
                    "the centre of pressure)",
                )
        cases.append(
            LoadCase(
                name=cname,
                speed_kmh=r.number(
                    ctable.get("speed_kmh", 0.0), f"{key}.speed_kmh", non_negative=True
                ),
                bump_g=r.number(ctable.get("bump_g", 0.0), f"{key}.bump_g"),
                longitudinal_g=r.number(ctable.get("longitudinal_g", 0.0), f"{key}.longitudinal_g"),
                lateral_g=r.number(ctable.get("lateral_g", 0.0), f"{key}.lateral_g"),
                air_density_kg_m3=r.number(
                    ctable.get("air_density_kg_m3", 1.225),
                    f"{key}.air_density_kg_m3",
                    positive=True,
                ),
                forces_N={
                    e: as3(r.numbers(v, f"{key}.forces_N.{e}", 3, "[Fx, Fy, Fz] in N"))
                    for e, v in forces.items()
                },
                forces_at_mm={e: r.point(v, f"{key}.at_mm.{e}") for e, v in at.items()},
            )
        )
    return cases


def read_zones(s: BuildState, table: Any) -> list[Zone]:
    r = s.r
    r.keys(table, "zones", tuple(table) if isinstance(table, dict) else ())
    zones = []
    for zname, ztable in table.items():
        key = join_key("zones", zname)
        r.name(zname, key)
        if not isinstance(ztable, dict):
            r.keys(ztable, key, ())
        if "kind" not in ztable:
            r.fail(f"{key}.kind", "missing key", 'add kind = "box", "cylinder" or "prism"')
        kind = r.string(ztable["kind"], f"{key}.kind", ("box", "cylinder", "prism"))
        shared = ("kind", "clearance_mm")
        params: dict[str, object] = {}
        if kind == "box":
            r.keys(
                ztable,
                key,
                (*shared, "centre_mm", "size_mm", "rotation_deg"),
                required=("centre_mm", "size_mm"),
            )
            params["centre_mm"] = r.zone_point(ztable["centre_mm"], f"{key}.centre_mm")
            size = r.numbers(ztable["size_mm"], f"{key}.size_mm", 3, "[lx, ly, lz] in mm")
            for i, length in enumerate(size):
                if length <= 0:
                    r.fail(
                        f"{key}.size_mm[{i}]",
                        f"expected a positive size, got {length}",
                        "give the box's full length along each axis",
                    )
            params["size_mm"] = size
            params["rotation_deg"] = r.numbers(
                ztable.get("rotation_deg", [0, 0, 0]),
                f"{key}.rotation_deg",
                3,
                "[about x, about y, about z] in degrees",
            )
        elif kind == "cylinder":
            r.keys(
                ztable,
                key,
                (*shared, "axis_mm", "radius_mm"),
                required=("axis_mm", "radius_mm"),
            )
            axis = ztable["axis_mm"]
            if not isinstance(axis, list) or len(axis) != 2:
                r.fail(
                    f"{key}.axis_mm",
                    f"expected the two end points, got {shown(axis)}",
                    "write [[x, y, z], [x, y, z]]",
                )
            a = r.zone_point(axis[0], f"{key}.axis_mm[0]")
            b = r.zone_point(axis[1], f"{key}.axis_mm[1]")
            if norm(sub(a, b)) < MIN_LENGTH_MM:
                r.fail(f"{key}.axis_mm", "the two end points coincide", "give two distinct points")
            params["axis_mm"] = (a, b)
            params["radius_mm"] = r.number(ztable["radius_mm"], f"{key}.radius_mm", positive=True)
        else:
            r.keys(
                ztable,
                key,
                (*shared, "plane", "outline_mm", "depth_mm"),
                required=("plane", "outline_mm", "depth_mm"),
            )
            params["plane"] = r.string(ztable["plane"], f"{key}.plane", ("front", "side", "top"))
            outline = ztable["outline_mm"]
            if not isinstance(outline, list) or len(outline) < 3:
                r.fail(
                    f"{key}.outline_mm",
                    "expected at least three [a, b] corners",
                    "list the polygon's corners in order",
                )
            params["outline_mm"] = tuple(
                r.numbers(p, f"{key}.outline_mm[{i}]", 2, "a corner [a, b] in mm")
                for i, p in enumerate(outline)
            )
            params["depth_mm"] = r.range_(ztable["depth_mm"], f"{key}.depth_mm")
        clearance = None
        if "clearance_mm" in ztable:
            clearance = r.number(ztable["clearance_mm"], f"{key}.clearance_mm", non_negative=True)
        zones.append(Zone(zname, kind, params, clearance))  # type: ignore[arg-type]
    return zones
