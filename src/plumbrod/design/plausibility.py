"""Plausibility notes on a valid design: values that pass their ranges but read like a
unit slip (metres typed where the file wants mm).  They are warnings in the report, not
errors: a go-kart's tyre may be small, a test rig may be tiny."""

from __future__ import annotations

from plumbrod.design.model import Design

__all__ = ["MIN_PLAUSIBLE_SPAN_MM", "MIN_PLAUSIBLE_TYRE_RADIUS_MM", "unit_slips"]

MIN_PLAUSIBLE_TYRE_RADIUS_MM = 100.0
"""A loaded tyre radius below this reads like metres (common practice, no source: even
kart tyres are about 130 mm in radius)."""
MIN_PLAUSIBLE_SPAN_MM = 10.0
"""Hardpoints that all fit in a box this size read like metres."""


def unit_slips(design: Design) -> tuple[str, ...]:
    """One line per value that reads like metres in a file that is in mm."""
    notes = []
    for corner in design.corners:
        radius = corner.tyre_radius_mm
        if radius < MIN_PLAUSIBLE_TYRE_RADIUS_MM:
            notes.append(
                f"corners.{corner.name}.tyre_radius_mm is {radius:g} mm, under "
                f"{MIN_PLAUSIBLE_TYRE_RADIUS_MM:g} mm: it reads like metres; the design "
                "file is in mm (a 0.29 m tyre is 290 mm)"
            )
    points = [p.position_mm for p in design.pickups.values()]
    points += [c.wheel_centre_mm for c in design.corners]
    if len(points) >= 2:
        span = max(max(p[i] for p in points) - min(p[i] for p in points) for i in range(3))
        if span < MIN_PLAUSIBLE_SPAN_MM:
            notes.append(
                f"the hardpoints and wheel centres span only {span:g} mm, under "
                f"{MIN_PLAUSIBLE_SPAN_MM:g} mm: they read like metres; every position "
                "is in mm"
            )
    return tuple(notes)
