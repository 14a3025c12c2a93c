"""DXF export checked with ezdxf's own reader and auditor as the reference library.

Designs: the bundled 3D example (no plates), the planar undertray example (two plates),
and a copy of the 3D example with a plate on a tilted rocker axis (invented test
fixture).  Every file is written, read back with ``ezdxf.readfile`` and audited; the
geometry is compared with the design file read by ``tomllib`` (not by plumbrod), with
shapely, and with ezdxf's own bulge and OCS arithmetic.
"""

from __future__ import annotations

import io
import math
import os
import subprocess
import sys
import tomllib
from collections import Counter
from pathlib import Path

import ezdxf
import numpy as np
import pytest
import shapely
from ezdxf.math import ConstructionArc, bulge_to_arc
from scipy.spatial.transform import Rotation

import plumbrod
from designs import EXAMPLE, ROOT, replace_once
from plumbrod.design.loading import load_design
from plumbrod.errors import UsageError
from plumbrod.mechanics.analysis import Analysis, analyse
from plumbrod.mechanics.plates import rocker_outlines
from plumbrod.outputs.dxf_export import (
    CUT_LAYERS,
    PLATE_LAYERS,
    ROUTE_LAYERS,
    design_drawings,
    drawing_set,
    dxf_bytes,
    export_design,
    plate_drawing,
    plate_parts,
    route_drawing,
)
from plumbrod.outputs.dxf_preview import preview_png, view_matrix

UNDERTRAY = ROOT / "examples" / "planar_undertray.toml"
VERSIONS = {"R2010": "AC1024", "R2000": "AC1015"}
# source: Autodesk DXF Reference, HEADER section ($ACADVER): AC1015 = AutoCAD 2000,
# AC1024 = AutoCAD 2010.
BYLAYER = 256
# source: Autodesk DXF Reference, HEADER section ($CECOLOR): 256 = BYLAYER.

TILTED_PLATE = """axis_mm = [[0.0, 300.0, 250.0], [600.0, 330.0, 290.0]]

[rockers.rocker_left.plate]
thickness_mm = 5.0
material = "4130-N"
pivot_hole_mm = 16.0
hole_mm = 10.0
edge_margin_mm = 7.0
"""


# -- fixtures ------------------------------------------------------------------------------
@pytest.fixture(scope="module")
def tilted_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """Invented test fixture: the bundled example with a plate on each rocker and the
    left rocker's axis tilted (the right one mirrored), so the plate plane is oblique."""
    text = EXAMPLE.read_text(encoding="utf-8")
    text = replace_once(
        text,
        "axis_mm = [[0.0, 300.0, 250.0], [600.0, 300.0, 250.0]]\nmass_kg = 0.9\n",
        TILTED_PLATE,
    )
    path = tmp_path_factory.mktemp("tilted") / "tilted_plate.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def analyses(tilted_file: Path) -> dict[str, tuple[Path, Analysis]]:
    return {
        name: (path, analyse(load_design(path)))
        for name, path in (("splitter", EXAMPLE), ("undertray", UNDERTRAY), ("tilted", tilted_file))
    }


@pytest.fixture(scope="module", params=list(VERSIONS))
def exported(
    request: pytest.FixtureRequest,
    analyses: dict[str, tuple[Path, Analysis]],
    tmp_path_factory: pytest.TempPathFactory,
):
    """Every design exported in one DXF version: {design: (analysis, [paths])}."""
    version = request.param
    out = {}
    for name, (_, analysis) in analyses.items():
        folder = tmp_path_factory.mktemp(f"{name}-{version}")
        out[name] = (analysis, export_design(analysis, folder, version), folder)
    return version, out


