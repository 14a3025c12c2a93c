"""Canonical test designs as TOML text, and small helpers to solve and measure them.

Every design here is an invented test fixture, not a real car.  Planar designs give
2-coordinate points: side view [x, z], front view [y, z] (mm).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.loading import parse_design
from plumbrod.design.model import CHASSIS, Design
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.drives import BodyDrive, TravelDrive
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.sweeps import SweepResult, SweepSpec, run_sweep

__all__ = [
    "EXAMPLE",
    "EXAMPLES",
    "FourBar",
    "FrontChain",
    "SideChain",
    "aero_text",
    "body_sweep",
    "four_bar_text",
    "freudenstein_constants",
    "front_chain_text",
    "load_cases_text",
    "parse",
    "pivot_distance_errors",
    "replace_once",
    "rigid_distance_errors",
    "rod_length_errors",
    "side_chain_text",
    "splayed_struts_text",
    "three_hangers_text",
    "travel_sweep",
]

Array = NDArray[np.float64]
ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "examples" / "hillclimb_splitter.toml"
"""The bundled 3D example (mirror = true)."""
EXAMPLES = tuple(sorted((ROOT / "examples").glob("*.toml")))
"""Every example design file (all invented scenarios)."""


def replace_once(text: str, old: str, new: str) -> str:
    """``text`` with the single occurrence of ``old`` replaced; fails loudly otherwise."""
    count = text.count(old)
    if count != 1:
        raise AssertionError(f"expected {old!r} once in the design text, found it {count} times")
    return text.replace(old, new)


def _fmt(values: tuple[float, ...]) -> str:
    return "[" + ", ".join(repr(float(v)) for v in values) + "]"


def _rod(name: str, a: str, b: str) -> str:
    return (
        f'[rods.{name}]\nends = ["{a}", "{b}"]\nmaterial = "4130-N"\nod_mm = 16.0\nwall_mm = 1.2\n'
    )


# ---------------------------------------------------------------------------------
# Side-view chain: slider corner -> drive rod -> lever rocker -> hanger -> element
# ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class SideChain:
    """A side-view route: every point [x, z] in mm.

    The element is held fore-aft and in pitch by two guide rods to the chassis; with
    ``parallel_guides`` the guides form a parallelogram, so the element only translates.
    """

    wheel_centre: tuple[float, float] = (0.0, 300.0)
    upright_drive: tuple[float, float] = (80.0, 340.0)
    pivot: tuple[float, float] = (0.0, 520.0)
    rocker_drive: tuple[float, float] = (80.0, 520.0)
    rocker_hanger: tuple[float, float] = (100.0, 580.0)
    element_hanger: tuple[float, float] = (100.0, 200.0)
    element_guide_upper: tuple[float, float] = (300.0, 210.0)
    chassis_guide_upper: tuple[float, float] = (520.0, 210.0)
    element_guide_lower: tuple[float, float] = (300.0, 120.0)
    chassis_guide_lower: tuple[float, float] = (520.0, 120.0)
    centre_of_pressure: tuple[float, float] = (200.0, 150.0)
    travel_mm: tuple[float, float] = (-40.0, 40.0)
    travel_steps: int = 81


def side_chain_text(chain: SideChain = SideChain(), *, body_sweeps: bool = True) -> str:
    """TOML of a side-view planar chain (corner ``front``, rocker ``lever``, element ``wing``)."""
    c = chain
    sweeps = f"[sweeps.travel]\nrange_mm = {_fmt(c.travel_mm)}\nsteps = {c.travel_steps}\n"
    if body_sweeps:
        sweeps += (
            "\n[sweeps.heave]\nrange_mm = [-25.0, 25.0]\nsteps = 21\n"
            "\n[sweeps.pitch]\nrange_deg = [-1.5, 1.5]\nsteps = 21\n"
        )
    else:
        sweeps += "\n[sweeps.heave]\nenabled = false\n\n[sweeps.pitch]\nenabled = false\n"
    return f"""\
# Invented test fixture: a side-view planar route.
[design]
name = "side-view chain (test fixture)"
plane = "side"

