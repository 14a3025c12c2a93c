"""What the drawing sheet shows, as flat 2D shapes per view (no DXF here).

Each view maps a chassis point p (mm, ISO 8855: x forward, y left, z up) to view
coordinates (p·right, p·up), mm, before it is placed on the sheet:

* ``front``: right = +y, up = +z (seen from ahead of the car, its left side on the right);
* ``side``: right = +x, up = +z (seen from the car's right side, nose to the right);
* ``top``: right = +x, up = +y (seen from above, nose to the right);
* ``iso``: seen from (1, 1, 1) (front, left, above), z up; lengths foreshortened.

The swept envelope of a moving member is the union over every solved pose of every sweep
of its projected outline: a rod's capsule projects to a stadium (its projected axis
buffered by the radius), a plate or an element's envelope box to the convex hull of its
projected corners.  Circles are buffered with circumscribed polygons, so the envelope
holds the true outline, never a chord inside it.  shapely builds the unions.  To keep
the outlines light, projected poses are rounded to a :data:`GRID_MM` grid (repeats
dropped), the union is simplified by :data:`SIMPLIFY_MM` and then grown by that
tolerance plus the rounding's reach, so the envelope still holds every pose's outline and
is at most :data:`ENVELOPE_SLACK_MM` larger than the exact union.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import shapely
from numpy.typing import NDArray

from plumbrod.mechanics.analysis import Analysis

__all__ = [
    "VIEW_AXES",
    "Hardpoint",
    "ViewShapes",
    "hardpoints",
    "project",
    "swept_envelopes",
    "view_shapes",
]

Array = NDArray[np.float64]

_ISO_RIGHT = np.array([-1.0, 1.0, 0.0]) / math.sqrt(2.0)
_ISO_UP = np.array([-1.0, -1.0, 2.0]) / math.sqrt(6.0)
VIEW_AXES: dict[str, tuple[Array, Array]] = {
    "front": (np.array([0.0, 1.0, 0.0]), np.array([0.0, 0.0, 1.0])),
    "side": (np.array([1.0, 0.0, 0.0]), np.array([0.0, 0.0, 1.0])),
    "top": (np.array([1.0, 0.0, 0.0]), np.array([0.0, 1.0, 0.0])),
    "iso": (_ISO_RIGHT, _ISO_UP),
}
"""Screen right and screen up (unit vectors, chassis frame) of each view."""

QUAD_SEGS = 8
"""Segments per quarter circle in projected outlines (circumscribed, see module)."""
_CIRCLE_POINTS = 64
GRID_MM = 0.5
SIMPLIFY_MM = 0.25
ENVELOPE_SLACK_MM = SIMPLIFY_MM + 2.0 * SIMPLIFY_MM + GRID_MM * math.sqrt(0.5)
"""How much larger than the exact union a swept envelope may be (mm): the grown
simplification tolerance and the grid rounding (see the module notes)."""
AXIS_OVERHANG_MM = 25.0
"""How far a drawn pivot axis reaches past the rocker's pickups along the axis."""


def project(points: Array, view: str) -> Array:
    """View coordinates (..., 2) of chassis points (..., 3), mm."""
    right, up = VIEW_AXES[view]
    pts = np.asarray(points, dtype=float)
    return np.stack((pts @ right, pts @ up), axis=-1)


def _toward(view: str) -> Array:
    right, up = VIEW_AXES[view]
    return np.cross(right, up)


def _stadium(a: Array, b: Array, radius: float) -> shapely.Geometry:
    """Projected capsules (batch): segments a-b (..., 2) buffered by ``radius``,
    circumscribing the true round ends."""
    grow = radius / math.cos(math.pi / (4 * QUAD_SEGS))
    lines = shapely.linestrings(np.stack((a, b), axis=-2).reshape(-1, 2, 2))
    return shapely.buffer(lines, grow, quad_segs=QUAD_SEGS)


def _hulls(points: Array) -> shapely.Geometry:
    """Convex hulls (batch) of point sets (B, n, 2)."""
    return shapely.convex_hull(shapely.multipoints(points))