# -- helpers --------------------------------------------------------------------------------
def _toml_points(path: Path) -> dict[str, tuple[float, float, float]]:
    """Every pickup the design file names, by ``<body>.<pickup>``, read with tomllib;
    planar [x, z] or [y, z] points lifted to 3D; ``mirror = true`` adds the right side."""
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    plane = data["design"].get("plane")

    def lift(p: list[float]) -> tuple[float, float, float]:
        if plane == "side":
            return (p[0], 0.0, p[1])
        if plane == "front":
            return (0.0, p[0], p[1])
        return (p[0], p[1], p[2])

    points: dict[str, tuple[float, float, float]] = {}
    for name, p in data.get("chassis", {}).get("pickups", {}).items():
        points[f"chassis.{name}"] = lift(p)
    for corner, table in data.get("corners", {}).items():
        for body, pickups in table.get("pickups", {}).items():
            for name, p in pickups.items():
                points[f"{corner}.{body}.{name}"] = lift(p)
    for kind in ("rockers", "elements"):
        for body, table in data.get(kind, {}).items():
            for name, p in table.get("pickups", {}).items():
                points[f"{body}.{name}"] = lift(p)
    if data["design"].get("mirror"):
        for key, (x, y, z) in list(points.items()):
            if "left" in key:
                points[key.replace("left", "right")] = (x, -y, z)
    return points


def _toml_wheel_centres(path: Path) -> dict[str, np.ndarray]:
    """Wheel centres by corner, read with tomllib (planar points lifted, mirror added)."""
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    plane = data["design"].get("plane")
    out = {}
    for corner, table in data["corners"].items():
        p = table["wheel_centre_mm"]
        lifted = {"side": (p[0], 0.0, p[-1]), "front": (0.0, p[0], p[-1])}.get(plane, p)
        out[corner] = np.array(lifted, dtype=float)
        if data["design"].get("mirror") and "left" in corner:
            out[corner.replace("left", "right")] = out[corner] * np.array([1.0, -1.0, 1.0])
    return out


def _rod_ends(path: Path) -> dict[str, tuple[str, str]]:
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    rods = {name: tuple(t["ends"]) for name, t in data["rods"].items()}
    if data["design"].get("mirror"):
        for name, (a, b) in list(rods.items()):
            if "left" in name:
                rods[name.replace("left", "right")] = (
                    a.replace("left", "right"),
                    b.replace("left", "right"),
                )
    return rods  # type: ignore[return-value]


def _read(path: Path) -> ezdxf.document.Drawing:
    doc = ezdxf.readfile(path)
    auditor = doc.audit()
    # DXF notes: the auditor repairs undefined linetypes and styles silently, so both
    # its errors and its fixes must be empty.
    assert auditor.errors == [], [e.message for e in auditor.errors]
    assert auditor.fixes == [], [f.message for f in auditor.fixes]
    return doc


def _by_layer(doc) -> Counter:
    return Counter((e.dxftype(), e.dxf.layer) for e in doc.modelspace())


def _signed_area_with_bulges(vertices: list[tuple[float, float, float]]) -> float:
    """Shoelace over the closed polyline plus, for each bulged segment, the circular
    segment between chord and arc.
    source: Autodesk ActiveX reference, GetBulge: the bulge is the tangent of 1/4 of the
    included angle, negative clockwise; plane geometry: a circular segment of angle θ
    and radius r has area r²(θ − sin θ)/2, and r = c/(2 sin(θ/2)) for chord c."""
    total = 0.0
    n = len(vertices)
    for k in range(n):
        x0, y0, bulge = vertices[k]
        x1, y1, _ = vertices[(k + 1) % n]
        total += 0.5 * (x0 * y1 - x1 * y0)
        if bulge:
            theta = 4.0 * math.atan(bulge)
            chord = math.hypot(x1 - x0, y1 - y0)
            r = chord / (2.0 * math.sin(abs(theta) / 2.0))
            total += math.copysign(0.5 * r * r * (abs(theta) - math.sin(abs(theta))), theta)
    return total


def _flatten(
    vertices: list[tuple[float, float, float]], sagitta: float
) -> list[tuple[float, float]]:
    """Points around a closed polyline with bulges, arcs split by ezdxf's own
    ConstructionArc (every point on its circle, chords at most ``sagitta`` inside)."""
    out: list[tuple[float, float]] = []
    n = len(vertices)
    for k in range(n):
        x0, y0, bulge = vertices[k]
        x1, y1, _ = vertices[(k + 1) % n]
        out.append((x0, y0))
        if bulge:
            centre, start, end, radius = bulge_to_arc((x0, y0), (x1, y1), bulge)
            arc = ConstructionArc(centre, radius, math.degrees(start), math.degrees(end))
            out.extend((p.x, p.y) for p in list(arc.flattening(sagitta))[1:-1])
    return out


