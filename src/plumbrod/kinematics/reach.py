"""Body-sweep poses that drive a wheel beyond the travel sweep's range (issue 9 §5).

A body sweep keeps every wheel on the ground, so heave, roll and pitch move each wheel
relative to the body; where that travel leaves the range the travel sweep checked, the
suspension may not reach it, and the figures there rest on geometry nobody checked.
"""

from __future__ import annotations

import numpy as np

from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.sweeps import SweepResult

__all__ = ["wheels_beyond_travel"]

TOLERANCE_MM = 1e-6


def wheels_beyond_travel(
    link: Linkage, sweeps: dict[str, SweepResult], travel_mm: tuple[float, float] | None
) -> list[str]:
    """One warning per body sweep whose poses take a wheel beyond ``travel_mm``,
    naming the worst pose and wheel."""
    if travel_mm is None:
        return []
    lo, hi = travel_mm
    out: list[str] = []
    wc = link.wheel_centre
    for name, res in sweeps.items():
        if res.spec.is_travel:
            continue
        s = res.solved.kin.points[:, wc, 2] - link.points[0, wc, 2]  # (B, nc)
        beyond = np.maximum(s - hi, lo - s)
        if beyond.max(initial=-np.inf) <= TOLERANCE_MM:
            continue
        b, c = np.unravel_index(int(np.argmax(beyond)), beyond.shape)
        poses = int(np.count_nonzero((beyond > TOLERANCE_MM).any(axis=1)))
        kind = "bump" if s[b, c] > 0 else "rebound"
        out.append(
            f"sweep '{name}' at {res.spec.describe(int(b))}: wheel "
            f"'{link.corner_names[c]}' travels {s[b, c]:+.1f} mm ({kind}), beyond the "
            f"travel sweep's {lo:+g} to {hi:+g} mm ({poses} of {res.spec.size} poses "
            "beyond it): widen [sweeps.travel] or narrow this sweep"
        )
    return out
