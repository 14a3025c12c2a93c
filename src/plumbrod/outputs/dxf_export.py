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

import io
import math
import os
import re
from collections.abc import Iterable, Mapping
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from plumbrod import __version__
from plumbrod.design.model import Design
from plumbrod.errors import PlumbrodError, UsageError
from plumbrod.geometry.plate_outline import PlateOutline
from plumbrod.mechanics.analysis import Analysis
from plumbrod.outputs.plate_profile import PlateProfile, plate_profile

if TYPE_CHECKING:  # pragma: no cover
    from collections.abc import Iterator

    from ezdxf.document import Drawing
    from ezdxf.layouts import Modelspace

__all__ = [
    "CUT_LAYERS",
    "DXF_VERSIONS",
    "PLATE_LAYERS",
    "ROUTE_LAYERS",
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

DXF_VERSIONS: tuple[str, ...] = ("R2010", "R2000")
"""DXF versions we write: R2010 by default, R2000 for older cutting software."""

MIN_EZDXF = (1, 4, 2)
"""Older ezdxf releases wrote files some CAD programs refuse (see DXF notes)."""


@dataclass(frozen=True)
class LayerSpec:
    """A layer: ``name``, ACI ``colour``, ``linetype`` and whether it is cut."""

    name: str
    colour: int
    linetype: str = "Continuous"
    cut: bool = False


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

TEXT_COLOUR = 7
"""ACI 7: drawn black on a light background and white on a dark one (every CAD program
inverts it), so text stays readable whatever background the CAD user picked."""

TORSION_SPREAD_MM = 25.0
TORSION_SPREAD_THICKNESS = 5.0
"""A rocker whose pickups spread along its pivot axis by more than the larger of these
(mm, and times the plate thickness) is not a plate but a torsion tube with arms: no cut
file is written for it (common practice, no source)."""

HELPER_POINTS = (".slide_top", ".slide_base", ".axis_a", ".axis_b")
"""Points the solver adds for itself (slider guides, rocker axis ends): drawn, never
labelled as hardpoints."""

PLATE_TEXT_MM = 3.5
"""Text height on plate drawings (ISO 3098 series: 2.5, 3.5, 5, 7 mm; common practice,
no source)."""
ROCKER_AXIS_OVERHANG_MM = 25.0
"""How far a drawn pivot axis reaches past the rocker's pickups along the axis."""
_ARC_MIN_RAD = 1e-9


# -- document set-up --------------------------------------------------------------------
def _ezdxf() -> Any:
    import ezdxf

    found = tuple(int(p) for p in re.findall(r"\d+", ezdxf.__version__)[:3])
    if found < MIN_EZDXF:
        raise PlumbrodError(
            f"ezdxf: expected version >= {'.'.join(map(str, MIN_EZDXF))}, "
            f"got {ezdxf.__version__}; upgrade it (pip install -U ezdxf)"
        )
    return ezdxf


def _check_version(dxf_version: str) -> str:
    if dxf_version not in DXF_VERSIONS:
        raise UsageError(
            "dxf_version",
            f"expected one of {', '.join(DXF_VERSIONS)}, got {dxf_version!r}",
            "R2010 suits current CAD, R2000 older cutting software",
        )
    return dxf_version


def _new_document(dxf_version: str, layers: Iterable[LayerSpec]) -> Drawing:
    """A new mm document with our layers and only the linetypes they use (the
    "Standard" text style is always there)."""
    from ezdxf.tools.standards import linetypes

    ezdxf = _ezdxf()
    layers = tuple(layers)
    with _fixed_metadata():  # ezdxf stamps its creation marker here
        doc = ezdxf.new(_check_version(dxf_version), setup=False, units=ezdxf.units.MM)
    wanted = {spec.linetype.upper() for spec in layers} - {"CONTINUOUS"}
    for name, description, pattern in linetypes():
        if name.upper() in wanted and name not in doc.linetypes:
            doc.linetypes.add(name, pattern=pattern, description=description)
    doc.header["$INSUNITS"] = ezdxf.units.MM
    doc.header["$MEASUREMENT"] = 1
    doc.header["$LUNITS"] = 2
    doc.header["$AUNITS"] = 0
    doc.header["$TEXTSTYLE"] = "Standard"
    for spec in layers:
        doc.layers.add(spec.name, color=spec.colour, linetype=spec.linetype)
    return doc


def _text(
    msp: Modelspace,
    text: str,
    insert: Iterable[float],
    height: float,
    layer: str,
    *,
    align: str = "LEFT",
) -> None:
    from ezdxf.enums import TextEntityAlignment

    entity = msp.add_text(text, height=height, dxfattribs={"layer": layer, "style": "Standard"})
    entity.set_placement(tuple(float(c) for c in insert), align=TextEntityAlignment[align])


def _finish(doc: Drawing) -> Drawing:
    """Zoom the active viewport to the drawing and write ``$EXTMIN``/``$EXTMAX``."""
    import ezdxf.zoom
    from ezdxf import bbox

    msp = doc.modelspace()
    extents = bbox.extents(msp)
    if extents.has_data:
        # ezdxf copies the layout's extents and limits into the header when it writes
        low = tuple(float(c) for c in extents.extmin)
        high = tuple(float(c) for c in extents.extmax)
        msp.dxf.extmin, msp.dxf.extmax = low, high
        msp.dxf.limmin, msp.dxf.limmax = low[:2], high[:2]
        doc.header["$EXTMIN"], doc.header["$EXTMAX"] = low, high
    ezdxf.zoom.extents(msp)
    return doc


@contextmanager
def _fixed_metadata() -> Iterator[None]:
    """Let ezdxf write fixed dates and GUIDs (restores the option afterwards)."""
    import ezdxf

    before = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True
    try:
        yield
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = before


def dxf_bytes(doc: Drawing, *, fixed_metadata: bool = True) -> bytes:
    """The document as ASCII DXF bytes in its own encoding (UTF-8 for R2010, cp1252 for
    R2000), "\\n" line ends.  ``fixed_metadata`` writes fixed dates (2000-01-01) and GUIDs
    instead of the time of writing, so the same drawing gives the same bytes."""
    stream = io.StringIO()
    if fixed_metadata:
        with _fixed_metadata():
            doc.write(stream)
    else:
        doc.write(stream)
    return doc.encode(stream.getvalue())


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


def _line(msp: Modelspace, a: Iterable[float], b: Iterable[float], layer: str) -> None:
    msp.add_line(
        tuple(float(c) for c in a), tuple(float(c) for c in b), dxfattribs={"layer": layer}
    )


def _polyline_3d(msp: Modelspace, points: np.ndarray, layer: str) -> None:
    msp.add_polyline3d(
        [tuple(float(c) for c in p) for p in points], close=True, dxfattribs={"layer": layer}
    )


def _profile_vertices(profile: PlateProfile) -> list[tuple[float, float, float]]:
    """(u, v, bulge) vertices of the closed profile: each arc's start point carries the
    arc's bulge, each arc's end point starts the tangent line (bulge 0).  Zero-length
    lines and zero-sweep arcs are dropped, and the first vertex is not repeated."""
    from ezdxf.math import arc_to_bulge

    raw: list[tuple[float, float, float]] = []
    for arc in profile.arcs:
        if arc.sweep_rad <= _ARC_MIN_RAD:
            raw.append((*arc.start_uv, 0.0))
            continue
        start, end, bulge = arc_to_bulge(arc.centre_uv, arc.start_rad, arc.end_rad, arc.radius_mm)
        raw.append((start.x, start.y, bulge))
        raw.append((end.x, end.y, 0.0))
    out: list[tuple[float, float, float]] = []
    for vertex in raw:
        # a zero-length line: the next arc starts where the last one ended
        if out and math.dist(out[-1][:2], vertex[:2]) <= 1e-9:
            out[-1] = (out[-1][0], out[-1][1], vertex[2] or out[-1][2])
            continue
        out.append(vertex)
    if len(out) > 1 and math.dist(out[-1][:2], out[0][:2]) <= 1e-9:
        last = out.pop()
        out[0] = (out[0][0], out[0][1], out[0][2] or last[2])
    return out


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
        _line(msp, a, b, layer)
        section = f"{rod.od_mm:g}" + (" bar" if rod.wall_mm is None else f"x{rod.wall_mm:g}")
        _text(msp, f"{rod.name} {section} {rod.material}", (a + b) / 2.0, height, LABELS.name)


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
        _line(msp, a0 + lo * axis, a0 + hi * axis, ROCKER_AXES.name)
        _text(msp, f"rocker {rocker.name} axis", a0 + hi * axis, height, LABELS.name)
        for p in pickups:
            foot = a0 + float((p - a0) @ axis) * axis
            if np.linalg.norm(p - foot) > 1e-9:
                _line(msp, foot, p, ROCKER_ARMS.name)
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
    for u, v, bulge in _profile_vertices(plate_profile(outline)):
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
            _line(msp, a, b, SUSPENSION.name)


def _draw_tyres(msp: Modelspace, analysis: Analysis, height: float) -> None:
    link = analysis.link
    for c, corner in enumerate(analysis.design.corners):
        centre = np.array(corner.wheel_centre_mm)
        spin = _unit(np.array(link.spin_axis[c], dtype=float))
        half, radius = corner.tyre_width_mm / 2.0, corner.tyre_radius_mm
        for side in (-1.0, 1.0):
            _circle_3d(msp, centre + side * half * spin, radius, spin, TYRES.name)
        _line(msp, centre - half * spin, centre + half * spin, TYRES.name)
        a, b = _plane_axes(spin)
        for direction in (a, b, -a, -b):
            rim = centre + radius * direction
            _line(msp, rim - half * spin, rim + half * spin, TYRES.name)
        _text(
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
                _line(msp, faces[0][k], faces[1][k], ZONES.name)
            centre = solid.centre
        elif isinstance(solid, Cylinder):
            axis = solid.p1 - solid.p0
            radius = float(solid.radius)
            for end in (solid.p0, solid.p1):
                _circle_3d(msp, end, radius, axis, ZONES.name)
            a, b = _plane_axes(axis)
            for direction in (a, b, -a, -b):
                _line(msp, solid.p0 + radius * direction, solid.p1 + radius * direction, ZONES.name)
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
                _line(msp, ends[0][k], ends[1][k], ZONES.name)
            centre = (ends[0].mean(axis=0) + ends[1].mean(axis=0)) / 2.0
        _text(msp, f"zone {zone.name}", centre, height, LABELS.name)


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
    doc = _new_document(dxf_version, ROUTE_LAYERS)
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
        _text(
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
    return _finish(doc)


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
    doc = _new_document(dxf_version, layers)
    msp = doc.modelspace()
    profile = plate_profile(outline)
    vertices = _profile_vertices(profile)
    msp.add_lwpolyline(vertices, format="xyb", close=True, dxfattribs={"layer": CUT_PROFILE.name})
    middle = np.mean([h.centre_uv for h in outline.holes], axis=0)
    for hole in outline.holes:
        r = hole.diameter_mm / 2.0
        cu, cv = hole.centre_uv
        msp.add_circle((cu, cv), r, dxfattribs={"layer": CUT_HOLES.name})
        if cut_only:
            continue
        arm = 0.6 * r
        _line(msp, (cu - arm, cv), (cu + arm, cv), CENTRE_MARKS.name)
        _line(msp, (cu, cv - arm), (cu, cv + arm), CENTRE_MARKS.name)
        # the label beside the hole, towards the middle of the plate (away from the edge)
        inward = middle - np.array(hole.centre_uv)
        size = float(np.linalg.norm(inward))
        inward = inward / size if size > 1e-9 else np.array([0.0, 1.0])
        if abs(inward[0]) >= abs(inward[1]):
            align = "MIDDLE_LEFT" if inward[0] > 0 else "MIDDLE_RIGHT"
        else:
            align = "BOTTOM_CENTER" if inward[1] > 0 else "TOP_CENTER"
        anchor = np.array(hole.centre_uv) + inward * (r + 0.5 * PLATE_TEXT_MM)
        _text(
            msp,
            f"{hole.name} d{hole.diameter_mm:g}",
            anchor,
            PLATE_TEXT_MM * 0.8,
            NOTES.name,
            align=align,
        )
    if cut_only:
        return _finish(doc)

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
    for k, line in enumerate(lines):
        _text(
            msp,
            line,
            (lo[0], lo[1] - 3.0 * h - 1.7 * h * k),
            h * (1.4 if k == 0 else 1.0),
            PLATE_TITLE.name,
        )
    return _finish(doc)


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
    _check_version(dxf_version)
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
    from plumbrod.outputs.atomic import write_many

    drawings = design_drawings(analysis, dxf_version=dxf_version, stem=stem)
    target = Path(folder)
    return write_many({target / name: dxf_bytes(doc) for name, doc in drawings.items()})
