"""Read a design file (TOML) into a validated :class:`~plumbrod.design.model.Design`.

Every problem becomes one :class:`~plumbrod.errors.DesignFileError` naming the file,
the key path, what is wrong and how to fix it.  Nothing here solves anything.

The format is documented in ``examples/README.md``; ``plumbrod new`` writes a
commented starter.
"""

from __future__ import annotations

import difflib
import math
import re
import tomllib
from collections.abc import Iterable
from pathlib import Path
from typing import Any, NoReturn

from plumbrod.design.model import (
    CHASSIS,
    PLANE_NORMAL_AXIS,
    AeroData,
    Corner,
    Design,
    Element,
    Envelope,
    Limits,
    LoadCase,
    MaterialSpec,
    Pickup,
    PlateSpec,
    Rocker,
    Rod,
    Sweeps,
    Vec3,
    Wishbones,
    Zone,
)
from plumbrod.errors import DesignFileError

__all__ = ["ELEMENT_KINDS", "load_design", "parse_design"]

ELEMENT_KINDS = ("wing", "splitter", "undertray", "other")
NAME_PATTERN = re.compile(r"^[A-Za-z0-9_\-]+$")
MIN_LENGTH_MM = 1e-6
"""Shorter rods or pivot axes than this count as zero length."""

TOP_LEVEL_KEYS = (
    "design",
    "chassis",
    "corners",
    "rockers",
    "rods",
    "elements",
    "sweeps",
    "limits",
    "load_cases",
    "materials",
    "zones",
)

_TOML_TYPE_NAMES = {
    str: "a string",
    bool: "true/false",
    int: "an integer",
    float: "a number",
    list: "an array",
    dict: "a table",
}


def _type_name(value: Any) -> str:
    for kind, name in _TOML_TYPE_NAMES.items():
        if type(value) is kind:
            return name
    return f"a {type(value).__name__}"


