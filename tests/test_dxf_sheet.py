"""The drawing sheet checked with ezdxf's reader and auditor and with shapely.

Designs: the bundled 3D example (four views) and the planar undertray example (its own
view, with rocker plates).  Hardpoints come from the design files read by ``tomllib``;
the swept envelopes are checked against every solved pose's outline built here with
shapely (a rod's capsule seen in a view is its projected axis buffered by its radius:
plane geometry; a flat plate seen in a view is the convex hull of its projected corners).
"""

from __future__ import annotations

import hashlib
import re
import shutil
import subprocess
from pathlib import Path

import ezdxf
import matplotlib.image
import numpy as np
import pytest
import shapely

import plumbrod
from designs import EXAMPLE
from plumbrod.design.loading import load_design
from plumbrod.mechanics.analysis import Analysis, analyse
from plumbrod.mechanics.plates import rocker_outlines
from plumbrod.outputs.dxf_export import dxf_bytes
from plumbrod.outputs.dxf_sheet import SHEET_LAYERS, sheet_drawing, sheet_views
from test_dxf_export import UNDERTRAY, _read, _toml_points

# view axes written out here, independent of the code (DESIGN §2, ISO 8855: x forward,
# y left, z up): side (x, z), front (y, z), top (x, y)
AXES = {"side": (0, 2), "front": (1, 2), "top": (0, 1)}
TWO_D = {"LINE", "LWPOLYLINE", "CIRCLE", "POINT", "TEXT"}


@pytest.fixture(scope="module")
def sheets(tmp_path_factory: pytest.TempPathFactory) -> dict[str, tuple[Path, Analysis, Path]]:
    out = {}
    folder = tmp_path_factory.mktemp("sheets")
    for name, path in (("splitter", EXAMPLE), ("undertray", UNDERTRAY)):
        analysis = analyse(load_design(path))
        target = folder / f"{path.stem}-sheet.dxf"
        target.write_bytes(dxf_bytes(sheet_drawing(analysis)))
        out[name] = (path, analysis, target)
    return out


@pytest.mark.parametrize("name", ["splitter", "undertray"])
def test_sheet_reads_back_clean_2d_and_zoomed(sheets, name):
    _, _, target = sheets[name]
    doc = _read(target)  # ezdxf reader and auditor: no errors, no fixes
    assert doc.units == 4  # source: Autodesk AutoCAD help, INSUNITS: 4 = millimeters
    msp = doc.modelspace()
    kinds = {e.dxftype() for e in msp}
    assert kinds <= TWO_D and {"LINE", "LWPOLYLINE", "POINT", "TEXT"} <= kinds
    for e in msp:
        if e.dxftype() == "LINE":
            assert e.dxf.start.z == 0.0 and e.dxf.end.z == 0.0
        elif e.dxftype() in ("CIRCLE", "POINT", "TEXT"):
            key = {"CIRCLE": "center", "POINT": "location", "TEXT": "insert"}[e.dxftype()]
            assert e.dxf.get(key).z == 0.0
            assert tuple(e.dxf.get("extrusion", (0, 0, 1))) == (0, 0, 1)
        elif e.dxftype() == "LWPOLYLINE":
            assert e.closed and e.dxf.elevation == 0.0
    # text in ACI 7 (source: Autodesk AutoCAD help, colour 7 shows black on a light and
    # white on a dark background)
    for t in msp.query("TEXT"):
        assert doc.layers.get(t.dxf.layer).dxf.color == 7
        assert t.dxf.style == "Standard"
    # only the linetypes the layers use, only the standard text style
    used = {layer.dxf.linetype.upper() for layer in doc.layers}
    defined = {lt.dxf.name.upper() for lt in doc.linetypes}
    assert defined - {"BYBLOCK", "BYLAYER"} == used | {"CONTINUOUS"}
    assert {s.dxf.name for s in doc.styles} == {"Standard"}
    # the extents are set and hold every entity
    from ezdxf import bbox

    box = bbox.extents(msp)
    low, high = np.array(doc.header["$EXTMIN"]), np.array(doc.header["$EXTMAX"])
    assert np.all(np.abs(low) < 1e6) and np.all(np.abs(high) < 1e6)
    assert np.allclose(low[:2], [box.extmin.x, box.extmin.y])
    assert np.allclose(high[:2], [box.extmax.x, box.extmax.y])
    for spec in SHEET_LAYERS:
        assert doc.layers.get(spec.name).dxf.color == spec.colour


