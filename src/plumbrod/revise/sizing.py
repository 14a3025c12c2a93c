"""Size every rod: the lightest catalogue section that keeps its reserves.

For each rod written in the design file (a mirrored right-hand copy is sized with its
left-hand original, for the worse of the two), every catalogue section in every allowed
material is tried against the rod's worst compression and tension over all sweeps and
load cases: buckling RF = P_cr/|P| and tension RF = S_y·A/P must reach the design's
limits, and the rod's clearance (when the design has zones) must stay above its limit
with the new outside diameter.  The lightest such section wins (ties: smaller OD).

The new sections are written into a copy of the design file's text, so its comments and
layout survive; the result is re-analysed to confirm it.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

from plumbrod.design.materials import Material
from plumbrod.design.sections import Section, catalogue_sections
from plumbrod.mechanics.columns import critical_load_N
from plumbrod.mechanics.members import Member, material_table
from plumbrod.verdict.findings import Findings

__all__ = ["SizingChoice", "apply_sizes", "choose_sections", "file_rod_name", "thinnest_wall_mm"]


@dataclass(frozen=True)
class SizingChoice:
    """The section chosen for one rod entry of the design file."""

    entry: str
    rods: tuple[str, ...]
    before: Member
    section: Section | None
    material: Material | None
    mass_kg: float
    buckling_rf: float
    tension_rf: float
    reason: str = ""


def file_rod_name(name: str, entries: Sequence[str]) -> str:
    """The design-file entry a rod comes from (a mirrored copy maps to its original)."""
    if name in entries:
        return name
    left = name.replace("right", "left")
    return left if left in entries else name


def choose_sections(
    findings: Findings,
    entries: Sequence[str],
    materials: Sequence[str] | None = None,
    system: str = "all",
    clearance_margin_mm: Callable[[str], float] | None = None,
    *,
    min_od_mm: float = 0.0,
    min_wall_mm: float = 0.0,
) -> list[SizingChoice]:
    """The lightest adequate section for each file entry.

    ``materials``: material ids allowed (default: each rod's own).  ``clearance_margin_mm``
    gives, for a rod, how much its radius may grow before its clearance limit is reached
    (``inf`` when the design has no zones).  Sections below ``min_od_mm`` or with a wall
    below ``min_wall_mm`` (solid bars always pass the wall rule) are not considered.
    """
    analysis = findings.analysis
    limits = analysis.design.limits
    table = material_table(analysis.design)
    catalogue = [
        c
        for c in catalogue_sections(system)
        if c.od_mm >= min_od_mm and (c.wall_mm is None or c.wall_mm >= min_wall_mm)
    ]
    choices: list[SizingChoice] = []
    groups: dict[str, list[str]] = {}
    for rod in analysis.design.rods:
        groups.setdefault(file_rod_name(rod.name, entries), []).append(rod.name)
    for entry, rods in groups.items():
        before = analysis.members[rods[0]]
        compression = min(
            (f.force_N for f in (findings.reserves[r].compression for r in rods) if f),
            default=0.0,
        )
        tension = max(
            (f.force_N for f in (findings.reserves[r].tension for r in rods) if f),
            default=0.0,
        )
        allowed = [table[m] for m in (materials or [before.material.id])]
        room = (
            min((clearance_margin_mm(r) for r in rods), default=np.inf)
            if clearance_margin_mm
            else np.inf
        )
        best: tuple[float, float, Section, Material, float, float] | None = None
        for material in allowed:
            for section in catalogue:
                grow = (section.od_mm - before.section.od_mm) / 2.0
                if grow > room:
                    continue
                area, inertia = section.area_mm2, section.second_moment_mm4
                p_cr = float(
                    critical_load_N(
                        area,
                        inertia,
                        before.length_mm,
                        before.rod.end_fixity,
                        material.modulus_MPa,
                        material.yield_MPa,
                    )
                )
                rf_b = p_cr / abs(compression) if compression < 0 else np.inf
                rf_t = material.yield_MPa * area / tension if tension > 0 else np.inf
                if rf_b < limits.buckling_reserve or rf_t < limits.tension_reserve:
                    continue
                mass = material.density_kg_m3 * area * 1e-9 * before.length_mm
                key = (mass, section.od_mm)
                if best is None or key < (best[0], best[1]):
                    best = (mass, section.od_mm, section, material, rf_b, rf_t)
        if best is None:
            choices.append(
                SizingChoice(
                    entry,
                    tuple(rods),
                    before,
                    None,
                    None,
                    np.nan,
                    np.nan,
                    np.nan,
                    "no catalogue section in the allowed "
                    "materials meets the reserves"
                    + ("" if room == np.inf else " and the clearance"),
                )
            )
            continue
        mass, _, section, material, rf_b, rf_t = best
        choices.append(
            SizingChoice(entry, tuple(rods), before, section, material, mass, rf_b, rf_t)
        )
    return choices


def thinnest_wall_mm(
    member: Member,
    compression_N: float,
    tension_N: float,
    buckling_reserve: float,
    tension_reserve: float,
) -> float | None:
    """The thinnest wall (mm) at the member's own OD and material that meets both reserves.

    Both reserve factors grow with the wall at a fixed OD, so each limit has one root,
    found with scipy's ``brentq``; the answer is the larger root.  ``None`` when even a
    solid bar of that OD falls short.  For tubes outside the catalogue.
    """
    from scipy.optimize import brentq

    od = member.section.od_mm
    m = member.material
    length, k = member.length_mm, member.rod.end_fixity

    def props(wall: float) -> tuple[float, float]:
        inner = od - 2.0 * wall
        return (np.pi / 4.0 * (od**2 - inner**2), np.pi / 64.0 * (od**4 - inner**4))

    def buckling(wall: float) -> float:
        area, inertia = props(wall)
        p_cr = float(critical_load_N(area, inertia, length, k, m.modulus_MPa, m.yield_MPa))
        return p_cr / abs(compression_N) - buckling_reserve

    def tension(wall: float) -> float:
        return m.yield_MPa * props(wall)[0] / tension_N - tension_reserve

    low, high = 1e-6 * od, od / 2.0
    need = 0.0
    for rule, active in ((buckling, compression_N < 0), (tension, tension_N > 0)):
        if not active:
            continue
        if rule(high) < 0:
            return None
        if rule(low) < 0:
            need = max(need, float(brentq(rule, low, high, xtol=1e-9)))
    return need


_HEADER = re.compile(r'^\s*\[\s*rods\s*\.\s*(?P<name>"[^"]+"|[A-Za-z0-9_\-]+)\s*\]\s*(#.*)?$')
_ANY_HEADER = re.compile(r"^\s*\[")
_KEY = re.compile(
    r"^(?P<indent>\s*)(?P<key>od_mm|wall_mm|material|solid)(?P<eq>\s*=\s*)"
    r"(?P<value>\"[^\"]*\"|[^#\s]+)(?P<rest>.*)$",
    re.DOTALL,
)


def apply_sizes(text: str, choices: Sequence[SizingChoice]) -> str:
    """The design text with each chosen section written into its ``[rods.<name>]`` table.

    Values are replaced in place (comments after them stay); ``wall_mm`` and
    ``solid = true`` are swapped when a tube becomes a bar or back.  Raises ValueError
    naming a rod whose table cannot be found in the text.
    """
    lines = text.splitlines(keepends=True)
    for choice in choices:
        if choice.section is None or choice.material is None:
            continue
        start = next(
            (
                i
                for i, line in enumerate(lines)
                if (m := _HEADER.match(line)) and m["name"].strip('"') == choice.entry
            ),
            None,
        )
        if start is None:
            raise ValueError(
                f"rods.{choice.entry}: not written as a [rods.{choice.entry}] "
                "table, so it cannot be edited in place"
            )
        end = next(
            (i for i in range(start + 1, len(lines)) if _ANY_HEADER.match(lines[i])), len(lines)
        )
        s = choice.section
        wanted = {"od_mm": f"{s.od_mm:g}", "material": f'"{choice.material.id}"'}
        if s.wall_mm is not None:
            wanted["wall_mm"] = f"{s.wall_mm:g}"
        else:
            wanted["solid"] = "true"
        body: list[str] = []
        anchor = 0
        for line in lines[start + 1 : end]:
            m = _KEY.match(line)
            if m is None:
                body.append(line)
                continue
            key = m["key"]
            if key not in wanted:
                continue  # wall_mm of a tube that became a bar, or solid of a new tube
            body.append(f"{m['indent']}{key}{m['eq']}{wanted.pop(key)}{m['rest']}")
            if key == "od_mm":
                anchor = len(body)
        for key, value in wanted.items():  # keys the table did not have yet
            body.insert(anchor, f"{key} = {value}\n")
            anchor += 1
        lines[start + 1 : end] = body
    return "".join(lines)
