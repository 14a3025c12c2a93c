"""What the springs carry (DESIGN §5a): spring-load changes per axle and per corner.

The chassis sits on four springs, taken as vertical wheel-equivalent supports on the
axles' ground lines (spring force times motion ratio; the suspension's anti-geometry is
left out).  The wrench the chassis receives from an element's route and guides (the
statics' ``chassis_wrench``), reduced to a vertical force ``F_z`` (+ up) and a pitch
moment ``M_y`` about the front axle's ground line, changes the axles' spring loads
(+ = more compressed) by

    ΔS_rear = −M_y / L,   ΔS_front = −F_z + M_y / L        (L the wheelbase);

within an axle each spring takes half, plus the axle's share of the roll moment over its
track (the front share is ``roll_stiffness_front_share``, the rear the rest).

* Bolted: the element's own loads (aero at the centre of pressure, weight at the cg)
  enter the chassis directly, at the positions the element would hold bolted to it.
* Floor: what statics forces on any route that lands on the same axles.  With every
  route on one axle A the tyres there carry no moment about A's ground line, so the
  chassis receives the whole pitch moment of the element's loads about that line (its
  downforce ahead of or behind the axle, and its drag above the ground): a pure couple
  M_A, ``ΔS_front = +M_A / L``, ``ΔS_rear = −M_A / L``.  Routes to both axles can remove
  it: floor 0.
* Avoidable: the change beyond the floor.

Cross-check by virtual work: the leakage the statics computes by virtual work (a
virtual heave, roll and pitch of the chassis with the wheels on the ground) balances the
springs' virtual work in the same motions; with the roll-stiffness split that is four
equations for the four springs, solved here as a linear system, independent of the
closed form above.

The tyre-load gain per corner is what the route delivers there (the ground's contact
force in the statics) plus the spring's change; summed over the four tyres it equals the
elements' vertical load (Newton).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.car import CarLayout, SpringPoint, car_layout
from plumbrod.design.model import Design
from plumbrod.kinematics.drives import BodyDrive
from plumbrod.kinematics.elastic import ElasticSetup
from plumbrod.kinematics.figures import ground_frame
from plumbrod.kinematics.frames import cross
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.routes import RouteMap
from plumbrod.kinematics.sweeps import SweepResult, SweepSpec, run_sweep
from plumbrod.mechanics.loads import AppliedLoads
from plumbrod.mechanics.members import Member
from plumbrod.mechanics.statics import Statics, reference_points, solve_statics

__all__ = [
    "DESIGN_POSE",
    "ElementSprings",
    "SpringLoads",
    "SweepSprings",
    "distribute",
    "spring_loads",
]

Array = NDArray[np.float64]
DESIGN_POSE = "design"
"""Name of the one-pose sweep at the design pose (wheels on the ground, body level)."""
NOMINAL_WHEELBASE_MM = 1000.0
"""Used only in a front-view design, where no pitch moment exists and L drops out."""
_TINY_N = 1e-9
_OWN_LOADS = ("aero", "mass", "force in ", "strike in ")
"""Labels of an element's own loads, which it keeps bolted (route parts' masses go)."""


@dataclass(frozen=True)
class SweepSprings:
    """Spring-load changes through one sweep: B poses × K cases × E elements (N).

    Axis ``2`` of the axle arrays is (front, rear); the spring arrays follow
    ``SpringLoads.spring_names``.  NaN where a figure needs a wheelbase that is unknown.
    """

    sweep: str
    axle_N: Array  # (B, K, E, 2) routed
    axle_bolted_N: Array  # (B, K, E, 2)
    axle_floor_N: Array  # (B, K, E, 2)
    avoidable_N: Array  # (B, K, E, 2) axle change beyond the floor
    axle_virtual_work_N: Array  # (B, K, E, 2) the routed change by virtual work
    spring_N: Array  # (B, K, E, S)
    spring_bolted_N: Array  # (B, K, E, S)
    spring_virtual_work_N: Array  # (B, K, E, S)
    tyre_gain_N: Array  # (B, K, S) every element together: route delivery + spring
    vertical_load_N: Array  # (B, K, E) each element's applied vertical load (− = down)
    floor_moment_Nm: Array  # (B, K, E) pitch couple forced on a one-axle element, N·m
    pitch_excess_Nm: Array  # (B, K, E) chassis pitch moment beyond that couple, N·m


@dataclass(frozen=True)
class ElementSprings:
    """One element's figures over every sweep, pose and load case (shares of its
    vertical load; None when a wheelbase is needed and unknown)."""

    element: str
    axles: tuple[str, ...]
    """The axles its routes land on."""
    share: float | None
    share_bolted: float | None
    floor: float | None
    avoidable: float
    avoidable_where: tuple[str, int, int, int]
    """(sweep, pose, case index, axle index) of the largest avoidable change."""
    load_N: float
    """Largest |vertical load| over the cases (N)."""
    lever_mm: float | None
    """The pitch couple of a one-axle element as its load's lever about the axle (mm,
    + ahead of the axle), at the design pose of the first case; None on two axles."""
    vertical_lever_mm: float | None = None
    """Where its vertical load acts, ahead (+) of the landing axle (mm)."""
    drag_height_mm: float | None = None
    """Where its drag acts, above the ground (mm); None without drag."""


@dataclass(frozen=True)
class SpringLoads:
    """Every spring figure of an analysis."""

    layout: CarLayout
    spring_names: tuple[str, ...]
    spring_axle: tuple[int, ...]
    """Axle index (0 front, 1 rear) of each spring."""
    cases: tuple[str, ...]
    elements: tuple[str, ...]
    sweeps: dict[str, SweepSprings]
    design: SweepSprings
    """The design pose alone (one pose)."""
    per_element: dict[str, ElementSprings]
    virtual_work_gap: float
    """Largest |direct − virtual work| spring change over the load (relative)."""

    def ride_height_change_mm(self, bolted: bool = False) -> dict[str, Array] | None:
        """Per axle, the design-pose ride-height change of each corner (K,) in mm,
        − = lower: half the axle's change (all elements) over the wheel rate."""
        out: dict[str, Array] = {}
        for a, axle in enumerate(self.layout.axles):
            rate = axle.wheel_rate_N_per_mm
            if rate is None:
                continue
            src = self.design.axle_bolted_N if bolted else self.design.axle_N
            out[axle.name] = -src[0, :, :, a].sum(axis=1) / 2.0 / rate
        return out or None


