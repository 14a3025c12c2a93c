"""Checks: each figure against its limit, with the worst pose.

Every check gives ``pass``, ``warn`` or ``fail``.  A check warns when its worst value
uses more than :data:`WARN_FRACTION` of the allowance (so a design close to a limit is
flagged before it fails), and when it cannot be computed (a sweep it needs is off).
``ride-height-sensitivity`` also warns when the element's ride height moves more in roll
or pitch than it would bolted to the chassis.
Check ids are fixed: ``route-ratio``, ``line-of-action``, ``transmission-angle``,
``ride-height-sensitivity``, ``element-attitude``, ``member-force``, ``sprung-leakage``,
``buckling``, ``tension``, ``compliance``, ``clearance``.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from plumbrod.clearance.survey import ClearanceReport, clearance_report
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.compliance import ComplianceReport, compliance_report
from plumbrod.mechanics.structure import RodReserve, rod_reserves
from plumbrod.verdict.spring_words import element_sentence

__all__ = ["WARN_FRACTION", "CheckResult", "evaluate_checks", "status_of"]

WARN_FRACTION = 0.8
WORSE_THAN_BOLTED = 1.1
WORSE_FLOOR_MM_PER_DEG = 0.2
"""Ride height that moves more in roll or pitch than this times the bolted figure, and by
more than the floor, warns."""


@dataclass(frozen=True)
class CheckResult:
    """One check's verdict; ``limit`` is a number, a [low, high] pair or None (no limit
    applies, the value is for information)."""

    id: str
    title: str
    status: str
    value: float | None
    limit: float | tuple[float, float] | None
    unit: str
    where: str
    detail: str = ""
    at_least: bool = False
    """True when the value must be at least the limit (reserve factors)."""

    def as_json(self) -> dict[str, object]:
        limit = list(self.limit) if isinstance(self.limit, tuple) else self.limit
        value = None if self.value is None else round(float(self.value), 6)
        if isinstance(self.limit, tuple):
            rule = "range"
        else:
            rule = "min" if self.at_least else "max"
        return {
            "id": self.id,
            "title": self.title,
            "status": self.status,
            "value": value,
            "limit": limit,
            "limit_type": rule,
            "unit": self.unit,
            "where": self.where,
            "detail": self.detail,
        }


def status_of(used: float) -> str:
    """Status for the fraction of the allowance used (1 = at the limit)."""
    if not np.isfinite(used) or used > 1.0:
        return "fail"
    return "warn" if used > WARN_FRACTION else "pass"


def _pose(analysis: Analysis, sweep: str, index: int) -> str:
    return f"sweep '{sweep}' at {analysis.sweeps[sweep].spec.describe(index)}"


def _no_loads(
    check_id: str, title: str, limit: float | tuple[float, float] | None, unit: str
) -> CheckResult:
    return CheckResult(
        check_id,
        title,
        "warn",
        None,
        limit,
        unit,
        "not computed: no load case",
        "give [design] top_speed_kmh with [elements.<name>.aero], or [load_cases]",
    )


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
        f"route '{name}' in {_pose(analysis, 'travel', i)}",
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
        f"{what} in {_pose(analysis, sweep, i)}{case}",
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
        f"rod '{rod}' at '{body}' in {_pose(analysis, sweep, i)}",
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
        f"element '{element}' in {_pose(analysis, sweep, i)}",
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
        f"element '{element}' in {_pose(analysis, sweep, i)}",
        "; ".join([*([note] if note else []), *details]) + tail,
    )


def check_member_force(analysis: Analysis) -> CheckResult:
    title = "Member forces (largest tension and compression; rod-end rating)"
    if not analysis.statics:
        return _no_loads("member-force", title, None, "N")
    names = [r.name for r in analysis.design.rods]
    index = [analysis.link.rod_names.index(n) for n in names]
    worst_t = (0.0, "", "", 0, 0)
    worst_c = (0.0, "", "", 0, 0)
    worst_rated = (-1.0, "", "", 0, 0, 0.0)
    for sweep, st in analysis.statics.items():
        forces = st.rod_force_N[..., index]  # (B, K, n)
        b, k, r = np.unravel_index(int(np.argmax(forces)), forces.shape)
        if forces[b, k, r] > worst_t[0]:
            worst_t = (float(forces[b, k, r]), names[r], sweep, int(b), int(k))
        b, k, r = np.unravel_index(int(np.argmin(forces)), forces.shape)
        if forces[b, k, r] < worst_c[0]:
            worst_c = (float(forces[b, k, r]), names[r], sweep, int(b), int(k))
        for j, rod in enumerate(analysis.design.rods):
            if rod.rod_end_rating_N is None:
                continue
            used = np.abs(forces[..., j]) / rod.rod_end_rating_N
            b, k = np.unravel_index(int(np.argmax(used)), used.shape)
            if used[b, k] > worst_rated[0]:
                worst_rated = (
                    float(used[b, k]),
                    rod.name,
                    sweep,
                    int(b),
                    int(k),
                    rod.rod_end_rating_N,
                )
    cases = next(iter(analysis.statics.values())).cases

    def at(entry: tuple[float, str, str, int, int]) -> str:
        return (
            f"rod '{entry[1]}' in {_pose(analysis, entry[2], entry[3])}, "
            f"load case '{cases[entry[4]]}'"
        )

    detail = []
    if worst_t[1]:
        detail.append(f"largest tension {worst_t[0]:+.1f} N: {at(worst_t)}")
    if worst_c[1]:
        detail.append(f"largest compression {worst_c[0]:+.1f} N: {at(worst_c)}")
    largest = worst_t if abs(worst_t[0]) >= abs(worst_c[0]) else worst_c
    if worst_rated[0] < 0:
        detail.append("no rod gives rod_end_rating_N: only the magnitudes are reported")
        return CheckResult(
            "member-force",
            title,
            "pass",
            largest[0],
            None,
            "N",
            at(largest) if largest[1] else "no force",
            "; ".join(detail),
        )
    use, rod_name, sweep, pose_index, case_index, rating = worst_rated
    j = names.index(rod_name)
    force = float(analysis.statics[sweep].rod_force_N[pose_index, case_index, index[j]])
    detail.append(
        f"highest use of a rod-end rating {use:.0%} (rod '{rod_name}', rated {rating:g} N)"
    )
    return CheckResult(
        "member-force",
        title,
        status_of(use),
        force,
        rating,
        "N",
        at((force, rod_name, sweep, pose_index, case_index)),
        "; ".join(detail),
    )


LEAKAGE_AGREEMENT = 0.005
"""Largest allowed gap between the direct and the virtual-work leakage (of the load)."""


def check_sprung_leakage(analysis: Analysis) -> CheckResult:
    """The avoidable spring-load change (DESIGN §5a): the largest |axle change − floor|
    over axles, poses and load cases, as a share of the element's vertical load."""
    limit = analysis.design.limits.sprung_leakage
    title = "Sprung leakage: spring-load change the route adds beyond the floor statics forces"
    springs = analysis.springs
    if not analysis.statics or springs is None:
        return _no_loads("sprung-leakage", title, limit, "")
    worst = max(springs.per_element.values(), key=lambda es: es.avoidable)
    sweep, b, k, a = worst.avoidable_where
    gap = 0.0
    for st in analysis.statics.values():
        scale = np.maximum(np.abs(st.vertical_load_N), 1e-9)[..., None]
        lever = analysis.link.characteristic_length() / 1000.0
        diff = np.abs(st.leakage - st.leakage_virtual_work) / scale
        diff[..., 1:] /= lever
        gap = max(gap, float(diff.max()))
    gap = max(gap, springs.virtual_work_gap)
    status = status_of(worst.avoidable / limit)
    agree = (
        f"direct and virtual-work figures agree within {gap:.1e} of the load"
        if gap <= LEAKAGE_AGREEMENT
        else f"FLAG: direct and virtual-work figures differ by {gap:.2%} of the load"
    )
    if gap > LEAKAGE_AGREEMENT and status == "pass":
        status = "warn"
    sentences = [
        element_sentence(springs, es)[0].upper() + element_sentence(springs, es)[1:] + "."
        for es in springs.per_element.values()
    ]
    detail = " ".join([*sentences, agree[0].upper() + agree[1:]])
    if any(st.elastic for st in analysis.statics.values()):
        detail += "; over-constrained: forces from the elastic solution (they depend on EA/L)"
    pose = "the design pose" if sweep not in analysis.sweeps else f"{_pose(analysis, sweep, b)}"
    axle = springs.layout.axles[a].name
    return CheckResult(
        "sprung-leakage",
        title,
        status,
        worst.avoidable,
        limit,
        "",
        f"element '{worst.element}', {axle} axle, in {pose}, load case '{springs.cases[k]}'",
        detail,
    )


