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
from plumbrod.design.templates import STARTER, read_template

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