[chassis.pickups]
guide_upper = {_fmt(c.chassis_guide_upper)}
guide_lower = {_fmt(c.chassis_guide_lower)}

[corners.front]
wheel_centre_mm = {_fmt(c.wheel_centre)}
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
drive = {_fmt(c.upright_drive)}

[rockers.lever]
parent = "chassis"
pivot_mm = {_fmt(c.pivot)}

[rockers.lever.pickups]
drive = {_fmt(c.rocker_drive)}
hanger = {_fmt(c.rocker_hanger)}

[elements.wing]
kind = "wing"
mass_kg = 5.0
cg_mm = {_fmt((c.centre_of_pressure[0], c.centre_of_pressure[1] + 10.0))}
centre_of_pressure_mm = {_fmt(c.centre_of_pressure)}

[elements.wing.pickups]
hanger = {_fmt(c.element_hanger)}
guide_upper = {_fmt(c.element_guide_upper)}
guide_lower = {_fmt(c.element_guide_lower)}

{_rod("drive", "front.upright.drive", "lever.drive")}
{_rod("hanger", "lever.hanger", "wing.hanger")}
{_rod("guide_upper", "chassis.guide_upper", "wing.guide_upper")}
{_rod("guide_lower", "chassis.guide_lower", "wing.guide_lower")}
{sweeps}"""


# ---------------------------------------------------------------------------------
# Side-view four-bar: crank rocker + coupler rod + output rocker on the chassis
# ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class FourBar:
    """A crank a, coupler b, output rocker c and ground d (mm), times ``scale``.

    The ground runs along +x from the crank pivot ``o2`` to the output pivot; the
    design pose has the crank at ``theta2_deg`` and the output on the open branch.
    The crank is driven by a vertical rod from a slider corner's upright to an arm of
    ``drive_arm`` pointing along -x at the design pose; the output rocker carries a
    hanger arm of ``hanger_arm`` along +x with a vertical hanger to the element.
    """

    a: float = 40.0
    b: float = 120.0
    c: float = 80.0
    d: float = 100.0
    scale: float = 1.0
    theta2_deg: float = 70.0
    o2: tuple[float, float] = (200.0, 500.0)
    drive_arm: float = 60.0
    hanger_arm: float = 70.0

    @property
    def o4(self) -> tuple[float, float]:
        return (self.o2[0] + self.scale * self.d, self.o2[1])

    def open_theta4_deg(self, theta2_deg: float) -> float:
        """Output angle on the open branch from Freudenstein's equation (closed form).

        source: Freudenstein, Trans. ASME 77 (1955) 853-861 (pub); solution for theta4
        as the half-angle tangent quadratic in Norton, Design of Machinery, §4.5
        (memory); open branch = the minus root, checked against Norton Example 4-1
        (memory; recomputed) in the tests.
        """
        k1, k2, k3 = freudenstein_constants(self.a, self.b, self.c, self.d)
        t2 = math.radians(theta2_deg)
        big_a = math.cos(t2) - k1 - k2 * math.cos(t2) + k3
        big_b = -2.0 * math.sin(t2)
        big_c = k1 - (k2 + 1.0) * math.cos(t2) + k3
        root = math.sqrt(big_b**2 - 4.0 * big_a * big_c)
        return math.degrees(2.0 * math.atan((-big_b - root) / (2.0 * big_a)))


def freudenstein_constants(a: float, b: float, c: float, d: float) -> tuple[float, float, float]:
    """K1 = d/a, K2 = d/c, K3 = (a² − b² + c² + d²)/(2ac).

    source: Freudenstein 1955 (pub); analysis form as in Norton, Design of Machinery,
    §4.5 (memory), as quoted in REFERENCES.md.
    """
    return d / a, d / c, (a * a - b * b + c * c + d * d) / (2.0 * a * c)


def four_bar_text(bar: FourBar = FourBar()) -> str:
    """TOML of a side-view design: corner ``front``, rockers ``crank`` and ``output``,
    coupler rod ``coupler``, element ``wing`` on a vertical hanger and two guides."""
    s = bar.scale
    o2x, o2z = bar.o2
    o4x, o4z = bar.o4
    t2 = math.radians(bar.theta2_deg)
    t4 = math.radians(bar.open_theta4_deg(bar.theta2_deg))
    crank_pin = (o2x + s * bar.a * math.cos(t2), o2z + s * bar.a * math.sin(t2))
    output_pin = (o4x + s * bar.c * math.cos(t4), o4z + s * bar.c * math.sin(t4))
    crank_drive = (o2x - bar.drive_arm, o2z)
    upright_drive = (o2x - bar.drive_arm, o2z - 200.0)
    output_hanger = (o4x + bar.hanger_arm, o4z)
    element_hanger = (o4x + bar.hanger_arm, o4z - 350.0)
    guide_x = o4x + bar.hanger_arm + 150.0
    return f"""\
