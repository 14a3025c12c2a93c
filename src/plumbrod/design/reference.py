"""The key reference of ``examples/README.md``, generated from the schema table.

``python -m plumbrod.design.reference --write`` rewrites the part of the README between
the two marker lines; ``--check`` exits 1 when it is out of date (the test suite runs
the same comparison).
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from plumbrod.design.schema import Key, children, entry

__all__ = ["BEGIN", "END", "README", "reference_markdown", "replace_reference"]

BEGIN = (
    "<!-- key reference: generated from src/plumbrod/design/schema.py by "
    "`python -m plumbrod.design.reference --write`; do not edit by hand -->"
)
END = "<!-- end of the generated key reference -->"
README = Path(__file__).resolve().parents[3] / "examples" / "README.md"

NOTES: dict[str, str] = {
    "corners.*.wishbones": (
        "The 3D keys describe each wishbone by its two inner pivots (it turns about the "
        "line through them) and its ball joint; a front-view planar design gives one "
        "inner pivot per wishbone and no tie rod."
    ),
    "rods.*": (
        "A rod whose one end is on an element and the other on the chassis is a "
        "**guide**; a rod from an element to a rocker, wishbone or upright starts a "
        "**route**. Routes are found by following rods and pivots to a corner. A rod may "
        "also join two elements (then it is neither a route nor a guide)."
    ),
    "rockers.*": (
        "An **equaliser** (whiffletree) is a rocker whose `parent` is an element: it "
        "pivots on the element and shares the load between its rods by their arm lengths "
        "(arms a and b carry b/(a+b) and a/(a+b) of it). It counts as part of its "
        "element: a rod from it to an upright starts that element's route, and its mass "
        "is carried with the element. It is the usual way to hang a body from four points "
        "without over-constraining it; see `prototype_undertray_equaliser.toml`."
    ),
    "elements.*": (
        "The element must be located by its rods: six independent constraints in 3D, "
        "three in a planar design; `plumbrod check` names the free motion when it is not. "
        "**Redundant rods** (more constraints than it needs: a floor on four hangers, one "
        "guide too many) are solved elastically: every rod that takes part in the "
        "redundancy is a spring k = EA/L about its design length, each pose has the least "
        "elastic energy with the other joints rigid, and the **fight forces** (what the "
        "motion alone does to the rods) are reported per sweep and added to every load "
        "case (the buckling, tension and rod-end checks see the sum); the report names "
        "the rods that could be removed, the largest fight force and where, and how far "
        "the rods would have to change length if they were rigid. Rods that would have "
        "to strain by more than 1 % are a geometry conflict and stop the sweep "
        "(`fail (redundancy-conflict)`, exit 1). "
        "An exactly located design gives the same results as before; a redundant one "
        "whose geometry stays compatible has no fight."
    ),
    "sweeps": (
        "`motion_centre_mm` is by default mid-wheelbase on the ground on the centre plane "
        "when the wheelbase is known (from the corners or `[car]`), else the origin. A "
        "body-sweep or grid pose that drives a wheel beyond the travel sweep's range gets a "
        "warning in the report naming the pose and the wheel (and in the JSON's "
        "`sweep_warnings`): the figures there rest on suspension travel the travel sweep "
        "did not check. Body poses are applied exactly: "
        "`p_ground = Ry(pitch) · Rx(roll) · (p − c) + c + heave · z`, with `c` the "
        "motion centre."
    ),
    "elements.*.strike": (
        "A ground strike is checked as its own load case `<element>-ground-strike`: "
        "`strike_N` straight up at `at_mm`, on top of the aero loads at the highest speed "
        "of the other cases and the weights. For a splitter or an undertray; the strike "
        "force is common practice to confirm (measure or estimate it for your car), not a "
        "figure plumbrod knows."
    ),
    "limits": (
        "Defaults are common practice, except `compliance_mm` and `element_attitude_deg`: "
        "plumbrod's own defaults, choose yours."
    ),
    "load_cases.*": (
        "Without `[load_cases]`, a design with `top_speed_kmh` gets two: `top-speed` and "
        "`top-speed-bump-3g`. The 3 g bump is common practice: confirm it for your car."
    ),
    "materials.*": "Use your supplier's certified values.",
    "tune.variables.*": (
        'Give `points = ["<body>.<pickup>", ...]` (moved together) or '
        '`pivot = "<rocker>"` (its whole pivot axis); then `line = [dx, dy, dz]` with '
        "`range_mm = [from, to]` (offsets along the line; its length does not matter), or "
        "`box_mm = { x = [lo, hi], z = [lo, hi] }` (axes left out stay fixed). A planar "
        "design gives the view's two coordinates for `line` and its two axes in `box_mm`. "
        "With `mirror = true` the right-hand copy of every moved point follows its "
        "original (y negated)."
    ),
    "car": (
        "Corners whose wheel centres lie within 50 mm of each other in x share an axle; the "
        "front axle has the larger x. A design whose corners sit on one axle says which by "
        "the corner names (`front`/`rear` in every name), else by position (behind "
        "x = −50 mm: the rear axle). In a side-view design each corner stands for its whole "
        "axle; a front-view design has no pitch moment and needs no wheelbase."
    ),
    "tradeoff": (
        "Give the sprung mass per corner or as `sprung_mass_kg` with "
        "`sprung_mass_front_share`, and the damping as `damping_ratio` or "
        "`damper_rate_N_s_per_mm` (one of each). Each corner the routes reach also needs its "
        "own `unsprung_mass_kg`. The wheel rates (bolted case; without one, the rate that "
        "meets the budget) and the wheelbase come from `[car]`; each axle's share of the "
        "downforce and drag is the spring-load statics of `[car]`. In a side-view planar "
        "design a corner stands for its axle: give the axle's masses and rates."
    ),
    "zones.*": (
        "Zone points always take three coordinates `[x, y, z]` (zones are solids); a "
        "planar design also accepts its view's two. Every corner also gets a tyre "
        "envelope that moves with its wheel (not in a side-view planar design)."
    ),
}

_KIND_TEXT = {
    "table": "table",
    "named": "table of `<name> = ...`",
    "string": "text",
    "string_list": "list of text",
    "boolean": "true/false",
    "number": "number",
    "integer": "whole number",
    "point": "point",
    "zone_point": "point `[x, y, z]`",
    "direction": "direction",
    "range": "`[from, to]`",
    "axis": "two points",
    "ends": "two pickup names",
    "outline": "three or more `[a, b]`",
    "steps2": "`[whole, whole]`",
}

_WHEN_TEXT = {
    ("3d",): "3D only",
    ("3d", "side"): "not in a front-view design",
    ("3d", "front"): "not in a side-view design",
    ("front", "side"): "planar only",
    ("front",): "front-view design only",
    ("double_wishbone",): "double wishbone only",
    ("box",): 'kind = "box"',
    ("cylinder",): 'kind = "cylinder"',
    ("prism",): 'kind = "prism"',
}


def _title(path: str) -> str:
    return "[" + path.replace("*", "<name>") + "]"


def _num(x: float) -> str:
    text = f"{x:,.10g}" if abs(x) >= 10_000 else f"{x:.10g}"
    return text.replace(",", " ")


def _value(key: Key) -> str:
    if key.kind == "string" and key.choices:
        return ", ".join(f'`"{c}"`' for c in key.choices)
    if key.kind == "string_list":
        return "list of " + (", ".join(f'`"{c}"`' for c in key.choices) or "text")
    if key.kind == "direction":
        return "`[dx, dy, dz]`"
    if key.kind == "vector3":
        return f"`{key.shape.split(' in ')[0]}`"
    return _KIND_TEXT[key.kind]


def _allowed(key: Key) -> str:
    lo, hi = key.minimum, key.maximum
    if lo is None or hi is None:
        return ""
    if key.kind in ("point", "zone_point", "direction", "axis", "outline") and lo == -hi:
        return f"each within ±{_num(hi)}"
    each = "each " if key.kind in ("range", "vector3", "steps2") else ""
    if key.open_minimum:
        return f"{each}> {_num(lo)} and ≤ {_num(hi)}"
    return f"{each}{_num(lo)} to {_num(hi)}"


def _default(key: Key) -> str:
    if key.required:
        return "required"
    value = key.default
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return f'`"{value}"`' if value else '`""`'
    if isinstance(value, tuple):
        shown = (f'"{v}"' if isinstance(v, str) else _num(v) for v in value)
        return "`[" + ", ".join(shown) + "]`"
    return f"`{_num(value)}`"


def _meaning(key: Key) -> str:
    text = key.meaning
    if key.when:
        text += f" ({_WHEN_TEXT.get(key.when, ', '.join(key.when))})"
    return text.replace("|", "\\|").replace("<", "\\<")


def _row(key: Key) -> str:
    name = "`<name>`" if key.name == "*" else f"`{key.name}`"
    value, unit, allowed = _value(key), key.unit, _allowed(key)
    leaf = _named_leaf(key)
    if leaf is not None:  # a table of named values: say what each value is
        value = f"table of `<name> =` {_value(leaf)}"
        unit, allowed = leaf.unit, _allowed(leaf)
    cells = (name, value, unit, _default(key), allowed, _meaning(key))
    return "| " + " | ".join(cells) + " |"


def _named_leaf(key: Key) -> Key | None:
    """The one ``*`` value inside a ``named`` table of values, or None."""
    kids = children(key.path)
    if key.kind == "named" and len(kids) == 1 and kids[0].name == "*":
        if kids[0].kind not in ("table", "named"):
            return kids[0]
    return None


def _sections(path: str, intro: str = "") -> list[str]:
    """Markdown of the table at ``path`` and of the tables inside it."""
    spec = entry(path)
    kids = children(path)
    if path and entry(path).required and not intro:
        intro = "required"
    if (
        spec.kind == "named"
        and len(kids) == 1
        and kids[0].name == "*"
        and kids[0].kind
        in (
            "table",
            "named",
        )
    ):
        # [corners] -> [corners.<name>]
        return _sections(kids[0].path, spec.meaning + ("; required" if spec.required else ""))
    lines = [f"### `{_title(path)}`", ""]
    head = spec.meaning[0].upper() + spec.meaning[1:]
    if intro:
        head = f"{head}: {intro}"
    lines += [f"{head}{'' if head.endswith('.') else '.'}", ""]
    lines += [
        "| key | value | unit | default | allowed | meaning |",
        "|---|---|---|---|---|---|",
    ]
    lines += [_row(k) for k in kids]
    lines.append("")
    if path in NOTES:
        lines += [NOTES[path], ""]
    for kid in kids:
        if kid.kind in ("table", "named") and children(kid.path):
            grand = children(kid.path)
            if (
                kid.kind == "named"
                and len(grand) == 1
                and grand[0].kind
                not in (
                    "table",
                    "named",
                )
            ):
                continue  # a table of named values: its row says it all
            lines += _sections(kid.path)
    return lines


def reference_markdown() -> str:
    """The generated key reference (Markdown, ends with a newline)."""
    lines: list[str] = [
        "Every table below lists its keys: the kind of value, unit, default, allowed range "
        "and meaning. The ranges are sanity bounds against typing slips and unit mistakes "
        "(coordinates within ±100 m, at most 10 001 steps per sweep and 250 000 poses per "
        "grid, speeds up to 500 km/h), not design advice; a value outside gets one line "
        "naming the key and the range.",
        "",
    ]
    for top in children(""):
        lines += _sections(top.path)
    return "\n".join(lines).rstrip("\n") + "\n"


def replace_reference(text: str) -> str:
    """``text`` (the README) with its generated part rewritten from the table."""
    if BEGIN not in text or END not in text:
        raise ValueError(f"the README has no generated part (marker lines {BEGIN!r} ... {END!r})")
    head, rest = text.split(BEGIN, 1)
    _, tail = rest.split(END, 1)
    return f"{head}{BEGIN}\n\n{reference_markdown()}\n{END}{tail}"


def main(argv: list[str] | None = None) -> int:
    """``--write`` rewrites the README's reference, ``--check`` reports a stale one."""
    parser = argparse.ArgumentParser(prog="python -m plumbrod.design.reference")
    group = parser.add_mutually_exclusive_group()
    group.add_argument("--write", action="store_true", help="rewrite examples/README.md")
    group.add_argument("--check", action="store_true", help="exit 1 when it is out of date")
    parser.add_argument("--readme", default=str(README), help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if not (args.write or args.check):
        sys.stdout.write(reference_markdown())
        return 0
    path = Path(args.readme)
    text = path.read_text(encoding="utf-8")
    new = replace_reference(text)
    if args.check:
        if new != text:
            print(f"{path}: the key reference is out of date; run {_REGENERATE}", file=sys.stderr)
            return 1
        return 0
    if new != text:
        # written whole or not at all (design/ may not import outputs/atomic.py)
        temporary = path.with_name(f".{path.name}.reference.tmp")
        temporary.write_text(new, encoding="utf-8")
        os.replace(temporary, path)
    return 0


_REGENERATE = "`python -m plumbrod.design.reference --write`"

if __name__ == "__main__":
    raise SystemExit(main())
