"""Plots of an analysis as PNG files (matplotlib, imported here only).

Two figures per design:

* ``<stem>-kinematics.png``: route ratio through the wheel travel with its limit band;
  the element's ride-height change through body heave, roll and pitch beside the same
  element bolted to the chassis; line of action of the route rods; transmission angles.
* ``<stem>-forces.png``: every rod's force through the wheel travel per load case, with
  each compression rod's critical load divided by the required reserve.

Plot functions take an ``ax`` and return what they drew, so they can be reused.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from plumbrod.verdict.findings import Findings

if TYPE_CHECKING:
    from matplotlib.axes import Axes

__all__ = ["plot_findings"]

_LIMIT_STYLE: dict[str, Any] = {"color": "0.35", "linestyle": "--", "linewidth": 1.0}


def _travel(findings: Findings) -> tuple[Any, Any] | None:
    analysis = findings.analysis
    if "travel" not in analysis.sweeps:
        return None
    return analysis.sweeps["travel"].spec.values["travel_mm"], analysis.figures["travel"]


def plot_route_ratio(findings: Findings, ax: Axes) -> list[Any]:
    """Route ratio of every route through the travel sweep, with the limit band."""
    lo, hi = findings.analysis.design.limits.route_ratio
    drawn: list[Any] = []
    data = _travel(findings)
    if data is None:
        ax.text(0.5, 0.5, "no travel sweep", ha="center", transform=ax.transAxes)
        return drawn
    travel, fig = data
    drawn.append(ax.axhspan(lo, hi, color="0.9", zorder=0, label=f"limit {lo:g} to {hi:g}"))
    for route, ratio in fig.route_ratio.items():
        drawn += ax.plot(travel, ratio, label=route)
    _label_travel_axes(ax, "route ratio, mm/mm", "Route ratio")
    ax.legend(fontsize="small")
    return drawn


def plot_ride_height(findings: Findings, ax: Axes) -> list[Any]:
    """Ride-height change of each element through heave, roll and pitch vs bolted."""
    analysis = findings.analysis
    drawn: list[Any] = []
    for sweep, unit in (("heave", "mm"), ("roll", "deg"), ("pitch", "deg")):
        if sweep not in analysis.figures:
            continue
        x = analysis.sweeps[sweep].spec.values[f"{sweep}_{unit}"]
        scale = np.max(np.abs(x)) or 1.0
        for element, rh in analysis.figures[sweep].ride_height.items():
            mid = len(x) // 2
            line = ax.plot(
                x / scale,
                rh.height_mm - rh.height_mm[mid],
                label=f"{element}, {sweep} (±{scale:g} {unit})",
            )
            drawn += line
            drawn += ax.plot(
                x / scale,
                rh.bolted_height_mm - rh.bolted_height_mm[mid],
                color=line[0].get_color(),
                linestyle=":",
                linewidth=1.0,
            )
    ax.set_xlabel("body motion, fraction of its sweep range")
    ax.set_ylabel("ride-height change, mm")
    ax.set_title("Element ride height (dotted: bolted to the chassis)")
    if drawn:
        ax.legend(fontsize="small")
    return drawn


def _label_travel_axes(ax: Axes, ylabel: str, title: str) -> None:
    ax.set_xlabel("wheel travel, mm (+ bump)")
    ax.set_ylabel(ylabel)
    ax.set_title(title)


def plot_line_of_action(findings: Findings, ax: Axes) -> list[Any]:
    analysis = findings.analysis
    drawn: list[Any] = []
    data = _travel(findings)
    if data is None:
        return drawn
    travel, fig = data
    for rod, angle in fig.line_of_action_deg.items():
        drawn += ax.plot(travel, angle, label=rod)
    limit = analysis.design.limits.line_of_action_deg
    drawn.append(ax.axhline(limit, **_LIMIT_STYLE, label=f"limit {limit:g}°"))
    _label_travel_axes(ax, "angle from vertical, deg", "Line of action of route rods")
    ax.set_ylim(bottom=0.0)
    ax.legend(fontsize="small")
    return drawn


def plot_transmission(findings: Findings, ax: Axes) -> list[Any]:
    analysis = findings.analysis
    drawn: list[Any] = []
    data = _travel(findings)
    if data is None:
        return drawn
    travel, fig = data
    for j, (rod, body) in enumerate(fig.transmission_labels):
        drawn += ax.plot(travel, fig.transmission_deg[:, j], label=f"{rod} at {body}")
    lo, hi = analysis.design.limits.transmission_angle_deg
    drawn.append(ax.axhline(lo, **_LIMIT_STYLE, label=f"limits {lo:g}° and {hi:g}°"))
    drawn.append(ax.axhline(hi, **_LIMIT_STYLE))
    ax.set_ylim(0.0, 180.0)
    _label_travel_axes(ax, "transmission angle, deg", "Transmission angles")
    if fig.transmission_labels:
        ax.legend(fontsize="x-small")
    else:
        ax.text(
            0.5, 0.5, "no rod ends on rockers or wishbones", ha="center", transform=ax.transAxes
        )
    return drawn


def plot_forces(findings: Findings, ax: Axes, case: int) -> list[Any]:
    """Every design rod's force through the travel sweep for one load case."""
    analysis = findings.analysis
    drawn: list[Any] = []
    st = analysis.statics.get("travel")
    if st is None:
        ax.text(0.5, 0.5, "no load case or no travel sweep", ha="center", transform=ax.transAxes)
        return drawn
    travel = analysis.sweeps["travel"].spec.values["travel_mm"]
    required = analysis.design.limits.buckling_reserve
    index = [analysis.link.rod_names.index(rod.name) for rod in analysis.design.rods]
    forces = st.rod_force_N[:, case][:, index]
    low, high = min(float(forces.min()), 0.0), max(float(forces.max()), 0.0)
    span = max(high - low, 1.0)
    bottom = low - 0.6 * span  # room for a capacity line that comes close
    shown = 0
    for j, rod in enumerate(analysis.design.rods):
        line = ax.plot(travel, forces[:, j], label=rod.name)
        drawn += line
        reserve = findings.reserves[rod.name]
        limit = -reserve.critical_load_N / required
        if reserve.compression is not None and limit > bottom:
            drawn.append(ax.axhline(limit, color=line[0].get_color(), linestyle=":", linewidth=1.2))
            shown += 1
    ax.axhline(0.0, color="0.6", linewidth=0.8)
    ax.set_ylim(bottom, high + 0.15 * span)
    note = (
        f"dotted: -P_cr/{required:g} of the rods near it"
        if shown
        else f"every compression rod's -P_cr/{required:g} lies below this range"
    )
    _label_travel_axes(
        ax, "rod force, N (+ tension)", f"Rod forces, load case '{st.cases[case]}' ({note})"
    )
    ax.legend(fontsize="x-small", ncol=2)
    return drawn