# Invented test fixture: a planar four-bar (crank, coupler, output rocker) in a route.
[design]
name = "four-bar route (test fixture)"
plane = "side"

[chassis.pickups]
guide_upper = {_fmt((guide_x + 200.0, element_hanger[1] + 10.0))}
guide_lower = {_fmt((guide_x + 200.0, element_hanger[1] - 70.0))}

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
drive = {_fmt(upright_drive)}

[rockers.crank]
parent = "chassis"
pivot_mm = {_fmt(bar.o2)}

[rockers.crank.pickups]
pin = {_fmt(crank_pin)}
drive = {_fmt(crank_drive)}

[rockers.output]
parent = "chassis"
pivot_mm = {_fmt(bar.o4)}

[rockers.output.pickups]
pin = {_fmt(output_pin)}
hanger = {_fmt(output_hanger)}

[elements.wing]
kind = "wing"
mass_kg = 4.0
cg_mm = {_fmt((guide_x - 60.0, element_hanger[1] - 20.0))}
centre_of_pressure_mm = {_fmt((guide_x - 60.0, element_hanger[1] - 30.0))}

[elements.wing.pickups]
hanger = {_fmt(element_hanger)}
guide_upper = {_fmt((guide_x, element_hanger[1] + 10.0))}
guide_lower = {_fmt((guide_x, element_hanger[1] - 70.0))}

{_rod("drive", "front.upright.drive", "crank.drive")}
{_rod("coupler", "crank.pin", "output.pin")}
{_rod("hanger", "output.hanger", "wing.hanger")}
{_rod("guide_upper", "chassis.guide_upper", "wing.guide_upper")}
{_rod("guide_lower", "chassis.guide_lower", "wing.guide_lower")}
[sweeps.travel]
range_mm = [-40.0, 40.0]
steps = 81

[sweeps.heave]
range_mm = [-25.0, 25.0]
steps = 21

[sweeps.pitch]
range_deg = [-1.5, 1.5]
steps = 21
"""


# ---------------------------------------------------------------------------------
# Front-view chain, for roll
# ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class FrontChain:
    """A front-view route on the left corner: every point [y, z] in mm.

    ``hanger_on_pivot`` puts the rocker's hanger pickup on its pivot: the element is
    then held by the chassis alone (the one route cannot move it), so it behaves as if
    bolted to the chassis.
    """

    centre_of_pressure: tuple[float, float] = (350.0, 150.0)
    hanger_on_pivot: bool = False


def front_chain_text(chain: FrontChain = FrontChain()) -> str:
    """TOML of a front-view planar chain (corner ``front_left``, rocker ``lever_left``,
    element ``wing``), with heave, roll and heave-roll sweeps."""
    pivot = (450.0, 520.0)
    hanger = pivot if chain.hanger_on_pivot else (560.0, 580.0)
    cop = chain.centre_of_pressure
    return f"""\
# Invented test fixture: a front-view planar route on the left wheel.
[design]
name = "front-view chain (test fixture)"
plane = "front"

[chassis.pickups]
guide_upper = [100.0, 210.0]
guide_lower = [100.0, 120.0]

[corners.front_left]
wheel_centre_mm = [700.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front_left.pickups.upright]
drive = [530.0, 340.0]

[rockers.lever_left]
parent = "chassis"
pivot_mm = {_fmt(pivot)}

[rockers.lever_left.pickups]
drive = [530.0, 520.0]
hanger = {_fmt(hanger)}

