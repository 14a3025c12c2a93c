"""Bad design files through the real command line: ``python -m plumbrod check FILE``.

Every case must end with exit code 2 and exactly one line on stderr naming the file,
the key path (when the problem sits at a key), what is wrong and how to fix it; nothing
on stdout, no traceback, and no report file written with ``-o``.  Each bad file is the
bundled (invented) example with one fault put in.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import pytest

import plumbrod
from designs import EXAMPLE, replace_once

BASE = EXAMPLE.read_text(encoding="utf-8")
DESIGN_NAME = "design.toml"


def _env() -> dict[str, str]:
    """The subprocess imports the same plumbrod as this test process (not installed)."""
    env = dict(os.environ)
    src = str(Path(plumbrod.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join(p for p in (src, env.get("PYTHONPATH", "")) if p)
    return env


def plumbrod_check(cwd: Path, *args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", *args],
        capture_output=True,
        text=True,
        cwd=cwd,
        env=_env(),
        timeout=120,
        check=False,
    )


def _edit(*pairs: tuple[str, str]) -> Callable[[], bytes]:
    def make() -> bytes:
        text = BASE
        for old, new in pairs:
            text = replace_once(text, old, new)
        return text.encode("utf-8")

    return make


def _line_of(fragment: str) -> int:
    """1-based line number of ``fragment`` in the example."""
    return BASE[: BASE.index(fragment)].count("\n") + 1


@dataclass(frozen=True)
class Case:
    """One bad input: how to make it, and what the one stderr line must say."""

    content: Callable[[], bytes] | str
    """File bytes, or "missing" / "folder" for a path that is not a file."""
    key: str | None
    """The key path the message must name; None for problems of the whole file."""
    problem: str
    """A regular expression for what is wrong."""
    fix: str
    """A regular expression for how to fix it."""


NAME_LINE = 'name = "Kestrel KH-3 front splitter (invented example)"'
EXTRA_ROCKER = """
[rockers.splitter]
parent = "chassis"
axis_mm = [[0.0, 100.0, 300.0], [100.0, 100.0, 300.0]]

