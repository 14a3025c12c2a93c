"""Structural figures, one idea each: every rod's reserve factor through the travel per
load case, and the clearance of the closest pairs through the travel (matplotlib
figures; nothing is written here)."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from plumbrod.outputs.figure_style import LIMIT_LINE, line_style, new_figure, status_title
from plumbrod.outputs.figures_kinematics import TRAVEL_LABEL
from plumbrod.verdict.findings import Findings

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

__all__ = [
    "CLEARANCE_PAIRS_SHOWN",
    "clearance_figure",
    "reserve_factors",
    "reserve_figure",
    "spring_share_figure",
]

RF_SHOWN_MAX = 100.0
"""Reserve factors above this are drawn at the top edge (the axis is logarithmic)."""
CLEARANCE_PAIRS_SHOWN = 5


def reserve_factors(findings: Findings, case: int) -> dict[str, np.ndarray]:
    """Each design rod's reserve factor through the travel sweep for one load case:
    P_cr/|P| in compression, S_y·A/P in tension (inf where the force is zero)."""
    analysis = findings.analysis
    out: dict[str, np.ndarray] = {}
    for rod in analysis.design.rods:
        force = analysis.rod_force_N("travel")[:, case, analysis.link.rod_names.index(rod.name)]
        reserve = findings.reserves[rod.name]
        with np.errstate(divide="ignore"):
            out[rod.name] = np.where(
                force < 0.0,
                reserve.critical_load_N / np.abs(force),
                reserve.tension_capacity_N / np.where(force > 0.0, force, 0.0),
            )
    return out


def reserve_figure(findings: Findings) -> Figure:
    """Reserve factor of every rod against the wheel travel, one panel per load case,
    with the required reserves (buckling in compression, yield in tension) as lines."""
    analysis = findings.analysis
    cases = list(analysis.loads.cases) if analysis.loads and "travel" in analysis.statics else []
    figure = new_figure(12.0, 4.2 * max(len(cases), 1) + 0.4)
    axes = np.atleast_1d(figure.subplots(max(len(cases), 1), 1, sharex=True))
    checks = [c for c in findings.checks if c.id in ("buckling", "tension")]
    limits = analysis.design.limits
    if not cases:
        axes[0].text(
            0.5,
            0.5,
            "no load case or no travel sweep: reserves not computed",
            ha="center",
            va="center",
            transform=axes[0].transAxes,
        )
        status_title(axes[0], "Reserve factors", checks)
        return figure
    travel = analysis.sweeps["travel"].spec.values["travel_mm"]
    names = [r.name for r in analysis.design.rods]
    for k, (ax, case) in enumerate(zip(axes, cases, strict=True)):
        factors = reserve_factors(findings, k)
        low = min(float(np.min(v)) for v in factors.values())
        for rod, rf in factors.items():
            ax.plot(travel, np.minimum(rf, RF_SHOWN_MAX), label=rod, **line_style(rod, names))
        ax.axhline(
            limits.buckling_reserve,
            **LIMIT_LINE,
            label=f"required in compression (buckling) {limits.buckling_reserve:g}",
        )
        ax.axhline(
            limits.tension_reserve,
            color="0.45",
            linestyle=":",
            linewidth=1.4,
            label=f"required in tension (yield) {limits.tension_reserve:g}",
        )
        ax.set_yscale("log")
        ax.set_ylim(max(0.3, min(low, 1.0) * 0.7), RF_SHOWN_MAX * 1.3)
        ax.set_ylabel(f"reserve factor (log; above {RF_SHOWN_MAX:g} drawn at {RF_SHOWN_MAX:g})")
        status_title(ax, f"Reserve factor of every rod, load case '{case}'", checks)
        ax.grid(True, which="both", color="0.92")
        ax.legend(fontsize="x-small", loc="upper left", bbox_to_anchor=(1.01, 1.0))
    axes[-1].set_xlabel(TRAVEL_LABEL)
    return figure


def clearance_figure(findings: Findings) -> Figure:
    """Least distance of the closest pairs against the wheel travel, with each pair's
    limit; the least distance over every sweep is named in the legend."""
    from plumbrod.clearance.distance import separation
    from plumbrod.clearance.survey import solids_at

    analysis = findings.analysis
    figure = new_figure(10.0, 5.0)
    ax = figure.subplots()
    checks = [c for c in findings.checks if c.id == "clearance"]
    pairs = [p for p in findings.clearance.pairs if p.exact][:CLEARANCE_PAIRS_SHOWN]
    if "travel" not in analysis.sweeps or not pairs:
        ax.text(
            0.5,
            0.5,
            "no travel sweep, or no pair near its limit",
            ha="center",
            va="center",
            transform=ax.transAxes,
        )
    else:
        travel = analysis.sweeps["travel"].spec.values["travel_mm"]
        solids = solids_at(analysis, "travel")
        labels = [f"{p.a} to {p.b}" for p in pairs]
        for pair, label in zip(pairs, labels, strict=True):
            distance = np.broadcast_to(
                separation(solids[pair.a], solids[pair.b]).distance_mm, travel.shape
            )
            where = f"least {pair.distance_mm:.1f} mm in sweep '{pair.sweep}'"
            ax.plot(travel, distance, label=f"{label} ({where})", **line_style(label, labels))
        for limit in sorted({p.limit_mm for p in pairs}):
            ax.axhline(limit, **LIMIT_LINE, label=f"limit {limit:g} mm")
        ax.axhline(0.0, color="#c62828", linewidth=0.8)
        ax.set_ylim(bottom=min(0.0, ax.get_ylim()[0]))
        ax.legend(fontsize="x-small", loc="best")
    ax.set_xlabel(TRAVEL_LABEL)
    ax.set_ylabel("least distance, mm (negative = interference)")
    status_title(ax, "Clearance of the closest pairs", checks)
    ax.grid(True, color="0.9")
    return figure


def spring_share_figure(findings: Findings) -> Figure:
    """Each axle's spring-load change as a share of each element's vertical load through
    the wheel travel, one panel per load case: routed (solid) beside bolted (dotted),
    with the floor statics forces on any route (thin dash-dot) (DESIGN §5a)."""
    analysis = findings.analysis
    springs = analysis.springs
    checks = [c for c in findings.checks if c.id == "sprung-leakage"]
    sweep = springs.sweeps.get("travel") if springs is not None else None
    cases = list(springs.cases) if springs is not None and sweep is not None else []
    figure = new_figure(11.0, 4.0 * max(len(cases), 1) + 0.4)
    axes = np.atleast_1d(figure.subplots(max(len(cases), 1), 1, sharex=True))
    if springs is None or sweep is None:
        axes[0].text(
            0.5,
            0.5,
            "no load case or no travel sweep: spring loads not computed",
            ha="center",
            va="center",
            transform=axes[0].transAxes,
        )
        status_title(axes[0], "Spring-load share", checks)
        return figure
    travel = analysis.sweeps["travel"].spec.values["travel_mm"]
    axles = [axle.name for axle in springs.layout.axles]
    for k, (ax, case) in enumerate(zip(axes, cases, strict=True)):
        for e, element in enumerate(springs.elements):
            load = np.abs(sweep.vertical_load_N[:, k, e])
            safe = np.where(load > 1e-9, load, np.nan)
            for a, axle in enumerate(axles):
                colour = ("#1f77b4", "#d62728", "#2ca02c", "#9467bd")[(2 * e + a) % 4]
                label = f"{element}, {axle} axle"
                ax.plot(
                    travel,
                    sweep.axle_N[:, k, e, a] / safe,
                    color=colour,
                    linewidth=2.0,
                    label=f"{label}, routed",
                )
                ax.plot(
                    travel,
                    sweep.axle_bolted_N[:, k, e, a] / safe,
                    color=colour,
                    linestyle=":",
                    linewidth=1.5,
                    label=f"{label}, bolted",
                )
                ax.plot(
                    travel,
                    sweep.axle_floor_N[:, k, e, a] / safe,
                    color=colour,
                    linestyle="-.",
                    linewidth=0.9,
                    label=f"{label}, floor (any route)",
                )
        ax.axhline(0.0, color="0.6", linewidth=0.8)
        ax.set_ylabel("spring-load change / element load\n(+ = springs more compressed)")
        status_title(ax, f"Spring-load share, load case '{case}'", checks)
        ax.grid(True, color="0.9")
        ax.legend(fontsize="x-small", loc="upper left", bbox_to_anchor=(1.01, 1.0))
    axes[-1].set_xlabel(TRAVEL_LABEL)
    return figure
