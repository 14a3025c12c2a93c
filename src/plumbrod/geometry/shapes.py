"""Solids for clearance checks: rods, rocker plates and chassis keep-out zones.

Every solid is expressed in one frame, the chassis frame (ISO 8855 axes: x forward,
y left, z up; mm).  Array fields broadcast over a leading batch of poses: a rod swept
through 2000 poses is one :class:`Capsule` whose end points have shape ``(2000, 3)``;
a zone fixed to the chassis has batch shape ``()``.

Kinds:

- :class:`Capsule`: a rod, a segment ``p0``-``p1`` grown by ``radius``.
- :class:`Box`: a rotated box (``rotation`` maps box axes into the chassis frame).
- :class:`Cylinder`: a finite capped cylinder (a chassis tube, or a tyre envelope that
  moves with the wheel, then ``p0``/``p1`` carry the pose batch).
- :class:`Prism`: a simple polygon drawn in a view plane, extruded between two depths;
  it may be non-convex and is split into convex pieces once, at construction.  Prisms
  are fixed to the chassis (batch shape ``()``).
- :class:`Plate`: a flat convex polygon in 3D thickened symmetrically (a rocker plate).

Bad inputs raise :class:`GeometryError` (a ``ValueError``) saying "expected X, got Y".
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

import numpy as np
import shapely

from plumbrod.errors import PlumbrodError

__all__ = [
    "VIEW_PLANES",
    "Box",
    "Capsule",
    "Cylinder",
    "GeometryError",
    "Plate",
    "Prism",
    "Solid",
]

#: View planes of a :class:`Prism`: (u axis, v axis, extrusion axis) in the chassis frame.
VIEW_PLANES: dict[str, tuple[tuple[float, float, float], ...]] = {
    "front": ((0.0, 1.0, 0.0), (0.0, 0.0, 1.0), (1.0, 0.0, 0.0)),  # (y, z), along x
    "side": ((1.0, 0.0, 0.0), (0.0, 0.0, 1.0), (0.0, 1.0, 0.0)),  # (x, z), along y
    "top": ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)),  # (x, y), along z
}

_ROTATION_TOL = 1e-9  # orthonormality of a box rotation
_PLANARITY_TOL = 1e-6  # plate vertices off their plane, as a fraction of the plate size


class GeometryError(PlumbrodError, ValueError):
    """A solid or plate that cannot be built from the values given.

    Attributes: ``item`` (the argument or part, e.g. ``"Capsule.radius"``),
    ``expected`` and ``got``.
    """

    def __init__(self, item: str, expected: str, got: str) -> None:
        self.item = item
        self.expected = expected
        self.got = got
        super().__init__(str(self))

    def __str__(self) -> str:
        return f"{self.item}: expected {self.expected}, got {self.got}"


def _frozen(array: np.ndarray) -> np.ndarray:
    out = np.array(array, dtype=float, copy=True)
    out.flags.writeable = False
    return out


def _float_array(item: str, value: object) -> np.ndarray:
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError) as exc:
        raise GeometryError(item, "numbers", repr(value)) from exc
    if not np.all(np.isfinite(array)):
        raise GeometryError(item, "finite numbers", "NaN or infinity")
    return array


def _points(item: str, value: object) -> np.ndarray:
    array = _float_array(item, value)
    if array.ndim < 1 or array.shape[-1] != 3:
        raise GeometryError(item, "an array of shape (..., 3) in mm", f"shape {array.shape}")
    return array


def _positive(item: str, value: object, *, allow_zero: bool = False) -> np.ndarray:
    array = _float_array(item, value)
    bad = array < 0 if allow_zero else array <= 0
    if np.any(bad):
        word = "values >= 0" if allow_zero else "values > 0"
        raise GeometryError(item, f"{word} in mm", f"{array[bad].ravel()[0]!r}")
    return array


def _batch_shape(item: str, *shapes: tuple[int, ...]) -> tuple[int, ...]:
    try:
        return np.broadcast_shapes(*shapes)
    except ValueError as exc:
        listed = ", ".join(str(s) for s in shapes)
        raise GeometryError(item, "batch shapes that broadcast together", listed) from exc


@dataclass(frozen=True, eq=False)
class Capsule:
    """A rod: the segment ``p0``-``p1`` grown by ``radius`` (mm), e.g. OD/2 of the tube.

    ``p0``, ``p1``: (..., 3) mm; ``radius``: (...) mm, >= 0 (0 gives a bare segment,
    ``p0 == p1`` a ball).
    """

    p0: np.ndarray
    p1: np.ndarray
    radius: np.ndarray | float

    def __post_init__(self) -> None:
        p0 = _points("Capsule.p0", self.p0)
        p1 = _points("Capsule.p1", self.p1)
        radius = _positive("Capsule.radius", self.radius, allow_zero=True)
        _batch_shape("Capsule", p0.shape[:-1], p1.shape[:-1], radius.shape)
        object.__setattr__(self, "p0", _frozen(p0))
        object.__setattr__(self, "p1", _frozen(p1))
        object.__setattr__(self, "radius", _frozen(radius))

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Broadcast batch shape of the fields."""
        return np.broadcast_shapes(self.p0.shape[:-1], self.p1.shape[:-1], np.shape(self.radius))