[elements.wing]
kind = "wing"
mass_kg = 5.0
cg_mm = {_fmt((cop[0], cop[1] + 10.0))}
centre_of_pressure_mm = {_fmt(cop)}

[elements.wing.pickups]
hanger = [{hanger[0]!r}, 200.0]
guide_upper = [300.0, 210.0]
guide_lower = [300.0, 120.0]

{_rod("drive_left", "front_left.upright.drive", "lever_left.drive")}
{_rod("hanger_left", "lever_left.hanger", "wing.hanger")}
{_rod("guide_upper", "chassis.guide_upper", "wing.guide_upper")}
{_rod("guide_lower", "chassis.guide_lower", "wing.guide_lower")}
[sweeps.travel]
range_mm = [-40.0, 40.0]
steps = 41

[sweeps.heave]
range_mm = [-25.0, 25.0]
steps = 21

[sweeps.roll]
range_deg = [-2.0, 2.0]
steps = 21

[sweeps.heave_roll]
steps = [5, 5]
"""


# ---------------------------------------------------------------------------------
# Load data appended to a design text
# ---------------------------------------------------------------------------------


def aero_text(
    element: str, area_m2: float, downforce_coefficient: float, drag_coefficient: float
) -> str:
    """An ``[elements.<element>.aero]`` table to append to a design text."""
    return (
        f"\n[elements.{element}.aero]\nreference_area_m2 = {area_m2!r}\n"
        f"downforce_coefficient = {downforce_coefficient!r}\n"
        f"drag_coefficient = {drag_coefficient!r}\n"
    )


def load_cases_text(cases: dict[str, dict[str, object]]) -> str:
    """``[load_cases.<name>]`` tables to append to a design text.

    Each case maps keys to numbers, except ``forces_N``: ``{element: (Fx, Fy, Fz)}``.
    """
    out = []
    for name, keys in cases.items():
        lines = [f"\n[load_cases.{name}]"]
        for key, value in keys.items():
            if key == "forces_N":
                forces = ", ".join(
                    f"{e} = {_fmt(tuple(f))}"  # type: ignore[arg-type]
                    for e, f in value.items()
                )  # type: ignore[attr-defined]
                lines.append(f"forces_N = {{ {forces} }}")
            else:
                lines.append(f"{key} = {float(value)!r}")  # type: ignore[arg-type]
        out.append("\n".join(lines) + "\n")
    return "".join(out)


# ---------------------------------------------------------------------------------
# Side-view element hung straight from one slider upright (strut routes)
# ---------------------------------------------------------------------------------


def three_hangers_text(
    hangers: tuple[tuple[str, float, str, float, float | None], ...] = (
        ("a", -200.0, "4130-N", 16.0, 1.2),
        ("b", 100.0, "4130-N", 12.0, 1.0),
        ("c", 300.0, "6061-T6", 20.0, 2.0),
    ),
    length_mm: float = 400.0,
    centre_of_pressure_x_mm: float = 180.0,
) -> str:
    """TOML of a side-view beam ``beam`` hung by vertical rods of equal length from
    pickups on the slider upright of corner ``front`` (one redundant rod when there are
    three), with one horizontal guide to the chassis at the beam's height.

    ``hangers``: (rod name, x in mm, material, od_mm, wall_mm or None for a solid bar).
    Equal lengths keep the rods parallel through the travel (a parallelogram), so the
    over-constrained beam still moves.  Travel sweep of 3 poses (-10, 0, +10 mm) only.
    """
    z_beam, z_top = 200.0, 200.0 + length_mm
    upright = "\n".join(f"{n} = {_fmt((x, z_top))}" for n, x, *_ in hangers)
    beam = "\n".join(f"{n} = {_fmt((x, z_beam))}" for n, x, *_ in hangers)
    guide_x = max(x for _, x, *_ in hangers) + 100.0
    rods = []
    for n, _, material, od, wall in hangers:
        section = "solid = true\n" if wall is None else f"wall_mm = {wall!r}\n"
        rods.append(
            f'[rods.{n}]\nends = ["front.upright.{n}", "beam.{n}"]\n'
            f'material = "{material}"\nod_mm = {od!r}\n{section}'
        )
    return f"""\