# -- every file ---------------------------------------------------------------------------
def test_files_read_back_clean_in_mm(exported):
    version, out = exported
    for name, (analysis, paths, folder) in out.items():
        stem = {
            "splitter": "hillclimb_splitter",
            "undertray": "planar_undertray",
            "tilted": "tilted_plate",
        }[name]
        plates = sorted(part.name for part in plate_parts(analysis.design)[0])
        assert sorted(p.name for p in folder.iterdir()) == sorted(
            [f"{stem}-route.dxf", f"{stem}-sheet.dxf"] + [f"{stem}-plate-{r}.dxf" for r in plates]
        )  # no temp files
        for path in paths:
            doc = _read(path)
            assert doc.dxfversion == VERSIONS[version]
            # source: Autodesk AutoCAD help, INSUNITS: 4 = millimeters; LUNITS: 2 =
            # decimal; AUNITS: 0 = decimal degrees.  MEASUREMENT 1 = metric (DXF notes).
            assert doc.units == ezdxf.units.MM == 4
            assert doc.header["$INSUNITS"] == 4
            assert doc.header["$MEASUREMENT"] == 1
            assert doc.header["$LUNITS"] == 2
            assert doc.header["$AUNITS"] == 0
            for entity in doc.modelspace():
                assert entity.dxf.get("color", BYLAYER) == BYLAYER, entity
                assert entity.dxf.get("linetype", "BYLAYER").upper() == "BYLAYER", entity
                assert entity.dxf.layer in doc.layers
                assert entity.dxftype() != "SPLINE"
            for layer in doc.layers:
                assert layer.dxf.linetype in doc.linetypes
            if path.name.endswith("-sheet.dxf"):
                continue  # its layers: tests/test_dxf_sheet.py
            wanted = ROUTE_LAYERS if path.name.endswith("-route.dxf") else PLATE_LAYERS
            for spec in wanted:
                layer = doc.layers.get(spec.name)
                assert layer.dxf.color == spec.colour
                assert layer.dxf.linetype == spec.linetype
            # the view opens on the drawing (zoom extents wrote the active viewport)
            vport = doc.viewports.get("*Active")[0]
            assert vport.dxf.height > 0


def test_same_design_same_bytes(analyses):
    # common practice, no source: fixed header dates and GUIDs make the output
    # reproducible, so files can be compared and kept under version control.
    _, analysis = analyses["undertray"]
    first = {n: dxf_bytes(d) for n, d in design_drawings(analysis).items()}
    second = {n: dxf_bytes(d) for n, d in design_drawings(analysis).items()}
    assert first == second
    assert b"$TDCREATE" in first["planar_undertray-route.dxf"]


# -- the route wireframe ---------------------------------------------------------------------
@pytest.mark.parametrize("name", ["splitter", "undertray", "tilted"])
def test_route_rods_are_lines_between_the_file_hardpoints(exported, analyses, name):
    _, out = exported
    analysis, paths, _ = out[name]
    design_path = analyses[name][0]
    doc = _read(paths[0])
    points = _toml_points(design_path)
    rods = _rod_ends(design_path)
    counts = _by_layer(doc)
    guides = set(analysis.routes.guides)
    assert counts[("LINE", "ROUTE_RODS")] == len(rods) - len(guides)
    assert counts[("LINE", "GUIDE_RODS")] == len(guides)
    lines = [
        e for e in doc.modelspace().query("LINE") if e.dxf.layer in ("ROUTE_RODS", "GUIDE_RODS")
    ]
    for rod, (a, b) in rods.items():
        pa, pb = np.array(points[a]), np.array(points[b])
        hits = [
            e
            for e in lines
            if np.max(np.abs(np.array(e.dxf.start) - pa)) <= 1e-9
            and np.max(np.abs(np.array(e.dxf.end) - pb)) <= 1e-9
        ]
        assert len(hits) == 1, rod
        assert hits[0].dxf.layer == ("GUIDE_RODS" if rod in guides else "ROUTE_RODS")


