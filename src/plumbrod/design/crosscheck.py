"""Checks across sections once the whole design is read: names used once, every
reference (rocker parent, rod end, plate hole, load-case force) resolved, no
zero-length rod, pivot axis or wishbone."""

from __future__ import annotations

from plumbrod.design.model import CHASSIS, Design
from plumbrod.design.reader import MIN_LENGTH_MM, BuildState, guess, norm, sub


# -- cross-checks ---------------------------------------------------------------
def check_references(s: BuildState, design: Design, mirrored: bool) -> None:
    r = s.r
    bodies = design.body_names
    seen: dict[str, str] = {}
    for corner in design.corners:
        for body in corner.bodies:
            seen[body] = f"corners.{corner.name}"
    for kind, items in (("rockers", design.rockers), ("elements", design.elements)):
        for item in items:
            where = f"{kind}.{item.name}"
            if item.name in seen:
                r.fail(
                    where,
                    f"the name '{item.name}' is used twice (also {seen[item.name]})",
                    "give each body its own name",
                )
            seen[item.name] = where
    for corner in design.corners:
        if corner.name in seen:
            r.fail(
                f"corners.{corner.name}",
                f"the name '{corner.name}' is used twice (also {seen[corner.name]})",
                "give each corner its own name",
            )
    body_set = set(bodies)
    rocker_names = {rk.name for rk in design.rockers}
    element_names = {e.name for e in design.elements}
    for rocker in design.rockers:
        key = f"rockers.{rocker.name}.parent"
        allowed = [CHASSIS] + [b for c in design.corners for b in c.bodies]
        allowed += sorted(element_names)
        if rocker.parent not in body_set:
            r.fail(
                key,
                f"no body '{rocker.parent}'",
                guess(
                    rocker.parent,
                    allowed,
                    "use chassis or a corner body such as <corner>.lower",
                ),
            )
        if rocker.parent in rocker_names:
            r.fail(
                key,
                f"'{rocker.parent}' is a rocker and cannot carry another rocker",
                "mount rockers on the chassis, an upright, a wishbone or an element (an equaliser)",
            )
    names = list(design.pickups)
    for rod in design.rods:
        for i, end in enumerate((rod.end_a, rod.end_b)):
            key = f"rods.{rod.name}.ends[{i}]"
            if end not in design.pickups:
                body = end.rsplit(".", 1)[0] if "." in end else end
                if "." not in end or body not in body_set:
                    r.fail(key, f"no body for '{end}'", guess(end, names, "write <body>.<pickup>"))
                r.fail(
                    key,
                    f"no pickup '{end}'",
                    guess(end, names, f"add it under the pickups of '{body}'"),
                )
        body_a = design.pickups[rod.end_a].body
        body_b = design.pickups[rod.end_b].body
        if body_a == body_b:
            r.fail(
                f"rods.{rod.name}.ends",
                f"both ends are on the body '{body_a}'",
                "a rod joins two different bodies",
            )
    used = {rod.end_a for rod in design.rods} | {rod.end_b for rod in design.rods}
    for element in design.elements:
        if not any(design.pickups[p].body == element.name for p in used):
            r.fail(
                f"elements.{element.name}",
                "no rod reaches this element",
                "join its pickups to the routes with [rods.<name>] tables",
            )
    rod_names = [rod.name for rod in design.rods]
    if len(set(rod_names)) != len(rod_names):
        dup = next(n for n in rod_names if rod_names.count(n) > 1)
        r.fail(f"rods.{dup}", "the name is used twice", "rename one of the rods")
    for rocker in design.rockers:
        if rocker.plate is not None:
            for hole in rocker.plate.holes_mm:
                if f"{rocker.name}.{hole}" not in design.pickups:
                    r.fail(
                        f"rockers.{rocker.name}.plate.holes_mm.{hole}",
                        f"no pickup '{hole}' on this rocker",
                        guess(
                            hole,
                            [p.name for p in design.pickups.values() if p.body == rocker.name],
                            "check the name",
                        ),
                    )
    for case in design.load_cases:
        for element in design.elements:
            if element.aero is None and element.name not in case.forces_N:
                r.fail(
                    f"load_cases.{case.name}.forces_N.{element.name}",
                    "missing key",
                    f"give [elements.{element.name}.aero] data, or the forces in N",
                )
    del mirrored


def check_geometry(s: BuildState, design: Design, mirrored: bool) -> None:
    r = s.r
    for rod in design.rods:
        a = design.pickups[rod.end_a].position_mm
        b = design.pickups[rod.end_b].position_mm
        if norm(sub(a, b)) < MIN_LENGTH_MM:
            r.fail(
                f"rods.{rod.name}.ends",
                f"zero-length rod: '{rod.end_a}' and '{rod.end_b}' are at the same point {list(a)}",
                "move one of the two pickups",
            )
    for rocker in design.rockers:
        if norm(sub(rocker.axis_a_mm, rocker.axis_b_mm)) < MIN_LENGTH_MM:
            r.fail(
                f"rockers.{rocker.name}.axis_mm",
                "zero-length pivot axis: the two points coincide",
                "give two distinct points on the pivot axis",
            )
    for corner in design.corners:
        w = corner.wishbones
        if w is None:
            continue
        key = f"corners.{corner.name}.wishbones"
        for side in ("upper", "lower"):
            front = getattr(w, f"{side}_front_mm")
            rear = getattr(w, f"{side}_rear_mm")
            if norm(sub(front, rear)) < MIN_LENGTH_MM:
                r.fail(
                    f"{key}.{side}_front_mm",
                    f"zero-length pivot axis: the {side} wishbone's inner pivots coincide",
                    "move one inner pivot",
                )
        if (
            w.tie_rod_inner_mm is not None
            and w.tie_rod_outer_mm is not None
            and norm(sub(w.tie_rod_inner_mm, w.tie_rod_outer_mm)) < MIN_LENGTH_MM
        ):
            r.fail(f"{key}.tie_rod_inner_mm", "zero-length tie rod", "move one of its ends")
        if norm(sub(w.upper_outer_mm, w.lower_outer_mm)) < MIN_LENGTH_MM:
            r.fail(
                f"{key}.upper_outer_mm",
                "the two outer ball joints coincide",
                "move one of them",
            )
    del mirrored
