"""Invented test fixture for the elastic solution of redundant location: a rigid beam
hung by three vertical rods (side view), a and b from the front slider upright, c from
the rear one, with a horizontal guide to the chassis.  Three vertical rods hold the
beam's height and pitch: one more than it needs.  Moving the two uprights by unequal
travels moves the rods' supports: a and b together, c on its own."""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.loading import parse_design
from plumbrod.design.model import Design
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.drives import TravelDrive
from plumbrod.kinematics.elastic import elastic_setup
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.sweeps import SweepResult, SweepSpec, run_sweep
from plumbrod.mechanics.members import resolve_members
from plumbrod.mechanics.redundancy import rod_stiffness

Array = NDArray[np.float64]
X_MM = (-200.0, 100.0, 300.0)
LENGTH_MM = 400.0
Z_BEAM = 200.0
E_4130_MPA = 205_000.0  # source: ASM datasheet for 4130 normalized (MatWeb), pub


def tube_area_mm2(od: float, wall: float) -> float:
    return float(np.pi / 4.0 * (od**2 - (od - 2.0 * wall) ** 2))


def beam_text(
    sections: tuple[tuple[float, float], ...] = ((16.0, 1.2),) * 3,
    moduli_MPa: tuple[float, float, float] = (E_4130_MPA,) * 3,
) -> str:
    """TOML of the three-rod beam; ``sections`` (od, wall) and moduli per rod a, b, c."""
    out = [
        "# Invented test fixture: a beam on three rods from three slider uprights.",
        "[design]",
        'name = "beam on three rods (test fixture)"',
        'plane = "side"',
        "",
        "[chassis.pickups]",
        f"guide = [700.0, {Z_BEAM}]",
        "",
    ]
    for corner, wheel_x, tops in (("front", 0.0, "ab"), ("rear", 400.0, "c")):
        out += [
            f"[corners.{corner}]",
            f"wheel_centre_mm = [{wheel_x}, 300.0]",
            "tyre_radius_mm = 300.0",
            "tyre_width_mm = 200.0",
            'suspension = "slider"',
            "",
            f"[corners.{corner}.pickups.upright]",
            *(f"top_{n} = [{X_MM['abc'.index(n)]}, {Z_BEAM + LENGTH_MM}]" for n in tops),
            "",
        ]
    for i in range(3):
        out += [
            f"[materials.m{i}]",
            f"modulus_MPa = {moduli_MPa[i]!r}",
            "yield_MPa = 435.0",
            "ultimate_MPa = 670.0",
            "density_kg_m3 = 7850.0",
            'source = "test fixture (invented)"',
            "",
        ]
    out += [
        "[elements.beam]",
        'kind = "other"',
        "mass_kg = 4.0",
        f"cg_mm = [180.0, {Z_BEAM}]",
        f"centre_of_pressure_mm = [180.0, {Z_BEAM}]",
        "",
        "[elements.beam.pickups]",
        *(f"{n} = [{x}, {Z_BEAM}]" for n, x in zip("abc", X_MM, strict=True)),
        f"guide = [400.0, {Z_BEAM}]",
        "",
    ]
    for i, name in enumerate("abc"):
        od, wall = sections[i]
        out += [
            f"[rods.{name}]",
            f'ends = ["{"rear" if name == "c" else "front"}.upright.top_{name}", "beam.{name}"]',
            f'material = "m{i}"',
            f"od_mm = {od!r}",
            f"wall_mm = {wall!r}",
            "",
        ]
    out += [
        "[rods.guide]",
        'ends = ["chassis.guide", "beam.guide"]',
        'material = "4130-N"',
        "od_mm = 12.0",
        "wall_mm = 1.0",
        "",
        "[sweeps.travel]",
        "range_mm = [-1.0, 1.0]",
        "steps = 3",
        "",
        "[sweeps.heave]",
        "enabled = false",
        "[sweeps.roll]",
        "enabled = false",
        "[sweeps.pitch]",
        "enabled = false",
    ]
    return "\n".join(out) + "\n"


def stiffness_of(design: Design, link: Linkage) -> Array:
    """(3,) EA/L of rods a, b, c (N/mm)."""
    k = rod_stiffness(link, resolve_members(design))
    return np.array([k[link.rod_names.index(n)] for n in "abc"])


def solve_moved(text: str, moves_mm: Array) -> tuple[Design, Linkage, SweepResult]:
    """Solve the beam elastically with the supports of rods a, b, c moved up by
    ``moves_mm`` (B, 3); a and b share the front upright, so their moves are equal."""
    design = parse_design(text, "beam on three rods")
    link = build_linkage(design)
    springs = elastic_setup(link, rod_stiffness(link, resolve_members(design)))
    assert springs is not None
    moves = np.atleast_2d(np.asarray(moves_mm, dtype=float))
    assert np.array_equal(moves[:, 0], moves[:, 1]), "rods a and b share an upright"
    travel = moves[:, [0, 2]]  # corners front (a, b) and rear (c)
    spec = SweepSpec("moved", TravelDrive(travel), {"travel_mm": travel[:, 0]})
    return design, link, run_sweep(link, spec, springs)


def closed_form(k: Array, moves: Array, load_N: float = 0.0, at_mm: float = 0.0) -> Array:
    """Rod forces (+ tension) of the rigid beam on three springs with supports moved up
    by ``moves`` and a downward load at ``at_mm``.

    Statically indeterminate rigid bar (Gere, Mechanics of Materials, §2.4 and §2.5
    (misfits and prestrains), and Hibbeler, Mechanics of Materials, §4.4-4.6, the
    "rigid bar on three wires/posts" examples; the method, not their numbers, from
    memory): the beam's upward displacement is linear, w(x) = u + θx (compatibility);
    rod i stretches by δᵢ = Δᵢ − w(xᵢ) and pulls Tᵢ = kᵢδᵢ (Hooke); ΣTᵢ = W and
    ΣTᵢxᵢ = W·x_W (equilibrium). Hence
        [Σk   Σkx ] [u]   [ΣkΔ  − W    ]
        [Σkx  Σkx²] [θ] = [ΣkxΔ − W·x_W].
    """
    x = np.array(X_MM)
    a = np.array([[k.sum(), (k * x).sum()], [(k * x).sum(), (k * x * x).sum()]])
    b = np.array([(k * moves).sum() - load_N, (k * x * moves).sum() - load_N * at_mm])
    u, theta = np.linalg.solve(a, b)
    return k * (moves - (u + theta * x))
