"""Statics at every pose: member forces, joint reactions, the load at each upright and
what leaks into the chassis (DESIGN §4, §5 items 3–5).

Model.  The chassis is held; every tyre stands on the ground, which pushes only along
its normal at the wheel's lowest point (a rigid disc, no friction: drag and side loads
therefore reach the chassis through the links, as they do through a car's suspension).
The constraint rows are the rods, the ball joints and one ground-contact row per wheel;
with the applied loads ``Q`` (aero and inertia, as generalized forces) the multipliers
solve ``Φ_qᵀ λ = −Q``.  A rod's multiplier is minus its axial force (+ tension).
Hinge and slide reactions follow from each body's equilibrium, from the leaves of the
body tree to the chassis.

Over-constrained designs have no unique rigid answer; then the rods are elastic with
stiffness EA/L (everything else rigid) and the forces minimise the complementary energy
``Σ T²/(2k)`` under equilibrium — the answer depends on the members' stiffness.

Sprung leakage is the resultant the chassis receives, as heave force (N) and roll and
pitch moments (N·m) about ground axes through the axle centre on the ground.  By
virtual work it also equals ``Σ F · ∂p/∂k`` for a chassis heave, roll or pitch with the
wheels on the ground; both are computed and compared.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.kinematics.drives import BodyDrive
from plumbrod.kinematics.elastic import ElasticSetup, elastic_response
from plumbrod.kinematics.figures import ground_frame
from plumbrod.kinematics.frames import cross
from plumbrod.kinematics.linkage import FREE, SLIDE, Kinematics, Linkage
from plumbrod.kinematics.routes import RouteMap
from plumbrod.kinematics.sweeps import SweepResult
from plumbrod.mechanics.loads import AppliedLoads
from plumbrod.mechanics.members import Member
from plumbrod.mechanics.redundancy import spring_compliance, unit_rod_rows

__all__ = ["Statics", "reference_points", "solve_statics"]

Array = NDArray[np.float64]


@dataclass(frozen=True)
class Statics:
    """Forces of one sweep: B poses × K load cases (× E elements where noted).

    Frames: member and joint vectors in the chassis frame; upright forces and leakage
    in the ground frame.  Moments about the chassis origin are N·mm in ``*_wrench``
    arrays and N·m everywhere else.
    """

    sweep: str
    cases: tuple[str, ...]
    elements: tuple[str, ...]
    elastic: bool
    rod_force_N: Array  # (B, K, nr) + tension, every link rod (tie rods too)
    ball_force_N: Array  # (B, K, nball, 3) on the wishbone side
    contact_force_N: Array  # (B, K, nc) ground normal force, + pushes up
    joint_wrench: Array  # (B, K, nb, 6) hinge/slide reaction on each body, N and N·mm
    axial_residual: Array  # (B, K, nb) hinge moment (N·mm) / slide force (N) along the axis
    imbalance: Array  # (B, K, nb, 6) free bodies' force and moment sums, N and N·mm
    chassis_wrench: Array  # (B, K, E, 6) what the chassis receives from each element's loads
    leakage: Array  # (B, K, E, 3) heave N, roll N·m, pitch N·m, direct
    leakage_virtual_work: Array  # (B, K, E, 3) the same by virtual work (NaN: skipped)
    vertical_load_N: Array  # (B, K, E) each element's applied vertical load (− = down)
    applied_wrench: Array  # (B, K, 6) total applied loads, N and N·mm about the origin
    upright_force_N: dict[str, Array]  # route -> (B, K, 3) on the corner, ground frame
    upright_moment_Nm: dict[str, Array]  # route -> (B, K, 3) about the wheel centre
    corner_force_N: dict[str, Array]  # corner -> (B, K, 3): every route's force summed
    corner_moment_Nm: dict[str, Array]  # corner -> (B, K, 3) about its wheel centre


def reference_points(link: Linkage, routes: RouteMap) -> Array:
    """(E, 3) the axle centre on the ground of each element: the mean design contact
    point of the corners its routes reach (mm)."""
    design = link.design
    out = []
    for element in design.elements:
        corners = sorted({r.corner for r in routes.for_element(element.name)})
        pts = []
        for name in corners:
            c = design.corner(name)
            x, y, z = c.wheel_centre_mm
            pts.append((x, y, z - c.tyre_radius_mm))
        out.append(np.mean(pts, axis=0) if pts else np.zeros(3))
    return np.array(out).reshape(-1, 3)


def _contact_drive(result: SweepResult) -> BodyDrive:
    """The ground-contact rows of a sweep: its own drive for body sweeps; for travel
    sweeps the chassis stands level on the design ground."""
    drive = result.spec.drive
    if isinstance(drive, BodyDrive):
        return drive
    return BodyDrive(np.zeros((result.spec.size, 3)))


def solve_statics(
    link: Linkage,
    routes: RouteMap,
    members: dict[str, Member],
    loads: AppliedLoads,
    result: SweepResult,
    *,
    virtual_work: bool = True,
) -> Statics:
    """Member forces, reactions, upright loads and leakage at every pose of a sweep.

    ``virtual_work`` False skips the virtual-work cross-check of the leakage (its field
    is then NaN): for screening many candidates, never for a reported result."""
    kin = result.solved.kin
    n = result.spec.size
    k_cases, n_el = len(loads.cases), len(loads.elements)
    cols = k_cases * n_el
    rot, trans, _, _ = ground_frame(result)
    contact = _contact_drive(result)

    # constraint rows: members, then one ground contact per wheel
    _, jac_m = link.residual_and_jacobian(kin)
    _, grad, ends = link.member_rows(kin)
    if result.elastic is not None:  # stretched springs: rod forces along the unit direction
        jac_m, grad = unit_rod_rows(len(link.rod_names), jac_m, grad)
    _, jac_c = contact.rows(link, kin)
    jac = np.concatenate((jac_m, jac_c), axis=1)  # (B, m', nq)
    m_rows, n_members = jac.shape[1], jac_m.shape[1]

    # applied loads: positions and forces in the chassis frame, per (case, element)
    lp = (kin.rotation[:, loads.body] @ loads.point_mm[..., None])[..., 0] + kin.translation[
        :, loads.body
    ]  # (B, nl, 3)
    f_ground = np.broadcast_to(loads.force_N, (n, *loads.force_N.shape))  # (B, K, nl, 3)
    f_chassis = np.einsum("bji,bklj->bkli", rot, f_ground)  # rot^T f
    owner = np.eye(n_el)[loads.owner]  # (nl, E)
    jl = kin.jacobian_at(link, loads.body, lp)  # (B, nl, 3, nq)
    q = np.einsum("bkli,bliq,le->bkeq", f_chassis, jl, owner).reshape(n, cols, -1)

    # multipliers (columns: case-major, element-minor)
    elastic = m_rows > jac.shape[2]
    compliance = _compliance(link, members, m_rows)
    if result.elastic is not None:  # the redundant rods are the springs, the rest rigid
        compliance = spring_compliance(result.elastic.setup, compliance)
    lam = _multipliers(jac, q, compliance, elastic)
    lam_k = lam.reshape(n, m_rows, k_cases, n_el)
    nr = len(link.rod_names)
    rod_force = -lam_k[:, :nr].sum(axis=3).transpose(0, 2, 1)
    nbc = len(link.ball_components)
    ball_force = np.zeros((n, k_cases, len(link.ball_names), 3))
    if nbc and len(link.ball_names):
        balls = lam_k[:, nr:n_members].sum(axis=3).transpose(0, 2, 1)
        ball_force[..., list(link.ball_components)] = balls.reshape(
            n, k_cases, len(link.ball_names), nbc
        )
    contact_force = lam_k[:, n_members:].sum(axis=3).transpose(0, 2, 1)

    # wrench (about the chassis origin) on every body from rows and loads, per column
    nb = link.n_bodies
    wrench = np.zeros((n, cols, nb, 6))
    f_a = lam[:, :n_members, :, None] * grad[:, :, None, :]  # (B, m, C, 3) on first ends
    _add_point_forces(wrench, link.point_body[ends[:, 0]], kin.points[:, ends[:, 0]], f_a)
    _add_point_forces(wrench, link.point_body[ends[:, 1]], kin.points[:, ends[:, 1]], -f_a)
    cw = contact.contact_wrench(link, kin)  # (B, nc, 6)
    contact_w = lam[:, n_members:, :, None] * cw[:, :, None, :]  # (B, nc, C, 6)
    # numpy's stubs accept only integer indices in ufunc.at; it takes any index
    index = (slice(None), slice(None), link.corner_upright)
    np.add.at(wrench, index, contact_w.transpose(0, 2, 1, 3))  # type: ignore[arg-type]
    f_load = np.einsum("bkli,le->blkei", f_chassis, owner).reshape(n, -1, cols, 3)
    _add_point_forces(wrench, loads.body, lp, f_load)

    # hinge and slide reactions, from the leaves of the body tree to the chassis
    joint = np.zeros_like(wrench)
    axial = np.zeros((n, cols, nb))
    for b in reversed(link.order[1:]):
        if link.mount[b] == FREE:
            continue
        joint[:, :, b] = -wrench[:, :, b]
        wrench[:, :, link.parent[b]] += wrench[:, :, b]
        axial[:, :, b] = _axial(link, kin, b, joint[:, :, b])
    imbalance = np.where((link.mount == FREE)[None, None, :, None], wrench, 0.0)

    chassis = wrench[:, :, 0].reshape(n, k_cases, n_el, 6)
    refs = reference_points(link, routes)
    applied = np.zeros((n, k_cases, 6))
    applied[..., 0:3] = f_chassis.sum(axis=2)
    applied[..., 3:6] = cross(lp[:, None], f_chassis).sum(axis=2)
    vertical = np.einsum("kl,le->ke", loads.force_N[..., 2], owner)
    up_f, up_m = _upright_loads(link, routes, kin, grad, ends, lam_k, rot)
    corner_f: dict[str, Array] = {}
    corner_m: dict[str, Array] = {}
    for route in routes.routes:
        corner_f[route.corner] = corner_f.get(route.corner, 0.0) + up_f[route.name]
        corner_m[route.corner] = corner_m.get(route.corner, 0.0) + up_m[route.name]

    def per_case(a: Array) -> Array:
        return a.reshape(n, k_cases, n_el, *a.shape[2:]).sum(axis=2)

    return Statics(
        sweep=result.name,
        cases=loads.cases,
        elements=loads.elements,
        elastic=elastic,
        rod_force_N=rod_force,
        ball_force_N=ball_force,
        contact_force_N=contact_force,
        joint_wrench=per_case(joint),
        axial_residual=per_case(axial),
        imbalance=per_case(imbalance),
        chassis_wrench=chassis,
        leakage=_leakage(chassis, rot, trans, refs),
        leakage_virtual_work=np.full((n, k_cases, n_el, 3), np.nan)
        if not virtual_work
        else _virtual_work(
            link,
            kin,
            jac,
            n_members,
            contact,
            rot,
            trans,
            refs,
            lp,
            jl,
            f_ground,
            owner,
            None if result.elastic is None else result.elastic.setup,
        ),
        vertical_load_N=np.broadcast_to(vertical, (n, k_cases, n_el)).copy(),
        applied_wrench=applied,
        upright_force_N=up_f,
        upright_moment_Nm=up_m,
        corner_force_N=corner_f,
        corner_moment_Nm=corner_m,
    )


def _add_point_forces(
    wrench: Array, bodies: NDArray[np.intp], points: Array, forces: Array
) -> None:
    """Add forces (B, n, C, 3) at points (B, n, 3) on bodies (n,) to wrench (B, C, nb, 6)."""
    w = np.concatenate((forces, cross(points[:, :, None, :], forces)), axis=-1)
    index = (slice(None), slice(None), bodies)
    # numpy's stubs accept only integer indices in ufunc.at; it takes any index
    np.add.at(wrench, index, w.transpose(0, 2, 1, 3))  # type: ignore[arg-type]


def _compliance(link: Linkage, members: dict[str, Member], rows: int) -> Array:
    """Row compliance (mm/N): 1/(EA/L) for design rods, 0 for everything rigid."""
    c = np.zeros(rows)
    for i, name in enumerate(link.rod_names):
        if name in members:
            c[i] = 1.0 / members[name].stiffness_N_per_mm
    return c


def _multipliers(jac: Array, q: Array, compliance: Array, elastic: bool) -> Array:
    """Solve ``jacᵀ λ = −q`` (B, m', C); elastically when rows outnumber coordinates."""
    rhs = -np.swapaxes(q, 1, 2)  # (B, nq, C)
    jt = np.swapaxes(jac, 1, 2)  # (B, nq, m')
    if not elastic:
        # numpy's stubs type solve() of float64 arrays as floating[Any]
        return np.linalg.solve(jt, rhs)  # type: ignore[return-value]
    n, nq, m = jt.shape
    kkt = np.zeros((n, m + nq, m + nq))
    kkt[:, :m, :m] = np.diag(compliance)
    kkt[:, :m, m:] = jac
    kkt[:, m:, :m] = jt
    full = np.zeros((n, m + nq, rhs.shape[2]))
    full[:, m:] = rhs
    return np.linalg.solve(kkt, full)[:, :m]


def _axial(link: Linkage, kin: Kinematics, body: int, wrench: Array) -> Array:
    """The part of a joint reaction the joint cannot carry (≈ 0 at equilibrium):
    moment about a hinge axis (N·mm), force along a slide (N)."""
    parent = link.parent[body]
    rp, tp = kin.rotation[:, parent], kin.translation[:, parent]
    u = (rp @ link.axis_direction[:, body, :, None])[..., 0]  # (B, 3)
    if link.mount[body] == SLIDE:
        return np.einsum("bci,bi->bc", wrench[..., 0:3], u)
    a = (rp @ link.axis_origin[:, body, :, None])[..., 0] + tp
    moment = wrench[..., 3:6] - cross(a[:, None, :], wrench[..., 0:3])
    return np.einsum("bci,bi->bc", moment, u)


def _to_ground(wrench: Array, rot: Array, trans: Array) -> tuple[Array, Array]:
    """Chassis-frame wrench (B, ..., 6) about the chassis origin -> ground force and
    moment about the ground origin (N, N·mm)."""
    extra = wrench.ndim - 2
    r = rot.reshape(rot.shape[0], *([1] * extra), 3, 3)
    t = trans.reshape(trans.shape[0], *([1] * extra), 3)
    f = (r @ wrench[..., 0:3, None])[..., 0]
    m = (r @ wrench[..., 3:6, None])[..., 0] + cross(t, f)
    return f, m


def _leakage(chassis: Array, rot: Array, trans: Array, refs: Array) -> Array:
    """(B, K, E, 3) heave N, roll N·m, pitch N·m about ground axes through each ref."""
    f, m = _to_ground(chassis, rot, trans)
    m_ref = m - cross(refs[None, None], f)
    return np.stack((f[..., 2], m_ref[..., 0] / 1000.0, m_ref[..., 1] / 1000.0), axis=-1)


_GROUND_AXES = np.eye(3)


def _virtual_work(
    link: Linkage,
    kin: Kinematics,
    jac: Array,
    n_members: int,
    contact: BodyDrive,
    rot: Array,
    trans: Array,
    refs: Array,
    lp: Array,
    jl: Array,
    f_ground: Array,
    owner: Array,
    springs: ElasticSetup | None = None,
) -> Array:
    """(B, K, E, 3) leakage by virtual work: Σ F·δp for a chassis heave, and for roll and
    pitch about ground axes through each element's reference point, wheels on the
    ground (N, N·m)."""
    n, n_el = jac.shape[0], refs.shape[0]
    levers = contact.contact_levers(link, kin)  # (B, nc, 3)
    rhs = np.zeros((n, jac.shape[1], 3 * n_el))
    for e in range(n_el):
        rhs[:, n_members:, 3 * e] = 1.0  # heave: the ground drops relative to the body
        for j, axis in ((1, _GROUND_AXES[0]), (2, _GROUND_AXES[1])):
            d_up = -np.einsum("bji,j->bi", rot, np.cross(axis, [0.0, 0.0, 1.0]))
            d_tz = np.cross(axis, trans - refs[e])[:, 2]
            rhs[:, n_members:, 3 * e + j] = np.einsum("bi,bci->bc", d_up, levers) + d_tz[:, None]
    if jac.shape[1] == jac.shape[2]:
        dq = -np.linalg.solve(jac, rhs)
    elif springs is not None:  # redundant: the motion the springs allow at least energy
        dq = -elastic_response(springs, jac, rhs)
    else:
        dq = -(np.linalg.pinv(jac, rcond=1e-12) @ rhs)
    moved = np.einsum("bliq,bqc->blic", jl, dq)  # (B, nl, 3, 3E) chassis frame
    moved = np.einsum("bij,bljc->blic", rot, moved)  # ground frame
    p_ground = np.einsum("bij,blj->bli", rot, lp) + trans[:, None, :]
    out = np.zeros((n, f_ground.shape[1], n_el, 3))
    for e in range(n_el):
        mine = owner[:, e] > 0
        f = f_ground[:, :, mine]  # (B, K, nl_e, 3)
        rigid_heave = np.broadcast_to([0.0, 0.0, 1.0], p_ground[:, mine].shape)
        rigid_roll = np.cross(_GROUND_AXES[0], p_ground[:, mine] - refs[e])
        rigid_pitch = np.cross(_GROUND_AXES[1], p_ground[:, mine] - refs[e])
        for j, rigid in enumerate((rigid_heave, rigid_roll, rigid_pitch)):
            dp = rigid + moved[..., 3 * e + j][:, mine]
            work = np.einsum("bkli,bli->bk", f, dp)
            out[:, :, e, j] = work if j == 0 else work / 1000.0
    return out


def _upright_loads(
    link: Linkage,
    routes: RouteMap,
    kin: Kinematics,
    grad: Array,
    ends: NDArray[np.intp],
    lam_k: Array,
    rot: Array,
) -> tuple[dict[str, Array], dict[str, Array]]:
    """Force (N) and moment about the wheel centre (N·m) each route's delivering rods
    put on their corner, in the ground frame: (B, K, 3) per route."""
    forces: dict[str, Array] = {}
    moments: dict[str, Array] = {}
    lam_total = lam_k.sum(axis=3)  # (B, m', K)
    design = link.design
    for route in routes.routes:
        corner = design.corner(route.corner)
        own = {link.body(b) for b in corner.bodies}
        centre = kin.points[:, link.point(f"{corner.upright}.wheel_centre")]
        f_sum = np.zeros((kin.points.shape[0], lam_k.shape[2], 3))
        m_sum = np.zeros_like(f_sum)
        for rod in route.delivering_rods:
            r = link.rod_names.index(rod)
            for side, sign in ((0, 1.0), (1, -1.0)):
                if link.point_body[ends[r, side]] not in own:
                    continue
                f = sign * lam_total[:, r, :, None] * grad[:, r, None, :]  # (B, K, 3)
                lever = kin.points[:, ends[r, side]] - centre
                f_sum += f
                m_sum += cross(lever[:, None, :], f)
        forces[route.name] = np.einsum("bij,bkj->bki", rot, f_sum)
        moments[route.name] = np.einsum("bij,bkj->bki", rot, m_sum) / 1000.0
    return forces, moments
