"""The JSON Schema of ``plumbrod schema`` against the jsonschema library (draft 2020-12).

Reference library: jsonschema's Draft202012Validator checks that the emitted schema is
itself a valid draft 2020-12 schema, accepts every example, the bundled templates and
the starter ``plumbrod new`` writes, and refuses broken files.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tomllib
from pathlib import Path

import jsonschema
import pytest

import plumbrod
from designs import EXAMPLE, EXAMPLES, replace_once
from plumbrod.design.json_schema import SCHEMA_FILE_NAME, design_json_schema, schema_text
from plumbrod.design.loading import parse_design
from plumbrod.design.schema import children
from plumbrod.design.templates import STARTER, read_template
from plumbrod.design.tune_spec import read_tune
from plumbrod.kinematics.build import build_linkage

TEMPLATES = sorted((Path(plumbrod.__file__).parent / "design" / "templates").glob("*.toml"))
BASE = EXAMPLE.read_text(encoding="utf-8")


def _validator() -> jsonschema.Draft202012Validator:
    return jsonschema.Draft202012Validator(design_json_schema())


def _run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", *args],
        capture_output=True,
        text=True,
        cwd=cwd,
        env=env,
        timeout=120,
        check=False,
    )


def test_the_schema_is_valid_draft_2020_12() -> None:
    schema = design_json_schema()
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    jsonschema.Draft202012Validator.check_schema(schema)


@pytest.mark.parametrize("path", [*EXAMPLES, *TEMPLATES], ids=lambda p: p.name)
def test_every_example_and_template_validates(path: Path) -> None:
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    errors = [f"{list(e.absolute_path)}: {e.message}" for e in _validator().iter_errors(data)]
    assert errors == []


def test_the_starter_validates() -> None:
    data = tomllib.loads(read_template(STARTER))
    assert list(_validator().iter_errors(data)) == []


@pytest.mark.parametrize(
    ("old", "new", "where"),
    [
        ("mass_kg = 7.5", "mass_kgg = 7.5", ["elements", "splitter"]),  # unknown key
        ("mass_kg = 7.5", 'mass_kg = "7.5"', ["elements", "splitter", "mass_kg"]),  # type
        ("top_speed_kmh = 180.0", "top_speed_kmh = 900.0", ["design", "top_speed_kmh"]),
        ("steps = 201", "steps = 20001", ["sweeps", "travel", "steps"]),  # out of range
        ("[sweeps.travel]", "[sweeps.travels]", ["sweeps"]),  # unknown table
        ('kind = "prism"', 'kind = "sphere"', ["zones", "tub", "kind"]),  # not a choice
        ("tyre_radius_mm = 290.0\n", "", ["corners", "front_left"]),  # missing key
    ],
)
def test_broken_files_do_not_validate(old: str, new: str, where: list[str]) -> None:
    data = tomllib.loads(replace_once(BASE, old, new))
    errors = list(_validator().iter_errors(data))
    assert errors, "the broken file passed the schema"
    assert any(list(e.absolute_path)[: len(where)] == where for e in errors), [
        (list(e.absolute_path), e.message) for e in errors
    ]


def test_a_zone_takes_only_its_own_kind_of_keys() -> None:
    text = BASE.replace('kind = "prism"', 'kind = "prism"\nradius_mm = 5.0', 1)
    errors = list(_validator().iter_errors(tomllib.loads(text)))
    assert any("radius_mm" in e.message for e in errors), [e.message for e in errors]


def test_schema_command_prints_and_writes_the_same_schema(tmp_path: Path) -> None:
    printed = _run("schema", cwd=tmp_path)
    assert printed.returncode == 0, printed.stderr
    assert printed.stdout == schema_text()
    json.loads(printed.stdout)
    written = _run("schema", "-o", "design.schema.json", cwd=tmp_path)
    assert written.returncode == 0, written.stderr
    assert (tmp_path / "design.schema.json").read_text(encoding="utf-8") == schema_text()
    assert [p.name for p in tmp_path.iterdir()] == ["design.schema.json"]  # no temporaries


def test_schema_command_refuses_to_write_over_a_design(tmp_path: Path) -> None:
    design = tmp_path / "car.toml"
    design.write_text(BASE, encoding="utf-8")
    disguised = tmp_path / "car.json"
    disguised.write_text(BASE, encoding="utf-8")
    for name in ("car.toml", "car.json"):
        done = _run("schema", "-o", name, cwd=tmp_path)
        assert done.returncode == 2, done.stderr
        lines = done.stderr.splitlines()
        assert len(lines) == 1 and "-o" in lines[0] and "design" in lines[0], done.stderr
    assert design.read_text(encoding="utf-8") == BASE
    assert disguised.read_text(encoding="utf-8") == BASE


def test_new_writes_the_schema_directive_and_the_schema(tmp_path: Path) -> None:
    done = _run("new", "mine.toml", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    text = (tmp_path / "mine.toml").read_text(encoding="utf-8")
    assert text.splitlines()[0] == f"#:schema ./{SCHEMA_FILE_NAME}"
    schema = json.loads((tmp_path / SCHEMA_FILE_NAME).read_text(encoding="utf-8"))
    assert schema == design_json_schema()
    validator = jsonschema.Draft202012Validator(schema)
    assert list(validator.iter_errors(tomllib.loads(text))) == []


def test_new_keeps_a_foreign_file_of_the_schema_name(tmp_path: Path) -> None:
    foreign = tmp_path / SCHEMA_FILE_NAME
    foreign.write_text('{"mine": true}\n', encoding="utf-8")
    done = _run("new", "mine.toml", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    assert foreign.read_text(encoding="utf-8") == '{"mine": true}\n'
    assert "kept" in done.stdout


TUNED = (EXAMPLE.parent / "tune_splitter.toml").read_text(encoding="utf-8")


@pytest.mark.parametrize(
    ("base", "old", "new", "where", "said"),
    [
        (BASE, "wheelbase_mm = 2300.0", "wheelbase_nm = 2300.0", ["car"], "wheelbase_nm"),
        (BASE, "wheelbase_mm = 2300.0", "wheelbase_mm = 230000.0", ["car", "wheelbase_mm"], ""),
        (BASE, "roll_stiffness_front_share = 0.55", "roll_stiffness_front_share = 1.5",
         ["car", "roll_stiffness_front_share"], ""),
        (BASE, "damping_ratio = 0.5", "damping_rato = 0.5", ["tradeoff"], "damping_rato"),
        (BASE, "damping_ratio = 0.5", "damping_ratio = 7.0", ["tradeoff", "damping_ratio"], ""),
        (BASE, 'road_classes = ["A", "B", "C"]', 'road_classes = ["A", "Z"]',
         ["tradeoff", "road_classes", 1], ""),
        (BASE, "tyre_rate_N_per_mm = 250.0", "", ["tradeoff"], "tyre_rate_N_per_mm"),
        (TUNED, "population = 16", "populaton = 16", ["tune"], "populaton"),
        (TUNED, "population = 16", "population = 2", ["tune", "population"], ""),
        (TUNED, "generations = 30", "generations = 30.5", ["tune", "generations"], ""),
        (TUNED, "range_mm = [-30.0, 30.0]", "range = [-30.0, 30.0]",
         ["tune", "variables", "drop"], "range"),
        (TUNED, "range_mm = [-30.0, 30.0]", "range_mm = [-30.0, 3000.0]",
         ["tune", "variables", "drop", "range_mm", 1], ""),
        (TUNED, "mass = 0.05", "mass = -1.0", ["tune", "weights", "mass"], ""),
        (TUNED, "mass = 0.05", "masss = 1.0", ["tune", "weights"], "masss"),
    ],
)  # fmt: skip
def test_broken_tune_car_and_tradeoff_tables_do_not_validate(
    base: str, old: str, new: str, where: list[object], said: str
) -> None:
    assert base.count(old) == 1, old
    data = tomllib.loads(base.replace(old, new))
    errors = list(_validator().iter_errors(data))
    found = [e for e in errors if list(e.absolute_path)[: len(where)] == where]
    assert found, [(list(e.absolute_path), e.message) for e in errors]
    assert any(said in e.message for e in found), [e.message for e in found]


def test_the_tune_example_validates_with_every_tune_key() -> None:
    """The schema lists each key of [tune]: a table using all of them still validates."""
    text = TUNED.replace("population = 16", "population = 16\nscreen_steps = 21\npolish = 2")
    text = text.replace(
        "[tune.weights]",
        '[tune.variables.box]\npivot = "rocker_left"\nbox_mm = { x = [-5.0, 5.0], '
        "y = [-5.0, 5.0], z = [-2.0, 2.0] }\n\n"
        "[tune.targets]\nroute_ratio = 1.0\nroute_ratio_range = [0.9, 1.1]\n"
        "line_of_action_deg = 5.0\ntransmission_angle_deg = [30.0, 150.0]\n"
        "heave_sensitivity = 0.1\nbuckling_reserve = 2.0\ntension_reserve = 2.0\n"
        "clearance_mm = 3.0\nsprung_leakage = 0.1\n\n[tune.weights]\nleakage = 0.5",
    )
    data = tomllib.loads(text)
    assert set(data["tune"]) == {k.name for k in children("tune")}
    assert set(data["tune"]["targets"]) == {k.name for k in children("tune.targets")}
    assert list(_validator().iter_errors(data)) == []
    design = parse_design(text, "tuned.toml")  # and the loader takes it too
    spec = read_tune(design, data, build_linkage(design).point_names)
    assert [v.name for v in spec.variables] == ["front_arm", "drop", "box.x", "box.y", "box.z"]
    assert spec.targets.transmission_angle_deg == (30.0, 150.0)
    assert spec.weights == {"route_ratio": 1.0, "mass": 0.05, "leakage": 0.5}
