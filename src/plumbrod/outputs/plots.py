"""The figures of an analysis as PNG and SVG files (matplotlib, imported lazily).

One idea per figure, each title led by its check's PASS / WARN / FAIL:

* ``<stem>-route-ratio``: route ratio through the wheel travel with its allowed band;
* ``<stem>-ride-height``: ride-height sensitivity to heave (mm/mm), roll and pitch
  (mm/deg), each on its own axes, routed beside bolted, the heave limit as a band;
* ``<stem>-line-of-action``: angle from vertical of every route rod over every sweep, the
  check's worst pose marked;
* ``<stem>-transmission``: transmission angles through the travel with their band;
* ``<stem>-reserves``: every rod's reserve factor through the travel per load case, with
  the required reserves;
* ``<stem>-clearance``: least distance of the closest pairs through the travel, with
  their limits;
* ``<stem>-spring-share``: each axle's spring-load change as a share of each element's
  load through the travel per load case, routed beside bolted, with the floor.

Left and right members share a colour; the right one is dashed.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from plumbrod.verdict.findings import Findings

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

    from plumbrod.outputs.atomic import OutputSet

__all__ = ["FIGURES", "figure_files", "figures", "plot_findings"]

FIGURES: tuple[str, ...] = (
    "route-ratio",
    "ride-height",
    "line-of-action",
    "transmission",
    "reserves",
    "clearance",
    "spring-share",
)
"""Figure names in the order reports show them."""


def _builders() -> dict[str, Callable[[Findings], Figure]]:
    from plumbrod.outputs.figures_kinematics import (
        line_of_action_figure,
        ride_height_figure,
        route_ratio_figure,
        transmission_figure,
    )
    from plumbrod.outputs.figures_structure import (
        clearance_figure,
        reserve_figure,
        spring_share_figure,
    )

    return {
        "route-ratio": route_ratio_figure,
        "ride-height": ride_height_figure,
        "line-of-action": line_of_action_figure,
        "transmission": transmission_figure,
        "reserves": reserve_figure,
        "clearance": clearance_figure,
        "spring-share": spring_share_figure,
    }


def figures(findings: Findings) -> dict[str, Figure]:
    """Every figure by name (see :data:`FIGURES`), with the design's name above it."""
    builders = _builders()
    out = {}
    for name in FIGURES:
        figure = builders[name](findings)
        design = findings.analysis.design.name
        above = figure.get_suptitle()
        figure.suptitle(f"{design}\n{above}" if above else design, fontsize="medium")
        out[name] = figure
    return out


def figure_files(
    findings: Findings, stem: str, formats: tuple[str, ...] = ("png", "svg")
) -> dict[str, bytes]:
    """Every figure as file bytes by file name (``<stem>-<figure>.<format>``)."""
    from plumbrod.outputs.figure_style import figure_bytes

    out: dict[str, bytes] = {}
    for name, figure in figures(findings).items():
        for fmt in formats:
            out[f"{stem}-{name}.{fmt}"] = figure_bytes(figure, fmt, salt=f"plumbrod-{name}")
    return out


def plot_findings(
    findings: Findings, folder: str | Path, stem: str, *, into: OutputSet | None = None
) -> list[Path]:
    """Write every figure as PNG and SVG into ``folder``; returns the paths.

    With ``into`` the files join that :class:`~plumbrod.outputs.atomic.OutputSet` (the
    caller commits it); without, they are written together or not at all."""
    from plumbrod.outputs.atomic import OutputSet

    if into is None:
        with OutputSet(option="--output-dir") as own:
            plot_findings(findings, folder, stem, into=own)
        return own.written
    folder = Path(folder)
    files = figure_files(findings, stem)
    return [into.add(folder / name, data) for name, data in files.items()]