def test_views_laid_out_without_overlap(sheets):
    _, analysis, target = sheets["splitter"]
    shapes, placed, _ = sheet_views(analysis)
    assert set(shapes) == {"side", "front", "top", "iso"}
    boxes = {}
    for name, s in shapes.items():
        x0, y0, x1, y1 = s.bounds()
        a, b = placed[name].place(np.array([x0, y0])), placed[name].place(np.array([x1, y1]))
        boxes[name] = shapely.box(*a, *b)
    names = list(boxes)
    for i, a in enumerate(names):
        for b in names[i + 1 :]:
            assert not boxes[a].intersects(boxes[b]), (a, b)
    # the table and the title block sit clear of every view
    doc = ezdxf.readfile(target)
    for t in doc.modelspace().query("TEXT"):
        if t.dxf.layer in ("HARDPOINT_TABLE", "TITLE_BLOCK"):
            p = shapely.Point(t.dxf.insert.x, t.dxf.insert.y)
            assert not any(box.contains(p) for box in boxes.values())


@pytest.mark.parametrize("name", ["splitter", "undertray"])
def test_marks_sit_on_the_file_hardpoints(sheets, name):
    path, analysis, target = sheets[name]
    doc = ezdxf.readfile(target)
    marks = np.array(
        [[p.dxf.location.x, p.dxf.location.y] for p in doc.modelspace().query("POINT")]
    )
    assert {p.dxf.layer for p in doc.modelspace().query("POINT")} == {"HARDPOINT_MARKS"}
    _, placed, _ = sheet_views(analysis)
    points = _toml_points(path)
    assert points
    for view, sheet_view in placed.items():
        if view == "iso":
            continue
        i, j = AXES[view]
        for key, p in points.items():
            want = np.array(sheet_view.offset) + sheet_view.scale * np.array([p[i], p[j]])
            assert np.min(np.max(np.abs(marks - want), axis=1)) <= 1e-6, (view, key)
    # the side view sits at 1:1 on the design's own origin: its marks are x and z
    assert placed["side"].offset == (0.0, 0.0) and placed["side"].scale == 1.0


@pytest.mark.parametrize("name", ["splitter", "undertray"])
def test_every_pose_lies_inside_its_swept_envelope(sheets, name):
    _, analysis, target = sheets[name]
    doc = ezdxf.readfile(target)
    shapes, placed, _ = sheet_views(analysis)
    design, link = analysis.design, analysis.link
    kins = [res.solved.kin for res in analysis.sweeps.values()]
    pts = np.concatenate([k.points for k in kins])
    rot = np.concatenate([k.rotation for k in kins])
    trans = np.concatenate([k.translation for k in kins])
    assert len(pts) > 20
    rings: dict[str, list[np.ndarray]] = {}
    for e in doc.modelspace().query("LWPOLYLINE"):
        if "ENVELOPE" in e.dxf.layer:
            rings.setdefault(e.dxf.layer, []).append(np.array(e.get_points("xy")))
    expected_layers = {f"ENVELOPE_ROD_{r.name}" for r in design.rods}
    expected_layers |= {f"ENVELOPE_ROCKER_{r}" for r in rocker_outlines(design)}
    assert set(rings) >= expected_layers

    def envelope(layer: str, view: str) -> shapely.Geometry:
        """The envelope's closed outlines that lie in this view's part of the sheet."""
        box = _view_box(shapes, placed, view)
        polys = [shapely.Polygon(r) for r in rings[layer] if box.contains(shapely.Point(r[0]))]
        assert polys, (layer, view)
        shell = max(polys, key=lambda p: p.area)
        holes = [p for p in polys if p is not shell and shell.contains(p)]
        return shapely.Polygon(shell.exterior.coords, [h.exterior.coords for h in holes])

    for view, sheet_view in placed.items():
        if view == "iso":
            continue
        i, j = AXES[view]
        off = np.array(sheet_view.offset)
        for rod in design.rods:
            a, b = pts[:, link.point(rod.end_a)], pts[:, link.point(rod.end_b)]
            axis = (b - a) / np.linalg.norm(b - a, axis=-1, keepdims=True)
            a, b = a - rod.rod_end_allowance_mm * axis, b + rod.rod_end_allowance_mm * axis
            segs = np.stack((a[:, [i, j]], b[:, [i, j]]), axis=1) + off
            capsules = shapely.buffer(shapely.linestrings(segs), rod.od_mm / 2.0, quad_segs=64)
            env = envelope(f"ENVELOPE_ROD_{rod.name}", view).buffer(1e-6)
            assert shapely.contains(env, capsules).all(), (view, rod.name)
        for rocker, outline in rocker_outlines(design).items():
            body = link.body(rocker)
            verts = outline.vertices_3d(rot[:, body], trans[:, body])
            normal = np.einsum("nij,j->ni", rot[:, body], outline.normal)[:, None, :]
            half = outline.thickness_mm / 2.0
            corners = np.concatenate((verts - half * normal, verts + half * normal), axis=1)
            hulls = shapely.convex_hull(shapely.multipoints(corners[..., [i, j]] + off))
            env = envelope(f"ENVELOPE_ROCKER_{rocker}", view).buffer(1e-6)
            assert shapely.contains(env, hulls).all(), (view, rocker)


