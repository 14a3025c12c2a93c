"""Design-file sections around the linkage: [sweeps], [limits], [materials],
[load_cases] and [zones]."""

from __future__ import annotations

from typing import Any

from plumbrod.design.model import Element, Limits, LoadCase, MaterialSpec, Sweeps, Zone
from plumbrod.design.reader import MIN_LENGTH_MM, BuildState, join_key, norm, shown, sub
from plumbrod.design.schema import MAX_GRID_POSES, children, entry


# -- sweeps and limits --------------------------------------------------------
def read_sweeps(s: BuildState, table: Any, plane: str | None) -> Sweeps:
    r = s.r
    r.table(table, "sweeps", "sweeps")
    values: dict[str, Any] = {}
    for kind, unit in (("travel", "mm"), ("heave", "mm"), ("roll", "deg"), ("pitch", "deg")):
        range_key = f"range_{unit}"
        path = f"sweeps.{kind}"
        values[f"{kind}_{unit}"] = entry(f"{path}.{range_key}").default
        values[f"{kind}_steps"] = entry(f"{path}.steps").default
        if kind not in table:
            continue
        sub = r.table(table[kind], path, path)
        if not r.value(sub, path, f"{path}.enabled"):
            values[f"{kind}_{unit}"] = None
            continue
        values[f"{kind}_{unit}"] = r.value(sub, path, f"{path}.{range_key}")
        values[f"{kind}_steps"] = r.value(sub, path, f"{path}.steps")
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
    values["heave_roll_steps"] = None
    if "heave_roll" in table:
        key = "sweeps.heave_roll"
        sub = r.table(table["heave_roll"], key, key)
        path = "sweeps.heave_roll"
        values["heave_roll_heave_mm"] = r.value(sub, key, f"{path}.range_heave_mm")
        values["heave_roll_roll_deg"] = r.value(sub, key, f"{path}.range_roll_deg")
        steps = sub["steps"]
        if not isinstance(steps, list) or len(steps) != 2:
            r.fail(
                f"{key}.steps",
                f"expected [heave steps, roll steps], got {shown(steps)}",
                "write steps = [41, 41]",
            )
        if plane == "side":
            r.fail(key, "a side-view planar design cannot roll", "remove [sweeps.heave_roll]")
        spec = entry(f"{key}.steps")
        grid = (
            r.integer(steps[0], f"{key}.steps[0]", spec=spec),
            r.integer(steps[1], f"{key}.steps[1]", spec=spec),
        )
        if grid[0] * grid[1] > MAX_GRID_POSES:
            r.fail(
                f"{key}.steps",
                f"the grid has {grid[0] * grid[1]} poses, more than {MAX_GRID_POSES}",
                f"use fewer steps (their product at most {MAX_GRID_POSES})",
            )
        values["heave_roll_steps"] = grid
    values["motion_centre_mm"] = r.value(table, "sweeps", "sweeps.motion_centre_mm")
    sweeps = Sweeps(**values)
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
    r.table(table, "limits", "limits")
    return Limits(**{k.name: r.value(table, "limits", k.path) for k in children("limits")})


# -- materials, load cases, zones ------------------------------------------------
def read_materials(s: BuildState, table: Any) -> list[MaterialSpec]:
    r = s.r
    r.named(table, "materials")
    specs = []
    for mid, mtable in table.items():
        key = join_key("materials", mid)
        r.material(mid, key)
        r.table(mtable, key, "materials.*")
        v = {k.name: r.value(mtable, key, k.path) for k in children("materials.*")}
        specs.append(MaterialSpec(id=mid, **v))
    return specs


def read_load_cases(s: BuildState, table: Any, elements: list[Element]) -> list[LoadCase]:
    r = s.r
    r.named(table, "load_cases")
    names = [e.name for e in elements]
    force = entry("load_cases.*.forces_N.*")
    point = entry("load_cases.*.at_mm.*")
    cases = []
    for cname, ctable in table.items():
        key = join_key("load_cases", cname)
        r.table(ctable, key, "load_cases.*")
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
                speed_kmh=r.value(ctable, key, "load_cases.*.speed_kmh"),
                bump_g=r.value(ctable, key, "load_cases.*.bump_g"),
                longitudinal_g=r.value(ctable, key, "load_cases.*.longitudinal_g"),
                lateral_g=r.value(ctable, key, "load_cases.*.lateral_g"),
                air_density_kg_m3=r.value(ctable, key, "load_cases.*.air_density_kg_m3"),
                forces_N={e: r.read(v, f"{key}.forces_N.{e}", force) for e, v in forces.items()},
                forces_at_mm={e: r.read(v, f"{key}.at_mm.{e}", point) for e, v in at.items()},
            )
        )
    return cases


