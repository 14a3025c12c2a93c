"""``plumbrod size DESIGN.toml``: the lightest catalogue tube or bar for every rod."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from plumbrod.outputs.cautions import CAUTION

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "size",
        help="pick the lightest catalogue section for every rod and write a sized copy",
        description=(
            "For each rod, try every catalogue tube and bar in the allowed materials and "
            "keep the lightest that meets the buckling and tension reserve limits at the "
            "worst pose and load case (and its clearance, when the design has zones). "
            "Writes a new design file next to the input (never overwrites it), re-checks "
            "it, and prints a before/after table with masses. Exit 1 when a rod has no "
            "adequate section (the copy is still written, that rod unchanged) or the sized "
            "copy fails a check."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("design", help="design file (TOML)")
    parser.add_argument(
        "--materials",
        metavar="IDS",
        help="comma-separated material ids to choose from (default: each "
        "rod's own material); see `plumbrod column --list-materials`",
    )
    parser.add_argument(
        "--system",
        choices=("all", "metric", "inch"),
        default="all",
        help="tube catalogue to use (default: all)",
    )
    parser.add_argument(
        "--min-od",
        metavar="MM",
        type=float,
        default=0.0,
        help="smallest outside diameter to accept, e.g. for rod-end inserts",
    )
    parser.add_argument(
        "--min-wall",
        metavar="MM",
        type=float,
        default=0.0,
        help="thinnest tube wall to accept, e.g. for welding",
    )
    parser.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="where to write the sized design (default: <design>-sized.toml next to the input)",
    )
    parser.set_defaults(handler=run)


def _free_name(path: Path) -> Path:
    candidate = path.with_name(f"{path.stem}-sized{path.suffix}")
    n = 2
    while candidate.exists():
        candidate = path.with_name(f"{path.stem}-sized-{n}{path.suffix}")
        n += 1
    return candidate


def run(args: argparse.Namespace) -> int:
    import tomllib

    from plumbrod.design.loading import load_design, parse_design
    from plumbrod.errors import UsageError
    from plumbrod.mechanics.members import material_table
    from plumbrod.outputs.atomic import write_atomic
    from plumbrod.revise.sizing import apply_sizes, choose_sections, thinnest_wall_mm
    from plumbrod.verdict.findings import review

    source = Path(args.design)
    design = load_design(source)
    materials = None
    if args.materials:
        table = material_table(design)
        materials = [m.strip() for m in args.materials.split(",") if m.strip()]
        for m in materials:
            if m not in table:
                raise UsageError(
                    "--materials",
                    f"unknown material '{m}'",
                    "see `plumbrod column --list-materials`",
                )
    target = Path(args.output) if args.output else _free_name(source)
    if target.resolve() == source.resolve():
        raise UsageError("--output", "would overwrite the input design", "give another file name")
    findings = review(design)
    if not findings.analysis.statics:
        raise UsageError(
            args.design,
            "the design has no load case, so nothing to size for",
            "give [design] top_speed_kmh with element aero data, or [load_cases]",
        )
    text = source.read_text(encoding="utf-8")
    entries = list(tomllib.loads(text).get("rods", {}))
    for option, value in (("--min-od", args.min_od), ("--min-wall", args.min_wall)):
        if not value >= 0.0 or value != value:
            raise UsageError(
                option,
                f"expected a length of 0 or more in mm, got {value}",
                "give a plain number such as 10",
            )
    choices = choose_sections(
        findings,
        entries,
        materials,
        args.system,
        findings.clearance_margin_mm,
        min_od_mm=args.min_od,
        min_wall_mm=args.min_wall,
    )
    try:
        new_text = apply_sizes(text, choices)
    except ValueError as exc:
        raise UsageError(args.design, str(exc), "write each rod as a [rods.<name>] table") from None
    sized = review(parse_design(new_text, str(target)))

    rows = [
        (
            "rod",
            "before",
            "mass g",
            "RF buck",
            "RF tens",
            "thinnest wall",
            "after",
            "mass g",
            "RF buck",
            "RF tens",
        )
    ]
    limits = design.limits
    total_before = total_after = 0.0
    for choice in choices:
        b = choice.before
        old = findings.reserves[choice.rods[0]]
        worst_c = min(
            (f.force_N for f in (findings.reserves[r].compression for r in choice.rods) if f),
            default=0.0,
        )
        worst_t = max(
            (f.force_N for f in (findings.reserves[r].tension for r in choice.rods) if f),
            default=0.0,
        )
        wall = thinnest_wall_mm(
            b, worst_c, worst_t, limits.buckling_reserve, limits.tension_reserve
        )
        thinnest = "bar too weak" if wall is None else f"{wall:.3f} at OD {b.section.od_mm:g}"
        before = f"{_section(b.section)} {b.material.id}"
        count = len(choice.rods)
        total_before += b.mass_kg * count
        if choice.section is None:
            rows.append(
                (
                    choice.entry,
                    before,
                    f"{b.mass_kg * 1000:.0f}",
                    _rf(old.buckling_rf),
                    _rf(old.tension_rf),
                    thinnest,
                    "NONE: " + choice.reason,
                    "",
                    "",
                    "",
                )
            )
            total_after += b.mass_kg * count
            continue
        new = min((sized.reserves[r] for r in choice.rods), key=lambda x: x.buckling_rf)
        new_t = min(sized.reserves[r].tension_rf for r in choice.rods)
        total_after += choice.mass_kg * count
        assert choice.material is not None
        rows.append(
            (
                choice.entry + (f" (x{count})" if count > 1 else ""),
                before,
                f"{b.mass_kg * 1000:.0f}",
                _rf(old.buckling_rf),
                _rf(old.tension_rf),
                thinnest,
                f"{_section(choice.section)} {choice.material.id}",
                f"{choice.mass_kg * 1000:.0f}",
                _rf(new.buckling_rf),
                _rf(new_t),
            )
        )
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    for r in rows:
        print("  ".join(r[i].ljust(widths[i]) for i in range(len(r))).rstrip())
    print(
        f"rod mass {total_before * 1000:.0f} g -> {total_after * 1000:.0f} g "
        f"({(total_after - total_before) * 1000:+.0f} g)"
    )
    print(
        "forces come from the design as it was; the sized copy was re-analysed and its "
        "reserve factors are shown under 'after'; 'thinnest wall' is the least wall (mm) "
        "at the rod's present OD and material that meets both reserves"
    )
    write_atomic(target, new_text)
    print(f"wrote {target}")
    verdict_ok = all(c.section is not None for c in choices)
    failing = [c.id for c in sized.checks if c.status == "fail"]
    if failing:
        print("the sized design fails: " + ", ".join(failing) + " (see plumbrod check)")
    print(CAUTION)
    return 0 if verdict_ok and not failing else 1


def _section(section: Any) -> str:
    if section.wall_mm is None:
        return f"bar {section.od_mm:g}"
    return f"{section.od_mm:g}x{section.wall_mm:g}"


def _rf(value: float) -> str:
    return "-" if value == float("inf") else f"{value:.2f}"
