"""Statics (DESIGN §4, §5 items 3–5, §6) against Newton's laws, virtual work, the lift
equation, the standard atmosphere, hand solutions, sympy and the textbook elastic split.

Designs are invented test fixtures (tests/designs.py) and the invented examples.  The
force and moment sums are rebuilt independently in tests/statics_reference.py.
"""

from __future__ import annotations

import math
from dataclasses import replace
from functools import cache

import numpy as np
import pytest
import sympy as sp

from designs import (
    EXAMPLES,
    FourBar,
    SideChain,
    aero_text,
    four_bar_text,
    front_chain_text,
    load_cases_text,
    parse,
    side_chain_text,
    splayed_struts_text,
    three_hangers_text,
    travel_sweep,
)
from plumbrod.design.model import LoadCase
from plumbrod.errors import PlumbrodError
from plumbrod.kinematics.linkage import FREE, HINGE, SLIDE
from plumbrod.mechanics.analysis import Analysis, analyse
from plumbrod.mechanics.loads import SEA_LEVEL_DENSITY_KG_M3, dynamic_pressure_Pa
from statics_reference import (
    G0_M_S2,
    body_sums,
    chassis_to_ground,
    rod_mass_kg,
)

REL = 1e-9
"""Relative tolerance of every equilibrium and hand-solution check."""

# --- the designs, with load cases that exercise every kind of load ----------------------

CASES_3D = {
    "top": {"speed_kmh": 180.0},
    "braking": {"speed_kmh": 150.0, "longitudinal_g": -1.4, "bump_g": 0.5},
    "cornering": {"speed_kmh": 120.0, "lateral_g": 1.6, "bump_g": 1.0},
}
CASES_SIDE = {  # in the x-z plane only: no lateral load
    "top": {"speed_kmh": 180.0},
    "braking": {"speed_kmh": 150.0, "longitudinal_g": -1.4, "bump_g": 0.5},
    "bump": {"speed_kmh": 100.0, "bump_g": 2.0},
}
CASES_FRONT = {  # in the y-z plane only: no drag, no fore-aft load
    "top": {"speed_kmh": 180.0},
    "cornering": {"speed_kmh": 120.0, "lateral_g": 1.6, "bump_g": 1.0},
    "bump": {"speed_kmh": 100.0, "bump_g": 2.0},
}


def _example_text(name: str) -> str:
    path = next(p for p in EXAMPLES if p.stem == name)
    return path.read_text(encoding="utf-8")


def _fixture_text(name: str) -> str:
    if name == "side chain":
        return side_chain_text() + aero_text("wing", 0.5, 1.5, 0.3)
    if name == "four-bar":
        return four_bar_text() + aero_text("wing", 0.4, 1.8, 0.3)
    if name == "front chain":
        return front_chain_text() + aero_text("wing", 0.5, 1.5, 0.0)
    if name == "three hangers":
        return three_hangers_text() + aero_text("beam", 0.4, 1.2, 0.2)
    if name == "splayed struts":
        return splayed_struts_text() + aero_text("wing", 0.4, 1.6, 0.3)
    return _example_text(name)


FIXTURES = ("side chain", "four-bar", "front chain", "three hangers", "splayed struts")
EXAMPLE_NAMES = tuple(p.stem for p in EXAMPLES)


@cache
def loaded(name: str) -> Analysis:
    """A design analysed with the in-plane load cases above (every kind of load)."""
    text = _fixture_text(name)
    design, _ = parse(text, name)
    cases = {None: CASES_3D, "side": CASES_SIDE, "front": CASES_FRONT}[design.plane]
    design, _ = parse(text + load_cases_text(cases), name)
    return analyse(design)


@cache
def plain_example(name: str) -> Analysis:
    """An example as shipped (its default load cases)."""
    design, _ = parse(_example_text(name), name)
    return analyse(design)


def _close(actual: np.ndarray, expected: np.ndarray, tol: float, what: str) -> None:
    gap = float(np.abs(np.asarray(actual) - np.asarray(expected)).max(initial=0.0))
    assert gap <= tol, f"{what}: off by {gap:.3e} (tolerance {tol:.3e})"


# --- Newton's laws on every body --------------------------------------------------------


