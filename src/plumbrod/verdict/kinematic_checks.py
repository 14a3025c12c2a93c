"""Checks of the kinematic figures: route ratio, line of action, transmission angle,
ride-height sensitivity and element attitude, each against its limit with its worst pose.
"""

from __future__ import annotations

import numpy as np

from plumbrod.mechanics.analysis import Analysis
from plumbrod.verdict.check_result import CheckResult, pose_text, status_of

__all__ = [
    "check_element_attitude",
    "check_line_of_action",
    "check_ride_height",
    "check_route_ratio",
    "check_transmission",
]

WORSE_THAN_BOLTED = 1.1
WORSE_FLOOR_MM_PER_DEG = 0.2
"""Ride height that moves more in roll or pitch than this times the bolted figure, and by
more than the floor, warns."""


def check_route_ratio(analysis: Analysis) -> CheckResult:
    lo, hi = analysis.design.limits.route_ratio
    title = "Route ratio through the wheel travel"
    travel = analysis.figures.get("travel")
    if travel is None or not travel.route_ratio:
        return CheckResult(
            "route-ratio",
            title,
            "warn",
            None,
            (lo, hi),
            "",
            "not computed: the travel sweep is off",
            "enable [sweeps.travel] to check the route ratio",
        )
    centre, half = (lo + hi) / 2.0, (hi - lo) / 2.0
    worst = (-1.0, "", 0, 0.0)
    lines = []
    for name, ratio in travel.route_ratio.items():
        used = np.abs(ratio - centre) / half
        i = int(np.argmax(used))
        lines.append(f"{name}: {ratio.min():.4f} to {ratio.max():.4f}")
        if used[i] > worst[0]:
            worst = (float(used[i]), name, i, float(ratio[i]))
    use, name, i, value = worst
    return CheckResult(
        "route-ratio",
        title,
        status_of(use),
        value,
        (lo, hi),
        "mm/mm",
        f"route '{name}' in {pose_text(analysis, 'travel', i)}",
        "; ".join(lines),
    )


def check_line_of_action(analysis: Analysis) -> CheckResult:
    limit = analysis.design.limits.line_of_action_deg
    worst = (-1.0, "", "", 0, "")
    for sweep, fig in analysis.figures.items():
        for rod, angle in fig.line_of_action_deg.items():
            i = int(np.argmax(angle))
            if angle[i] > worst[0]:
                worst = (float(angle[i]), f"rod '{rod}' ({_rod_role(analysis, rod)})", sweep, i, "")
    resultant = -1.0
    for sweep, st in analysis.statics.items():
        for corner, force in st.corner_force_N.items():
            size = np.linalg.norm(force, axis=-1)
            cos = np.abs(force[..., 2]) / np.where(size > 0, size, 1.0)
            angle = np.where(size > 1e-9, np.degrees(np.arccos(np.clip(cos, 0.0, 1.0))), 0.0)
            b, k = np.unravel_index(int(np.argmax(angle)), angle.shape)
            resultant = max(resultant, float(angle[b, k]))
            if angle[b, k] > worst[0]:
                worst = (
                    float(angle[b, k]),
                    f"resultant force of the routes on corner '{corner}'",
                    sweep,
                    int(b),
                    f", load case '{st.cases[k]}'",
                )
    title = "Line of action from vertical (route rods and the force on each upright)"
    if worst[0] < 0:
        return CheckResult(
            "line-of-action", title, "warn", None, limit, "deg", "not computed: no sweep ran", ""
        )
    value, what, sweep, i, case = worst
    detail = (
        f"largest angle of a resultant force on a corner {resultant:.2f} deg"
        if resultant >= 0
        else ""
    )
    return CheckResult(
        "line-of-action",
        title,
        status_of(value / limit),
        value,
        limit,
        "deg",
        f"{what} in {pose_text(analysis, sweep, i)}{case}",
        detail,
    )


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
            worst = (float(used[b, j]), float(mu[b, j]), fig.transmission_labels[j], sweep, int(b))
    if worst[3] == "":
        return CheckResult(
            "transmission-angle",
            title,
            "pass",
            None,
            (lo, hi),
            "deg",
            "no rod ends on hinged bodies",
            "",
        )
    use, value, (rod, body), sweep, i = worst
    return CheckResult(
        "transmission-angle",
        title,
        status_of(use),
        value,
        (lo, hi),
        "deg",
        f"rod '{rod}' at '{body}' in {pose_text(analysis, sweep, i)}",
        "near 0° or 180° the rod locks the rocker",
    )


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
    worse: list[str] = []
    for sweep, key, unit in (
        ("heave", "heave", "mm/mm"),
        ("roll", "roll", "mm/deg"),
        ("pitch", "pitch", "mm/deg"),
    ):
        fig = analysis.figures.get(sweep)
        if fig is None:
            continue
        for element, rh in fig.ride_height.items():
            s = rh.sensitivity[key]
            b = rh.bolted_sensitivity[key]
            details.append(
                f"{element} {key}: {s.min():+.3f} to {s.max():+.3f} {unit} "
                f"(bolted {b.min():+.3f} to {b.max():+.3f})"
            )
            route, bolted = float(np.abs(s).max()), float(np.abs(b).max())
            if key != "heave" and route > max(
                WORSE_THAN_BOLTED * bolted, bolted + WORSE_FLOOR_MM_PER_DEG
            ):
                worse.append(
                    f"{element} moves more in {key} ({route:.2f} {unit}) than if it "
                    f"were bolted to the chassis ({bolted:.2f} {unit})"
                )
    if worst[0] < 0:
        return CheckResult(
            "ride-height-sensitivity",
            title,
            "warn",
            None,
            limit,
            "mm/mm",
            "not computed: the heave sweep is off",
            "enable [sweeps.heave] to check it",
        )
    used, element, sweep, i, value = worst
    status = status_of(used / limit)
    if worse and status == "pass":
        status = "warn"
    return CheckResult(
        "ride-height-sensitivity",
        title,
        status,
        value,
        limit,
        "mm/mm",
        f"element '{element}' in {pose_text(analysis, sweep, i)}",
        "; ".join([*worse, *details]),
    )


