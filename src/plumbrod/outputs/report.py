"""Reports of an analysis: a readable text table and JSON.

JSON layout (documented in the README): top-level ``design``, ``checks``, ``sweeps``,
``springs`` (:mod:`plumbrod.outputs.springs_report`), plus ``verdict``, ``location``,
``routes`` and ``caution``.  Every key that carries a
unit says it (``_mm``, ``_deg``, ``_N``).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.reach import wheels_beyond_travel
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.members import Member
from plumbrod.outputs.cautions import CAUTION
from plumbrod.outputs.json_text import dumps_finite
from plumbrod.outputs.redundancy_report import redundancy_json, redundancy_lines
from plumbrod.outputs.springs_report import springs_json, springs_lines
from plumbrod.verdict.checks import CheckResult
from plumbrod.verdict.findings import Findings

__all__ = ["as_json", "as_text", "verdict", "verdict_line"]

_SIGNIFICANT = 6
CLOSEST_SHOWN = 5
"""Closest clearance pairs listed in the text report."""


def verdict(checks: Sequence[CheckResult]) -> str:
    """``fail`` if any check fails, else ``warn`` if any warns, else ``pass``."""
    statuses = {c.status for c in checks}
    return "fail" if "fail" in statuses else "warn" if "warn" in statuses else "pass"


def verdict_line(checks: Sequence[CheckResult]) -> str:
    """One line: ``verdict: FAIL (7 pass, 1 warn, 2 fail)``, and the failing check ids."""
    counts = {s: sum(c.status == s for c in checks) for s in ("pass", "warn", "fail")}
    line = (
        f"verdict: {verdict(checks).upper()} ({counts['pass']} pass, {counts['warn']} warn, "
        f"{counts['fail']} fail)"
    )
    failed = [c.id for c in checks if c.status == "fail"]
    return line + (f"; failed: {', '.join(failed)}" if failed else "")


def _series(values: NDArray[np.float64]) -> list[float]:
    return [round(float(v), _SIGNIFICANT) for v in np.asarray(values).ravel()]


def _limit_text(check: CheckResult) -> str:
    limit = check.limit
    if limit is None:
        return "-"
    if isinstance(limit, tuple):
        return f"{limit[0]:g} to {limit[1]:g}"
    return f"{'>=' if check.at_least else '<='} {limit:g}"


def _value_text(check: CheckResult) -> str:
    if check.value is None:
        return "-"
    unit = f" {check.unit}" if check.unit and check.unit != "mm/mm" else ""
    return f"{check.value:.4g}{unit}"


def sweep_warnings(analysis: Analysis) -> list[str]:
    """Body-sweep poses that drive a wheel beyond the travel sweep's range."""
    return wheels_beyond_travel(analysis.link, analysis.sweeps, analysis.design.sweeps.travel_mm)


def location_summary(analysis: Analysis) -> dict[str, object]:
    m = analysis.mobility
    return {
        "exact": m.exact,
        "gruebler_kutzbach": m.count,
        "formula": m.formula,
        "drivers": m.drivers,
        "jacobian_rank": m.rank,
        "coordinates": m.n_coords,
        "rows": m.n_rows,
        "redundant": list(m.redundant),
    }


def _table(rows: list[tuple[str, ...]]) -> list[str]:
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    return ["  ".join(r[i].ljust(widths[i]) for i in range(len(r))).rstrip() for r in rows]


def _section_text(member: Member) -> str:
    s = member.section
    return f"tube {s.od_mm:g} x {s.wall_mm:g}" if s.wall_mm else f"bar {s.od_mm:g}"


def _rf_text(rf: float) -> str:
    return "-" if not np.isfinite(rf) else f"{rf:.2f}"