@pytest.mark.parametrize("name", ["splitter", "undertray"])
def test_route_hardpoints_tyres_and_suspension(exported, analyses, name):
    _, out = exported
    analysis, paths, _ = out[name]
    design = analysis.design
    doc = _read(paths[0])
    msp = doc.modelspace()
    counts = _by_layer(doc)
    # every pickup of the file is a POINT on HARDPOINTS
    located = np.array([p.dxf.location for p in msp.query("POINT")])
    assert {p.dxf.layer for p in msp.query("POINT")} == {"HARDPOINTS"}
    for key, p in _toml_points(analyses[name][0]).items():
        assert np.min(np.max(np.abs(located - np.array(p)), axis=1)) <= 1e-9, key
    link = analysis.link
    real = [
        tuple(p)
        for n, p in zip(link.point_names, link.points[0].tolist(), strict=True)
        if not n.endswith((".slide_top", ".slide_base", ".axis_a", ".axis_b"))
    ]
    assert len(located) == len(set(real))
    # the solver's helper points are never labelled as hardpoints
    labels = " ".join(t.dxf.text for t in msp.query("TEXT"))
    for helper in ("axis_a", "axis_b", "slide_top", "slide_base"):
        assert helper not in labels
    # text in ACI 7, which CAD programs show black on white and white on black
    # (source: Autodesk AutoCAD help, "About Setting the Color of Objects": colour 7)
    for text in msp.query("TEXT MTEXT"):
        assert doc.layers.get(text.dxf.layer).dxf.color == 7
    # the extents are written (not left at the +-1e20 defaults)
    assert np.all(np.abs(doc.header["$EXTMIN"]) < 1e6) and np.all(
        np.abs(doc.header["$EXTMAX"]) < 1e6
    )
    assert np.all(np.array(doc.header["$EXTMIN"]) <= located.min(axis=0) + 1e-9)
    assert np.all(np.array(doc.header["$EXTMAX"]) >= located.max(axis=0) - 1e-9)
    # tyres: two circles per corner in the wheel plane, spaced by the tyre width
    tyres = [c for c in msp.query("CIRCLE") if c.dxf.layer == "TYRES"]
    wheels = _toml_wheel_centres(analyses[name][0])
    assert len(tyres) == 2 * len(design.corners)
    for corner in design.corners:
        centre = np.array(corner.wheel_centre_mm)
        mine = [
            c
            for c in tyres
            if abs(c.dxf.radius - corner.tyre_radius_mm) <= 1e-12
            and np.linalg.norm(np.array(c.ocs().to_wcs(c.dxf.center)) - centre)
            <= corner.tyre_width_mm / 2.0 + 1e-9
        ]
        assert len(mine) == 2, corner.name
        ends = [np.array(c.ocs().to_wcs(c.dxf.center)) for c in mine]
        assert np.linalg.norm(ends[0] - ends[1]) == pytest.approx(corner.tyre_width_mm, abs=1e-9)
        assert np.max(np.abs((ends[0] + ends[1]) / 2.0 - wheels[corner.name])) <= 1e-9
        axis = (ends[1] - ends[0]) / np.linalg.norm(ends[1] - ends[0])
        for c in mine:
            # each circle's plane is normal to the line joining the two centres
            assert abs(abs(float(np.dot(c.dxf.extrusion, axis))) - 1.0) <= 1e-12
    wishbone_corners = sum(1 for c in design.corners if c.wishbones is not None)
    assert counts[("LINE", "SUSPENSION")] == 6 * wishbone_corners
    assert counts[("LINE", "ROCKER_AXES")] == len(design.rockers)
    assert ("MTEXT", "TITLE") in counts
    title = " ".join(m.plain_text() for m in msp.query("MTEXT"))
    for phrase in ("units: mm", design.name, "ISO 8855", "x forward, y left, z up", "plumbrod"):
        assert phrase in title


