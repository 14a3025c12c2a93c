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
from plumbrod.design.schema import Key, children, entry
from plumbrod.errors import DesignFileError

NAME_PATTERN = re.compile(r"\A[A-Za-z0-9_\-]+\Z")
MAX_NAME_LENGTH = 100
MATERIAL_ID = re.compile(r"\A[A-Za-z0-9_.+/\- ]{1,100}\Z")
"""Longest name of a corner, rocker, rod, element, pickup or zone: names become parts
of file names (``<stem>-plate-<rocker>.dxf``), which stay under 200 bytes."""
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
    """Validation helpers bound to one file; every failure raises DesignFileError.

    The ``spec`` methods (:meth:`table`, :meth:`value`, :meth:`read`) take the allowed
    and required keys, defaults and ranges from :mod:`plumbrod.design.schema`.
    """

    def __init__(self, path: str, plane: str | None = None) -> None:
        self.path = path
        self.plane = plane

    @property
    def plane_tag(self) -> str:
        """``3d``, ``front`` or ``side``: the tag of the design's plane in the schema."""
        return self.plane or "3d"

    # -- failures -----------------------------------------------------------------
    def fail(self, key: str, problem: str, fix: str = "") -> NoReturn:
        raise DesignFileError(self.path, key, problem, fix)

    def keys(
        self,
        table: Any,
        key: str,
        allowed: Iterable[str],
        required: Iterable[str] = (),
        hints: dict[str, str] | None = None,
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
                close = difflib.get_close_matches(name, allowed, n=1, cutoff=0.6)
                hint = (
                    f"did you mean '{close[0]}'?"
                    if close
                    else ("allowed keys: " + ", ".join(allowed))
                )
                self.fail(join_key(key, name), "unknown key", hint)
        for name in required:
            if name not in table:
                self.fail(join_key(key, name), "missing key", (hints or {}).get(name, "add it"))
        return table

    # -- schema-driven --------------------------------------------------------------
    def table(self, table: Any, key: str, path: str, *tags: str) -> dict[str, Any]:
        """Check ``table`` (at ``key``) against the schema's keys under ``path``.

        ``tags`` (besides the plane's) select the keys that apply (``when``)."""
        kids = children(path, frozenset((self.plane_tag, *tags)))
        return self.keys(
            table,
            key,
            [k.name for k in kids],
            [k.name for k in kids if k.required],
            {k.name: k.missing for k in kids},
        )

    def named(self, table: Any, key: str) -> dict[str, Any]:
        """A table whose keys the user names (``[rockers]``, ``holes_mm``): only a table."""
        return self.keys(table, key, tuple(table) if isinstance(table, dict) else ())

    def value(self, table: dict[str, Any], key: str, path: str) -> Any:
        """The value of the schema key ``path`` in ``table`` (at ``key``), checked; its
        default (``None`` without one) when absent."""
        spec = entry(path)
        if spec.name not in table:
            return spec.default
        return self.read(table[spec.name], f"{key}.{spec.name}", spec)

    def read(self, value: Any, key: str, spec: Key) -> Any:
        """Check one value against its schema entry and return it as the model wants it."""
        kind = spec.kind
        if kind == "string":
            return self.string(value, key, spec.choices or None)
        if kind == "string_list":
            return self.strings(value, key, spec)
        if kind == "boolean":
            return self.boolean(value, key)
        if kind == "number":
            return self.number(value, key, spec=spec)
        if kind == "integer":
            return self.integer(value, key, spec=spec)
        if kind == "point":
            return self.point(value, key, spec)
        if kind == "zone_point":
            return self.zone_point(value, key, spec)
        if kind == "direction":
            return self.direction(value, key, spec)
        if kind == "range":
            return self.range_(value, key, spec)
        if kind == "vector3":
            return as3(self.numbers(value, key, 3, spec.shape, spec))
        raise TypeError(f"{spec.path}: kind {kind!r} is read by its section reader")

    # -- scalars ------------------------------------------------------------------
    def number(
        self,
        value: Any,
        key: str,
        *,
        positive: bool = False,
        non_negative: bool = False,
        spec: Key | None = None,
    ) -> float:
        if isinstance(value, bool) or not isinstance(value, int | float):
            self.fail(
                key,
                f"expected a number, got {type_name(value)} {shown(value)}",
                "write a plain number such as 12.5",
            )
        if isinstance(value, float) and not math.isfinite(value):
            self.fail(
                key, f"expected a finite number, got {value}", "replace inf/nan with a real value"
            )
        if spec is not None and spec.minimum is not None:
            positive = positive or spec.minimum > 0 or spec.open_minimum
            non_negative = non_negative or spec.minimum == 0
        low = spec.too_low if spec is not None and spec.too_low else ()
        if positive and value <= 0:
            problem, fix = low or ("expected a positive number, got {value}", "use a value above 0")
            self.fail(key, problem.format(value=value), fix)
        if non_negative and value < 0:
            problem, fix = low or ("expected zero or more, got {value}", "use a value of 0 or more")
            self.fail(key, problem.format(value=value), fix)
        if spec is not None and spec.too_high and spec.maximum is not None:
            if value > spec.maximum:
                problem, fix = spec.too_high
                self.fail(key, problem.format(value=number_text(value)), fix)
        if spec is not None and not in_range(value, spec):
            self.fail(
                key,
                f"expected {range_text(spec)}, got {number_text(value)}",
                range_fix(spec),
            )
        if isinstance(value, int) and abs(value) > 10**300:
            self.fail(
                key,
                f"expected a number of a physical size, got {number_text(value)}",
                "write a value in the file's units (mm, N, kg, s, degrees)",
            )
        return float(value)

    def integer(self, value: Any, key: str, *, minimum: int = 1, spec: Key | None = None) -> int:
        if spec is not None and spec.minimum is not None:
            minimum = int(spec.minimum)
        if isinstance(value, bool) or not isinstance(value, int):
            self.fail(
                key,
                f"expected a whole number, got {type_name(value)} {shown(value)}",
                f"write a whole number of at least {minimum}",
            )
        if value < minimum:
            self.fail(
                key,
                f"expected at least {minimum}, got {number_text(value)}",
                f"use a whole number of at least {minimum}",
            )
        if spec is not None and spec.maximum is not None and value > spec.maximum:
            self.fail(
                key,
                f"expected at most {int(spec.maximum)}, got {number_text(value)}",
                f"use a whole number from {minimum} to {int(spec.maximum)}",
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
                close = difflib.get_close_matches(value, choices, n=1, cutoff=0.5)
                hint = (
                    f"did you mean '{close[0]}'?"
                    if close
                    else ("use one of: " + ", ".join(f"'{c}'" for c in choices))
                )
                self.fail(key, f"'{value}' is not allowed", hint)
        return value

    def strings(self, value: Any, key: str, spec: Key) -> tuple[str, ...]:
        """One or more strings (each one of the entry's choices, when it has them)."""
        if not isinstance(value, list) or not value:
            got = "an empty list" if value == [] else f"{type_name(value)} {shown(value)}"
            self.fail(
                key,
                f"expected a list of one or more strings such as {spec.shape}, got {got}",
                f"write {spec.name} = {spec.shape}",
            )
        choices = spec.choices or None
        return tuple(self.string(v, f"{key}[{i}]", choices) for i, v in enumerate(value))

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
                f"the name {shown(value)} has characters other than letters, digits, '_' and '-'"
                if value
                else "the name is empty",
                "rename it (dots separate a body from its pickup)",
            )
        if len(value) > MAX_NAME_LENGTH:
            self.fail(
                key,
                f"the name has {len(value)} characters, more than {MAX_NAME_LENGTH}",
                f"use a shorter name: names become parts of file names "
                f"(at most {MAX_NAME_LENGTH} characters)",
            )
        if value == CHASSIS:
            self.fail(key, "'chassis' is the reference body's name", "choose another name")
        return value

    def material(self, value: str, key: str) -> str:
        """A material id: printable text without quotes or backslashes."""
        if not MATERIAL_ID.match(value):
            self.fail(
                key,
                f"the material id {shown(value)} has a quote, backslash or control character",
                "use letters, digits, spaces and - _ . + / only",
            )
        return value

    # -- vectors ------------------------------------------------------------------
    def numbers(
        self, value: Any, key: str, count: int, what: str, spec: Key | None = None
    ) -> tuple[float, ...]:
        if not isinstance(value, list) or len(value) != count:
            got = (
                f"{len(value)} values"
                if isinstance(value, list)
                else (f"{type_name(value)} {shown(value)}")
            )
            self.fail(
                key, f"expected {what}, got {got}", f"write {count} numbers in square brackets"
            )
        return tuple(self.number(v, f"{key}[{i}]", spec=spec) for i, v in enumerate(value))

    def point(self, value: Any, key: str, spec: Key | None = None) -> Vec3:
        """A point in mm: [x, y, z], or two coordinates in a planar design's view."""
        spec = spec or POINT
        if self.plane is None:
            x, y, z = self.numbers(value, key, 3, "a point [x, y, z] in mm", spec)
            return (x, y, z)
        view = "[y, z]" if self.plane == "front" else "[x, z]"
        a, b = self.numbers(value, key, 2, f"a point {view} in mm (planar {self.plane} view)", spec)
        return lift(a, b, self.plane)

    def zone_point(self, value: Any, key: str, spec: Key | None = None) -> Vec3:
        """A zone's point: always [x, y, z]; a planar design also takes its view's two."""
        spec = spec or POINT
        if self.plane is not None and isinstance(value, list) and len(value) == 2:
            return self.point(value, key, spec)
        x, y, z = self.numbers(value, key, 3, "a point [x, y, z] in mm", spec)
        return (x, y, z)

    def direction(self, value: Any, key: str, spec: Key) -> Vec3:
        """A direction: [dx, dy, dz], or the view's two in a planar design (any length)."""
        if self.plane is None:
            x, y, z = self.numbers(value, key, 3, "a direction [dx, dy, dz]", spec)
            return (x, y, z)
        view = "[dy, dz]" if self.plane == "front" else "[dx, dz]"
        what = f"a direction {view} (planar {self.plane} view)"
        a, b = self.numbers(value, key, 2, what, spec)
        return lift(a, b, self.plane)

    def range_(self, value: Any, key: str, spec: Key | None = None) -> tuple[float, float]:
        lo, hi = self.numbers(value, key, 2, "a range [from, to]", spec)
        if not lo < hi:
            self.fail(key, f"expected from < to, got [{lo}, {hi}]", "put the smaller value first")
        return (lo, hi)


POINT = entry("chassis.pickups.*")
"""The schema entry of a plain point (its range applies to every point)."""


def in_range(value: float, spec: Key) -> bool:
    """Whether ``value`` lies within the entry's bounds (ints compared exactly)."""
    if spec.minimum is not None:
        if value < spec.minimum or (spec.open_minimum and value <= spec.minimum):
            return False
    return spec.maximum is None or value <= spec.maximum


def _num(x: float) -> str:
    return f"{x:,.0f}".replace(",", " ") if x == int(x) and abs(x) >= 10_000 else f"{x:g}"


def range_text(spec: Key) -> str:
    """The allowed range in words, with the unit: ``more than 0 and at most 500 km/h``."""
    unit = f" {spec.unit}" if spec.unit else ""
    lo, hi = spec.minimum, spec.maximum
    if lo is None and hi is None:
        return "a number"
    if lo is None:
        return f"at most {_num(hi)}{unit}"  # type: ignore[arg-type]
    if hi is None:
        return f"more than {_num(lo)}{unit}" if spec.open_minimum else f"at least {_num(lo)}{unit}"
    if spec.open_minimum:
        return f"more than {_num(lo)} and at most {_num(hi)}{unit}"
    return f"{_num(lo)} to {_num(hi)}{unit}"


def range_fix(spec: Key) -> str:
    """How to fix a value out of its range."""
    if spec.unit == "mm" and spec.kind in ("point", "zone_point", "axis", "outline"):
        return "use a coordinate within that range (points are in mm from the origin)"
    return (
        f"use a value within that range (unit: {spec.unit})"
        if spec.unit
        else ("use a value within that range")
    )


def number_text(value: float) -> str:
    """A number for a message; a huge integer by its digit count."""
    if isinstance(value, int) and abs(value) >= 10**15:
        return f"a {len(str(abs(value)))}-digit number"
    if isinstance(value, float) and abs(value) >= 1e6:
        return f"{value:g}"
    return f"{value}"


def lift(a: float, b: float, plane: str) -> Vec3:
    """A planar view's two coordinates as a 3D point (out-of-plane coordinate 0)."""
    if plane == "front":
        return (0.0, a, b)
    return (a, 0.0, b)


def join_key(key: str, name: str) -> str:
    if not key:
        return name
    return f"{key}.{name}" if NAME_PATTERN.match(name) else f'{key}."{name}"'


def guess(name: str, candidates: Iterable[str], fallback: str) -> str:
    close = difflib.get_close_matches(name, list(candidates), n=1, cutoff=0.6)
    return f"did you mean '{close[0]}'?" if close else fallback


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
            self.pickups[full] = Pickup(body, pname, r.point(value, pkey, POINT))
            self.pickup_where[full] = pkey