ATTITUDE_AS_BOLTED = 0.05
"""An element whose worst pitch change is within this share (or 0.01°) of the bolted
element's, on routes that land on one axle, pitches with the body as physics forces:
the check then warns instead of failing."""
BODY_SWEEPS = ("heave", "roll", "pitch", "heave_roll")


def _span(values: np.ndarray) -> str:
    """'-1.00 to +1.00' without negative zeros."""
    lo, hi = (round(float(v), 2) + 0.0 for v in (values.min(), values.max()))
    return f"{lo:+.2f} to {hi:+.2f}"


def check_element_attitude(analysis: Analysis) -> CheckResult:
    """Largest pitch change of an element relative to the ground over the body sweeps
    (DESIGN §5a); the limit is plumbrod's own default (0.5°): choose yours."""
    limit = analysis.design.limits.element_attitude_deg
    title = "Element attitude: pitch change relative to the ground through the body sweeps"
    worst = (-1.0, "", "", 0, 0.0)
    for sweep in BODY_SWEEPS:
        fig = analysis.figures.get(sweep)
        if fig is None:
            continue
        for element, att in fig.attitude.items():
            i = int(np.argmax(np.abs(att.pitch_deg)))
            if abs(att.pitch_deg[i]) > worst[0]:
                worst = (float(abs(att.pitch_deg[i])), element, sweep, i, float(att.pitch_deg[i]))
    if worst[0] < 0:
        return CheckResult(
            "element-attitude",
            title,
            "warn",
            None,
            limit,
            "deg",
            "not computed: every body sweep is off",
            "enable [sweeps.heave], [sweeps.roll] or [sweeps.pitch] to check it",
        )
    used, element, sweep, i, value = worst
    att = analysis.figures[sweep].attitude[element]
    bolted = float(att.bolted_pitch_deg[i])
    kinds = {e.name: e.kind for e in analysis.design.elements}
    details = []
    for name in kinds:
        parts = []
        for sw in (*BODY_SWEEPS, "travel"):
            fig = analysis.figures.get(sw)
            if fig is None or name not in fig.attitude:
                continue
            a = fig.attitude[name]
            text = f"in {sw}: pitch {_span(a.pitch_deg)}° (bolted {_span(a.bolted_pitch_deg)}°)"
            if sw in ("roll", "heave_roll"):
                text += f", roll {_span(a.roll_deg)}° (bolted {_span(a.bolted_roll_deg)}°)"
            parts.append(text)
        label = name
        if kinds[name] == "wing":
            label += " (angle of attack change = its pitch, + leading edge down)"
        details.append(f"{label}: " + ", ".join(parts))
    status = status_of(used / limit)
    landed: dict[str, set[str]] = {}
    springs = analysis.springs
    for route in analysis.routes.routes:
        for corner in route.corners:
            axle = "front"
            if springs is not None and corner in springs.layout.rear.corners:
                axle = "rear"
            landed.setdefault(route.element, set()).add(axle)
    forced = len(landed.get(element, set())) == 1 and abs(abs(value) - abs(bolted)) <= max(
        ATTITUDE_AS_BOLTED * abs(bolted), 0.01
    )
    note = ""
    if forced:
        note = (
            f"{element} pitches with the body as it would bolted ({bolted:+.2f}°): routes "
            "to one axle cannot hold its pitch, only routes to both axles can"
        )
        if status == "fail":
            status = "warn"
    default = analysis.design.limits.element_attitude_deg == 0.5
    tail = "; the 0.5° limit is plumbrod's own default: choose yours" if default else ""
    return CheckResult(
        "element-attitude",
        title,
        status,
        value,
        limit,
        "deg",
        f"element '{element}' in {pose_text(analysis, sweep, i)}",
        "; ".join([*([note] if note else []), *details]) + tail,
    )