def test_route_zones_are_the_design_solids(exported):
    # reference library: scipy's extrinsic x-y-z Euler rotation for the leaned box
    _, out = exported
    _, paths, _ = out["splitter"]
    doc = _read(paths[0])
    data = tomllib.loads(EXAMPLE.read_text(encoding="utf-8"))["zones"]
    counts = _by_layer(doc)
    assert counts[("POLYLINE", "ZONES")] == 4  # box and prism: two faces each
    assert counts[("CIRCLE", "ZONES")] == 2  # cylinder: two end circles
    assert counts[("LINE", "ZONES")] == 4 + 4 + len(data["tub"]["outline_mm"])
    box = data["radiator"]
    rotation = Rotation.from_euler("xyz", box["rotation_deg"], degrees=True).as_matrix()
    half = np.array(box["size_mm"]) / 2.0
    corners = {
        tuple(np.round(np.array(box["centre_mm"]) + rotation @ (half * s), 9))
        for s in np.array(np.meshgrid([-1, 1], [-1, 1], [-1, 1])).T.reshape(-1, 3)
    }
    drawn = set()
    for poly in doc.modelspace().query("POLYLINE"):
        if poly.dxf.layer == "ZONES" and poly.is_closed:
            drawn |= {tuple(np.round(np.array(v), 9)) for v in poly.points()}
    assert corners <= drawn
    cyl = data["steering_rack"]
    ends = {
        tuple(c.ocs().to_wcs(c.dxf.center))
        for c in doc.modelspace().query("CIRCLE")
        if c.dxf.layer == "ZONES"
    }
    assert ends == {tuple(map(float, p)) for p in cyl["axis_mm"]}


def test_tilted_plate_lies_in_its_plane_in_3d(exported):
    # reference library: ezdxf's OCS converts the stored plate back to world coordinates
    _, out = exported
    analysis, paths, _ = out["tilted"]
    doc = _read(paths[0])
    outlines = rocker_outlines(analysis.design)
    plates = [e for e in doc.modelspace().query("LWPOLYLINE") if e.dxf.layer == "ROCKER_PLATES"]
    holes = [e for e in doc.modelspace().query("CIRCLE") if e.dxf.layer == "ROCKER_PLATES"]
    assert len(plates) == len(outlines) == 2
    assert len(holes) == sum(len(o.holes) for o in outlines.values())
    for outline in outlines.values():
        normal = outline.normal
        mine = [p for p in plates if np.allclose(p.dxf.extrusion, normal, atol=1e-12)]
        assert len(mine) == 1
        wcs = np.array(list(mine[0].vertices_in_wcs()))
        assert np.max(np.abs((wcs - outline.origin) @ normal)) <= 1e-9
        for hole in outline.holes:
            centre = outline.origin + hole.centre_uv[0] * outline.u + hole.centre_uv[1] * outline.v
            found = [
                c
                for c in holes
                if np.linalg.norm(np.array(c.ocs().to_wcs(c.dxf.center)) - centre) <= 1e-9
            ]
            assert len(found) == 1
            assert found[0].dxf.radius == pytest.approx(hole.diameter_mm / 2.0, abs=1e-12)