def plot_findings(findings: Findings, folder: str | Path, stem: str) -> list[Path]:
    """Write the kinematics and forces figures as PNG files; returns their paths."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from plumbrod.outputs.atomic import write_with

    folder = Path(folder)
    written: list[Path] = []
    name = findings.analysis.design.name

    figure = Figure(figsize=(12, 9), layout="constrained")
    FigureCanvasAgg(figure)
    axes = figure.subplots(2, 2)
    plot_route_ratio(findings, axes[0, 0])
    plot_ride_height(findings, axes[0, 1])
    plot_line_of_action(findings, axes[1, 0])
    plot_transmission(findings, axes[1, 1])
    figure.suptitle(f"{name}: kinematics")
    written.append(
        write_with(
            folder / f"{stem}-kinematics.png",
            lambda tmp: figure.savefig(tmp, format="png", dpi=110),
        )
    )

    cases = len(findings.analysis.loads.cases) if findings.analysis.loads else 1
    figure = Figure(figsize=(12, 4.5 * cases), layout="constrained")
    FigureCanvasAgg(figure)
    axes = np.atleast_1d(figure.subplots(cases, 1))
    for k, ax in enumerate(axes):
        plot_forces(findings, ax, k)
    figure.suptitle(f"{name}: forces")
    written.append(
        write_with(
            folder / f"{stem}-forces.png", lambda tmp: figure.savefig(tmp, format="png", dpi=110)
        )
    )
    return written
