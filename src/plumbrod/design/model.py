"""The design as plain, validated values: what the design file says, nothing solved.

Every position is in the chassis frame at the design pose (static ride height, wheels
on the ground), in mm, with ISO 8855 vehicle axes: x forward, y left, z up.  Planar
designs are stored the same way, with the out-of-plane coordinate set to zero.

Body names: ``chassis``; each corner's ``<corner>.upright`` and, with wishbones,
``<corner>.upper`` and ``<corner>.lower``; each rocker and each element by its own name.
A pickup is named ``<body>.<pickup>``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from plumbrod.design.tradeoff_spec import TradeoffSpec

__all__ = [
    "CHASSIS",
    "AeroData",
    "Car",
    "Corner",
    "Design",
    "Element",
    "Envelope",
    "Limits",
    "LoadCase",
    "MaterialSpec",
    "Pickup",
    "PlateSpec",
    "Rocker",
    "Rod",
    "Strike",
    "Sweeps",
    "Vec3",
    "Wishbones",
    "Zone",
]

Vec3 = tuple[float, float, float]
Plane = Literal["front", "side"]

CHASSIS = "chassis"
"""Name of the reference body; pickups on it are fixed to the chassis."""

PLANE_NORMAL_AXIS: dict[str, int] = {"front": 0, "side": 1}
"""Index of the coordinate a planar design leaves out: front view = y-z, side = x-z."""


@dataclass(frozen=True)
class Pickup:
    """A named hardpoint on a body, at the design pose (mm, chassis frame)."""

    body: str
    name: str
    position_mm: Vec3

    @property
    def key(self) -> str:
        """The pickup's full name, ``<body>.<pickup>``."""
        return f"{self.body}.{self.name}"


@dataclass(frozen=True)
class Wishbones:
    """Double-wishbone hardpoints of one corner (mm).

    Each wishbone turns about the axis through its front and rear inner pivots.  In a
    front-view planar design the inner pivots are one point each (axis along x) and
    there is no tie rod.
    """

    upper_front_mm: Vec3
    upper_rear_mm: Vec3
    upper_outer_mm: Vec3
    lower_front_mm: Vec3
    lower_rear_mm: Vec3
    lower_outer_mm: Vec3
    tie_rod_inner_mm: Vec3 | None
    tie_rod_outer_mm: Vec3 | None


@dataclass(frozen=True)
class Corner:
    """A wheel and its upright, moved relative to the chassis by the suspension."""

    name: str
    wheel_centre_mm: Vec3
    tyre_radius_mm: float
    tyre_width_mm: float
    suspension: Literal["slider", "double_wishbone"]
    wishbones: Wishbones | None = None
    unsprung_mass_kg: float | None = None

    @property
    def upright(self) -> str:
        """Body name of the upright."""
        return f"{self.name}.upright"

    @property
    def bodies(self) -> tuple[str, ...]:
        """Names of the corner's moving bodies (upright first)."""
        if self.suspension == "double_wishbone":
            return (self.upright, f"{self.name}.upper", f"{self.name}.lower")
        return (self.upright,)


@dataclass(frozen=True)
class PlateSpec:
    """Rocker plate data for mass, clearance and the cut outline (mm)."""

    thickness_mm: float
    material: str
    pivot_hole_mm: float
    hole_mm: float
    edge_margin_mm: float
    holes_mm: dict[str, float] = field(default_factory=dict)


@dataclass(frozen=True)
class Rocker:
    """A rigid body turning about an axis fixed in its parent body."""

    name: str
    parent: str
    axis_a_mm: Vec3
    axis_b_mm: Vec3
    mass_kg: float | None = None
    plate: PlateSpec | None = None


@dataclass(frozen=True)
class Rod:
    """A straight two-force member between two pickups on two bodies."""

    name: str
    end_a: str
    end_b: str
    material: str
    od_mm: float
    wall_mm: float | None
    """Tube wall; ``None`` for a solid round bar of diameter ``od_mm``."""
    end_fixity: float = 1.0
    """Effective-length factor K (1 for ball joints at both ends)."""
    rod_end_rating_N: float | None = None
    rod_end_allowance_mm: float = 0.0


@dataclass(frozen=True)
class AeroData:
    """Aerodynamic data of an element: ½ρV²·S·C at the centre of pressure."""

    reference_area_m2: float
    downforce_coefficient: float
    """C_L with downforce positive."""
    drag_coefficient: float


@dataclass(frozen=True)
class Envelope:
    """A box fixed in an element, for clearance: centre and full size in mm at the
    design pose, rotation in degrees about x, then y, then z."""

    centre_mm: Vec3
    size_mm: Vec3
    rotation_deg: Vec3 = (0.0, 0.0, 0.0)


@dataclass(frozen=True)
class Element:
    """A rigid aero element (wing, splitter, undertray) located by rods."""

    name: str
    kind: str
    mass_kg: float
    cg_mm: Vec3
    centre_of_pressure_mm: Vec3
    aero: AeroData | None = None
    inertia_kg_m2: Vec3 | None = None
    """Moments of inertia about the cg along x, y, z (kg·m²); estimated when missing."""
    envelope: Envelope | None = None
    strike: Strike | None = None
    """A ground strike to check as its own load case (off unless the design names one)."""


@dataclass(frozen=True)
class Strike:
    """A ground strike on an element: an upward force at a point (N, mm)."""

    force_N: float
    at_mm: Vec3


@dataclass(frozen=True)
class MaterialSpec:
    """A material the design file adds or overrides (MPa, kg/m³)."""

    id: str
    modulus_MPa: float
    yield_MPa: float
    ultimate_MPa: float
    density_kg_m3: float
    source: str