def member_rows(findings: Findings) -> list[tuple[str, ...]]:
    rows: list[tuple[str, ...]] = [
        (
            "rod",
            "section mm",
            "material",
            "length mm",
            "mass g",
            "min force N",
            "max force N",
            "P_cr N",
            "regime",
            "RF buckling",
            "RF tension",
        )
    ]
    for name, reserve in findings.reserves.items():
        member = findings.analysis.members[name]
        low = reserve.compression.force_N if reserve.compression else 0.0
        high = reserve.tension.force_N if reserve.tension else 0.0
        rows.append(
            (
                name,
                _section_text(member),
                member.material.id,
                f"{member.length_mm:.1f}",
                f"{member.mass_kg * 1000:.0f}",
                f"{low:+.1f}",
                f"{high:+.1f}",
                f"{reserve.critical_load_N:.0f}",
                reserve.regime,
                _rf_text(reserve.buckling_rf),
                _rf_text(reserve.tension_rf),
            )
        )
    return rows


def mass_rows(findings: Findings) -> list[tuple[str, ...]]:
    rows: list[tuple[str, ...]] = [
        ("corner", "static share kg", "kinetic single-wheel kg", "kinetic heave kg", "existing kg")
    ]
    for c in findings.mass.corners:
        existing = (
            "-"
            if c.existing_kg is None
            else (
                f"{c.existing_kg:g} (+{c.static_share_kg / c.existing_kg:.0%} static)"
                if c.existing_kg > 0
                else f"{c.existing_kg:g}"
            )
        )
        rows.append(
            (
                c.corner,
                f"{c.static_share_kg:.2f}",
                f"{c.kinetic_single_kg:.2f}",
                f"{c.kinetic_heave_kg:.2f}",
                existing,
            )
        )
    return rows


def as_text(findings: Findings) -> str:
    """The report as plain text."""
    analysis, checks = findings.analysis, findings.checks
    d = analysis.design
    m = analysis.mobility
    lines = [f"plumbrod check: {d.name}", f"file: {d.source}"]
    lines += [f"plausibility warning: {note}" for note in findings.plausibility]
    if d.plane:
        lines.append(f"planar design in the {d.plane} view")
    if m.exact:
        lines.append(
            f"location: exact; Grübler–Kutzbach {m.count} with {m.drivers} wheel "
            f"driver(s), Jacobian rank {m.rank} of {m.n_coords}"
        )
    else:
        lines.append(f"location: over-constrained; {'; '.join(m.redundant)}")
    for route in analysis.routes.routes:
        via = f" via {', '.join(route.bodies)}" if route.bodies else " directly"
        rods = ", ".join(dict.fromkeys((*route.receiving_rods, *route.delivering_rods)))
        lines.append(f"route {route.name} -> corner {route.corner}{via} (rods {rods})")
    if analysis.routes.guides:
        lines.append(f"guide rods to the chassis: {', '.join(analysis.routes.guides)}")
    parts = []
    worst = 0.0
    for name, res in analysis.sweeps.items():
        parts.append(f"{name} {res.spec.size}")
        worst = max(worst, float(res.solved.residual_max_mm.max(initial=0.0)))
    lines.append(f"poses solved: {', '.join(parts)}; largest residual {worst:.1e} mm")
    for note in sweep_warnings(analysis):
        lines.append(f"warning: {note}")
    if analysis.loads is not None:
        lines.append(f"load cases: {', '.join(analysis.loads.cases)}")
        for note in analysis.loads.left_out:
            lines.append(f"planar design: {note}")
    else:
        lines.append(
            "load cases: none (give [design] top_speed_kmh and element aero data, "
            "or [load_cases]); forces are not checked"
        )
    if any(st.elastic for st in analysis.statics.values()):
        lines.append(
            "over-constrained: forces come from an elastic solution with rod "
            "stiffness EA/L, so they depend on the members' stiffness"
        )
    lines += redundancy_lines(analysis)
    lines.append("")
    rows: list[tuple[str, ...]] = [("check", "status", "value", "limit", "worst at")]
    for c in checks:
        rows.append((c.id, c.status.upper(), _value_text(c), _limit_text(c), c.where))
    lines += _table(rows)
    details = [c for c in checks if c.detail]
    if details:
        lines.append("")
        for c in details:
            lines.append(f"{c.id}: {c.detail}")
    lines += springs_lines(analysis)
    if findings.reserves and analysis.statics:
        lines += ["", "members (worst over every sweep and load case; force + tension)"]
        lines += _table(member_rows(findings))
    if findings.clearance.pairs:
        lines += [
            "",
            f"closest pairs over {findings.clearance.poses} poses (mm; negative = "
            "interference depth)",
        ]
        rows = [("solid", "against", "distance", "limit", "where")]
        for p in findings.clearance.pairs[:CLOSEST_SHOWN]:
            where = f"sweep '{p.sweep}' at {p.at}" if p.exact else "every pose (bound)"
            dist = f"{p.distance_mm:.1f}" if p.exact else f"> {p.distance_mm:.0f}"
            rows.append((p.a, p.b, dist, f"{p.limit_mm:g}", where))
        lines += _table(rows)
        lines += [f"not checked: {note}" for note in findings.clearance.skipped]
    lines += ["", f"route mass {findings.mass.total_kg:.2f} kg; added unsprung mass per corner"]
    lines += _table(mass_rows(findings))
    if findings.mass.estimated_inertia:
        lines.append(
            "element inertia estimated as a uniform block (give inertia_kg_m2): "
            + ", ".join(findings.mass.estimated_inertia)
        )
    v = verdict(checks)
    counts = {s: sum(c.status == s for c in checks) for s in ("pass", "warn", "fail")}
    lines += [
        "",
        f"verdict: {v.upper()} ({counts['pass']} pass, {counts['warn']} warn, "
        f"{counts['fail']} fail)",
        "",
        CAUTION,
    ]
    return "\n".join(lines) + "\n"


