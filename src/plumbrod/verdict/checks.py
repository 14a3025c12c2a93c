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

from dataclasses import replace

import numpy as np

from plumbrod.clearance.survey import ClearanceReport, clearance_report
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.compliance import ComplianceReport, compliance_report
from plumbrod.mechanics.structure import RodReserve, rod_reserves
from plumbrod.verdict.check_result import (
    WARN_FRACTION,
    CheckResult,
    no_loads,
    pose_text,
    status_of,
)
from plumbrod.verdict.kinematic_checks import (
    check_element_attitude,
    check_line_of_action,
    check_ride_height,
    check_route_ratio,
    check_transmission,
)
from plumbrod.verdict.spring_words import element_sentence

__all__ = [
    "WARN_FRACTION",
    "CheckResult",
    "check_element_attitude",
    "check_line_of_action",
    "check_ride_height",
    "check_route_ratio",
    "check_transmission",
    "evaluate_checks",
    "status_of",
]


def check_member_force(analysis: Analysis) -> CheckResult:
    title = "Member forces (largest tension and compression; rod-end rating)"
    if not analysis.statics:
        return no_loads("member-force", title, None, "N")
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
            f"rod '{entry[1]}' in {pose_text(analysis, entry[2], entry[3])}, "
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
        return no_loads("sprung-leakage", title, limit, "")
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
    pose = "the design pose" if sweep not in analysis.sweeps else f"{pose_text(analysis, sweep, b)}"
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
        return replace(no_loads(check_id, title, required, ""), at_least=True)
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
        f"{pose_text(analysis, force.sweep, force.pose)}, load case '{force.case}'"
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
        return no_loads("compliance", title, limit, "mm")
    value, element, sweep, b, case = report.worst
    stiff = ", ".join(f"{k} {v:,.0f} N/mm" for k, v in report.route_stiffness_N_per_mm.items())
    return CheckResult(
        "compliance",
        title,
        status_of(abs(value) / limit),
        abs(value),
        limit,
        "mm",
        f"element '{element}' in {pose_text(analysis, sweep, b)}, load case '{case}'",
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
            f"{worst.a} to {worst.b} in sweep '{worst.sweep}' at {worst.at}, "
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