@pytest.mark.parametrize("name", [*EXAMPLE_NAMES, *FIXTURES])
def test_every_body_is_in_equilibrium_at_every_pose(name: str) -> None:
    # source: Newton's laws for a rigid body at rest, ΣF = 0 and ΣM = 0 about any point,
    # and action = reaction between bodies (Meriam & Kraige, Engineering Mechanics:
    # Statics, ch. 3 "Equilibrium", from memory). A frictionless hinge carries no moment
    # about its own axis and a frictionless slide no force along itself (ibid., the
    # free-body diagrams of pin and slider supports, from memory).
    analysis = loaded(name)
    link = analysis.link
    checked = {"free": 0, "hinge": 0, "slide": 0}
    for sweep, st in analysis.statics.items():
        sums = body_sums(analysis, sweep)
        f_tol = REL * sums.force_scale_N
        m_tol = f_tol * sums.length_scale_mm
        pts = analysis.sweeps[sweep].solved.kin.points
        for b in range(1, link.n_bodies):
            body = link.body_names[b]
            own = sums.links[:, :, b] + sums.applied[:, :, b] + sums.from_children[:, :, b]
            if link.mount[b] == FREE:  # an element or a wishbone upright: nothing else acts
                _close(own[..., 0:3], 0.0, f_tol, f"{name} {sweep} {body} force sum")
                _close(own[..., 3:6], 0.0, m_tol, f"{name} {sweep} {body} moment sum")
                checked["free"] += 1
                continue
            total = own + sums.joint[:, :, b]  # with the reported reaction from the parent
            _close(total[..., 0:3], 0.0, f_tol, f"{name} {sweep} {body} force sum")
            _close(total[..., 3:6], 0.0, m_tol, f"{name} {sweep} {body} moment sum")
            a, c = link.axis_points[b]
            u = pts[:, c] - pts[:, a]
            u /= np.linalg.norm(u, axis=-1, keepdims=True)
            reaction = sums.joint[:, :, b]
            if link.mount[b] == HINGE:
                for what, wrench in (("the other forces", own), ("the reaction", reaction)):
                    about_axis = wrench[..., 3:6] - np.cross(pts[:, None, a], wrench[..., 0:3])
                    _close(
                        np.einsum("bki,bi->bk", about_axis, u),
                        0.0,
                        m_tol,
                        f"{name} {sweep} {body}: moment of {what} about the hinge axis",
                    )
                checked["hinge"] += 1
            else:
                assert link.mount[b] == SLIDE
                for what, wrench in (("the other forces", own), ("the reaction", reaction)):
                    _close(
                        np.einsum("bki,bi->bk", wrench[..., 0:3], u),
                        0.0,
                        f_tol,
                        f"{name} {sweep} {body}: {what} along the slide",
                    )
                checked["slide"] += 1
        # the whole linkage but the chassis: loads + ground + the chassis's reaction = 0,
        # and the chassis receives exactly what its rods and hinges pass on to it
        applied = sums.applied.sum(axis=2)
        balance = applied + sums.contact - sums.chassis_receives
        _close(balance[..., 0:3], 0.0, f_tol, f"{name} {sweep} global force")
        _close(balance[..., 3:6], 0.0, m_tol, f"{name} {sweep} global moment")
        _close(
            st.chassis_wrench.sum(axis=2),
            sums.chassis_receives,
            m_tol,
            f"{name} {sweep} chassis_wrench",
        )
        _close(
            st.applied_wrench[..., 0:3], applied[..., 0:3], f_tol, f"{name} {sweep} applied force"
        )
        _close(
            st.applied_wrench[..., 3:6], applied[..., 3:6], m_tol, f"{name} {sweep} applied moment"
        )
        assert np.abs(applied[..., 0:3]).max() > 100.0  # loads were really there
        assert np.abs(sums.contact[..., 0:3]).max() > 100.0
    assert checked["free"] > 0 and checked["slide"] + checked["hinge"] > 0


@pytest.mark.parametrize(
    ("maker", "case"),
    [
        (front_chain_text, {"speed_kmh": 200.0}),  # drag along x, normal to a front view
        (side_chain_text, {"speed_kmh": 100.0, "lateral_g": 1.5}),  # y, normal to a side view
    ],
)
def test_a_planar_design_does_not_silently_drop_an_out_of_plane_load(maker, case) -> None:
    # source: Newton's laws as above. A planar linkage has no member that can carry a
    # load normal to its plane, so the tool must either refuse such a load case (a
    # PlumbrodError) or say that it leaves that part out; either way the forces it
    # reports must balance the in-plane part of the loads it applies.
    text = maker() + aero_text("wing", 0.5, 1.5, 0.3) + load_cases_text({"case": case})
    design, _ = parse(text, "out-of-plane load")
    try:
        analysis = analyse(design)
    except PlumbrodError:
        return
    normal = 0 if design.plane == "front" else 1
    assert analysis.loads is not None
    assert any("left out" in note and "xyz"[normal] in note for note in analysis.loads.left_out)
    sums = body_sums(analysis, "travel")
    in_plane = [i for i in range(3) if i != normal]
    balance = sums.applied.sum(axis=2) + sums.contact - sums.chassis_receives
    balance[..., normal] = 0.0
    _close(balance[..., in_plane], 0.0, REL * sums.force_scale_N, "in-plane force balance")


# --- virtual work ----------------------------------------------------------------------

VERTICAL_ONLY = {
    "hand": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"wing": (0.0, 0.0, -1000.0)}}
}
"""One case: 1000 N straight down at the centre of pressure and nothing else (1 + bump_g
= 0 makes every mass weigh nothing, DESIGN §6)."""


