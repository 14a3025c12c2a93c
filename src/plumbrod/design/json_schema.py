"""The design file as a JSON Schema (draft 2020-12), generated from the schema table.

TOML editors that read JSON Schema (through a ``#:schema <path>`` first line) complete
keys and flag unknown keys, wrong types and values out of range as the user types.
The schema is an editor's aid; the loader stays the authority: it also checks what a
JSON Schema cannot say well (a planar design's two-coordinate points, cross-references
between sections, zero lengths, outline crossings).
"""

from __future__ import annotations

import json
from typing import Any

from plumbrod.design.reader import MATERIAL_ID, MAX_NAME_LENGTH
from plumbrod.design.schema import Key, children, entry

__all__ = ["SCHEMA_FILE_NAME", "SCHEMA_ID", "design_json_schema", "schema_text"]

SCHEMA_ID = "https://plumbrod.invalid/schema/design-file.schema.json"
"""The schema's ``$id`` (a name, not a download address)."""
SCHEMA_FILE_NAME = "plumbrod-design.schema.json"
"""The file name ``plumbrod new`` writes the schema to, beside the starter."""

_NAME = {"pattern": r"^[A-Za-z0-9_\-]+$", "maxLength": MAX_NAME_LENGTH}
_ZONE_KINDS = ("box", "cylinder", "prism")


def _bounded(key: Key, kind: str) -> dict[str, Any]:
    out: dict[str, Any] = {"type": kind}
    if key.minimum is not None:
        out["exclusiveMinimum" if key.open_minimum else "minimum"] = key.minimum
    if key.maximum is not None:
        out["maximum"] = key.maximum
    return out


def _array(items: dict[str, Any], low: int, high: int | None) -> dict[str, Any]:
    out: dict[str, Any] = {"type": "array", "items": items, "minItems": low}
    if high is not None:
        out["maxItems"] = high
    return out


def _describe(key: Key) -> str:
    text = key.meaning
    if key.unit:
        text += f" [{key.unit}]"
    return text


def _value(key: Key) -> dict[str, Any]:
    """The JSON Schema of one key's value."""
    kind = key.kind
    number = _bounded(key, "number")
    schema: dict[str, Any]
    if kind in ("table", "named"):
        schema = _table(key.path)
    elif kind == "string":
        schema = {"type": "string"}
        if key.choices:
            schema["enum"] = list(key.choices)
    elif kind == "string_list":
        item: dict[str, Any] = {"type": "string"}
        if key.choices:
            item["enum"] = list(key.choices)
        schema = _array(item, 1, None)
        schema["uniqueItems"] = True
    elif kind == "boolean":
        schema = {"type": "boolean"}
    elif kind == "number":
        schema = number
    elif kind == "integer":
        schema = _bounded(key, "integer")
    elif kind in ("point", "zone_point", "direction"):
        schema = _array(number, 2, 3)  # [x, y, z], or a planar view's two
    elif kind == "range":
        schema = _array(number, 2, 2)
    elif kind == "vector3":
        schema = _array(number, 3, 3)
    elif kind == "axis":
        schema = _array(_array(number, 2, 3), 2, 2)
    elif kind == "ends":
        schema = _array({"type": "string", "pattern": r"^[^.]+(\.[^.]+)+$"}, 2, 2)
    elif kind == "outline":
        schema = _array(_array(number, 2, 2), 3, None)
    elif kind == "steps2":
        schema = _array(_bounded(key, "integer"), 2, 2)
    else:  # pragma: no cover - the table test keeps kinds known
        raise ValueError(f"{key.path}: unknown kind {kind!r}")
    schema["description"] = _describe(key)
    if key.default is not None:
        schema["default"] = list(key.default) if isinstance(key.default, tuple) else key.default
    return schema


def _names(path: str) -> dict[str, Any]:
    """What the user-chosen names of the table at ``path`` may be."""
    if path == "materials":
        return {"pattern": MATERIAL_ID.pattern.replace(r"\A", "^").replace(r"\Z", "$")}
    if path in ("load_cases", "rockers.*.plate.holes_mm") or path.endswith("forces_N"):
        return {"minLength": 1}
    return dict(_NAME)


def _table(path: str) -> dict[str, Any]:
    """The JSON Schema of the table at ``path`` (fixed keys, or user-chosen names)."""
    spec = entry(path) if path else None
    kids = children(path)
    if spec is not None and spec.kind == "named":
        star = next(k for k in kids if k.name == "*")
        return {
            "type": "object",
            "propertyNames": _names(path),
            "additionalProperties": _value(star),
        }
    fixed = [k for k in kids if not any(t in _ZONE_KINDS for t in k.when)]
    out: dict[str, Any] = {
        "type": "object",
        "properties": {k.name: _value(k) for k in fixed},
    }
    # a key for one plane or suspension only is allowed but not required here: the
    # loader knows the plane; a JSON Schema of the whole file would need the root
    required = [k.name for k in fixed if k.required and not k.when]
    if required:
        out["required"] = required
    variants = [k for k in kids if k not in fixed]
    if not variants:
        out["additionalProperties"] = False
        return out
    branches = []
    for kind in _ZONE_KINDS:
        mine = [k for k in variants if kind in k.when]
        branches.append(
            {
                "if": {"properties": {"kind": {"const": kind}}, "required": ["kind"]},
                "then": {
                    "properties": {k.name: _value(k) for k in mine},
                    "required": [k.name for k in mine if k.required],
                },
            }
        )
    out["allOf"] = branches
    out["unevaluatedProperties"] = False
    return out


def design_json_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a design file, as a dict."""
    schema = {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "$id": SCHEMA_ID,
        "title": "plumbrod design file",
        "description": (
            "A plumbrod design (TOML): rods and rockers that route aero loads to the "
            "wheel uprights. Units in the key names; points in mm, ISO 8855 axes. "
            "Generated from plumbrod's schema table; `plumbrod check` is the authority."
        ),
    }
    schema.update(_table(""))
    return schema


def schema_text() -> str:
    """The JSON Schema as text (two-space indent, newline at the end)."""
    return json.dumps(design_json_schema(), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
