"""Build a :class:`~plumbrod.design.model.Design` from the parsed TOML tables: the
[design] head, then each section in turn, mirroring, and the cross-checks."""

from __future__ import annotations

from typing import Any

from plumbrod.design.build_bodies import read_chassis, read_corners, read_rockers
from plumbrod.design.build_members import read_elements, read_rods
from plumbrod.design.build_setup import (
    read_limits,
    read_load_cases,
    read_materials,
    read_sweeps,
    read_zones,
)
from plumbrod.design.car import car_layout, read_car, with_default_motion_centre
from plumbrod.design.crosscheck import check_geometry, check_references
from plumbrod.design.mirror import mirrored
from plumbrod.design.mirror_checks import check_doubled_rods, check_left_side
from plumbrod.design.model import Design
from plumbrod.design.reader import BuildState
from plumbrod.design.schema import children
from plumbrod.design.tradeoff_spec import read_tradeoff

TOP_LEVEL_KEYS = tuple(k.name for k in children(""))


def build_design(data: dict[str, Any], source: str) -> Design:
    """The validated design of the parsed tables ``data``; ``source`` names the file."""
    s = BuildState(source)
    r = s.r
    r.table(data, "", "")
    head = r.table(data["design"], "design", "design")
    name = r.value(head, "design", "design.name")
    note = r.value(head, "design", "design.note")
    plane = r.value(head, "design", "design.plane")
    mirror = r.value(head, "design", "design.mirror")
    top_speed = r.value(head, "design", "design.top_speed_kmh")
    if mirror and plane == "side":
        r.fail(
            "design.mirror",
            "a side-view planar design has no left and right",
            'remove mirror, or use plane = "front"',
        )
    r.plane = plane

    read_chassis(s, data.get("chassis", {}))
    corners = read_corners(s, data["corners"])
    rockers = read_rockers(s, data.get("rockers", {}), corners)
    elements = read_elements(s, data["elements"])
    rods = read_rods(s, data.get("rods", {}))
    sweeps = read_sweeps(s, data.get("sweeps", {}), plane)
    limits = read_limits(s, data.get("limits", {}))
    materials = read_materials(s, data.get("materials", {}))
    load_cases = read_load_cases(s, data.get("load_cases", {}), elements)
    zones = read_zones(s, data.get("zones", {}))
    car = read_car(r, data.get("car", {}))
    tradeoff = read_tradeoff(data.get("tradeoff"), r)

    design = Design(
        name=name,
        source=source,
        plane=plane,
        corners=tuple(corners),
        rockers=tuple(rockers),
        rods=tuple(rods),
        elements=tuple(elements),
        pickups=dict(s.pickups),
        sweeps=sweeps,
        limits=limits,
        load_cases=tuple(load_cases),
        materials=tuple(materials),
        zones=tuple(zones),
        note=note,
        top_speed_kmh=top_speed,
        car=car,
        motion_centre_given="motion_centre_mm" in data.get("sweeps", {}),
        tradeoff=tradeoff,
    )
    single = design
    if mirror:
        check_left_side(design, r, s.pickup_where)
        design = mirrored(design, r, s.pickup_where)
    check_references(s, design, mirror)
    if mirror:
        check_doubled_rods(single, design, r)
    check_geometry(s, design, mirror)
    car_layout(design)  # the corners make a two-axle car that agrees with [car]
    return with_default_motion_centre(design)
