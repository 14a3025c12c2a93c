"""Independent statics references for the tests: the loads, the ground contact and the
force and moment sums on every body, rebuilt from the design and the solved positions.

Nothing here uses plumbrod's loads or statics code: only the design values (masses,
aero data, sections, material densities), the solved point positions and the forces a
:class:`plumbrod.mechanics.statics.Statics` reports, so the sums test those forces.

Frames: everything in the chassis frame, moments about the chassis origin (N·mm).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import CHASSIS, Design, LoadCase
from plumbrod.kinematics.linkage import HINGE, SLIDE
from plumbrod.kinematics.sweeps import SweepResult
from plumbrod.mechanics.analysis import Analysis
from plumbrod.mechanics.loads import design_load_cases
from plumbrod.mechanics.members import material_table
from plumbrod.mechanics.plates import rocker_mass_kg
from plumbrod.mechanics.statics import Statics

__all__ = [
    "G0_M_S2",
    "BodySums",
    "aero_force_ground_N",
    "body_sums",
    "chassis_to_ground",
    "inertia_force_ground_N",
    "rod_mass_kg",
]

Array = NDArray[np.float64]

# source: standard acceleration of gravity g_n = 9.80665 m/s², exact by definition of the
# 3rd CGPM (1901), from memory (the same value defines the pound-force in NIST SP 811).
G0_M_S2 = 9.80665


def chassis_to_ground(result: SweepResult) -> Array:
    """(B, 3, 3) rotation taking chassis-frame vectors to the ground frame.

    ISO 8855 angles as DESIGN §2 and the README give them: ``Ry(pitch) @ Rx(roll)``;
    identity for a travel sweep (the chassis stands level).
    """
    n = result.spec.size
    values = result.spec.values
    roll = np.radians(values.get("roll_deg", np.zeros(n)))
    pitch = np.radians(values.get("pitch_deg", np.zeros(n)))
    if result.spec.is_travel:
        roll = pitch = np.zeros(n)
    out = np.empty((n, 3, 3))
    for i in range(n):
        cr, sr = math.cos(roll[i]), math.sin(roll[i])
        cp, sp = math.cos(pitch[i]), math.sin(pitch[i])
        rx = np.array([[1.0, 0.0, 0.0], [0.0, cr, -sr], [0.0, sr, cr]])
        ry = np.array([[cp, 0.0, sp], [0.0, 1.0, 0.0], [-sp, 0.0, cp]])
        out[i] = ry @ rx
    return out


def aero_force_ground_N(design: Design, element: str, case: LoadCase) -> Array:
    """The element's aero force in the ground frame (N).

    source: L = ½ρV²·S·C_L (NASA Glenn Research Center, "The Lift Coefficient", pub) and
    D = C_d·A·½ρV² (NASA Glenn, Beginner's Guide to Aeronautics, "Drag Equation",
    www1.grc.nasa.gov/beginners-guide-to-aeronautics/drag-equation/, pub); downforce
    acts down (−z), drag rearward (−x), DESIGN §6.
    """
    if element in case.forces_N:
        return np.array(case.forces_N[element], dtype=float)
    aero = next(e for e in design.elements if e.name == element).aero
    if aero is None:
        return np.zeros(3)
    v_m_s = case.speed_kmh / 3.6  # 1 km/h = 1/3.6 m/s exactly
    q_pa = 0.5 * case.air_density_kg_m3 * v_m_s**2
    return np.array(
        [
            -q_pa * aero.reference_area_m2 * aero.drag_coefficient,
            0.0,
            -q_pa * aero.reference_area_m2 * aero.downforce_coefficient,
        ]
    )


def inertia_force_ground_N(mass_kg: float, case: LoadCase) -> Array:
    """Weight and d'Alembert force of a mass in the ground frame (N): m·g·(1 + bump)
    down, −m·g·a_x along x and −m·g·a_y along y (accelerations in g; DESIGN §6)."""
    w = mass_kg * G0_M_S2
    return np.array([-w * case.longitudinal_g, -w * case.lateral_g, -w * (1.0 + case.bump_g)])


def rod_mass_kg(design: Design, rod_name: str) -> float:
    """ρ·A·L of a rod from its section, its material's density and its design length."""
    rod = next(r for r in design.rods if r.name == rod_name)
    density = material_table(design)[rod.material].density_kg_m3
    od = rod.od_mm
    inner = 0.0 if rod.wall_mm is None else od - 2.0 * rod.wall_mm
    area_mm2 = math.pi / 4.0 * (od**2 - inner**2)
    a = np.array(design.pickups[rod.end_a].position_mm)
    b = np.array(design.pickups[rod.end_b].position_mm)
    return density * area_mm2 * float(np.linalg.norm(a - b)) * 1e-9


