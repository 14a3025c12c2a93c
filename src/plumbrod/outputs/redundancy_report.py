"""The report's redundancy paragraph and JSON section (DESIGN §4a).

Only a redundantly located design has them, so the reports of exactly located designs
stay as they were.
"""

from __future__ import annotations

import numpy as np

from plumbrod.mechanics.analysis import Analysis

__all__ = ["redundancy_json", "redundancy_lines"]

_SIGNIFICANT = 6


def _pose(analysis: Analysis, sweep: str, pose: int) -> str:
    return f"sweep '{sweep}' at {analysis.sweeps[sweep].spec.describe(pose)}"


def redundancy_lines(analysis: Analysis) -> list[str]:
    """Text lines: the element held redundantly, its springs, the largest fight force
    and the length change rigid rods would need."""
    summary = analysis.redundancy
    if summary is None:
        return []
    held = ", ".join(f"'{e}'" for e in summary.elements) or "the linkage"
    springs = ", ".join(f"'{n}'" for n in summary.springs)
    removed = ", ".join(f"'{n}'" for n in summary.removed)
    lines = [
        f"redundancy: {held} is held redundantly: removing rod(s) {removed} would leave "
        f"it exactly located. Rods {springs} are solved as springs (k = EA/L) at every "
        "pose; what the motion alone makes them carry (fight forces) is added to every "
        "load case's forces (upright loads and leakage are those of the loads alone)."
    ]
    if summary.largest is not None:
        force, rod, sweep, pose = summary.largest
        lines.append(
            f"redundancy: largest fight force {force:+.1f} N in rod '{rod}', "
            f"{_pose(analysis, sweep, pose)}"
        )
        for name, fight in summary.per_sweep.items():
            worst = float(np.abs(fight.force_N).max(initial=0.0))
            lines.append(f"redundancy: sweep '{name}': fight forces up to {worst:.1f} N")
    if summary.largest_mismatch is not None:
        value, rod, sweep, pose = summary.largest_mismatch
        lines.append(
            f"redundancy: if the rods were rigid, rod '{rod}' would have to be "
            f"{abs(value):.3f} mm {'longer' if value > 0 else 'shorter'} to fit, "
            f"{_pose(analysis, sweep, pose)}"
        )
    return lines


def _series(values: np.ndarray) -> list[float]:
    return [round(float(v), _SIGNIFICANT) for v in np.asarray(values).ravel()]


def redundancy_json(analysis: Analysis) -> dict[str, object] | None:
    """The ``redundancy`` section of the JSON report, or None when exactly located."""
    summary = analysis.redundancy
    if summary is None:
        return None
    largest = None
    if summary.largest is not None:
        force, rod, sweep, pose = summary.largest
        largest = {
            "force_N": round(force, 4),
            "rod": rod,
            "sweep": sweep,
            "pose": pose,
            "where": analysis.sweeps[sweep].spec.describe(pose),
        }
    mismatch = None
    if summary.largest_mismatch is not None:
        value, rod, sweep, pose = summary.largest_mismatch
        mismatch = {
            "length_change_mm": round(value, 6),
            "rod": rod,
            "sweep": sweep,
            "pose": pose,
            "where": analysis.sweeps[sweep].spec.describe(pose),
        }
    return {
        "elements": list(summary.elements),
        "elastic_rods": list(summary.springs),
        "removable_rods": list(summary.removed),
        "largest_fight": largest,
        "largest_rigid_length_change": mismatch,
        "sweeps": {
            name: {
                "fight_force_N": {
                    rod: _series(fight.force_N[:, j]) for j, rod in enumerate(fight.springs)
                },
                "rigid_length_change_mm": {
                    rod: _series(fight.mismatch_mm[:, j]) for j, rod in enumerate(fight.removed)
                },
            }
            for name, fight in summary.per_sweep.items()
        },
    }