def sweep_json(analysis: Analysis) -> dict[str, object]:
    out: dict[str, object] = {}
    for name, fig in analysis.figures.items():
        res = analysis.sweeps[name]
        entry: dict[str, object] = {"poses": res.spec.size}
        for key, values in res.spec.values.items():
            entry[key] = _series(values)
        entry["residual_max_mm"] = float(res.solved.residual_max_mm.max(initial=0.0))
        if fig.route_ratio:
            entry["route_ratio"] = {k: _series(v) for k, v in fig.route_ratio.items()}
            entry["pickup_travel_mm"] = {k: _series(v) for k, v in fig.pickup_travel_mm.items()}
        entry["line_of_action_deg"] = {k: _series(v) for k, v in fig.line_of_action_deg.items()}
        entry["transmission_angle_deg"] = {
            f"{rod}@{body}": _series(fig.transmission_deg[:, j])
            for j, (rod, body) in enumerate(fig.transmission_labels)
        }
        if fig.ride_height:
            entry["ride_height_mm"] = {e: _series(r.height_mm) for e, r in fig.ride_height.items()}
            entry["ride_height_bolted_mm"] = {
                e: _series(r.bolted_height_mm) for e, r in fig.ride_height.items()
            }
            entry["sensitivity"] = {
                e: {_sens_key(k): _series(v) for k, v in r.sensitivity.items()}
                for e, r in fig.ride_height.items()
            }
            entry["sensitivity_bolted"] = {
                e: {_sens_key(k): _series(v) for k, v in r.bolted_sensitivity.items()}
                for e, r in fig.ride_height.items()
            }
        if fig.attitude:
            kinds = {e.name: e.kind for e in analysis.design.elements}
            attitude: dict[str, object] = {}
            for e, att in fig.attitude.items():
                item = {
                    "pitch_deg": _series(att.pitch_deg),
                    "roll_deg": _series(att.roll_deg),
                    "pitch_bolted_deg": _series(att.bolted_pitch_deg),
                    "roll_bolted_deg": _series(att.bolted_roll_deg),
                }
                if kinds.get(e) == "wing":
                    item["angle_of_attack_change_deg"] = _series(att.pitch_deg)
                attitude[e] = item
            entry["attitude"] = attitude
        out[name] = entry
    return out


def _sens_key(parameter: str) -> str:
    return "heave_mm_per_mm" if parameter == "heave" else f"{parameter}_mm_per_deg"


