"""``thinnest_wall_mm``: the least wall at a rod's OD that meets its reserves, against the
closed forms of the Euler and tension limits (inverted by hand below)."""

from __future__ import annotations

import math

import pytest

from plumbrod.design.materials import load_materials
from plumbrod.design.model import Rod
from plumbrod.design.sections import Section
from plumbrod.mechanics.members import Member
from plumbrod.revise.sizing import thinnest_wall_mm


def _member(od: float, length: float, material: str = "4130-N") -> Member:
    rod = Rod("r", "a.x", "b.y", material, od, 1.0)
    return Member(rod, Section.tube(od, 1.0), load_materials()[material], length)


def test_an_euler_column_gets_the_wall_of_the_closed_form() -> None:
    # source: Euler P_cr = π²EI/(KL)² (any mechanics-of-materials text, e.g. Gere,
    # Mechanics of Materials, §11.3, pub-copy), K = 1. Required I = RF·|P|·L²/(π²E);
    # a tube's I = π/64·(D⁴ − (D − 2t)⁴), so t = (D − (D⁴ − 64·I/π)^(1/4)) / 2.
    od, length, load, rf = 16.0, 900.0, -1500.0, 3.0
    member = _member(od, length)
    e = member.material.modulus_MPa
    inertia = rf * abs(load) * length**2 / (math.pi**2 * e)
    expected = (od - (od**4 - 64.0 * inertia / math.pi) ** 0.25) / 2.0
    wall = thinnest_wall_mm(member, load, 0.0, rf, 2.0)
    assert wall == pytest.approx(expected, rel=1e-7)
    # slender enough to be Euler: KL/r above √(2π²E/S_y) (Shigley §4-13, pub)
    inner = od - 2 * wall
    r = math.sqrt((od**2 + inner**2) / 16.0)
    assert length / r > math.sqrt(2 * math.pi**2 * e / member.material.yield_MPa)


def test_a_tension_rod_gets_the_wall_of_the_area_it_needs() -> None:
    # S_y·A = RF·P, A = π/4·(D² − (D − 2t)²): t = (D − √(D² − 4A/π)) / 2 (plane geometry)
    od, load, rf = 12.0, 9000.0, 2.0
    member = _member(od, 300.0)
    area = rf * load / member.material.yield_MPa
    expected = (od - math.sqrt(od**2 - 4.0 * area / math.pi)) / 2.0
    assert thinnest_wall_mm(member, 0.0, load, 3.0, rf) == pytest.approx(expected, rel=1e-7)


def test_the_larger_of_the_two_needs_wins_and_a_bar_too_weak_is_none() -> None:
    member = _member(16.0, 900.0)
    both = thinnest_wall_mm(member, -1500.0, 9000.0, 3.0, 2.0)
    only_b = thinnest_wall_mm(member, -1500.0, 0.0, 3.0, 2.0)
    only_t = thinnest_wall_mm(member, 0.0, 9000.0, 3.0, 2.0)
    assert both == pytest.approx(max(only_b, only_t), rel=1e-12)
    assert thinnest_wall_mm(member, -1e7, 0.0, 3.0, 2.0) is None