@dataclass(frozen=True)
class Hardpoint:
    """One distinct hardpoint position: short ``tag`` (P1, P2, ...), ``names`` of
    everything there, ``body`` it sits on (the first name's), ``position_mm``."""

    tag: str
    names: tuple[str, ...]
    body: str
    position_mm: tuple[float, float, float]


def hardpoints(analysis: Analysis) -> list[Hardpoint]:
    """The design's hardpoints at the design pose: every pickup, every wishbone pivot,
    ball joint and tie-rod end, every wheel centre.  Points at one position share a
    tag.  The solver's helper points (slider guides, rocker axis ends) are not
    hardpoints."""
    design = analysis.design
    found: list[tuple[str, str, tuple[float, float, float]]] = []
    for corner in design.corners:
        found.append((f"{corner.name} wheel centre", corner.upright, corner.wheel_centre_mm))
        w = corner.wishbones
        if w is None:
            continue
        for side in ("upper", "lower"):
            body = f"{corner.name}.{side}"
            found.append((f"{body}_front pivot", "chassis", getattr(w, f"{side}_front_mm")))
            found.append((f"{body}_rear pivot", "chassis", getattr(w, f"{side}_rear_mm")))
            found.append((f"{body} ball joint", corner.upright, getattr(w, f"{side}_outer_mm")))
        if w.tie_rod_inner_mm is not None and w.tie_rod_outer_mm is not None:
            found.append((f"{corner.name} tie rod inner", "chassis", w.tie_rod_inner_mm))
            found.append((f"{corner.name} tie rod outer", corner.upright, w.tie_rod_outer_mm))
    for key, pickup in design.pickups.items():
        found.append((key, pickup.body, pickup.position_mm))
    groups: dict[tuple[float, float, float], list[tuple[str, str]]] = {}
    for name, body, pos in found:
        position = (float(pos[0]), float(pos[1]), float(pos[2]))
        entry = groups.setdefault(position, [])
        if name not in [n for n, _ in entry]:
            entry.append((name, body))
    return [
        Hardpoint(f"P{k + 1}", tuple(n for n, _ in entry), entry[0][1], position)
        for k, (position, entry) in enumerate(groups.items())
    ]


@dataclass
class ViewShapes:
    """The 2D shapes of one view (view coordinates, mm) by layer kind.

    ``lines``: (layer, a, b); ``polygons``: (layer, closed ring (n, 2) without the first
    point repeated); ``circles``: (layer, centre, radius); ``marks``: (tag, point).
    """

    view: str
    lines: list[tuple[str, Array, Array]] = field(default_factory=list)
    polygons: list[tuple[str, Array]] = field(default_factory=list)
    circles: list[tuple[str, Array, float]] = field(default_factory=list)
    marks: list[tuple[str, Array]] = field(default_factory=list)

    def add_geometry(self, layer: str, geom: shapely.Geometry) -> None:
        """Every ring (exteriors and holes) of a polygonal geometry as closed outlines."""
        for poly in getattr(geom, "geoms", [geom]):
            if poly.is_empty or poly.geom_type != "Polygon":
                continue
            for ring in (poly.exterior, *poly.interiors):
                coords = np.asarray(ring.coords)[:-1]
                if len(coords) >= 3:
                    self.polygons.append((layer, coords))

    def bounds(self) -> tuple[float, float, float, float]:
        """(xmin, ymin, xmax, ymax) of everything drawn."""
        pts = [a for _, a, _ in self.lines] + [b for _, _, b in self.lines]
        pts += [p for _, ring in self.polygons for p in ring]
        pts += [p for _, p in self.marks]
        for _, c, r in self.circles:
            pts += [c - r, c + r]
        arr = np.array(pts, dtype=float).reshape(-1, 2)
        low, high = arr.min(axis=0), arr.max(axis=0)
        return (float(low[0]), float(low[1]), float(high[0]), float(high[1]))


def _poses(analysis: Analysis) -> tuple[Array, Array, Array]:
    """Points (N, P, 3), body rotations (N, nb, 3, 3) and translations (N, nb, 3) of every
    solved pose of every sweep, stacked."""
    kins = [res.solved.kin for res in analysis.sweeps.values()]
    return (
        np.concatenate([k.points for k in kins]),
        np.concatenate([k.rotation for k in kins]),
        np.concatenate([k.translation for k in kins]),
    )


