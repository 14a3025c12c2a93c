"""Mirroring (``mirror = true``): copy every item whose name holds "left" to "right",
y negated."""

from __future__ import annotations

from dataclasses import replace
from typing import NoReturn, cast

from plumbrod.design.model import Design, Envelope, Pickup, Vec3, Wishbones, Zone
from plumbrod.design.reader import Reader


def _flip(point: Vec3) -> Vec3:
    return (point[0], -point[1], point[2])


def _flip_optional(point: Vec3 | None) -> Vec3 | None:
    return None if point is None else _flip(point)


def _flip_wishbones(w: Wishbones) -> Wishbones:
    """The mirror image of a corner's wishbone hardpoints (y negated)."""
    return Wishbones(
        upper_front_mm=_flip(w.upper_front_mm),
        upper_rear_mm=_flip(w.upper_rear_mm),
        upper_outer_mm=_flip(w.upper_outer_mm),
        lower_front_mm=_flip(w.lower_front_mm),
        lower_rear_mm=_flip(w.lower_rear_mm),
        lower_outer_mm=_flip(w.lower_outer_mm),
        tie_rod_inner_mm=_flip_optional(w.tie_rod_inner_mm),
        tie_rod_outer_mm=_flip_optional(w.tie_rod_outer_mm),
    )


def _right(name: str) -> str:
    return name.replace("left", "right")


def mirrored(design: Design, reader: Reader, pickup_where: dict[str, str]) -> Design:
    """The design with a right-hand copy of every item whose name contains ``left``."""

    def fail_twice(kind: str, name: str) -> NoReturn:
        reader.fail(
            f"{kind}.{name}",
            f"mirror = true would make '{name}', which exists",
            f"remove the '{name}' entry or rename the left-hand one",
        )

    corners = list(design.corners)
    for corner in design.corners:
        if "left" in corner.name:
            new = _right(corner.name)
            if any(c.name == new for c in corners):
                fail_twice("corners", new)
            w = corner.wishbones
            flipped_w = None if w is None else _flip_wishbones(w)
            corners.append(
                replace(
                    corner,
                    name=new,
                    wheel_centre_mm=_flip(corner.wheel_centre_mm),
                    wishbones=flipped_w,
                )
            )
    rockers = list(design.rockers)
    for rocker in design.rockers:
        if "left" in rocker.name:
            new = _right(rocker.name)
            if any(rk.name == new for rk in rockers):
                fail_twice("rockers", new)
            plate = rocker.plate
            if plate is not None:
                plate = replace(plate, holes_mm={_right(k): v for k, v in plate.holes_mm.items()})
            rockers.append(
                replace(
                    rocker,
                    name=new,
                    parent=_right(rocker.parent),
                    axis_a_mm=_flip(rocker.axis_a_mm),
                    axis_b_mm=_flip(rocker.axis_b_mm),
                    plate=plate,
                )
            )
    elements = list(design.elements)
    for element in design.elements:
        if "left" in element.name:
            new = _right(element.name)
            if any(e.name == new for e in elements):
                fail_twice("elements", new)
            env = element.envelope
            if env is not None:
                rx, ry, rz = env.rotation_deg
                env = Envelope(_flip(env.centre_mm), env.size_mm, (-rx, ry, -rz))
            elements.append(
                replace(
                    element,
                    name=new,
                    cg_mm=_flip(element.cg_mm),
                    centre_of_pressure_mm=_flip(element.centre_of_pressure_mm),
                    envelope=env,
                )
            )
    pickups = dict(design.pickups)
    for key, pickup in design.pickups.items():
        if "left" in key:
            new_key = _right(key)
            body, _, pname = new_key.rpartition(".")
            if new_key in pickups:
                reader.fail(
                    pickup_where.get(new_key, new_key),
                    f"mirror = true would make '{new_key}', which exists",
                    f"remove the '{new_key}' entry or rename the left-hand one",
                )
            pickups[new_key] = Pickup(body, pname, _flip(pickup.position_mm))
    rods = list(design.rods)
    for rod in design.rods:
        if "left" in rod.name:
            new = _right(rod.name)
            if any(x.name == new for x in rods):
                fail_twice("rods", new)
            rods.append(replace(rod, name=new, end_a=_right(rod.end_a), end_b=_right(rod.end_b)))
    zones = list(design.zones)
    for zone in design.zones:
        if "left" in zone.name:
            new = _right(zone.name)
            if any(z.name == new for z in zones):
                fail_twice("zones", new)
            zones.append(Zone(new, zone.kind, _flip_zone_params(zone), zone.clearance_mm))
    return replace(
        design,
        corners=tuple(corners),
        rockers=tuple(rockers),
        elements=tuple(elements),
        pickups=pickups,
        rods=tuple(rods),
        zones=tuple(zones),
    )


def _flip_zone_params(zone: Zone) -> dict[str, object]:
    # The reader stored each zone's parameters with the types cast to here.
    p = dict(zone.params)
    if zone.kind == "box":
        p["centre_mm"] = _flip(cast(Vec3, p["centre_mm"]))
        rx, ry, rz = cast(Vec3, p["rotation_deg"])
        p["rotation_deg"] = (-rx, ry, -rz)
    elif zone.kind == "cylinder":
        a, b = cast(tuple[Vec3, Vec3], p["axis_mm"])
        p["axis_mm"] = (_flip(a), _flip(b))
    elif zone.kind == "prism":
        plane = p["plane"]
        outline = cast(tuple[tuple[float, float], ...], p["outline_mm"])
        if plane == "side":  # extruded along y: flip the depth range
            d0, d1 = cast(tuple[float, float], p["depth_mm"])
            p["depth_mm"] = (-d1, -d0)
        elif plane == "front":  # [y, z] outline
            p["outline_mm"] = tuple((-u, v) for u, v in outline)
        else:  # top: [x, y]
            p["outline_mm"] = tuple((u, -v) for u, v in outline)
    return p