def _springs(layout: CarLayout) -> tuple[list[str], list[int], Array]:
    names: list[str] = []
    axle: list[int] = []
    ys: list[float] = []
    for a, ax in enumerate(layout.axles):
        for s in ax.springs:
            names.append(s.name)
            axle.append(a)
            ys.append(s.y_mm)
    return names, axle, np.array(ys)


def _axle_x(layout: CarLayout) -> tuple[float, float] | None:
    xf, xr = layout.front.x_mm, layout.rear.x_mm
    if xf is not None and xr is not None:
        return xf, xr
    if layout.planar == "front":
        known = xf if xf is not None else xr
        assert known is not None
        return (
            (known, known - NOMINAL_WHEELBASE_MM)
            if xf is not None
            else (
                known + NOMINAL_WHEELBASE_MM,
                known,
            )
        )
    return None


def distribute(f: Array, m: Array, layout: CarLayout) -> tuple[Array, Array]:
    """Closed form: the chassis wrench in the ground frame (force N, moment N·mm about
    the ground origin, (..., 3) each) -> axle changes (..., 2) and spring changes
    (..., S), N, + = more compressed.  NaN where the wheelbase or a track is unknown."""
    names, axle_of, _ = _springs(layout)
    shape = f.shape[:-1]
    xs = _axle_x(layout)
    if xs is None:
        nan = np.full((*shape, 2), np.nan)
        return nan, np.full((*shape, len(names)), np.nan)
    xf, xr = xs
    length = xf - xr
    ref = np.array([xf, 0.0, layout.ground_z_mm])
    mm = m - cross(ref, f)
    dr = -mm[..., 1] / length
    df = -f[..., 2] - dr
    axles = np.stack((df, dr), axis=-1)
    roll = mm[..., 0] + df * layout.front.centre_y_mm + dr * layout.rear.centre_y_mm
    shares = (layout.roll_front_share, 1.0 - layout.roll_front_share)
    springs = []
    for a, ax in enumerate(layout.axles):
        if len(ax.springs) == 1:
            springs.append(axles[..., a])
            continue
        if ax.track_mm is None:
            part = np.where(np.abs(roll) > 0.0, np.nan, 0.0)
        else:
            part = shares[a] * roll / ax.track_mm
        springs.append(axles[..., a] / 2.0 - part)
        springs.append(axles[..., a] / 2.0 + part)
    del axle_of
    return axles, np.stack(springs, axis=-1)