# Invented test fixture: a beam hung from one upright by parallel vertical rods.
[design]
name = "beam on parallel hangers (test fixture)"
plane = "side"

[chassis.pickups]
guide = {_fmt((guide_x + 300.0, z_beam))}

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
{upright}

[elements.beam]
kind = "other"
mass_kg = 4.0
cg_mm = {_fmt((centre_of_pressure_x_mm, z_beam + 10.0))}
centre_of_pressure_mm = {_fmt((centre_of_pressure_x_mm, z_beam))}

[elements.beam.pickups]
{beam}
guide = {_fmt((guide_x, z_beam))}

{chr(10).join(rods)}
{_rod("guide", "chassis.guide", "beam.guide")}
[sweeps.travel]
range_mm = [-10.0, 10.0]
steps = 3

[sweeps.heave]
enabled = false

[sweeps.pitch]
enabled = false
"""


def splayed_struts_text(splay_deg: float = 2.0, *, limits: str = "") -> str:
    """TOML of a side-view wing on two struts straight from the slider upright of corner
    ``front``, each ``splay_deg`` from vertical and leaning apart downwards, plus one
    horizontal guide to the chassis.  Struts ``rear`` (x -100 at the upright) and
    ``front`` (x +100), 300 mm tall; the centre of pressure at x 400 lies outside them.
    ``limits``: lines for a ``[limits]`` table.  Travel sweep of 3 poses only.
    """
    lean = 300.0 * math.tan(math.radians(splay_deg))
    table = f"\n[limits]\n{limits}\n" if limits else ""
    return f"""\
# Invented test fixture: a wing on two splayed struts from one upright.
[design]
name = "splayed struts (test fixture)"
plane = "side"

[chassis.pickups]
guide = [900.0, 200.0]

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
rear = [-100.0, 500.0]
front = [100.0, 500.0]

[elements.wing]
kind = "wing"
mass_kg = 4.0
cg_mm = [300.0, 210.0]
centre_of_pressure_mm = [400.0, 200.0]

[elements.wing.pickups]
rear = {_fmt((-100.0 - lean, 200.0))}
front = {_fmt((100.0 + lean, 200.0))}
guide = [600.0, 200.0]

{_rod("rear", "front.upright.rear", "wing.rear")}
{_rod("front", "front.upright.front", "wing.front")}
{_rod("guide", "chassis.guide", "wing.guide")}
[sweeps.travel]
range_mm = [-10.0, 10.0]
steps = 3

[sweeps.heave]
enabled = false

