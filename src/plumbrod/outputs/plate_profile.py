"""Exact cut profile of a rocker plate: tangent lines and circular arcs.

A plate outline (:mod:`plumbrod.geometry.plate_outline`) is the convex hull of its boss circles,
which shapely stores as a polygon inscribed in the arcs.  For the cutting file we want
the arcs themselves: the convex hull of a set of circles is a closed chain of circular
arcs (one per visit of a boss circle) joined by straight lines tangent to both circles.
This module finds that chain by gift wrapping on the circles, so the laser or waterjet
cuts true arcs rather than many short chords.

All values are in the plate's (u, v) frame, mm; angles in radians, measured
counter-clockwise from +u.  The profile runs counter-clockwise.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from plumbrod.geometry.plate_outline import PlateOutline
from plumbrod.geometry.shapes import GeometryError

__all__ = ["PlateProfile", "ProfileArc", "circle_hull", "plate_profile"]

_TWO_PI = 2.0 * math.pi
_SAME_MM = 1e-9
"""Points closer than this are one point (mm)."""


@dataclass(frozen=True)
class ProfileArc:
    """One arc of the profile, counter-clockwise on the boss circle of hole ``hole``:
    ``centre_uv`` (u, v) mm, ``radius_mm``, ``start_rad`` (angle of the start point
    from +u) and ``sweep_rad`` (> 0, at most 2π)."""

    hole: str
    centre_uv: tuple[float, float]
    radius_mm: float
    start_rad: float
    sweep_rad: float

    @property
    def end_rad(self) -> float:
        """Angle of the end point from +u (start + sweep; may exceed 2π)."""
        return self.start_rad + self.sweep_rad

    def point_at(self, angle_rad: float) -> tuple[float, float]:
        """The point of the boss circle at ``angle_rad`` (u, v) mm."""
        cu, cv = self.centre_uv
        return (
            cu + self.radius_mm * math.cos(angle_rad),
            cv + self.radius_mm * math.sin(angle_rad),
        )

    @property
    def start_uv(self) -> tuple[float, float]:
        return self.point_at(self.start_rad)

    @property
    def end_uv(self) -> tuple[float, float]:
        return self.point_at(self.end_rad)


@dataclass(frozen=True)
class PlateProfile:
    """The outer cut profile: ``arcs`` counter-clockwise; a straight line, tangent to
    both circles, runs from each arc's end to the next arc's start (and from the last
    arc's end to the first arc's start).  A line may have zero length where two arcs
    meet."""

    arcs: tuple[ProfileArc, ...]

    @property
    def lines(self) -> tuple[tuple[tuple[float, float], tuple[float, float]], ...]:
        """The tangent lines ((u, v) start, (u, v) end) after each arc, mm."""
        n = len(self.arcs)
        return tuple((self.arcs[k].end_uv, self.arcs[(k + 1) % n].start_uv) for k in range(n))

    @property
    def length_mm(self) -> float:
        """Length of the cut path around the profile (arcs plus lines), mm."""
        arcs = sum(a.radius_mm * a.sweep_rad for a in self.arcs)
        return arcs + sum(math.dist(p, q) for p, q in self.lines)

    @property
    def area_mm2(self) -> float:
        """Area inside the profile, mm² (Green's theorem over lines and arcs, exact)."""
        twice = 0.0
        for arc, (p, q) in zip(self.arcs, self.lines, strict=True):
            # ∮ u dv - v du over the arc: r·(cu·(sin b - sin a) - cv·(cos b - cos a)) + r²·sweep
            cu, cv = arc.centre_uv
            r, a, b = arc.radius_mm, arc.start_rad, arc.end_rad
            twice += r * (cu * (math.sin(b) - math.sin(a)) - cv * (math.cos(b) - math.cos(a)))
            twice += r * r * arc.sweep_rad
            twice += p[0] * q[1] - q[0] * p[1]
        return 0.5 * twice

    def sample_uv(self, chord_tol_mm: float) -> np.ndarray:
        """Points (n, 2) around the profile, counter-clockwise, without repeating the
        first: each arc split so that no chord strays more than ``chord_tol_mm``."""
        if not chord_tol_mm > 0:
            raise GeometryError(
                "PlateProfile.sample_uv.chord_tol_mm", "a tolerance > 0 in mm", repr(chord_tol_mm)
            )
        out: list[tuple[float, float]] = []
        for arc in self.arcs:
            r = arc.radius_mm
            half = math.acos(max(-1.0, 1.0 - chord_tol_mm / r)) if chord_tol_mm < r else math.pi
            steps = max(1, math.ceil(arc.sweep_rad / (2.0 * half)))
            for k in range(steps + 1):
                out.append(arc.point_at(arc.start_rad + arc.sweep_rad * k / steps))
        pts = np.array(out)
        keep = np.ones(len(pts), dtype=bool)
        keep[1:] = np.linalg.norm(np.diff(pts, axis=0), axis=1) > _SAME_MM
        pts = pts[keep]
        if len(pts) > 1 and np.linalg.norm(pts[-1] - pts[0]) <= _SAME_MM:
            pts = pts[:-1]
        return pts


def _tangent(ci: np.ndarray, ri: float, cj: np.ndarray, rj: float) -> np.ndarray:
    """Outward unit normal of the outer tangent line from circle i to circle j that
    keeps both circles on its left (the line runs counter-clockwise around them)."""
    d = cj - ci
    length = float(np.hypot(d[0], d[1]))
    e = d / length
    right = np.array([e[1], -e[0]])
    a = (ri - rj) / length
    return a * e + math.sqrt(max(0.0, 1.0 - a * a)) * right


def _angle(vec: np.ndarray) -> float:
    return math.atan2(float(vec[1]), float(vec[0]))


def circle_hull(
    centres_uv: Sequence[Sequence[float]] | np.ndarray,
    radii_mm: Sequence[float] | np.ndarray,
    names: Sequence[str] | None = None,
) -> PlateProfile:
    """Convex hull of circles as a closed, counter-clockwise chain of arcs and tangent
    lines.

    ``centres_uv`` (n, 2) mm, ``radii_mm`` (n,) > 0; ``names`` label the arcs (default
    "0", "1", ...).  Circles inside another circle are left out.

    Method: gift wrapping on circles.  From the lowest point of the hull, the supporting
    line is turned counter-clockwise about the current circle until it touches another
    circle; the turn is the arc swept on the current circle (the hull of n circles has
    at most 2n − 1 arcs).
    """
    centres = np.asarray(centres_uv, dtype=float).reshape(-1, 2)
    radii = np.asarray(radii_mm, dtype=float).reshape(-1)
    if len(centres) == 0 or len(centres) != len(radii):
        raise GeometryError(
            "circle_hull",
            "one radius per centre, at least one circle",
            f"{len(centres)} centres and {len(radii)} radii",
        )
    if not (np.all(np.isfinite(centres)) and np.all(np.isfinite(radii)) and np.all(radii > 0)):
        raise GeometryError(
            "circle_hull",
            "finite centres and radii > 0 in mm",
            f"centres {centres.tolist()}, radii {radii.tolist()}",
        )
    labels = [str(k) for k in range(len(centres))] if names is None else list(names)
    if len(labels) != len(centres):
        raise GeometryError("circle_hull.names", f"{len(centres)} names", f"{len(labels)}")

    # leave out circles inside (or equal to) another one
    keep: list[int] = []
    for j in range(len(centres)):
        inside = False
        for i in range(len(centres)):
            if i == j:
                continue
            gap = float(np.hypot(*(centres[j] - centres[i]))) + radii[j] - radii[i]
            if gap < -_SAME_MM or (abs(gap) <= _SAME_MM and (radii[i] > radii[j] or i < j)):
                inside = True
                break
        if not inside:
            keep.append(j)
    c, r = centres[keep], radii[keep]
    names_kept = [labels[k] for k in keep]

    if len(c) == 1:
        return PlateProfile(
            (
                ProfileArc(
                    names_kept[0],
                    (float(c[0, 0]), float(c[0, 1])),
                    float(r[0]),
                    -0.5 * math.pi,
                    _TWO_PI,
                ),
            )
        )

    # start on the circle with the lowest point (ties: the leftmost), heading +u
    low = c[:, 1] - r
    start = int(np.lexsort((c[:, 0], np.round(low, 9)))[0])
    current, heading = start, 0.0
    edges: list[tuple[int, int, np.ndarray]] = []  # (from, to, outward normal)
    for _ in range(2 * len(c) + 2):
        candidates: list[tuple[float, float, int, np.ndarray]] = []
        for j in range(len(c)):
            if j == current:
                continue
            normal = _tangent(c[current], r[current], c[j], r[j])
            turn = (_angle(normal) + 0.5 * math.pi - heading) % _TWO_PI
            if turn > _TWO_PI - 1e-12:
                turn = 0.0
            candidates.append((turn, float(np.hypot(*(c[j] - c[current]))), j, normal))
        least = min(cand[0] for cand in candidates)
        # the first circle the turning line touches; on a tie the farther one, so that
        # circles touching the same line in between are passed over
        best = max(
            (cand for cand in candidates if cand[0] <= least + 1e-12), key=lambda cand: cand[1]
        )
        _, _, nxt, normal = best
        edge = (current, nxt, normal)
        if edges and edges[0][0] == current and edges[0][1] == nxt:
            break
        edges.append(edge)
        current, heading = nxt, _angle(normal) + 0.5 * math.pi
    else:  # pragma: no cover - the hull of n circles closes within 2n - 1 arcs
        raise GeometryError("circle_hull", "a closed hull", "no closure after 2n + 2 steps")

    arcs: list[ProfileArc] = []
    for k, (i, _, normal_out) in enumerate(edges):
        normal_in = edges[k - 1][2]  # the line arriving at circle i
        start_rad = _angle(normal_in)
        sweep = (_angle(normal_out) - start_rad) % _TWO_PI
        if sweep > _TWO_PI - 1e-12:
            sweep = 0.0
        arcs.append(
            ProfileArc(
                names_kept[i], (float(c[i, 0]), float(c[i, 1])), float(r[i]), start_rad, sweep
            )
        )
    return PlateProfile(tuple(arcs))


def plate_profile(outline: PlateOutline) -> PlateProfile:
    """The exact outer profile of a plate: the hull of its boss circles (radius = hole
    radius + edge margin), arcs labelled with the hole names."""
    return circle_hull(
        [h.centre_uv for h in outline.holes],
        [h.boss_radius_mm for h in outline.holes],
        [h.name for h in outline.holes],
    )
