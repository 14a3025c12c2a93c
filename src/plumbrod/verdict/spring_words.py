"""The spring figures in words: one readable sentence per element (DESIGN §5a), used
by the ``sprung-leakage`` detail and the reports."""

from __future__ import annotations

from plumbrod.mechanics.springs import ElementSprings, SpringLoads

__all__ = ["element_sentence", "pct"]


def pct(share: float) -> str:
    """A share as a percentage: one decimal below 10 %, whole above."""
    value = 100.0 * share
    return f"{value:.1f} %" if abs(value) < 10.0 else f"{value:.0f} %"


def _load_words(es: ElementSprings, axle: str) -> str:
    """'a load 600 mm ahead of the front axle', with the drag's part when it counts."""
    assert es.lever_mm is not None
    lever = es.vertical_lever_mm if es.vertical_lever_mm is not None else es.lever_mm
    where = "ahead of" if lever > 0 else "behind"
    text = f"a load {abs(lever):.0f} mm {where} the {axle} axle"
    if es.drag_height_mm is not None and abs(es.lever_mm - lever) > 0.01 * abs(lever) + 1.0:
        text += (
            f" and its drag {es.drag_height_mm:.0f} mm above the ground (together as a load "
            f"{abs(es.lever_mm):.0f} mm {'ahead of' if es.lever_mm > 0 else 'behind'} it)"
        )
    return text


def element_sentence(springs: SpringLoads, es: ElementSprings) -> str:
    """One readable sentence: total share, the floor and why, bolted, the route's part."""
    name = es.element
    axle = es.axles[0] if len(es.axles) == 1 else ""
    if es.share is None:
        lever = (
            f"; the pitch couple of its load {abs(es.lever_mm):.0f} mm "
            f"{'ahead of' if es.lever_mm > 0 else 'behind'} the {axle} axle goes to the "
            "springs too: give [car] wheelbase_mm to share it between the axles"
            if es.lever_mm is not None
            else "; give [car] wheelbase_mm for the springs' share"
        )
        return (
            f"the {name}'s route puts {pct(es.avoidable)} of its load into the springs as "
            f"a vertical force{lever}"
        )
    head = f"springs carry {pct(es.share)} of the {name}'s load (bolted: "
    head += f"{pct(es.share_bolted or 0.0)})"
    if len(es.axles) > 1:
        why = "its routes land on both axles, so statics forces none of it (floor 0 %)"
    elif es.lever_mm is not None and es.floor is not None:
        why = (
            f"{pct(es.floor)} is the pitch couple of {_load_words(es, axle)} that only "
            "routes to both axles remove"
        )
    else:
        why = f"floor {pct(es.floor or 0.0)}"
    return f"{head}; {why}; this route adds {pct(es.avoidable)}"