[sweeps.pitch]
enabled = false
{table}"""


# ---------------------------------------------------------------------------------
# Solving helpers
# ---------------------------------------------------------------------------------


def parse(text: str, source: str = "<test design>") -> tuple[Design, Linkage]:
    """The validated design and its linkage."""
    design = parse_design(text, source)
    return design, build_linkage(design)


def travel_sweep(link: Linkage, travel_mm: Array) -> SweepResult:
    """Every wheel at each travel of ``travel_mm`` (B,), solved with tangents."""
    s = np.asarray(travel_mm, dtype=float)
    nc = len(link.corner_names)
    spec = SweepSpec("travel", TravelDrive(np.repeat(s[:, None], nc, axis=1)), {"travel_mm": s})
    return run_sweep(link, spec)


def body_sweep(
    link: Linkage,
    heave_mm: Array,
    roll_deg: Array,
    pitch_deg: Array,
    centre_mm: tuple[float, float, float] = (0.0, 0.0, 0.0),
) -> SweepResult:
    """The body at each (heave, roll, pitch) with the wheels on the ground."""
    params = np.stack(
        (np.asarray(heave_mm, float), np.radians(roll_deg), np.radians(pitch_deg)), axis=1
    )
    spec = SweepSpec(
        "body",
        BodyDrive(params, centre_mm),
        {
            "heave_mm": params[:, 0],
            "roll_deg": np.asarray(roll_deg, float),
            "pitch_deg": np.asarray(pitch_deg, float),
        },
    )
    return run_sweep(link, spec)


# ---------------------------------------------------------------------------------
# Invariants measured from solved points, against lengths taken from the Design
# ---------------------------------------------------------------------------------


def _at(link: Linkage, points: Array, name: str) -> Array:
    return points[:, link.point(name)]


def rod_length_errors(design: Design, link: Linkage, points: Array) -> dict[str, Array]:
    """|current length − design length| (B,) in mm for every rod and tie rod.

    Design lengths come from the design's pickup positions, not from the linkage.
    """
    out: dict[str, Array] = {}
    for rod in design.rods:
        a = np.array(design.pickups[rod.end_a].position_mm)
        b = np.array(design.pickups[rod.end_b].position_mm)
        now = np.linalg.norm(_at(link, points, rod.end_a) - _at(link, points, rod.end_b), axis=-1)
        out[rod.name] = np.abs(now - np.linalg.norm(a - b))
    for corner in design.corners:
        w = corner.wishbones
        if w is None or w.tie_rod_inner_mm is None or w.tie_rod_outer_mm is None:
            continue
        inner = np.array(w.tie_rod_inner_mm)  # fixed in the chassis
        outer = _at(link, points, f"{corner.upright}.tie_rod_outer")
        length = np.linalg.norm(np.array(w.tie_rod_outer_mm) - inner)
        out[f"{corner.name} tie rod"] = np.abs(np.linalg.norm(outer - inner, axis=-1) - length)
    return out


def pivot_distance_errors(design: Design, link: Linkage, points: Array) -> dict[str, Array]:
    """Changes (B,) in mm of the distances a pivot must hold.

    * each pickup of a chassis-mounted rocker: distance to its pivot axis and axial
      position along it (the axis from the design file, fixed in the chassis);
    * each wishbone's outer ball joint, taken on the upright: distance to both inner
      pivots (fixed in the chassis), and its gap to the ball on the wishbone.
    """
    out: dict[str, Array] = {}
    for rocker in design.rockers:
        if rocker.parent != CHASSIS:
            continue
        a = np.array(rocker.axis_a_mm)
        b = np.array(rocker.axis_b_mm)
        u = (b - a) / np.linalg.norm(b - a)
        for key, pickup in design.pickups.items():
            if pickup.body != rocker.name:
                continue
            p0 = np.array(pickup.position_mm) - a
            r0 = np.linalg.norm(p0 - (p0 @ u) * u)
            p = _at(link, points, key) - a
            axial = p @ u
            radial = np.linalg.norm(p - axial[:, None] * u, axis=-1)
            out[f"{key} radius"] = np.abs(radial - r0)
            out[f"{key} axial"] = np.abs(axial - p0 @ u)
    for corner in design.corners:
        w = corner.wishbones
        if w is None:
            continue
        for side in ("upper", "lower"):
            ball0 = np.array(getattr(w, f"{side}_outer_mm"))
            on_upright = _at(link, points, f"{corner.upright}.{side}_ball")
            on_arm = _at(link, points, f"{corner.name}.{side}.outer_ball")
            for end in ("front", "rear"):
                inner = np.array(getattr(w, f"{side}_{end}_mm"))
                out[f"{corner.name} {side} ball to {end} pivot"] = np.abs(
                    np.linalg.norm(on_upright - inner, axis=-1) - np.linalg.norm(ball0 - inner)
                )
            out[f"{corner.name} {side} ball gap"] = np.linalg.norm(on_upright - on_arm, axis=-1)
    return out


def rigid_distance_errors(design: Design, link: Linkage, points: Array) -> dict[str, Array]:
    """Largest change (B,) in mm of any distance between two user pickups on one body."""
    by_body: dict[str, list[str]] = {}
    for key, pickup in design.pickups.items():
        by_body.setdefault(pickup.body, []).append(key)
    out: dict[str, Array] = {}
    for body, keys in by_body.items():
        if len(keys) < 2:
            continue
        p0 = np.array([design.pickups[k].position_mm for k in keys])
        p = points[:, [link.point(k) for k in keys]]
        d0 = np.linalg.norm(p0[:, None] - p0[None], axis=-1)
        d = np.linalg.norm(p[:, :, None] - p[:, None], axis=-1)
        out[body] = np.abs(d - d0).max(axis=(1, 2))
    return out
