"""Exactly located designs keep exactly their results: the JSON report of every example
that existed before redundant location was solved elastically is byte-identical to the
one recorded then (SHA-256 in tests/golden/check_json.sha256; see regenerate.py there)."""

from __future__ import annotations

import hashlib
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
RECORDED = {
    name: digest
    for digest, name in (
        line.split()
        for line in (ROOT / "tests" / "golden" / "check_json.sha256").read_text().splitlines()
    )
}


@pytest.mark.parametrize("name", sorted(RECORDED))
def test_the_json_report_of_an_exactly_located_example_is_unchanged(name: str) -> None:
    env = {**os.environ, "PYTHONPATH": str(ROOT / "src")}
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "--json", f"examples/{name}.toml"],
        cwd=ROOT,
        capture_output=True,
        check=False,
        env=env,
    )
    assert done.stderr == b""
    assert done.returncode in (0, 1)
    assert '"exact": true' in done.stdout.decode()
    assert hashlib.sha256(done.stdout).hexdigest() == RECORDED[name], (
        f"the report of examples/{name}.toml changed; if that is intended, run "
        "python tests/golden/regenerate.py"
    )