@dataclass(frozen=True, eq=False)
class Box:
    """A box: ``centre`` (..., 3) mm, ``half_size`` (..., 3) mm along the box axes,
    ``rotation`` (..., 3, 3) whose columns are the box axes in the chassis frame
    (a proper rotation; identity when omitted)."""

    centre: np.ndarray
    half_size: np.ndarray
    rotation: np.ndarray | None = None

    def __post_init__(self) -> None:
        centre = _points("Box.centre", self.centre)
        half = _positive("Box.half_size", _points("Box.half_size", self.half_size))
        rotation = (
            np.eye(3) if self.rotation is None else _float_array("Box.rotation", self.rotation)
        )
        if rotation.ndim < 2 or rotation.shape[-2:] != (3, 3):
            raise GeometryError(
                "Box.rotation", "an array of shape (..., 3, 3)", f"shape {rotation.shape}"
            )
        gram = np.swapaxes(rotation, -1, -2) @ rotation
        off = float(np.max(np.abs(gram - np.eye(3)))) if gram.size else 0.0
        if off > _ROTATION_TOL:
            raise GeometryError(
                "Box.rotation", "an orthonormal matrix (R^T R = I)", f"a deviation of {off:.3g}"
            )
        if np.any(np.linalg.det(rotation) <= 0):
            raise GeometryError(
                "Box.rotation", "a proper rotation (det = +1)", "a reflection (det = -1)"
            )
        _batch_shape("Box", centre.shape[:-1], half.shape[:-1], rotation.shape[:-2])
        object.__setattr__(self, "centre", _frozen(centre))
        object.__setattr__(self, "half_size", _frozen(half))
        object.__setattr__(self, "rotation", _frozen(rotation))

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Broadcast batch shape of the fields."""
        assert self.rotation is not None
        return np.broadcast_shapes(
            self.centre.shape[:-1], self.half_size.shape[:-1], self.rotation.shape[:-2]
        )


@dataclass(frozen=True, eq=False)
class Cylinder:
    """A finite capped cylinder: axis from ``p0`` to ``p1`` (..., 3) mm, ``radius`` (...)
    mm.  A tyre envelope moving with the wheel carries the pose batch in ``p0``/``p1``."""

    p0: np.ndarray
    p1: np.ndarray
    radius: np.ndarray | float

    def __post_init__(self) -> None:
        p0 = _points("Cylinder.p0", self.p0)
        p1 = _points("Cylinder.p1", self.p1)
        radius = _positive("Cylinder.radius", self.radius)
        _batch_shape("Cylinder", p0.shape[:-1], p1.shape[:-1], radius.shape)
        length = np.linalg.norm(p1 - p0, axis=-1)
        if np.any(length <= 0):
            raise GeometryError(
                "Cylinder.p1", "an end point distinct from p0", "a zero-length axis"
            )
        object.__setattr__(self, "p0", _frozen(p0))
        object.__setattr__(self, "p1", _frozen(p1))
        object.__setattr__(self, "radius", _frozen(radius))

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Broadcast batch shape of the fields."""
        return np.broadcast_shapes(self.p0.shape[:-1], self.p1.shape[:-1], np.shape(self.radius))


