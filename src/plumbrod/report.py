"""Reports of an analysis: a readable text table and JSON.

JSON layout (documented in the README): top-level ``design``, ``checks``, ``sweeps``,
plus ``verdict``, ``location``, ``routes`` and ``caution``.  Every key that carries a
unit says it (``_mm``, ``_deg``, ``_N``).
"""

from __future__ import annotations

import json
from collections.abc import Sequence

import numpy as np
from numpy.typing import NDArray

from plumbrod.analysis import Analysis
from plumbrod.cautions import CAUTION
from plumbrod.checks import CheckResult

__all__ = ["as_json", "as_text", "verdict"]

_SIGNIFICANT = 6


def verdict(checks: Sequence[CheckResult]) -> str:
    """``fail`` if any check fails, else ``warn`` if any warns, else ``pass``."""
    statuses = {c.status for c in checks}
    return "fail" if "fail" in statuses else "warn" if "warn" in statuses else "pass"


def _series(values: NDArray[np.float64]) -> list[float]:
    return [round(float(v), _SIGNIFICANT) for v in np.asarray(values).ravel()]


def _limit_text(limit: float | tuple[float, float] | None) -> str:
    if limit is None:
        return "-"
    if isinstance(limit, tuple):
        return f"{limit[0]:g} to {limit[1]:g}"
    return f"<= {limit:g}"


def _value_text(check: CheckResult) -> str:
    if check.value is None:
        return "-"
    unit = f" {check.unit}" if check.unit and check.unit != "mm/mm" else ""
    return f"{check.value:.4g}{unit}"


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


def as_text(analysis: Analysis, checks: Sequence[CheckResult]) -> str:
    """The report as plain text (fits 100 columns except long pose descriptions)."""
    d = analysis.design
    m = analysis.mobility
    lines = [f"plumbrod check: {d.name}", f"file: {d.source}"]
    if d.plane:
        lines.append(f"planar design in the {d.plane} view")
    if m.exact:
        lines.append(f"location: exact; Grübler–Kutzbach {m.count} with {m.drivers} wheel "
                     f"driver(s), Jacobian rank {m.rank} of {m.n_coords}")
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
    lines.append("")
    rows = [("check", "status", "value", "limit", "worst at")]
    for c in checks:
        rows.append((c.id, c.status.upper(), _value_text(c), _limit_text(c.limit), c.where))
    widths = [max(len(r[i]) for r in rows) for i in range(4)]
    for r in rows:
        lines.append("  ".join(r[i].ljust(widths[i]) for i in range(4)) + "  " + r[4])
    details = [c for c in checks if c.detail]
    if details:
        lines.append("")
        for c in details:
            lines.append(f"{c.id}: {c.detail}")
    v = verdict(checks)
    counts = {s: sum(c.status == s for c in checks) for s in ("pass", "warn", "fail")}
    lines += ["", f"verdict: {v.upper()} ({counts['pass']} pass, {counts['warn']} warn, "
              f"{counts['fail']} fail)", "", CAUTION]
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
            for j, (rod, body) in enumerate(fig.transmission_labels)}
        if fig.ride_height:
            entry["ride_height_mm"] = {e: _series(r.height_mm) for e, r in fig.ride_height.items()}
            entry["ride_height_bolted_mm"] = {e: _series(r.bolted_height_mm)
                                              for e, r in fig.ride_height.items()}
            entry["sensitivity"] = {
                e: {_sens_key(k): _series(v) for k, v in r.sensitivity.items()}
                for e, r in fig.ride_height.items()}
            entry["sensitivity_bolted"] = {
                e: {_sens_key(k): _series(v) for k, v in r.bolted_sensitivity.items()}
                for e, r in fig.ride_height.items()}
        out[name] = entry
    return out


def _sens_key(parameter: str) -> str:
    return "heave_mm_per_mm" if parameter == "heave" else f"{parameter}_mm_per_deg"


def as_json(analysis: Analysis, checks: Sequence[CheckResult], *, indent: int | None = 1) -> str:
    """The report as JSON text."""
    d = analysis.design
    doc = {
        "design": {"name": d.name, "file": d.source, "plane": d.plane,
                   "corners": [c.name for c in d.corners],
                   "elements": [e.name for e in d.elements],
                   "rods": [r.name for r in d.rods], "rockers": [r.name for r in d.rockers]},
        "verdict": verdict(checks),
        "checks": [c.as_json() for c in checks],
        "location": location_summary(analysis),
        "routes": [{"name": r.name, "element": r.element, "corner": r.corner,
                    "bodies": list(r.bodies), "receiving_rods": list(r.receiving_rods),
                    "delivering_rods": list(r.delivering_rods)} for r in analysis.routes.routes],
        "guides": list(analysis.routes.guides),
        "sweeps": sweep_json(analysis),
        "caution": CAUTION,
    }
    return json.dumps(doc, indent=indent, ensure_ascii=False) + "\n"
