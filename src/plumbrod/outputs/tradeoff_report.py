"""The ride study (``plumbrod tradeoff``) as text, JSON and CSV.

JSON names other programs may rely on: ``speeds_kmh``; under
``axles.<front|rear>.<bolted|routed>`` the arrays ``tyre_load_rms_N``,
``element_height_rms_mm``, ``body_acceleration_rms_m_s2``, ``travel_rms_mm`` over the
speeds (on the first road class; every class under ``classes.<X>``) and the numbers
``wheel_rate_N_per_mm``, ``unsprung_mass_kg``, ``body_frequency_Hz``,
``wheel_hop_frequency_Hz``.  A figure the model cannot give (the car unstable at that
speed) is null, never NaN.
"""

from __future__ import annotations

import csv
import io
import json
import math
from typing import Any

import numpy as np

from plumbrod.outputs.cautions import CAUTION, RIDE_CAUTION
from plumbrod.verdict.tradeoff_results import CASES, FIGURES, AxleStudy, CaseStudy, TradeoffStudy

__all__ = ["RIDE_CAUTION", "study_csv", "study_json", "study_text"]

_SHOWN = (
    ("element_height_rms_mm", "element height RMS, mm", "{:.2f}"),
    ("tyre_load_rms_N", "tyre load RMS, N", "{:.0f}"),
    ("tyre_load_ratio", "tyre load RMS / static", "{:.3f}"),
    ("unloading_probability", "P(tyre unloads)", "{:.1e}"),
    ("body_acceleration_rms_m_s2", "body accel. RMS, m/s²", "{:.2f}"),
    ("travel_rms_mm", "travel RMS, mm", "{:.2f}"),
    ("bump_stop_probability", "P(bump stop)", "{:.1e}"),
)


def _clean(values: Any) -> Any:
    """Arrays and floats as JSON values: NaN and infinities become null."""
    if isinstance(values, np.ndarray):
        return [_clean(v) for v in values.tolist()]
    if isinstance(values, list | tuple):
        return [_clean(v) for v in values]
    if isinstance(values, float) and not math.isfinite(values):
        return None
    return values


def _case_json(case: CaseStudy, first: str) -> dict[str, Any]:
    plain: dict[str, Any] = {
        "wheel_rate_N_per_mm": case.wheel_rate_N_per_mm,
        "wheel_rate_from": case.rate_from,
        "sprung_mass_kg": case.sprung_mass_kg,
        "unsprung_mass_kg": case.unsprung_mass_kg,
        "damper_N_s_per_mm": case.damper_N_s_per_mm,
        "element_follows_wheel": case.follows_wheel,
        "body_frequency_Hz": case.body_frequency_Hz,
        "wheel_hop_frequency_Hz": case.wheel_hop_frequency_Hz,
        "sprung_aero_load_top_speed_N": case.sprung_load_N,
        "unsprung_aero_load_top_speed_N": case.unsprung_load_N,
        "ride_height_drop_mm": case.ride_height_drop_mm,
        "element_drop_mm": case.element_drop_mm,
        "spring_compression_mm": case.spring_compression_mm,
        "stable": case.stable.tolist(),
    }
    for figure in FIGURES:
        plain[figure] = case.classes[first][figure]
    out = {key: _clean(value) for key, value in plain.items()}
    out["classes"] = {
        c: {f: _clean(v) for f, v in figures.items()} for c, figures in case.classes.items()
    }
    return out


def study_json(study: TradeoffStudy) -> str:
    """The study as a JSON document (ends with a newline)."""
    first = study.road_classes[0]
    axles: dict[str, Any] = {}
    for name, axle in study.axles.items():
        axles[name] = {
            "corners": list(axle.corners),
            "load_share": axle.load_share,
            "added_unsprung_mass_kg": axle.added_unsprung_kg,
            "tyre_rate_N_per_mm": axle.tyre_rate_N_per_mm,
            "bump_travel_mm": axle.bump_travel_mm,
            "verdict": axle.sentence,
            **{case: _case_json(axle.cases[case], first) for case in CASES},
        }
    doc = {
        "design": study.design,
        "source": study.source,
        "elements": list(study.elements),
        "top_speed_kmh": study.top_speed_kmh,
        "speeds_kmh": _clean(study.speeds_kmh),
        "road_class": first,
        "road_classes": list(study.road_classes),
        "ride_height_budget_mm": study.ride_height_budget_mm,
        "axles": axles,
        "notes": list(study.notes),
        "cautions": [RIDE_CAUTION, CAUTION],
    }
    return json.dumps(doc, indent=2, allow_nan=False) + "\n"