# -- the plate cut files ---------------------------------------------------------------------
@pytest.mark.parametrize("name", ["undertray"])
def test_plate_cut_profile_and_holes(exported, name):
    _, out = exported
    analysis, paths, _ = out[name]
    outlines = rocker_outlines(analysis.design)
    plate_paths = {p.name.split("-plate-")[1][:-4]: p for p in paths if "-plate-" in p.name}
    assert set(plate_paths) == set(outlines)
    for rocker, outline in outlines.items():
        doc = _read(plate_paths[rocker])
        msp = doc.modelspace()
        cut = [e for e in msp if e.dxf.layer in CUT_LAYERS]
        assert {e.dxftype() for e in cut} == {"LWPOLYLINE", "CIRCLE"}
        profiles = [e for e in cut if e.dxftype() == "LWPOLYLINE"]
        assert len(profiles) == 1 and profiles[0].dxf.layer == "CUT_PROFILE"
        lwp = profiles[0]
        assert lwp.closed
        vertices = [tuple(v) for v in lwp.get_points("xyb")]
        xy = np.array([v[:2] for v in vertices])
        # no repeated vertex, in particular not the first at the end
        gaps = np.linalg.norm(xy - np.roll(xy, -1, axis=0), axis=1)
        assert gaps.min() > 1e-6
        # arcs: every bulged segment is an arc of a boss circle (ezdxf's bulge_to_arc),
        # counter-clockwise
        bosses = {h.name: h for h in outline.holes}
        arcs = 0
        for k, (x, y, bulge) in enumerate(vertices):
            if not bulge:
                continue
            arcs += 1
            assert bulge > 0
            nx, ny, _ = vertices[(k + 1) % len(vertices)]
            centre, _, _, radius = bulge_to_arc((x, y), (nx, ny), bulge)
            match = [
                h for h in bosses.values() if math.dist(h.centre_uv, (centre.x, centre.y)) <= 1e-9
            ]
            assert len(match) == 1
            assert radius == pytest.approx(match[0].boss_radius_mm, abs=1e-9)
        assert arcs >= 2
        # area: shoelace with bulges against shapely's polygon of the same outline
        area = _signed_area_with_bulges(vertices)
        gross = outline.outline.area
        assert gross <= area <= gross + outline.outline.length * outline.chord_tol_mm
        # ezdxf's own reading of the bulges (bulge_to_arc, ConstructionArc), flattened
        # with points on the arcs (ezdxf.path would approximate arcs by cubic Béziers,
        # which stray a few µm outside the circle)
        flat = shapely.Polygon(_flatten(vertices, 1e-3))
        assert flat.is_valid
        # the exact profile strays outside the polygon by at most the chord tolerance
        # (every polygon vertex lies on a boss circle) ...
        rim = shapely.points(np.array(flat.exterior.segmentize(0.05).coords))
        assert float(shapely.distance(rim, outline.outline).max()) <= outline.chord_tol_mm
        # ... and holds all of it (the flattening's chords stray inside the arcs by at
        # most its distance)
        assert flat.buffer(1e-3 + 1e-9).contains(outline.outline)
        # holes: true circles with the designed diameters at the hole centres, each one
        # keeping the edge margin to the profile
        circles = [e for e in cut if e.dxftype() == "CIRCLE"]
        assert {c.dxf.layer for c in circles} == {"CUT_HOLES"}
        assert len(circles) == len(outline.holes)
        for hole in outline.holes:
            found = [
                c
                for c in circles
                if math.dist((c.dxf.center.x, c.dxf.center.y), hole.centre_uv) <= 1e-9
            ]
            assert len(found) == 1
            assert found[0].dxf.radius == pytest.approx(hole.diameter_mm / 2.0, abs=1e-12)
            margin = hole.boss_radius_mm - hole.diameter_mm / 2.0
            edge = shapely.Point(hole.centre_uv).distance(flat.exterior)
            assert edge - hole.diameter_mm / 2.0 >= margin - 1e-3 - 1e-9
        # notes on non-cut layers
        texts = " ".join(t.dxf.text for t in msp.query("TEXT"))
        spec = next(r.plate for r in analysis.design.rockers if r.name == rocker)
        assert "units: mm" in texts
        assert f"material {spec.material}" in texts
        assert f"thickness {spec.thickness_mm:g} mm" in texts
        assert {t.dxf.layer for t in msp.query("TEXT")} <= {"NOCUT_NOTES", "NOCUT_TITLE"}
        assert {e.dxf.layer for e in msp.query("LINE")} == {"NOCUT_CENTRE_MARKS"}


