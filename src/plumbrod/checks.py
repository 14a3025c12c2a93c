"""Checks: each figure against its limit, with the worst pose.

Every check gives ``pass``, ``warn`` or ``fail``.  A check warns when its worst value
uses more than :data:`WARN_FRACTION` of the allowance (so a design close to a limit is
flagged before it fails), and when it cannot be computed (a sweep it needs is off).
Check ids are fixed: ``route-ratio``, ``line-of-action``, ``transmission-angle``,
``ride-height-sensitivity`` (later: ``member-force``, ``sprung-leakage``, ``buckling``,
``tension``, ``compliance``, ``clearance``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plumbrod.analysis import Analysis

__all__ = ["WARN_FRACTION", "CheckResult", "evaluate_checks", "status_of"]

WARN_FRACTION = 0.8


@dataclass(frozen=True)
class CheckResult:
    """One check's verdict; ``limit`` is a number or a [low, high] pair."""

    id: str
    title: str
    status: str
    value: float | None
    limit: float | tuple[float, float]
    unit: str
    where: str
    detail: str = ""

    def as_json(self) -> dict[str, object]:
        limit = list(self.limit) if isinstance(self.limit, tuple) else self.limit
        value = None if self.value is None else round(float(self.value), 6)
        return {"id": self.id, "title": self.title, "status": self.status, "value": value,
                "limit": limit, "unit": self.unit, "where": self.where, "detail": self.detail}


def status_of(used: float) -> str:
    """Status for the fraction of the allowance used (1 = at the limit)."""
    if not np.isfinite(used) or used > 1.0:
        return "fail"
    return "warn" if used > WARN_FRACTION else "pass"


def _pose(analysis: Analysis, sweep: str, index: int) -> str:
    return f"sweep '{sweep}' at {analysis.sweeps[sweep].spec.describe(index)}"


def check_route_ratio(analysis: Analysis) -> CheckResult:
    lo, hi = analysis.design.limits.route_ratio
    title = "Route ratio through the wheel travel"
    travel = analysis.figures.get("travel")
    if travel is None or not travel.route_ratio:
        return CheckResult("route-ratio", title, "warn", None, (lo, hi), "",
                           "not computed: the travel sweep is off",
                           "enable [sweeps.travel] to check the route ratio")
    centre, half = (lo + hi) / 2.0, (hi - lo) / 2.0
    worst = (-1.0, "", 0, 0.0)
    lines = []
    for name, ratio in travel.route_ratio.items():
        used = np.abs(ratio - centre) / half
        i = int(np.argmax(used))
        lines.append(f"{name}: {ratio.min():.4f} to {ratio.max():.4f}")
        if used[i] > worst[0]:
            worst = (float(used[i]), name, i, float(ratio[i]))
    used, name, i, value = worst
    return CheckResult("route-ratio", title, status_of(used), value, (lo, hi), "mm/mm",
                       f"route '{name}' in {_pose(analysis, 'travel', i)}", "; ".join(lines))


def check_line_of_action(analysis: Analysis) -> CheckResult:
    limit = analysis.design.limits.line_of_action_deg
    worst = (-1.0, "", "", 0)
    for sweep, fig in analysis.figures.items():
        for rod, angle in fig.line_of_action_deg.items():
            i = int(np.argmax(angle))
            if angle[i] > worst[0]:
                worst = (float(angle[i]), rod, sweep, i)
    title = "Line of action of route rods from vertical"
    if worst[0] < 0:
        return CheckResult("line-of-action", title, "warn", None, limit, "deg",
                           "not computed: no sweep ran", "")
    value, rod, sweep, i = worst
    role = _rod_role(analysis, rod)
    return CheckResult("line-of-action", title, status_of(value / limit), value, limit, "deg",
                       f"rod '{rod}' ({role}) in {_pose(analysis, sweep, i)}")


def _rod_role(analysis: Analysis, rod: str) -> str:
    roles = []
    for route in analysis.routes.routes:
        if rod in route.receiving_rods:
            roles.append("takes the load from the element")
        if rod in route.delivering_rods:
            roles.append("delivers the load to the corner")
    return " and ".join(dict.fromkeys(roles)) or "route rod"


def check_transmission(analysis: Analysis) -> CheckResult:
    lo, hi = analysis.design.limits.transmission_angle_deg
    title = "Transmission angle at rod ends on rockers and wishbones"
    worst = (-np.inf, 0.0, ("", ""), "", 0)
    for sweep, fig in analysis.figures.items():
        if fig.transmission_deg.shape[1] == 0:
            continue
        mu = fig.transmission_deg
        # fraction of the allowance used towards the nearer limit
        used = np.maximum((90.0 - mu) / (90.0 - lo), (mu - 90.0) / (hi - 90.0))
        b, j = np.unravel_index(int(np.argmax(used)), used.shape)
        if used[b, j] > worst[0]:
            worst = (float(used[b, j]), float(mu[b, j]), fig.transmission_labels[j], sweep,
                     int(b))
    if worst[3] == "":
        return CheckResult("transmission-angle", title, "pass", None, (lo, hi), "deg",
                           "no rod ends on hinged bodies", "")
    used, value, (rod, body), sweep, i = worst
    return CheckResult("transmission-angle", title, status_of(used), value, (lo, hi), "deg",
                       f"rod '{rod}' at '{body}' in {_pose(analysis, sweep, i)}",
                       "near 0° or 180° the rod locks the rocker")


def check_ride_height(analysis: Analysis) -> CheckResult:
    limit = analysis.design.limits.heave_sensitivity
    title = "Ride-height sensitivity of each element to body heave"
    worst = (-1.0, "", "", 0, 0.0)
    details = []
    for sweep in ("heave", "heave_roll"):
        fig = analysis.figures.get(sweep)
        if fig is None:
            continue
        for element, rh in fig.ride_height.items():
            s = rh.sensitivity.get("heave")
            if s is None:
                continue
            i = int(np.argmax(np.abs(s)))
            if abs(s[i]) > worst[0]:
                worst = (float(abs(s[i])), element, sweep, i, float(s[i]))
    for sweep, key, unit in (("heave", "heave", "mm/mm"), ("roll", "roll", "mm/deg"),
                             ("pitch", "pitch", "mm/deg")):
        fig = analysis.figures.get(sweep)
        if fig is None:
            continue
        for element, rh in fig.ride_height.items():
            s = rh.sensitivity[key]
            b = rh.bolted_sensitivity[key]
            details.append(f"{element} {key}: {s.min():+.3f} to {s.max():+.3f} {unit} "
                           f"(bolted {b.min():+.3f} to {b.max():+.3f})")
    if worst[0] < 0:
        return CheckResult("ride-height-sensitivity", title, "warn", None, limit, "mm/mm",
                           "not computed: the heave sweep is off",
                           "enable [sweeps.heave] to check it")
    used, element, sweep, i, value = worst
    return CheckResult("ride-height-sensitivity", title, status_of(used / limit), value, limit,
                       "mm/mm", f"element '{element}' in {_pose(analysis, sweep, i)}",
                       "; ".join(details))


def evaluate_checks(analysis: Analysis) -> list[CheckResult]:
    """Every check, in a fixed order."""
    return [
        check_route_ratio(analysis),
        check_line_of_action(analysis),
        check_transmission(analysis),
        check_ride_height(analysis),
    ]