def _reserve_check(
    analysis: Analysis,
    check_id: str,
    title: str,
    required: float,
    reserves: dict[str, RodReserve],
    kind: str,
) -> CheckResult:
    if not analysis.statics:
        return replace(_no_loads(check_id, title, required, ""), at_least=True)
    worst: tuple[float, RodReserve | None] = (np.inf, None)
    for candidate in reserves.values():
        rf = candidate.buckling_rf if kind == "buckling" else candidate.tension_rf
        if rf < worst[0]:
            worst = (rf, candidate)
    rf, reserve = worst
    if reserve is None:
        none = "no rod is in compression" if kind == "buckling" else "no rod is in tension"
        return CheckResult(check_id, title, "pass", None, required, "", none, "", True)
    force = reserve.compression if kind == "buckling" else reserve.tension
    assert force is not None
    where = (
        f"rod '{reserve.name}' at {force.force_N:+.1f} N in "
        f"{_pose(analysis, force.sweep, force.pose)}, load case '{force.case}'"
    )
    margin = rf / required - 1.0
    if kind == "buckling":
        detail = (
            f"P_cr {reserve.critical_load_N:.0f} N ({reserve.regime}, KL/r "
            f"{reserve.slenderness:.1f}, transition {reserve.transition_slenderness:.1f});"
            f" margin of safety {margin:+.2f}"
        )
    else:
        detail = f"S_y·A {reserve.tension_capacity_N:.0f} N; margin of safety {margin:+.2f}"
    return CheckResult(
        check_id, title, status_of(required / rf), rf, required, "", where, detail, True
    )


