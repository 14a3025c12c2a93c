"""Design-file sections that hold bodies: [chassis], [corners.<name>] (with wishbones)
and [rockers.<name>] (with plate data)."""

from __future__ import annotations

from typing import Any

from plumbrod.design.model import (
    CHASSIS,
    PLANE_NORMAL_AXIS,
    Corner,
    PlateSpec,
    Rocker,
    Wishbones,
)
from plumbrod.design.reader import BuildState, join_key, shown, sub, type_name

_WISHBONE_KEYS_3D = (
    "upper_front_mm",
    "upper_rear_mm",
    "upper_outer_mm",
    "lower_front_mm",
    "lower_rear_mm",
    "lower_outer_mm",
    "tie_rod_inner_mm",
    "tie_rod_outer_mm",
)
_WISHBONE_KEYS_FRONT = ("upper_inner_mm", "upper_outer_mm", "lower_inner_mm", "lower_outer_mm")
CORNER_BODY_PARTS = {"slider": ("upright",), "double_wishbone": ("upright", "upper", "lower")}


def read_chassis(s: BuildState, table: Any) -> None:
    s.r.keys(table, "chassis", ("pickups",))
    s.add_pickups(CHASSIS, table.get("pickups", {}), "chassis.pickups")


# -- corners ------------------------------------------------------------------
def read_corners(s: BuildState, table: Any) -> list[Corner]:
    r = s.r
    if not isinstance(table, dict) or not table:
        r.fail(
            "corners",
            "expected at least one [corners.<name>] table",
            "add one per wheel the routes reach",
        )
    corners = []
    for cname, ctable in table.items():
        key = join_key("corners", cname)
        r.name(cname, key)
        r.keys(
            ctable,
            key,
            (
                "wheel_centre_mm",
                "tyre_radius_mm",
                "tyre_width_mm",
                "suspension",
                "wishbones",
                "unsprung_mass_kg",
                "pickups",
            ),
            required=("wheel_centre_mm", "tyre_radius_mm", "tyre_width_mm", "suspension"),
        )
        suspension = r.string(
            ctable["suspension"], f"{key}.suspension", ("slider", "double_wishbone")
        )
        wishbones = None
        if suspension == "double_wishbone":
            if "wishbones" not in ctable:
                r.fail(
                    f"{key}.wishbones",
                    "missing key",
                    "add a [" + key + ".wishbones] table with the hardpoints",
                )
            wishbones = _wishbones(s, ctable["wishbones"], f"{key}.wishbones")
        elif "wishbones" in ctable:
            r.fail(
                f"{key}.wishbones",
                "a slider corner has no wishbones",
                'remove the table, or set suspension = "double_wishbone"',
            )
        if r.plane == "side" and suspension == "double_wishbone":
            r.fail(
                f"{key}.suspension",
                "a side-view planar design cannot hold wishbones",
                'use suspension = "slider", or plane = "front"',
            )
        unsprung = None
        if "unsprung_mass_kg" in ctable:
            unsprung = r.number(
                ctable["unsprung_mass_kg"], f"{key}.unsprung_mass_kg", non_negative=True
            )
        corner = Corner(
            name=cname,
            wheel_centre_mm=r.point(ctable["wheel_centre_mm"], f"{key}.wheel_centre_mm"),
            tyre_radius_mm=r.number(
                ctable["tyre_radius_mm"], f"{key}.tyre_radius_mm", positive=True
            ),
            tyre_width_mm=r.number(ctable["tyre_width_mm"], f"{key}.tyre_width_mm", positive=True),
            suspension=suspension,  # type: ignore[arg-type]
            wishbones=wishbones,
            unsprung_mass_kg=unsprung,
        )
        pickups = ctable.get("pickups", {})
        parts = CORNER_BODY_PARTS[suspension]
        r.keys(pickups, f"{key}.pickups", parts)
        for part, ptable in pickups.items():
            s.add_pickups(f"{cname}.{part}", ptable, f"{key}.pickups.{part}")
        corners.append(corner)
    return corners


