"""Kinematic figures, one idea each: route ratio, ride-height sensitivity, line of action
and transmission angles (matplotlib figures; nothing is written here)."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from plumbrod.outputs.figure_style import (
    LIMIT_BAND,
    LIMIT_LINE,
    line_style,
    new_figure,
    status_title,
)
from plumbrod.verdict.findings import Findings

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.artist import Artist
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = [
    "line_of_action_figure",
    "ride_height_figure",
    "route_ratio_figure",
    "transmission_figure",
]

TRAVEL_LABEL = "wheel travel, mm (+ bump)"
SWEEP_LABELS = {
    "travel_mm": TRAVEL_LABEL,
    "heave_mm": "body heave, mm (+ up)",
    "roll_deg": "body roll, deg (+ lifts the left side)",
    "pitch_deg": "body pitch, deg (+ nose down)",
}


def _checks(findings: Findings, *ids: str) -> list:
    return [c for c in findings.checks if c.id in ids]


def _nothing(ax: Axes, text: str) -> None:
    ax.text(0.5, 0.5, text, ha="center", va="center", transform=ax.transAxes)


def route_ratio_figure(findings: Findings) -> Figure:
    """Route ratio of every route through the wheel travel, with the allowed band."""
    analysis = findings.analysis
    figure = new_figure(8.0, 4.8)
    ax = figure.subplots()
    lo, hi = analysis.design.limits.route_ratio
    ax.axhspan(lo, hi, **LIMIT_BAND, label=f"allowed {lo:g} to {hi:g}")
    fig = analysis.figures.get("travel")
    if fig is None or not fig.route_ratio:
        _nothing(ax, "no travel sweep: route ratio not computed")
    else:
        travel = analysis.sweeps["travel"].spec.values["travel_mm"]
        names = list(fig.route_ratio)
        for route, ratio in fig.route_ratio.items():
            ax.plot(travel, ratio, label=route, **line_style(route, names))
        values = np.concatenate(list(fig.route_ratio.values()))
        pad = 0.25 * (hi - lo)
        ax.set_ylim(min(lo, float(values.min())) - pad, max(hi, float(values.max())) + pad)
    ax.set_xlabel(TRAVEL_LABEL)
    ax.set_ylabel("route ratio, mm/mm (element pickup per wheel)")
    status_title(ax, "Route ratio through the wheel travel", _checks(findings, "route-ratio"))
    ax.grid(True, color="0.9")
    ax.legend(fontsize="small", loc="best")
    return figure


_RIDE = (
    ("heave", "heave_mm", "mm/mm"),
    ("roll", "roll_deg", "mm/deg"),
    ("pitch", "pitch_deg", "mm/deg"),
)


def ride_height_figure(findings: Findings) -> Figure:
    """Ride-height sensitivity of each element to heave (mm/mm), roll and pitch
    (mm/deg), each on its own axes, the route beside the element bolted to the
    chassis; the heave limit as a band."""
    analysis = findings.analysis
    figure = new_figure(13.0, 4.6)
    axes = figure.subplots(1, 3)
    limit = analysis.design.limits.heave_sensitivity
    checks = _checks(findings, "ride-height-sensitivity")
    for ax, (sweep, key, unit) in zip(axes, _RIDE, strict=True):
        fig = analysis.figures.get(sweep)
        ax.set_xlabel(SWEEP_LABELS[key])
        ax.set_ylabel(f"ride-height change per {sweep}, {unit}")
        ax.grid(True, color="0.9")
        if sweep == "heave":
            ax.axhspan(-limit, limit, **LIMIT_BAND, label=f"allowed ±{limit:g} {unit}")
        if fig is None or not fig.ride_height:
            _nothing(ax, f"no {sweep} sweep")
            status_title(ax, f"Ride height in {sweep}", checks if sweep == "heave" else None)
            continue
        x = analysis.sweeps[sweep].spec.values[key]
        names = list(fig.ride_height)
        for element, rh in fig.ride_height.items():
            style = line_style(element, names)
            ax.plot(x, rh.sensitivity[sweep], label=f"{element}, routed", **style)
            ax.plot(
                x,
                rh.bolted_sensitivity[sweep],
                label=f"{element}, bolted to the chassis",
                color=style["color"],
                linestyle=":",
                linewidth=1.4,
            )
        ax.axhline(0.0, color="0.6", linewidth=0.8)
        status_title(ax, f"Ride height in {sweep}", checks if sweep == "heave" else None)
        ax.legend(fontsize="x-small", loc="best")
    return figure


def _worst_line_of_action(findings: Findings) -> tuple[str, int, float] | None:
    """(sweep, pose, angle) of the largest rod line-of-action angle (as the check)."""
    worst: tuple[str, int, float] | None = None
    for sweep, fig in findings.analysis.figures.items():
        for angle in fig.line_of_action_deg.values():
            i = int(np.argmax(angle))
            if worst is None or angle[i] > worst[2]:
                worst = (sweep, i, float(angle[i]))
    return worst


def _sweep_axis(findings: Findings, sweep: str) -> tuple[str, np.ndarray, np.ndarray | None]:
    """The sweep's first parameter (key, values) and, for a grid, each pose's column."""
    values = findings.analysis.sweeps[sweep].spec.values
    key = next(iter(values))
    x = values[key]
    if len(values) == 1:
        return key, x, None
    unique, column = np.unique(x, return_inverse=True)
    return key, unique, column


def line_of_action_figure(findings: Findings) -> Figure:
    """Angle from vertical of every route rod over every sweep, one panel per sweep
    (a grid shows the largest angle over its other parameter), the check's worst pose
    marked, the limit as a line."""
    analysis = findings.analysis
    sweeps = [s for s, fig in analysis.figures.items() if fig.line_of_action_deg]
    cols = min(3, max(len(sweeps), 1))
    rows = -(-max(len(sweeps), 1) // cols)
    figure = new_figure(4.6 * cols + 0.6, 3.6 * rows + 1.2)
    axes = np.atleast_1d(figure.subplots(rows, cols, sharey=True, squeeze=False)).ravel()
    limit = analysis.design.limits.line_of_action_deg
    worst = _worst_line_of_action(findings)
    checks = _checks(findings, "line-of-action")
    for ax in axes[len(sweeps) :]:
        ax.set_axis_off()
    if not sweeps:
        axes[0].set_axis_on()
        _nothing(axes[0], "no sweep ran")
    top = limit * 1.3
    handles: dict[str, Artist] = {}
    for ax, sweep in zip(axes, sweeps, strict=False):
        fig = analysis.figures[sweep]
        key, x, column = _sweep_axis(findings, sweep)
        names = list(fig.line_of_action_deg)
        for rod, angle in fig.line_of_action_deg.items():
            y = angle
            if column is not None:  # largest over the grid's other parameter
                y = np.full(len(x), -np.inf)
                np.maximum.at(y, column, angle)
            (line,) = ax.plot(x, y, label=rod, **line_style(rod, names))
            handles.setdefault(rod, line)
            top = max(top, float(np.max(y)) * 1.1)
        handles.setdefault("limit", ax.axhline(limit, **LIMIT_LINE))
        if worst is not None and worst[0] == sweep:
            values = analysis.sweeps[sweep].spec.values
            (mark,) = ax.plot(
                [float(values[key][worst[1]])],
                [worst[2]],
                marker="o",
                markersize=11,
                markerfacecolor="none",
                markeredgecolor="black",
                markeredgewidth=1.8,
                linestyle="none",
            )
            handles["worst"] = mark
            where = analysis.sweeps[sweep].spec.describe(worst[1])
        ax.set_xlabel(SWEEP_LABELS.get(key, key))
        grid = ", largest over the grid" if column is not None else ""
        ax.set_title(f"sweep '{sweep}'{grid}", fontsize="medium")
        ax.grid(True, color="0.9")
    for ax in axes[::cols]:
        ax.set_ylabel("from vertical, deg")
    axes[0].set_ylim(0.0, top)
    rod_is_worst = bool(checks) and checks[0].where.startswith("rod")
    worst_label = "the check's worst pose" if rod_is_worst else "largest rod angle"
    labels = [
        f"limit {limit:g}°" if k == "limit" else f"{worst_label} ({where})" if k == "worst" else k
        for k in handles
    ]
    figure.legend(
        list(handles.values()), labels, loc="outside lower center", ncol=6, fontsize="small"
    )
    status_title(axes[0], axes[0].get_title(), checks)
    figure.suptitle("Line of action of the route rods (angle from vertical) over every sweep")
    return figure


def transmission_figure(findings: Findings) -> Figure:
    """Transmission angle at every rod end on a rocker or wishbone through the travel,
    with the allowed band."""
    analysis = findings.analysis
    figure = new_figure(8.0, 4.8)
    ax = figure.subplots()
    lo, hi = analysis.design.limits.transmission_angle_deg
    ax.axhspan(lo, hi, **LIMIT_BAND, label=f"allowed {lo:g}° to {hi:g}°")
    fig = analysis.figures.get("travel")
    if fig is None or not fig.transmission_labels:
        _nothing(ax, "no travel sweep, or no rod ends on rockers or wishbones")
    else:
        travel = analysis.sweeps["travel"].spec.values["travel_mm"]
        labels = [f"{rod} at {body}" for rod, body in fig.transmission_labels]
        for j, label in enumerate(labels):
            ax.plot(travel, fig.transmission_deg[:, j], label=label, **line_style(label, labels))
        ax.legend(fontsize="x-small", loc="best", ncol=2)
    ax.set_ylim(0.0, 180.0)
    ax.set_xlabel(TRAVEL_LABEL)
    ax.set_ylabel("transmission angle, deg")
    status_title(ax, "Transmission angles", _checks(findings, "transmission-angle"))
    ax.grid(True, color="0.9")
    return figure
