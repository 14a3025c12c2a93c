"""Clearance: the least distance between moving solids and keep-out zones over every pose
of every sweep (DESIGN §5 item 10).

Moving solids: every rod as a capsule (radius OD/2, lengthened at each end by its
``rod_end_allowance_mm``), every rocker with plate data as a plate, every element with
an ``envelope`` as a box moving with it. Zones: the design's boxes, cylinders and
prisms, fixed to the chassis, and one tyre envelope per corner (a cylinder of the tyre's
radius and width about the wheel's spin axis, moving with the upright). Pairs: each
solid against each zone, and solids against each other unless they share a body (a rod
and the rocker it drives, two rods on one rocker). A solid with a pickup inside a zone
at the design pose is not checked against that zone (that end is meant to be there); the
report lists such pairs. A side-view planar design has no tyre envelopes: its parts all
lie in one plane and the tyres stand beside it. Distances are exact for separated pairs
(:mod:`plumbrod.clearance.distance`); negative values are interference depths.

Between the poses: a pair that comes within its limit plus :data:`REFINE_MARGIN_MM` of it
(or within the largest distance a solid moves between neighbouring poses, if more) is
searched between the poses next to its closest one, re-solving the linkage at trial
driver values (:mod:`plumbrod.clearance.between_poses`), so its figure is the least
distance over the continuous sweep to 0.01 mm (``ClearancePair.between_poses``).  Other
pairs keep the least distance over the poses; they cannot come within their limit
between poses.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal, cast

import numpy as np
from numpy.typing import NDArray

from plumbrod.clearance.between_poses import Request, defining_points, refine_pairs
from plumbrod.clearance.distance import least_separations, separation
from plumbrod.design.model import Vec3
from plumbrod.geometry.shapes import Box, Capsule, Cylinder, Plate, Prism, Solid
from plumbrod.kinematics.linkage import Kinematics
from plumbrod.kinematics.sweeps import describe_values
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.plates import rocker_outlines

__all__ = ["ClearancePair", "ClearanceReport", "clearance_report", "solids_at", "zone_solids"]

Array = NDArray[np.float64]


FAR_MM = 50.0
"""Pairs whose swept bounding boxes stay this much beyond their limit apart are not
measured exactly: their distance is reported as that lower bound ("more than")."""

REFINE_MARGIN_MM = 50.0
"""Pairs whose least distance over the poses is within their limit plus this (mm) are
refined between the poses."""


@dataclass(frozen=True)
class ClearancePair:
    """The least distance of one pair over every pose, and where it happens.

    ``exact``: ``distance_mm`` is a measured surface-to-surface distance of the two
    solids at a solved pose (the driver values ``at``), with its closest points.  It is
    False for a far pair: ``distance_mm`` is then a lower bound and the pose and points
    are not known (``pose`` = -1).  ``between_poses``: the pair was searched between its
    neighbouring sweep poses, so ``distance_mm`` is the least distance over the
    continuous sweep (to 0.01 mm); otherwise it is the least over the sweep poses,
    ``pose_distance_mm``.  ``pose`` is the sweep pose where the poses came closest.
    """

    a: str
    b: str
    distance_mm: float
    limit_mm: float
    sweep: str
    pose: int
    point_a: tuple[float, float, float]
    point_b: tuple[float, float, float]
    exact: bool = True
    pose_distance_mm: float = float("nan")
    """Least distance over the sweep poses only (mm); nan for a far pair."""
    between_poses: bool = False
    driver: dict[str, float] = field(default_factory=dict)
    """Driver values (report keys such as ``travel_mm``) where ``distance_mm`` is."""

    @property
    def at(self) -> str:
        """The driver values of the closest approach as text (``travel +12.35 mm``)."""
        return describe_values(self.driver)

    @property
    def margin_mm(self) -> float:
        return self.distance_mm - self.limit_mm


@dataclass(frozen=True)
class ClearanceReport:
    pairs: tuple[ClearancePair, ...]
    """Every pair measured, closest to its limit first."""
    skipped: tuple[str, ...]
    rod_margin_mm: dict[str, float]
    """Least (distance − limit) over every pair a rod is in (inf when none)."""
    poses: int


def _rotation_xyz(angles_deg: tuple[float, float, float]) -> Array:
    ax, ay, az = np.radians(angles_deg)
    rx = np.array([[1, 0, 0], [0, np.cos(ax), -np.sin(ax)], [0, np.sin(ax), np.cos(ax)]])
    ry = np.array([[np.cos(ay), 0, np.sin(ay)], [0, 1, 0], [-np.sin(ay), 0, np.cos(ay)]])
    rz = np.array([[np.cos(az), -np.sin(az), 0], [np.sin(az), np.cos(az), 0], [0, 0, 1]])
    return rz @ ry @ rx


def zone_solids(analysis: Analysis) -> dict[str, tuple[Solid, float]]:
    """The design's fixed zones as solids, with each one's clearance limit (mm)."""
    default = analysis.design.limits.clearance_mm
    out: dict[str, tuple[Solid, float]] = {}
    for zone in analysis.design.zones:
        p = zone.params
        limit = default if zone.clearance_mm is None else zone.clearance_mm
        solid: Solid
        # the design reader stored each zone's parameters with these types
        if zone.kind == "box":
            solid = Box(
                np.array(p["centre_mm"]),
                np.array(p["size_mm"]) / 2.0,
                _rotation_xyz(cast(Vec3, p["rotation_deg"])),
            )
        elif zone.kind == "cylinder":
            a, b = cast(tuple[Vec3, Vec3], p["axis_mm"])
            solid = Cylinder(np.array(a), np.array(b), float(cast(float, p["radius_mm"])))
        else:
            d0, d1 = cast(tuple[float, float], p["depth_mm"])
            plane = cast(Literal["front", "side", "top"], p["plane"])
            solid = Prism(np.array(p["outline_mm"]), plane, d0, d1)
        out[f"zone '{zone.name}'"] = (solid, limit)
    return out


@dataclass(frozen=True)
class _Moving:
    name: str
    solid: Solid
    bodies: frozenset[str]
    anchors: Array  # (k, 3) design points that join it to its bodies
    rod: str | None


def _moving_solids(
    analysis: Analysis,
    kins: list[Kinematics],
    outlines: dict | None = None,
    only: set[str] | None = None,
) -> list[_Moving]:
    """Every moving solid at the poses of ``kins`` (only the names in ``only``, if given)."""
    link, design = analysis.link, analysis.design
    pts = np.concatenate([k.points for k in kins])
    rot = np.concatenate([k.rotation for k in kins])
    trans = np.concatenate([k.translation for k in kins])
    out: list[_Moving] = []
    for rod in design.rods:
        if only is not None and f"rod '{rod.name}'" not in only:
            continue
        ia, ib = link.point(rod.end_a), link.point(rod.end_b)
        a, b = pts[:, ia], pts[:, ib]
        axis = (b - a) / np.linalg.norm(b - a, axis=-1, keepdims=True)
        grow = rod.rod_end_allowance_mm
        bodies = frozenset({design.pickups[rod.end_a].body, design.pickups[rod.end_b].body})
        out.append(
            _Moving(
                f"rod '{rod.name}'",
                Capsule(a - grow * axis, b + grow * axis, rod.od_mm / 2.0),
                bodies,
                link.points[0, [ia, ib]],
                rod.name,
            )
        )
    for element in design.elements:
        env = element.envelope
        if env is None or (
            only is not None and f"envelope of element '{element.name}'" not in only
        ):
            continue
        body_ix = link.body(element.name)
        r0 = _rotation_xyz(env.rotation_deg)
        centre = (rot[:, body_ix] @ np.array(env.centre_mm)) + trans[:, body_ix]
        anchors = np.array(
            [p.position_mm for p in design.pickups.values() if p.body == element.name]
        )
        out.append(
            _Moving(
                f"envelope of element '{element.name}'",
                Box(centre, np.array(env.size_mm) / 2.0, rot[:, body_ix] @ r0),
                frozenset({element.name}),
                anchors.reshape(-1, 3),
                None,
            )
        )
    outlines = rocker_outlines(design) if outlines is None else outlines
    for name, outline in outlines.items():
        if only is not None and f"plate of rocker '{name}'" not in only:
            continue
        body_ix = link.body(name)
        verts = outline.vertices_3d(rot[:, body_ix], trans[:, body_ix], chord_tol_mm=0.5)
        rocker = next(r for r in design.rockers if r.name == name)
        anchors = np.array(
            [p.position_mm for p in design.pickups.values() if p.body == name] + [rocker.axis_a_mm]
        )
        out.append(
            _Moving(
                f"plate of rocker '{name}'",
                Plate(verts, outline.thickness_mm),
                frozenset({name, rocker.parent}),
                anchors,
                None,
            )
        )
    return out


def _tyre_solids(
    analysis: Analysis, kins: list[Kinematics]
) -> dict[str, tuple[Solid, float, Solid]]:
    """Tyre envelopes at the poses (moving with their uprights), limit, and at rest."""
    design, link = analysis.design, analysis.link
    default = design.limits.clearance_mm
    pts = np.concatenate([k.points for k in kins])
    rot = np.concatenate([k.rotation for k in kins])
    tyres: dict[str, tuple[Solid, float, Solid]] = {}
    # in a side-view planar design every part lies in one plane, the tyres beside it
    corners = [] if design.plane == "side" else list(enumerate(design.corners))
    for c, corner in corners:
        centre = pts[:, link.wheel_centre[c]]
        spin = rot[:, link.corner_upright[c]] @ link.spin_axis[c]
        half = corner.tyre_width_mm / 2.0
        c0, s0 = np.array(corner.wheel_centre_mm), link.spin_axis[c]
        at_rest = Cylinder(c0 - half * s0, c0 + half * s0, corner.tyre_radius_mm)
        tyres[f"tyre '{corner.name}'"] = (
            Cylinder(centre - half * spin, centre + half * spin, corner.tyre_radius_mm),
            default,
            at_rest,
        )
    return tyres


def clearance_report(analysis: Analysis, *, between_poses: bool = True) -> ClearanceReport:
    """Least distances of every pair over every sweep: over the poses, and between the
    poses for the pairs near their limit (``between_poses=False``: the poses only)."""
    design = analysis.design
    names = list(analysis.sweeps)
    kins = [analysis.sweeps[n].solved.kin for n in names]
    sizes = [analysis.sweeps[n].spec.size for n in names]
    starts = np.cumsum([0, *sizes])
    outlines = rocker_outlines(design)
    moving = _moving_solids(analysis, kins, outlines)
    zones = zone_solids(analysis)
    default = design.limits.clearance_mm

    tyres = _tyre_solids(analysis, kins)
    pairs: list[tuple[Solid, Solid]] = []
    meta: list[tuple[str, str, float, str | None, str | None]] = []
    skipped: list[str] = []
    fixed = {name: (zone, limit, zone) for name, (zone, limit) in zones.items()}
    every = {**fixed, **tyres}
    inside = _anchors_inside(moving, {name: rest for name, (_, _, rest) in every.items()})
    for m_index, m in enumerate(moving):
        for zname, (zone, limit, _) in every.items():
            if inside[zname][m_index]:
                skipped.append(f"{m.name} has a joint inside {zname}: not checked against it")
                continue
            pairs.append((m.solid, zone))
            meta.append((m.name, zname, limit, m.rod, None))
    for i, first in enumerate(moving):
        for second in moving[i + 1 :]:
            if first.bodies & second.bodies:
                continue
            pairs.append((first.solid, second.solid))
            meta.append((first.name, second.name, default, first.rod, second.rod))
    bounds = [_box_gap(_bounds(a), _bounds(b)) for a, b in pairs]
    near = [i for i, (gap, m) in enumerate(zip(bounds, meta, strict=True)) if gap <= m[2] + FAR_MM]
    results = (
        dict(zip(near, least_separations([pairs[i] for i in near]), strict=True)) if near else {}
    )
    found: dict[int, tuple[int, int, float, Array, Array]] = {}
    for i, res in results.items():
        sweep_index = int(np.searchsorted(starts, res.pose_index, side="right") - 1)
        local = int(res.pose_index - starts[sweep_index])
        found[i] = (sweep_index, local, float(res.distance_mm), res.point_a, res.point_b)
    refined = _refine(analysis, names, outlines, zones, meta, found) if between_poses else {}
    out: list[ClearancePair] = []
    margins: dict[str, float] = {r.name: float("inf") for r in design.rods}
    for i, (a, b, limit, rod_a, rod_b) in enumerate(meta):
        if i not in found:
            pair = ClearancePair(
                a, b, bounds[i], limit, "", -1, (np.nan,) * 3, (np.nan,) * 3, exact=False
            )
        else:
            sweep_index, local, dist, pa, pb = found[i]
            spec = analysis.sweeps[names[sweep_index]].spec
            driver = {k: float(v[local]) for k, v in spec.values.items()}
            between = False
            if i in refined and refined[i].between:
                r = refined[i]
                dist, pa, pb, driver, between = r.distance_mm, r.point_a, r.point_b, r.values, True
            pair = ClearancePair(
                a,
                b,
                dist,
                limit,
                names[sweep_index],
                local,
                _vec3(pa),
                _vec3(pb),
                pose_distance_mm=found[i][2],
                between_poses=between or (i in refined and refined[i].searched),
                driver=driver,
            )
        out.append(pair)
        for rod in (rod_a, rod_b):
            if rod is not None:
                margins[rod] = min(margins[rod], pair.margin_mm)
    out.sort(key=lambda p: p.margin_mm)
    return ClearanceReport(tuple(out), tuple(skipped), margins, int(starts[-1]))


def _refine(
    analysis: Analysis,
    names: list[str],
    outlines: dict,
    zones: dict[str, tuple[Solid, float]],
    meta: list[tuple[str, str, float, str | None, str | None]],
    found: dict[int, tuple[int, int, float, Array, Array]],
) -> dict:
    """Refine between the poses every measured pair near its limit; by pair index.

    A redundantly located design is left at its poses: they come from the elastic
    solution, which the rigid re-solve between poses does not reproduce."""
    if analysis.mobility.redundant:
        return {}
    fixed = {name: solid for name, (solid, _) in zones.items()}

    def solids_at(kin: Kinematics, only: set[str] | None = None) -> dict[str, Solid]:
        moving = _moving_solids(analysis, [kin], outlines, only)
        out: dict[str, Solid] = {m.name: m.solid for m in moving}
        if only is None or any(name.startswith("tyre '") for name in only):
            out.update({name: t[0] for name, t in _tyre_solids(analysis, [kin]).items()})
        return out

    grid = analysis.design.sweeps.heave_roll_steps
    refined: dict = {}
    for sweep_index, name in enumerate(names):
        result = analysis.sweeps[name]
        shape = (int(grid[0]), int(grid[1])) if name == "heave_roll" and grid else None
        travel = {
            key: _step_travel(defining_points(solid), shape)
            for key, solid in solids_at(result.solved.kin).items()
        }
        chosen = [
            i
            for i, (s, _, dist, _, _) in found.items()
            if s == sweep_index
            and dist - meta[i][2]
            <= max(REFINE_MARGIN_MM, travel.get(meta[i][0], 0.0) + travel.get(meta[i][1], 0.0))
        ]
        if not chosen:
            continue
        requests = [
            Request(meta[i][0], meta[i][1], found[i][1], found[i][2], found[i][3], found[i][4])
            for i in chosen
        ]
        answers = refine_pairs(
            analysis.link,
            result,
            requests,
            solids_at,
            fixed,
            grid=shape,
        )
        refined.update(dict(zip(chosen, answers, strict=True)))
    return refined


def _step_travel(points: Array, grid: tuple[int, int] | None) -> float:
    """Largest travel (mm) of any of the points (poses, k, 3) between neighbouring poses."""
    if points.shape[0] < 2:
        return 0.0
    if grid is None:
        return float(np.max(np.linalg.norm(np.diff(points, axis=0), axis=-1)))
    cube = points.reshape(*grid, *points.shape[1:])
    steps = [np.diff(cube, axis=ax) for ax in (0, 1) if cube.shape[ax] > 1]
    return max((float(np.max(np.linalg.norm(d, axis=-1))) for d in steps), default=0.0)


def _vec3(point: Array) -> Vec3:
    """A point (3,) as a tuple of floats."""
    x, y, z = (float(v) for v in point)
    return (x, y, z)


def _bounds(solid: Solid) -> tuple[Array, Array]:
    """Axis-aligned box (low, high) holding the solid at every pose (conservative)."""
    if isinstance(solid, Capsule):
        pts = np.stack((solid.p0, solid.p1), axis=-2).reshape(-1, 3)
        grow = float(np.max(solid.radius))
    elif isinstance(solid, Cylinder):
        pts = np.stack((solid.p0, solid.p1), axis=-2).reshape(-1, 3)
        grow = float(np.max(solid.radius))
    elif isinstance(solid, Plate):
        pts = np.asarray(solid.vertices).reshape(-1, 3)
        grow = float(np.max(solid.thickness)) / 2.0
    elif isinstance(solid, Box):
        signs = np.array([[i, j, k] for i in (-1, 1) for j in (-1, 1) for k in (-1, 1)])
        assert solid.rotation is not None
        corners = np.einsum(
            "...ij,cj->...ci", solid.rotation, signs * solid.half_size[..., None, :]
        )
        pts = (solid.centre[..., None, :] + corners).reshape(-1, 3)
        grow = 0.0
    else:
        assert isinstance(solid, Prism)
        poly = np.concatenate(solid.pieces)
        lo_d, hi_d = solid.depth_min, solid.depth_max
        pts = np.concatenate(
            [poly[:, :1] * solid.u + poly[:, 1:] * solid.v + d * solid.w for d in (lo_d, hi_d)]
        )
        grow = 0.0
    return pts.min(axis=0) - grow, pts.max(axis=0) + grow


def _box_gap(a: tuple[Array, Array], b: tuple[Array, Array]) -> float:
    """Distance between two axis-aligned boxes: a lower bound of the solids' distance."""
    gap = np.maximum(0.0, np.maximum(b[0] - a[1], a[0] - b[1]))
    return float(np.linalg.norm(gap))