def _wishbones(s: BuildState, table: Any, key: str) -> Wishbones:
    r = s.r
    if r.plane == "front":
        r.keys(table, key, _WISHBONE_KEYS_FRONT, required=_WISHBONE_KEYS_FRONT)
        p = {k: r.point(table[k], f"{key}.{k}") for k in _WISHBONE_KEYS_FRONT}
        ahead = (1.0, 0.0, 0.0)  # the planar pivot axis runs along x
        return Wishbones(
            upper_front_mm=p["upper_inner_mm"],
            upper_rear_mm=sub(p["upper_inner_mm"], ahead),
            upper_outer_mm=p["upper_outer_mm"],
            lower_front_mm=p["lower_inner_mm"],
            lower_rear_mm=sub(p["lower_inner_mm"], ahead),
            lower_outer_mm=p["lower_outer_mm"],
            tie_rod_inner_mm=None,
            tie_rod_outer_mm=None,
        )
    r.keys(table, key, _WISHBONE_KEYS_3D, required=_WISHBONE_KEYS_3D)
    p = {k: r.point(table[k], f"{key}.{k}") for k in _WISHBONE_KEYS_3D}
    return Wishbones(**p)


# -- rockers ------------------------------------------------------------------
def read_rockers(s: BuildState, table: Any, corners: list[Corner]) -> list[Rocker]:
    r = s.r
    r.keys(table, "rockers", tuple(table) if isinstance(table, dict) else ())
    rockers = []
    for name, rtable in table.items():
        key = join_key("rockers", name)
        r.name(name, key)
        axis_key = "pivot_mm" if r.plane else "axis_mm"
        r.keys(
            rtable,
            key,
            ("parent", axis_key, "pickups", "mass_kg", "plate"),
            required=("parent", axis_key, "pickups"),
        )
        parent = r.string(rtable["parent"], f"{key}.parent")
        if r.plane:
            pivot = r.point(rtable["pivot_mm"], f"{key}.pivot_mm")
            normal = [0.0, 0.0, 0.0]
            normal[PLANE_NORMAL_AXIS[r.plane]] = 1.0
            axis_a, axis_b = sub(pivot, tuple(normal)), pivot  # type: ignore[arg-type]
        else:
            axis = rtable["axis_mm"]
            if not isinstance(axis, list) or len(axis) != 2:
                r.fail(
                    f"{key}.axis_mm",
                    f"expected two points on the pivot axis, got {type_name(axis)} {shown(axis)}",
                    "write [[x, y, z], [x, y, z]]",
                )
            axis_a = r.point(axis[0], f"{key}.axis_mm[0]")
            axis_b = r.point(axis[1], f"{key}.axis_mm[1]")
        mass = None
        if "mass_kg" in rtable:
            mass = r.number(rtable["mass_kg"], f"{key}.mass_kg", non_negative=True)
        plate = None
        if "plate" in rtable:
            plate = _plate(s, rtable["plate"], f"{key}.plate")
        rockers.append(Rocker(name, parent, axis_a, axis_b, mass, plate))
        s.add_pickups(name, rtable["pickups"], f"{key}.pickups")
    return rockers


def _plate(s: BuildState, table: Any, key: str) -> PlateSpec:
    r = s.r
    r.keys(
        table,
        key,
        ("thickness_mm", "material", "pivot_hole_mm", "hole_mm", "holes_mm", "edge_margin_mm"),
        required=("thickness_mm", "material"),
    )
    holes = table.get("holes_mm", {})
    r.keys(holes, f"{key}.holes_mm", tuple(holes) if isinstance(holes, dict) else ())
    return PlateSpec(
        thickness_mm=r.number(table["thickness_mm"], f"{key}.thickness_mm", positive=True),
        material=r.string(table["material"], f"{key}.material"),
        pivot_hole_mm=r.number(
            table.get("pivot_hole_mm", 10.0), f"{key}.pivot_hole_mm", positive=True
        ),
        hole_mm=r.number(table.get("hole_mm", 8.0), f"{key}.hole_mm", positive=True),
        edge_margin_mm=r.number(
            table.get("edge_margin_mm", 6.0), f"{key}.edge_margin_mm", positive=True
        ),
        holes_mm={k: r.number(v, f"{key}.holes_mm.{k}", positive=True) for k, v in holes.items()},
    )