def _shown(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


class _Reader:
    """Validation helpers bound to one file; every failure raises DesignFileError."""

    def __init__(self, path: str, plane: str | None = None) -> None:
        self.path = path
        self.plane = plane

    # -- failures -----------------------------------------------------------------
    def fail(self, key: str, problem: str, fix: str = "") -> NoReturn:
        raise DesignFileError(self.path, key, problem, fix)

    def keys(
        self,
        table: Any,
        key: str,
        allowed: Iterable[str],
        required: Iterable[str] = (),
    ) -> dict[str, Any]:
        """Check that ``table`` is a table with only ``allowed`` keys and all ``required``."""
        if not isinstance(table, dict):
            self.fail(
                key,
                f"expected a table, got {_type_name(table)} {_shown(table)}",
                f"write it as [{key}] with keys below it",
            )
        allowed = tuple(allowed)
        for name in table:
            if name not in allowed:
                guess = difflib.get_close_matches(name, allowed, n=1, cutoff=0.6)
                hint = (
                    f"did you mean '{guess[0]}'?"
                    if guess
                    else ("allowed keys: " + ", ".join(allowed))
                )
                self.fail(_join(key, name), "unknown key", hint)
        for name in required:
            if name not in table:
                self.fail(_join(key, name), "missing key", _REQUIRED_HINTS.get(name, "add it"))
        return table

    # -- scalars ------------------------------------------------------------------
    def number(
        self,
        value: Any,
        key: str,
        *,
        positive: bool = False,
        non_negative: bool = False,
    ) -> float:
        if isinstance(value, bool) or not isinstance(value, int | float):
            self.fail(
                key,
                f"expected a number, got {_type_name(value)} {_shown(value)}",
                "write a plain number such as 12.5",
            )
        number = float(value)
        if not math.isfinite(number):
            self.fail(
                key, f"expected a finite number, got {value}", "replace inf/nan with a real value"
            )
        if positive and number <= 0.0:
            self.fail(key, f"expected a positive number, got {value}", "use a value above 0")
        if non_negative and number < 0.0:
            self.fail(key, f"expected zero or more, got {value}", "use a value of 0 or more")
        return number

    def integer(self, value: Any, key: str, *, minimum: int = 1) -> int:
        if isinstance(value, bool) or not isinstance(value, int):
            self.fail(
                key,
                f"expected a whole number, got {_type_name(value)} {_shown(value)}",
                f"write a whole number of at least {minimum}",
            )
        if value < minimum:
            self.fail(
                key,
                f"expected at least {minimum}, got {value}",
                f"use a whole number of at least {minimum}",
            )
        return int(value)

    def string(self, value: Any, key: str, choices: Iterable[str] | None = None) -> str:
        if not isinstance(value, str):
            self.fail(
                key,
                f"expected a string, got {_type_name(value)} {_shown(value)}",
                "put the text in double quotes",
            )
        if choices is not None:
            choices = tuple(choices)
            if value not in choices:
                guess = difflib.get_close_matches(value, choices, n=1, cutoff=0.5)
                hint = (
                    f"did you mean '{guess[0]}'?"
                    if guess
                    else ("use one of: " + ", ".join(f"'{c}'" for c in choices))
                )
                self.fail(key, f"'{value}' is not allowed", hint)
        return value

    def boolean(self, value: Any, key: str) -> bool:
        if not isinstance(value, bool):
            self.fail(
                key,
                f"expected true or false, got {_type_name(value)} {_shown(value)}",
                "write true or false without quotes",
            )
        return value

    def name(self, value: str, key: str) -> str:
        if not NAME_PATTERN.match(value):
            self.fail(
                key,
                f"the name '{value}' has characters other than letters, digits, '_' and '-'",
                "rename it (dots separate a body from its pickup)",
            )
        if value == CHASSIS:
            self.fail(key, "'chassis' is the reference body's name", "choose another name")
        return value

    # -- vectors ------------------------------------------------------------------
    def numbers(self, value: Any, key: str, count: int, what: str) -> tuple[float, ...]:
        if not isinstance(value, list) or len(value) != count:
            got = (
                f"{len(value)} values"
                if isinstance(value, list)
                else (f"{_type_name(value)} {_shown(value)}")
            )
            self.fail(
                key, f"expected {what}, got {got}", f"write {count} numbers in square brackets"
            )
        return tuple(self.number(v, f"{key}[{i}]") for i, v in enumerate(value))

    def point(self, value: Any, key: str) -> Vec3:
        """A point in mm: [x, y, z], or two coordinates in a planar design's view."""
        if self.plane is None:
            x, y, z = self.numbers(value, key, 3, "a point [x, y, z] in mm")
            return (x, y, z)
        view = "[y, z]" if self.plane == "front" else "[x, z]"
        a, b = self.numbers(value, key, 2, f"a point {view} in mm (planar {self.plane} view)")
        return _lift(a, b, self.plane)

    def zone_point(self, value: Any, key: str) -> Vec3:
        """A zone's point: always [x, y, z]; a planar design also takes its view's two."""
        if self.plane is not None and isinstance(value, list) and len(value) == 2:
            return self.point(value, key)
        x, y, z = self.numbers(value, key, 3, "a point [x, y, z] in mm")
        return (x, y, z)

    def range_(self, value: Any, key: str) -> tuple[float, float]:
        lo, hi = self.numbers(value, key, 2, "a range [from, to]")
        if not lo < hi:
            self.fail(key, f"expected from < to, got [{lo}, {hi}]", "put the smaller value first")
        return (lo, hi)


def _lift(a: float, b: float, plane: str) -> Vec3:
    """A planar view's two coordinates as a 3D point (out-of-plane coordinate 0)."""
    if plane == "front":
        return (0.0, a, b)
    return (a, 0.0, b)


def _join(key: str, name: str) -> str:
    if not key:
        return name
    return f"{key}.{name}" if NAME_PATTERN.match(name) else f'{key}."{name}"'


_REQUIRED_HINTS = {
    "name": 'add name = "..." under [design]',
    "wheel_centre_mm": "add the wheel centre at static ride height, [x, y, z] in mm",
    "tyre_radius_mm": "add the loaded tyre radius in mm",
    "tyre_width_mm": "add the tyre width in mm",
    "suspension": 'add suspension = "slider" or "double_wishbone"',
    "parent": 'add parent = "chassis" (or a corner body such as "front_left.lower")',
    "ends": 'add ends = ["body.pickup", "body.pickup"]',
    "material": 'add material = "4130-N" (see plumbrod column --list-materials)',
    "od_mm": "add the outside diameter in mm",
    "mass_kg": "add the mass in kg",
    "cg_mm": "add the centre of gravity [x, y, z] in mm",
    "centre_of_pressure_mm": "add the centre of pressure [x, y, z] in mm",
    "corners": "add at least one [corners.<name>] table",
    "elements": "add at least one [elements.<name>] table",
    "design": 'add a [design] table with name = "..."',
    "speed_kmh": "add the speed in km/h",
}


# ---------------------------------------------------------------------------------
# Reading the file
# ---------------------------------------------------------------------------------


def load_design(path: str | Path) -> Design:
    """Read and validate a design file; raises DesignFileError on any problem."""
    shown = str(path)
    file = Path(path)
    if not file.exists():
        raise DesignFileError(
            shown, "", "no such file", "check the path, or write a starter with `plumbrod new FILE`"
        )
    if file.is_dir():
        raise DesignFileError(
            shown,
            "",
            "this is a folder, not a design file",
            "give the path of a .toml file inside it",
        )
    try:
        raw = file.read_bytes()
    except OSError as exc:
        raise DesignFileError(
            shown, "", f"cannot be read ({exc.strerror})", "check the file's permissions"
        ) from None
    if not raw.strip():
        raise DesignFileError(
            shown, "", "the file is empty", "write a starter design with `plumbrod new FILE`"
        )
    if b"\x00" in raw:
        raise DesignFileError(
            shown,
            "",
            "this is a binary file, not a TOML design file",
            "give the path of a text .toml file",
        )
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise DesignFileError(
            shown,
            "",
            f"not UTF-8 text (bad byte at offset {exc.start})",
            "save the file as UTF-8 text",
        ) from None
    return parse_design(text, shown)


_TOML_POSITION = re.compile(r"^(?P<what>.*?)\s*\(at line (?P<line>\d+), column (?P<col>\d+)\)")


def parse_design(text: str, source: str = "<design>") -> Design:
    """Validate the TOML text of a design; ``source`` names it in messages."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        if message.endswith("(at end of document)"):
            lines = text.splitlines() or [""]
            message = (
                f"{message[: -len('(at end of document)')].rstrip()} (at line "
                f"{len(lines)}, column {len(lines[-1]) + 1})"
            )
        match = _TOML_POSITION.match(message)
        if match:
            what = match["what"].rstrip(".") or "invalid TOML"
            raise DesignFileError(
                source,
                f"line {match['line']}, column {match['col']}",
                f"invalid TOML: {what[0].lower()}{what[1:]}",
                "check the quotes, brackets, commas and '=' there; a key may appear once",
            ) from None
        raise DesignFileError(
            source, "", f"invalid TOML: {message}", "check the file's syntax"
        ) from None
    return _DesignBuilder(source).build(data)


# ---------------------------------------------------------------------------------
# Building the design
# ---------------------------------------------------------------------------------

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
_CORNER_BODY_PARTS = {"slider": ("upright",), "double_wishbone": ("upright", "upper", "lower")}


class _DesignBuilder:
    def __init__(self, source: str) -> None:
        self.source = source
        self.r = _Reader(source)
        self.pickups: dict[str, Pickup] = {}
        self.pickup_where: dict[str, str] = {}

    # -- entry ----------------------------------------------------------------
    def build(self, data: dict[str, Any]) -> Design:
        r = self.r
        r.keys(data, "", TOP_LEVEL_KEYS, required=("design", "corners", "elements"))
        head = r.keys(
            data["design"],
            "design",
            ("name", "note", "plane", "mirror", "top_speed_kmh"),
            required=("name",),
        )
        name = r.string(head["name"], "design.name")
        note = r.string(head.get("note", ""), "design.note")
        plane = None
        if "plane" in head:
            plane = r.string(head["plane"], "design.plane", ("front", "side"))
        mirror = r.boolean(head.get("mirror", False), "design.mirror")
        top_speed = None
        if "top_speed_kmh" in head:
            top_speed = r.number(head["top_speed_kmh"], "design.top_speed_kmh", positive=True)
        if mirror and plane == "side":
            r.fail(
                "design.mirror",
                "a side-view planar design has no left and right",
                'remove mirror, or use plane = "front"',
            )
        r.plane = plane

        self._chassis(data.get("chassis", {}))
        corners = self._corners(data["corners"])
        rockers = self._rockers(data.get("rockers", {}), corners)
        elements = self._elements(data["elements"])
        rods = self._rods(data.get("rods", {}))
        sweeps = self._sweeps(data.get("sweeps", {}), plane)
        limits = self._limits(data.get("limits", {}))
        materials = self._materials(data.get("materials", {}))
        load_cases = self._load_cases(data.get("load_cases", {}), elements)
        zones = self._zones(data.get("zones", {}))

        design = Design(
            name=name,
            source=self.source,
            plane=plane,
            corners=tuple(corners),
            rockers=tuple(rockers),
            rods=tuple(rods),
            elements=tuple(elements),
            pickups=dict(self.pickups),
            sweeps=sweeps,
            limits=limits,
            load_cases=tuple(load_cases),
            materials=tuple(materials),
            zones=tuple(zones),
            note=note,
            top_speed_kmh=top_speed,
        )
        if mirror:
            design = _mirrored(design, self.r, self.pickup_where)
        self._check_references(design, mirror)
        self._check_geometry(design, mirror)
        return design

    # -- pickups ----------------------------------------------------------------
    def _add_pickups(self, body: str, table: Any, key: str) -> None:
        r = self.r
        if not isinstance(table, dict):
            r.fail(
                key,
                f"expected a table of named points, got {_type_name(table)}",
                "write name = [x, y, z] lines under it",
            )
        for pname, value in table.items():
            pkey = _join(key, pname)
            r.name(pname, pkey)
            full = f"{body}.{pname}"
            if full in self.pickups:
                r.fail(
                    pkey,
                    f"pickup '{full}' is defined twice (also at {self.pickup_where[full]})",
                    "rename one of them",
                )
            self.pickups[full] = Pickup(body, pname, r.point(value, pkey))
            self.pickup_where[full] = pkey

    def _chassis(self, table: Any) -> None:
        self.r.keys(table, "chassis", ("pickups",))
        self._add_pickups(CHASSIS, table.get("pickups", {}), "chassis.pickups")

    # -- corners ------------------------------------------------------------------
    def _corners(self, table: Any) -> list[Corner]:
        r = self.r
        if not isinstance(table, dict) or not table:
            r.fail(
                "corners",
                "expected at least one [corners.<name>] table",
                "add one per wheel the routes reach",
            )
        corners = []
        for cname, ctable in table.items():
            key = _join("corners", cname)
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
                wishbones = self._wishbones(ctable["wishbones"], f"{key}.wishbones")
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
                tyre_width_mm=r.number(
                    ctable["tyre_width_mm"], f"{key}.tyre_width_mm", positive=True
                ),
                suspension=suspension,  # type: ignore[arg-type]
                wishbones=wishbones,
                unsprung_mass_kg=unsprung,
            )
            pickups = ctable.get("pickups", {})
            parts = _CORNER_BODY_PARTS[suspension]
            r.keys(pickups, f"{key}.pickups", parts)
            for part, ptable in pickups.items():
                self._add_pickups(f"{cname}.{part}", ptable, f"{key}.pickups.{part}")
            corners.append(corner)
        return corners

    def _wishbones(self, table: Any, key: str) -> Wishbones:
        r = self.r
        if r.plane == "front":
            r.keys(table, key, _WISHBONE_KEYS_FRONT, required=_WISHBONE_KEYS_FRONT)
            p = {k: r.point(table[k], f"{key}.{k}") for k in _WISHBONE_KEYS_FRONT}
            ahead = (1.0, 0.0, 0.0)  # the planar pivot axis runs along x
            return Wishbones(
                upper_front_mm=p["upper_inner_mm"],
                upper_rear_mm=_sub(p["upper_inner_mm"], ahead),
                upper_outer_mm=p["upper_outer_mm"],
                lower_front_mm=p["lower_inner_mm"],
                lower_rear_mm=_sub(p["lower_inner_mm"], ahead),
                lower_outer_mm=p["lower_outer_mm"],
                tie_rod_inner_mm=None,
                tie_rod_outer_mm=None,
            )
        r.keys(table, key, _WISHBONE_KEYS_3D, required=_WISHBONE_KEYS_3D)
        p = {k: r.point(table[k], f"{key}.{k}") for k in _WISHBONE_KEYS_3D}
        return Wishbones(**p)

    # -- rockers ------------------------------------------------------------------
    def _rockers(self, table: Any, corners: list[Corner]) -> list[Rocker]:
        r = self.r
        r.keys(table, "rockers", tuple(table) if isinstance(table, dict) else ())
        rockers = []
        for name, rtable in table.items():
            key = _join("rockers", name)
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
                axis_a, axis_b = _sub(pivot, tuple(normal)), pivot  # type: ignore[arg-type]
            else:
                axis = rtable["axis_mm"]
                if not isinstance(axis, list) or len(axis) != 2:
                    r.fail(
                        f"{key}.axis_mm",
                        "expected two points on the pivot axis, "
                        f"got {_type_name(axis)} {_shown(axis)}",
                        "write [[x, y, z], [x, y, z]]",
                    )
                axis_a = r.point(axis[0], f"{key}.axis_mm[0]")
                axis_b = r.point(axis[1], f"{key}.axis_mm[1]")
            mass = None
            if "mass_kg" in rtable:
                mass = r.number(rtable["mass_kg"], f"{key}.mass_kg", non_negative=True)
            plate = None
            if "plate" in rtable:
                plate = self._plate(rtable["plate"], f"{key}.plate")
            rockers.append(Rocker(name, parent, axis_a, axis_b, mass, plate))
            self._add_pickups(name, rtable["pickups"], f"{key}.pickups")
        return rockers

    def _plate(self, table: Any, key: str) -> PlateSpec:
        r = self.r
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
            holes_mm={
                k: r.number(v, f"{key}.holes_mm.{k}", positive=True) for k, v in holes.items()
            },
        )

    # -- elements -----------------------------------------------------------------
    def _elements(self, table: Any) -> list[Element]:
        r = self.r
        if not isinstance(table, dict) or not table:
            r.fail(
                "elements",
                "expected at least one [elements.<name>] table",
                "add the wing, splitter or undertray the routes carry",
            )
        elements = []
        for name, etable in table.items():
            key = _join("elements", name)
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
                inertia = _as3(values)
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
                    size_mm=_as3(size),
                    rotation_deg=_as3(
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
                )
            )
            self._add_pickups(name, etable["pickups"], f"{key}.pickups")
        return elements

    # -- rods ---------------------------------------------------------------------
    def _rods(self, table: Any) -> list[Rod]:
        r = self.r
        r.keys(table, "rods", tuple(table) if isinstance(table, dict) else ())
        rods = []
        for name, rtable in table.items():
            key = _join("rods", name)
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
                    f"expected two pickup names, got {_shown(ends)}",
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
                rating = r.number(
                    rtable["rod_end_rating_N"], f"{key}.rod_end_rating_N", positive=True
                )
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

    # -- sweeps and limits --------------------------------------------------------
    def _sweeps(self, table: Any, plane: str | None) -> Sweeps:
        r = self.r
        r.keys(
            table, "sweeps", ("travel", "heave", "roll", "pitch", "heave_roll", "motion_centre_mm")
        )
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
                r.fail(
                    "sweeps.roll", "a side-view planar design cannot roll", "remove [sweeps.roll]"
                )
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
            sub = r.keys(table["heave_roll"], key, ("steps",), required=("steps",))
            steps = sub["steps"]
            if not isinstance(steps, list) or len(steps) != 2:
                r.fail(
                    f"{key}.steps",
                    f"expected [heave steps, roll steps], got {_shown(steps)}",
                    "write steps = [41, 41]",
                )
            if plane == "side":
                r.fail(key, "a side-view planar design cannot roll", "remove [sweeps.heave_roll]")
            values["heave_roll_steps"] = (
                r.integer(steps[0], f"{key}.steps[0]", minimum=3),
                r.integer(steps[1], f"{key}.steps[1]", minimum=3),
            )
        if "motion_centre_mm" in table:
            values["motion_centre_mm"] = r.point(
                table["motion_centre_mm"], "sweeps.motion_centre_mm"
            )
        sweeps = Sweeps(**{**defaults.__dict__, **values})
        if sweeps.heave_roll_steps and (sweeps.heave_mm is None or sweeps.roll_deg is None):
            r.fail(
                "sweeps.heave_roll",
                "the grid needs both the heave and the roll range",
                "enable [sweeps.heave] and [sweeps.roll]",
            )
        return sweeps

    def _limits(self, table: Any) -> Limits:
        r = self.r
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
    def _materials(self, table: Any) -> list[MaterialSpec]:
        r = self.r
        r.keys(table, "materials", tuple(table) if isinstance(table, dict) else ())
        specs = []
        for mid, mtable in table.items():
            key = _join("materials", mid)
            fields = ("modulus_MPa", "yield_MPa", "ultimate_MPa", "density_kg_m3")
            r.keys(mtable, key, (*fields, "source"), required=(*fields, "source"))
            v = {f: r.number(mtable[f], f"{key}.{f}", positive=True) for f in fields}
            specs.append(
                MaterialSpec(id=mid, source=r.string(mtable["source"], f"{key}.source"), **v)
            )
        return specs

    def _load_cases(self, table: Any, elements: list[Element]) -> list[LoadCase]:
        r = self.r
        r.keys(table, "load_cases", tuple(table) if isinstance(table, dict) else ())
        names = [e.name for e in elements]
        cases = []
        for cname, ctable in table.items():
            key = _join("load_cases", cname)
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
                ),
                required=("speed_kmh",),
            )
            forces = ctable.get("forces_N", {})
            r.keys(forces, f"{key}.forces_N", names)
            cases.append(
                LoadCase(
                    name=cname,
                    speed_kmh=r.number(ctable["speed_kmh"], f"{key}.speed_kmh", non_negative=True),
                    bump_g=r.number(ctable.get("bump_g", 0.0), f"{key}.bump_g"),
                    longitudinal_g=r.number(
                        ctable.get("longitudinal_g", 0.0), f"{key}.longitudinal_g"
                    ),
                    lateral_g=r.number(ctable.get("lateral_g", 0.0), f"{key}.lateral_g"),
                    air_density_kg_m3=r.number(
                        ctable.get("air_density_kg_m3", 1.225),
                        f"{key}.air_density_kg_m3",
                        positive=True,
                    ),
                    forces_N={
                        e: _as3(r.numbers(v, f"{key}.forces_N.{e}", 3, "[Fx, Fy, Fz] in N"))
                        for e, v in forces.items()
                    },
                )
            )
        return cases

    def _zones(self, table: Any) -> list[Zone]:
        r = self.r
        r.keys(table, "zones", tuple(table) if isinstance(table, dict) else ())
        zones = []
        for zname, ztable in table.items():
            key = _join("zones", zname)
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
                for i, s in enumerate(size):
                    if s <= 0:
                        r.fail(
                            f"{key}.size_mm[{i}]",
                            f"expected a positive size, got {s}",
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
                        f"expected the two end points, got {_shown(axis)}",
                        "write [[x, y, z], [x, y, z]]",
                    )
                a = r.zone_point(axis[0], f"{key}.axis_mm[0]")
                b = r.zone_point(axis[1], f"{key}.axis_mm[1]")
                if _norm(_sub(a, b)) < MIN_LENGTH_MM:
                    r.fail(
                        f"{key}.axis_mm", "the two end points coincide", "give two distinct points"
                    )
                params["axis_mm"] = (a, b)
                params["radius_mm"] = r.number(
                    ztable["radius_mm"], f"{key}.radius_mm", positive=True
                )
            else:
                r.keys(
                    ztable,
                    key,
                    (*shared, "plane", "outline_mm", "depth_mm"),
                    required=("plane", "outline_mm", "depth_mm"),
                )
                params["plane"] = r.string(
                    ztable["plane"], f"{key}.plane", ("front", "side", "top")
                )
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
                clearance = r.number(
                    ztable["clearance_mm"], f"{key}.clearance_mm", non_negative=True
                )
            zones.append(Zone(zname, kind, params, clearance))  # type: ignore[arg-type]
        return zones

    # -- cross-checks ---------------------------------------------------------------
    def _check_references(self, design: Design, mirrored: bool) -> None:
        r = self.r
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
                    _guess(
                        rocker.parent,
                        allowed,
                        "use chassis or a corner body such as <corner>.lower",
                    ),
                )
            if rocker.parent in rocker_names:
                r.fail(
                    key,
                    f"'{rocker.parent}' is a rocker and cannot carry another rocker",
                    "mount rockers on the chassis, an upright, a wishbone or an element "
                    "(an equaliser)",
                )
        names = list(design.pickups)
        for rod in design.rods:
            for i, end in enumerate((rod.end_a, rod.end_b)):
                key = f"rods.{rod.name}.ends[{i}]"
                if end not in design.pickups:
                    body = end.rsplit(".", 1)[0] if "." in end else end
                    if "." not in end or body not in body_set:
                        r.fail(
                            key, f"no body for '{end}'", _guess(end, names, "write <body>.<pickup>")
                        )
                    r.fail(
                        key,
                        f"no pickup '{end}'",
                        _guess(end, names, f"add it under the pickups of '{body}'"),
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
                            _guess(
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

    def _check_geometry(self, design: Design, mirrored: bool) -> None:
        r = self.r
        for rod in design.rods:
            a = design.pickups[rod.end_a].position_mm
            b = design.pickups[rod.end_b].position_mm
            if _norm(_sub(a, b)) < MIN_LENGTH_MM:
                r.fail(
                    f"rods.{rod.name}.ends",
                    f"zero-length rod: '{rod.end_a}' and "
                    f"'{rod.end_b}' are at the same point {list(a)}",
                    "move one of the two pickups",
                )
        for rocker in design.rockers:
            if _norm(_sub(rocker.axis_a_mm, rocker.axis_b_mm)) < MIN_LENGTH_MM:
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
                if _norm(_sub(front, rear)) < MIN_LENGTH_MM:
                    r.fail(
                        f"{key}.{side}_front_mm",
                        f"zero-length pivot axis: the {side} wishbone's inner pivots coincide",
                        "move one inner pivot",
                    )
            if (
                w.tie_rod_inner_mm is not None
                and w.tie_rod_outer_mm is not None
                and _norm(_sub(w.tie_rod_inner_mm, w.tie_rod_outer_mm)) < MIN_LENGTH_MM
            ):
                r.fail(f"{key}.tie_rod_inner_mm", "zero-length tie rod", "move one of its ends")
            if _norm(_sub(w.upper_outer_mm, w.lower_outer_mm)) < MIN_LENGTH_MM:
                r.fail(
                    f"{key}.upper_outer_mm",
                    "the two outer ball joints coincide",
                    "move one of them",
                )
        del mirrored


def _guess(name: str, candidates: Iterable[str], fallback: str) -> str:
    guess = difflib.get_close_matches(name, list(candidates), n=1, cutoff=0.6)
    return f"did you mean '{guess[0]}'?" if guess else fallback


def _as3(values: tuple[float, ...]) -> Vec3:
    return (values[0], values[1], values[2])


def _sub(a: Vec3, b: Vec3) -> Vec3:
    return (a[0] - b[0], a[1] - b[1], a[2] - b[2])


def _norm(a: Vec3) -> float:
    return math.sqrt(a[0] ** 2 + a[1] ** 2 + a[2] ** 2)


# ---------------------------------------------------------------------------------
# Mirroring: copy every item whose name holds "left" to "right", y negated
# ---------------------------------------------------------------------------------


def _flip(point: Vec3) -> Vec3:
    return (point[0], -point[1], point[2])


def _right(name: str) -> str:
    return name.replace("left", "right")


def _mirrored(design: Design, reader: _Reader, pickup_where: dict[str, str]) -> Design:
    """The design with a right-hand copy of every item whose name contains ``left``."""
    from dataclasses import replace

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
            flipped_w = (
                None
                if w is None
                else Wishbones(
                    **{k: (None if v is None else _flip(v)) for k, v in w.__dict__.items()}
                )
            )
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
    p = dict(zone.params)
    if zone.kind == "box":
        p["centre_mm"] = _flip(p["centre_mm"])  # type: ignore[arg-type]
        rx, ry, rz = p["rotation_deg"]  # type: ignore[misc]
        p["rotation_deg"] = (-rx, ry, -rz)
    elif zone.kind == "cylinder":
        a, b = p["axis_mm"]  # type: ignore[misc]
        p["axis_mm"] = (_flip(a), _flip(b))
    elif zone.kind == "prism":
        plane = p["plane"]
        outline = p["outline_mm"]
        if plane == "side":  # extruded along y: flip the depth range
            d0, d1 = p["depth_mm"]  # type: ignore[misc]
            p["depth_mm"] = (-d1, -d0)
        elif plane == "front":  # [y, z] outline
            p["outline_mm"] = tuple((-a, b) for a, b in outline)  # type: ignore[union-attr]
        else:  # top: [x, y]
            p["outline_mm"] = tuple((a, -b) for a, b in outline)  # type: ignore[union-attr]
    return p