def _view_box(shapes, placed, view) -> shapely.Geometry:
    x0, y0, x1, y1 = shapes[view].bounds()
    a = placed[view].place(np.array([x0, y0]))
    b = placed[view].place(np.array([x1, y1]))
    return shapely.box(*a, *b).buffer(1.0)


def test_planar_design_draws_its_own_view_only(sheets):
    _, _, target = sheets["undertray"]
    texts = " ".join(t.dxf.text for t in ezdxf.readfile(target).modelspace().query("TEXT"))
    assert "SIDE VIEW" in texts
    assert "TOP VIEW" not in texts and "FRONT VIEW" not in texts


@pytest.mark.parametrize("name", ["splitter", "undertray"])
def test_title_block_and_hardpoint_table(sheets, name):
    path, analysis, target = sheets[name]
    msp = ezdxf.readfile(target).modelspace()
    title = [t.dxf.text for t in msp.query("TEXT") if t.dxf.layer == "TITLE_BLOCK"]
    joined = " ".join(title)
    assert analysis.design.name in title
    assert "units: mm" in joined and "1:1" in joined
    assert f"plumbrod {plumbrod.__version__}" in joined
    assert re.search(r"\b\d{4}-\d{2}-\d{2}\b", joined)
    # source: FIPS 180-4 (SHA-256), computed by Python's hashlib on the file's bytes
    assert hashlib.sha256(path.read_bytes()).hexdigest()[:12] in joined
    assert "layout geometry only" in joined and "qualified engineer" in joined
    table = [t.dxf.text for t in msp.query("TEXT") if t.dxf.layer == "HARDPOINT_TABLE"]
    tags = [t for t in table if re.fullmatch(r"P\d+", t)]
    assert tags == [f"P{k + 1}" for k in range(len(tags))]
    numbers = set(table)
    for p in _toml_points(path).values():
        for value in p:
            assert f"{value:.3f}" in numbers
    # every tag drawn beside a mark is in the table
    drawn = {
        tag
        for t in msp.query("TEXT")
        if t.dxf.layer == "HARDPOINT_TAGS"
        for tag in re.findall(r"P\d+", t.dxf.text)
    }
    assert drawn and drawn <= set(tags)


@pytest.mark.skipif(shutil.which("librecad") is None, reason="LibreCAD is not installed")
def test_librecad_renders_the_sheet(sheets, tmp_path):
    # LibreCAD (Debian package) as an outside 2D CAD program: its headless PDF print of
    # the sheet is not blank.
    _, _, target = sheets["splitter"]
    copy = tmp_path / target.name
    copy.write_bytes(target.read_bytes())
    done = subprocess.run(
        ["librecad", "dxf2pdf", "-a", "-o", str(tmp_path / "sheet.pdf"), str(copy)],
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
        env={**__import__("os").environ, "QT_QPA_PLATFORM": "offscreen"},
        cwd=tmp_path,
    )
    pdfs = list(tmp_path.glob("*.pdf"))
    assert done.returncode == 0 and pdfs, done.stderr
    assert pdfs[0].stat().st_size > 10_000
    if shutil.which("pdftoppm") is None:
        return
    subprocess.run(
        ["pdftoppm", "-png", "-r", "60", str(pdfs[0]), str(tmp_path / "page")],
        check=True,
        timeout=120,
    )
    image = matplotlib.image.imread(sorted(tmp_path.glob("page*.png"))[0])
    ink = (image[..., :3].mean(axis=-1) < 0.9).mean()
    assert 0.001 < ink < 0.5
