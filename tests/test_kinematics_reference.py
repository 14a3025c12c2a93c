"""Solved kinematics against geometry, Freudenstein's four-bar equation, sympy and scipy.

Designs are invented test fixtures (tests/designs.py) and the bundled invented example.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import sympy as sp
from scipy.differentiate import derivative
from scipy.optimize import brentq
from scipy.spatial.transform import Rotation

from designs import (
    EXAMPLE,
    FourBar,
    FrontChain,
    SideChain,
    body_sweep,
    four_bar_text,
    freudenstein_constants,
    front_chain_text,
    parse,
    pivot_distance_errors,
    replace_once,
    rigid_distance_errors,
    rod_length_errors,
    side_chain_text,
    travel_sweep,
)
from plumbrod.kinematics.drives import TravelDrive
from plumbrod.kinematics.figures import ride_heights, route_ratios
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.routes import find_routes
from plumbrod.kinematics.solver import solve_poses
from plumbrod.mechanics.analysis import analyse

LENGTH_TOL_MM = 1e-9

# --- invariants over every sweep ---------------------------------------------------------

PLANAR = {
    "side chain": lambda: side_chain_text(),
    "four-bar": lambda: four_bar_text(),
    "four-bar x2.5": lambda: four_bar_text(FourBar(scale=2.5)),
    "front chain": lambda: front_chain_text(),
}
EXPECTED_SWEEPS = {
    "example": {"travel", "heave", "roll", "pitch", "heave_roll"},
    "side chain": {"travel", "heave", "pitch"},
    "four-bar": {"travel", "heave", "pitch"},
    "four-bar x2.5": {"travel", "heave", "pitch"},
    "front chain": {"travel", "heave", "roll", "heave_roll"},
}


def _design_text(name: str) -> str:
    return EXAMPLE.read_text(encoding="utf-8") if name == "example" else PLANAR[name]()


@pytest.mark.parametrize("name", ["example", *PLANAR])
def test_lengths_and_pivot_distances_hold_at_every_pose_of_every_sweep(name: str) -> None:
    # Rigid-body geometry (common practice, no source): a rod keeps its length; a rocker
    # pickup keeps its radius about and position along its pivot axis; a wishbone's outer
    # ball joint keeps its distance to both inner pivots; a body keeps its shape.
    design, _ = parse(_design_text(name), name)
    analysis = analyse(design)
    link = analysis.link
    assert set(analysis.sweeps) == EXPECTED_SWEEPS[name]
    for sweep, result in analysis.sweeps.items():
        points = result.solved.kin.points
        assert points.shape[0] == result.spec.size > 1
        worst_residual = float(result.solved.residual_max_mm.max())
        assert worst_residual <= LENGTH_TOL_MM, f"{name} {sweep}: residual {worst_residual:.2e}"
        rods = rod_length_errors(design, link, points)
        pivots = pivot_distance_errors(design, link, points)
        bodies = rigid_distance_errors(design, link, points)
        assert len(rods) >= len(design.rods) >= 4
        assert len(pivots) >= 2 * sum(
            p.body in {r.name for r in design.rockers} for p in design.pickups.values()
        )
        for group in (rods, pivots, bodies):
            for item, err in group.items():
                assert err.max() <= LENGTH_TOL_MM, f"{name} {sweep} {item}: {err.max():.2e} mm"
        if design.plane is not None:  # planar: no pickup leaves the view plane
            normal = 1 if design.plane == "side" else 0
            user = [link.point(key) for key in design.pickups]
            assert np.abs(points[:, user, normal]).max() == 0.0


def test_the_example_checks_wishbones_and_moves_every_wheel() -> None:
    # The invariants above must have had something to hold: both corners' ball joints are
    # measured, and the sweeps really move the wheels and the rockers.
    design, _ = parse(EXAMPLE.read_text(encoding="utf-8"), "example")
    analysis = analyse(design)
    link = analysis.link
    pts = analysis.sweeps["travel"].solved.kin.points
    pivots = pivot_distance_errors(design, link, pts)
    for corner in ("front_left", "front_right"):
        for side in ("upper", "lower"):
            assert f"{corner} {side} ball to front pivot" in pivots
    wc = pts[:, link.point("front_left.upright.wheel_centre"), 2] - 290.0
    np.testing.assert_allclose(wc, np.linspace(-40.0, 40.0, 201), atol=1e-9)
    arm = pts[:, link.point("rocker_left.front_arm")]
    assert np.ptp(arm[:, 2]) > 60.0  # the rocker turns through the travel


# --- Freudenstein's equation on a rod-and-rocker four-bar --------------------------------


def _four_bar_angles(bar: FourBar, link: Linkage, points: np.ndarray) -> tuple[np.ndarray, ...]:
    """Crank, coupler and output angles (deg) from +x (the ground line) in the x-z plane."""
    o2x, o2z = bar.o2
    o4x, o4z = bar.o4
    a = points[:, link.point("crank.pin")]
    b = points[:, link.point("output.pin")]
    theta2 = np.degrees(np.arctan2(a[:, 2] - o2z, a[:, 0] - o2x))
    theta3 = np.degrees(np.arctan2(b[:, 2] - a[:, 2], b[:, 0] - a[:, 0]))
    theta4 = np.degrees(np.arctan2(b[:, 2] - o4z, b[:, 0] - o4x))
    return theta2, theta3, theta4


def test_four_bar_helper_reproduces_norton_example_4_1() -> None:
    # source: Norton, Design of Machinery, Example 4-1 (memory; recomputed and confirmed,
    # REFERENCES.md): a 40, b 120, c 80, d 100, theta2 40° -> open theta4 57.325°.
    # The fixtures place the output pin with this helper, so it must be right first.
    assert FourBar().open_theta4_deg(40.0) == pytest.approx(57.325, abs=5e-4)
    assert FourBar(scale=2.5).open_theta4_deg(40.0) == pytest.approx(57.325, abs=5e-4)


@pytest.mark.parametrize("scale", [1.0, 2.5])
def test_freudenstein_equation_holds_at_every_solved_pose(scale: float) -> None:
    # source: Freudenstein, "Approximate synthesis of four-bar linkages", Trans. ASME 77
    # (1955) 853-861 (pub); analysis form K1 cos t4 - K2 cos t2 + K3 = cos(t2 - t4) as in
    # Norton, Design of Machinery, §4.5 (memory). The equation is dimensionless, so the
    # scaled linkage must satisfy it with the unscaled K1, K2, K3.
    bar = FourBar(scale=scale)
    design, _ = parse(four_bar_text(bar), f"four-bar x{scale}")
    analysis = analyse(design)
    assert analysis.mobility.exact  # the element hangs exactly located from the output
    k1, k2, k3 = freudenstein_constants(bar.a, bar.b, bar.c, bar.d)
    checked = 0
    crank_angles = []
    for result in analysis.sweeps.values():
        t2, _, t4 = _four_bar_angles(bar, analysis.link, result.solved.kin.points)
        r2, r4 = np.radians(t2), np.radians(t4)
        lhs = k1 * np.cos(r4) - k2 * np.cos(r2) + k3
        np.testing.assert_allclose(lhs, np.cos(r2 - r4), rtol=0.0, atol=1e-9)
        # and on the open branch throughout: the closed-form open root
        open4 = np.array([bar.open_theta4_deg(float(v)) for v in t2])
        np.testing.assert_allclose(t4, open4, rtol=0.0, atol=1e-7)
        checked += t2.size
        crank_angles.append(t2)
    assert checked == 81 + 21 + 21
    span = np.ptp(np.concatenate(crank_angles))
    assert span > 60.0  # the travel turns the crank through a wide range (about 84°)


@pytest.mark.parametrize("scale", [1.0, 2.5])
def test_norton_example_4_1_found_by_root_finding_over_the_travel(scale: float) -> None:
    # source: Norton, Design of Machinery, Example 4-1 (memory; recomputed and confirmed,
    # REFERENCES.md): a 40, b 120, c 80, d 100 at theta2 = 40° gives, on the open
    # branch, theta3 = 20.298° and theta4 = 57.325° (published to 3 decimals).
    bar = FourBar(scale=scale)
    _, link = parse(four_bar_text(bar), f"four-bar x{scale}")

    def angles_at(travel_mm: float) -> tuple[float, float, float]:
        solved = solve_poses(link, TravelDrive(np.array([[travel_mm]])))
        assert solved.residual_max_mm[0] <= LENGTH_TOL_MM
        t2, t3, t4 = _four_bar_angles(bar, link, solved.kin.points)
        return float(t2[0]), float(t3[0]), float(t4[0])

    assert angles_at(0.0)[0] == pytest.approx(bar.theta2_deg, abs=1e-12)
    travel = brentq(lambda s: angles_at(s)[0] - 40.0, -40.0, 40.0, xtol=1e-12, rtol=1e-14)
    theta2, theta3, theta4 = angles_at(travel)
    assert theta2 == pytest.approx(40.0, abs=1e-9)
    assert theta3 == pytest.approx(20.298, abs=5e-4)
    assert theta4 == pytest.approx(57.325, abs=5e-4)
    assert 0.0 < travel < 40.0  # bump turns the crank down from 70° to 40°


# --- route ratio against a sympy derivation ----------------------------------------------


def _circle_meet(c1: sp.Matrix, r1: sp.Expr, c2: sp.Matrix, r2: sp.Expr, sign: int) -> sp.Matrix:
    """One intersection of two circles in the plane (the textbook construction)."""
    d = c2 - c1
    dist2 = d.dot(d)
    dist = sp.sqrt(dist2)
    along = (r1**2 - r2**2 + dist2) / (2 * dist)
    height = sp.sqrt(r1**2 - along**2)
    unit = d / dist
    return c1 + along * unit + sign * height * sp.Matrix([-unit[1], unit[0]])


def _design_root(
    c1: sp.Matrix, r1: sp.Expr, c2: sp.Matrix, r2: sp.Expr, at_design: sp.Matrix, s: sp.Symbol
) -> sp.Matrix:
    """The intersection that passes through ``at_design`` at s = 0 (the assembly branch)."""
    roots = [_circle_meet(c1, r1, c2, r2, sign) for sign in (1, -1)]
    miss = [float((r.subs(s, 0) - at_design).norm()) for r in roots]
    assert min(miss) < 1e-9 < max(miss)
    return roots[int(np.argmin(miss))]


def _side_chain_pickup_height(chain: SideChain, s: sp.Symbol) -> sp.Expr:
    """Closed-form height (mm) of the element's hanger pickup versus travel ``s``.

    Upright pickup U = U0 + (0, s); the rocker pickup D is on the circle about the
    pivot O and the circle of the drive rod about U; the rocker turns by the angle from
    D0 to D, carrying the hanger pickup H; the two guides are parallel and of equal
    length, so the element only translates, by t, with t on the circle of the upper
    guide and E0 + t on the circle of the hanger about H.
    """

    def v(p: tuple[float, float]) -> sp.Matrix:
        return sp.Matrix([sp.nsimplify(p[0]), sp.nsimplify(p[1])])

    o, u0, d0 = v(chain.pivot), v(chain.upright_drive), v(chain.rocker_drive)
    h0, e0 = v(chain.rocker_hanger), v(chain.element_hanger)
    g1, c1 = v(chain.element_guide_upper), v(chain.chassis_guide_upper)
    drive = (d0 - u0).norm()
    arm = (d0 - o).norm()
    d = _design_root(o, arm, u0 + sp.Matrix([0, s]), drive, d0, s)
    a0, a1 = d0 - o, d - o
    cos, sin = a0.dot(a1) / arm**2, (a0[0] * a1[1] - a0[1] * a1[0]) / arm**2
    r = h0 - o
    h = o + sp.Matrix([cos * r[0] - sin * r[1], sin * r[0] + cos * r[1]])
    t = _design_root(c1 - g1, (c1 - g1).norm(), h - e0, (h0 - e0).norm(), sp.zeros(2, 1), s)
    return e0[1] + t[1]


def test_route_ratio_matches_a_sympy_derivation_of_a_planar_chain() -> None:
    # source: sympy (symbolic differentiation of the closed-form chain position); the
    # construction is plane geometry (common practice, no source).
    chain = SideChain()
    design, link = parse(side_chain_text(chain), "side chain")
    guide_u = np.subtract(chain.chassis_guide_upper, chain.element_guide_upper)
    guide_l = np.subtract(chain.chassis_guide_lower, chain.element_guide_lower)
    np.testing.assert_array_equal(guide_u, guide_l)  # the closed form needs the parallelogram
    s = sp.Symbol("s", real=True)
    height = _side_chain_pickup_height(chain, s)
    ratio = sp.diff(height, s)
    travels = np.array([-30.0, -15.0, 0.0, 10.0, 25.0, 38.0])
    result = travel_sweep(link, travels)
    figures = route_ratios(link, find_routes(design), result)
    assert set(figures) == {"wing.hanger"}
    pickup = result.solved.kin.points[:, link.point("wing.hanger"), 2]
    expected_ratio = [float(ratio.subs(s, sp.nsimplify(x)).evalf(30)) for x in travels]
    expected_height = [float(height.subs(s, sp.nsimplify(x)).evalf(30)) for x in travels]
    np.testing.assert_allclose(pickup, expected_height, rtol=0.0, atol=1e-9)
    np.testing.assert_allclose(figures["wing.hanger"], expected_ratio, rtol=0.0, atol=1e-8)
    # not a flat function: the ratio changes by about 0.57 across these travels
    assert np.ptp(expected_ratio) > 0.3
    assert expected_ratio[2] == pytest.approx(1.25, abs=1e-12)  # hanger arm / drive arm


# --- route ratio against scipy numerical differentiation (3D example) --------------------


def test_route_ratio_matches_scipy_derivative_on_the_example() -> None:
    # source: scipy.differentiate.derivative (adaptive central finite differences with
    # Richardson extrapolation), on positions solved one wheel at a time.
    from plumbrod.design.loading import load_design
    from plumbrod.kinematics.build import build_linkage

    design = load_design(EXAMPLE)
    link = build_linkage(design)
    routes = find_routes(design)
    assert {r.corner for r in routes.routes} == {"front_left", "front_right"}
    travels = np.array([-35.0, -20.0, -5.0, 0.0, 12.0, 27.0, 39.0])
    figures = route_ratios(link, routes, travel_sweep(link, travels))
    nc = len(link.corner_names)
    for route in routes.routes:
        moved = link.corner_names.index(route.corner)
        index = link.point(route.pickup)

        def pickup_z(
            x: np.ndarray, held: np.ndarray, moved: int = moved, index: int = index
        ) -> np.ndarray:
            held = np.broadcast_to(held, np.shape(x)).ravel()
            params = np.repeat(held[:, None], nc, axis=1)  # the other wheels held
            params[:, moved] = np.ravel(x)  # this route's wheel moves
            solved = solve_poses(link, TravelDrive(params))
            return solved.kin.points[:, index, 2].reshape(np.shape(x))

        numeric = derivative(pickup_z, travels, args=(travels,))
        assert np.all(numeric.success), numeric.status
        np.testing.assert_allclose(figures[route.name], numeric.df, rtol=0.0, atol=1e-6)
        assert np.all(np.abs(numeric.df - 1.0) < 0.05)  # a route that follows its wheel


# --- ride-height sensitivity of an element bolted to the chassis --------------------------


def _bolted_height_and_sensitivity(
    point: np.ndarray,
    centre: np.ndarray,
    heave_mm: np.ndarray,
    roll_deg: np.ndarray,
    pitch_deg: np.ndarray,
) -> tuple[np.ndarray, dict[str, np.ndarray]]:
    """Height above the ground of a chassis point, and its derivatives per mm / per deg.

    Height from scipy's Rotation (x then y, extrinsic: Ry(pitch) @ Rx(roll)), about the
    motion centre; derivatives by plane geometry (common practice, no source):
    with q = p - c, d/droll = cos(pitch)(q_y cos(roll) - q_z sin(roll)),
    d/dpitch = -q_x cos(pitch) - sin(pitch)(q_y sin(roll) + q_z cos(roll)), d/dheave = 1.
    """
    roll, pitch = np.radians(roll_deg), np.radians(pitch_deg)
    q = point - centre
    rot = Rotation.from_euler("xy", np.stack((roll, pitch), axis=1)).as_matrix()
    height = (rot @ q)[:, 2] + centre[2] + heave_mm
    per_deg = math.pi / 180.0
    sens = {
        "heave": np.ones_like(heave_mm),
        "roll": np.cos(pitch) * (q[1] * np.cos(roll) - q[2] * np.sin(roll)) * per_deg,
        "pitch": (
            -q[0] * np.cos(pitch) - np.sin(pitch) * (q[1] * np.sin(roll) + q[2] * np.cos(roll))
        )
        * per_deg,
    }
    return height, sens


POSES = (  # heave mm, roll deg, pitch deg: never all zero in a column, so every figure shows
    np.array([0.0, 0.0, 0.0, 12.0, -20.0, 8.0, -5.0]),
    np.array([0.0, 1.5, -2.0, 0.0, 0.7, -1.2, 2.0]),
    np.array([0.0, 0.0, 0.0, 1.0, -0.8, 0.5, -1.4]),
)


@pytest.mark.parametrize(
    "cop", [(600.0, 250.0, 70.0), (450.0, -380.0, 140.0), (-150.0, 520.0, 0.0)]
)
@pytest.mark.parametrize("centre", [(0.0, 0.0, 0.0), (300.0, 0.0, 280.0)])
def test_bolted_sensitivity_against_plane_geometry(
    cop: tuple[float, float, float],
    centre: tuple[float, float, float],
) -> None:
    # The bolted figure of the example's splitter, with its centre of pressure moved to a
    # point off the centre plane (y != 0), at poses mixing heave, roll and pitch.
    text = replace_once(
        EXAMPLE.read_text(encoding="utf-8"),
        "centre_of_pressure_mm = [600.0, 0.0, 70.0]",
        f"centre_of_pressure_mm = {list(cop)}",
    )
    _, link = parse(text, "example, moved centre of pressure")
    heave, roll, pitch = POSES
    result = body_sweep(link, heave, roll, pitch, centre)
    figure = ride_heights(link, result)["splitter"]
    height, sens = _bolted_height_and_sensitivity(
        np.array(cop), np.array(centre), heave, roll, pitch
    )
    np.testing.assert_allclose(figure.bolted_height_mm, height, rtol=0.0, atol=1e-9)
    # heave: exactly 1 mm per mm (common practice, no source)
    np.testing.assert_array_equal(figure.bolted_sensitivity["heave"], 1.0)
    for name in ("roll", "pitch"):
        np.testing.assert_allclose(
            figure.bolted_sensitivity[name], sens[name], rtol=0.0, atol=1e-12
        )
    if centre == (0.0, 0.0, 0.0):
        # at the design pose, roll raises a chassis point by |y|·π/180 mm per degree, on
        # the left (y > 0) for + roll (ISO 8855) — common practice, no source
        roll_at_rest = figure.bolted_sensitivity["roll"][0]
        assert abs(roll_at_rest) == pytest.approx(abs(cop[1]) * math.pi / 180.0, rel=1e-12)
        assert math.copysign(1.0, roll_at_rest) == math.copysign(1.0, cop[1])


@pytest.mark.parametrize("cop", [(350.0, 150.0), (-250.0, 40.0)])
def test_element_held_by_the_chassis_alone_matches_the_bolted_formula(
    cop: tuple[float, float],
) -> None:
    # A front-view design whose one route meets the rocker on its pivot: the route cannot
    # move the element, which hangs from the chassis alone. Its solved ride height must
    # then behave exactly as bolted: route ratio 0 (DESIGN §5.1, rigid chassis mounting),
    # heave sensitivity 1, roll sensitivity (y cos φ − z sin φ)·π/180 (plane geometry:
    # common practice, no source).
    design, _ = parse(front_chain_text(FrontChain(cop, hanger_on_pivot=True)), "front pivot")
    analysis = analyse(design)
    assert analysis.mobility.exact
    np.testing.assert_allclose(
        analysis.figures["travel"].route_ratio["wing.hanger"], 0.0, rtol=0.0, atol=1e-12
    )
    point = np.array([0.0, *cop])
    checked = 0
    for sweep in ("heave", "roll", "heave_roll"):
        result = analysis.sweeps[sweep]
        figure = analysis.figures[sweep].ride_height["wing"]
        params = result.spec.drive.parameters
        height, sens = _bolted_height_and_sensitivity(
            point, np.zeros(3), params[:, 0], np.degrees(params[:, 1]), np.degrees(params[:, 2])
        )
        np.testing.assert_allclose(figure.height_mm, height, rtol=0.0, atol=1e-9)
        np.testing.assert_allclose(figure.bolted_height_mm, height, rtol=0.0, atol=1e-9)
        for name, values in figure.sensitivity.items():
            np.testing.assert_allclose(values, sens[name], rtol=0.0, atol=1e-9)
            np.testing.assert_allclose(
                figure.bolted_sensitivity[name], sens[name], rtol=0.0, atol=1e-12
            )
            checked += values.size
    assert checked == 21 + 21 + 2 * 25


def test_example_with_both_routes_on_the_rocker_axes_rides_as_if_bolted() -> None:
    # The 3D example with each hanger moved onto its rocker's pivot axis: the splitter is
    # then held by the chassis alone, and its real figures must equal the bolted ones in
    # heave, roll and pitch (plane geometry: common practice, no source).
    text = EXAMPLE.read_text(encoding="utf-8")
    text = replace_once(
        text, "front_arm = [600.0, 620.0, 250.0]", "front_arm = [600.0, 300.0, 250.0]"
    )
    text = replace_once(
        text,
        "centre_of_pressure_mm = [600.0, 0.0, 70.0]",
        "centre_of_pressure_mm = [600.0, 240.0, 70.0]",
    )
    design, _ = parse(text, "example, hangers on the rocker axes")
    analysis = analyse(design)
    assert analysis.mobility.exact
    for ratio in analysis.figures["travel"].route_ratio.values():
        np.testing.assert_allclose(ratio, 0.0, rtol=0.0, atol=1e-12)
    for sweep in ("heave", "roll", "pitch", "heave_roll"):
        figure = analysis.figures[sweep].ride_height["splitter"]
        np.testing.assert_allclose(figure.height_mm, figure.bolted_height_mm, atol=1e-9)
        assert set(figure.sensitivity) == set(figure.bolted_sensitivity) != set()
        for name, values in figure.sensitivity.items():
            np.testing.assert_allclose(values, figure.bolted_sensitivity[name], atol=1e-9)
    roll = analysis.figures["roll"].ride_height["splitter"].sensitivity["roll"]
    at_rest = roll[len(roll) // 2]  # the roll sweep's middle pose is the design pose
    assert at_rest == pytest.approx(240.0 * math.pi / 180.0, rel=1e-9)


def test_crank_passing_the_outputs_limit_position_stays_on_the_open_branch() -> None:
    # A Grashof crank-rocker (40 + 120 < 80 + 100, crank shortest) driven at its crank by
    # a rod from the wheel: the crank may turn through the pose where it lines up with the
    # coupler. There the output rocker reaches its limit position and turns back; the
    # linkage stays on the open branch of Freudenstein's equation (source: Freudenstein
    # 1955, pub; Norton §4.5, memory) and the drive rod's transmission angle stays near
    # 90°, so nothing locks and no rocker changes assembly.
    bar = FourBar(theta2_deg=50.0)
    _, link = parse(four_bar_text(bar), "four-bar through the output's limit position")
    travel = np.linspace(-40.0, 40.0, 81)
    solved = solve_poses(link, TravelDrive(travel[:, None]))
    assert solved.residual_max_mm.max() <= LENGTH_TOL_MM
    t2, t3, t4 = _four_bar_angles(bar, link, solved.kin.points)
    k1, k2, k3 = freudenstein_constants(bar.a, bar.b, bar.c, bar.d)
    r2, r4 = np.radians(t2), np.radians(t4)
    np.testing.assert_allclose(
        k1 * np.cos(r4) - k2 * np.cos(r2) + k3, np.cos(r2 - r4), rtol=0.0, atol=1e-9
    )
    open4 = np.array([bar.open_theta4_deg(float(v)) for v in t2])
    np.testing.assert_allclose(t4, open4, rtol=0.0, atol=1e-7)
    # the crank and coupler line up inside the travel: the output angle turns back there
    lined_up = np.sin(np.radians(t3 - t2))
    assert lined_up.min() < 0.0 < lined_up.max()
    assert 0 < int(np.argmin(t4)) < travel.size - 1
