"""The car around the route: ``[car]`` and the axles found from the corners.

Axles: corners whose wheel-centre x lie within :data:`AXLE_TOLERANCE_MM` of each other
share an axle; the front axle has the larger x.  A design whose corners all sit on one
axle says which one by its corner names (``front`` / ``rear`` in every name) or, failing
that, by position (behind x = −50 mm: the rear axle; the recommended origin is under the
front axle).  The wheelbase is the distance between the axles when both hold corners
(a ``wheelbase_mm`` given then must agree within :data:`WHEELBASE_AGREEMENT_MM`), else
``[car] wheelbase_mm``.  Tracks: the distance between an axle's two corners (twice the
corner's |y| when it has one), an axle without corners takes the other axle's track
unless ``track_front_mm`` / ``track_rear_mm`` is given.

In a side-view planar design each corner stands for its whole axle (one spring per
axle); in a front-view design x is not drawn, so no pitch moment exists and the
wheelbase is not needed.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

from plumbrod.design.model import Car, Design
from plumbrod.design.reader import Reader
from plumbrod.design.schema import children, entry
from plumbrod.errors import DesignFileError

__all__ = [
    "AXLE_TOLERANCE_MM",
    "CAR_KEYS",
    "WHEELBASE_AGREEMENT_MM",
    "Axle",
    "CarLayout",
    "SpringPoint",
    "car_layout",
    "read_car",
    "with_default_motion_centre",
]

AXLE_TOLERANCE_MM = 50.0
WHEELBASE_AGREEMENT_MM = 1.0
CAR_KEYS = tuple(k.name for k in children("car"))
"""The keys of ``[car]`` (their kinds, units and ranges: ``schema_tables_car.py``)."""
DEFAULT_ROLL_SHARE: float = entry("car.roll_stiffness_front_share").default
"""Front share of the roll stiffness when the design gives none: common practice, no
source (an even split); give your car's."""


def read_car(reader: Reader, table: Any) -> Car:
    """``[car]`` through the design reader: every value by its schema entry."""
    r = reader
    r.table(table, "car", "car")
    values: dict[str, Any] = {
        k.name: r.value(table, "car", k.path) for k in children("car") if k.name in table
    }
    if "roll_stiffness_front_share" in values:
        values["roll_share_given"] = True
    return Car(**values)


@dataclass(frozen=True)
class SpringPoint:
    """One spring as the chassis feels it: a vertical wheel-equivalent support at the
    axle's ground line, ``y_mm`` across (mm).  ``corner`` is the design corner there,
    or None for a corner the design does not hold."""

    name: str
    y_mm: float
    corner: str | None


@dataclass(frozen=True)
class Axle:
    """One axle of the car: where it is and which springs it holds (mm)."""

    name: str  # "front" or "rear"
    x_mm: float | None
    """Ground line of the axle along x; None when it cannot be placed (no wheelbase)."""
    centre_y_mm: float
    track_mm: float | None
    corners: tuple[str, ...]
    springs: tuple[SpringPoint, ...]
    wheel_rate_N_per_mm: float | None

    @property
    def in_design(self) -> bool:
        return bool(self.corners)


@dataclass(frozen=True)
class CarLayout:
    """Both axles, the wheelbase and the roll-stiffness split."""

    front: Axle
    rear: Axle
    wheelbase_mm: float | None
    wheelbase_from: str
    """``"corners"``, ``"car"`` (given), or ``""`` (unknown)."""
    ground_z_mm: float
    roll_front_share: float
    roll_share_given: bool
    planar: str | None

    @property
    def axles(self) -> tuple[Axle, Axle]:
        return (self.front, self.rear)

    def axle_of_corner(self, corner: str) -> Axle:
        return self.front if corner in self.front.corners else self.rear

    @property
    def needs_wheelbase(self) -> bool:
        """True when a pitch moment cannot be shared between the axles."""
        return self.wheelbase_mm is None and self.planar != "front"


def _fail(design: Design, key: str, problem: str, fix: str) -> DesignFileError:
    return DesignFileError(design.source, key, problem, fix)


def _groups(design: Design) -> list[list[str]]:
    """Corner names grouped by wheel-centre x, front (largest x) first."""
    ordered = sorted(design.corners, key=lambda c: -c.wheel_centre_mm[0])
    groups: list[list[str]] = []
    anchor = None
    for corner in ordered:
        x = corner.wheel_centre_mm[0]
        if anchor is None or anchor - x > AXLE_TOLERANCE_MM:
            groups.append([])
            anchor = x
        groups[-1].append(corner.name)
    return groups


def _one_axle_is_rear(design: Design, names: list[str]) -> bool:
    lowered = [n.lower() for n in names]
    if all("rear" in n for n in lowered):
        return True
    if all("front" in n for n in lowered):
        return False
    xs = [design.corner(n).wheel_centre_mm[0] for n in names]
    return sum(xs) / len(xs) < -AXLE_TOLERANCE_MM


