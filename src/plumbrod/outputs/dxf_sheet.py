"""The drawing sheet ``<design>-sheet.dxf``: the design in 2D views for any 2D CAD program.

One model-space sheet, mm, all in 2D entities (LINE, closed LWPOLYLINE, CIRCLE, POINT,
TEXT at z = 0):

* a 3D design: the side view (top left, at 1:1 with its origin on the design's origin,
  so its coordinates are the design's x and z), the front view beside it (same rows: z
  lines up), the top view below the side view (same columns: x lines up) and an
  isometric view below the front view; every orthographic view 1:1, the isometric view
  a 1:1 projection (lengths foreshortened, do not measure on it);
* a planar design: its own view only, 1:1 (the others would show every part on a line).

Each view shows the members at the design pose, the swept envelope of every moving
member over every sweep (closed outlines on ``ENVELOPE_<member>`` layers, see
:mod:`plumbrod.outputs.sheet_geometry`), zones and their clearance limits, tyres, the
ground line, element envelopes and the hardpoints as marks (a POINT and a small circle)
with short tags (P1, P2, ...).  A hardpoint table (tag, names, body, x, y, z) and a
title block (design, "units: mm", view scales, tool version, date, the design file's
SHA-256, the layout-only caution) sit beside the views.  Text is ACI 7 (black on white,
white on black); the extents are written; only the linetypes in use are defined.

The date is today's (UTC), or ``SOURCE_DATE_EPOCH`` when that is set (reproducible
builds).
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import os
import re
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from plumbrod import __version__
from plumbrod.mechanics.analysis import Analysis
from plumbrod.outputs.dxf_common import LayerSpec, finish, new_document, text
from plumbrod.outputs.sheet_geometry import Hardpoint, ViewShapes, hardpoints, view_shapes

if TYPE_CHECKING:  # pragma: no cover
    from ezdxf.document import Drawing
    from ezdxf.layouts import Modelspace

__all__ = ["SHEET_LAYERS", "SheetView", "design_sha256", "sheet_drawing", "sheet_views", "today"]

_LAYERS = {
    "rods": LayerSpec("MEMBERS_ROUTE_RODS", 1),
    "guides": LayerSpec("MEMBERS_GUIDE_RODS", 5),
    "axes": LayerSpec("MEMBERS_ROCKER_AXES", 6, "CENTER"),
    "arms": LayerSpec("MEMBERS_ROCKER_ARMS", 6),
    "plates": LayerSpec("MEMBERS_ROCKER_PLATES", 30),
    "suspension": LayerSpec("SUSPENSION", 8),
    "tyres": LayerSpec("TYRES", 8, "DASHED"),
    "zones": LayerSpec("ZONES", 3),
    "limits": LayerSpec("ZONE_CLEARANCE_LIMITS", 3, "DASHED"),
    "elements": LayerSpec("ELEMENT_ENVELOPES_AT_DESIGN_POSE", 4),
    "ground": LayerSpec("GROUND_LINE", 8),
}
MARKS = LayerSpec("HARDPOINT_MARKS", 7)
TAGS = LayerSpec("HARDPOINT_TAGS", 7)
TABLE = LayerSpec("HARDPOINT_TABLE", 7)
VIEW_TITLES = LayerSpec("VIEW_TITLES", 7)
TITLE_BLOCK = LayerSpec("TITLE_BLOCK", 7)
ENVELOPE_COLOUR = 140
"""ACI 140: a mid blue that reads on both light and dark backgrounds."""
SHEET_LAYERS: tuple[LayerSpec, ...] = (
    *_LAYERS.values(),
    MARKS,
    TAGS,
    TABLE,
    VIEW_TITLES,
    TITLE_BLOCK,
)
"""Fixed layers of the sheet; envelope layers (``ENVELOPE_<member>``) come per design."""

_ISO_TEXT_MM = (2.5, 3.5, 5.0, 7.0, 10.0, 14.0, 20.0)
"""Text heights of the ISO 3098 series (common practice, no source)."""

_VIEW_NAMES = {
    "side": "SIDE VIEW from the right (x forward to the right, z up)",
    "front": "FRONT VIEW from ahead (y left to the right, z up)",
    "top": "TOP VIEW from above (x forward to the right, y left up)",
    "iso": "ISOMETRIC VIEW from front left above (lengths foreshortened: do not measure)",
}


@dataclass(frozen=True)
class SheetView:
    """Where a view sits: sheet point = ``offset`` + ``scale`` · (p·right, p·up), mm."""

    name: str
    offset: tuple[float, float]
    scale: float

    def place(self, xy: np.ndarray) -> np.ndarray:
        return np.asarray(self.offset) + self.scale * np.asarray(xy, dtype=float)


def design_sha256(analysis: Analysis) -> str:
    """SHA-256 (hex) of the design file's bytes, or "" when there is no file."""
    source = analysis.design.source
    try:
        return hashlib.sha256(Path(source).read_bytes()).hexdigest()
    except (OSError, ValueError):
        return ""