def _point_loads(
    analysis: Analysis, result: SweepResult, cases: tuple[LoadCase, ...]
) -> list[tuple[int, Array, Array]]:
    """Every applied load: (body index, point (B, 3), force (B, K, 3)), chassis frame."""
    design, link = analysis.design, analysis.link
    kin = result.solved.kin
    rot = chassis_to_ground(result)

    def to_chassis(f_ground: Array) -> Array:  # (K, 3) -> (B, K, 3), R^T f
        return np.einsum("bji,kj->bki", rot, f_ground)

    loads: list[tuple[int, Array, Array]] = []
    for element in design.elements:
        body = link.body(element.name)
        aero = np.array([aero_force_ground_N(design, element.name, c) for c in cases])
        loads.append(
            (
                body,
                kin.points[:, link.point(f"{element.name}.centre_of_pressure")],
                to_chassis(aero),
            )
        )
        weight = np.array([inertia_force_ground_N(element.mass_kg, c) for c in cases])
        loads.append((body, kin.points[:, link.point(f"{element.name}.cg")], to_chassis(weight)))
    for rocker in design.rockers:
        # a rocker without mass_kg weighs what its plate weighs (net area x thickness x
        # density; the outline area is tested against shapely in test_plate_outline.py)
        mass = rocker_mass_kg(design, rocker)
        if not mass:
            continue
        keys = [k for k, p in design.pickups.items() if p.body == rocker.name]
        centroid = kin.points[:, [link.point(k) for k in keys]].mean(axis=1)
        weight = np.array([inertia_force_ground_N(mass, c) for c in cases])
        loads.append((link.body(rocker.name), centroid, to_chassis(weight)))
    for rod in design.rods:
        half = rod_mass_kg(design, rod.name) / 2.0
        weight = to_chassis(np.array([inertia_force_ground_N(half, c) for c in cases]))
        for end in (rod.end_a, rod.end_b):
            if design.pickups[end].body == CHASSIS:
                continue
            loads.append(
                (link.body(design.pickups[end].body), kin.points[:, link.point(end)], weight)
            )
    return loads


def _wrench(point: Array, force: Array) -> Array:
    """[f, p × f] (B, K, 6) of forces (B, K, 3) at points (B, 3)."""
    return np.concatenate((force, np.cross(point[:, None, :], force)), axis=-1)


@dataclass(frozen=True)
class BodySums:
    """Force and moment sums (B, K, nb, 6) on every body, N and N·mm about the origin.

    ``links``: from rods, ball joints and the ground (not hinge or slide reactions);
    ``applied``: aero and inertia loads; ``from_children``: what each body receives
    from the bodies hinged or sliding on it, −(their reported joint reactions);
    ``chassis_receives``: (B, K, 6) rods ending on the chassis plus its children.
    """

    links: Array
    applied: Array
    from_children: Array
    joint: Array
    chassis_receives: Array
    contact: Array  # (B, K, 6) total ground force on the tyres
    force_scale_N: float
    length_scale_mm: float


def body_sums(analysis: Analysis, sweep: str) -> BodySums:
    """Every body's force and moment sums at every pose and load case of one sweep."""
    link = analysis.link
    st: Statics = analysis.statics[sweep]
    result = analysis.sweeps[sweep]
    kin = result.solved.kin
    pts = kin.points
    n, k_cases, nb = st.rod_force_N.shape[0], st.rod_force_N.shape[1], link.n_bodies
    links = np.zeros((n, k_cases, nb, 6))

    # rods: + tension pulls each end towards the other
    for r in range(len(link.rod_names)):
        a, b = link.rod_ends[r]
        d = pts[:, b] - pts[:, a]
        e = d / np.linalg.norm(d, axis=-1, keepdims=True)
        f_a = st.rod_force_N[:, :, r, None] * e[:, None, :]
        links[:, :, link.point_body[a]] += _wrench(pts[:, a], f_a)
        links[:, :, link.point_body[b]] += _wrench(pts[:, b], -f_a)
    # ball joints: the reported force acts on the wishbone side, its opposite on the upright
    for j in range(len(link.ball_names)):
        arm, upright = link.ball_ends[j]
        f = st.ball_force_N[:, :, j]
        links[:, :, link.point_body[arm]] += _wrench(pts[:, arm], f)
        links[:, :, link.point_body[upright]] += _wrench(pts[:, upright], -f)
    # ground: a push along the ground normal at each wheel's lowest point
    rot = chassis_to_ground(result)
    up = rot[:, 2, :]  # the ground's z axis in the chassis frame, R^T z
    contact = np.zeros((n, k_cases, 6))
    for c, upright in enumerate(link.corner_upright):
        centre = pts[:, link.wheel_centre[c]]
        # wheels spin about y at the design pose (model convention, DESIGN §3)
        spin = kin.rotation[:, upright] @ np.array([0.0, 1.0, 0.0])
        w = up - np.sum(up * spin, -1, keepdims=True) * spin
        lowest = centre - link.tyre_radius_mm[c] * w / np.linalg.norm(w, axis=-1, keepdims=True)
        wr = _wrench(lowest, st.contact_force_N[:, :, c, None] * up[:, None, :])
        links[:, :, upright] += wr
        contact += wr

    applied = np.zeros_like(links)
    cases = design_load_cases(analysis.design)
    for body, point, force in _point_loads(analysis, result, cases):
        applied[:, :, body] += _wrench(point, force)

    from_children = np.zeros_like(links)
    for b in range(1, nb):
        if link.mount[b] in (HINGE, SLIDE):
            from_children[:, :, link.parent[b]] -= st.joint_wrench[:, :, b]
    chassis = links[:, :, 0] + from_children[:, :, 0]

    force_scale = max(
        float(np.abs(st.rod_force_N).max(initial=0.0)),
        float(np.abs(st.contact_force_N).max(initial=0.0)),
        float(np.linalg.norm(applied[..., 0:3], axis=-1).max()),
        1e-300,
    )
    length_scale = float(np.linalg.norm(pts, axis=-1).max())
    return BodySums(
        links, applied, from_children, st.joint_wrench, chassis, contact, force_scale, length_scale
    )
