"""Rocker plate cut files ``<stem>-plate-<rocker>.dxf``: one flat plate, 1:1, in its
(u, v) frame (mm).

The outer profile is ONE closed LWPOLYLINE without a repeated first vertex, built from
the exact hull of the boss circles (:mod:`plumbrod.outputs.plate_profile`): tangent lines
and true arcs stored as bulges, no chords and no SPLINE.  Holes are CIRCLEs.  Only these
two sit on cut layers (``CUT_*``); centre marks, notes and the title sit on ``NOCUT_*``
layers, and ``cut_only`` leaves those out.  A rocker whose pickups spread far along its
axis (a torsion tube with arms) gets no plate file, only a note.

Cautions: geometry for cutting only; hole fits, bushes, webs, edge distances and the
part's strength need a qualified engineer's check and physical testing.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from plumbrod import __version__
from plumbrod.design.model import Design
from plumbrod.geometry.plate_outline import PlateOutline
from plumbrod.outputs.dxf_common import (
    LayerSpec,
    finish,
    line,
    new_document,
    profile_vertices,
    text,
)
from plumbrod.outputs.plate_profile import plate_profile

if TYPE_CHECKING:  # pragma: no cover
    from ezdxf.document import Drawing

__all__ = [
    "CUT_LAYERS",
    "PLATE_LAYERS",
    "PlatePart",
    "is_torsion_rocker",
    "plate_drawing",
    "plate_parts",
    "torsion_spread_mm",
]

# -- plate drawing layers ---------------------------------------------------------------
CUT_PROFILE = LayerSpec("CUT_PROFILE", 7, cut=True)
CUT_HOLES = LayerSpec("CUT_HOLES", 1, cut=True)
CENTRE_MARKS = LayerSpec("NOCUT_CENTRE_MARKS", 4)
NOTES = LayerSpec("NOCUT_NOTES", 7)
PLATE_TITLE = LayerSpec("NOCUT_TITLE", 7)
PLATE_LAYERS: tuple[LayerSpec, ...] = (CUT_PROFILE, CUT_HOLES, CENTRE_MARKS, NOTES, PLATE_TITLE)
CUT_LAYERS: frozenset[str] = frozenset(spec.name for spec in PLATE_LAYERS if spec.cut)
"""Layers a cutting program should cut: the outer profile and the holes.  Every other
layer of a plate file starts with ``NOCUT_`` (marks and notes, never to be cut)."""

TORSION_SPREAD_MM = 25.0
TORSION_SPREAD_THICKNESS = 5.0
"""A rocker whose pickups spread along its pivot axis by more than the larger of these
(mm, and times the plate thickness) is not a plate but a torsion tube with arms: no cut
file is written for it (common practice, no source)."""

PLATE_TEXT_MM = 3.5
"""Text height on plate drawings (ISO 3098 series: 2.5, 3.5, 5, 7 mm; common practice,
no source)."""


# -- plate drawing ---------------------------------------------------------------------
@dataclass(frozen=True)
class PlatePart:
    """One rocker plate to cut: the rocker's ``name``, its ``outline``, ``material``,
    ``quantity`` (1 per rocker) and ``twin``: the other rocker whose plate has the same
    profile (``"same"``) or its mirror image (``"mirrored"``), with that rocker's name."""

    name: str
    outline: PlateOutline
    material: str
    quantity: int = 1
    twin: tuple[str, str] | None = None


def _hole_key(outline: PlateOutline, mirror: bool) -> list[tuple[float, float, float]]:
    sign = -1.0 if mirror else 1.0
    return sorted(
        (round(h.diameter_mm, 3), round(h.centre_uv[0], 3), round(sign * h.centre_uv[1], 3))
        for h in outline.holes
    )


def torsion_spread_mm(outline: PlateOutline) -> float:
    """How far the pickups spread along the pivot axis (mm): 0 for a flat plate."""
    offsets = [h.axial_offset_mm for h in outline.holes]
    return max(offsets) - min(offsets)


def is_torsion_rocker(outline: PlateOutline) -> bool:
    """True when the pickups do not lie near one plane (see :data:`TORSION_SPREAD_MM`)."""
    limit = max(TORSION_SPREAD_MM, TORSION_SPREAD_THICKNESS * outline.thickness_mm)
    return torsion_spread_mm(outline) > limit


def plate_parts(design: Design) -> tuple[list[PlatePart], list[str]]:
    """The plates to cut and one note per rocker that gets no plate file (why).

    Two rockers with the same profile (holes, diameters, thickness, material), or with
    mirror-image profiles, name each other as twins; each keeps its own file, 1 off.
    """
    from plumbrod.mechanics.plates import rocker_outlines

    materials = {r.name: r.plate.material for r in design.rockers if r.plate is not None}
    parts: list[PlatePart] = []
    notes: list[str] = []
    for rocker, outline in rocker_outlines(design).items():
        if is_torsion_rocker(outline):
            notes.append(
                f"rocker {rocker}: no plate file; its pickups lie "
                f"{torsion_spread_mm(outline):.0f} mm apart along the pivot axis, so it is "
                "a torsion tube with arms, not a flat plate"
            )
            continue
        parts.append(PlatePart(rocker, outline, materials[rocker]))
    out: list[PlatePart] = []
    for part in parts:
        twin = None
        for other in parts:
            if other is part or (other.material, other.outline.thickness_mm) != (
                part.material,
                part.outline.thickness_mm,
            ):
                continue
            if _hole_key(other.outline, False) == _hole_key(part.outline, False):
                twin = (other.name, "same")
            elif _hole_key(other.outline, True) == _hole_key(part.outline, False):
                twin = (other.name, "mirrored")
            if twin:
                break
        out.append(PlatePart(part.name, part.outline, part.material, 1, twin))
    return out, notes