[rockers.splitter.pickups]
arm = [50.0, 100.0, 360.0]
"""
EXPLICIT_RIGHT_HANGER = """
[rods.hanger_right]
ends = ["rocker_right.front_arm", "splitter.hanger_right"]
material = "4130-N"
od_mm = 12.0
wall_mm = 1.0
"""

CASES: dict[str, Case] = {
    "invalid TOML: unterminated string": Case(
        _edit((NAME_LINE, NAME_LINE[:-1])),
        rf"line {_line_of(NAME_LINE)}, column \d+",
        r"invalid TOML: illegal character",
        r"check the quotes",
    ),
    "invalid TOML: two values on one line": Case(
        _edit(("tyre_radius_mm = 290.0", "tyre_radius_mm = 290.0 mm")),
        rf"line {_line_of('tyre_radius_mm = 290.0')}, column 24",
        r"invalid TOML: expected newline",
        r"check the quotes, brackets, commas",
    ),
    "invalid TOML: array left open at the end of the file": Case(
        _edit(("steps = [41, 41]", "steps = [41, 41")),
        # a line from where the array opens to the end of the file: where tomllib
        # notices it cannot go on
        "line ("
        + "|".join(str(n) for n in range(_line_of("steps = [41, 41]"), BASE.count(chr(10)) + 2))
        + r"), column \d+",
        r"invalid TOML: unclosed array",
        r"bracket",
    ),
    "unknown key": Case(
        _edit(("mass_kg = 7.5", "mass_kgg = 7.5")),
        "elements.splitter.mass_kgg",
        r"unknown key",
        r"did you mean 'mass_kg'\?",
    ),
    "unknown table": Case(
        _edit(("[sweeps.travel]", "[sweeps.travels]")),
        "sweeps.travels",
        r"unknown key",
        r"did you mean 'travel'\?",
    ),
    "missing key": Case(
        _edit(("tyre_radius_mm = 290.0\n", "")),
        "corners.front_left.tyre_radius_mm",
        r"missing key",
        r"add the loaded tyre radius",
    ),
    "missing wall of a tube": Case(
        _edit(("od_mm = 16.0\nwall_mm = 1.2\n", "od_mm = 16.0\n")),
        "rods.drop_left.wall_mm",
        r"missing key",
        r"solid = true",
    ),
    "wrong type: text for a number": Case(
        _edit(("od_mm = 16.0\nwall_mm = 1.2", 'od_mm = "16"\nwall_mm = 1.2')),
        "rods.drop_left.od_mm",
        r"expected a number, got a string '16'",
        r"write a plain number",
    ),
    "wrong type: text for true/false": Case(
        _edit(("mirror = true ", 'mirror = "yes" ')),
        "design.mirror",
        r"expected true or false, got a string 'yes'",
        r"without quotes",
    ),
    "wrong type: two coordinates for a 3D point": Case(
        _edit(("cg_mm = [640.0, 0.0, 80.0]", "cg_mm = [640.0, 80.0]")),
        "elements.splitter.cg_mm",
        r"expected a point \[x, y, z\] in mm, got 2 values",
        r"write 3 numbers",
    ),
    "non-finite: inf": Case(
        _edit(("tyre_radius_mm = 290.0", "tyre_radius_mm = inf")),
        "corners.front_left.tyre_radius_mm",
        r"expected a finite number, got inf",
        r"replace inf/nan",
    ),
    "non-finite: -inf in a point": Case(
        _edit(("upper_outer_mm = [-10.0, 610.0, 420.0]", "upper_outer_mm = [-10.0, -inf, 420.0]")),
        r"corners.front_left.wishbones.upper_outer_mm\[1\]",
        r"expected a finite number, got -inf",
        r"replace inf/nan",
    ),
    "non-finite: nan": Case(
        _edit(("wheel_centre_mm = [0.0, 700.0, 290.0]", "wheel_centre_mm = [0.0, nan, 290.0]")),
        r"corners.front_left.wheel_centre_mm\[1\]",
        r"expected a finite number, got nan",
        r"replace inf/nan",
    ),
    "zero-length rod": Case(
        _edit(("drag_low = [400.0, 0.0, 75.0]", "drag_low = [120.0, 0.0, 75.0]")),
        "rods.drag_low.ends",
        r"zero-length rod",
        r"move one of the two pickups",
    ),
    "zero-length rocker pivot axis": Case(
        _edit(
            (
                "axis_mm = [[0.0, 300.0, 250.0], [600.0, 300.0, 250.0]]",
                "axis_mm = [[0.0, 300.0, 250.0], [0.0, 300.0, 250.0]]",
            )
        ),
        "rockers.rocker_left.axis_mm",
        r"zero-length pivot axis",
        r"two distinct points",
    ),
    "zero-length wishbone pivot axis": Case(
        _edit(("upper_rear_mm = [-180.0, 290.0, 335.0]", "upper_rear_mm = [150.0, 280.0, 330.0]")),
        "corners.front_left.wishbones.upper_front_mm",
        r"zero-length pivot axis: the upper wishbone's inner pivots coincide",
        r"move one inner pivot",
    ),
    "pickup that does not exist": Case(
        _edit(('ends = ["front_left.lower.drop", ', 'ends = ["front_left.lower.dorp", ')),
        r"rods.drop_left.ends\[0\]",
        r"no pickup 'front_left.lower.dorp'",
        r"did you mean 'front_left.lower.drop'\?",
    ),
    "body that does not exist": Case(
        _edit(('"rocker_left.rear_arm"]', '"rocker_lft.rear_arm"]')),
        r"rods.drop_left.ends\[1\]",
        r"no body for 'rocker_lft.rear_arm'",
        r"did you mean 'rocker_left.rear_arm'\?",
    ),
    "parent body that does not exist": Case(
        _edit(('parent = "chassis"', 'parent = "chasis"')),
        "rockers.rocker_left.parent",
        r"no body 'chasis'",
        r"did you mean 'chassis'\?",
    ),
    # TOML v1.0.0: defining a key or a table more than once is invalid (from memory)
    "duplicate TOML key": Case(
        _edit(("od_mm = 16.0\nwall_mm = 1.2", "od_mm = 16.0\nod_mm = 18.0\nwall_mm = 1.2")),
        rf"line {_line_of('od_mm = 16.0' + chr(10) + 'wall_mm = 1.2') + 1}, column \d+",
        r"invalid TOML: cannot overwrite a value",
        r"a key may appear once",
    ),
    "duplicate TOML table": Case(
        _edit(("[rods.sway_rear]", "[rods.sway_front]")),
        rf"line {_line_of('[rods.sway_rear]')}, column \d+",
        r"invalid TOML: cannot declare \('rods', 'sway_front'\) twice",
        r"a key may appear once",
    ),
    "a rocker and an element with the same name": Case(
        _edit(("[elements.splitter]", EXTRA_ROCKER + "\n[elements.splitter]")),
        "elements.splitter",
        r"the name 'splitter' is used twice \(also rockers.splitter\)",
        r"give each body its own name",
    ),
    "mirror = true makes a rod that exists": Case(
        _edit(("[rods.drag_low]", EXPLICIT_RIGHT_HANGER + "\n[rods.drag_low]")),
        "rods.hanger_right",
        r"mirror = true would make 'hanger_right', which exists",
        r"remove the 'hanger_right' entry or rename the left-hand one",
    ),
    "mirror = true makes a pickup that exists": Case(
        _edit(
            (
                "hanger_left = [600.0, 620.0, 75.0]",
                "hanger_left = [600.0, 620.0, 75.0]\nhanger_right = [600.0, -620.0, 75.0]",
            )
        ),
        "elements.splitter.pickups.hanger_right",
        r"mirror = true would make 'splitter.hanger_right', which exists",
        r"remove the 'splitter.hanger_right' entry or rename the left-hand one",
    ),
    "empty file": Case(lambda: b"", None, r"the file is empty", r"plumbrod new"),
    "blank file": Case(lambda: b"\n  \n\t\n", None, r"the file is empty", r"plumbrod new"),
    "binary file": Case(
        lambda: b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00\x01\x00",
        None,
        r"this is a binary file",
        r"text \.toml file",
    ),
    "text that is not UTF-8": Case(
        lambda: b"# caf\xe9\n" + BASE.encode("utf-8"),
        None,
        r"not UTF-8 text \(bad byte at offset 5\)",
        r"save the file as UTF-8",
    ),
    "path that does not exist": Case("missing", None, r"no such file", r"check the path"),
    "path that is a folder": Case("folder", None, r"this is a folder", r"\.toml file inside it"),
}


def _snapshot(folder: Path) -> dict[str, tuple[bool, int, int]]:
    """Every entry below ``folder``: (is a folder, size, modification time in ns)."""
    out = {}
    for path in sorted(folder.rglob("*")):
        info = path.stat()
        out[str(path.relative_to(folder))] = (path.is_dir(), info.st_size, info.st_mtime_ns)
    return out


def _prepare(case: Case, folder: Path) -> str:
    """Create the bad input in ``folder``; returns the path as typed on the command line."""
    if case.content == "missing":
        return "no_such_design.toml"
    if case.content == "folder":
        (folder / "designs").mkdir()
        return "designs"
    assert callable(case.content)
    (folder / DESIGN_NAME).write_bytes(case.content())
    return DESIGN_NAME


@pytest.mark.parametrize("with_output", [False, True], ids=["stdout", "-o out.json"])
@pytest.mark.parametrize("name", list(CASES))
def test_bad_input_gives_one_line_and_exit_2(name: str, with_output: bool, tmp_path: Path) -> None:
    case = CASES[name]
    typed = _prepare(case, tmp_path)
    before = _snapshot(tmp_path)
    extra = ["--json", "-o", "out.json"] if with_output else []
    done = plumbrod_check(tmp_path, typed, *extra)
    assert done.returncode == 2, (done.returncode, done.stderr)
    assert done.stdout == ""
    assert "Traceback" not in done.stderr
    lines = done.stderr.splitlines()
    assert len(lines) == 1 and done.stderr.endswith("\n"), done.stderr
    line = lines[0]
    head = f"plumbrod: error: {typed}: "
    assert line.startswith(head), line
    rest = line[len(head) :]
    if case.key is not None:
        assert re.match(rf"{case.key}: ", rest), f"key path {case.key!r} not named: {line}"
        rest = re.sub(rf"^{case.key}: ", "", rest)
    problem, sep, fix = rest.partition("; ")
    assert sep, f"no fix after '; ': {line}"
    assert re.search(case.problem, problem, flags=re.IGNORECASE), line
    assert re.search(case.fix, fix), line
    assert _snapshot(tmp_path) == before  # no report, no temporary file left behind


def test_the_unbroken_example_passes_and_writes_its_report(tmp_path: Path) -> None:
    # The control case: without a fault, the same harness sees exit 0, a report on
    # stdout and out.json written, so the checks above can tell a failure apart.
    (tmp_path / DESIGN_NAME).write_text(BASE, encoding="utf-8")
    done = plumbrod_check(tmp_path, DESIGN_NAME, "--json", "-o", "out.json")
    assert done.returncode == 0, done.stderr
    assert done.stderr == ""
    assert done.stdout.startswith("{")
    assert (tmp_path / "out.json").read_text(encoding="utf-8") == done.stdout


def test_every_fault_changes_the_example() -> None:
    # Each edit must apply to the example exactly once (replace_once raises otherwise)
    # and give a file different from the example.
    for name, case in CASES.items():
        if callable(case.content):
            assert case.content() != BASE.encode("utf-8"), name
