"""The result of one check, and the status rule every check shares.

A check warns when its worst value uses more than :data:`WARN_FRACTION` of the
allowance, and fails beyond it (or when the value is not finite).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plumbrod.mechanics.analysis import Analysis

__all__ = ["WARN_FRACTION", "CheckResult", "no_loads", "pose_text", "status_of"]

WARN_FRACTION = 0.8


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


def pose_text(analysis: Analysis, sweep: str, index: int) -> str:
    return f"sweep '{sweep}' at {analysis.sweeps[sweep].spec.describe(index)}"


def no_loads(
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
