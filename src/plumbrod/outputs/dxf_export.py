"""DXF drawings of a design: the 3D route wireframe for CAD, and flat plate profiles for
the laser or waterjet.

Files
-----
* ``<stem>-route.dxf``: the design pose (static ride height) as a 3D wireframe in mm,
  ISO 8855 axes (x forward, y left, z up), in the design file's coordinates.  Rods and
  wishbones are LINEs between hardpoints; tyre envelopes and cylinder zones are CIRCLEs
  placed in 3D through their extrusion vector (OCS); box and prism zones are closed 3D
  POLYLINEs joined by LINEs; rocker plates are LWPOLYLINEs in the plate plane (OCS) with
  their holes as CIRCLEs; every hardpoint is a POINT with a TEXT label.
* ``<stem>-plate-<rocker>.dxf``: one rocker plate, flat, in its (u, v) frame (mm), 1:1.
  The outer profile is ONE closed LWPOLYLINE without a repeated first vertex, built from
  the exact hull of the boss circles (:mod:`plumbrod.outputs.plate_profile`): straight tangent
  lines and true arcs stored as bulges (``ezdxf.math.arc_to_bulge``), no chords and no
  SPLINE.  Holes are CIRCLEs on their own cut layer.  Centre marks and notes (material,
  thickness, "units: mm") sit on layers that are not cut.

Every file: DXF R2010 by default (R2000 on request), ``$INSUNITS`` = 4 (mm),
``$MEASUREMENT`` = 1, ``$LUNITS`` = 2 (decimal), ``$AUNITS`` = 0 (degrees); the standard
linetypes and text styles defined (``setup=True``), text in the "Standard" style; every
entity BYLAYER (colour and linetype come from its layer); the view zoomed to the
extents.  Dates and GUIDs in the header are fixed (2000-01-01) so that the same design
gives the same bytes (:func:`dxf_bytes`).

ezdxf is imported inside the functions (it takes about half a second to import).

Cautions: the drawings are geometry for layout and cutting only.  Hole fits, bushes or
bearings, webs, edge distances and the parts' strength need a qualified engineer's check
and physical testing; the series' technical regulations decide whether such a device is
allowed at all.
"""

from __future__ import annotations

import os
import re
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from plumbrod import __version__
from plumbrod.design.model import Design
from plumbrod.geometry.plate_outline import PlateOutline
from plumbrod.mechanics.analysis import Analysis
from plumbrod.outputs.dxf_common import (
    DXF_VERSIONS,
    TEXT_COLOUR,
    LayerSpec,
    check_version,
    dxf_bytes,
    finish,
    line,
    new_document,
    profile_vertices,
    text,
)
from plumbrod.outputs.dxf_plates import (
    CUT_LAYERS,
    PLATE_LAYERS,
    PlatePart,
    is_torsion_rocker,
    plate_drawing,
    plate_parts,
)
from plumbrod.outputs.plate_profile import plate_profile

if TYPE_CHECKING:  # pragma: no cover
    from ezdxf.document import Drawing
    from ezdxf.layouts import Modelspace

__all__ = [
    "CUT_LAYERS",
    "DXF_VERSIONS",
    "PLATE_LAYERS",
    "ROUTE_LAYERS",
    "TEXT_COLOUR",
    "DrawingSet",
    "LayerSpec",
    "PlatePart",
    "design_drawings",
    "drawing_set",
    "dxf_bytes",
    "export_design",
    "is_torsion_rocker",
    "plate_drawing",
    "plate_parts",
    "route_drawing",
]

