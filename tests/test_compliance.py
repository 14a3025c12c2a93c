"""Route compliance on whole designs: vertical stiffness at the element pickup and the
element's deflection under load, against a hand derivation.

Hand derivation (springs in series through a lever).  A wheel held, a drive rod of
stiffness k_d from the upright to a rocker arm a, a hanger of stiffness k_h from the
rocker arm b = r·a (same side, arms horizontal, rods vertical) down to the element.  A
downward load F on the element pickup puts F in the hanger (tension) and r·F in the
drive rod (compression, moments about the pivot).  The hanger stretches F/k_h and the
pickup drops as much; the drive rod shortens r·F/k_d, the rocker turns and the hanger's
top drops r times that.  Total δ = F(1/k_h + r²/k_d), so
1/k = 1/k_h + r²/k_d; hung directly from the upright, k = k_h.
source: derived here; the same result as the equivalent spring constant of a spring
acting through a lever, k_eq = k/r², in series with another (Rao, Mechanical
Vibrations, equivalent springs, from memory).  Rod stiffness k = EA/L (axial
deformation of a bar, δ = PL/EA: any mechanics-of-materials text, e.g. Gere,
Mechanics of Materials, ch. 2, from memory).
"""

from __future__ import annotations

import pytest

from plumbrod.design.loading import parse_design
from plumbrod.mechanics.analysis import analyse
from plumbrod.mechanics.compliance import ComplianceReport, compliance_report
from structure_designs import FEATHER, STEEL_4130N, Hang, RodSpec, hang_text

# source: standard acceleration of gravity 9.80665 m/s² (3rd CGPM, 1901), pub.
G0_M_S2 = 9.80665


def _compliance(h: Hang) -> ComplianceReport:
    return compliance_report(analyse(parse_design(hang_text(h), "<structure fixture>")))


def _hand_stiffness(h: Hang) -> float:
    k_h = h.rods.stiffness_N_per_mm(h.hanger_length_mm)
    if h.ratio is None:
        return k_h
    k_d = h.rods.stiffness_N_per_mm(h.drive_length_mm)
    return 1.0 / (1.0 / k_h + h.ratio**2 / k_d)


@pytest.mark.parametrize("ratio", [None, 0.8, 1.25], ids=["direct", "lever-0.8", "lever-1.25"])
def test_route_stiffness_is_springs_in_series_through_the_lever(ratio: float | None) -> None:
    h = Hang(ratio=ratio, rods=RodSpec(od_mm=12.0, wall_mm=1.0, material=STEEL_4130N))
    report = _compliance(h)
    (k,) = report.route_stiffness_N_per_mm.values()
    assert k == pytest.approx(_hand_stiffness(h), rel=1e-9)
    if ratio == 1.25:
        # 12 x 1 tube, E 205 GPa: k_h = 205000·34.5575/320 = 22138 N/mm,
        # k_d = 205000·34.5575/180 = 39357 N/mm, k = 11783 N/mm
        assert k == pytest.approx(11782.6, abs=0.1)


def test_a_longer_lever_makes_the_route_softer() -> None:
    # the drive rod's stretch reaches the element multiplied by r²: at a larger ratio
    # the same rods give a softer route (hand derivation above)
    rods = RodSpec(material=STEEL_4130N)
    stiff = [
        next(iter(_compliance(Hang(ratio=r, rods=rods)).route_stiffness_N_per_mm.values()))
        for r in (0.8, 1.25)
    ]
    assert stiff[1] < stiff[0]
    assert stiff[0] == pytest.approx(_hand_stiffness(Hang(ratio=0.8, rods=rods)), rel=1e-9)


@pytest.mark.parametrize("ratio", [None, 1.25], ids=["direct", "lever-1.25"])
def test_element_deflection_is_load_over_route_stiffness(ratio: float | None) -> None:
    # One route, a vertical load through the hanger's line (aero force F plus the
    # element's weight; rods of negligible mass): the guides carry nothing and the
    # element's centre of pressure, straight below the hanger, drops F_total/k.
    force_N, mass_kg = 1500.0, 5.0
    h = Hang(ratio=ratio, force_N=force_N, element_mass_kg=mass_kg, rods=RodSpec(material=FEATHER))
    report = _compliance(h)
    total_N = force_N + mass_kg * G0_M_S2
    design_pose = h.travel_steps // 2  # the travel sweep is symmetric about 0 mm
    dz = report.deflection_mm["travel"]["wing"][design_pose, 0]
    assert dz == pytest.approx(-total_N / _hand_stiffness(h), rel=1e-9)
    assert dz < 0.0  # down, under a downward load
