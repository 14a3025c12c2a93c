"""The spring figures of a report (DESIGN §5a): the ``springs`` JSON object, the text
section and the one readable sentence per element.

JSON (names kept stable for other programs)::

    springs.car                      wheelbase, tracks, roll split, wheel rates used
    springs.axles.front / .rear      x_mm, track_mm, corners,
                                     design_pose.{delta_N, delta_bolted_N, floor_N}[case],
                                     worst.{delta_N, delta_bolted_N}[case],
                                     ride_height_change_mm[case],
                                     ride_height_change_bolted_mm[case] (with wheel rates)
    springs.corners.<corner>         design_pose.{delta_N, delta_bolted_N,
                                     tyre_load_gain_N}[case]
    springs.elements.<name>          share, share_bolted, floor, avoidable (of its
                                     vertical load), lands_on, lever_mm, summary
    springs.needs                    figures that need [car] wheelbase_mm

``worst`` is the signed value of largest magnitude over every sweep and pose.  Values a
missing wheelbase leaves unknown are null.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.car import SpringPoint
from plumbrod.design.model import Design
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.loads import design_load_cases
from plumbrod.mechanics.springs import SpringLoads
from plumbrod.verdict.spring_words import element_sentence

__all__ = ["springs_json", "springs_lines", "top_speed_case"]

Array = NDArray[np.float64]


def _num(value: float | None, digits: int = 6) -> float | None:
    if value is None or not np.isfinite(value):
        return None
    return round(float(value), digits)


def top_speed_case(design: Design, cases: tuple[str, ...]) -> int:
    """Index of the first case at the highest speed without a bump."""
    given = design_load_cases(design)
    best, index = -1.0, 0
    for case in given:
        if case.name not in cases:
            continue
        score = case.speed_kmh - (1e6 if case.bump_g else 0.0)
        if score > best:
            best, index = score, cases.index(case.name)
    return index


def needs_wheelbase(springs: SpringLoads) -> list[str]:
    if not springs.layout.needs_wheelbase:
        return []
    return [
        "spring-load change per axle and corner (share, floor, bolted)",
        "ride-height change at speed",
    ]


def _signed_worst(arrays: list[Array]) -> float | None:
    """The value of largest magnitude (NaN-free) over arrays (B,)."""
    best: float | None = None
    for a in arrays:
        finite = a[np.isfinite(a)]
        if finite.size == 0:
            continue
        v = float(finite[np.argmax(np.abs(finite))])
        if best is None or abs(v) > abs(best):
            best = v
    return best


def springs_json(analysis: Analysis) -> dict[str, object] | None:
    """The ``springs`` object of ``check --json``; None without a load case."""
    springs = analysis.springs
    if springs is None:
        return None
    layout = springs.layout
    design = springs.design
    cases = springs.cases
    car = analysis.design.car
    out: dict[str, object] = {
        "car": {
            "wheelbase_mm": _num(layout.wheelbase_mm),
            "wheelbase_from": layout.wheelbase_from or None,
            "track_front_mm": _num(layout.front.track_mm),
            "track_rear_mm": _num(layout.rear.track_mm),
            "roll_stiffness_front_share": layout.roll_front_share,
            "roll_stiffness_front_share_given": layout.roll_share_given,
            "wheel_rate_front_N_per_mm": car.wheel_rate_front_N_per_mm,
            "wheel_rate_rear_N_per_mm": car.wheel_rate_rear_N_per_mm,
            "motion_centre_mm": [_num(v) for v in analysis.design.sweeps.motion_centre_mm],
        },
        "needs": needs_wheelbase(springs),
    }
    rides = springs.ride_height_change_mm()
    rides_bolted = springs.ride_height_change_mm(bolted=True)
    axles: dict[str, object] = {}
    for a, axle in enumerate(layout.axles):
        entry: dict[str, object] = {
            "x_mm": _num(axle.x_mm),
            "track_mm": _num(axle.track_mm),
            "corners": list(axle.corners),
            "springs": [s.name for s in axle.springs],
            "design_pose": {
                "delta_N": {c: _num(design.axle_N[0, k, :, a].sum()) for k, c in enumerate(cases)},
                "delta_bolted_N": {
                    c: _num(design.axle_bolted_N[0, k, :, a].sum()) for k, c in enumerate(cases)
                },
                "floor_N": {
                    c: _num(design.axle_floor_N[0, k, :, a].sum()) for k, c in enumerate(cases)
                },
            },
            "worst": {
                key: {
                    c: _num(
                        _signed_worst(
                            [
                                getattr(s, attr)[:, k, :, a].sum(axis=1)
                                for s in (*springs.sweeps.values(), design)
                            ]
                        )
                    )
                    for k, c in enumerate(cases)
                }
                for key, attr in (("delta_N", "axle_N"), ("delta_bolted_N", "axle_bolted_N"))
            },
        }
        if rides is not None and axle.name in rides:
            entry["ride_height_change_mm"] = {
                c: _num(rides[axle.name][k]) for k, c in enumerate(cases)
            }
            assert rides_bolted is not None
            entry["ride_height_change_bolted_mm"] = {
                c: _num(rides_bolted[axle.name][k]) for k, c in enumerate(cases)
            }
        axles[axle.name] = entry
    out["axles"] = axles
    out["corners"] = {
        name: {
            "axle": layout.axles[springs.spring_axle[s]].name,
            "in_design": any(name in ax.corners for ax in layout.axles),
            "design_pose": {
                "delta_N": {
                    c: _num(design.spring_N[0, k, :, s].sum()) for k, c in enumerate(cases)
                },
                "delta_bolted_N": {
                    c: _num(design.spring_bolted_N[0, k, :, s].sum()) for k, c in enumerate(cases)
                },
                "tyre_load_gain_N": {
                    c: _num(design.tyre_gain_N[0, k, s]) for k, c in enumerate(cases)
                },
            },
        }
        for s, name in enumerate(springs.spring_names)
    }
    out["elements"] = {
        name: {
            "share": _num(es.share),
            "share_bolted": _num(es.share_bolted),
            "floor": _num(es.floor),
            "avoidable": _num(es.avoidable),
            "lands_on": list(es.axles),
            "lever_mm": _num(es.lever_mm, 3),
            "vertical_load_N": _num(es.load_N, 3),
            "summary": element_sentence(springs, es),
        }
        for name, es in springs.per_element.items()
    }
    out["virtual_work_gap"] = float(f"{springs.virtual_work_gap:.3e}")
    return out


def _n(value: float) -> str:
    return "-" if not np.isfinite(value) else f"{value:+.1f}"


def springs_lines(analysis: Analysis) -> list[str]:
    """The text report's spring section (design pose, every load case)."""
    springs = analysis.springs
    if springs is None:
        return []
    layout = springs.layout
    design = springs.design
    wb = layout.wheelbase_mm
    origin = "from the corners" if layout.wheelbase_from == "corners" else "given"
    wb_text = "unknown (give [car] wheelbase_mm)" if wb is None else f"{wb:.0f} mm ({origin})"
    share = layout.roll_front_share
    roll_text = f"{share:g}"
    if not layout.roll_share_given:
        roll_text += " (default, common practice: give your car's)"
    lines = [
        "",
        "spring-load changes at the design pose (N, wheel-equivalent, + = more compressed; "
        f"wheelbase {wb_text}, front roll-stiffness share {roll_text})",
    ]
    rows = [("load case", "axle", "route", "bolted", "floor", "corners (route)")]
    for k, case in enumerate(springs.cases):
        for a, axle in enumerate(layout.axles):
            corners = ", ".join(
                f"{s.name} {_n(float(design.spring_N[0, k, :, i].sum()))}"
                for i, s in enumerate(_spring_points(springs))
                if springs.spring_axle[i] == a
            )
            rows.append(
                (
                    case,
                    axle.name,
                    _n(float(design.axle_N[0, k, :, a].sum())),
                    _n(float(design.axle_bolted_N[0, k, :, a].sum())),
                    _n(float(design.axle_floor_N[0, k, :, a].sum())),
                    corners,
                )
            )
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    lines += ["  ".join(r[i].ljust(widths[i]) for i in range(len(r))).rstrip() for r in rows]
    gains = ", ".join(
        f"{name} {design.tyre_gain_N[0, 0, s]:+.1f}" for s, name in enumerate(springs.spring_names)
    )
    total = float(-design.vertical_load_N[0, 0].sum())
    lines.append(
        f"tyre-load gain in '{springs.cases[0]}' (route delivery + spring): {gains} N; "
        f"sum {design.tyre_gain_N[0, 0].sum():+.1f} N = the elements' load {total:+.1f} N"
    )
    rides = springs.ride_height_change_mm()
    rides_bolted = springs.ride_height_change_mm(bolted=True)
    if rides is not None and rides_bolted is not None:
        k = top_speed_case(analysis.design, springs.cases)
        parts = [
            f"{axle} {rides[axle][k]:+.2f} mm (bolted {rides_bolted[axle][k]:+.2f} mm)"
            for axle in rides
        ]
        lines.append(
            f"ride-height change at '{springs.cases[k]}' (each corner, − = lower): "
            + "; ".join(parts)
        )
    for es in springs.per_element.values():
        lines.append(f"{es.element}: {element_sentence(springs, es)}")
    return lines


def _spring_points(springs: SpringLoads) -> list[SpringPoint]:
    return [s for ax in springs.layout.axles for s in ax.springs]