def _rotation_xyz(angles_deg: tuple[float, float, float]) -> Array:
    ax, ay, az = np.radians(angles_deg)
    rx = np.array([[1, 0, 0], [0, np.cos(ax), -np.sin(ax)], [0, np.sin(ax), np.cos(ax)]])
    ry = np.array([[np.cos(ay), 0, np.sin(ay)], [0, 1, 0], [-np.sin(ay), 0, np.cos(ay)]])
    rz = np.array([[np.cos(az), -np.sin(az), 0], [np.sin(az), np.cos(az), 0], [0, 0, 1]])
    return rz @ ry @ rx


_BOX_SIGNS = np.array([[i, j, k] for i in (-1, 1) for j in (-1, 1) for k in (-1, 1)], dtype=float)


def member_outlines_3d(analysis: Analysis) -> dict[str, tuple[str, Array, float]]:
    """Every moving member's 3D outline at every pose, by member label.

    Value: (kind, points, radius): ``"rod"`` with points (N, 2, 3) (capsule axis ends,
    lengthened by the rod-end allowance) and the rod radius; ``"plate"`` or ``"box"``
    with points (N, k, 3) whose convex hull is the solid (radius 0)."""
    from plumbrod.mechanics.plates import rocker_outlines

    design, link = analysis.design, analysis.link
    pts, rot, trans = _poses(analysis)
    out: dict[str, tuple[str, Array, float]] = {}
    for rod in design.rods:
        a, b = pts[:, link.point(rod.end_a)], pts[:, link.point(rod.end_b)]
        axis = (b - a) / np.linalg.norm(b - a, axis=-1, keepdims=True)
        grow = rod.rod_end_allowance_mm
        ends = np.stack((a - grow * axis, b + grow * axis), axis=1)
        out[f"ROD_{rod.name}"] = ("rod", ends, rod.od_mm / 2.0)
    for name, outline in rocker_outlines(design).items():
        body = link.body(name)
        verts = outline.vertices_3d(rot[:, body], trans[:, body], chord_tol_mm=0.25)
        normal = np.einsum("nij,j->ni", rot[:, body], outline.normal)[:, None, :]
        half = outline.thickness_mm / 2.0
        out[f"ROCKER_{name}"] = (
            "plate",
            np.concatenate((verts - half * normal, verts + half * normal), axis=1),
            0.0,
        )
    for element in design.elements:
        env = element.envelope
        if env is None:
            continue
        body = link.body(element.name)
        r = rot[:, body] @ _rotation_xyz(env.rotation_deg)
        centre = np.einsum("nij,j->ni", rot[:, body], np.array(env.centre_mm)) + trans[:, body]
        local = _BOX_SIGNS * (np.array(env.size_mm) / 2.0)
        corners = centre[:, None, :] + np.einsum("nij,kj->nki", r, local)
        out[f"ELEMENT_{element.name}"] = ("box", corners, 0.0)
    return out


def outline_2d(kind: str, points: Array, radius: float, view: str) -> shapely.Geometry:
    """Projected outlines (one per pose) of a member's 3D outline in a view."""
    flat = project(points, view)
    if kind == "rod":
        return _stadium(flat[:, 0], flat[:, 1], radius)
    return _hulls(flat)


def envelope_2d(kind: str, points: Array, radius: float, view: str) -> shapely.Geometry:
    """The swept envelope of one member in a view: the union of its projected outlines
    over every pose, rounded, simplified and grown so that it holds every one of them."""
    flat = project(points, view)
    rounded = np.round(flat / GRID_MM) * GRID_MM
    unique = np.unique(rounded.reshape(len(rounded), -1), axis=0).reshape(-1, *flat.shape[1:])
    if kind == "rod":
        outlines = _stadium(unique[:, 0], unique[:, 1], radius)
    else:
        outlines = _hulls(unique)
    union = shapely.union_all(outlines)
    simple = shapely.simplify(union, SIMPLIFY_MM, preserve_topology=True)
    grow = 2.0 * SIMPLIFY_MM + GRID_MM * math.sqrt(0.5)
    return shapely.buffer(simple, grow, quad_segs=2, join_style="mitre", mitre_limit=2.0)


