"""Small whole designs for the structural figures (rod reserves, mass, compliance).

Every design here is an invented test fixture, not a real car.  Each is planar and laid
out so that its forces, masses and stiffness can be worked out by hand at the design
pose: rods vertical or horizontal, rocker arms horizontal, loads on the line of the rod
that carries them.  Side view: points [x, z]; front view: points [y, z] (mm).

``FEATHER`` is a test material with the stiffness and yield of 4130-N and a negligible
density (the design-file format needs a positive one), for designs whose rods should
weigh nothing; :func:`tube_area_mm2` and friends give the section and rod figures
independently of plumbrod.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = [
    "FEATHER",
    "STEEL_4130N",
    "FrontPair",
    "Hang",
    "RodSpec",
    "Strut",
    "front_pair_text",
    "hang_text",
    "rod_mass_kg",
    "strut_text",
    "tube_area_mm2",
    "tube_second_moment_mm4",
]


@dataclass(frozen=True)
class MaterialFigures:
    """E, S_y (MPa) and density (kg/m³) as the tests use them, apart from plumbrod."""

    id: str
    modulus_MPa: float
    yield_MPa: float
    density_kg_m3: float


# source: ASM Aerospace Specification Metals datasheet for AISI 4130 normalized at 870 °C
# (via MatWeb): E 205 GPa, yield 435 MPa, density 7.85 g/cm³, pub (REFERENCES.md,
# Materials).
STEEL_4130N = MaterialFigures("4130-N", 205000.0, 435.0, 7850.0)
FEATHER = MaterialFigures("feather", 205000.0, 435.0, 1e-9)
"""Test-only material: 4130-N stiffness and yield, density 1e-9 kg/m³ (rods ~1e-20 kg)."""


def tube_area_mm2(od_mm: float, wall_mm: float | None) -> float:
    """A = π(D² − d²)/4 of a round tube (a solid bar when ``wall_mm`` is None)."""
    inner = 0.0 if wall_mm is None else od_mm - 2.0 * wall_mm
    return math.pi * (od_mm**2 - inner**2) / 4.0


def tube_second_moment_mm4(od_mm: float, wall_mm: float | None) -> float:
    """I = π(D⁴ − d⁴)/64 of a round tube (a solid bar when ``wall_mm`` is None)."""
    inner = 0.0 if wall_mm is None else od_mm - 2.0 * wall_mm
    return math.pi * (od_mm**4 - inner**4) / 64.0


def rod_mass_kg(
    material: MaterialFigures, od_mm: float, wall_mm: float | None, length_mm: float
) -> float:
    """ρ·A·L with A in mm² and L in mm converted to m³."""
    return material.density_kg_m3 * tube_area_mm2(od_mm, wall_mm) * length_mm * 1e-9


@dataclass(frozen=True)
class RodSpec:
    """Section and material of the rods of a fixture (a solid bar when ``wall_mm`` is None)."""

    od_mm: float = 12.0
    wall_mm: float | None = 1.0
    material: MaterialFigures = STEEL_4130N
    end_fixity: float = 1.0

    def area_mm2(self) -> float:
        return tube_area_mm2(self.od_mm, self.wall_mm)

    def mass_kg(self, length_mm: float) -> float:
        return rod_mass_kg(self.material, self.od_mm, self.wall_mm, length_mm)

    def stiffness_N_per_mm(self, length_mm: float) -> float:
        """k = EA/L."""
        return self.material.modulus_MPa * self.area_mm2() / length_mm


def _fmt(values: tuple[float, ...]) -> str:
    return "[" + ", ".join(repr(float(v)) for v in values) + "]"


def _rod(name: str, a: str, b: str, spec: RodSpec) -> str:
    section = "solid = true\n" if spec.wall_mm is None else f"wall_mm = {spec.wall_mm!r}\n"
    return (
        f'[rods.{name}]\nends = ["{a}", "{b}"]\nmaterial = "{spec.material.id}"\n'
        f"od_mm = {spec.od_mm!r}\n{section}end_fixity = {spec.end_fixity!r}\n"
    )


def _materials(*specs: RodSpec) -> str:
    if not any(s.material is FEATHER for s in specs):
        return ""
    m = FEATHER
    return (
        f"[materials.{m.id}]\nmodulus_MPa = {m.modulus_MPa!r}\n"
        f"yield_MPa = {m.yield_MPa!r}\nultimate_MPa = 670.0\n"
        f"density_kg_m3 = {m.density_kg_m3!r}\n"
        'source = "test fixture: 4130-N stiffness and yield, negligible density"\n'
    )


def _sweeps(travel_mm: float, steps: int, plane: str) -> str:
    body = (
        "[sweeps.heave]\nenabled = false\n\n[sweeps.pitch]\nenabled = false\n"
        if plane == "side"
        else "[sweeps.heave]\nenabled = false\n\n[sweeps.roll]\nenabled = false\n"
    )
    return (
        f"[sweeps.travel]\nrange_mm = [{-travel_mm!r}, {travel_mm!r}]\nsteps = {steps}\n\n" + body
    )


def _load_case(element: str, force_N: float, bump_g: float = 0.0) -> str:
    return (
        f"[load_cases.down]\nspeed_kmh = 0.0\nbump_g = {bump_g!r}\n"
        f"forces_N = {{ {element} = [0.0, 0.0, {-force_N!r}] }}\n"
    )


# ---------------------------------------------------------------------------------
# Side view: element hung below one slider corner, directly or through a lever
# ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class Hang:
    """An element hung below a slider corner by a vertical hanger (side view).

    ``ratio`` None: the hanger starts on the upright (route ratio 1).  Otherwise a
    chassis rocker with horizontal arms: a vertical drive rod from the upright to the
    arm ``drive_arm_mm`` from the pivot, and the hanger from the arm ``ratio`` times as
    long on the same side, so the element moves ``ratio`` mm per mm of wheel travel.
    The element is held fore-aft and in pitch by two equal, parallel, horizontal guide
    rods to the chassis (it translates only, at the design pose); its cg and centre of
    pressure are straight below the hanger.  ``inertia_kg_m2`` None leaves the inertia
    to plumbrod's estimate.
    """

    ratio: float | None = None
    element_mass_kg: float = 5.0
    inertia_kg_m2: tuple[float, float, float] | None = (0.0, 0.0, 0.0)
    force_N: float = 1000.0
    rods: RodSpec = RodSpec()
    drive_arm_mm: float = 80.0
    pivot_z_mm: float = 520.0
    upright_z_mm: float = 340.0
    element_z_mm: float = 200.0
    guide_length_mm: float = 220.0
    travel_mm: float = 1.0
    travel_steps: int = 5

    @property
    def hanger_x_mm(self) -> float:
        return 100.0 if self.ratio is None else self.ratio * self.drive_arm_mm

    @property
    def hanger_length_mm(self) -> float:
        top = self.upright_z_mm if self.ratio is None else self.pivot_z_mm
        return top - self.element_z_mm

    @property
    def drive_length_mm(self) -> float:
        return self.pivot_z_mm - self.upright_z_mm


def hang_text(h: Hang = Hang()) -> str:
    """TOML of :class:`Hang`: corner ``front``, element ``wing``, rods ``hanger``,
    ``guide_upper``, ``guide_lower`` and, with a lever, rocker ``lever`` and rod ``drive``."""
    x = h.hanger_x_mm
    gx = x + 200.0
    ze = h.element_z_mm
    if h.ratio is None:
        lever = ""
        upright = f"hanger = {_fmt((x, h.upright_z_mm))}\n"
        top = "front.upright.hanger"
        drive = ""
    else:
        a = h.drive_arm_mm
        upright = f"drive = {_fmt((a, h.upright_z_mm))}\n"
        lever = (
            f'[rockers.lever]\nparent = "chassis"\npivot_mm = {_fmt((0.0, h.pivot_z_mm))}'
            f"\n\n[rockers.lever.pickups]\ndrive = {_fmt((a, h.pivot_z_mm))}\n"
            f"hanger = {_fmt((x, h.pivot_z_mm))}\n"
        )
        top = "lever.hanger"
        drive = _rod("drive", "front.upright.drive", "lever.drive", h.rods)
    inertia = "" if h.inertia_kg_m2 is None else f"inertia_kg_m2 = {_fmt(h.inertia_kg_m2)}\n"
    return f"""\
