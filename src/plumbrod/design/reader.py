"""The typed-value reader of the design file: one method per kind of value, each
failure one :class:`~plumbrod.errors.DesignFileError` naming the file, the key path,
what is wrong and how to fix it ("did you mean" where a close name exists).
"""

from __future__ import annotations

import difflib
import math
import re
from collections.abc import Iterable
from typing import Any, NoReturn

from plumbrod.design.model import CHASSIS, Pickup, Vec3
from plumbrod.errors import DesignFileError

NAME_PATTERN = re.compile(r"^[A-Za-z0-9_\-]+$")
MIN_LENGTH_MM = 1e-6
"""Shorter rods or pivot axes than this count as zero length."""

_TOML_TYPE_NAMES = {
    str: "a string",
    bool: "true/false",
    int: "an integer",
    float: "a number",
    list: "an array",
    dict: "a table",
}


def type_name(value: Any) -> str:
    for kind, name in _TOML_TYPE_NAMES.items():
        if type(value) is kind:
            return name
    return f"a {type(value).__name__}"


def shown(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


class Reader:
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
                f"expected a table, got {type_name(table)} {shown(table)}",
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
                self.fail(join_key(key, name), "unknown key", hint)
        for name in required:
            if name not in table:
                self.fail(join_key(key, name), "missing key", REQUIRED_HINTS.get(name, "add it"))
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
                f"expected a number, got {type_name(value)} {shown(value)}",
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
                f"expected a whole number, got {type_name(value)} {shown(value)}",
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
                f"expected a string, got {type_name(value)} {shown(value)}",
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
                f"expected true or false, got {type_name(value)} {shown(value)}",
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
                else (f"{type_name(value)} {shown(value)}")
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
        return lift(a, b, self.plane)

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


def lift(a: float, b: float, plane: str) -> Vec3:
    """A planar view's two coordinates as a 3D point (out-of-plane coordinate 0)."""
    if plane == "front":
        return (0.0, a, b)
    return (a, 0.0, b)


def join_key(key: str, name: str) -> str:
    if not key:
        return name
    return f"{key}.{name}" if NAME_PATTERN.match(name) else f'{key}."{name}"'


REQUIRED_HINTS = {
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


def guess(name: str, candidates: Iterable[str], fallback: str) -> str:
    guess = difflib.get_close_matches(name, list(candidates), n=1, cutoff=0.6)
    return f"did you mean '{guess[0]}'?" if guess else fallback


def as3(values: tuple[float, ...]) -> Vec3:
    return (values[0], values[1], values[2])


def sub(a: Vec3, b: Vec3) -> Vec3:
    return (a[0] - b[0], a[1] - b[1], a[2] - b[2])


def norm(a: Vec3) -> float:
    return math.sqrt(a[0] ** 2 + a[1] ** 2 + a[2] ** 2)


class BuildState:
    """What the section readers share while one design is built: the reader and the
    pickups collected so far (with the key path where each was defined)."""

    def __init__(self, source: str) -> None:
        self.source = source
        self.r = Reader(source)
        self.pickups: dict[str, Pickup] = {}
        self.pickup_where: dict[str, str] = {}

    def add_pickups(self, body: str, table: Any, key: str) -> None:
        r = self.r
        if not isinstance(table, dict):
            r.fail(
                key,
                f"expected a table of named points, got {type_name(table)}",
                "write name = [x, y, z] lines under it",
            )
        for pname, value in table.items():
            pkey = join_key(key, pname)
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