# -- route drawing layers (none of them is a cut layer) --------------------------------
ROUTE_RODS = LayerSpec("ROUTE_RODS", 1)
GUIDE_RODS = LayerSpec("GUIDE_RODS", 5)
ROCKER_AXES = LayerSpec("ROCKER_AXES", 6, "CENTER")
ROCKER_ARMS = LayerSpec("ROCKER_ARMS", 6)
ROCKER_PLATES = LayerSpec("ROCKER_PLATES", 30)
SUSPENSION = LayerSpec("SUSPENSION", 8)
TYRES = LayerSpec("TYRES", 8, "DASHED")
ZONES = LayerSpec("ZONES", 3, "DASHED")
HARDPOINTS = LayerSpec("HARDPOINTS", 7)
LABELS = LayerSpec("LABELS", 7)
TITLE = LayerSpec("TITLE", 7)
ROUTE_LAYERS: tuple[LayerSpec, ...] = (
    ROUTE_RODS,
    GUIDE_RODS,
    ROCKER_AXES,
    ROCKER_ARMS,
    ROCKER_PLATES,
    SUSPENSION,
    TYRES,
    ZONES,
    HARDPOINTS,
    LABELS,
    TITLE,
)

HELPER_POINTS = (".slide_top", ".slide_base", ".axis_a", ".axis_b")
"""Points the solver adds for itself (slider guides, rocker axis ends): drawn, never
labelled as hardpoints."""

ROCKER_AXIS_OVERHANG_MM = 25.0
"""How far a drawn pivot axis reaches past the rocker's pickups along the axis."""


# -- small geometry helpers ---------------------------------------------------------------
def _unit(vec: np.ndarray) -> np.ndarray:
    return vec / np.linalg.norm(vec)