def test_torsion_rocker_writes_no_plate(exported, tilted_file):
    # The tilted fixture's rockers carry their two pickups 600 mm apart along the pivot
    # axis (read from the file with tomllib): a tube with arms, not a flat plate
    # (common practice, no source: a plate's pickups sit within a spacer of its plane).
    data = tomllib.loads(tilted_file.read_text(encoding="utf-8"))
    (a0, a1) = np.array(data["rockers"]["rocker_left"]["axis_mm"], dtype=float)
    axis = (a1 - a0) / np.linalg.norm(a1 - a0)
    along = [
        float((np.array(p) - a0) @ axis) for p in data["rockers"]["rocker_left"]["pickups"].values()
    ]
    assert max(along) - min(along) > 300.0
    _, out = exported
    analysis, paths, _ = out["tilted"]
    assert not [p for p in paths if "-plate-" in p.name]
    found = drawing_set(analysis)
    assert len(found.notes) == 2
    for note in found.notes:
        assert "\n" not in note and "no plate file" in note and "along the pivot axis" in note


def test_cut_only_plate_holds_only_cut_layers(analyses):
    _, analysis = analyses["undertray"]
    parts, notes = plate_parts(analysis.design)
    assert notes == [] and len(parts) == 2
    # the two cranks of the undertray have the same arms (130 mm, file): twins
    assert {p.twin[1] for p in parts if p.twin} <= {"same", "mirrored"}
    for part in parts:
        doc = ezdxf.read(io.StringIO(dxf_bytes(plate_drawing(part, cut_only=True)).decode()))
        assert doc.audit().errors == [] and doc.audit().fixes == []
        kinds = Counter((e.dxftype(), e.dxf.layer) for e in doc.modelspace())
        assert kinds == Counter(
            {("LWPOLYLINE", "CUT_PROFILE"): 1, ("CIRCLE", "CUT_HOLES"): len(part.outline.holes)}
        )
        # "0" and "Defpoints" come with every DXF document (empty here)
        layers = {layer.dxf.name for layer in doc.layers} - {"0", "Defpoints"}
        assert layers == {"CUT_PROFILE", "CUT_HOLES"}
        full = plate_drawing(part, design_name="x")
        text = " ".join(t.dxf.text for t in full.modelspace().query("TEXT"))
        assert f"part: rocker {part.name} plate" in text and "quantity: 1 off" in text


def test_undertray_plate_hole_spacing_from_the_file(exported):
    # the crank's pickups in the file: pivot [-2170, 590], input [-2300, 590], output
    # [-2170, 460] (side view, mm): 130, 130 and 130·√2 apart (plane geometry).
    _, out = exported
    _, paths, _ = out["undertray"]
    doc = _read(next(p for p in paths if p.name.endswith("-plate-crank_rear.dxf")))
    centres = [
        (c.dxf.center.x, c.dxf.center.y, c.dxf.radius) for c in doc.modelspace().query("CIRCLE")
    ]
    by_radius = sorted(centres, key=lambda c: -c[2])
    pivot = by_radius[0]
    assert pivot[2] == 6.0  # pivot_hole_mm = 12
    others = by_radius[1:]
    assert [o[2] for o in others] == [5.0, 5.0]  # hole_mm = 10
    assert sorted(math.dist(pivot[:2], o[:2]) for o in others) == pytest.approx(
        [130.0] * 2, abs=1e-9
    )
    assert math.dist(others[0][:2], others[1][:2]) == pytest.approx(130.0 * math.sqrt(2), abs=1e-9)


def test_bad_version_is_a_usage_error(analyses):
    _, analysis = analyses["undertray"]
    with pytest.raises(UsageError, match="expected one of R2010, R2000, got 'R12'"):
        route_drawing(analysis, dxf_version="R12")


# -- previews --------------------------------------------------------------------------------
def test_view_matrices_are_rotations():
    # common practice, no source: an isometric view looks along (1, 1, 1) with z up.
    for view in ("top", "side", "front", "iso"):
        m = np.array([list(row) for row in view_matrix(view).rows()])[:3, :3]
        assert np.allclose(m.T @ m, np.eye(3), atol=1e-12)
        assert np.linalg.det(m) == pytest.approx(1.0, abs=1e-12)
    iso = view_matrix("iso")
    towards = iso.transform((1.0, 1.0, 1.0))
    assert (towards.x, towards.y) == pytest.approx((0.0, 0.0), abs=1e-12)
    up = iso.transform((0.0, 0.0, 1.0))
    assert up.x == pytest.approx(0.0, abs=1e-12) and up.y > 0