@pytest.mark.parametrize("maker", [side_chain_text, four_bar_text], ids=["lever", "four-bar"])
def test_slider_corner_force_is_load_times_route_ratio(maker) -> None:
    # source: principle of virtual work for a system of rigid bodies with ideal joints
    # (Meriam & Kraige, Engineering Mechanics: Statics, ch. 7 "Virtual Work", from
    # memory): the ground force N on the slider upright and the load F_z on the element
    # do no net work in a virtual wheel travel δs, N·δs + F_z·δz = 0 with δz = R·δs when
    # the element only translates (its guides form a parallelogram). So the force the
    # route puts on the upright, −N, is F_z·R at every travel.
    design, link = parse(maker() + load_cases_text(VERTICAL_ONLY), maker.__name__)
    analysis = analyse(design)
    (route,) = analysis.routes.routes
    st = analysis.statics["travel"]
    ratio = analysis.figures["travel"].route_ratio[route.name]
    load = st.vertical_load_N[:, 0, 0]
    assert np.all(load == -1000.0)
    tol = REL * 1000.0 * float(np.abs(ratio).max())
    _close(st.upright_force_N[route.name][:, 0, 2], load * ratio, tol, "upright Fz")
    _close(st.contact_force_N[:, 0, 0], -load * ratio, tol, "ground force")
    assert np.ptp(ratio) > 0.1  # the ratio really changes through the travel
    # the premise: the element keeps its attitude through the travel
    wing = link.body("wing")
    rot = analysis.sweeps["travel"].solved.kin.rotation[:, wing]
    _close(rot, np.eye(3), 1e-12, "element rotation")
    # and the ratio itself, by central differences of the solved pickup height
    travel = analysis.sweeps["travel"].spec.values["travel_mm"]
    pickup = link.point(route.pickup)
    h = 1e-3
    for s in (-30.0, 0.0, 25.0):
        i = int(np.argmin(np.abs(travel - s)))
        z = travel_sweep(link, np.array([s - h, s + h])).solved.kin.points[:, pickup, 2]
        assert (z[1] - z[0]) / (2 * h) == pytest.approx(ratio[i], rel=1e-6)


def _leakage_scales(analysis: Analysis, sweep: str) -> tuple[np.ndarray, float]:
    """Per pose and case: the applied force size (N), and a lever (m) for the moments."""
    st = analysis.statics[sweep]
    force = np.linalg.norm(st.applied_wrench[..., 0:3], axis=-1)[..., None]  # (B, K, 1)
    lever_m = float(np.linalg.norm(analysis.sweeps[sweep].solved.kin.points, axis=-1).max())
    return force, lever_m / 1000.0


@pytest.mark.parametrize("kind", ["example as shipped", "example, every kind of load"])
@pytest.mark.parametrize("name", EXAMPLE_NAMES)
def test_leakage_direct_and_by_virtual_work_agree_on_every_example(name: str, kind: str) -> None:
    # source: principle of virtual work (Meriam & Kraige, Statics, ch. 7, from memory):
    # the force and moments the chassis receives equal the work of the loads per unit
    # chassis heave, roll and pitch with the wheels on the ground (DESIGN §5 item 5).
    analysis = plain_example(name) if kind == "example as shipped" else loaded(name)
    assert analysis.statics
    for sweep, st in analysis.statics.items():
        force, lever_m = _leakage_scales(analysis, sweep)
        heave = np.abs(st.leakage[..., 0] - st.leakage_virtual_work[..., 0]) / force
        moments = np.abs(st.leakage[..., 1:] - st.leakage_virtual_work[..., 1:]) / (
            force[..., None] * lever_m
        )
        assert heave.max() <= 1e-6, f"{name} {sweep}: heave {heave.max():.2e}"
        assert moments.max() <= 1e-6, f"{name} {sweep}: moments {moments.max():.2e}"
        assert np.abs(st.leakage[..., 0]).max() > 1.0  # something leaks to compare


@pytest.mark.parametrize("name", FIXTURES)
def test_leakage_direct_and_by_virtual_work_agree_on_the_fixtures(name: str) -> None:
    # source: principle of virtual work, as above.
    analysis = loaded(name)
    for sweep, st in analysis.statics.items():
        force, lever_m = _leakage_scales(analysis, sweep)
        gap = np.abs(st.leakage - st.leakage_virtual_work)
        gap[..., 1:] /= lever_m
        assert (gap / force[..., None]).max() <= 1e-6, f"{name} {sweep}"


def _axle_reference(analysis: Analysis, element: str) -> np.ndarray:
    """Mean design contact point of the corners the element's routes reach (mm)."""
    corners = sorted({r.corner for r in analysis.routes.for_element(element)})
    pts = []
    for name in corners:
        c = analysis.design.corner(name)
        x, y, z = c.wheel_centre_mm
        pts.append((x, y, z - c.tyre_radius_mm))
    return np.mean(pts, axis=0)