@dataclass(frozen=True)
class LoadCase:
    """One load case: speed for the aero data, or direct forces; accelerations in g."""

    name: str
    speed_kmh: float = 0.0
    bump_g: float = 0.0
    longitudinal_g: float = 0.0
    lateral_g: float = 0.0
    air_density_kg_m3: float = 1.225
    forces_N: dict[str, Vec3] = field(default_factory=dict)
    forces_at_mm: dict[str, Vec3] = field(default_factory=dict)
    """Where a given force acts (design position on the element), instead of the
    centre of pressure."""
    strikes: dict[str, tuple[float, Vec3]] = field(default_factory=dict)
    """Upward ground-strike force (N) and its point on an element, on top of the rest."""


@dataclass(frozen=True)
class Car:
    """The car around the route (``[car]``): what the design's corners do not say.

    Every value is optional; :func:`plumbrod.design.car.car_layout` derives the rest
    from the corners.  ``roll_stiffness_front_share`` is the front axle's share of the
    car's roll stiffness (springs and bars), 0.5 unless given (common practice: give
    your car's).
    """

    wheelbase_mm: float | None = None
    track_front_mm: float | None = None
    track_rear_mm: float | None = None
    roll_stiffness_front_share: float = 0.5
    roll_share_given: bool = False
    wheel_rate_front_N_per_mm: float | None = None
    wheel_rate_rear_N_per_mm: float | None = None


@dataclass(frozen=True)
class Zone:
    """A keep-out solid fixed to the chassis or following a wheel."""

    name: str
    kind: Literal["box", "cylinder", "prism", "tyre"]
    params: dict[str, object]
    clearance_mm: float | None = None


@dataclass(frozen=True)
class Sweeps:
    """Ranges and step counts of the sweeps (mm, degrees).

    ``travel``: every wheel moves together relative to the body (rebound −, bump +).
    ``heave``/``roll``/``pitch``: the body moves with the wheels on the ground, roll and
    pitch about axes through ``motion_centre_mm`` (by default mid-wheelbase on the
    ground when the wheelbase is known, else the origin).  ``heave_roll``: the grid of
    both, over its own ranges when given.
    A range of ``None`` leaves that sweep out.
    """

    travel_mm: tuple[float, float] | None = (-40.0, 40.0)
    travel_steps: int = 201
    heave_mm: tuple[float, float] | None = (-25.0, 25.0)
    heave_steps: int = 41
    roll_deg: tuple[float, float] | None = (-2.0, 2.0)
    roll_steps: int = 41
    pitch_deg: tuple[float, float] | None = (-1.5, 1.5)
    pitch_steps: int = 41
    heave_roll_steps: tuple[int, int] | None = None
    heave_roll_heave_mm: tuple[float, float] | None = None
    """The grid's own heave range; the heave sweep's when None."""
    heave_roll_roll_deg: tuple[float, float] | None = None
    """The grid's own roll range; the roll sweep's when None."""
    motion_centre_mm: Vec3 = (0.0, 0.0, 0.0)

    @property
    def grid_heave_mm(self) -> tuple[float, float] | None:
        """The heave range of the heave-roll grid."""
        return self.heave_roll_heave_mm or self.heave_mm

    @property
    def grid_roll_deg(self) -> tuple[float, float] | None:
        """The roll range of the heave-roll grid."""
        return self.heave_roll_roll_deg or self.roll_deg


@dataclass(frozen=True)
class Limits:
    """Limits of the checks; defaults of DESIGN §6 (common practice, no source)."""

    route_ratio: tuple[float, float] = (0.95, 1.05)
    line_of_action_deg: float = 3.0
    transmission_angle_deg: tuple[float, float] = (40.0, 140.0)
    heave_sensitivity: float = 0.05
    sprung_leakage: float = 0.05
    buckling_reserve: float = 3.0
    tension_reserve: float = 2.0
    clearance_mm: float = 5.0
    compliance_mm: float = 1.0
    element_attitude_deg: float = 0.5
    """plumbrod's own default, no source: choose yours."""


@dataclass(frozen=True)
class Design:
    """A whole design: bodies, members, elements, sweeps and limits."""

    name: str
    source: str
    """Where the design came from (a file path, or a description)."""
    plane: Plane | None
    corners: tuple[Corner, ...]
    rockers: tuple[Rocker, ...]
    rods: tuple[Rod, ...]
    elements: tuple[Element, ...]
    pickups: dict[str, Pickup]
    """Every user pickup by full name ``<body>.<pickup>``."""
    sweeps: Sweeps = field(default_factory=Sweeps)
    limits: Limits = field(default_factory=Limits)
    load_cases: tuple[LoadCase, ...] = ()
    materials: tuple[MaterialSpec, ...] = ()
    zones: tuple[Zone, ...] = ()
    note: str = ""
    top_speed_kmh: float | None = None
    """Speed of the default load cases when the design gives none."""
    car: Car = field(default_factory=Car)
    motion_centre_given: bool = True
    """False when ``[sweeps] motion_centre_mm`` took its default."""
    tradeoff: TradeoffSpec | None = None
    """The ride study's inputs (``[tradeoff]``), when the design has them."""

    def corner(self, name: str) -> Corner:
        """The corner called ``name``."""
        for corner in self.corners:
            if corner.name == name:
                return corner
        raise KeyError(name)

    @property
    def body_names(self) -> tuple[str, ...]:
        """Every body: chassis, corner bodies, rockers, elements."""
        names: list[str] = [CHASSIS]
        for corner in self.corners:
            names.extend(corner.bodies)
        names.extend(r.name for r in self.rockers)
        names.extend(e.name for e in self.elements)
        return tuple(names)
