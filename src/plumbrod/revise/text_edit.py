"""Change values in a design file's text in place, keeping its comments and layout.

A value is found by its table header (``[rockers.rocker_left.pickups]``, quoted or not,
spaces allowed) and its key inside that table; only the value is replaced (it may span
lines, as a multi-line array does), so a comment after it stays.  Tools that write a
changed copy of a design (``plumbrod tune``) use this; ``plumbrod size`` keeps its own
rod-section editor.
"""

from __future__ import annotations

import re
from collections.abc import Sequence

from plumbrod.design.model import CHASSIS, Design

__all__ = ["format_point", "pickup_location", "set_value"]

_HEADER = re.compile(r"^\s*\[(?P<path>[^\[\]]+)\]\s*(#.*)?$")
_ANY_HEADER = re.compile(r"^\s*\[")


def _split_path(path: str) -> tuple[str, ...]:
    parts = []
    for m in re.finditer(r'\s*("(?P<q>[^"]*)"|(?P<b>[A-Za-z0-9_\-]+))\s*(\.|$)', path):
        parts.append(m["q"] if m["q"] is not None else m["b"])
    return tuple(parts)


def _value_end(text: str, start: int) -> int:
    """Index just past the TOML value starting at ``start`` (arrays may span lines)."""
    depth = 0
    i = start
    in_string = False
    while i < len(text):
        ch = text[i]
        if in_string:
            if ch == '"':
                in_string = False
        elif ch == '"':
            in_string = True
        elif ch == "#":
            if depth == 0:
                break
            i = text.find("\n", i)
            if i < 0:
                return len(text)
            continue
        elif ch in "[{":
            depth += 1
        elif ch in "]}":
            depth -= 1
            if depth == 0:
                return i + 1
        elif ch == "\n" and depth == 0:
            break
        i += 1
    return len(text.rstrip()) if i >= len(text) else len(text[:i].rstrip())


def set_value(text: str, table: Sequence[str], key: str, value: str) -> str:
    """``text`` with ``key`` of ``[table]`` set to ``value`` (TOML text).

    Raises ValueError naming the key when the table or the key is not written that way.
    """
    lines = text.splitlines(keepends=True)
    offsets = [0]
    for line in lines:
        offsets.append(offsets[-1] + len(line))
    want = tuple(table)
    shown = ".".join((*want, key))
    start = None
    for i, line in enumerate(lines):
        m = _HEADER.match(line)
        if m and _split_path(m["path"]) == want:
            start = i
            break
    if start is None:
        raise ValueError(f"{shown}: no [{'.'.join(want)}] table in the file to edit in place")
    end = next((i for i in range(start + 1, len(lines)) if _ANY_HEADER.match(lines[i])), len(lines))
    pattern = re.compile(rf'^\s*("{re.escape(key)}"|{re.escape(key)})\s*=\s*')
    for i in range(start + 1, end):
        m = pattern.match(lines[i])
        if m is None:
            continue
        begin = offsets[i] + m.end()
        stop = _value_end(text, begin)
        return text[:begin] + value + text[stop:]
    raise ValueError(f"{shown}: not written as a key of [{'.'.join(want)}]")


def format_point(point: Sequence[float], plane: str | None) -> str:
    """A point as TOML text in the file's coordinates (mm, 4 decimals, planar: 2 values)."""
    x, y, z = point
    values = (x, y, z) if plane is None else ((y, z) if plane == "front" else (x, z))
    return "[" + ", ".join(_number(v) for v in values) + "]"


def _number(value: float) -> str:
    text = f"{value:.4f}".rstrip("0")
    if text.endswith("."):
        text += "0"
    return "0.0" if text in ("-0.0", "-0") else text


def pickup_location(design: Design, key: str) -> tuple[tuple[str, ...], str]:
    """The table path and key where the design file gives pickup ``<body>.<pickup>``."""
    pickup = design.pickups[key]
    body, name = pickup.body, pickup.name
    if body == CHASSIS:
        return ("chassis", "pickups"), name
    if any(r.name == body for r in design.rockers):
        return ("rockers", body, "pickups"), name
    if any(e.name == body for e in design.elements):
        return ("elements", body, "pickups"), name
    corner, part = body.rsplit(".", 1)
    return ("corners", corner, "pickups", part), name


def move_points(text: str, design: Design, moved: dict[str, tuple[float, float, float]]) -> str:
    """``text`` with each pickup of ``moved`` (``<body>.<pickup>`` -> new position, mm)
    and each rocker pivot (``<rocker>.axis_a`` / ``.axis_b``) written in place.

    Only points the file itself gives are written (a mirrored copy follows its original
    when the file is read).  Raises ValueError naming a key that cannot be edited.
    """
    rockers = {r.name: r for r in design.rockers}
    done: set[str] = set()
    for key, pos in moved.items():
        body, _, name = key.rpartition(".")
        if name in ("axis_a", "axis_b") and body in rockers:
            if body in done:
                continue
            done.add(body)
            a = moved.get(f"{body}.axis_a", rockers[body].axis_a_mm)
            b = moved.get(f"{body}.axis_b", rockers[body].axis_b_mm)
            if design.plane is None:
                value = f"[{format_point(a, None)}, {format_point(b, None)}]"
                text = set_value(text, ("rockers", body), "axis_mm", value)
            else:
                text = set_value(text, ("rockers", body), "pivot_mm", format_point(b, design.plane))
            continue
        table, pickup = pickup_location(design, key)
        text = set_value(text, table, pickup, format_point(pos, design.plane))
    return text