def _convex_pieces(polygon: shapely.Polygon) -> tuple[np.ndarray, ...]:
    """Split a simple polygon into convex pieces (counter-clockwise vertex arrays).

    Constrained Delaunay triangles, then greedy merging of neighbours while the union
    stays convex (fewer, larger pieces make distance queries cheaper).
    """
    area_tol = 1e-9 * max(polygon.area, 1.0)
    if abs(polygon.convex_hull.area - polygon.area) <= area_tol:
        pieces = [polygon]
    else:
        triangles = shapely.get_parts(shapely.constrained_delaunay_triangles(polygon))
        pieces = [t for t in triangles if t.area > area_tol]
        merged = True
        while merged:
            merged = False
            for i in range(len(pieces)):
                for j in range(i + 1, len(pieces)):
                    shared = pieces[i].boundary.intersection(pieces[j].boundary)
                    if shared.length <= 0:
                        continue
                    union = shapely.union(pieces[i], pieces[j])
                    if union.geom_type != "Polygon":
                        continue
                    if abs(union.convex_hull.area - union.area) <= area_tol:
                        pieces[i] = union
                        del pieces[j]
                        merged = True
                        break
                if merged:
                    break
    out = []
    for piece in pieces:
        piece = shapely.orient_polygons(piece.simplify(0.0))
        coords = np.asarray(piece.exterior.coords)[:-1]
        out.append(_frozen(coords))
    return tuple(out)