@pytest.mark.parametrize("name", [*EXAMPLE_NAMES, "front chain"])
def test_leakage_is_load_times_ride_height_sensitivity(name: str) -> None:
    # source: principle of virtual work (Meriam & Kraige, Statics, ch. 7, from memory): a
    # vertical load F_z at the centre of pressure does work F_z·δz in a chassis motion
    # with the wheels on the ground, so the heave force the chassis receives is F_z times
    # the ride-height sensitivity dz/dh (DESIGN §5 item 5). For roll and pitch the
    # moments are about ground axes through the axle centre r, the sensitivities about
    # axes through the motion centre c: a rotation δθ about r is one about c plus a
    # lift (c − r)_y·δφ (roll) or (r − c)_x·δθ (pitch), so
    # M_roll = F_z·(dz/dφ + (c − r)_y·dz/dh), M_pitch = F_z·(dz/dθ + (r − c)_x·dz/dh).
    text = _fixture_text(name)
    design, _ = parse(text, name)
    forces = {e.name: (0.0, 0.0, -1500.0) for e in design.elements}
    case = {"still": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": forces}}
    design, _ = parse(text + load_cases_text(case), name)
    analysis = analyse(design)
    # turn the body about the first element's axle reference, so that the pitch sweep
    # (which has no heave sensitivity of its own) compares without a lift term
    ref0 = tuple(float(v) for v in _axle_reference(analysis, design.elements[0].name))
    if design.plane is None and design.sweeps.motion_centre_mm != ref0:
        design = replace(design, sweeps=replace(design.sweeps, motion_centre_mm=ref0))
        analysis = analyse(design)
    centre = np.array(design.sweeps.motion_centre_mm)
    compared = {"heave": 0, "roll": 0, "pitch": 0}
    per_rad = 180.0 / math.pi
    for sweep, fig in analysis.figures.items():
        st = analysis.statics.get(sweep)
        if not fig.ride_height or st is None:
            continue
        for e, element in enumerate(st.elements):
            sens = fig.ride_height[element].sensitivity
            ref = _axle_reference(analysis, element)
            f_z = -1500.0
            leak = st.leakage[:, 0, e]
            tol = REL * 1500.0
            if "heave" in sens:
                _close(leak[:, 0], f_z * sens["heave"], tol, f"{name} {sweep} heave")
                compared["heave"] += 1
            lift = {"roll": (centre - ref)[1], "pitch": (ref - centre)[0]}
            for j, key in ((1, "roll"), (2, "pitch")):
                if key not in sens:
                    continue
                if "heave" in sens:
                    dz = sens[key] * per_rad + lift[key] * sens["heave"]
                elif lift[key] == 0.0:
                    dz = sens[key] * per_rad
                else:
                    continue
                _close(leak[:, j], f_z * dz / 1000.0, tol, f"{name} {sweep} {key}")
                compared[key] += 1
    assert compared["heave"] > 0
    if design.plane != "side":
        assert compared["roll"] > 0
    if design.plane != "front":
        assert compared["pitch"] > 0


# --- aero load: ½ρV², standard density ---------------------------------------------------

STATICS_FIELDS = (
    "rod_force_N",
    "ball_force_N",
    "contact_force_N",
    "joint_wrench",
    "chassis_wrench",
    "leakage",
    "leakage_virtual_work",
    "vertical_load_N",
    "applied_wrench",
)


def _speed_and_density_cases(name: str) -> tuple[Analysis, float]:
    text = _fixture_text(name)
    design, _ = parse(text, name)
    v = design.top_speed_kmh or 150.0
    cases = {
        "still": {"speed_kmh": 0.0},
        "v": {"speed_kmh": v},
        "twice": {"speed_kmh": 2.0 * v},
        "thin": {"speed_kmh": v, "air_density_kg_m3": 1.0},
        "dense": {"speed_kmh": v, "air_density_kg_m3": 2.45},
        # 1 + bump_g = 0: every mass weighs nothing (DESIGN §6), only the air loads
        "weightless_v": {"speed_kmh": v, "bump_g": -1.0},
        "weightless_twice": {"speed_kmh": 2.0 * v, "bump_g": -1.0},
    }
    design, _ = parse(text + load_cases_text(cases), name)
    return analyse(design), v


def _fields(st) -> dict[str, np.ndarray]:
    out = {f: np.asarray(getattr(st, f)) for f in STATICS_FIELDS}
    for route, force in st.upright_force_N.items():
        out[f"upright force {route}"] = force
        out[f"upright moment {route}"] = st.upright_moment_Nm[route]
    return out


@pytest.mark.parametrize("name", [*EXAMPLE_NAMES, "side chain", "three hangers"])
def test_downforce_grows_with_the_square_of_speed(name: str) -> None:
    # source: L = ½ρV²·S·C_L and D = ½ρV²·S·C_D (NASA Glenn Research Center, "The Lift
    # Coefficient", pub; REFERENCES.md): at twice the speed the aero loads are four times
    # as large, and statics is linear in the loads, so the aero part of every force
    # (the case at the speed minus the case standing still, which holds only the
    # weights) grows four times, and so does every force of a weightless case.
    analysis, _ = _speed_and_density_cases(name)
    k = {c: i for i, c in enumerate(analysis.loads.cases)}
    for sweep, st in analysis.statics.items():
        for field, value in _fields(st).items():
            still, at_v, at_2v = value[:, k["still"]], value[:, k["v"]], value[:, k["twice"]]
            aero_v, aero_2v = at_v - still, at_2v - still
            scale = float(np.abs(aero_2v).max(initial=0.0))
            _close(aero_2v, 4.0 * aero_v, REL * max(scale, 1e-6), f"{name} {sweep} {field}")
            # with the weights taken out, every force itself grows four times
            at_v, at_2v = value[:, k["weightless_v"]], value[:, k["weightless_twice"]]
            _close(
                at_2v,
                4.0 * at_v,
                REL * max(float(np.abs(at_2v).max(initial=0.0)), 1e-6),
                f"{name} {sweep} {field} (weightless)",
            )
        rods = st.rod_force_N
        assert np.abs(rods[:, k["v"]] - rods[:, k["still"]]).max() > 50.0  # aero is there


def test_aero_load_of_the_bundled_example_by_hand() -> None:
    # source: q = ½ρV², L = q·S·C_L, D = q·S·C_D (NASA Glenn, "The Lift Coefficient",
    # pub); ρ = 1.225 kg/m³ (U.S. Standard Atmosphere 1976, pub). 180 km/h = 50 m/s:
    # q = 0.5 × 1.225 × 50² = 1531.25 Pa; with S = 0.60 m², C_L = 1.2, C_D = 0.25 (the
    # invented example's data): downforce 1102.5 N, drag 229.6875 N.
    assert dynamic_pressure_Pa(180.0) == pytest.approx(1531.25, rel=1e-15)
    analysis = plain_example("hillclimb_splitter")
    assert analysis.loads.cases == ("top-speed", "top-speed-bump-3g")
    st = analysis.statics["travel"]
    mass_kg = (
        analysis.design.elements[0].mass_kg
        + sum(r.mass_kg or 0.0 for r in analysis.design.rockers)
        + sum(
            rod_mass_kg(analysis.design, r.name)
            / 2.0
            * sum(analysis.design.pickups[end].body != "chassis" for end in (r.end_a, r.end_b))
            for r in analysis.design.rods
        )
    )
    # the splitter's vertical load: downforce plus the weight of what it carries
    expected = -1102.5 - mass_kg * G0_M_S2
    assert st.vertical_load_N[0, 0, 0] == pytest.approx(expected, rel=1e-12)
    assert st.applied_wrench[0, 0, 0] == pytest.approx(-229.6875, rel=1e-12)
    bump = -1102.5 - 4.0 * mass_kg * G0_M_S2  # 3 g of bump on top of 1 g of weight
    assert st.vertical_load_N[0, 1, 0] == pytest.approx(bump, rel=1e-12)


def test_sea_level_density_is_the_standard_atmosphere_value() -> None:
    # source: U.S. Standard Atmosphere 1976 (= ISO 2533 below 32 km), pub: sea-level
    # density 1.2250 kg/m³ at T0 = 288.15 K and p0 = 101 325 Pa. Recomputed from the
    # ideal-gas law with the same document's gas constant R* = 8314.32 J/(kmol·K) and
    # molar mass of air M0 = 28.9644 kg/kmol (from memory): ρ0 = p0·M0/(R*·T0).
    rho0 = 101_325.0 * 28.9644 / (8314.32 * 288.15)
    assert rho0 == pytest.approx(1.2250, abs=5e-5)
    assert SEA_LEVEL_DENSITY_KG_M3 == 1.225
    assert LoadCase("x", 100.0).air_density_kg_m3 == 1.225
    assert dynamic_pressure_Pa(100.0) == dynamic_pressure_Pa(100.0, 1.225)
    # a design that does not give a density gets it, in the file and in the forces
    design, _ = parse(
        _fixture_text("side chain")
        + load_cases_text(
            {
                "default": {"speed_kmh": 150.0},
                "standard": {"speed_kmh": 150.0, "air_density_kg_m3": 1.225},
            }
        ),
        "density",
    )
    assert design.load_cases[0].air_density_kg_m3 == 1.225
    st = analyse(design).statics["travel"]
    np.testing.assert_array_equal(st.rod_force_N[:, 0], st.rod_force_N[:, 1])
    # and the shipped example's default cases do too: same forces as an explicit 1.225
    shipped = plain_example("hillclimb_splitter").statics["travel"]
    design, _ = parse(
        _example_text("hillclimb_splitter")
        + load_cases_text({"explicit": {"speed_kmh": 180.0, "air_density_kg_m3": 1.225}}),
        "explicit",
    )
    explicit = analyse(design).statics["travel"]
    _close(
        explicit.rod_force_N[:, 0],
        shipped.rod_force_N[:, 0],
        REL * float(np.abs(shipped.rod_force_N).max()),
        "default vs explicit 1.225",
    )


@pytest.mark.parametrize("name", ["hillclimb_splitter", "planar_undertray", "side chain"])
def test_a_given_air_density_scales_the_aero_forces_linearly(name: str) -> None:
    # source: L = ½ρV²·S·C_L (NASA Glenn, "The Lift Coefficient", pub): the aero load is
    # proportional to the density; statics is linear in the loads.
    analysis, _ = _speed_and_density_cases(name)
    k = {c: i for i, c in enumerate(analysis.loads.cases)}
    for sweep, st in analysis.statics.items():
        for field, value in _fields(st).items():
            still = value[:, k["still"]]
            aero = value[:, k["v"]] - still
            scale = REL * max(float(np.abs(aero).max(initial=0.0)) * 2.0, 1e-6)
            _close(value[:, k["thin"]] - still, aero * (1.0 / 1.225), scale, f"{sweep} {field}")
            _close(value[:, k["dense"]] - still, aero * 2.0, scale, f"{sweep} {field}")


# --- a lever solved by hand ----------------------------------------------------------------

W_N = 1000.0


def _lever(b_mm: float) -> tuple[Analysis, int]:
    """The side chain with the hanger arm ``b_mm`` and 1000 N down at x = 200 mm; the
    design pose's index in a 3-pose travel sweep."""
    chain = SideChain(
        rocker_hanger=(b_mm, 580.0),
        element_hanger=(b_mm, 200.0),
        travel_mm=(-10.0, 10.0),
        travel_steps=3,
    )
    design, _ = parse(
        side_chain_text(chain, body_sweeps=False) + load_cases_text(VERTICAL_ONLY), "lever"
    )
    return analyse(design), 1


@pytest.mark.parametrize("b_mm", [60.0, 80.0, 100.0])
def test_lever_route_by_hand(b_mm: float) -> None:
    # Hand solution (common practice, no source: two-force members and moments about a
    # pivot, as in any statics text). Side view, x forward, z up, moments M_y = z·F_x −
    # x·F_z. The slider upright drives a vertical rod at x = a = 80 mm up to a lever
    # pivoted on the chassis at (0, 520); the lever's hanger pickup is at x = b, a
    # vertical hanger drops to the element at (b, 200); two horizontal guides at z = 210
    # and 120 (90 mm apart) hold the element; W = 1000 N acts down at x_p = 200 mm.
    #   element, ΣF_z:   hanger tension T_h = W                         (+ tension)
    #   element, ΣM_y:   the guides make the couple W·(x_p − b) = 90·T  ->  upper guide
    #                    −W(x_p − b)/90 (pushes), lower +W(x_p − b)/90 (pulls)
    #   lever, ΣM_pivot: W·b = F_d·a  ->  drive rod F_d = W·b/a, compression: −W·b/a
    #   lever, ΣF_z:     pivot reaction on the lever = W − W·b/a (the difference)
    #   upright:         ground force N = W·b/a; the rod pushes the upright down with
    #                    W·b/a (upright Fz = −W·b/a), at lever a about the wheel centre:
    #                    moment +W·b; the slide holds the moment −W·b about the origin
    #   chassis:         receives W·(b/a − 1) up (heave leakage) and, since the ground
    #                    pushes only at the contact patch under the axle (x = 0), the
    #                    load's whole moment about it: W·x_p (pitch leakage)
    #   route ratio:     the lever turns δs/a, the hanger rises b·δs/a: R = b/a
    a, x_p = 80.0, 200.0
    analysis, i = _lever(b_mm)
    link = analysis.link
    st = analysis.statics["travel"]
    tol = REL * W_N * 2.0
    rods = dict(zip(link.rod_names, st.rod_force_N[i, 0], strict=True))
    assert rods["hanger"] == pytest.approx(W_N, abs=tol)
    assert rods["drive"] == pytest.approx(-W_N * b_mm / a, abs=tol)
    assert rods["guide_upper"] == pytest.approx(-W_N * (x_p - b_mm) / 90.0, abs=tol)
    assert rods["guide_lower"] == pytest.approx(W_N * (x_p - b_mm) / 90.0, abs=tol)
    assert st.contact_force_N[i, 0, 0] == pytest.approx(W_N * b_mm / a, abs=tol)
    lever = st.joint_wrench[i, 0, link.body("lever")]
    _close(
        lever,
        [0.0, 0.0, W_N - W_N * b_mm / a, 0.0, 0.0, 0.0],
        tol * 1000.0,
        "pivot reaction on the lever",
    )
    slide = st.joint_wrench[i, 0, link.body("front.upright")]
    _close(slide, [0.0, 0.0, 0.0, 0.0, -W_N * b_mm, 0.0], tol * 1000.0, "slide reaction")
    (route,) = analysis.routes.routes
    _close(st.upright_force_N[route.name][i, 0], [0.0, 0.0, -W_N * b_mm / a], tol, "upright force")
    _close(
        st.upright_moment_Nm[route.name][i, 0],
        [0.0, W_N * b_mm / 1000.0, 0.0],
        tol,
        "upright moment (N·m)",
    )
    heave, pitch = W_N * (b_mm / a - 1.0), W_N * x_p / 1000.0
    _close(st.leakage[i, 0, 0], [heave, 0.0, pitch], tol, "leakage")
    _close(st.leakage_virtual_work[i, 0, 0], [heave, 0.0, pitch], tol, "leakage (work)")
    ratio = analysis.figures["travel"].route_ratio[route.name][i]
    assert ratio == pytest.approx(b_mm / a, rel=REL)


# --- a planar route against sympy --------------------------------------------------------

FOUR_BAR_CASES = {
    "braking": {
        "speed_kmh": 0.0,
        "bump_g": 0.5,
        "longitudinal_g": -1.2,
        "forces_N": {"wing": (-300.0, 0.0, -2500.0)},
    },
    "light": {"speed_kmh": 0.0, "forces_N": {"wing": (0.0, 0.0, -400.0)}},
}


def _sympy_four_bar_forces(
    analysis: Analysis, sweep: str, i: int, case: LoadCase
) -> dict[str, float]:
    """Rod forces and the ground force of the four-bar route at one pose, from the
    equilibrium equations of its four bodies solved exactly by sympy (side view)."""
    design, link = analysis.design, analysis.link
    result = analysis.sweeps[sweep]
    pts = result.solved.kin.points[i]
    rot = chassis_to_ground(result)[i]

    def exact(v: float) -> sp.Rational:  # the exact rational value of a double
        return sp.Rational(float(v))

    def at(name: str) -> sp.Matrix:  # (x, z) of a solved point
        p = pts[link.point(name)]
        return sp.Matrix([exact(p[0]), exact(p[2])])

    def in_chassis(f_ground: tuple[float, float, float]) -> sp.Matrix:
        f = rot.T @ np.array(f_ground, dtype=float)
        assert abs(f[1]) < 1e-12
        return sp.Matrix([exact(f[0]), exact(f[2])])

    def moment(r: sp.Matrix, f: sp.Matrix) -> sp.Expr:  # M_y = z·F_x − x·F_z
        return r[1] * f[0] - r[0] * f[1]

    def weight(mass_kg: float) -> sp.Matrix:
        w = mass_kg * G0_M_S2
        return in_chassis((-w * case.longitudinal_g, 0.0, -w * (1.0 + case.bump_g)))

    names = ("drive", "coupler", "hanger", "guide_upper", "guide_lower")
    t = dict(zip(names, sp.symbols("T_d T_c T_h T_gu T_gl"), strict=True))
    n_ground = sp.Symbol("N")
    # every force on every body: (body, point, force); + tension pulls the ends together
    forces: list[tuple[str, sp.Matrix, sp.Matrix]] = []
    for rod in design.rods:
        pa, pb = at(rod.end_a), at(rod.end_b)
        d = pts[link.point(rod.end_b)] - pts[link.point(rod.end_a)]
        d /= np.linalg.norm(d)  # the rod's unit vector, rounded once to doubles
        e = sp.Matrix([exact(d[0]), exact(d[2])])
        body_a, body_b = design.pickups[rod.end_a].body, design.pickups[rod.end_b].body
        forces.append((body_a, pa, t[rod.name] * e))
        forces.append((body_b, pb, -t[rod.name] * e))
        half = weight(rod_mass_kg(design, rod.name) / 2.0)
        forces.extend(
            (body, p, half) for body, p in ((body_a, pa), (body_b, pb)) if body != "chassis"
        )
    wing = design.elements[0]
    forces.append(("wing", at("wing.centre_of_pressure"), in_chassis(case.forces_N["wing"])))
    forces.append(("wing", at("wing.cg"), weight(wing.mass_kg)))
    up = in_chassis((0.0, 0.0, 1.0))
    forces.append(("front.upright", at("front.upright.wheel_centre"), n_ground * up))

    def on(body: str) -> list[tuple[sp.Matrix, sp.Matrix]]:
        return [(p, f) for b, p, f in forces if b == body]

    o2 = sp.Matrix([sp.Rational(v) for v in FourBar().o2])
    o4 = sp.Matrix([sp.Rational(v) for v in FourBar().o4])
    equations = [
        sum(f[0] for _, f in on("wing")),  # element: ΣF_x, ΣF_z, ΣM_y = 0
        sum(f[1] for _, f in on("wing")),
        sum(moment(p, f) for p, f in on("wing")),
        sum(moment(p - o2, f) for p, f in on("crank")),  # rockers: ΣM about the pivot
        sum(moment(p - o4, f) for p, f in on("output")),
        sum(f[1] for _, f in on("front.upright")),  # slider: ΣF along chassis z
    ]
    solution = sp.solve(equations, [*t.values(), n_ground], dict=True)
    assert len(solution) == 1
    out = {name: float(solution[0][sym]) for name, sym in t.items()}
    out["ground"] = float(solution[0][n_ground])
    return out


def test_four_bar_route_forces_match_sympy_equilibrium() -> None:
    # source: sympy's exact linear solver on the equilibrium equations of each body
    # (Newton's laws; Meriam & Kraige, Statics, ch. 3, from memory), written here from
    # scratch: element ΣF_x = ΣF_z = ΣM = 0, each rocker ΣM about its pivot = 0, the
    # slider upright ΣF along its slide = 0 with the ground pushing along its normal.
    # Weights: the element at its cg, each rod half at each end off the chassis.
    design, _ = parse(four_bar_text() + load_cases_text(FOUR_BAR_CASES), "four-bar")
    analysis = analyse(design)
    link = analysis.link
    poses = {"travel": (10, 40, 65), "pitch": (0, 20), "heave": (0,)}  # s = -30, 0, +25 mm
    seen = 0
    for sweep, indices in poses.items():
        st = analysis.statics[sweep]
        for i in indices:
            for k, case in enumerate(design.load_cases):
                expected = _sympy_four_bar_forces(analysis, sweep, i, case)
                scale = max(abs(v) for v in expected.values())
                for rod in ("drive", "coupler", "hanger", "guide_upper", "guide_lower"):
                    got = st.rod_force_N[i, k, link.rod_names.index(rod)]
                    assert got == pytest.approx(expected[rod], abs=REL * scale), (
                        f"{sweep} pose {i} {case.name} rod {rod}"
                    )
                assert st.contact_force_N[i, k, 0] == pytest.approx(
                    expected["ground"], abs=REL * scale
                )
                seen += 1
    assert seen == 12


# --- an over-constrained element: the elastic split ---------------------------------------

E_4130_MPA = 205_000.0  # source: ASM datasheet for 4130 normalized (MatWeb), pub
E_6061_MPA = 68_900.0  # source: Aluminum Association typical values (MatWeb), pub-copy


def _tube_area_mm2(od: float, wall: float) -> float:
    return math.pi / 4.0 * (od**2 - (od - 2.0 * wall) ** 2)


@pytest.mark.parametrize("mixed", [True, False], ids=["mixed rods", "equal rods"])
def test_beam_on_three_hangers_splits_the_load_by_stiffness(mixed: bool) -> None:
    # The textbook statically indeterminate "rigid bar on three elastic rods" (Gere,
    # Mechanics of Materials, §2.4 statically indeterminate structures, from memory),
    # derived here: the beam is rigid, so the rods' stretches are linear in x,
    # δ_i = u + θ·x_i (compatibility); each rod T_i = k_i·δ_i with k_i = E_i·A_i/L
    # (Hooke); and ΣT_i = W, ΣT_i·x_i = W·x_p (equilibrium). Hence
    #   [Σk    Σkx ] [u]   [W    ]
    #   [Σkx   Σkx²] [θ] = [W·x_p],   T_i = k_i·(u + θ·x_i).
    # With equal rods: T_i = W·(1/3 + (x_i − x̄)(x_p − x̄)/Σ(x_j − x̄)²).
    length, x_p, w = 400.0, 180.0, 3000.0
    if mixed:
        hangers = (
            ("a", -200.0, "4130-N", 16.0, 1.2),
            ("b", 100.0, "4130-N", 12.0, 1.0),
            ("c", 300.0, "6061-T6", 20.0, 2.0),
        )
        k = np.array(
            [
                E_4130_MPA * _tube_area_mm2(16.0, 1.2),
                E_4130_MPA * _tube_area_mm2(12.0, 1.0),
                E_6061_MPA * _tube_area_mm2(20.0, 2.0),
            ]
        )
    else:
        hangers = tuple(
            (n, x, "4130-N", 16.0, 1.2) for n, x in (("a", -200.0), ("b", 100.0), ("c", 300.0))
        )
        k = np.full(3, E_4130_MPA * _tube_area_mm2(16.0, 1.2))
    k /= length
    x = np.array([h[1] for h in hangers])
    cases = {"hand": {"speed_kmh": 0.0, "bump_g": -1.0, "forces_N": {"beam": (0.0, 0.0, -w)}}}
    design, _ = parse(
        three_hangers_text(hangers, length, x_p) + load_cases_text(cases), "three hangers"
    )
    analysis = analyse(design)
    assert analysis.mobility.redundant  # one rod more than the beam needs
    st = analysis.statics["travel"]
    assert st.elastic
    u, theta = np.linalg.solve(
        [[k.sum(), (k * x).sum()], [(k * x).sum(), (k * x * x).sum()]], [w, w * x_p]
    )
    expected = k * (u + theta * x)
    if not mixed:
        xm = x.mean()
        classic = w * (1.0 / 3.0 + (x - xm) * (x_p - xm) / ((x - xm) ** 2).sum())
        np.testing.assert_allclose(expected, classic, rtol=1e-12)
    got = st.rod_force_N[1, 0, [analysis.link.rod_names.index(n) for n in "abc"]]
    np.testing.assert_allclose(got, expected, rtol=0.0, atol=REL * w)
    assert got.sum() == pytest.approx(w, rel=REL)
    assert st.rod_force_N[1, 0, analysis.link.rod_names.index("guide")] == pytest.approx(
        0.0, abs=REL * w
    )
    assert st.contact_force_N[1, 0, 0] == pytest.approx(w, rel=REL)
    if mixed:  # the split depends on the stiffness: not the equal-rod answer
        xm = x.mean()
        classic = w * (1.0 / 3.0 + (x - xm) * (x_p - xm) / ((x - xm) ** 2).sum())
        assert np.abs(got - classic).max() > 50.0
