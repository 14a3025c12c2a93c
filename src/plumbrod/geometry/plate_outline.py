"""Cut outline of a rocker plate (bell crank) for the laser or waterjet.

The plate lies in the plane perpendicular to the rocker's pivot axis through the mean
axial position of its pickups.  Each hole (the pivot and one per pickup) gets a boss:
a circle of radius hole radius + edge margin.  The outline is the convex hull of the
bosses, polygonised so that no chord strays more than ``chord_tol_mm`` inside a boss
circle.  Pickups off the plate plane sit on spacers; their axial offsets are reported.

Plate frame: origin on the pivot axis in the plate plane; ``normal`` = unit pivot axis
direction (from ``axis_p0`` to ``axis_p1``); ``u`` points from the origin towards the
first pickup that is off the axis; ``v = normal x u``.  2D coordinates (u, v) are mm.

Cautions: the outline is a starting point for the drawing.  Web widths, hole fits,
bearing or bush seats, edge distances and the plate's strength need a qualified
engineer's check, and the part needs physical testing before use on a car.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import shapely

from plumbrod.geometry.shapes import GeometryError, Plate

__all__ = [
    "Ligament",
    "PlateHole",
    "PlateOutline",
    "plate_outline",
    "quad_segs_for",
]

PIVOT = "pivot"
EDGE = "edge"


def quad_segs_for(radius_mm: float, chord_tol_mm: float) -> int:
    """Fewest segments per quarter circle so that an inscribed polygon of a circle of
    ``radius_mm`` strays at most ``chord_tol_mm`` from it:
    r·(1 − cos(π/(4·q))) <= tol (half the segment angle is π/(4q))."""
    if chord_tol_mm >= radius_mm:
        return 1
    q = math.ceil(math.pi / (4.0 * math.acos(1.0 - chord_tol_mm / radius_mm)))
    while radius_mm * (1.0 - math.cos(math.pi / (4 * q))) > chord_tol_mm:  # rounding
        q += 1
    return max(q, 1)


@dataclass(frozen=True)
class PlateHole:
    """A hole in the plate: ``name`` ("pivot" or the pickup name), ``centre_uv`` (u, v)
    mm, ``diameter_mm``, ``boss_radius_mm`` (hole radius + edge margin) and
    ``axial_offset_mm``: the pickup centre's distance from the plate plane along the
    normal (the spacer; 0 for the pivot)."""

    name: str
    centre_uv: tuple[float, float]
    diameter_mm: float
    boss_radius_mm: float
    axial_offset_mm: float


@dataclass(frozen=True)
class Ligament:
    """The least web of material between two holes, or between a hole and the outline
    edge (``between[1] == "edge"``), mm."""

    between: tuple[str, str]
    width_mm: float


@dataclass(frozen=True, eq=False)
class PlateOutline:
    """A rocker plate's cut profile and its frame.

    ``origin``, ``u``, ``v``, ``normal`` (3,): the plate frame in the frame the pickups
    were given in (design pose); ``outline``: shapely Polygon in (u, v) mm, exterior
    counter-clockwise, without the holes; ``holes``: the holes as circles;
    ``thickness_mm``; ``chord_tol_mm`` and ``quad_segs`` used for the bosses;
    ``area_mm2``: outline area less the hole areas (circles, exact); ``ligaments``:
    every hole-hole and hole-edge web.
    """

    origin: np.ndarray
    u: np.ndarray
    v: np.ndarray
    normal: np.ndarray
    outline: shapely.Polygon
    holes: tuple[PlateHole, ...]
    thickness_mm: float
    chord_tol_mm: float
    quad_segs: int
    area_mm2: float
    ligaments: tuple[Ligament, ...]

    def mass_kg(self, density_kg_m3: float) -> float:
        """Mass of the plate (net area × thickness × density), kg."""
        if not density_kg_m3 > 0:
            raise GeometryError(
                "mass_kg.density_kg_m3", "a density > 0 in kg/m³", repr(density_kg_m3)
            )
        return self.area_mm2 * self.thickness_mm * 1e-9 * density_kg_m3

    def least_ligament(self) -> Ligament:
        """The narrowest web of the plate."""
        return min(self.ligaments, key=lambda lig: lig.width_mm)

    def enclosing_uv(self, chord_tol_mm: float = 0.5) -> np.ndarray:
        """Vertices (n, 2), counter-clockwise, of a convex polygon that contains the
        true outline (hull of polygons circumscribing each boss circle, straying at most
        ``chord_tol_mm`` outside it): a coarse, conservative plate for clearance."""
        if not chord_tol_mm > 0:
            raise GeometryError(
                "enclosing_uv.chord_tol_mm", "a tolerance > 0 in mm", repr(chord_tol_mm)
            )
        radii = np.array([h.boss_radius_mm for h in self.holes])
        r = float(radii.max())
        q = 1
        while r * (1.0 / math.cos(math.pi / (4 * q)) - 1.0) > chord_tol_mm:
            q += 1
        grow = 1.0 / math.cos(math.pi / (4 * q))
        centres = shapely.points(np.array([h.centre_uv for h in self.holes]))
        bosses = shapely.buffer(centres, radii * grow, quad_segs=q)
        hull = shapely.orient_polygons(shapely.convex_hull(shapely.union_all(bosses)))
        return np.asarray(hull.exterior.coords)[:-1]

    def rotation_about_axis(self, angle_deg: np.ndarray | float) -> tuple[np.ndarray, np.ndarray]:
        """The rigid motion (rotation (..., 3, 3), translation (..., 3)) that turns the
        rocker by ``angle_deg`` about its pivot axis (right hand about ``normal``)."""
        angle = np.radians(np.asarray(angle_deg, dtype=float))
        k = self.normal
        kx = np.array([[0.0, -k[2], k[1]], [k[2], 0.0, -k[0]], [-k[1], k[0], 0.0]])
        s = np.sin(angle)[..., None, None]
        c = np.cos(angle)[..., None, None]
        rotation = np.eye(3) + s * kx + (1.0 - c) * (kx @ kx)
        translation = self.origin - rotation @ self.origin
        return rotation, translation

    def vertices_3d(
        self,
        rotation: np.ndarray | None = None,
        translation: np.ndarray | None = None,
        *,
        chord_tol_mm: float | None = None,
    ) -> np.ndarray:
        """Outline vertices (..., n, 3) in 3D at a rocker pose, mm.

        The pose is the rigid motion x -> rotation @ x + translation (batch (...)) from
        the design pose; identity when omitted.  ``chord_tol_mm=None`` gives the cut
        outline's own vertices; a tolerance gives the coarser enclosing polygon of
        :meth:`enclosing_uv` (fewer vertices, faster clearance checks).
        """
        if chord_tol_mm is None:
            uv = np.asarray(self.outline.exterior.coords)[:-1]
        else:
            uv = self.enclosing_uv(chord_tol_mm)
        design = self.origin + uv[:, :1] * self.u + uv[:, 1:] * self.v
        rot = np.eye(3) if rotation is None else np.asarray(rotation, dtype=float)
        shift = np.zeros(3) if translation is None else np.asarray(translation, dtype=float)
        return np.einsum("...ij,nj->...ni", rot, design) + shift[..., None, :]

    def plate(
        self,
        rotation: np.ndarray | None = None,
        translation: np.ndarray | None = None,
        *,
        chord_tol_mm: float | None = 0.5,
    ) -> Plate:
        """The plate as a :class:`~plumbrod.geometry.shapes.Plate` solid at a rocker pose
        (enclosing outline by default, see :meth:`vertices_3d`)."""
        verts = self.vertices_3d(rotation, translation, chord_tol_mm=chord_tol_mm)
        return Plate(verts, self.thickness_mm)


def _vector(item: str, value: object) -> np.ndarray:
    arr = np.asarray(value, dtype=float)
    if arr.shape != (3,) or not np.all(np.isfinite(arr)):
        raise GeometryError(item, "a 3D point (x, y, z) in mm", f"{value!r}")
    return arr


def _read_only(vec: np.ndarray) -> np.ndarray:
    """A read-only float copy of ``vec``."""
    arr = np.array(vec, dtype=float)
    arr.flags.writeable = False
    return arr


def _positive(item: str, value: float, *, allow_zero: bool = False) -> float:
    number = float(value)
    ok = number >= 0 if allow_zero else number > 0
    if not (ok and math.isfinite(number)):
        word = ">= 0" if allow_zero else "> 0"
        raise GeometryError(item, f"a length {word} in mm", repr(value))
    return number


def plate_outline(
    axis_p0: np.ndarray,
    axis_p1: np.ndarray,
    pickups: Mapping[str, np.ndarray],
    *,
    pivot_hole_mm: float,
    pickup_hole_mm: float | Mapping[str, float],
    edge_margin_mm: float,
    thickness_mm: float,
    chord_tol_mm: float = 0.01,
) -> PlateOutline:
    """Cut outline of a rocker plate.

    ``axis_p0``, ``axis_p1``: two points of the pivot axis (3,) mm; ``pickups``: name ->
    pickup centre (3,) mm on the rocker, in the same frame; ``pivot_hole_mm`` and
    ``pickup_hole_mm`` (one value, or one per pickup name): hole diameters;
    ``edge_margin_mm``: material left around each hole; ``thickness_mm``: plate
    thickness; ``chord_tol_mm``: the most a boss polygon may stray inside its circle.

    Raises GeometryError when two holes overlap or touch (naming both) or a value is out
    of range.
    """
    a0 = _vector("plate_outline.axis_p0", axis_p0)
    a1 = _vector("plate_outline.axis_p1", axis_p1)
    axis = a1 - a0
    if np.linalg.norm(axis) <= 0:
        raise GeometryError(
            "plate_outline.axis_p1", "a point distinct from axis_p0", "the same point"
        )
    normal = axis / np.linalg.norm(axis)
    if not pickups:
        raise GeometryError("plate_outline.pickups", "at least one pickup", "none")
    names = list(pickups)
    if PIVOT in names or EDGE in names:
        raise GeometryError(
            "plate_outline.pickups", "pickup names other than 'pivot' and 'edge'", repr(names)
        )
    points = np.stack([_vector(f"plate_outline.pickups[{n!r}]", pickups[n]) for n in names])
    pivot_d = _positive("plate_outline.pivot_hole_mm", pivot_hole_mm)
    if isinstance(pickup_hole_mm, Mapping):
        missing = [n for n in names if n not in pickup_hole_mm]
        if missing:
            raise GeometryError(
                "plate_outline.pickup_hole_mm", "a diameter for every pickup", f"none for {missing}"
            )
        hole_d = [
            _positive(f"plate_outline.pickup_hole_mm[{n!r}]", pickup_hole_mm[n]) for n in names
        ]
    else:
        hole_d = [_positive("plate_outline.pickup_hole_mm", pickup_hole_mm)] * len(names)
    margin = _positive("plate_outline.edge_margin_mm", edge_margin_mm)
    thickness = _positive("plate_outline.thickness_mm", thickness_mm)
    tol = _positive("plate_outline.chord_tol_mm", chord_tol_mm)

    axial = (points - a0) @ normal
    origin = a0 + float(np.mean(axial)) * normal
    rel = points - origin
    offsets = rel @ normal
    radial = rel - offsets[:, None] * normal
    reach = np.linalg.norm(radial, axis=1)
    off_axis = np.flatnonzero(reach > 1e-9 * max(1.0, float(reach.max(initial=0.0))))
    if off_axis.size == 0:
        raise GeometryError(
            "plate_outline.pickups", "a pickup off the pivot axis", "every pickup on the axis"
        )
    u = radial[off_axis[0]] / reach[off_axis[0]]
    v = np.cross(normal, u)
    centres = np.vstack([[0.0, 0.0], np.stack([rel @ u, rel @ v], axis=1)])
    all_names = [PIVOT, *names]
    diameters = np.array([pivot_d, *hole_d])
    boss = diameters / 2.0 + margin

    # ligaments between holes, via shapely.distance on the centre points
    pts = shapely.points(centres)
    i, j = np.triu_indices(len(all_names), k=1)
    webs = shapely.distance(pts[i], pts[j]) - diameters[i] / 2.0 - diameters[j] / 2.0
    for a, b, w in zip(i, j, webs, strict=True):
        if w <= 0.0:
            gap = shapely.distance(pts[a], pts[b])
            raise GeometryError(
                "plate_outline",
                f"holes '{all_names[a]}' and '{all_names[b]}' apart (centre distance above "
                f"the sum of their radii, {(diameters[a] + diameters[b]) / 2.0:.3f} mm)",
                f"centres {gap:.3f} mm apart: the holes overlap or touch",
            )

    q = quad_segs_for(float(boss.max()), tol)
    bosses = shapely.buffer(pts, boss, quad_segs=q)
    outline = shapely.orient_polygons(shapely.convex_hull(shapely.union_all(bosses)))
    edge_webs = shapely.distance(pts, outline.exterior) - diameters / 2.0
    ligaments = [
        Ligament((all_names[a], all_names[b]), float(w)) for a, b, w in zip(i, j, webs, strict=True)
    ]
    ligaments += [Ligament((n, EDGE), float(w)) for n, w in zip(all_names, edge_webs, strict=True)]
    holes = tuple(
        PlateHole(n, (float(c[0]), float(c[1])), float(d), float(r), float(o))
        for n, c, d, r, o in zip(
            all_names, centres, diameters, boss, [0.0, *offsets.tolist()], strict=True
        )
    )
    area = float(outline.area - np.sum(np.pi * diameters**2 / 4.0))
    return PlateOutline(
        origin=_read_only(origin),
        u=_read_only(u),
        v=_read_only(v),
        normal=_read_only(normal),
        outline=outline,
        holes=holes,
        thickness_mm=thickness,
        chord_tol_mm=tol,
        quad_segs=q,
        area_mm2=area,
        ligaments=tuple(ligaments),
    )
