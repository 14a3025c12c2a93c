"""Rewrite ``check_json.sha256``: the SHA-256 of ``plumbrod check --json examples/<x>.toml``
(run from the repository root) for every example that existed before redundant
location was solved elastically.  Those examples are exactly located, so that work must
not change one byte of their reports (tests/test_exact_examples.py).

Run it only when a change to the reports of exactly located designs is intended (a new
key, a new check), and say so in the commit:  python tests/golden/regenerate.py
"""

from __future__ import annotations

import hashlib
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
HERE = Path(__file__).resolve().parent
EXAMPLES = (
    "failing_short_lever",
    "hillclimb_splitter",
    "planar_undertray",
    "student_rear_wing",
    "tune_splitter",
)


def digest(name: str) -> str:
    """SHA-256 of the JSON report of one example, as the command prints it."""
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "--json", f"examples/{name}.toml"],
        cwd=ROOT,
        capture_output=True,
        check=False,
    )
    return hashlib.sha256(done.stdout).hexdigest()


if __name__ == "__main__":
    lines = [f"{digest(name)}  {name}" for name in EXAMPLES]
    (HERE / "check_json.sha256").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))
