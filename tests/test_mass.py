"""Added unsprung mass on whole designs: static share and kinetic-energy-equivalent mass.

Each fixture (tests/structure_designs.py) is laid out so that the figures follow by
hand at the design pose.  Rod masses are taken into account exactly, with rod masses
computed here as ρ·A·L from the material figures of REFERENCES.md; the same designs are
also run with rods of negligible density, where the figures reduce to the element's.

Hand rules used below (velocities per unit wheel speed, "ratio" = element motion per
unit wheel travel):

* static share at a tyre (kg) = Σ mᵢ·(vertical motion of mᵢ's load point per unit
  wheel travel): source: principle of virtual work (e.g. Meriam & Kraige, Engineering
  Mechanics: Statics, ch. 7, from memory).  A rod's weight is carried half at each
  end (a uniform two-force member: equal end reactions), as plumbrod's docstring says.
* kinetic-energy-equivalent mass = 2·KE per unit wheel speed squared:
  source: equivalent mass of a system with one degree of freedom, m_eq = Σ mᵢ(vᵢ/ẋ)² +
  Σ Iᵢ(ωᵢ/ẋ)² (Rao, Mechanical Vibrations, equivalent mass of a lever and of a rod
  turning about its end, from memory).
* a uniform rod with end velocities v_a, v_b (rigid, velocity linear along it):
  2·KE = m·∫₀¹|v_a + s(v_b − v_a)|² ds = m(v_a² + v_a·v_b + v_b²)/3 (derived here); a rod
  turning about one fixed end: m·v²/3 (I = mL²/3 about the end, from memory, same
  result).
"""

from __future__ import annotations

import pytest

from plumbrod.design.loading import parse_design
from plumbrod.mechanics.analysis import analyse
from plumbrod.mechanics.mass import MassReport, mass_report
from structure_designs import (
    FEATHER,
    STEEL_4130N,
    FrontPair,
    Hang,
    RodSpec,
    front_pair_text,
    hang_text,
)

RODS = {"4130-N": RodSpec(material=STEEL_4130N), "negligible": RodSpec(material=FEATHER)}


def _mass(text: str) -> MassReport:
    return mass_report(analyse(parse_design(text, "<structure fixture>")))


def _pair_rod_masses(p: FrontPair) -> tuple[float, float]:
    return p.rods.mass_kg(p.hanger_length_mm), p.rods.mass_kg(p.guide_length_mm)


@pytest.mark.parametrize("rods", RODS.values(), ids=RODS.keys())
def test_element_on_two_corners_adds_half_its_mass_to_each(rods: RodSpec) -> None:
    # source: a 10 kg element carried on two corners adds about 5 kg of unsprung mass
    # per corner: common practice, no source (REFERENCES.md, trade practice).  Here with
    # route ratio 1 on both sides and the cg midway, exactly half.
    pair = FrontPair(element_mass_kg=10.0, rods=rods)
    report = _mass(front_pair_text(pair))
    m_h, m_g = _pair_rod_masses(pair)
    # virtual work: element 10 kg at the middle moves 1/2; a hanger moves 1 at both
    # ends on its own side and 0 on the other; the guide's element half moves 1/2 and
    # its chassis half not at all -> 10/2 + m_h + (m_g/2)/2.
    expected = 10.0 / 2.0 + m_h + m_g / 4.0
    shares = {c.corner: c.static_share_kg for c in report.corners}
    assert set(shares) == {"front_left", "front_right"}
    for share in shares.values():
        assert share == pytest.approx(expected, rel=1e-9)
    if rods.material is FEATHER:
        assert shares["front_left"] == pytest.approx(5.0, rel=1e-9)


@pytest.mark.parametrize("rods", RODS.values(), ids=RODS.keys())
def test_rod_masses_are_density_times_area_times_length(rods: RodSpec) -> None:
    # source: m = ρ·A·L with A = π(D² − d²)/4 of a round tube (any mechanics-of-
    # materials text, section properties of a hollow circle, from memory); density of
    # 4130 7.85 g/cm³ (ASM datasheet via MatWeb, pub).
    pair = FrontPair(rods=rods)
    report = _mass(front_pair_text(pair))
    m_h, m_g = _pair_rod_masses(pair)
    assert report.bodies_kg["hanger_left"] == pytest.approx(m_h, rel=1e-12)
    assert report.bodies_kg["hanger_right"] == pytest.approx(m_h, rel=1e-12)
    assert report.bodies_kg["guide"] == pytest.approx(m_g, rel=1e-12)
    assert report.bodies_kg["tray"] == 10.0
    if rods.material is STEEL_4130N:
        # 12 x 1 mm tube, 190 mm: 7850 kg/m³ · 34.5575 mm² · 0.19 m = 0.0515 kg
        assert m_h == pytest.approx(0.05154, abs=1e-5)


