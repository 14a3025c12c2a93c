"""Find the routes: which rods carry each element's load to which corner.

A rod with one end on an element is either a guide (its other end is on the chassis, or
on bodies that reach only the chassis) or the last rod of a route: from its other end,
the bodies joined by rods and hinges (without passing through the chassis or an
element) reach one or more corners.  The rod that meets the element receives the load;
the rods that meet the corner's bodies deliver it.  A strut from the element straight to
an upright does both.  An equaliser (a rocker pivoting on an element) counts as part of
its element: a rod from it starts a route of that element at the equaliser's pickup.
A rod between two elements is neither a route nor a guide.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass

from plumbrod.design.model import CHASSIS, Design

__all__ = ["Route", "RouteMap", "element_of_body", "find_routes"]


@dataclass(frozen=True)
class Route:
    """One load path from an element pickup to a corner."""

    element: str
    pickup: str
    """Full name of the element pickup the route arrives at."""
    corners: tuple[str, ...]
    """Corners the route reaches; the first is the one it serves (most often the only)."""
    bodies: tuple[str, ...]
    """Rockers and other bodies between the element and the corner."""
    receiving_rods: tuple[str, ...]
    delivering_rods: tuple[str, ...]

    @property
    def name(self) -> str:
        return self.pickup

    @property
    def corner(self) -> str:
        return self.corners[0]


@dataclass(frozen=True)
class RouteMap:
    routes: tuple[Route, ...]
    guides: tuple[str, ...]
    """Rods from an element to the chassis (directly or through chassis-only bodies)."""

    def for_element(self, element: str) -> tuple[Route, ...]:
        return tuple(r for r in self.routes if r.element == element)


def find_routes(design: Design) -> RouteMap:
    """Trace every rod that meets an element to its corner(s) or to the chassis."""
    body_of = {key: p.body for key, p in design.pickups.items()}
    carrier = element_of_body(design)
    elements = set(carrier)
    corner_of: dict[str, str] = {}
    for corner in design.corners:
        for body in corner.bodies:
            corner_of[body] = corner.name
    neighbours: dict[str, set[str]] = {}

    def join(a: str, b: str) -> None:
        neighbours.setdefault(a, set()).add(b)
        neighbours.setdefault(b, set()).add(a)

    for corner in design.corners:
        for body in corner.bodies[1:]:
            join(corner.upright, body)
    for rocker in design.rockers:
        join(rocker.name, rocker.parent)
    for rod in design.rods:
        join(body_of[rod.end_a], body_of[rod.end_b])

    routes: list[Route] = []
    guides: list[str] = []
    for rod in design.rods:
        ends = [(rod.end_a, rod.end_b), (rod.end_b, rod.end_a)]
        for near, far in ends:
            if body_of[near] not in elements or body_of[far] in elements:
                continue
            element = carrier[body_of[near]]
            start = body_of[far]
            if start == CHASSIS:
                guides.append(rod.name)
                continue
            reached = _component(start, neighbours, elements)
            corners = sorted(
                {corner_of[b] for b in reached if b in corner_of},
                key=lambda c: _distance(start, c, neighbours, corner_of, elements),
            )
            if not corners:
                guides.append(rod.name)
                continue
            between = tuple(sorted(b for b in reached if b not in corner_of))
            own = {b for b in reached if corner_of.get(b) == corners[0]}
            delivering = []
            if start in own:  # a strut straight from the element to the corner
                delivering.append(rod.name)
            else:
                for other in design.rods:
                    a, b = body_of[other.end_a], body_of[other.end_b]
                    if (a in own and b in between) or (b in own and a in between):
                        delivering.append(other.name)
            routes.append(
                Route(
                    element=element,
                    pickup=near,
                    corners=tuple(corners),
                    bodies=between,
                    receiving_rods=(rod.name,),
                    delivering_rods=tuple(delivering),
                )
            )
    return RouteMap(tuple(routes), tuple(guides))


def element_of_body(design: Design) -> dict[str, str]:
    """Every body on the element side, mapped to its element: the elements themselves
    and the equalisers (rockers whose parent is an element)."""
    out = {e.name: e.name for e in design.elements}
    for rocker in design.rockers:
        if rocker.parent in out:
            out[rocker.name] = out[rocker.parent]
    return out


def _component(start: str, neighbours: dict[str, set[str]], stops: set[str]) -> set[str]:
    """Bodies reachable from ``start`` without passing through the chassis or elements."""
    seen = {start}
    queue = deque([start])
    while queue:
        body = queue.popleft()
        for nxt in neighbours.get(body, ()):
            if nxt in seen or nxt == CHASSIS or nxt in stops:
                continue
            seen.add(nxt)
            queue.append(nxt)
    return seen


def _distance(
    start: str,
    corner: str,
    neighbours: dict[str, set[str]],
    corner_of: dict[str, str],
    stops: set[str],
) -> int:
    """Number of joints from ``start`` to the nearest body of ``corner``."""
    seen = {start: 0}
    queue = deque([start])
    while queue:
        body = queue.popleft()
        if corner_of.get(body) == corner:
            return seen[body]
        for nxt in neighbours.get(body, ()):
            if nxt in seen or nxt == CHASSIS or nxt in stops:
                continue
            seen[nxt] = seen[body] + 1
            queue.append(nxt)
    return 1 << 30
