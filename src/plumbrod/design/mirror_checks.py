"""Two mistakes ``mirror = true`` makes easy, named before they become a puzzling sweep
failure: an item named *left* that lies on the right-hand side (y < 0; ISO 8855 y points
left), and a rod named *left* whose copy lands on the same pickups and doubles it."""

from __future__ import annotations

import math

from plumbrod.design.model import Design, Vec3
from plumbrod.design.reader import Reader

__all__ = ["check_doubled_rods", "check_left_side"]

SIDE_TOL_MM = 1e-9


def _right_hand(reader: Reader, key: str, name: str, y: float) -> None:
    reader.fail(
        key,
        f"'{name}' is named left but lies at y = {y:+.1f} mm, on the right-hand side "
        f"(ISO 8855: y points to the left); mirror = true would copy it to y = {-y:+.1f} mm "
        f"as '{name.replace('left', 'right')}', swapping the sides",
        "make its y coordinates positive, or rename it without 'left'",
    )


def check_left_side(design: Design, reader: Reader, pickup_where: dict[str, str]) -> None:
    """Fail on an item named *left* whose position is at y < 0 (before mirroring)."""
    for corner in design.corners:
        if "left" in corner.name and corner.wheel_centre_mm[1] < -SIDE_TOL_MM:
            key = f"corners.{corner.name}.wheel_centre_mm"
            _right_hand(reader, key, corner.name, corner.wheel_centre_mm[1])
    for rocker in design.rockers:
        y = (rocker.axis_a_mm[1] + rocker.axis_b_mm[1]) / 2.0
        if "left" in rocker.name and y < -SIDE_TOL_MM:
            _right_hand(reader, f"rockers.{rocker.name}", rocker.name, y)
    for element in design.elements:
        if "left" in element.name and element.cg_mm[1] < -SIDE_TOL_MM:
            _right_hand(reader, f"elements.{element.name}.cg_mm", element.name, element.cg_mm[1])
    for key, pickup in design.pickups.items():
        if "left" in key and pickup.position_mm[1] < -SIDE_TOL_MM:
            _right_hand(reader, pickup_where.get(key, key), key, pickup.position_mm[1])


def _same(a: Vec3, b: Vec3) -> bool:
    return math.dist(a, b) <= SIDE_TOL_MM


def check_doubled_rods(before: Design, after: Design, reader: Reader) -> None:
    """Fail when a rod's mirrored copy joins the same points as a rod that exists."""
    original = {rod.name for rod in before.rods}
    for rod in after.rods:
        if rod.name in original:
            continue
        source = next(r for r in before.rods if r.name.replace("left", "right") == rod.name)
        a = after.pickups[rod.end_a].position_mm
        b = after.pickups[rod.end_b].position_mm
        for other in after.rods:
            if other.name == rod.name:
                continue
            oa = after.pickups[other.end_a].position_mm
            ob = after.pickups[other.end_b].position_mm
            if (_same(a, oa) and _same(b, ob)) or (_same(a, ob) and _same(b, oa)):
                reader.fail(
                    f"rods.{source.name}",
                    f"mirror = true copies rod '{source.name}' to '{rod.name}', which joins "
                    f"the same points as rod '{other.name}' ('{rod.end_a}' and "
                    f"'{rod.end_b}'): the two would double one rod (a redundant pair that "
                    "fights)",
                    "name its pickups *left* too, so that the copy lands on the right, or "
                    "rename the rod without 'left'",
                )