def _plane_axes(normal: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Two unit vectors spanning the plane normal to ``normal`` (first one horizontal
    when the normal is not vertical)."""
    n = _unit(normal)
    helper = np.array([0.0, 0.0, 1.0]) if abs(n[2]) < 0.9 else np.array([1.0, 0.0, 0.0])
    a = _unit(np.cross(helper, n))
    return a, np.cross(n, a)


def _circle_3d(
    msp: Modelspace, centre: np.ndarray, radius: float, normal: np.ndarray, layer: str
) -> None:
    """A CIRCLE in the plane normal to ``normal`` through ``centre`` (WCS, mm): the
    centre is stored in the circle's object coordinate system."""
    from ezdxf.math import OCS

    extrusion = tuple(float(c) for c in _unit(np.asarray(normal, dtype=float)))
    centre_ocs = OCS(extrusion).from_wcs(tuple(float(c) for c in centre))
    msp.add_circle(centre_ocs, radius, dxfattribs={"layer": layer, "extrusion": extrusion})


def _polyline_3d(msp: Modelspace, points: np.ndarray, layer: str) -> None:
    msp.add_polyline3d(
        [tuple(float(c) for c in p) for p in points], close=True, dxfattribs={"layer": layer}
    )


# -- route drawing ---------------------------------------------------------------------------
def _label_height(points: np.ndarray) -> float:
    """Label text height from the drawing size: 1/250 of the diagonal, 2.5 to 20 mm."""
    span = float(np.linalg.norm(points.max(axis=0) - points.min(axis=0)))
    return float(np.clip(round(span / 250.0, 1), 2.5, 20.0))


def _hardpoints(analysis: Analysis) -> list[tuple[np.ndarray, list[str]]]:
    """Distinct hardpoint positions (design pose) with every name found there; the
    solver's helper points (:data:`HELPER_POINTS`) are left out."""
    link = analysis.link
    groups: list[tuple[np.ndarray, list[str]]] = []
    for name, p in zip(link.point_names, link.points[0], strict=True):
        if name.endswith(HELPER_POINTS):
            continue
        for position, names in groups:
            if np.array_equal(position, p):
                names.append(name)
                break
        else:
            groups.append((np.array(p, dtype=float), [name]))
    return groups


def _draw_rods(msp: Modelspace, design: Design, guides: set[str], height: float) -> None:
    for rod in design.rods:
        a = np.array(design.pickups[rod.end_a].position_mm)
        b = np.array(design.pickups[rod.end_b].position_mm)
        layer = GUIDE_RODS.name if rod.name in guides else ROUTE_RODS.name
        line(msp, a, b, layer)
        section = f"{rod.od_mm:g}" + (" bar" if rod.wall_mm is None else f"x{rod.wall_mm:g}")
        text(msp, f"{rod.name} {section} {rod.material}", (a + b) / 2.0, height, LABELS.name)


def _draw_rockers(
    msp: Modelspace, analysis: Analysis, outlines: Mapping[str, PlateOutline], height: float
) -> None:
    design = analysis.design
    for rocker in design.rockers:
        a0, a1 = np.array(rocker.axis_a_mm), np.array(rocker.axis_b_mm)
        axis = _unit(a1 - a0)
        pickups = [
            np.array(p.position_mm) for p in design.pickups.values() if p.body == rocker.name
        ]
        along = [float((p - a0) @ axis) for p in pickups] + [0.0, float((a1 - a0) @ axis)]
        lo = min(along) - ROCKER_AXIS_OVERHANG_MM
        hi = max(along) + ROCKER_AXIS_OVERHANG_MM
        line(msp, a0 + lo * axis, a0 + hi * axis, ROCKER_AXES.name)
        text(msp, f"rocker {rocker.name} axis", a0 + hi * axis, height, LABELS.name)
        for p in pickups:
            foot = a0 + float((p - a0) @ axis) * axis
            if np.linalg.norm(p - foot) > 1e-9:
                line(msp, foot, p, ROCKER_ARMS.name)
        outline = outlines.get(rocker.name)
        if outline is not None:
            _draw_plate_3d(msp, outline)


def _draw_plate_3d(msp: Modelspace, outline: PlateOutline) -> None:
    """The plate in its plane at the design pose: the exact profile as an LWPOLYLINE in
    the plate's object coordinate system (extrusion = pivot axis), holes as CIRCLEs."""
    from ezdxf.math import OCS

    normal = tuple(float(c) for c in outline.normal)
    ocs = OCS(normal)
    vertices = []
    elevation = 0.0
    for u, v, bulge in profile_vertices(plate_profile(outline)):
        p = ocs.from_wcs(tuple(float(c) for c in outline.origin + u * outline.u + v * outline.v))
        vertices.append((p.x, p.y, bulge))
        elevation = p.z
    msp.add_lwpolyline(
        vertices,
        format="xyb",
        close=True,
        dxfattribs={"layer": ROCKER_PLATES.name, "extrusion": normal, "elevation": elevation},
    )
    for hole in outline.holes:
        centre = outline.origin + hole.centre_uv[0] * outline.u + hole.centre_uv[1] * outline.v
        _circle_3d(msp, centre, hole.diameter_mm / 2.0, outline.normal, ROCKER_PLATES.name)


def _draw_suspension(msp: Modelspace, design: Design) -> None:
    for corner in design.corners:
        w = corner.wishbones
        if w is None:
            continue
        segments = [
            (w.upper_front_mm, w.upper_outer_mm),
            (w.upper_rear_mm, w.upper_outer_mm),
            (w.lower_front_mm, w.lower_outer_mm),
            (w.lower_rear_mm, w.lower_outer_mm),
            (w.upper_outer_mm, w.lower_outer_mm),
        ]
        if w.tie_rod_inner_mm is not None and w.tie_rod_outer_mm is not None:
            segments.append((w.tie_rod_inner_mm, w.tie_rod_outer_mm))
        drawn: list[tuple[tuple[float, ...], tuple[float, ...]]] = []
        for a, b in segments:
            if a == b or (a, b) in drawn or (b, a) in drawn:
                continue  # a front-view design has one inner pivot per wishbone
            drawn.append((a, b))
            line(msp, a, b, SUSPENSION.name)


def _draw_tyres(msp: Modelspace, analysis: Analysis, height: float) -> None:
    link = analysis.link
    for c, corner in enumerate(analysis.design.corners):
        centre = np.array(corner.wheel_centre_mm)
        spin = _unit(np.array(link.spin_axis[c], dtype=float))
        half, radius = corner.tyre_width_mm / 2.0, corner.tyre_radius_mm
        for side in (-1.0, 1.0):
            _circle_3d(msp, centre + side * half * spin, radius, spin, TYRES.name)
        line(msp, centre - half * spin, centre + half * spin, TYRES.name)
        a, b = _plane_axes(spin)
        for direction in (a, b, -a, -b):
            rim = centre + radius * direction
            line(msp, rim - half * spin, rim + half * spin, TYRES.name)
        text(
            msp,
            f"tyre {corner.name} R{radius:g} W{corner.tyre_width_mm:g}",
            centre + radius * b + half * spin,
            height,
            LABELS.name,
        )


def _draw_zones(msp: Modelspace, analysis: Analysis, height: float) -> None:
    from plumbrod.clearance.survey import zone_solids
    from plumbrod.geometry.shapes import Box, Cylinder, Prism

    for zone, (solid, _) in zip(analysis.design.zones, zone_solids(analysis).values(), strict=True):
        if isinstance(solid, Box):
            assert solid.rotation is not None
            signs = np.array([[-1, -1], [1, -1], [1, 1], [-1, 1]], dtype=float)
            faces = []
            for sz in (-1.0, 1.0):
                local = np.column_stack((signs, np.full(4, sz))) * solid.half_size
                faces.append(solid.centre + local @ solid.rotation.T)
            for face in faces:
                _polyline_3d(msp, face, ZONES.name)
            for k in range(4):
                line(msp, faces[0][k], faces[1][k], ZONES.name)
            centre = solid.centre
        elif isinstance(solid, Cylinder):
            axis = solid.p1 - solid.p0
            radius = float(solid.radius)
            for end in (solid.p0, solid.p1):
                _circle_3d(msp, end, radius, axis, ZONES.name)
            a, b = _plane_axes(axis)
            for direction in (a, b, -a, -b):
                line(msp, solid.p0 + radius * direction, solid.p1 + radius * direction, ZONES.name)
            centre = (solid.p0 + solid.p1) / 2.0
        else:
            assert isinstance(solid, Prism)
            poly = solid.polygon_2d
            ends = [
                poly[:, :1] * solid.u + poly[:, 1:] * solid.v + depth * solid.w
                for depth in (solid.depth_min, solid.depth_max)
            ]
            for end in ends:
                _polyline_3d(msp, end, ZONES.name)
            for k in range(len(poly)):
                line(msp, ends[0][k], ends[1][k], ZONES.name)
            centre = (ends[0].mean(axis=0) + ends[1].mean(axis=0)) / 2.0
        text(msp, f"zone {zone.name}", centre, height, LABELS.name)


def route_drawing(
    analysis: Analysis, *, dxf_version: str = "R2010", sheet_name: str = "<design>-sheet.dxf"
) -> Drawing:
    """The design pose as a 3D wireframe, mm, ISO 8855 axes (see the module notes).

    Layers: ROUTE_RODS (rods of the load routes and any other rod that is not a guide),
    GUIDE_RODS (rods from an element to the chassis), ROCKER_AXES, ROCKER_ARMS (pivot
    axis to each pickup), ROCKER_PLATES, SUSPENSION (wishbone arms, upright, tie rod),
    TYRES (envelope cylinders: two circles and five lines each), ZONES (keep-out solids),
    HARDPOINTS (one POINT per distinct position), LABELS (TEXT), TITLE (one MTEXT with
    the design name, "units: mm", the axes, the generator and a pointer to the 2D sheet
    ``sheet_name``).  Rod LINE ends are the design hardpoints exactly.  Text layers are
    ACI 7 (:data:`TEXT_COLOUR`).
    """
    from plumbrod.mechanics.plates import rocker_outlines

    design, link = analysis.design, analysis.link
    doc = new_document(dxf_version, ROUTE_LAYERS)
    msp = doc.modelspace()
    height = _label_height(link.points[0])
    doc.header["$PDMODE"] = 34  # circle with a cross: visible at any zoom
    doc.header["$PDSIZE"] = height

    _draw_rods(msp, design, set(analysis.routes.guides), height)
    _draw_rockers(msp, analysis, rocker_outlines(design), height)
    _draw_suspension(msp, design)
    _draw_tyres(msp, analysis, height)
    _draw_zones(msp, analysis, height)
    for position, names in _hardpoints(analysis):
        msp.add_point(tuple(float(c) for c in position), dxfattribs={"layer": HARDPOINTS.name})
        text(
            msp,
            " / ".join(names),
            position + np.array([height, 0.0, height]),
            height * 0.8,
            LABELS.name,
        )

    # title block on the ground plane, below everything in top view
    from ezdxf import bbox

    extents = bbox.extents(msp)
    source = Path(design.source).name
    lines = [
        design.name,
        "hardpoints at the design pose (static ride height, wheels on the ground); units: mm",
        "axes ISO 8855: x forward, y left, z up; origin as in the design file",
        f"3D wireframe for 3D CAD; for 2D CAD open {sheet_name} (front, side, top and "
        "isometric views, swept envelopes, hardpoint table)",
        f"generated by plumbrod {__version__} from {source}; layout geometry only: "
        "fits, clearances and strength need a qualified engineer's check",
    ]
    # one MTEXT, so the lines stay stacked in whatever view the drawing is seen
    title_h = 1.5 * height
    msp.add_mtext(
        "\\P".join(lines),
        dxfattribs={
            "layer": TITLE.name,
            "style": "Standard",
            "char_height": title_h,
            "insert": (extents.extmin.x, extents.extmin.y - 2.0 * title_h, 0.0),
            "attachment_point": 1,  # top left
        },
    )
    return finish(doc)


# -- files --------------------------------------------------------------------------------
def _stem(design: Design) -> str:
    source = Path(design.source)
    stem = source.stem if design.source and not design.source.startswith("<") else ""
    if not stem:
        stem = re.sub(r"[^A-Za-z0-9]+", "_", design.name).strip("_").lower() or "design"
    return stem


@dataclass(frozen=True)
class DrawingSet:
    """Every drawing of a design by file name, and notes about what was not drawn."""

    drawings: dict[str, Drawing]
    notes: tuple[str, ...]


def drawing_set(
    analysis: Analysis,
    *,
    dxf_version: str = "R2010",
    stem: str | None = None,
    cut_only: bool = False,
    sheet: bool = True,
) -> DrawingSet:
    """``<stem>-route.dxf``, ``<stem>-sheet.dxf`` (when ``sheet``) and one
    ``<stem>-plate-<rocker>.dxf`` per flat rocker plate; a torsion rocker gets a note
    instead of a plate file.  ``stem`` defaults to the design file's name."""
    check_version(dxf_version)
    design = analysis.design
    base = stem or _stem(design)
    out = {
        f"{base}-route.dxf": route_drawing(
            analysis, dxf_version=dxf_version, sheet_name=f"{base}-sheet.dxf"
        )
    }
    if sheet:
        from plumbrod.outputs.dxf_sheet import sheet_drawing

        out[f"{base}-sheet.dxf"] = sheet_drawing(analysis, dxf_version=dxf_version)
    parts, notes = plate_parts(design)
    for part in parts:
        out[f"{base}-plate-{part.name}.dxf"] = plate_drawing(
            part, design_name=design.name, dxf_version=dxf_version, cut_only=cut_only
        )
    return DrawingSet(out, tuple(notes))


def design_drawings(
    analysis: Analysis, *, dxf_version: str = "R2010", stem: str | None = None
) -> dict[str, Drawing]:
    """Every drawing of a design by file name (see :func:`drawing_set`)."""
    return drawing_set(analysis, dxf_version=dxf_version, stem=stem).drawings


def export_design(
    analysis: Analysis,
    folder: str | os.PathLike[str],
    dxf_version: str = "R2010",
    *,
    stem: str | None = None,
) -> list[Path]:
    """Write the design's DXF files into ``folder`` (created if missing) and return their
    paths.  Every drawing is built first; then every file is written to a temporary file
    beside its target and renamed, so an error leaves no partial file and no new file."""
    from plumbrod.outputs.atomic import OutputSet

    drawings = design_drawings(analysis, dxf_version=dxf_version, stem=stem)
    target = Path(folder)
    with OutputSet(option="--output-dir") as out:
        for name, doc in drawings.items():
            out.add(target / name, dxf_bytes(doc))
    return out.written