def _anchors_inside(moving: list[_Moving], zones: dict[str, Solid]) -> dict[str, list[bool]]:
    """For each zone (at the design pose), which moving solids have a joint inside it."""
    points = np.concatenate([m.anchors for m in moving]) if moving else np.zeros((0, 3))
    owner = (
        np.concatenate([np.full(len(m.anchors), i) for i, m in enumerate(moving)])
        if moving
        else np.zeros(0, dtype=int)
    )
    out: dict[str, list[bool]] = {}
    for name, zone in zones.items():
        flags = [False] * len(moving)
        if len(points):
            d = separation(Capsule(points, points, 0.0), zone).distance_mm
            for i in np.unique(owner[np.asarray(d) <= 0.0]):
                flags[int(i)] = True
        out[name] = flags
    return out


def solids_at(analysis: Analysis, sweep: str) -> dict[str, Solid]:
    """Every solid of the clearance survey at the poses of one sweep, by the names its
    pairs use (``rod 'x'``, ``zone 'x'``, ``tyre 'x'``, ...); moving solids carry that
    sweep's pose batch, fixed zones none (they broadcast)."""
    design, link = analysis.design, analysis.link
    kin = analysis.sweeps[sweep].solved.kin
    out: dict[str, Solid] = {m.name: m.solid for m in _moving_solids(analysis, [kin])}
    out.update({name: solid for name, (solid, _) in zone_solids(analysis).items()})
    if design.plane != "side":
        for c, corner in enumerate(design.corners):
            centre = kin.points[:, link.wheel_centre[c]]
            spin = kin.rotation[:, link.corner_upright[c]] @ link.spin_axis[c]
            half = corner.tyre_width_mm / 2.0
            out[f"tyre '{corner.name}'"] = Cylinder(
                centre - half * spin, centre + half * spin, corner.tyre_radius_mm
            )
    return out