@pytest.mark.parametrize("rods", RODS.values(), ids=RODS.keys())
def test_two_corner_heave_equivalent_mass_is_half_the_moving_mass(rods: RodSpec) -> None:
    # heave: both wheels rise together, the element translates at 1, both hangers
    # translate at 1, the guide turns about its chassis end (element end at 1):
    # 2·KE = m + 2·m_h + m_g/3, shared by two corners.
    pair = FrontPair(element_mass_kg=10.0, rods=rods)
    report = _mass(front_pair_text(pair))
    m_h, m_g = _pair_rod_masses(pair)
    expected = (10.0 + 2.0 * m_h + m_g / 3.0) / 2.0
    for corner in report.corners:
        assert corner.kinetic_heave_kg == pytest.approx(expected, rel=1e-9)


@pytest.mark.parametrize("inertia", [None, "given"], ids=["estimated", "given"])
@pytest.mark.parametrize("rods", RODS.values(), ids=RODS.keys())
def test_single_wheel_equivalent_mass_of_a_uniform_bar_is_a_third(
    rods: RodSpec, inertia: str | None
) -> None:
    # One wheel rises, the other stays: the element, a uniform slender bar of length
    # 2d = 1 m hung at its ends, turns about its far end.
    # source: uniform slender rod about one end, I = mL²/3, so m_eq at the moving end =
    # m/3 (e.g. Meriam & Kraige, Engineering Mechanics: Dynamics, table of mass moments
    # of inertia, from memory); equivalently m(1/2)² + I_cg·(1/(2d))² with
    # I_cg = m(2d)²/12 (same source).
    # "estimated": plumbrod's uniform block spanning the pickups, cg and centre of
    # pressure, all on one line here, is that same slender bar (module docstring).
    m, span_m = 10.0, 1.0
    i_cg = m * span_m**2 / 12.0
    given = (i_cg, 0.0, i_cg) if inertia == "given" else None
    pair = FrontPair(element_mass_kg=m, rods=rods, inertia_kg_m2=given, half_span_mm=500.0)
    report = _mass(front_pair_text(pair))
    m_h, m_g = _pair_rod_masses(pair)
    # rods: the rising side's hanger translates at 1; the other hanger does not move;
    # the guide's element end (the bar's middle) rises at 1/2: m_g/3·(1/2)².
    expected = m / 3.0 + m_h + m_g / 12.0
    assert m / 4.0 + i_cg / (span_m**2) == pytest.approx(m / 3.0, rel=1e-12)
    for corner in report.corners:
        assert corner.kinetic_single_kg == pytest.approx(expected, rel=1e-9), (
            f"{corner.corner}: expected m/3 + rods = {expected:.6f} kg, got "
            f"{corner.kinetic_single_kg:.6f} kg"
        )


@pytest.mark.parametrize("ratio", [None, 0.8, 1.25], ids=["direct", "lever-0.8", "lever-1.25"])
@pytest.mark.parametrize("rods", RODS.values(), ids=RODS.keys())
def test_hung_point_mass_equivalent_mass_scales_with_ratio_squared(
    rods: RodSpec, ratio: float | None
) -> None:
    # source: equivalent mass of a mass on a lever of ratio r, referred to the input:
    # m·r² (Rao, Mechanical Vibrations, equivalent mass, from memory); hung directly,
    # r = 1 and the figure is the mass itself.  The static share goes with r, not r²
    # (virtual work, module docstring).
    hang = Hang(ratio=ratio, element_mass_kg=5.0, rods=rods)
    report = _mass(hang_text(hang))
    r = 1.0 if ratio is None else ratio
    m_h = rods.mass_kg(hang.hanger_length_mm)
    m_g = rods.mass_kg(hang.guide_length_mm)
    m_d = 0.0 if ratio is None else rods.mass_kg(hang.drive_length_mm)
    # The element translates at r (parallel equal guides: no rotation at the design
    # pose); the hanger translates at r; each guide turns about its chassis end with its
    # element end at r; the drive rod translates at 1 (upright end and a horizontal arm
    # of the rocker).
    kinetic = r**2 * (5.0 + m_h + 2.0 * m_g / 3.0) + m_d
    # weights: element and both hanger halves move r; each guide's element half moves r;
    # the drive rod's halves move 1.
    static = r * (5.0 + m_h + m_g) + m_d
    (corner,) = report.corners
    assert corner.kinetic_single_kg == pytest.approx(kinetic, rel=1e-9)
    assert corner.kinetic_heave_kg == pytest.approx(kinetic, rel=1e-9)  # one corner only
    assert corner.static_share_kg == pytest.approx(static, rel=1e-9)
    if rods.material is FEATHER:
        assert corner.kinetic_single_kg == pytest.approx(5.0 * r**2, rel=1e-9)
        assert corner.static_share_kg == pytest.approx(5.0 * r, rel=1e-9)
