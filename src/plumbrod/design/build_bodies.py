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
from plumbrod.design.schema import children, entry


def read_chassis(s: BuildState, table: Any) -> None:
    s.r.table(table, "chassis", "chassis")
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
        r.table(ctable, key, "corners.*")
        suspension = r.value(ctable, key, "corners.*.suspension")
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
        corner = Corner(
            name=cname,
            wheel_centre_mm=r.value(ctable, key, "corners.*.wheel_centre_mm"),
            tyre_radius_mm=r.value(ctable, key, "corners.*.tyre_radius_mm"),
            tyre_width_mm=r.value(ctable, key, "corners.*.tyre_width_mm"),
            suspension=suspension,
            wishbones=wishbones,
            unsprung_mass_kg=r.value(ctable, key, "corners.*.unsprung_mass_kg"),
        )
        pickups = ctable.get("pickups", {})
        r.table(pickups, f"{key}.pickups", "corners.*.pickups", suspension)
        for part, ptable in pickups.items():
            s.add_pickups(f"{cname}.{part}", ptable, f"{key}.pickups.{part}")
        corners.append(corner)
    return corners


def _wishbones(s: BuildState, table: Any, key: str) -> Wishbones:
    r = s.r
    r.table(table, key, "corners.*.wishbones")
    p = {
        k.name: r.read(table[k.name], f"{key}.{k.name}", k)
        for k in children("corners.*.wishbones", frozenset((r.plane_tag,)))
    }
    if r.plane == "front":
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
    return Wishbones(**p)


# -- rockers ------------------------------------------------------------------
def read_rockers(s: BuildState, table: Any, corners: list[Corner]) -> list[Rocker]:
    r = s.r
    r.named(table, "rockers")
    rockers = []
    for name, rtable in table.items():
        key = join_key("rockers", name)
        r.name(name, key)
        r.table(rtable, key, "rockers.*")
        parent = r.value(rtable, key, "rockers.*.parent")
        if r.plane:
            pivot = r.value(rtable, key, "rockers.*.pivot_mm")
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
            spec = entry("rockers.*.axis_mm")
            axis_a = r.point(axis[0], f"{key}.axis_mm[0]", spec)
            axis_b = r.point(axis[1], f"{key}.axis_mm[1]", spec)
        mass = r.value(rtable, key, "rockers.*.mass_kg")
        plate = None
        if "plate" in rtable:
            plate = _plate(s, rtable["plate"], f"{key}.plate")
        rockers.append(Rocker(name, parent, axis_a, axis_b, mass, plate))
        s.add_pickups(name, rtable["pickups"], f"{key}.pickups")
    return rockers


def _plate(s: BuildState, table: Any, key: str) -> PlateSpec:
    r = s.r
    r.table(table, key, "rockers.*.plate")
    holes = r.named(table.get("holes_mm", {}), f"{key}.holes_mm")
    hole = entry("rockers.*.plate.holes_mm.*")
    path = "rockers.*.plate"
    return PlateSpec(
        thickness_mm=r.value(table, key, f"{path}.thickness_mm"),
        material=r.material(r.value(table, key, f"{path}.material"), f"{key}.material"),
        pivot_hole_mm=r.value(table, key, f"{path}.pivot_hole_mm"),
        hole_mm=r.value(table, key, f"{path}.hole_mm"),
        edge_margin_mm=r.value(table, key, f"{path}.edge_margin_mm"),
        holes_mm={k: r.number(v, f"{key}.holes_mm.{k}", spec=hole) for k, v in holes.items()},
    )