def plate_drawing(
    outline: PlateOutline | PlatePart,
    name: str = "",
    *,
    material: str = "not given",
    design_name: str = "",
    dxf_version: str = "R2010",
    cut_only: bool = False,
) -> Drawing:
    """One rocker plate, flat and 1:1, in its (u, v) frame (mm), for cutting.

    CUT_PROFILE: one closed LWPOLYLINE, the exact hull of the boss circles (tangent
    lines and true arcs as bulges).  CUT_HOLES: one CIRCLE per hole (diameter as
    designed).  Nothing else is on a cut layer.  NOCUT_CENTRE_MARKS: a cross in every
    hole.  NOCUT_NOTES: hole names and diameters ("pivot d12").  NOCUT_TITLE: part,
    material, thickness, quantity, "units: mm", cut length, area, frame, caution.
    ``cut_only`` leaves out every non-cut layer (for a CAM import that cuts all it
    reads).
    """
    if isinstance(outline, PlatePart):
        part = outline
    else:
        part = PlatePart(name, outline, material)
    outline = part.outline
    layers = (CUT_PROFILE, CUT_HOLES) if cut_only else PLATE_LAYERS
    doc = new_document(dxf_version, layers)
    msp = doc.modelspace()
    profile = plate_profile(outline)
    vertices = profile_vertices(profile)
    msp.add_lwpolyline(vertices, format="xyb", close=True, dxfattribs={"layer": CUT_PROFILE.name})
    middle = np.mean([h.centre_uv for h in outline.holes], axis=0)
    for hole in outline.holes:
        r = hole.diameter_mm / 2.0
        cu, cv = hole.centre_uv
        msp.add_circle((cu, cv), r, dxfattribs={"layer": CUT_HOLES.name})
        if cut_only:
            continue
        arm = 0.6 * r
        line(msp, (cu - arm, cv), (cu + arm, cv), CENTRE_MARKS.name)
        line(msp, (cu, cv - arm), (cu, cv + arm), CENTRE_MARKS.name)
        # the label beside the hole, towards the middle of the plate (away from the edge)
        inward = middle - np.array(hole.centre_uv)
        size = float(np.linalg.norm(inward))
        inward = inward / size if size > 1e-9 else np.array([0.0, 1.0])
        if abs(inward[0]) >= abs(inward[1]):
            align = "MIDDLE_LEFT" if inward[0] > 0 else "MIDDLE_RIGHT"
        else:
            align = "BOTTOM_CENTER" if inward[1] > 0 else "TOP_CENTER"
        anchor = np.array(hole.centre_uv) + inward * (r + 0.5 * PLATE_TEXT_MM)
        text(
            msp,
            f"{hole.name} d{hole.diameter_mm:g}",
            anchor,
            PLATE_TEXT_MM * 0.8,
            NOTES.name,
            align=align,
        )
    if cut_only:
        return finish(doc)

    pts = profile.sample_uv(0.1)
    lo = pts.min(axis=0)
    holes_area = sum(math.pi * h.diameter_mm**2 / 4.0 for h in outline.holes)
    first = next((h.name for h in outline.holes if h.name != "pivot"), "pivot")
    quantity = f"quantity: {part.quantity} off"
    if part.twin is not None:
        other, how = part.twin
        quantity += (
            f" (rocker {other} has the same profile: its own file)"
            if how == "same"
            else f" (rocker {other} is its mirror image: its own file; a flat plate turned "
            "over is its mirror)"
        )
    lines = [
        f"part: rocker {part.name} plate" + (f" - {design_name}" if design_name else ""),
        f"material {part.material}, thickness {outline.thickness_mm:g} mm; {quantity}",
        "units: mm, scale 1:1",
        f"cut: outer profile (layer {CUT_PROFILE.name}, length {profile.length_mm:.1f} mm), "
        f"{len(outline.holes)} holes (layer {CUT_HOLES.name}); net area "
        f"{profile.area_mm2 - holes_area:.0f} mm2; layers NOCUT_* are not to be cut",
        f"frame: origin on the pivot axis, u towards '{first}', v = axis x u "
        "(seen from the axis end)",
    ]
    for hole in outline.holes:
        if abs(hole.axial_offset_mm) > 0.05:
            lines.append(
                f"pickup '{hole.name}' sits {hole.axial_offset_mm:+.1f} mm off the "
                "plate plane along the axis: spacer"
            )
    lines.append(
        f"generated by plumbrod {__version__}; check webs, fits, edge distances and "
        "strength with a qualified engineer before cutting"
    )
    h = PLATE_TEXT_MM
    for k, entry in enumerate(lines):
        text(
            msp,
            entry,
            (lo[0], lo[1] - 3.0 * h - 1.7 * h * k),
            h * (1.4 if k == 0 else 1.0),
            PLATE_TITLE.name,
        )
    return finish(doc)