def car_layout(design: Design) -> CarLayout:
    """The axles, wheelbase and tracks of a design; raises DesignFileError when the
    corners do not make a two-axle car or ``[car]`` disagrees with them."""
    car = design.car
    groups = _groups(design)
    if len(groups) > 2:
        xs = ", ".join(f"{design.corner(g[0]).wheel_centre_mm[0]:g}" for g in groups)
        raise _fail(
            design,
            "corners",
            f"the wheel centres sit on {len(groups)} axles (x = {xs} mm)",
            f"a car has two axles: corners within {AXLE_TOLERANCE_MM:g} mm of each other "
            "in x share one",
        )
    side = design.plane == "side"
    for group in groups:
        limit = 1 if side else 2
        if len(group) > limit:
            raise _fail(
                design,
                f"corners.{group[-1]}",
                f"{len(group)} corners on one axle ({', '.join(group)})",
                "an axle holds a left and a right wheel; "
                "in a side view one corner stands for the axle",
            )
    if len(groups) == 2:
        front_names, rear_names = groups
    elif _one_axle_is_rear(design, groups[0]):
        front_names, rear_names = [], groups[0]
    else:
        front_names, rear_names = groups[0], []

    def mean_x(names: list[str]) -> float:
        return sum(design.corner(n).wheel_centre_mm[0] for n in names) / len(names)

    wheelbase: float | None = None
    source = ""
    if front_names and rear_names:
        wheelbase = mean_x(front_names) - mean_x(rear_names)
        source = "corners"
        if car.wheelbase_mm is not None and abs(car.wheelbase_mm - wheelbase) > (
            WHEELBASE_AGREEMENT_MM
        ):
            raise _fail(
                design,
                "car.wheelbase_mm",
                f"{car.wheelbase_mm:g} mm disagrees with the corners, which sit "
                f"{wheelbase:.1f} mm apart",
                f"remove it, or make it agree within {WHEELBASE_AGREEMENT_MM:g} mm",
            )
    elif car.wheelbase_mm is not None:
        wheelbase = car.wheelbase_mm
        source = "car"
    contacts = [c.wheel_centre_mm[2] - c.tyre_radius_mm for c in design.corners]
    ground = sum(contacts) / len(contacts)

    def own_track(names: list[str]) -> float | None:
        ys = [design.corner(n).wheel_centre_mm[1] for n in names]
        if len(ys) == 2:
            return abs(ys[0] - ys[1])
        if len(ys) == 1 and abs(ys[0]) > 1e-9 and not side:
            return 2.0 * abs(ys[0])
        return None

    track_f = own_track(front_names) if front_names else None
    track_r = own_track(rear_names) if rear_names else None
    if car.track_front_mm is not None and track_f is None:
        track_f = car.track_front_mm
    if car.track_rear_mm is not None and track_r is None:
        track_r = car.track_rear_mm
    if track_f is None and not front_names:
        track_f = track_r
    if track_r is None and not rear_names:
        track_r = track_f

    def place(names: list[str], other: list[str], sign: float) -> float | None:
        if names:
            return mean_x(names)
        if wheelbase is None or not other:
            return None
        return mean_x(other) + sign * wheelbase

    def axle(name: str, names: list[str], x: float | None, track: float | None) -> Axle:
        corners = sorted(names, key=lambda n: -design.corner(n).wheel_centre_mm[1])
        rate = car.wheel_rate_front_N_per_mm if name == "front" else car.wheel_rate_rear_N_per_mm
        ys = [design.corner(n).wheel_centre_mm[1] for n in corners]
        centre = sum(ys) / len(ys) if len(ys) == 2 else 0.0
        if side:
            label = corners[0] if corners else name
            springs: tuple[SpringPoint, ...] = (
                SpringPoint(label, 0.0, corners[0] if corners else None),
            )
        else:
            half = (track or 0.0) / 2.0
            left = next((n for n in corners if design.corner(n).wheel_centre_mm[1] > centre), None)
            right = next((n for n in corners if n != left), None)
            if len(corners) == 1 and left is None:
                right = corners[0]
            springs = (
                SpringPoint(left or f"{name}_left", centre + half, left),
                SpringPoint(right or f"{name}_right", centre - half, right),
            )
        return Axle(name, x, centre, track, tuple(corners), springs, rate)

    front = axle("front", front_names, place(front_names, rear_names, 1.0), track_f)
    rear = axle("rear", rear_names, place(rear_names, front_names, -1.0), track_r)
    return CarLayout(
        front=front,
        rear=rear,
        wheelbase_mm=wheelbase,
        wheelbase_from=source,
        ground_z_mm=ground,
        roll_front_share=car.roll_stiffness_front_share,
        roll_share_given=car.roll_share_given,
        planar=design.plane,
    )


def with_default_motion_centre(design: Design) -> Design:
    """With a known wheelbase and no ``motion_centre_mm``, pitch and roll turn about
    mid-wheelbase on the ground (on the centre plane)."""
    if design.motion_centre_given:
        return design
    layout = car_layout(design)
    if layout.front.x_mm is None or layout.rear.x_mm is None or design.plane == "front":
        return design
    centre = (
        (layout.front.x_mm + layout.rear.x_mm) / 2.0,
        0.0,
        layout.ground_z_mm,
    )
    return replace(design, sweeps=replace(design.sweeps, motion_centre_mm=centre))