def read_zones(s: BuildState, table: Any) -> list[Zone]:
    r = s.r
    r.named(table, "zones")
    zones = []
    for zname, ztable in table.items():
        key = join_key("zones", zname)
        r.name(zname, key)
        if not isinstance(ztable, dict):
            r.keys(ztable, key, ())
        if "kind" not in ztable:
            r.fail(f"{key}.kind", "missing key", entry("zones.*.kind").missing)
        kind = r.value(ztable, key, "zones.*.kind")
        r.table(ztable, key, "zones.*", kind)
        params: dict[str, object] = {}
        if kind == "box":
            for name in ("centre_mm", "size_mm", "rotation_deg"):
                params[name] = r.value(ztable, key, f"zones.*.{name}")
        elif kind == "cylinder":
            axis = ztable["axis_mm"]
            if not isinstance(axis, list) or len(axis) != 2:
                r.fail(
                    f"{key}.axis_mm",
                    f"expected the two end points, got {shown(axis)}",
                    "write [[x, y, z], [x, y, z]]",
                )
            spec = entry("zones.*.axis_mm")
            a = r.zone_point(axis[0], f"{key}.axis_mm[0]", spec)
            b = r.zone_point(axis[1], f"{key}.axis_mm[1]", spec)
            if norm(sub(a, b)) < MIN_LENGTH_MM:
                r.fail(f"{key}.axis_mm", "the two end points coincide", "give two distinct points")
            params["axis_mm"] = (a, b)
            params["radius_mm"] = r.value(ztable, key, "zones.*.radius_mm")
        else:
            params["plane"] = r.value(ztable, key, "zones.*.plane")
            outline = ztable["outline_mm"]
            if not isinstance(outline, list) or len(outline) < 3:
                r.fail(
                    f"{key}.outline_mm",
                    "expected at least three [a, b] corners",
                    "list the polygon's corners in order",
                )
            spec = entry("zones.*.outline_mm")
            corners = tuple(
                r.numbers(p, f"{key}.outline_mm[{i}]", 2, "a corner [a, b] in mm", spec)
                for i, p in enumerate(outline)
            )
            problem = outline_problem(corners)  # type: ignore[arg-type]
            if problem:
                r.fail(f"{key}.outline_mm", *problem)
            params["outline_mm"] = corners
            params["depth_mm"] = r.value(ztable, key, "zones.*.depth_mm")
        clearance = r.value(ztable, key, "zones.*.clearance_mm")
        zones.append(Zone(zname, kind, params, clearance))
    return zones


def outline_problem(corners: tuple[tuple[float, float], ...]) -> tuple[str, str] | None:
    """What is wrong with a prism outline (problem, fix), or None for a simple polygon
    with an area: no repeated corner, no crossing or touching edges, not all in line."""
    n = len(corners)
    for i in range(n):
        if corners[i] == corners[(i + 1) % n]:
            return (
                f"corners {i} and {(i + 1) % n} are the same point",
                "remove the repeated corner",
            )
    first = corners[0]
    far = max(corners, key=lambda p: (p[0] - first[0]) ** 2 + (p[1] - first[1]) ** 2)
    reach2 = (far[0] - first[0]) ** 2 + (far[1] - first[1]) ** 2
    if max(abs(_cross(first, far, p)) for p in corners) <= 1e-9 * reach2:
        return (
            "the corners lie on one line (the outline has no area)",
            "give at least three corners that are not in line",
        )
    for i in range(n):
        for j in range(i + 1, n):
            if j == i + 1 or (i == 0 and j == n - 1):
                continue  # neighbouring edges share a corner
            if _segments_meet(corners[i], corners[(i + 1) % n], corners[j], corners[(j + 1) % n]):
                return (
                    f"the outline crosses itself (edge {i}-{(i + 1) % n} meets edge "
                    f"{j}-{(j + 1) % n})",
                    "list the corners in order around the polygon, without crossings",
                )
    return None


def _cross(o: tuple[float, float], a: tuple[float, float], b: tuple[float, float]) -> float:
    return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])


def _on_segment(p: tuple[float, float], a: tuple[float, float], b: tuple[float, float]) -> bool:
    return min(a[0], b[0]) <= p[0] <= max(a[0], b[0]) and min(a[1], b[1]) <= p[1] <= max(a[1], b[1])


def _segments_meet(
    p1: tuple[float, float],
    p2: tuple[float, float],
    q1: tuple[float, float],
    q2: tuple[float, float],
) -> bool:
    """Whether two closed segments share a point (orientation test)."""
    d1, d2 = _cross(q1, q2, p1), _cross(q1, q2, p2)
    d3, d4 = _cross(p1, p2, q1), _cross(p1, p2, q2)
    if ((d1 > 0 > d2) or (d1 < 0 < d2)) and ((d3 > 0 > d4) or (d3 < 0 < d4)):
        return True
    return (
        (d1 == 0 and _on_segment(p1, q1, q2))
        or (d2 == 0 and _on_segment(p2, q1, q2))
        or (d3 == 0 and _on_segment(q1, p1, p2))
        or (d4 == 0 and _on_segment(q2, p1, p2))
    )