@dataclass(frozen=True, eq=False)
class Prism:
    """A keep-out zone drawn as a polygon in a view plane and extruded.

    ``polygon_2d``: (m, 2) mm, the vertices in order (closing vertex optional), a simple
    polygon (non-convex allowed, no self-intersection, no holes), in the plane's
    coordinates: ``"front"`` (y, z) extruded along x, ``"side"`` (x, z) along y,
    ``"top"`` (x, y) along z.  ``depth_min`` < ``depth_max`` (mm) bound the extrusion
    along that axis.  Fixed to the chassis (batch shape ``()``).

    ``pieces`` holds the convex pieces (counter-clockwise (k, 2) arrays) used by the
    distance code; ``u``, ``v``, ``w`` are the plane axes and extrusion axis.
    """

    polygon_2d: np.ndarray
    plane: Literal["front", "side", "top"]
    depth_min: float
    depth_max: float
    pieces: tuple[np.ndarray, ...] = field(init=False, repr=False)

    def __post_init__(self) -> None:
        if self.plane not in VIEW_PLANES:
            raise GeometryError("Prism.plane", "one of 'front', 'side', 'top'", repr(self.plane))
        poly = _float_array("Prism.polygon_2d", self.polygon_2d)
        if poly.ndim != 2 or poly.shape[1] != 2:
            raise GeometryError(
                "Prism.polygon_2d", "an array of shape (m, 2) in mm", f"shape {poly.shape}"
            )
        if len(poly) > 1 and np.array_equal(poly[0], poly[-1]):
            poly = poly[:-1]
        if len(poly) < 3:
            raise GeometryError("Prism.polygon_2d", "at least 3 vertices", f"{len(poly)}")
        polygon = shapely.Polygon(poly)
        if not polygon.is_valid or polygon.area <= 0:
            reason = shapely.is_valid_reason(polygon)
            raise GeometryError(
                "Prism.polygon_2d",
                "a simple polygon (no self-intersection)",
                f"an invalid polygon ({reason})",
            )
        lo = float(_float_array("Prism.depth_min", self.depth_min))
        hi = float(_float_array("Prism.depth_max", self.depth_max))
        if not lo < hi:
            raise GeometryError(
                "Prism.depth_max", f"a depth greater than depth_min = {lo}", f"{hi}"
            )
        object.__setattr__(self, "polygon_2d", _frozen(poly))
        object.__setattr__(self, "depth_min", lo)
        object.__setattr__(self, "depth_max", hi)
        object.__setattr__(self, "pieces", _convex_pieces(polygon))

    @property
    def u(self) -> np.ndarray:
        """First in-plane axis (chassis frame)."""
        return np.array(VIEW_PLANES[self.plane][0])

    @property
    def v(self) -> np.ndarray:
        """Second in-plane axis (chassis frame)."""
        return np.array(VIEW_PLANES[self.plane][1])

    @property
    def w(self) -> np.ndarray:
        """Extrusion axis (chassis frame); depths are measured along it."""
        return np.array(VIEW_PLANES[self.plane][2])

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Always ``()``: a prism is fixed to the chassis."""
        return ()


@dataclass(frozen=True, eq=False)
class Plate:
    """A rocker plate: a flat convex polygon thickened symmetrically.

    ``vertices``: (..., n, 3) mm, n >= 3, coplanar (within 1e-6 of the plate size), in
    order around the polygon, convex.  ``thickness``: (...) mm > 0, split equally on
    both sides of the vertices' plane.

    Derived (per pose): ``origin`` (..., 3), the vertex mean; ``axes`` (..., 3, 3) with
    rows u, v, w: u along the first edge, w the unit normal by Newell's method (the
    vertices run counter-clockwise about it), v = w x u; ``polygon_uv`` (..., n, 2),
    the vertices in (u, v) plate coordinates.
    """

    vertices: np.ndarray
    thickness: np.ndarray | float
    origin: np.ndarray = field(init=False, repr=False)
    axes: np.ndarray = field(init=False, repr=False)
    polygon_uv: np.ndarray = field(init=False, repr=False)

    def __post_init__(self) -> None:
        verts = _float_array("Plate.vertices", self.vertices)
        if verts.ndim < 2 or verts.shape[-1] != 3 or verts.shape[-2] < 3:
            raise GeometryError(
                "Plate.vertices", "an array of shape (..., n, 3), n >= 3", f"shape {verts.shape}"
            )
        thickness = _positive("Plate.thickness", self.thickness)
        _batch_shape("Plate", verts.shape[:-2], thickness.shape)
        origin = verts.mean(axis=-2)
        nxt = np.roll(verts, -1, axis=-2)
        newell = np.cross(verts - origin[..., None, :], nxt - origin[..., None, :]).sum(axis=-2)
        twice_area = np.linalg.norm(newell, axis=-1)
        size = np.max(np.linalg.norm(verts - origin[..., None, :], axis=-1), axis=-1)
        if np.any(twice_area <= 1e-12 * np.maximum(size, 1.0) ** 2):
            raise GeometryError(
                "Plate.vertices",
                "a polygon with non-zero area",
                "collinear, coincident or crossing vertices",
            )
        w = newell / twice_area[..., None]
        edge = nxt[..., 0, :] - verts[..., 0, :]
        edge = edge - np.sum(edge * w, axis=-1, keepdims=True) * w
        edge_len = np.linalg.norm(edge, axis=-1)
        if np.any(edge_len <= 0):
            raise GeometryError(
                "Plate.vertices", "distinct first and second vertices", "a zero-length first edge"
            )
        u = edge / edge_len[..., None]
        v = np.cross(w, u)
        rel = verts - origin[..., None, :]
        off_plane = np.abs(np.einsum("...nk,...k->...n", rel, w))
        worst = np.max(off_plane / np.maximum(size, 1.0)[..., None])
        if worst > _PLANARITY_TOL:
            raise GeometryError(
                "Plate.vertices",
                "coplanar vertices",
                f"a vertex {worst:.3g} x plate size off the plane",
            )
        uv = np.stack(
            [np.einsum("...nk,...k->...n", rel, u), np.einsum("...nk,...k->...n", rel, v)],
            axis=-1,
        )
        e = np.roll(uv, -1, axis=-2) - uv
        e_next = np.roll(e, -1, axis=-2)
        turn_cross = e[..., 0] * e_next[..., 1] - e[..., 1] * e_next[..., 0]
        turn_dot = np.sum(e * e_next, axis=-1)
        scale2 = np.maximum(size, 1.0)[..., None] ** 2
        winding = np.sum(np.arctan2(turn_cross, turn_dot), axis=-1)
        if np.any(turn_cross < -1e-9 * scale2) or np.any(np.abs(winding - 2 * np.pi) > 1e-6):
            raise GeometryError(
                "Plate.vertices",
                "a convex polygon with vertices in order",
                "a non-convex or self-intersecting polygon",
            )
        object.__setattr__(self, "vertices", _frozen(verts))
        object.__setattr__(self, "thickness", _frozen(thickness))
        object.__setattr__(self, "origin", _frozen(origin))
        object.__setattr__(self, "axes", _frozen(np.stack([u, v, w], axis=-2)))
        object.__setattr__(self, "polygon_uv", _frozen(uv))

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Broadcast batch shape of the fields."""
        return np.broadcast_shapes(self.vertices.shape[:-2], np.shape(self.thickness))


#: Any solid the distance code accepts.
Solid = Capsule | Box | Cylinder | Prism | Plate