def today() -> str:
    """Today (UTC) as YYYY-MM-DD, or the day of SOURCE_DATE_EPOCH when that is set."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.isdigit():
        return _dt.datetime.fromtimestamp(int(epoch), _dt.UTC).date().isoformat()
    return _dt.datetime.now(_dt.UTC).date().isoformat()


def _view_list(analysis: Analysis) -> list[str]:
    plane = analysis.design.plane
    return [plane] if plane in ("side", "front") else ["side", "front", "top", "iso"]


def _text_height(span: float) -> float:
    wanted = span / 160.0
    return max([h for h in _ISO_TEXT_MM if h <= wanted], default=_ISO_TEXT_MM[0])


def _layout(shapes: dict[str, ViewShapes], gap: float) -> dict[str, SheetView]:
    """Place the views: side at its own origin, front to its right on the same rows,
    top below the side view on the same columns, iso below the front view."""
    b = {name: s.bounds() for name, s in shapes.items()}
    out = {}
    first = next(iter(shapes))
    out[first] = SheetView(first, (0.0, 0.0), 1.0)
    if "front" in shapes and first == "side":
        dx = b["side"][2] + gap - b["front"][0]
        out["front"] = SheetView("front", (dx, 0.0), 1.0)
    if "top" in shapes:
        dy = b["side"][1] - 2.0 * gap - b["top"][3]
        out["top"] = SheetView("top", (0.0, dy), 1.0)
    if "iso" in shapes:
        left = out["front"].offset[0] + b["front"][0] if "front" in out else b["side"][2] + gap
        dx = left - b["iso"][0]
        top_row = out["top"].offset[1] + b["top"][3] if "top" in out else b[first][1] - gap
        dy = top_row - b["iso"][3]
        out["iso"] = SheetView("iso", (dx, dy), 1.0)
    return out


def sheet_views(analysis: Analysis) -> tuple[dict[str, ViewShapes], dict[str, SheetView], float]:
    """The shapes of every view, where each sits on the sheet, and the text height."""
    layer_names = {k: spec.name for k, spec in _LAYERS.items()}
    marks = hardpoints(analysis)
    shapes = {v: view_shapes(analysis, v, layer_names, marks) for v in _view_list(analysis)}
    spans = []
    for s in shapes.values():
        x0, y0, x1, y1 = s.bounds()
        spans.append(max(x1 - x0, y1 - y0))
    height = _text_height(max(spans))
    gap = max(12.0 * height, 0.08 * max(spans))
    return shapes, _layout(shapes, gap), height


def _layer_name(label: str) -> str:
    return re.sub(r"[^A-Za-z0-9_\-]", "_", f"ENVELOPE_{label}")


def _polyline(msp: Modelspace, ring: np.ndarray, layer: str) -> None:
    msp.add_lwpolyline(
        [(float(x), float(y)) for x, y in ring], close=True, dxfattribs={"layer": layer}
    )


def _boxes_overlap(a: tuple[float, float, float, float], boxes: list) -> bool:
    return any(a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3] for b in boxes)


def _place_tags(
    msp: Modelspace, marks: list[tuple[str, np.ndarray]], height: float, taken: list
) -> None:
    """Tags beside their marks; marks at one place share a tag; the first free spot of
    eight around the mark is used (else the first)."""
    groups: list[tuple[np.ndarray, list[str]]] = []
    for tag, p in marks:
        for q, tags in groups:
            if np.linalg.norm(q - p) <= 0.3 * height:
                tags.append(tag)
                break
        else:
            groups.append((p, [tag]))
    radius = 0.45 * height
    for p, tags in groups:
        msp.add_point((float(p[0]), float(p[1])), dxfattribs={"layer": MARKS.name})
        msp.add_circle((float(p[0]), float(p[1])), radius, dxfattribs={"layer": MARKS.name})
        tag = ",".join(tags) if len(tags) <= 3 else f"{','.join(tags[:2])}+{len(tags) - 2}"
        width = 0.75 * height * len(tag)
        d = radius + 0.3 * height
        spots = [
            (p[0] + d, p[1] + d * 0.2),
            (p[0] + d, p[1] + d),
            (p[0] - d - width, p[1] + d),
            (p[0] + d, p[1] - d - height),
            (p[0] - d - width, p[1] - d - height),
            (p[0] - d - width, p[1] + d * 0.2),
            (p[0] - width / 2, p[1] + d),
            (p[0] - width / 2, p[1] - d - height),
        ]
        boxes = [(x, y, x + width, y + height) for x, y in spots]
        k = next((i for i, box in enumerate(boxes) if not _boxes_overlap(box, taken)), 0)
        taken.append(boxes[k])
        text(msp, tag, spots[k], height, TAGS.name)


def _table(
    msp: Modelspace, points: list[Hardpoint], corner: tuple[float, float], height: float
) -> tuple[float, float]:
    """The hardpoint table with its top-left corner at ``corner``; returns its size."""
    rows = [("tag", "name", "body", "x mm", "y mm", "z mm")]
    for hp in points:
        x, y, z = hp.position_mm
        rows.append((hp.tag, " / ".join(hp.names), hp.body, f"{x:.3f}", f"{y:.3f}", f"{z:.3f}"))
    widths = [max(len(r[i]) for r in rows) * 0.8 * height + 1.5 * height for i in range(6)]
    pitch = 1.7 * height
    x0, y0 = corner
    text(
        msp, "HARDPOINTS at the design pose (mm, ISO 8855 axes)", (x0, y0), height * 1.2, TABLE.name
    )
    for k, row in enumerate(rows):
        y = y0 - (k + 1.6) * pitch
        x = x0
        for i, cell in enumerate(row):
            right = i >= 3
            at = (x + widths[i] - 1.5 * height, y) if right else (x, y)
            text(msp, cell, at, height, TABLE.name, align="RIGHT" if right else "LEFT")
            x += widths[i]
    total_w = sum(widths)
    bottom = y0 - (len(rows) + 1.2) * pitch
    for y in (y0 - 0.9 * pitch, y0 - 1.9 * pitch + 0.2 * height, bottom):
        msp.add_line((x0, y), (x0 + total_w, y), dxfattribs={"layer": TABLE.name})
    return total_w, y0 - bottom


def sheet_drawing(analysis: Analysis, *, dxf_version: str = "R2010") -> Drawing:
    """The drawing sheet of a solved design (see the module notes)."""
    design = analysis.design
    shapes, placed, height = sheet_views(analysis)
    envelope_layers = sorted(
        {layer for s in shapes.values() for layer, _ in s.polygons if layer.startswith("ENVELOPE_")}
    )
    specs = [*SHEET_LAYERS] + [
        LayerSpec(_layer_name(layer[len("ENVELOPE_") :]), ENVELOPE_COLOUR)
        for layer in envelope_layers
    ]
    doc = new_document(dxf_version, specs)
    doc.header["$PDMODE"] = 0  # a dot; the circle around it makes the mark
    doc.header["$LTSCALE"] = 2.0 * height  # dashes a few text heights long
    msp = doc.modelspace()
    taken: list = []
    for name, s in shapes.items():
        view = placed[name]
        for layer, a, b in s.lines:
            msp.add_line(tuple(view.place(a)), tuple(view.place(b)), dxfattribs={"layer": layer})
        for layer, ring in s.polygons:
            if layer.startswith("ENVELOPE_"):
                layer = _layer_name(layer[len("ENVELOPE_") :])
            _polyline(msp, view.place(ring), layer)
        for layer, c, r in s.circles:
            centre = view.place(c)
            msp.add_circle(
                (float(centre[0]), float(centre[1])), r * view.scale, dxfattribs={"layer": layer}
            )
        _place_tags(msp, [(t, view.place(p)) for t, p in s.marks], height, taken)
        x0, _, _, y1 = s.bounds()
        corner = view.place(np.array([x0, y1]))
        text(
            msp,
            f"{_VIEW_NAMES[name]}   scale 1:1",
            (corner[0], corner[1] + 2.5 * height),
            height * 1.4,
            VIEW_TITLES.name,
        )

    # the table and the title block to the right of every view
    from ezdxf import bbox

    box = bbox.extents(msp)
    right = float(box.extmax.x) + 10.0 * height
    top = float(box.extmax.y)
    points = hardpoints(analysis)
    width, tall = _table(msp, points, (right, top), height)
    digest = design_sha256(analysis)
    scales = ", ".join(
        f"{n} 1:1" + (" (isometric projection)" if n == "iso" else "") for n in shapes
    )
    lines = [
        design.name,
        "units: mm   axes ISO 8855 (x forward, y left, z up)",
        f"views: {scales}",
        f"design file {Path(design.source).name}, SHA-256 "
        + (digest[:12] if digest else "(not from a file)"),
        f"plumbrod {__version__}, {today()}",
        "swept envelopes (ENVELOPE_* layers): each moving member over every sweep; keep "
        "bodywork out of them",
        "dashed outlines around zones: their clearance limits",
        "layout geometry only: fits, clearances and strength need a qualified engineer's",
        "check and physical tests; the series' regulations decide if the device is allowed",
    ]
    title_top = top - tall - 6.0 * height
    pitch = 1.8 * height
    for k, line in enumerate(lines):
        text(
            msp,
            line,
            (right + height, title_top - (k + 1) * pitch),
            height * (1.5 if k == 0 else 1.0),
            TITLE_BLOCK.name,
        )
    longest = max(len(line) for line in lines) * 0.8 * height + 2 * height
    w = max(width, longest)
    y_low = title_top - (len(lines) + 0.8) * pitch
    frame = np.array(
        [
            [right, title_top + 0.5 * pitch],
            [right + w, title_top + 0.5 * pitch],
            [right + w, y_low],
            [right, y_low],
        ]
    )
    _polyline(msp, frame, TITLE_BLOCK.name)
    return finish(doc)