# Invented test fixture: an element hung below one slider corner.
[design]
name = "hung element (test fixture)"
plane = "side"

{_materials(h.rods)}
[chassis.pickups]
guide_upper = {_fmt((gx + h.guide_length_mm, ze + 10.0))}
guide_lower = {_fmt((gx + h.guide_length_mm, ze - 80.0))}

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
{upright}
{lever}
[elements.wing]
kind = "wing"
mass_kg = {h.element_mass_kg!r}
cg_mm = {_fmt((x, ze - 40.0))}
centre_of_pressure_mm = {_fmt((x, ze - 50.0))}
{inertia}
[elements.wing.pickups]
hanger = {_fmt((x, ze))}
guide_upper = {_fmt((gx, ze + 10.0))}
guide_lower = {_fmt((gx, ze - 80.0))}

{_rod("hanger", top, "wing.hanger", h.rods)}
{drive}
{_rod("guide_upper", "chassis.guide_upper", "wing.guide_upper", h.rods)}
{_rod("guide_lower", "chassis.guide_lower", "wing.guide_lower", h.rods)}
{_load_case("wing", h.force_N)}
{_sweeps(h.travel_mm, h.travel_steps, "side")}"""


# ---------------------------------------------------------------------------------
# Side view: element standing on one vertical strut from a slider corner
# ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class Strut:
    """An element on a vertical strut of ``strut_length_mm`` from a slider corner's
    upright (side view), held by two horizontal guide rods; its cg and centre of
    pressure are on the strut's line, so the strut carries the whole vertical load in
    compression at the design pose."""

    strut: RodSpec = RodSpec()
    guides: RodSpec = RodSpec(material=FEATHER)
    strut_length_mm: float = 520.0
    element_mass_kg: float = 4.0
    force_N: float = 600.0
    bump_g: float = 0.0
    travel_mm: float = 1.0
    travel_steps: int = 5


def strut_text(s: Strut = Strut()) -> str:
    """TOML of :class:`Strut`: corner ``rear``, element ``wing``, rods ``strut``,
    ``guide_upper``, ``guide_lower``; one load case ``down``."""
    z0 = 340.0
    zt = z0 + s.strut_length_mm
    return f"""\