def swept_envelopes(analysis: Analysis, view: str) -> dict[str, shapely.Geometry]:
    """The swept envelope of every moving member in a view (shapely geometry, mm)."""
    return {
        label: envelope_2d(kind, points, radius, view)
        for label, (kind, points, radius) in member_outlines_3d(analysis).items()
    }


def _cylinder_outline(
    p0: Array, p1: Array, radius: float, view: str
) -> tuple[Array, float] | shapely.Geometry:
    """A cylinder seen in a view: (centre, radius) when seen along its axis, else the
    hull of its two end circles."""
    axis = p1 - p0
    length = float(np.linalg.norm(axis))
    n = axis / length
    if abs(float(n @ _toward(view))) > 1.0 - 1e-9:
        return project((p0 + p1) / 2.0, view), radius
    helper = np.array([0.0, 0.0, 1.0]) if abs(n[2]) < 0.9 else np.array([1.0, 0.0, 0.0])
    a = np.cross(helper, n)
    a /= np.linalg.norm(a)
    b = np.cross(n, a)
    t = np.linspace(0.0, 2.0 * np.pi, _CIRCLE_POINTS, endpoint=False)
    ring = radius * (np.cos(t)[:, None] * a + np.sin(t)[:, None] * b)
    pts = np.concatenate((p0 + ring, p1 + ring))
    return shapely.convex_hull(shapely.multipoints(project(pts, view)))


def _zone_outline(solid: object, view: str) -> tuple[Array, float] | shapely.Geometry:
    from plumbrod.geometry.shapes import Box, Cylinder, Prism

    if isinstance(solid, Box):
        assert solid.rotation is not None
        corners = solid.centre + (_BOX_SIGNS * solid.half_size) @ solid.rotation.T
        return shapely.convex_hull(shapely.multipoints(project(corners, view)))
    if isinstance(solid, Cylinder):
        return _cylinder_outline(solid.p0, solid.p1, float(solid.radius), view)
    assert isinstance(solid, Prism)
    pieces = []
    for poly in solid.pieces:
        pts = np.concatenate(
            [
                poly[:, :1] * solid.u + poly[:, 1:] * solid.v + d * solid.w
                for d in (solid.depth_min, solid.depth_max)
            ]
        )
        pieces.append(shapely.convex_hull(shapely.multipoints(project(pts, view))))
    return shapely.union_all(pieces)


