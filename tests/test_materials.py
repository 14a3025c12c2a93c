"""Shipped material table against its cited sources; lookup and validation."""

from __future__ import annotations

import dataclasses
import math

import pytest

from plumbrod.design.materials import (
    BASES,
    Material,
    UnknownMaterialError,
    load_materials,
    lookup_material,
    material_from_values,
)
from plumbrod.errors import PlumbrodError

# source: 1 in = 25.4 mm and 1 lbf = 0.45359237 kg × 9.80665 m/s², both exact by
# definition (NIST SP 811, 2008 ed., Appendix B), pub.
IN_MM = 25.4
LBF_N = 0.45359237 * 9.80665
KSI_MPA = 1000.0 * LBF_N / IN_MM**2


def values(material_id: str) -> tuple[float, float, float, float]:
    m = lookup_material(material_id)
    return (m.modulus_MPa, m.yield_MPa, m.ultimate_MPa, m.density_kg_m3)


def test_4130_normalized_typical_equals_asm_datasheet() -> None:
    # source: ASM Aerospace Specification Metals datasheet AISI 4130 normalized 870 °C,
    # via MatWeb (REFERENCES.md, Materials), pub: E 205 GPa, Sy 435, Su 670 MPa, 7.85 g/cm³.
    assert values("4130-N") == (205000.0, 435.0, 670.0, 7850.0)
    assert lookup_material("4130-N").basis == "typical"


def test_4130_annealed_typical_equals_asm_datasheet() -> None:
    # source: ASM datasheet AISI 4130 annealed 865 °C, via MatWeb, pub: 205 GPa, 460, 560 MPa.
    assert values("4130-A") == (205000.0, 460.0, 560.0, 7850.0)


def test_4130_ams6345_minima() -> None:
    # source: AMS 6345 minima as quoted by a supplier (REFERENCES.md), pub-copy:
    # yield 75 ksi, tensile 95 ksi for t <= 0.187 in; E 29.0e3 ksi per MMPDS, memory.
    m = lookup_material("4130-N-AMS6345")
    assert m.basis == "minimum"
    assert m.yield_MPa == pytest.approx(75.0 * KSI_MPA, rel=2e-4)
    assert m.ultimate_MPa == pytest.approx(95.0 * KSI_MPA, rel=2e-4)
    assert m.modulus_MPa == pytest.approx(29.0e3 * KSI_MPA, rel=1e-5)


def test_mild_steel_tube_grades_equal_standard_minima() -> None:
    # source: EN 10305-1, condition +N, E235: ReH min 235 MPa, Rm 340-480 MPa, as quoted
    # by tube suppliers, pub-copy.
    m = lookup_material("E235-N")
    assert (m.yield_MPa, m.ultimate_MPa, m.basis) == (235.0, 340.0, "minimum")
    # source: ASTM A513 Type 5 (DOM) grade 1020: 60,000 psi yield, 70,000 psi tensile,
    # as quoted by a tube mill's technical data sheet, pub-copy.
    dom = lookup_material("1020-DOM")
    assert dom.yield_MPa == pytest.approx(60.0 * KSI_MPA, rel=2e-4)
    assert dom.ultimate_MPa == pytest.approx(70.0 * KSI_MPA, rel=2e-4)
    assert dom.basis == "minimum"


def test_aluminium_and_titanium_rows_equal_references() -> None:
    # source: Aluminum Association typical values for 6061-T6 via MatWeb, pub-copy.
    assert values("6061-T6") == (68900.0, 276.0, 310.0, 2700.0)
    # source: MatWeb / SubsTech datasheets for 7075-T6, pub.
    assert values("7075-T6") == (72000.0, 503.0, 572.0, 2810.0)
    # source: ASM datasheet for Ti-6Al-4V annealed, pub-copy.
    assert values("Ti64-A") == (113800.0, 880.0, 950.0, 4430.0)
    # source: ASTM B348 grade 5 minima 827 / 896 MPa, pub-copy.
    b348 = lookup_material("Ti64-B348")
    assert (b348.yield_MPa, b348.ultimate_MPa, b348.basis) == (827.0, 896.0, "minimum")


def test_cfrp_row_says_what_yield_means_and_to_confirm_with_supplier() -> None:
    m = lookup_material("CFRP-TUBE")
    assert m.basis == "typical"
    assert "compressive" in m.note.lower()
    assert "supplier" in (m.name + m.source).lower()
    assert "memory" in m.source


def test_every_row_has_basis_and_tagged_source() -> None:
    table = load_materials()
    assert len(table) >= 8
    for key, m in table.items():
        assert key == m.id
        assert m.basis in BASES
        assert any(tag in m.source for tag in ("pub", "pub-copy", "memory")), m.id
        # Physical sanity: a metal's ultimate strength exceeds its 0.2 % yield.
        if not m.id.startswith("CFRP"):
            assert m.ultimate_MPa > m.yield_MPa, m.id


def test_table_is_cached_and_read_only() -> None:
    table = load_materials()
    assert load_materials() is table
    with pytest.raises(TypeError):
        table["x"] = table["4130-N"]  # type: ignore[index]
    with pytest.raises(dataclasses.FrozenInstanceError):
        table["4130-N"].yield_MPa = 1.0  # type: ignore[misc]


def test_lookup_is_case_insensitive_when_unique() -> None:
    assert lookup_material("6061-t6") is lookup_material("6061-T6")


def test_unknown_material_suggests_close_ids() -> None:
    expected = r"unknown material '4310-N'; did you mean '4130-N'"
    with pytest.raises(UnknownMaterialError, match=expected):
        lookup_material("4310-N")
    with pytest.raises(KeyError):
        lookup_material("unobtainium")
    with pytest.raises(PlumbrodError, match="known: "):
        lookup_material("zzzzzzzz")


def test_lookup_in_a_user_table_overrides_the_shipped_one() -> None:
    mine = material_from_values(
        "4130-N",
        "4130 from our supplier's certificate",
        205000,
        520,
        690,
        7850,
        "minimum",
        "supplier mill certificate (invented example)",
    )
    table = {**load_materials(), mine.id: mine}
    assert lookup_material("4130-N", table).yield_MPa == 520.0
    assert lookup_material("4130-N").yield_MPa == 435.0


@pytest.mark.parametrize(
    ("field", "bad"),
    [
        ("modulus_MPa", -1.0),
        ("yield_MPa", 0.0),
        ("ultimate_MPa", math.nan),
        ("density_kg_m3", math.inf),
        ("yield_MPa", "400"),
        ("modulus_MPa", True),
    ],
)
def test_material_from_values_rejects_non_positive_numbers(field: str, bad: object) -> None:
    good = dict(
        id="X",
        name="test",
        modulus_MPa=1.0,
        yield_MPa=1.0,
        ultimate_MPa=1.0,
        density_kg_m3=1.0,
        basis="typical",
        source="invented",
    )
    good[field] = bad
    with pytest.raises(ValueError, match=rf"^{field}: expected a positive"):
        material_from_values(**good)  # type: ignore[arg-type]


def test_material_from_values_rejects_bad_basis_and_empty_text() -> None:
    args = ("X", "test", 1.0, 1.0, 1.0, 1.0)
    with pytest.raises(ValueError, match=r"^basis: expected one of typical, minimum, got 'avg'"):
        material_from_values(*args, "avg", "invented")
    with pytest.raises(ValueError, match=r"^source: expected a non-empty string"):
        material_from_values(*args, "typical", "  ")
    m = material_from_values(*args, "typical", "invented")
    assert isinstance(m, Material) and m.modulus_MPa == 1.0