def check_buckling(analysis: Analysis, reserves: dict[str, RodReserve]) -> CheckResult:
    return _reserve_check(
        analysis,
        "buckling",
        "Buckling reserve of compression rods (Euler / Johnson)",
        analysis.design.limits.buckling_reserve,
        reserves,
        "buckling",
    )


def check_tension(analysis: Analysis, reserves: dict[str, RodReserve]) -> CheckResult:
    return _reserve_check(
        analysis,
        "tension",
        "Tension reserve against yield",
        analysis.design.limits.tension_reserve,
        reserves,
        "tension",
    )


def check_compliance(analysis: Analysis, report: ComplianceReport) -> CheckResult:
    limit = analysis.design.limits.compliance_mm
    title = "Element deflection from rod stretch (route compliance)"
    if report.worst is None:
        return _no_loads("compliance", title, limit, "mm")
    value, element, sweep, b, case = report.worst
    stiff = ", ".join(f"{k} {v:,.0f} N/mm" for k, v in report.route_stiffness_N_per_mm.items())
    return CheckResult(
        "compliance",
        title,
        status_of(abs(value) / limit),
        abs(value),
        limit,
        "mm",
        f"element '{element}' in {_pose(analysis, sweep, b)}, load case '{case}'",
        f"vertical stiffness at the route pickups: {stiff}",
    )


def check_clearance(analysis: Analysis, report: ClearanceReport) -> CheckResult:
    title = "Clearance of rods and rockers to zones, tyres and each other"
    default = analysis.design.limits.clearance_mm
    if not report.pairs:
        return CheckResult(
            "clearance",
            title,
            "pass",
            None,
            default,
            "mm",
            "no pair to measure",
            "; ".join(report.skipped),
            True,
        )
    worst = report.pairs[0]
    if worst.exact:
        where = (
            f"{worst.a} to {worst.b} in {_pose(analysis, worst.sweep, worst.pose)}, "
            f"points {_point(worst.point_a)} and {_point(worst.point_b)}"
        )
    else:
        where = f"{worst.a} to {worst.b}: more than {worst.distance_mm:.0f} mm at every pose"
    used = worst.limit_mm / worst.distance_mm if worst.distance_mm > 0 else np.inf
    closest = "; ".join(
        f"{p.a} to {p.b} {'' if p.exact else 'more than '}{p.distance_mm:.1f} mm "
        f"(limit {p.limit_mm:g})"
        for p in report.pairs[:5]
    )
    detail = f"closest pairs over {report.poses} poses: {closest}"
    if worst.distance_mm < 0:
        detail = f"INTERFERENCE {-worst.distance_mm:.1f} mm deep; " + detail
    if report.skipped:
        detail += "; " + "; ".join(report.skipped)
    return CheckResult(
        "clearance",
        title,
        status_of(used),
        worst.distance_mm,
        worst.limit_mm,
        "mm",
        where,
        detail,
        True,
    )


def _point(p: tuple[float, float, float]) -> str:
    return "(" + ", ".join(f"{v:.1f}" for v in p) + ")"


def evaluate_checks(
    analysis: Analysis,
    reserves: dict[str, RodReserve] | None = None,
    compliance: ComplianceReport | None = None,
    clearance: ClearanceReport | None = None,
) -> list[CheckResult]:
    """Every check, in a fixed order (pass precomputed parts to avoid doing them twice)."""
    reserves = rod_reserves(analysis) if reserves is None else reserves
    compliance = compliance_report(analysis) if compliance is None else compliance
    clearance = clearance_report(analysis) if clearance is None else clearance
    return [
        check_route_ratio(analysis),
        check_line_of_action(analysis),
        check_transmission(analysis),
        check_ride_height(analysis),
        check_element_attitude(analysis),
        check_member_force(analysis),
        check_sprung_leakage(analysis),
        check_buckling(analysis, reserves),
        check_tension(analysis, reserves),
        check_compliance(analysis, compliance),
        check_clearance(analysis, clearance),
    ]