def _virtual_work_split(q: Array, refs: Array, layout: CarLayout) -> Array:
    """Spring changes (B, K, E, S) from the virtual-work leakage ``q`` (B, K, E, 3):
    heave N, roll and pitch N·m about ground axes through each element's reference.

    For a virtual heave δh, roll δφ and pitch δθ of the chassis about those axes a
    spring at (x, y) moves δh + δφ·(y − y_ref) − δθ·(x − x_ref); the springs' work
    balances the leakage's, and the roll-stiffness split closes the system."""
    names, axle_of, ys = _springs(layout)
    xs = _axle_x(layout)
    n_s = len(names)
    out = np.full((*q.shape[:-1], n_s), np.nan)
    if xs is None:
        return out
    x = np.array([xs[a] for a in axle_of])
    two_per_axle = n_s == 4
    track_f, track_r = layout.front.track_mm or 0.0, layout.rear.track_mm or 0.0
    if two_per_axle and not (track_f > 0.0 and track_r > 0.0):
        return out
    rho = layout.roll_front_share
    for e in range(refs.shape[0]):
        rows = [np.ones(n_s), -(x - refs[e, 0])]
        rhs = [-q[:, :, e, 0], -q[:, :, e, 2] * 1000.0]
        if two_per_axle:
            rows.insert(1, ys - refs[e, 1])
            rhs.insert(1, -q[:, :, e, 1] * 1000.0)
            cf = np.array([1.0, -1.0, 0.0, 0.0]) * track_f / 2.0
            cr = np.array([0.0, 0.0, 1.0, -1.0]) * track_r / 2.0
            rows.append((1.0 - rho) * cf - rho * cr)
            rhs.append(np.zeros_like(q[:, :, e, 0]))
        a = np.array(rows)
        b = np.stack(rhs, axis=-1)
        out[:, :, e] = np.linalg.solve(a, b[..., None])[..., 0]
    return out


def _ground_wrench(wrench: Array, rot: Array, trans: Array) -> tuple[Array, Array]:
    """Chassis-frame wrench (B, K, E, 6) -> ground force and moment about the ground
    origin (N, N·mm)."""
    r = rot[:, None, None]
    f = (r @ wrench[..., 0:3, None])[..., 0]
    m = (r @ wrench[..., 3:6, None])[..., 0] + cross(trans[:, None, None], f)
    return f, m


def _element_axles(design: Design, routes: RouteMap, layout: CarLayout) -> list[list[int]]:
    out = []
    for element in design.elements:
        corners = {c for r in routes.for_element(element.name) for c in r.corners}
        out.append(sorted({0 if c in layout.front.corners else 1 for c in corners}))
    return out


