"""The Python API at the package root: load_design, analyse, a small stable __all__."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import plumbrod
from designs import EXAMPLE, replace_once
from plumbrod.outputs.report import as_json, verdict

TEXT = EXAMPLE.read_text(encoding="utf-8")


def test_the_public_names_are_the_documented_few() -> None:
    assert sorted(plumbrod.__all__) == sorted(
        [
            "AssemblyError",
            "Design",
            "DesignFileError",
            "Findings",
            "LocationError",
            "PlumbrodError",
            "__version__",
            "analyse",
            "load_design",
        ]
    )
    for name in plumbrod.__all__:
        assert getattr(plumbrod, name) is not None


def test_load_design_takes_a_path_a_str_path_or_text() -> None:
    from_path = plumbrod.load_design(EXAMPLE)
    from_str = plumbrod.load_design(str(EXAMPLE))
    from_text = plumbrod.load_design(TEXT)
    assert isinstance(from_path, plumbrod.Design)
    assert from_path.source == str(EXAMPLE) and from_text.source == "<text>"
    assert from_path.corners == from_str.corners == from_text.corners
    assert from_path.rods == from_text.rods
    named = plumbrod.load_design(TEXT, source="notebook cell 3")
    assert named.source == "notebook cell 3"


def test_load_design_raises_one_line_errors() -> None:
    with pytest.raises(plumbrod.DesignFileError) as caught:
        plumbrod.load_design(replace_once(TEXT, "mass_kg = 7.5", "mass_kgg = 7.5"))
    assert caught.value.key == "elements.splitter.mass_kgg"
    assert "did you mean 'mass_kg'" in str(caught.value)
    with pytest.raises(plumbrod.DesignFileError, match="no such file"):
        plumbrod.load_design("no/such/design.toml")
    with pytest.raises(TypeError):
        plumbrod.load_design(42)  # type: ignore[arg-type]


def test_analyse_returns_the_findings_the_report_is_built_from() -> None:
    findings = plumbrod.analyse(plumbrod.load_design(EXAMPLE))
    assert isinstance(findings, plumbrod.Findings)
    assert findings.verdict == verdict(findings.checks)
    assert findings.verdict in ("pass", "warn")  # the bundled example has no failing check
    travel = findings.analysis.sweeps["travel"]
    points = travel.solved.kin.points  # (poses, points, 3) mm
    assert isinstance(points, np.ndarray) and points.ndim == 3 and points.shape[2] == 3
    assert points.shape[0] == findings.analysis.design.sweeps.travel_steps
    ratio = next(iter(findings.analysis.figures["travel"].route_ratio.values()))
    assert isinstance(ratio, np.ndarray) and ratio.shape == (travel.spec.size,)
    # the same object the command's JSON report is made of
    assert f'"verdict": "{findings.verdict}"' in as_json(findings)


def test_analyse_also_takes_a_path() -> None:
    by_path = plumbrod.analyse(EXAMPLE)
    assert [c.id for c in by_path.checks] == [c.id for c in plumbrod.analyse(TEXT).checks]


def test_import_plumbrod_stays_light(tmp_path: Path) -> None:
    code = (
        "import sys, plumbrod; "
        "heavy = [m for m in ('numpy', 'matplotlib', 'ezdxf', 'scipy', 'shapely', 'sympy') "
        "if m in sys.modules]; print(','.join(heavy))"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=tmp_path
    )
    assert done.stdout.strip() == ""
