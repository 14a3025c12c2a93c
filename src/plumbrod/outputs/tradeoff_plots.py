"""Figures of the ride study as PNG files (matplotlib, imported inside the functions).

* ``<stem>-tradeoff-<axle>.png``: against speed, bolted (dashed) and routed (solid) on
  the same axes: the element's height RMS, the tyre load RMS over the static load, the
  body acceleration RMS, the suspension travel RMS, and the static drop of the body with
  the budget; on the first road class of the study.
* ``<stem>-tradeoff-trace.png`` (optional): 200 m of a synthesised road of that class and
  the tyre load of each case over it at top speed, from the time simulation.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from plumbrod.mechanics.ride import simulate
from plumbrod.mechanics.road import class_mean_m3, synthesise_profile
from plumbrod.verdict.tradeoff_results import CASES, AxleStudy, TradeoffStudy

if TYPE_CHECKING:
    from matplotlib.axes import Axes

__all__ = ["plot_study", "plot_trace"]

_STYLE: dict[str, dict[str, Any]] = {
    "bolted": {"linestyle": "--", "color": "C3"},
    "routed": {"linestyle": "-", "color": "C0"},
}
_PANELS = (
    ("element_height_rms_mm", "element height above road, RMS (mm)"),
    ("tyre_load_ratio", "dynamic tyre load RMS / static"),
    ("body_acceleration_rms_m_s2", "body acceleration RMS (m/s²)"),
    ("travel_rms_mm", "suspension travel RMS (mm)"),
)


def _panel(ax: Axes, study: TradeoffStudy, axle: AxleStudy, key: str, label: str) -> None:
    cls = study.road_classes[0]
    for case in CASES:
        c = axle.cases[case]
        ax.plot(study.speeds_kmh, c.classes[cls][key], label=case, **_STYLE[case])
    ax.set_xlabel("speed (km/h)")
    ax.set_ylabel(label)
    ax.set_xlim(0.0, study.top_speed_kmh)
    ax.set_ylim(bottom=0.0)
    ax.grid(True, color="0.9")
    ax.legend(fontsize="small")


def plot_study(study: TradeoffStudy, folder: str | Path, stem: str) -> list[Path]:
    """One PNG per axle; returns the paths written."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from plumbrod.outputs.atomic import write_with

    folder = Path(folder)
    written: list[Path] = []
    cls = study.road_classes[0]
    for name, axle in study.axles.items():
        figure = Figure(figsize=(13, 7.5), layout="constrained")
        FigureCanvasAgg(figure)
        axes = figure.subplots(2, 3)
        for ax, (key, label) in zip(
            (axes[0, 0], axes[0, 1], axes[1, 0], axes[1, 1]), _PANELS, strict=True
        ):
            _panel(ax, study, axle, key, label)
        ax = axes[0, 2]
        for case in CASES:
            c = axle.cases[case]
            ax.plot(study.speeds_kmh, c.ride_height_drop_mm, label=f"{case}: body", **_STYLE[case])
            ax.plot(
                study.speeds_kmh,
                c.element_drop_mm,
                label=f"{case}: element",
                marker=".",
                **_STYLE[case],
            )
        ax.axhline(
            study.ride_height_budget_mm, color="0.35", linewidth=1.0, linestyle=":", label="budget"
        )
        ax.set_xlabel("speed (km/h)")
        ax.set_ylabel("static drop under downforce (mm)")
        ax.set_xlim(0.0, study.top_speed_kmh)
        ax.set_ylim(bottom=0.0)
        ax.grid(True, color="0.9")
        ax.legend(fontsize="small")
        ax = axes[1, 2]
        ax.axis("off")
        b, r = axle.cases["bolted"], axle.cases["routed"]
        ax.text(
            0.0,
            1.0,
            "\n".join(
                [
                    "per corner        bolted   routed",
                    f"wheel rate N/mm  {b.wheel_rate_N_per_mm:7.1f}  {r.wheel_rate_N_per_mm:7.1f}",
                    f"unsprung kg      {b.unsprung_mass_kg:7.1f}  {r.unsprung_mass_kg:7.1f}",
                    f"body Hz          {b.body_frequency_Hz:7.2f}  {r.body_frequency_Hz:7.2f}",
                    f"wheel hop Hz     {b.wheel_hop_frequency_Hz:7.1f}  "
                    f"{r.wheel_hop_frequency_Hz:7.1f}",
                    "",
                    *_wrap(axle.sentence, 48),
                ]
            ),
            va="top",
            family="monospace",
            fontsize="small",
            transform=ax.transAxes,
        )
        figure.suptitle(
            f"{study.design}: {name} axle, bolted vs routed, ISO 8608 class {cls} "
            "(idealised linear quarter car)"
        )
        path = folder / f"{stem}-tradeoff-{name}.png"
        written.append(write_with(path, _saver(figure)))
    return written


def _saver(figure: Any) -> Callable[[Path], None]:
    def save(tmp: Path) -> None:
        figure.savefig(tmp, format="png", dpi=100)

    return save


def _wrap(text: str, width: int) -> list[str]:
    import textwrap

    return textwrap.wrap(text, width)


def plot_trace(study: TradeoffStudy, folder: str | Path, stem: str, seed: int = 0) -> list[Path]:
    """Road profile and tyre-load traces at top speed on the first class (first axle)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from plumbrod.outputs.atomic import write_with

    cls = study.road_classes[0]
    name, axle = next(iter(study.axles.items()))
    step = 0.02
    road = synthesise_profile(class_mean_m3(cls), 1000.0, step, seed=seed)
    speed = study.top_speed_kmh / 3.6
    shown = road.x_m <= 200.0
    figure = Figure(figsize=(12, 6.5), layout="constrained")
    FigureCanvasAgg(figure)
    axes: Any = figure.subplots(2, 1, sharex=True)
    axes[0].plot(road.x_m[shown], road.z_m[shown] * 1e3, color="0.3", linewidth=0.8)
    axes[0].set_ylabel("road height (mm)")
    axes[0].set_title(f"synthesised ISO 8608 class {cls} road (random phases, seed {seed})")
    for case in CASES:
        car = axle.cases[case].car
        if not axle.cases[case].stable[-1]:
            continue  # no stationary response to draw
        trace = simulate(car, road.z_m, step / speed)["tyre_load"]
        rms = float(np.sqrt(np.mean(trace**2)))
        axes[1].plot(
            road.x_m[shown],
            trace[shown],
            linewidth=0.8,
            label=f"{case}: RMS {rms:.0f} N over 1 km",
            **_STYLE[case],
        )
    axes[1].set_xlabel("distance (m)")
    axes[1].set_ylabel("dynamic tyre load (N)")
    axes[1].set_title(f"{name} axle, per corner, at {study.top_speed_kmh:.0f} km/h")
    axes[1].legend(fontsize="small")
    for ax in axes:
        ax.grid(True, color="0.9")
    figure.suptitle(f"{study.design}: road and tyre load (idealised linear quarter car)")
    path = Path(folder) / f"{stem}-tradeoff-trace.png"
    return [write_with(path, _saver(figure))]