def _sweep_springs(
    link: Linkage,
    loads: AppliedLoads,
    layout: CarLayout,
    landed: list[list[int]],
    refs: Array,
    result: SweepResult,
    st: Statics,
) -> SweepSprings:
    design = link.design
    kin = result.solved.kin
    rot, trans, _, _ = ground_frame(result)
    n, k, n_el = st.chassis_wrench.shape[:3]
    _, axle_of, _ = _springs(layout)

    f, m = _ground_wrench(st.chassis_wrench, rot, trans)
    axle, spring = distribute(f, m, layout)

    # every load at its solved position (ground frame), and bolted at its design one
    lp = (kin.rotation[:, loads.body] @ loads.point_mm[..., None])[..., 0] + kin.translation[
        :, loads.body
    ]
    lg = np.einsum("bij,blj->bli", rot, lp) + trans[:, None]
    lb = np.einsum("bij,lj->bli", rot, loads.point_mm) + trans[:, None]
    force = np.broadcast_to(loads.force_N, (n, *loads.force_N.shape))  # (B, K, nl, 3)
    own = np.zeros((loads.size, n_el))
    owner = np.eye(n_el)[loads.owner]
    for e, element in enumerate(design.elements):
        for i, label in enumerate(loads.labels):
            if label.startswith(tuple(f"{element.name} {w}" for w in _OWN_LOADS)):
                own[i, e] = 1.0
    fb = np.einsum("bkli,le->bkei", force, own)
    mb = np.einsum("bkli,le->bkei", cross(lb[:, None], force), own)
    axle_b, spring_b = distribute(fb, mb, layout)

    # floor: the pitch couple about the landing axle's ground line
    floor = np.zeros((n, k, n_el, 2))
    floor_m = np.zeros((n, k, n_el))
    excess = np.zeros((n, k, n_el))
    xs = _axle_x(layout)
    for e in range(n_el):
        if len(landed[e]) != 1:
            continue
        a = landed[e][0]
        x_a = layout.axles[a].x_mm
        assert x_a is not None
        ref = np.array([x_a, 0.0, layout.ground_z_mm])
        mine = owner[:, e] > 0
        arm = lg[:, mine] - ref
        couple = cross(arm[:, None], force[:, :, mine]).sum(axis=2)[..., 1]  # (B, K)
        floor_m[:, :, e] = couple / 1000.0
        chassis_m = (m[:, :, e] - cross(ref, f[:, :, e]))[..., 1]
        excess[:, :, e] = (chassis_m - couple) / 1000.0
        if xs is None:
            floor[:, :, e] = np.nan
            continue
        length = xs[0] - xs[1]
        floor[:, :, e, 0] = couple / length
        floor[:, :, e, 1] = -couple / length
    avoidable = axle - floor
    if xs is None:
        # without the wheelbase only the landing axle's vertical part is known
        for e in range(n_el):
            if len(landed[e]) == 1:
                avoidable[:, :, e, landed[e][0]] = -f[:, :, e, 2]

    spring_vw = _virtual_work_split(st.leakage_virtual_work, refs, layout)
    axle_vw = np.stack(
        [spring_vw[..., [i for i, a in enumerate(axle_of) if a == j]].sum(axis=-1) for j in (0, 1)],
        axis=-1,
    )

    gain = spring.sum(axis=2)  # (B, K, S)
    gain = np.array(gain, copy=True)
    for c, corner in enumerate(link.corner_names):
        s = next((i for i, sp in enumerate(_spring_points(layout)) if sp.corner == corner), None)
        if s is not None:
            gain[..., s] += st.contact_force_N[..., c]
    return SweepSprings(
        sweep=result.name,
        axle_N=axle,
        axle_bolted_N=axle_b,
        axle_floor_N=floor,
        avoidable_N=avoidable,
        axle_virtual_work_N=axle_vw,
        spring_N=spring,
        spring_bolted_N=spring_b,
        spring_virtual_work_N=spring_vw,
        tyre_gain_N=gain,
        vertical_load_N=st.vertical_load_N,
        floor_moment_Nm=floor_m,
        pitch_excess_Nm=excess,
    )


def _levers(
    loads: AppliedLoads, layout: CarLayout, landed: list[int], e: int
) -> tuple[float | None, float | None]:
    """At the design pose of the first case: where the element's vertical load acts
    ahead of its landing axle, and its drag's height above the ground (mm)."""
    if len(landed) != 1 or not loads.cases:
        return None, None
    x_a = layout.axles[landed[0]].x_mm
    mine = loads.owner == e
    f = loads.force_N[0, mine]
    p = loads.point_mm[mine]
    vertical = None
    if x_a is not None and abs(f[:, 2].sum()) > _TINY_N:
        vertical = float(((p[:, 0] - x_a) * f[:, 2]).sum() / f[:, 2].sum())
    drag = None
    if abs(f[:, 0].sum()) > _TINY_N:
        drag = float(((p[:, 2] - layout.ground_z_mm) * f[:, 0]).sum() / f[:, 0].sum())
    return vertical, drag


def _spring_points(layout: CarLayout) -> list[SpringPoint]:
    return [s for ax in layout.axles for s in ax.springs]


