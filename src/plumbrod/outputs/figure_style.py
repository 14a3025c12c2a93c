"""Shared look of the figures: line styles for left and right, limit bands, pass/fail
titles, and writing a figure as PNG and SVG bytes (matplotlib, imported lazily)."""

from __future__ import annotations

import io
import re
from typing import TYPE_CHECKING, Any

from plumbrod.verdict.checks import CheckResult

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = [
    "LIMIT_BAND",
    "LIMIT_LINE",
    "figure_bytes",
    "line_style",
    "new_figure",
    "status_title",
]

LIMIT_LINE: dict[str, Any] = {"color": "0.25", "linestyle": (0, (6, 3)), "linewidth": 1.2}
LIMIT_BAND: dict[str, Any] = {"color": "#d9ead3", "zorder": 0}
"""The allowed range: a pale green band; limits alone: a dark dashed line."""

_PALETTE = ("#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#ff7f0e", "#8c564b", "#17becf")
_MARK = {"pass": ("PASS", "#2e7d32"), "warn": ("WARN", "#b26a00"), "fail": ("FAIL", "#c62828")}


_SIDE = re.compile(r"(?<![A-Za-z])(left|right)(?![A-Za-z])")


def _base(name: str) -> str:
    return _SIDE.sub("", name)


def line_style(name: str, names: list[str]) -> dict[str, Any]:
    """A left/right pair shares its colour; the right one is dashed with open circles
    (which stay visible where it lies on the left one), every other line solid."""
    bases = list(dict.fromkeys(_base(n) for n in names))
    colour = _PALETTE[bases.index(_base(name)) % len(_PALETTE)]
    right = any(m.group(1) == "right" for m in _SIDE.finditer(name))
    if not right:
        return {"color": colour, "linestyle": "-", "linewidth": 2.0}
    return {
        "color": colour,
        "linestyle": (0, (5, 2.5)),
        "linewidth": 1.5,
        "marker": "o",
        "markersize": 5,
        "markerfacecolor": "white",
        "markevery": 0.08,
    }


def status_title(ax: Axes, title: str, checks: list[CheckResult] | None) -> None:
    """A title with the worst status of ``checks`` in front ("FAIL - Route ratio")."""
    if not checks:
        ax.set_title(title, loc="left")
        return
    order = {"pass": 0, "warn": 1, "fail": 2}
    worst = max((c.status for c in checks), key=lambda s: order[s])
    word, colour = _MARK[worst]
    ax.set_title(f"{word}  ", loc="left", color=colour, fontweight="bold")
    ax.set_title(title, loc="center")


def new_figure(width_in: float, height_in: float) -> Figure:
    """A figure on the Agg canvas (no pyplot state)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    figure = Figure(figsize=(width_in, height_in), layout="constrained")
    FigureCanvasAgg(figure)
    return figure


def figure_bytes(figure: Figure, fmt: str, *, dpi: int = 110, salt: str = "plumbrod") -> bytes:
    """The figure as PNG or SVG bytes; SVG without a date and with ids fixed by ``salt``
    (so the same figure gives the same bytes, and figures with different salts can sit
    in one HTML page without sharing ids)."""
    import matplotlib

    out = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": salt, "svg.fonttype": "none"}):
        metadata = {"Date": None} if fmt == "svg" else None
        figure.savefig(out, format=fmt, dpi=dpi, metadata=metadata, facecolor="white")
    return out.getvalue()