def test_png_preview_shows_something(analyses):
    import matplotlib.image

    _, analysis = analyses["undertray"]
    drawings = design_drawings(analysis)
    png = preview_png(drawings["planar_undertray-plate-crank_rear.dxf"])
    assert png.startswith(b"\x89PNG\r\n\x1a\n")
    import io

    image = matplotlib.image.imread(io.BytesIO(png), format="png")
    assert image.shape[0] > 100 and image.shape[1] > 100
    dark = (image[..., :3].mean(axis=-1) < 0.5).mean()
    assert 0.001 < dark < 0.5  # lines and text on white


# -- the command ---------------------------------------------------------------------------
def _env(seed: str = "0") -> dict[str, str]:
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    env["PYTHONHASHSEED"] = seed
    return env


def _export(cwd: Path, *args: str, seed: str = "0") -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", "export", *args],
        capture_output=True,
        text=True,
        env=_env(seed),
        cwd=cwd,
        timeout=180,
        check=False,
    )


def _exit_matches_verdict(done: subprocess.CompletedProcess[str]) -> bool:
    """Exit 1 with a FAIL verdict line, 0 with any other (the files are written both
    ways)."""
    last = done.stdout.strip().splitlines()[-1] if done.stdout.strip() else ""
    if not last.startswith("verdict: "):
        return False
    return done.returncode == (1 if last.startswith("verdict: FAIL") else 0)


def test_command_writes_the_files(tmp_path):
    first = _export(tmp_path, str(UNDERTRAY), "--png", seed="1")
    assert _exit_matches_verdict(first), first.stderr
    names = [
        "planar_undertray-route",
        "planar_undertray-plate-crank_rear",
        "planar_undertray-plate-crank_front",
    ]
    for name in names:
        for suffix in (".dxf", ".png"):
            path = tmp_path / "exports" / f"{name}{suffix}"
            assert path.is_file()
            assert f"wrote {Path('exports') / (name + suffix)}" in first.stdout
    assert "units: mm" in first.stdout
    # another process with another hash seed writes the same DXF bytes
    second = _export(tmp_path, str(UNDERTRAY), "--output-dir", "again", seed="2")
    assert _exit_matches_verdict(second), second.stderr
    for name in names:
        assert (tmp_path / "again" / f"{name}.dxf").read_bytes() == (
            tmp_path / "exports" / f"{name}.dxf"
        ).read_bytes()


def test_command_r2000(tmp_path):
    done = _export(tmp_path, str(UNDERTRAY), "--dxf-version", "R2000", "--output-dir", "old")
    assert _exit_matches_verdict(done), done.stderr
    doc = _read(tmp_path / "old" / "planar_undertray-plate-crank_rear.dxf")
    assert doc.dxfversion == "AC1015"


@pytest.mark.parametrize("case", ["missing", "bad_design", "bad_version"])
def test_command_bad_input_writes_nothing(tmp_path, case):
    if case == "missing":
        args = [str(tmp_path / "nope.toml")]
    elif case == "bad_design":
        text = replace_once(
            UNDERTRAY.read_text(encoding="utf-8"),
            'thickness_mm = 6.0\nmaterial = "7075-T6"\npivot_hole_mm = 12.0\n'
            "hole_mm = 10.0\nedge_margin_mm = 8.0\n\n[rockers.crank_rear.pickups]",
            'thickness_mm = -6.0\nmaterial = "7075-T6"\npivot_hole_mm = 12.0\n'
            "hole_mm = 10.0\nedge_margin_mm = 8.0\n\n[rockers.crank_rear.pickups]",
        )
        bad = tmp_path / "bad.toml"
        bad.write_text(text, encoding="utf-8")
        args = [str(bad)]
    else:
        args = [str(UNDERTRAY), "--dxf-version", "R12"]
    done = _export(tmp_path, *args, "--output-dir", "out")
    assert done.returncode == 2
    assert not (tmp_path / "out").exists()
    assert done.stdout == ""
    if case != "bad_version":
        assert done.stderr.startswith("plumbrod: error: ")
        assert done.stderr.count("\n") == 1