def as_json(findings: Findings, *, indent: int | None = 1) -> str:
    """The report as JSON text."""
    analysis, checks = findings.analysis, findings.checks
    d = analysis.design
    members = []
    for name, reserve in findings.reserves.items():
        member = analysis.members[name]
        members.append(
            {
                "name": name,
                "material": member.material.id,
                "od_mm": member.section.od_mm,
                "wall_mm": member.section.wall_mm,
                "length_mm": round(member.length_mm, 6),
                "mass_kg": round(member.mass_kg, 6),
                "stiffness_N_per_mm": round(member.stiffness_N_per_mm, 3),
                "critical_load_N": round(reserve.critical_load_N, 3),
                "regime": reserve.regime,
                "slenderness": round(reserve.slenderness, 4),
                "min_force_N": None
                if reserve.compression is None
                else round(reserve.compression.force_N, 4),
                "max_force_N": None
                if reserve.tension is None
                else round(reserve.tension.force_N, 4),
                "buckling_reserve": _finite(reserve.buckling_rf),
                "tension_reserve": _finite(reserve.tension_rf),
            }
        )
    doc = {
        "design": {
            "name": d.name,
            "file": d.source,
            "plane": d.plane,
            "corners": [c.name for c in d.corners],
            "elements": [e.name for e in d.elements],
            "rods": [r.name for r in d.rods],
            "rockers": [r.name for r in d.rockers],
            "plausibility": list(findings.plausibility),
        },
        "verdict": verdict(checks),
        "checks": [c.as_json() for c in checks],
        "location": location_summary(analysis),
        "routes": [
            {
                "name": r.name,
                "element": r.element,
                "corner": r.corner,
                "bodies": list(r.bodies),
                "receiving_rods": list(r.receiving_rods),
                "delivering_rods": list(r.delivering_rods),
            }
            for r in analysis.routes.routes
        ],
        "guides": list(analysis.routes.guides),
        "load_cases": list(analysis.loads.cases) if analysis.loads else [],
        "loads_left_out": list(analysis.loads.left_out) if analysis.loads else [],
        "members": members,
        "mass": {
            "bodies_kg": {k: round(v, 6) for k, v in findings.mass.bodies_kg.items()},
            "corners": [
                {
                    "corner": c.corner,
                    "static_share_kg": round(c.static_share_kg, 6),
                    "kinetic_single_wheel_kg": round(c.kinetic_single_kg, 6),
                    "kinetic_heave_kg": round(c.kinetic_heave_kg, 6),
                    "existing_kg": c.existing_kg,
                }
                for c in findings.mass.corners
            ],
            "estimated_inertia": list(findings.mass.estimated_inertia),
        },
        "clearance": {
            "poses": findings.clearance.poses,
            "pairs": [
                {
                    "a": p.a,
                    "b": p.b,
                    "distance_mm": round(p.distance_mm, 6),
                    "limit_mm": p.limit_mm,
                    "exact": p.exact,
                    "sweep": p.sweep if p.exact else None,
                    "pose": p.pose if p.exact else None,
                    "driver": p.driver if p.exact else None,
                    "between_poses": p.between_poses,
                    "pose_distance_mm": round(p.pose_distance_mm, 6) if p.exact else None,
                    "point_a_mm": [round(v, 6) for v in p.point_a] if p.exact else None,
                    "point_b_mm": [round(v, 6) for v in p.point_b] if p.exact else None,
                }
                for p in findings.clearance.pairs
            ],
            "not_checked": list(findings.clearance.skipped),
        },
        "compliance": {
            "route_stiffness_N_per_mm": {
                k: _finite(v) for k, v in findings.compliance.route_stiffness_N_per_mm.items()
            }
        },
        "springs": springs_json(analysis),
        "sweep_warnings": sweep_warnings(analysis),
        "sweeps": sweep_json(analysis),
        "caution": CAUTION,
    }
    redundancy = redundancy_json(analysis)
    if redundancy is not None:  # exactly located designs keep their report unchanged
        doc["redundancy"] = redundancy
    return dumps_finite(doc, source=d.source, indent=indent, ensure_ascii=False) + "\n"


def _finite(value: float) -> float | None:
    return round(float(value), 6) if np.isfinite(value) else None
