"""Section properties against handbook tables and general-purpose libraries."""

from __future__ import annotations

import math
import tomllib
from importlib import resources

import numpy as np
import pytest
import sympy
from hypothesis import given
from hypothesis import strategies as st
from shapely.geometry import Point

from plumbrod.design.materials import lookup_material
from plumbrod.design.sections import (
    Section,
    catalogue_sections,
    tube_area_mm2,
    tube_mass_per_m_kg,
    tube_radius_of_gyration_mm,
    tube_second_moment_mm4,
)

# source: 1 in = 25.4 mm exactly (NIST SP 811, 2008 ed., Appendix B), pub.
IN_MM = 25.4


def inch_tube(od_in: float, wall_in: float) -> Section:
    return Section.tube(od_in * IN_MM, wall_in * IN_MM)


@pytest.mark.parametrize(
    ("name", "od_in", "id_in", "area_in2", "inertia_in4", "radius_in"),
    [
        # source: Mott, Machine Elements in Mechanical Design, table A16-6, NPS 3/4
        # schedule 40 pipe, pub-copy (REFERENCES.md S1).
        ("S1", 1.050, 0.824, 0.333, 0.03704, 0.334),
        # source: Mott, table A16-6, NPS 1 schedule 40 pipe, pub-copy (REFERENCES.md S2).
        ("S2", 1.315, 1.049, 0.494, 0.08734, 0.421),
        # source: AISC Steel Construction Manual, table 1-13, round HSS 1.660 x 0.140 with
        # design wall 0.93 x nominal = 0.130 in, pub-copy (REFERENCES.md S3).
        ("S3", 1.660, 1.660 - 2 * 0.130, 0.625, 0.184, 0.543),
    ],
)
def test_tube_properties_match_published_tables(
    name: str, od_in: float, id_in: float, area_in2: float, inertia_in4: float, radius_in: float
) -> None:
    section = inch_tube(od_in, (od_in - id_in) / 2.0)
    # The tables round to the last printed digit: half a unit of that digit.
    area_tol = 0.0005 * IN_MM**2
    inertia_tol = (0.000005 if inertia_in4 < 0.1 else 0.0005) * IN_MM**4
    assert section.area_mm2 == pytest.approx(area_in2 * IN_MM**2, abs=area_tol), name
    assert section.second_moment_mm4 == pytest.approx(inertia_in4 * IN_MM**4, abs=inertia_tol)
    assert section.radius_of_gyration_mm == pytest.approx(radius_in * IN_MM, abs=0.0005 * IN_MM)


def test_solid_bar_second_moment_matches_mott_example() -> None:
    # source: Mott, Machine Elements in Mechanical Design, ch. 6 example (REFERENCES.md C3),
    # pub-copy: solid round bar d = 1.25 in has I = 0.1198 in^4.
    bar = Section.solid(1.25 * IN_MM)
    assert bar.second_moment_mm4 == pytest.approx(0.1198 * IN_MM**4, abs=0.00005 * IN_MM**4)
    assert bar.radius_of_gyration_mm == pytest.approx(1.25 * IN_MM / 4.0, rel=1e-12)
    assert bar.id_mm == 0.0


def test_area_matches_shapely_annulus() -> None:
    # source: shapely (general-purpose geometry library): area of a finely segmented
    # annulus; polygon error about (2π/n)²/6 for n segments per circle.
    od, wall = 31.75, 1.65
    ring = (
        Point(0, 0)
        .buffer(od / 2, quad_segs=1024)
        .difference(Point(0, 0).buffer(od / 2 - wall, quad_segs=1024))
    )
    assert Section.tube(od, wall).area_mm2 == pytest.approx(ring.area, rel=1e-5)


def test_second_moment_matches_sympy_integral() -> None:
    # source: sympy symbolic integration of I = ∫ y² dA over the annulus in polar
    # coordinates (general-purpose reference library).
    rho, theta, big, small = sympy.symbols("rho theta R r", positive=True)
    integral = sympy.integrate(
        (rho * sympy.sin(theta)) ** 2 * rho, (rho, small, big), (theta, 0, 2 * sympy.pi)
    )
    od, wall = 25.0, 1.5
    expected = float(integral.subs({big: od / 2, small: od / 2 - wall}))
    assert Section.tube(od, wall).second_moment_mm4 == pytest.approx(expected, rel=1e-12)


def test_mass_per_metre_is_density_times_area() -> None:
    steel = lookup_material("4130-N")
    section = Section.tube(25.0, 1.5)
    expected = steel.density_kg_m3 * section.area_mm2 * 1e-6  # kg/m³ × m² = kg/m
    assert section.mass_per_m_kg(steel) == pytest.approx(expected, rel=1e-12)
    # source: steel tube weight charts list 1 in x 0.049 in 4130 tube at about
    # 0.498 lb/ft, from memory (checked to 0.5 %).
    lb_per_ft = inch_tube(1.0, 0.049).mass_per_m_kg(steel) * 0.3048 / 0.45359237
    assert lb_per_ft == pytest.approx(0.498, rel=5e-3)