def design_pose_sweep(link: Linkage, elastic: ElasticSetup | None = None) -> SweepResult:
    """The design pose alone, as a one-pose body sweep (elastic for a redundant design)."""
    centre = link.design.sweeps.motion_centre_mm
    spec = SweepSpec(DESIGN_POSE, BodyDrive(np.zeros((1, 3)), centre), {})
    return run_sweep(link, spec, elastic)


def spring_loads(
    link: Linkage,
    routes: RouteMap,
    members: dict[str, Member],
    loads: AppliedLoads,
    sweeps: dict[str, SweepResult],
    statics: dict[str, Statics],
) -> SpringLoads:
    """Spring-load changes at every pose and load case, and each element's shares."""
    design = link.design
    layout = car_layout(design)
    landed = _element_axles(design, routes, layout)
    refs = reference_points(link, routes)
    names, axle_of, _ = _springs(layout)
    per_sweep = {
        name: _sweep_springs(link, loads, layout, landed, refs, sweeps[name], st)
        for name, st in statics.items()
    }
    elastic = next((r.elastic.setup for r in sweeps.values() if r.elastic is not None), None)
    pose = design_pose_sweep(link, elastic)
    design_st = solve_statics(link, routes, members, loads, pose)
    at_design = _sweep_springs(link, loads, layout, landed, refs, pose, design_st)

    gap = 0.0
    for s in (*per_sweep.values(), at_design):
        scale = np.maximum(np.abs(s.vertical_load_N), _TINY_N)[..., None]
        diff = np.abs(s.spring_N - s.spring_virtual_work_N) / scale
        if np.all(np.isnan(diff)):
            continue
        gap = max(gap, float(np.nanmax(diff)))

    per_element: dict[str, ElementSprings] = {}
    everything = {**per_sweep, DESIGN_POSE: at_design}
    for e, element in enumerate(design.elements):
        best = {"share": -1.0, "bolted": -1.0, "floor": -1.0}
        avoid, where = -1.0, ("", 0, 0, 0)
        load_max = 0.0
        for name, s in everything.items():
            load = np.abs(s.vertical_load_N[:, :, e])  # (B, K)
            load_max = max(load_max, float(load.max(initial=0.0)))
            safe = np.where(load > _TINY_N, load, np.nan)[..., None]
            for key, arr in (
                ("share", s.axle_N),
                ("bolted", s.axle_bolted_N),
                ("floor", s.axle_floor_N),
            ):
                ratio = np.abs(arr[:, :, e]) / safe
                if not np.all(np.isnan(ratio)):
                    best[key] = max(best[key], float(np.nanmax(ratio)))
            ratio = np.abs(s.avoidable_N[:, :, e]) / safe
            ratio = np.where(np.isnan(ratio), -1.0, ratio)
            b, kk, a = np.unravel_index(int(np.argmax(ratio)), ratio.shape)
            if ratio[b, kk, a] > avoid:
                avoid, where = float(ratio[b, kk, a]), (name, int(b), int(kk), int(a))
        lever = None
        if len(landed[e]) == 1:
            load0 = at_design.vertical_load_N[0, 0, e]
            if abs(load0) > _TINY_N:
                lever = float(-at_design.floor_moment_Nm[0, 0, e] * 1000.0 / load0)
        vertical_lever, drag_height = _levers(loads, layout, landed[e], e)
        per_element[element.name] = ElementSprings(
            element=element.name,
            axles=tuple(layout.axles[a].name for a in landed[e]),
            share=None if best["share"] < 0 else best["share"],
            share_bolted=None if best["bolted"] < 0 else best["bolted"],
            floor=(0.0 if len(landed[e]) > 1 else None) if best["floor"] < 0 else best["floor"],
            avoidable=max(avoid, 0.0),
            avoidable_where=where,
            load_N=load_max,
            lever_mm=lever,
            vertical_lever_mm=vertical_lever,
            drag_height_mm=drag_height,
        )
    return SpringLoads(
        layout=layout,
        spring_names=tuple(names),
        spring_axle=tuple(axle_of),
        cases=loads.cases,
        elements=loads.elements,
        sweeps=per_sweep,
        design=at_design,
        per_element=per_element,
        virtual_work_gap=gap,
    )