def study_csv(study: TradeoffStudy) -> str:
    """One row per road class and speed; columns ``<axle>/<case>/<figure>``."""
    columns = ["road_class", "speed_kmh"]
    for axle in study.axles:
        for case in CASES:
            prefix = f"{axle}/{case}"
            columns += [
                f"{prefix}/wheel_rate_N_per_mm",
                f"{prefix}/ride_height_drop_mm",
                f"{prefix}/element_drop_mm",
            ]
            columns += [f"{prefix}/{f}" for f in FIGURES]
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(columns)
    for cls in study.road_classes:
        for i, speed in enumerate(study.speeds_kmh):
            row: list[str] = [cls, f"{speed:.6g}"]
            for study_axle in study.axles.values():
                for case in CASES:
                    c = study_axle.cases[case]
                    values = [c.wheel_rate_N_per_mm, c.ride_height_drop_mm[i], c.element_drop_mm[i]]
                    values += [c.classes[cls][f][i] for f in FIGURES]
                    row += ["" if not math.isfinite(v) else f"{v:.6g}" for v in values]
            writer.writerow(row)
    return buf.getvalue()


def _axle_text(axle: AxleStudy, study: TradeoffStudy) -> list[str]:
    b, r = axle.cases["bolted"], axle.cases["routed"]
    top = len(study.speeds_kmh) - 1
    lines = [
        f"{axle.axle} axle ({', '.join(axle.corners)}): {axle.load_share:.0%} of the "
        f"elements' downforce lands on it; per corner:",
        f"  {'':34}{'bolted':>12}{'routed':>12}",
    ]

    def row(label: str, fmt: str, vb: float, vr: float) -> None:
        def show(v: float) -> str:
            if not math.isfinite(v):
                return "unstable"
            if "e" in fmt and v < 1e-9:
                return "<1e-9"
            return fmt.format(v)

        lines.append(f"  {label:34}{show(vb):>12}{show(vr):>12}")

    row("wheel rate, N/mm", "{:.1f}", b.wheel_rate_N_per_mm, r.wheel_rate_N_per_mm)
    lines.append(f"    (set by: bolted {b.rate_from}, routed {r.rate_from})")
    row("damper at the wheel, N·s/mm", "{:.2f}", b.damper_N_s_per_mm, r.damper_N_s_per_mm)
    row("sprung / unsprung mass, kg", "{:.1f}", b.sprung_mass_kg, r.sprung_mass_kg)
    row("", "{:.1f}", b.unsprung_mass_kg, r.unsprung_mass_kg)
    row("body / wheel-hop frequency, Hz", "{:.2f}", b.body_frequency_Hz, r.body_frequency_Hz)
    row("", "{:.1f}", b.wheel_hop_frequency_Hz, r.wheel_hop_frequency_Hz)
    speed = study.speeds_kmh[top]
    row(f"downforce on springs at {speed:.0f} km/h, N", "{:.0f}", b.sprung_load_N, r.sprung_load_N)
    row("downforce straight to tyre, N", "{:.0f}", b.unsprung_load_N, r.unsprung_load_N)
    row(
        f"body drop at {speed:.0f} km/h, mm",
        "{:.2f}",
        b.ride_height_drop_mm[top],
        r.ride_height_drop_mm[top],
    )
    row("element drop, mm", "{:.2f}", b.element_drop_mm[top], r.element_drop_mm[top])
    row("element follows the wheel by", "{:.2f}", b.follows_wheel, r.follows_wheel)
    for cls in study.road_classes:
        lines.append(f"  class {cls} road, at {speed:.0f} km/h:")
        for key, label, fmt in _SHOWN:
            row("  " + label, fmt, b.classes[cls][key][top], r.classes[cls][key][top])
    lines.append(f"  verdict: {axle.sentence}")
    return lines


def study_text(study: TradeoffStudy) -> str:
    """A readable summary (the figures at top speed; the files hold every speed)."""
    lines = [
        f"plumbrod tradeoff: {study.design}",
        f"  {study.source}; speeds {study.speeds_kmh[0]:.0f} to {study.top_speed_kmh:.0f} "
        f"km/h, ISO 8608 classes {', '.join(study.road_classes)}, ride-height budget "
        f"{study.ride_height_budget_mm:g} mm at top speed",
        "",
    ]
    for axle in study.axles.values():
        lines += _axle_text(axle, study)
        lines.append("")
    low = _band_note(study)
    for note in (*study.notes, *low):
        lines.append(f"note: {note}")
    lines += ["", RIDE_CAUTION, CAUTION, ""]
    return "\n".join(lines)


def _band_note(study: TradeoffStudy) -> list[str]:
    """Where the ISO 8608 band misses the wheel hop, the closed form overstates."""
    first = study.road_classes[0]
    worst = 1.0
    at = 0.0
    for axle in study.axles.values():
        for case in axle.cases.values():
            ratio = case.classes[first]["tyre_load_band_ratio"]
            for speed, v in zip(study.speeds_kmh, ratio, strict=True):
                if math.isfinite(v) and v < worst:
                    worst, at = v, speed
    if worst > 0.95:
        return []
    return [
        f"at {at:.0f} km/h the ISO 8608 band (to 2.83 cycles/m) holds only {worst:.0%} of "
        "the tyre-load RMS of the white-velocity closed form reported here (the wheel hop "
        "lies above the band at low speed): read the low-speed tyre figures as upper bounds"
    ]
