"""The schema table (plumbrod.design.schema) and what it drives in the loader.

The table must be whole (every table key's parent is a table in it, every number has
both bounds), agree with the model's defaults, and the loader must refuse what it
refuses: names with a trailing newline or too long for a file name, a material id
with a quote, a self-crossing or collinear prism outline, UTF-16 and byte-order marks.
"""

from __future__ import annotations

import dataclasses

import pytest

from designs import EXAMPLE, replace_once
from plumbrod.design.loading import load_design, parse_design
from plumbrod.design.model import Limits, LoadCase, PlateSpec, Rod, Sweeps
from plumbrod.design.schema import KEYS, KINDS, children, entry
from plumbrod.errors import DesignFileError

BASE = EXAMPLE.read_text(encoding="utf-8")
OUTLINE = "outline_mm = [[-280.0, 60.0], [280.0, 60.0], [300.0, 520.0], [-300.0, 520.0]]"


def _error(text: str) -> DesignFileError:
    with pytest.raises(DesignFileError) as caught:
        parse_design(text, "d.toml")
    return caught.value


def test_every_key_sits_in_a_table_of_the_schema() -> None:
    paths = {k.path for k in KEYS}
    assert len(paths) == len(KEYS), "a key path is listed twice"
    for key in KEYS:
        assert key.kind in KINDS, key.path
        if key.parent:
            parent = entry(key.parent)
            assert parent.kind in ("table", "named"), key.path
        assert key.meaning and "\n" not in key.meaning, key.path


def test_every_number_has_both_bounds_and_a_default_inside_them() -> None:
    for key in KEYS:
        if not key.numeric and key.kind != "steps2":
            continue
        assert key.minimum is not None and key.maximum is not None, key.path
        assert key.minimum < key.maximum, key.path
        if key.default is not None:
            values = key.default if isinstance(key.default, tuple) else (key.default,)
            for v in values:
                assert key.minimum <= v <= key.maximum, key.path


def test_defaults_agree_with_the_model() -> None:
    limits = Limits()
    assert {k.name for k in children("limits")} == {f.name for f in dataclasses.fields(Limits)}
    for key in children("limits"):
        assert key.default == getattr(limits, key.name), key.path
    sweeps = Sweeps()
    for kind, unit in (("travel", "mm"), ("heave", "mm"), ("roll", "deg"), ("pitch", "deg")):
        assert entry(f"sweeps.{kind}.range_{unit}").default == getattr(sweeps, f"{kind}_{unit}")
        assert entry(f"sweeps.{kind}.steps").default == getattr(sweeps, f"{kind}_steps")
    assert entry("sweeps.motion_centre_mm").default == sweeps.motion_centre_mm
    rod = {f.name: f.default for f in dataclasses.fields(Rod)}
    assert entry("rods.*.end_fixity").default == rod["end_fixity"]
    assert entry("rods.*.rod_end_allowance_mm").default == rod["rod_end_allowance_mm"]
    case = {f.name: f.default for f in dataclasses.fields(LoadCase)}
    for name in ("bump_g", "longitudinal_g", "lateral_g", "air_density_kg_m3"):
        assert entry(f"load_cases.*.{name}").default == case[name]
    assert {k.name for k in children("rockers.*.plate")} == {
        f.name for f in dataclasses.fields(PlateSpec)
    }


def test_allowed_keys_come_from_the_table() -> None:
    error = _error(replace_once(BASE, "mass_kg = 7.5", "mass_kg = 7.5\nzzz = 1"))
    assert error.key == "elements.splitter.zzz"
    allowed = ", ".join(k.name for k in children("elements.*"))
    assert error.fix == "allowed keys: " + allowed


def test_a_name_with_a_trailing_newline_is_refused() -> None:
    error = _error(replace_once(BASE, "[rods.drop_left]", '[rods."drop_left\\n"]'))
    assert error.key.startswith("rods.")
    assert "characters other than" in error.problem


def test_a_name_too_long_for_a_file_name_is_refused() -> None:
    long = "r" * 101
    error = _error(BASE.replace("rocker_left", long))
    assert "more than 100" in error.problem
    assert "file names" in error.fix


def test_a_material_id_with_a_quote_is_refused() -> None:
    text = BASE + '\n[materials."4130\\"x"]\nmodulus_MPa = 1\nyield_MPa = 1\n'
    text += 'ultimate_MPa = 1\ndensity_kg_m3 = 1\nsource = "invented"\n'
    error = _error(text)
    assert error.key.startswith("materials.")
    assert "quote" in error.problem


@pytest.mark.parametrize(
    ("outline", "problem"),
    [
        ("[[0.0, 0.0], [100.0, 100.0], [100.0, 0.0], [0.0, 100.0]]", "crosses itself"),
        ("[[0.0, 0.0], [50.0, 0.0], [100.0, 0.0]]", "on one line"),
        ("[[0.0, 0.0], [100.0, 0.0], [100.0, 0.0], [0.0, 100.0]]", "same point"),
    ],
)
def test_a_bad_prism_outline_is_refused(outline: str, problem: str) -> None:
    error = _error(replace_once(BASE, OUTLINE, f"outline_mm = {outline}"))
    assert error.key == "zones.tub.outline_mm"
    assert problem in error.problem
    assert error.fix


@pytest.mark.parametrize(
    ("encode", "said"),
    [
        (lambda t: b"\xef\xbb\xbf" + t.encode("utf-8"), "UTF-8 with a byte-order mark"),
        (lambda t: t.encode("utf-16"), "UTF-16"),
        (lambda t: t.encode("utf-16-le"), "UTF-16"),
        (lambda t: t.encode("utf-16-be"), "UTF-16"),
    ],
)
def test_utf16_and_byte_order_marks_are_named(encode, said, tmp_path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "d.toml"
    path.write_bytes(encode(BASE))
    with pytest.raises(DesignFileError) as caught:
        load_design(path)
    assert said in caught.value.problem
    assert "save it as UTF-8" in caught.value.fix
