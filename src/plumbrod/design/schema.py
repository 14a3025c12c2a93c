"""The design-file schema: one entry per key path, the single source of truth.

Each :class:`Key` gives a key path (``*`` stands for a name the user chooses, as in
``corners.*.tyre_radius_mm``), its kind of value, unit, default, allowed range, whether
it is required, and a one-line meaning.  The section readers (``build_*.py``) take the
allowed and required keys, the defaults and the ranges from here; the key reference in
``examples/README.md`` (:mod:`plumbrod.design.reference`) and the JSON Schema
(:mod:`plumbrod.design.json_schema`) are generated from it.

Adding a key is one entry in :data:`KEYS` (and the line in the section reader that
hands its value to the model).  See DEVELOPERS.md, "Adding a design-file key".
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

__all__ = [
    "COORDINATE_LIMIT_MM",
    "KEYS",
    "MAX_GRID_POSES",
    "MAX_STEPS",
    "Key",
    "children",
    "entry",
]

COORDINATE_LIMIT_MM = 100_000.0
"""Every coordinate within ±100 m of the origin (a car is a few metres long)."""
MAX_STEPS = 10_001
"""Poses of one sweep at most."""
MAX_GRID_POSES = 250_000
"""Poses of the heave-roll grid at most (product of its two step counts)."""

KINDS = (
    "table",  # a table of the keys below it
    "named",  # a table of tables (or values) whose names the user chooses: child "*"
    "string",
    "boolean",
    "number",
    "integer",
    "point",  # [x, y, z] mm, or the view's two coordinates in a planar design
    "zone_point",  # [x, y, z] always; a planar design also takes its view's two
    "range",  # [from, to], from < to
    "vector3",  # three numbers
    "axis",  # two points
    "ends",  # two pickup names
    "outline",  # at least three [a, b] corners
    "steps2",  # two whole numbers
)

_NUMERIC_KINDS = ("number", "integer", "point", "zone_point", "range", "vector3", "axis")


@dataclass(frozen=True)
class Key:
    """One key of the design file.

    ``minimum``/``maximum`` bound the value (each number of a point, range or vector);
    ``open_minimum`` makes the lower bound exclusive (``> minimum``).  ``when`` limits
    the key to designs with one of the given tags: ``3d``, ``front``, ``side`` (the
    plane), ``double_wishbone``, or a zone kind ``box``/``cylinder``/``prism``.
    ``missing`` is the fix shown when a required key is absent; ``too_low`` a
    (problem, fix) pair replacing the usual message below the minimum (``{value}`` is
    filled in).  ``shape`` names a vector's numbers in messages (``[lx, ly, lz]``).
    """

    path: str
    kind: str
    meaning: str
    unit: str = ""
    default: Any = None
    minimum: float | None = None
    maximum: float | None = None
    open_minimum: bool = False
    required: bool = False
    choices: tuple[str, ...] = ()
    when: tuple[str, ...] = ()
    missing: str = "add it"
    too_low: tuple[str, str] = ()  # type: ignore[assignment]
    shape: str = ""
    open: bool = False
    """A table whose keys its own reader checks (not listed here yet)."""

    @property
    def name(self) -> str:
        """The last part of the path."""
        return self.path.rsplit(".", 1)[-1]

    @property
    def parent(self) -> str:
        """The path of the table holding this key ("" for a top-level table)."""
        return self.path.rpartition(".")[0]

    @property
    def numeric(self) -> bool:
        """Whether the value is, or is made of, numbers with a range."""
        return self.kind in _NUMERIC_KINDS

    def applies(self, tags: tuple[str, ...] | frozenset[str]) -> bool:
        """Whether the key is allowed in a design with these tags."""
        return not self.when or any(t in tags for t in self.when)


_C = COORDINATE_LIMIT_MM
_POINT = {"minimum": -_C, "maximum": _C, "unit": "mm"}
_POSITIVE = {"minimum": 0.0, "open_minimum": True}
_PLANES = ("3d", "front", "side")


def _k(path: str, kind: str, meaning: str, **more: Any) -> Key:
    return Key(path, kind, meaning, **more)


KEYS: tuple[Key, ...] = (
    # -- top level --------------------------------------------------------------
    _k("design", "table", "name and kind of the design", required=True,
       missing='add a [design] table with name = "..."'),
    _k("chassis", "table", "hardpoints fixed to the chassis"),
    _k("corners", "named", "the wheels the routes reach (at least one)", required=True,
       missing="add at least one [corners.<name>] table"),
    _k("rockers", "named", "rockers (bell cranks) turning about an axis in their parent"),
    _k("rods", "named", "straight two-force members between two pickups"),
    _k("elements", "named", "the aero elements carried (at least one)", required=True,
       missing="add at least one [elements.<name>] table"),
    _k("sweeps", "table", "ranges and steps of the motions swept"),
    _k("limits", "table", "limits of the checks (common practice unless you set your own)"),
    _k("load_cases", "named", "load cases; without them, two from top_speed_kmh"),
    _k("materials", "named", "materials added or overridden, by id"),
    _k("zones", "named", "keep-out solids fixed to the chassis"),
    _k("tune", "table", "what plumbrod tune may move and must meet (read by design/tune_spec.py)",
       open=True),
    _k("car", "table", "the car around the route: wheelbase, tracks, wheel rates, roll share "
       "(read by design/car.py)", open=True),
    _k("tradeoff", "table",
       "quarter-car road study of plumbrod tradeoff (read by design/tradeoff_spec.py)",
       open=True),
    # -- [design] -----------------------------------------------------------------
    _k("design.name", "string", "shown in every report", required=True,
       missing='add name = "..." under [design]'),
    _k("design.note", "string", "free text", default=""),
    _k("design.plane", "string", "makes the design planar: side view [x, z] or front view [y, z]",
       choices=("front", "side")),
    _k("design.mirror", "boolean",
       "copy every item whose name contains 'left' to the name with 'right', y negated "
       "(not with plane = \"side\")", default=False),
    _k("design.top_speed_kmh", "number",
       "speed of the two default load cases, used when [load_cases] is absent",
       unit="km/h", maximum=500.0, **_POSITIVE),
    # -- [chassis] ------------------------------------------------------------------
    _k("chassis.pickups", "named", "hardpoints fixed to the chassis: <name> = <point>"),
    _k("chassis.pickups.*", "point", "a hardpoint", **_POINT),
    # -- [corners.<name>] -----------------------------------------------------------
    _k("corners.*", "table", "one wheel and its upright"),
    _k("corners.*.wheel_centre_mm", "point", "wheel centre", required=True,
       missing="add the wheel centre at static ride height, [x, y, z] in mm", **_POINT),
    _k("corners.*.tyre_radius_mm", "number",
       "loaded radius; the wheel's lowest point stays on the ground in body motions",
       unit="mm", maximum=2000.0, required=True, missing="add the loaded tyre radius in mm",
       **_POSITIVE),
    _k("corners.*.tyre_width_mm", "number", "for the tyre envelope", unit="mm",
       maximum=2000.0, required=True, missing="add the tyre width in mm", **_POSITIVE),
    _k("corners.*.suspension", "string",
       "a vertical slider (the upright moves straight along chassis z), or a double "
       "wishbone solved at every pose", required=True, choices=("slider", "double_wishbone"),
       missing='add suspension = "slider" or "double_wishbone"'),
    _k("corners.*.wishbones", "table", "the wishbone hardpoints (double wishbone only)"),
    _k("corners.*.unsprung_mass_kg", "number",
       "the corner's own unsprung mass, shown beside what the route adds", unit="kg",
       minimum=0.0, maximum=2000.0),
    _k("corners.*.pickups", "table", "pickups on the corner's bodies"),
    _k("corners.*.wishbones.upper_front_mm", "point", "upper wishbone, front inner pivot",
       when=("3d", "side"), required=True, **_POINT),
    _k("corners.*.wishbones.upper_rear_mm", "point",
       "upper wishbone, rear inner pivot (it turns about the line through both)",
       when=("3d", "side"), required=True, **_POINT),
    _k("corners.*.wishbones.upper_inner_mm", "point",
       "upper wishbone's inner pivot (front view; its axis runs along x)", when=("front",),
       required=True, **_POINT),
    _k("corners.*.wishbones.upper_outer_mm", "point", "upper ball joint on the upright",
       required=True, **_POINT),
    _k("corners.*.wishbones.lower_front_mm", "point", "lower wishbone, front inner pivot",
       when=("3d", "side"), required=True, **_POINT),
    _k("corners.*.wishbones.lower_rear_mm", "point", "lower wishbone, rear inner pivot",
       when=("3d", "side"), required=True, **_POINT),
    _k("corners.*.wishbones.lower_inner_mm", "point",
       "lower wishbone's inner pivot (front view; its axis runs along x)", when=("front",),
       required=True, **_POINT),
    _k("corners.*.wishbones.lower_outer_mm", "point", "lower ball joint on the upright",
       required=True, **_POINT),
    _k("corners.*.wishbones.tie_rod_inner_mm", "point", "tie rod, chassis end",
       when=("3d", "side"), required=True, **_POINT),
    _k("corners.*.wishbones.tie_rod_outer_mm", "point", "tie rod, upright end",
       when=("3d", "side"), required=True, **_POINT),
    _k("corners.*.pickups.upright", "named", "pickups on the upright: <name> = <point>"),
    _k("corners.*.pickups.upper", "named", "pickups on the upper wishbone",
       when=("double_wishbone",)),
    _k("corners.*.pickups.lower", "named", "pickups on the lower wishbone",
       when=("double_wishbone",)),
    _k("corners.*.pickups.upright.*", "point", "a pickup on the upright", **_POINT),
    _k("corners.*.pickups.upper.*", "point", "a pickup on the upper wishbone", **_POINT),
    _k("corners.*.pickups.lower.*", "point", "a pickup on the lower wishbone", **_POINT),
    # -- [rockers.<name>] -------------------------------------------------------------
    _k("rockers.*", "table", "a rigid body turning about an axis fixed in its parent"),
    _k("rockers.*.parent", "string",
       '"chassis", a corner body such as "front_left.lower", or an element (an equaliser)',
       required=True,
       missing='add parent = "chassis" (or a corner body such as "front_left.lower")'),
    _k("rockers.*.axis_mm", "axis", "two points on the pivot axis", when=("3d",),
       required=True, **_POINT),
    _k("rockers.*.pivot_mm", "point", "the pivot; the axis is normal to the view",
       when=("front", "side"), required=True, **_POINT),
    _k("rockers.*.pickups", "named", "pickups on the rocker: <name> = <point>", required=True),
    _k("rockers.*.mass_kg", "number",
       "mass, for loads and unsprung mass (a point mass at its pickups' centroid)",
       unit="kg", minimum=0.0, maximum=1000.0),
    _k("rockers.*.plate", "table", "plate data for mass, clearance and the cut outline"),
    _k("rockers.*.pickups.*", "point", "a pickup on the rocker", **_POINT),
    _k("rockers.*.plate.thickness_mm", "number", "plate thickness", unit="mm",
       maximum=200.0, required=True, **_POSITIVE),
    _k("rockers.*.plate.material", "string", "a material id (plumbrod column --list-materials)",
       required=True, missing='add material = "4130-N" (see plumbrod column --list-materials)'),
    _k("rockers.*.plate.pivot_hole_mm", "number", "diameter of the pivot hole", unit="mm",
       default=10.0, maximum=500.0, **_POSITIVE),
    _k("rockers.*.plate.hole_mm", "number", "diameter of every pickup hole", unit="mm",
       default=8.0, maximum=500.0, **_POSITIVE),
    _k("rockers.*.plate.holes_mm", "named", "hole diameters by pickup: { <pickup> = <mm> }"),
    _k("rockers.*.plate.edge_margin_mm", "number",
       "material left around each hole (at most 100 mm: the plate outline's cost grows "
       "with it)", unit="mm", default=6.0, maximum=100.0,
       **_POSITIVE),
    _k("rockers.*.plate.holes_mm.*", "number", "this pickup's hole diameter", unit="mm",
       maximum=500.0, **_POSITIVE),
    # -- [elements.<name>] -------------------------------------------------------------
    _k("elements.*", "table", "a rigid aero element located by rods"),
    _k("elements.*.kind", "string", "informative", default="other",
       choices=("wing", "splitter", "undertray", "other")),
    _k("elements.*.mass_kg", "number", "mass", unit="kg", minimum=0.0, maximum=5000.0,
       required=True, missing="add the mass in kg"),
    _k("elements.*.cg_mm", "point", "centre of gravity", required=True,
       missing="add the centre of gravity [x, y, z] in mm", **_POINT),
    _k("elements.*.centre_of_pressure_mm", "point",
       "where the aero force acts; its height is the element's ride height", required=True,
       missing="add the centre of pressure [x, y, z] in mm", **_POINT),
    _k("elements.*.pickups", "named", "pickups on the element: <name> = <point>",
       required=True),
    _k("elements.*.aero", "table", "aerodynamic data: force ½ρV²·S·C at the centre of pressure"),
    _k("elements.*.inertia_kg_m2", "vector3",
       "moments of inertia about the cg; estimated as a uniform block when missing",
       unit="kg·m²", minimum=0.0, maximum=10_000.0, shape="[Ixx, Iyy, Izz] in kg·m²",
       too_low=("expected zero or more, got {value}", "moments of inertia cannot be negative")),
    _k("elements.*.envelope", "table", "a box fixed in the element, for clearance"),
    _k("elements.*.strike", "table",
       "a ground strike: an upward force on the element, as its own load case"),
    _k("elements.*.pickups.*", "point", "a pickup on the element", **_POINT),
    _k("elements.*.aero.reference_area_m2", "number", "reference area S", unit="m²",
       maximum=100.0, required=True, **_POSITIVE),
    _k("elements.*.aero.downforce_coefficient", "number", "C_L with downforce positive",
       minimum=-20.0, maximum=20.0, required=True),
    _k("elements.*.aero.drag_coefficient", "number", "C_D", minimum=0.0, maximum=20.0,
       required=True),
    _k("elements.*.envelope.centre_mm", "zone_point", "centre of the box at the design pose",
       required=True, **_POINT),
    _k("elements.*.envelope.size_mm", "vector3", "full length of the box along x, y, z",
       unit="mm", maximum=2 * _C, required=True, shape="[lx, ly, lz] in mm", **_POSITIVE,
       too_low=("expected a positive size, got {value}",
                "give the box's full length along each axis")),
    _k("elements.*.envelope.rotation_deg", "vector3",
       "rotation about x, then y, then z", unit="deg", default=(0.0, 0.0, 0.0),
       minimum=-360.0, maximum=360.0, shape="[about x, about y, about z] in degrees"),
    # -- [rods.<name>] -------------------------------------------------------------------
    _k("elements.*.strike.strike_N", "number", "upward ground-strike force", unit="N",
       maximum=10_000_000.0, required=True, **_POSITIVE),
    _k("elements.*.strike.at_mm", "point", "where it acts on the element", required=True,
       **_POINT),
    _k("rods.*", "table", "a straight two-force member"),
    _k("rods.*.ends", "ends", '["<body>.<pickup>", "<body>.<pickup>"], on two different bodies',
       required=True, missing='add ends = ["body.pickup", "body.pickup"]'),
    _k("rods.*.material", "string",
       "a material id (plumbrod column --list-materials) or one of [materials]",
       required=True, missing='add material = "4130-N" (see plumbrod column --list-materials)'),
    _k("rods.*.od_mm", "number", "outside diameter (bar diameter for a solid bar)", unit="mm",
       minimum=0.5, maximum=500.0, required=True, missing="add the outside diameter in mm"),
    _k("rods.*.wall_mm", "number", "tube wall, below od_mm / 2 (required for a tube)",
       unit="mm", minimum=0.01, maximum=250.0),
    _k("rods.*.solid", "boolean", "a solid round bar (then no wall_mm)", default=False),
    _k("rods.*.end_fixity", "number",
       "effective-length factor K (1: ball joints at both ends)", default=1.0,
       minimum=0.1, maximum=10.0),
    _k("rods.*.rod_end_rating_N", "number",
       "the rod end's rated load; member-force fails above it", unit="N",
       maximum=10_000_000.0, **_POSITIVE),
    _k("rods.*.rod_end_allowance_mm", "number",
       "extra length of the rod's clearance capsule at each end", unit="mm", default=0.0,
       minimum=0.0, maximum=1000.0),
    # -- [sweeps] --------------------------------------------------------------------------
    _k("sweeps.travel", "table",
       "every wheel together relative to the body (- rebound, + bump)"),
    _k("sweeps.heave", "table", "the body, wheels on the ground (+ = body up)"),
    _k("sweeps.roll", "table", "roll about x (+ lifts the left side)"),
    _k("sweeps.pitch", "table", "pitch about y (+ = nose down)"),
    _k("sweeps.heave_roll", "table", "the grid of the heave and roll ranges (off unless given)"),
    _k("sweeps.motion_centre_mm", "point",
       "where the roll and pitch axes pass (default: mid-wheelbase on the ground when the "
       "wheelbase is known, else the origin)",
       default=(0.0, 0.0, 0.0), **_POINT),
    _k("sweeps.travel.range_mm", "range", "wheel travel swept", unit="mm",
       default=(-40.0, 40.0), minimum=-1000.0, maximum=1000.0),
    _k("sweeps.travel.steps", "integer", "poses", default=201, minimum=3, maximum=MAX_STEPS),
    _k("sweeps.travel.enabled", "boolean", "false leaves the sweep out", default=True),
    _k("sweeps.heave.range_mm", "range", "body heave swept", unit="mm", default=(-25.0, 25.0),
       minimum=-1000.0, maximum=1000.0),
    _k("sweeps.heave.steps", "integer", "poses", default=41, minimum=3, maximum=MAX_STEPS),
    _k("sweeps.heave.enabled", "boolean", "false leaves the sweep out", default=True),
    _k("sweeps.roll.range_deg", "range", "body roll swept", unit="deg", default=(-2.0, 2.0),
       minimum=-45.0, maximum=45.0),
    _k("sweeps.roll.steps", "integer", "poses", default=41, minimum=3, maximum=MAX_STEPS),
    _k("sweeps.roll.enabled", "boolean", "false leaves the sweep out", default=True),
    _k("sweeps.pitch.range_deg", "range", "body pitch swept", unit="deg",
       default=(-1.5, 1.5), minimum=-45.0, maximum=45.0),
    _k("sweeps.pitch.steps", "integer", "poses", default=41, minimum=3, maximum=MAX_STEPS),
    _k("sweeps.pitch.enabled", "boolean", "false leaves the sweep out", default=True),
    _k("sweeps.heave_roll.steps", "steps2",
       f"[heave steps, roll steps]; at most {MAX_GRID_POSES:,} poses in all",
       required=True, minimum=3, maximum=MAX_STEPS),
    # -- [limits] ----------------------------------------------------------------------------
    _k("sweeps.heave_roll.range_heave_mm", "range",
       "the grid's own heave range (default: the heave sweep's)", unit="mm",
       minimum=-1000.0, maximum=1000.0),
    _k("sweeps.heave_roll.range_roll_deg", "range",
       "the grid's own roll range (default: the roll sweep's)", unit="deg",
       minimum=-45.0, maximum=45.0),
    _k("limits.route_ratio", "range", "element travel over wheel travel, allowed band",
       default=(0.95, 1.05), minimum=-100.0, maximum=100.0),
    _k("limits.line_of_action_deg", "number",
       "largest angle between a route's force and the wheel's travel", unit="deg",
       default=3.0, maximum=90.0, **_POSITIVE),
    _k("limits.transmission_angle_deg", "range", "allowed transmission angles at a rocker",
       unit="deg", default=(40.0, 140.0), minimum=0.0, maximum=180.0),
    _k("limits.heave_sensitivity", "number",
       "element ride-height change per mm of body heave", unit="mm/mm", default=0.05,
       maximum=10.0, **_POSITIVE),
    _k("limits.sprung_leakage", "number", "share of the vertical load reaching the body",
       default=0.05, maximum=1.0, **_POSITIVE),
    _k("limits.buckling_reserve", "number", "critical load over the largest compression",
       default=3.0, maximum=1000.0, **_POSITIVE),
    _k("limits.tension_reserve", "number", "yield load over the largest tension",
       default=2.0, maximum=1000.0, **_POSITIVE),
    _k("limits.clearance_mm", "number", "least distance between parts", unit="mm",
       default=5.0, maximum=1000.0, **_POSITIVE),
    _k("limits.compliance_mm", "number",
       "largest element deflection under load (plumbrod's own default: choose yours)",
       unit="mm", default=1.0, maximum=1000.0, **_POSITIVE),
    _k("limits.element_attitude_deg", "number",
       "largest pitch change of an element in the body sweeps (plumbrod's own default: "
       "choose yours)", unit="deg", default=0.5, maximum=90.0, **_POSITIVE),
    # -- [load_cases.<name>] ----------------------------------------------------------------
    _k("load_cases.*", "table", "one load case"),
    _k("load_cases.*.speed_kmh", "number",
       "for ½ρV²·S·C; needed when an element with aero data has no forces_N here",
       unit="km/h", default=0.0, minimum=0.0, maximum=500.0),
    _k("load_cases.*.bump_g", "number",
       "extra vertical acceleration of every mass (1 g of weight is always there)",
       unit="g", default=0.0, minimum=-20.0, maximum=20.0),
    _k("load_cases.*.longitudinal_g", "number", "+ accelerating, - braking", unit="g",
       default=0.0, minimum=-20.0, maximum=20.0),
    _k("load_cases.*.lateral_g", "number", "+ turning left", unit="g", default=0.0,
       minimum=-20.0, maximum=20.0),
    _k("load_cases.*.air_density_kg_m3", "number", "ISA sea level (ISO 2533) by default",
       unit="kg/m³", default=1.225, maximum=10.0, **_POSITIVE),
    _k("load_cases.*.forces_N", "named",
       "{ <element> = [Fx, Fy, Fz] } in the ground frame, instead of the aero data"),
    _k("load_cases.*.forces_N.*", "vector3", "force on this element", unit="N",
       minimum=-10_000_000.0, maximum=10_000_000.0, shape="[Fx, Fy, Fz] in N"),
    # -- [materials.<id>] ----------------------------------------------------------------------
    _k("load_cases.*.at_mm", "named",
       "{ <element> = <point> }: where a given force acts, instead of the centre of pressure"),
    _k("load_cases.*.at_mm.*", "point", "where this element's force acts", **_POINT),
    _k("materials.*", "table", "a material added or overridden (use certified values)"),
    _k("materials.*.modulus_MPa", "number", "Young's modulus E", unit="MPa",
       maximum=2_000_000.0, required=True, **_POSITIVE),
    _k("materials.*.yield_MPa", "number", "yield strength (0.2 % offset)", unit="MPa",
       maximum=100_000.0, required=True, **_POSITIVE),
    _k("materials.*.ultimate_MPa", "number", "ultimate tensile strength", unit="MPa",
       maximum=100_000.0, required=True, **_POSITIVE),
    _k("materials.*.density_kg_m3", "number", "density", unit="kg/m³", maximum=30_000.0,
       required=True, **_POSITIVE),
    _k("materials.*.source", "string", "where the values come from", required=True),
    # -- [zones.<name>] ---------------------------------------------------------------------------
    _k("zones.*", "table", "a keep-out solid fixed to the chassis"),
    _k("zones.*.kind", "string", "the solid", required=True,
       choices=("box", "cylinder", "prism"),
       missing='add kind = "box", "cylinder" or "prism"'),
    _k("zones.*.clearance_mm", "number", "this zone's own clearance limit", unit="mm",
       minimum=0.0, maximum=1000.0),
    _k("zones.*.centre_mm", "zone_point", "centre of the box", when=("box",), required=True,
       **_POINT),
    _k("zones.*.size_mm", "vector3", "full length of the box along x, y, z", unit="mm",
       when=("box",), maximum=2 * _C, required=True, shape="[lx, ly, lz] in mm", **_POSITIVE,
       too_low=("expected a positive size, got {value}",
                "give the box's full length along each axis")),
    _k("zones.*.rotation_deg", "vector3", "rotation about x, then y, then z", unit="deg",
       when=("box",), default=(0.0, 0.0, 0.0), minimum=-360.0, maximum=360.0,
       shape="[about x, about y, about z] in degrees"),
    _k("zones.*.axis_mm", "axis", "the cylinder's two end points", when=("cylinder",),
       required=True, **_POINT),
    _k("zones.*.radius_mm", "number", "the cylinder's radius", unit="mm", when=("cylinder",),
       maximum=_C, required=True, **_POSITIVE),
    _k("zones.*.plane", "string",
       'the outline\'s view: "front" = y-z, "side" = x-z, "top" = x-y', when=("prism",),
       required=True, choices=("front", "side", "top")),
    _k("zones.*.outline_mm", "outline", "the polygon's corners [a, b] in order",
       when=("prism",), required=True, **_POINT),
    _k("zones.*.depth_mm", "range", "[from, to] along the view's normal", unit="mm",
       when=("prism",), required=True, minimum=-_C, maximum=_C),
)  # fmt: skip

_BY_PATH = {k.path: k for k in KEYS}


def entry(path: str) -> Key:
    """The schema entry of a key path written with ``*`` for user-chosen names."""
    return _BY_PATH[path]


def children(path: str, tags: tuple[str, ...] | frozenset[str] | None = None) -> tuple[Key, ...]:
    """The keys directly inside the table at ``path``, in table order; with ``tags``,
    only those that apply to such a design."""
    return tuple(k for k in KEYS if k.parent == path and (tags is None or k.applies(tags)))