@pytest.mark.parametrize("ndim", [1, 2, 3, 4])
def test_array_functions_broadcast_and_match_scalars(ndim: int) -> None:
    rng = np.random.default_rng(7)
    shape = (2, 3, 1, 2)[:ndim]
    od = rng.uniform(10.0, 50.0, size=shape)
    wall = od * rng.uniform(0.02, 0.5, size=shape)
    area = tube_area_mm2(od, wall)
    inertia = tube_second_moment_mm4(od, wall)
    radius = tube_radius_of_gyration_mm(od, wall)
    assert area.shape == inertia.shape == radius.shape == shape
    for index in np.ndindex(shape):
        if wall[index] < od[index] / 2:
            ref = Section.tube(float(od[index]), float(wall[index]))
        else:
            ref = Section.solid(float(od[index]))
        assert area[index] == pytest.approx(ref.area_mm2, rel=1e-12)
        assert inertia[index] == pytest.approx(ref.second_moment_mm4, rel=1e-12)
        assert radius[index] == pytest.approx(math.sqrt(inertia[index] / area[index]), rel=1e-12)
    # One OD against several walls broadcasts to the walls' shape.
    assert tube_area_mm2(20.0, [[1.0], [2.0]]).shape == (2, 1)


def test_wall_of_half_od_is_the_solid_bar() -> None:
    bar = Section.solid(12.0)
    assert tube_area_mm2(12.0, 6.0) == pytest.approx(math.pi * 12.0**2 / 4, rel=1e-15)
    assert tube_second_moment_mm4(12.0, 6.0) == pytest.approx(bar.second_moment_mm4, rel=1e-15)
    assert tube_mass_per_m_kg(12.0, 6.0, 1000.0) == pytest.approx(bar.area_mm2 * 1e-3)


@pytest.mark.parametrize(
    ("make", "message"),
    [
        (lambda: Section.tube(20.0, 10.0), r"wall_mm: expected 0 < wall < od_mm/2 = 10, got 10.0"),
        (lambda: Section.tube(20.0, 0.0), r"wall_mm: expected 0 < wall"),
        (lambda: Section.tube(-20.0, 1.0), r"od_mm: expected a positive finite diameter"),
        (lambda: Section("solid", 20.0, 2.0), r"wall_mm: expected None for a solid bar"),
        (lambda: Section("tube", 20.0), r"wall_mm: expected a wall thickness for a tube"),
        (lambda: Section("hex", 20.0), r"kind: expected 'tube' or 'solid', got 'hex'"),
        (lambda: tube_area_mm2([20.0, 20.0], [1.0, 10.5]), r"wall_mm: expected 0 < wall_mm"),
        (lambda: tube_area_mm2(0.0, 1.0), r"od_mm: expected a positive"),
        (lambda: tube_mass_per_m_kg(20.0, 1.0, -5.0), r"density_kg_m3: expected a positive"),
    ],
)
def test_invalid_sections_raise_value_errors_naming_the_field(make, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        make()


def test_catalogue_is_sorted_by_area_and_filtered_by_system() -> None:
    every = catalogue_sections()
    metric = catalogue_sections("metric")
    inch = catalogue_sections("inch")
    assert len(every) == len(metric) + len(inch) and metric and inch
    for group in (every, metric, inch):
        areas = [s.area_mm2 for s in group]
        assert areas == sorted(areas)
    assert {s.system for s in metric} == {"metric"} and {s.system for s in inch} == {"inch"}
    assert all(s.kind == "tube" and s.designation for s in every)
    with pytest.raises(ValueError, match=r"system: expected one of all, metric, inch, got 'si'"):
        catalogue_sections("si")


def test_catalogue_inch_rows_convert_exactly_and_state_their_source() -> None:
    text = resources.files("plumbrod.design").joinpath("data", "tubes.toml").read_text("utf-8")
    data = tomllib.loads(text)
    # No published dimension table could be confirmed for this list.
    assert data["catalogue"]["source"] == "common practice, no source"
    for row in data["inch"]:
        assert row["od_mm"] == pytest.approx(row["od_in"] * IN_MM, abs=5e-5)
        assert row["wall_mm"] == pytest.approx(row["wall_in"] * IN_MM, abs=5e-5)
        assert row["designation"].endswith(f"x {row['wall_in']:.3f} in")
    # source: 1 in x 0.049 in is a common 4130 tube size (common practice, no source).
    assert any(s.designation == "1 in x 0.049 in" for s in catalogue_sections("inch"))


@given(
    od=st.floats(5.0, 80.0),
    thin=st.floats(0.01, 0.45),
    thick=st.floats(0.01, 0.45),
)
def test_thicker_wall_has_more_area_and_second_moment(od: float, thin: float, thick: float) -> None:
    t1, t2 = sorted((thin * od, thick * od))
    assert tube_area_mm2(od, t2) >= tube_area_mm2(od, t1)
    assert tube_second_moment_mm4(od, t2) >= tube_second_moment_mm4(od, t1)
    # A thinner wall puts the material further out: the radius of gyration grows.
    assert tube_radius_of_gyration_mm(od, t1) >= tube_radius_of_gyration_mm(od, t2)
