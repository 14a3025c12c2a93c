"""``plumbrod column``: buckling calculator for one rod (tube or solid bar).

Prints the section properties, slenderness K·L/r, the transition slenderness, which
formula governs (Euler or Johnson) and the critical load; with ``--load``, the reserve
factor. ``--list-materials`` prints the shipped material table with its sources.
"""

from __future__ import annotations

import argparse
import json
import math
from typing import Any

from plumbrod.errors import UsageError

__all__ = ["register", "run"]

EXIT_OK = 0
EXIT_BELOW_REQUIRED = 1

END_NAMES = (
    "pinned-pinned",
    "fixed-fixed",
    "fixed-pinned",
    "fixed-sliding",
    "fixed-free",
    "pinned-sliding",
)
"""Names accepted by ``--ends`` (the table itself lives in :mod:`plumbrod.mechanics.columns`)."""

COLUMN_CAUTION = (
    "Caution: idealised column model (straight, centrally loaded, no crookedness, "
    "eccentricity, fatigue or dynamic load). Typical material values are not design "
    "allowables. Defer to a qualified engineer, physical proof-load testing and your "
    "series' technical regulations before anything is built or raced."
)


def register(subparsers: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Add the ``column`` parser and set ``handler=run``."""
    parser = subparsers.add_parser(
        "column",
        help="buckling and reserve factor of one rod (tube or solid bar)",
        description=(
            "Critical buckling load of one straight rod: Euler above the transition "
            "slenderness sqrt(2*pi^2*E/Sy), Johnson parabola below it. Lengths in mm, "
            "forces in N, stresses in MPa."
        ),
        epilog=(
            f"{COLUMN_CAUTION} Exit status: 0 done, 1 a reserve factor is below "
            "--required, 2 bad input."
        ),
    )
    parser.add_argument("--od", metavar="MM", help="outside diameter (bar diameter with --solid)")
    parser.add_argument("--wall", metavar="MM", help="wall thickness of the tube")
    parser.add_argument(
        "--solid", action="store_true", help="solid round bar: --od is its diameter, no --wall"
    )
    parser.add_argument("--length", metavar="MM", help="length between joint centres")
    parser.add_argument(
        "--material", metavar="ID", help="material id from the table (see --list-materials)"
    )
    parser.add_argument("--modulus", metavar="MPA", help="Young's modulus E (with --yield)")
    parser.add_argument(
        "--yield",
        dest="yield_",
        metavar="MPA",
        help="yield strength Sy, 0.2%% offset (with --modulus)",
    )
    parser.add_argument(
        "--k", metavar="K", help="effective length factor (default 1: ball joints at both ends)"
    )
    parser.add_argument(
        "--ends",
        metavar="NAME",
        help=(
            "end conditions instead of --k, using the recommended design K of AISC 360-22 "
            f"Commentary Table C-A-7.1: {', '.join(END_NAMES)}"
        ),
    )
    parser.add_argument(
        "--load",
        metavar="N",
        help=(
            "axial force on the rod: NEGATIVE = compression (reserve factor Pcr/|P|), "
            "positive = tension (reserve factor Sy*A/P)"
        ),
    )
    parser.add_argument(
        "--rod-end-rating",
        metavar="N",
        help="rated load of the rod ends (with --load): reserve factor rating/|P|",
    )
    parser.add_argument(
        "--required",
        metavar="RF",
        help="required reserve factor (with --load): exit 1 when any reserve factor is below",
    )
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument(
        "--list-materials",
        action="store_true",
        help="list the material table with sources and exit (needs no other option)",
    )
    parser.set_defaults(handler=run)


def _number(option: str, text: str | None, *, positive: bool = True) -> float | None:
    """Parse an option's value; UsageError naming the option when it is not usable."""
    if text is None:
        return None
    try:
        value = float(text)
    except ValueError:
        raise UsageError(option, f"expected a number, got {text!r}") from None
    if not math.isfinite(value):
        raise UsageError(option, f"expected a finite number, got {text!r}")
    if positive and value <= 0.0:
        raise UsageError(option, f"expected a positive number, got {text}")
    _in_range(option, value, text)
    return value


def _in_range(option: str, value: float, text: str) -> None:
    """The option's sanity range: the design-file key it stands for, or its own."""
    from plumbrod.design.reader import in_range, range_fix, range_text
    from plumbrod.design.schema import Key, entry

    ranges = {
        "--od": entry("rods.*.od_mm"),
        "--wall": entry("rods.*.wall_mm"),
        "--length": Key("column.length", "number", "length between joint centres", unit="mm",
                        minimum=1.0, maximum=200_000.0),
        "--modulus": entry("materials.*.modulus_MPa"),
        "--yield": entry("materials.*.yield_MPa"),
        "--k": entry("rods.*.end_fixity"),
        "--load": entry("load_cases.*.forces_N.*"),
        "--rod-end-rating": entry("rods.*.rod_end_rating_N"),
        "--required": Key("column.required", "number", "required reserve factor",
                          minimum=0.0, maximum=1000.0, open_minimum=True),
    }  # fmt: skip
    spec = ranges.get(option)
    if spec is not None and not in_range(value, spec):
        raise UsageError(option, f"expected {range_text(spec)}, got {text}", range_fix(spec))


def _list_materials(as_json: bool) -> int:
    from plumbrod.design.materials import load_materials

    table = load_materials()
    if as_json:
        rows = [
            {
                "id": m.id,
                "name": m.name,
                "modulus_MPa": m.modulus_MPa,
                "yield_MPa": m.yield_MPa,
                "ultimate_MPa": m.ultimate_MPa,
                "density_kg_m3": m.density_kg_m3,
                "basis": m.basis,
                "source": m.source,
                "note": m.note,
            }
            for m in table.values()
        ]
        print(json.dumps({"materials": rows}, indent=2))
        return EXIT_OK
    print(
        f"{'id':<16} {'basis':<8} {'E MPa':>9} {'Sy MPa':>8} {'Su MPa':>8} {'rho kg/m3':>9}  name"
    )
    for m in table.values():
        print(
            f"{m.id:<16} {m.basis:<8} {m.modulus_MPa:>9.0f} {m.yield_MPa:>8.1f} "
            f"{m.ultimate_MPa:>8.1f} {m.density_kg_m3:>9.0f}  {m.name}"
        )
        print(f"{'':<16} source: {m.source}")
        if m.note:
            print(f"{'':<16} note: {m.note}")
    print(
        "Typical values are not design allowables; use your supplier's certified values "
        "for sign-off."
    )
    return EXIT_OK


def run(args: argparse.Namespace) -> int:
    """Check the options, compute, print; return the exit code."""
    if args.list_materials:
        return _list_materials(args.json)

    from plumbrod.design.materials import UnknownMaterialError, lookup_material
    from plumbrod.design.sections import Section
    from plumbrod.mechanics.columns import (
        analyse_column,
        effective_length_factor,
        margin_of_safety,
        member_reserve_factor,
        rod_end_reserve_factor,
        tension_capacity_N,
    )

    od = _number("--od", args.od)
    if od is None:
        raise UsageError("--od", "missing; expected the outside diameter in mm")
    wall = _number("--wall", args.wall)
    if args.solid:
        if wall is not None:
            raise UsageError("--wall", "not allowed with --solid (a solid bar has no wall)")
        section = Section.solid(od)
    else:
        if wall is None:
            raise UsageError("--wall", "missing; expected the wall thickness in mm, or --solid")
        if wall >= od / 2.0:
            raise UsageError(
                "--wall",
                f"expected less than half of --od ({od / 2.0:g} mm), got {wall:g}",
                "use --solid for a solid bar",
            )
        section = Section.tube(od, wall)

    length = _number("--length", args.length)
    if length is None:
        raise UsageError("--length", "missing; expected the length between joint centres in mm")

    modulus = _number("--modulus", args.modulus)
    strength = _number("--yield", args.yield_)
    material = None
    if args.material is not None:
        if modulus is not None or strength is not None:
            option = "--modulus" if modulus is not None else "--yield"
            raise UsageError(option, "not allowed with --material; give one or the other")
        try:
            material = lookup_material(args.material)
        except UnknownMaterialError as exc:
            raise UsageError("--material", str(exc), "see --list-materials") from None
        modulus, strength = material.modulus_MPa, material.yield_MPa
    elif modulus is None and strength is None:
        raise UsageError("--material", "missing; give --material ID, or --modulus and --yield")
    elif modulus is None:
        raise UsageError("--modulus", "missing; --yield needs --modulus (MPa)")
    elif strength is None:
        raise UsageError("--yield", "missing; --modulus needs --yield (MPa)")
    assert modulus is not None and strength is not None

    k = _number("--k", args.k)
    ends = args.ends
    if ends is not None:
        if k is not None:
            raise UsageError("--k", "not allowed with --ends; give one or the other")
        try:
            k = effective_length_factor(ends)
        except ValueError as exc:
            raise UsageError("--ends", str(exc).removeprefix("ends: ")) from None
    elif k is None:
        k, ends = 1.0, "pinned-pinned"

    load = _number("--load", args.load, positive=False)
    if load == 0.0:
        raise UsageError("--load", "expected a non-zero force (negative = compression), got 0")
    rating = _number("--rod-end-rating", args.rod_end_rating)
    required = _number("--required", args.required)
    for option, value in (("--rod-end-rating", rating), ("--required", required)):
        if value is not None and load is None:
            raise UsageError(option, "needs --load (the axial force in N)")

    result = analyse_column(section, length, modulus, strength, k)
    capacity = float(tension_capacity_N(result.area_mm2, strength))
    reserve = rod_end_reserve = margin = None
    load_kind = None
    if load is not None:
        load_kind = "compression" if load < 0.0 else "tension"
        reserve = float(
            member_reserve_factor(load, result.critical_load_N, result.area_mm2, strength)
        )
        if rating is not None:
            rod_end_reserve = float(rod_end_reserve_factor(rating, load))
    passed = None
    if required is not None and reserve is not None:
        governing = min(r for r in (reserve, rod_end_reserve) if r is not None)
        margin = float(margin_of_safety(governing, required))
        passed = governing >= required
    mass = section.mass_per_m_kg(material) if material is not None else None

    report: dict[str, Any] = {
        "section": section.kind,
        "od_mm": section.od_mm,
        "wall_mm": section.wall_mm,
        "length_mm": result.length_mm,
        "k": result.k,
        "ends": ends,
        "material": material.id if material is not None else None,
        "material_basis": material.basis if material is not None else None,
        "modulus_MPa": modulus,
        "yield_MPa": strength,
        "area_mm2": result.area_mm2,
        "second_moment_mm4": result.second_moment_mm4,
        "radius_of_gyration_mm": result.radius_of_gyration_mm,
        "slenderness": result.slenderness,
        "transition_slenderness": result.transition_slenderness,
        "regime": result.regime,
        "critical_load_N": result.critical_load_N,
        "tension_capacity_N": capacity,
        "mass_per_m_kg": mass,
        "load_N": load,
        "load_kind": load_kind,
        "reserve_factor": reserve,
        "rod_end_reserve_factor": rod_end_reserve,
        "required_reserve_factor": required,
        "margin_of_safety": margin,
        "passed": passed,
        "caution": COLUMN_CAUTION,
    }
    if args.json:
        print(json.dumps(report, indent=2, allow_nan=False))
    else:
        _print_text(report, section.describe(), material)
    return EXIT_BELOW_REQUIRED if passed is False else EXIT_OK


def _print_text(report: dict[str, Any], section_text: str, material: Any) -> None:
    """The human-readable table."""
    rows: list[tuple[str, str]] = [("section", section_text)]
    if material is not None:
        rows.append(("material", f"{material.id}: {material.name} ({material.basis} values)"))
    rows += [
        ("modulus E", f"{report['modulus_MPa']:,.0f} MPa"),
        ("yield Sy", f"{report['yield_MPa']:,.1f} MPa"),
        ("length L", f"{report['length_mm']:,.1f} mm"),
        ("K", f"{report['k']:g}" + (f" ({report['ends']})" if report["ends"] else "")),
        ("area A", f"{report['area_mm2']:,.2f} mm2"),
        ("second moment I", f"{report['second_moment_mm4']:,.1f} mm4"),
        ("radius of gyration r", f"{report['radius_of_gyration_mm']:.3f} mm"),
        ("slenderness KL/r", f"{report['slenderness']:.1f}"),
        ("transition slenderness", f"{report['transition_slenderness']:.1f}"),
        (
            "regime",
            "Euler (KL/r at or above transition)"
            if report["regime"] == "euler"
            else "Johnson (KL/r below transition)",
        ),
        ("critical load Pcr", f"{report['critical_load_N']:,.0f} N"),
        ("tension capacity Sy*A", f"{report['tension_capacity_N']:,.0f} N"),
    ]
    if report["mass_per_m_kg"] is not None:
        rows.append(("mass per metre", f"{report['mass_per_m_kg']:.4f} kg/m"))
    if report["load_N"] is not None:
        rows.append(("load P", f"{report['load_N']:,.0f} N ({report['load_kind']})"))
        formula = "Pcr/|P|" if report["load_kind"] == "compression" else "Sy*A/P"
        rows.append(("reserve factor RF", f"{report['reserve_factor']:.3g} ({formula})"))
    if report["rod_end_reserve_factor"] is not None:
        rows.append(("rod-end RF", f"{report['rod_end_reserve_factor']:.3g} (rating/|P|)"))
    if report["required_reserve_factor"] is not None:
        verdict = "PASS" if report["passed"] else "FAIL: below the required reserve factor"
        rows.append(
            (
                "required RF",
                f"{report['required_reserve_factor']:g}; margin MS "
                f"{report['margin_of_safety']:+.2f}: {verdict}",
            )
        )
    width = max(len(name) for name, _ in rows)
    print("plumbrod column: buckling of one rod")
    for name, value in rows:
        print(f"  {name:<{width}}  {value}")
    if material is not None and material.basis == "typical":
        print("  (typical material values, not design allowables: use certified values)")
    print(COLUMN_CAUTION)