def view_shapes(
    analysis: Analysis, view: str, layers: dict[str, str], marks: list[Hardpoint]
) -> ViewShapes:
    """Everything one view shows, in view coordinates (mm).

    ``layers`` maps each kind (rods, guides, axes, arms, plates, suspension, tyres,
    zones, limits, elements, ground) to a layer name; envelopes go on
    ``ENVELOPE_<member>`` layers.
    """
    from plumbrod.clearance.survey import zone_solids
    from plumbrod.mechanics.plates import rocker_outlines

    design, link = analysis.design, analysis.link
    shapes = ViewShapes(view)
    guides = set(analysis.routes.guides)
    toward = _toward(view)

    # swept envelopes first, so the members at the design pose are drawn over them
    for label, geom in swept_envelopes(analysis, view).items():
        shapes.add_geometry(f"ENVELOPE_{label}", geom)

    for rod in design.rods:
        a = project(np.array(design.pickups[rod.end_a].position_mm), view)
        b = project(np.array(design.pickups[rod.end_b].position_mm), view)
        shapes.lines.append((layers["guides" if rod.name in guides else "rods"], a, b))

    outlines = rocker_outlines(design)
    for rocker in design.rockers:
        a0, a1 = np.array(rocker.axis_a_mm), np.array(rocker.axis_b_mm)
        axis = (a1 - a0) / np.linalg.norm(a1 - a0)
        pickups = [
            np.array(p.position_mm) for p in design.pickups.values() if p.body == rocker.name
        ]
        along = [float((p - a0) @ axis) for p in pickups] + [0.0, float((a1 - a0) @ axis)]
        lo, hi = min(along) - AXIS_OVERHANG_MM, max(along) + AXIS_OVERHANG_MM
        ends = project(np.array([a0 + lo * axis, a0 + hi * axis]), view)
        if abs(float(axis @ toward)) > 1.0 - 1e-6:  # seen end on: a centre cross
            c, arm = ends[0], AXIS_OVERHANG_MM / 2.0
            across, up = np.array([arm, 0.0]), np.array([0.0, arm])
            shapes.lines.append((layers["axes"], c - across, c + across))
            shapes.lines.append((layers["axes"], c - up, c + up))
        else:
            shapes.lines.append((layers["axes"], ends[0], ends[1]))
        for p in pickups:
            foot = a0 + float((p - a0) @ axis) * axis
            if np.linalg.norm(p - foot) > 1e-9:
                shapes.lines.append((layers["arms"], project(foot, view), project(p, view)))
        outline = outlines.get(rocker.name)
        if outline is not None:
            verts = outline.vertices_3d()
            half = outline.thickness_mm / 2.0 * outline.normal
            faces = np.concatenate((verts - half, verts + half))
            shapes.add_geometry(
                layers["plates"], shapely.convex_hull(shapely.multipoints(project(faces, view)))
            )
            if abs(float(outline.normal @ toward)) > 1.0 - 1e-6:
                for hole in outline.holes:
                    centre = (
                        outline.origin
                        + hole.centre_uv[0] * outline.u
                        + hole.centre_uv[1] * outline.v
                    )
                    shapes.circles.append(
                        (layers["plates"], project(centre, view), hole.diameter_mm / 2.0)
                    )

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
        for start, end in dict.fromkeys(segments):
            if start != end:
                shapes.lines.append(
                    (
                        layers["suspension"],
                        project(np.array(start), view),
                        project(np.array(end), view),
                    )
                )

    # tyres at the design pose: a circle seen along the spin axis, else a rectangle
    if design.plane != "side" or view == "side":
        for k, corner in enumerate(design.corners):
            centre = np.array(corner.wheel_centre_mm)
            spin = np.asarray(link.spin_axis[k], dtype=float)
            spin = spin / np.linalg.norm(spin)
            half_width = corner.tyre_width_mm / 2.0
            drawn = _cylinder_outline(
                centre - half_width * spin, centre + half_width * spin, corner.tyre_radius_mm, view
            )
            if isinstance(drawn, tuple):
                shapes.circles.append((layers["tyres"], drawn[0], drawn[1]))
            else:
                shapes.add_geometry(layers["tyres"], drawn)

    # keep-out zones and their clearance limits (the outline grown by the limit)
    for solid, limit in zone_solids(analysis).values():
        drawn = _zone_outline(solid, view)
        if isinstance(drawn, tuple):
            shapes.circles.append((layers["zones"], drawn[0], drawn[1]))
            if limit > 0:
                shapes.circles.append((layers["limits"], drawn[0], drawn[1] + limit))
        else:
            shapes.add_geometry(layers["zones"], drawn)
            if limit > 0:
                shapes.add_geometry(layers["limits"], drawn.buffer(limit, quad_segs=QUAD_SEGS))

    # each element's envelope at the design pose
    for element in design.elements:
        env = element.envelope
        if env is None:
            continue
        corners = (
            np.array(env.centre_mm)
            + (_BOX_SIGNS * (np.array(env.size_mm) / 2.0)) @ _rotation_xyz(env.rotation_deg).T
        )
        shapes.add_geometry(
            layers["elements"], shapely.convex_hull(shapely.multipoints(project(corners, view)))
        )

    for hp in marks:
        shapes.marks.append((hp.tag, project(np.array(hp.position_mm), view)))

    if view in ("front", "side"):  # the ground line z = 0 under everything
        x0, _, x1, _ = shapes.bounds()
        pad = 0.05 * (x1 - x0) + 20.0
        shapes.lines.append(
            (layers["ground"], np.array([x0 - pad, 0.0]), np.array([x1 + pad, 0.0]))
        )
    return shapes