# Invented test fixture: an element on one vertical strut from a slider corner.
[design]
name = "strut (test fixture)"
plane = "side"

{_materials(s.strut, s.guides)}
[chassis.pickups]
guide_upper = {_fmt((420.0, zt + 30.0))}
guide_lower = {_fmt((420.0, zt - 60.0))}

[corners.rear]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.rear.pickups.upright]
strut = {_fmt((0.0, z0))}

[elements.wing]
kind = "wing"
mass_kg = {s.element_mass_kg!r}
cg_mm = {_fmt((0.0, zt + 40.0))}
centre_of_pressure_mm = {_fmt((0.0, zt + 50.0))}

[elements.wing.pickups]
strut = {_fmt((0.0, zt))}
guide_upper = {_fmt((200.0, zt + 30.0))}
guide_lower = {_fmt((200.0, zt - 60.0))}

{_rod("strut", "rear.upright.strut", "wing.strut", s.strut)}
{_rod("guide_upper", "chassis.guide_upper", "wing.guide_upper", s.guides)}
{_rod("guide_lower", "chassis.guide_lower", "wing.guide_lower", s.guides)}
{_load_case("wing", s.force_N, s.bump_g)}
{_sweeps(s.travel_mm, s.travel_steps, "side")}"""


# ---------------------------------------------------------------------------------
# Front view: one element hung from two slider corners
# ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class FrontPair:
    """A uniform bar-like element spanning ``2·half_span_mm`` in y, hung by two vertical
    hangers from the uprights of two slider corners (front view), with one horizontal
    guide rod from its centre to the chassis.  The cg, the hanger pickups and the guide
    pickup on the element are all at one height, so a single-wheel bump turns the
    element about its guide pickup without moving that point sideways.  ``inertia_kg_m2``
    None leaves the inertia to plumbrod's estimate.
    """

    element_mass_kg: float = 10.0
    inertia_kg_m2: tuple[float, float, float] | None = None
    half_span_mm: float = 500.0
    rods: RodSpec = RodSpec()
    upright_z_mm: float = 340.0
    element_z_mm: float = 150.0
    guide_length_mm: float = 300.0

    @property
    def hanger_length_mm(self) -> float:
        return self.upright_z_mm - self.element_z_mm


def front_pair_text(p: FrontPair = FrontPair()) -> str:
    """TOML of :class:`FrontPair`: corners ``front_left`` (+y) and ``front_right``,
    element ``tray``, rods ``hanger_left``, ``hanger_right``, ``guide``."""
    d, ze = p.half_span_mm, p.element_z_mm
    inertia = "" if p.inertia_kg_m2 is None else f"inertia_kg_m2 = {_fmt(p.inertia_kg_m2)}\n"
    corners = ""
    for side, sign in (("left", 1.0), ("right", -1.0)):
        corners += (
            f"[corners.front_{side}]\nwheel_centre_mm = {_fmt((sign * 700.0, 300.0))}\n"
            'tyre_radius_mm = 300.0\ntyre_width_mm = 240.0\nsuspension = "slider"\n\n'
            f"[corners.front_{side}.pickups.upright]\n"
            f"hanger = {_fmt((sign * d, p.upright_z_mm))}\n\n"
        )
    return f"""\
# Invented test fixture: one element hung from two slider corners (front view).
[design]
name = "front pair (test fixture)"
plane = "front"

{_materials(p.rods)}
[chassis.pickups]
guide = {_fmt((p.guide_length_mm, ze))}

{corners}[elements.tray]
kind = "undertray"
mass_kg = {p.element_mass_kg!r}
cg_mm = {_fmt((0.0, ze))}
centre_of_pressure_mm = {_fmt((0.0, ze))}
{inertia}
[elements.tray.pickups]
hanger_left = {_fmt((d, ze))}
hanger_right = {_fmt((-d, ze))}
guide = {_fmt((0.0, ze))}

{_rod("hanger_left", "front_left.upright.hanger", "tray.hanger_left", p.rods)}
{_rod("hanger_right", "front_right.upright.hanger", "tray.hanger_right", p.rods)}
{_rod("guide", "chassis.guide", "tray.guide", p.rods)}
{_load_case("tray", 500.0)}
{_sweeps(1.0, 5, "front")}"""
