"""Kill ``plumbrod export`` at seeded random moments: no file under a final name is ever
partial (issue 13 §5).

Each final file after a kill must be either what was there before (a marker) or the
complete new file (the reference export's bytes, up to the order of its lines).  After
SIGINT no temporary may remain and the set is all old or all new; after SIGKILL the
run's temporaries may remain, and the next export removes them.
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

from plumbrod.outputs.atomic import TEMP_TAG

ROOT = Path(__file__).resolve().parents[1]
PLANAR = ROOT / "examples" / "planar_undertray.toml"
OLD = b"old file, not yet replaced\n"


def _env() -> dict[str, str]:
    src = str(ROOT / "src")
    return {
        **os.environ,
        "PYTHONPATH": os.pathsep.join(p for p in (src, os.environ.get("PYTHONPATH", "")) if p),
    }


def _export(cwd: Path, out: str) -> subprocess.Popen[bytes]:
    return subprocess.Popen(
        [sys.executable, "-m", "plumbrod", "export", "d.toml", "--png", "--output-dir", out],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.PIPE,
        cwd=cwd,
        env=_env(),
    )


def _same(new: bytes, data: bytes) -> bool:
    """The whole new file: the same bytes, or the same lines in another order (ezdxf may
    write its objects in another order from one process to the next)."""
    return data == new or sorted(data.split(b"\n")) == sorted(new.split(b"\n"))


def _temporaries(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if TEMP_TAG in p.name)


def test_killed_exports_never_leave_a_partial_file(tmp_path: Path) -> None:
    (tmp_path / "d.toml").write_bytes(PLANAR.read_bytes())
    started = time.perf_counter()
    proc = _export(tmp_path, "reference")
    _, err = proc.communicate(timeout=300)
    full_s = time.perf_counter() - started
    assert proc.returncode in (0, 1), err  # 1: the example fails a check, not a write
    reference = {p.name: p.read_bytes() for p in (tmp_path / "reference").iterdir()}
    assert len(reference) >= 4  # route and two plates as DXF, and their previews

    rng = random.Random(20261302)
    out = tmp_path / "out"
    out.mkdir()
    kinds = [signal.SIGKILL, signal.SIGINT] * 4
    rng.shuffle(kinds)
    for run, kind in enumerate(kinds):
        for name in reference:  # the previous files under the final names
            (out / name).write_bytes(OLD)
        moment = rng.uniform(0.3, 1.1) * full_s  # the files are written near the end
        proc = _export(tmp_path, "out")
        try:
            proc.wait(timeout=moment)
        except subprocess.TimeoutExpired:
            proc.send_signal(kind)
        _, err = proc.communicate(timeout=300)
        state = {}
        for name, new in reference.items():
            data = (out / name).read_bytes()
            assert data == OLD or _same(new, data), f"run {run}: {name} partial after {kind!r}"
            state[name] = data != OLD
        leftovers = _temporaries(out)
        if kind == signal.SIGINT and proc.returncode != -signal.SIGINT:
            assert b"Traceback" not in err, err
            assert leftovers == [], f"run {run}: SIGINT left {leftovers}"
            assert len(set(state.values())) == 1, f"run {run}: half a set {state}"
        extra = {p.name for p in out.iterdir()} - set(reference) - set(leftovers)
        assert extra == set(), extra
        if leftovers:  # left by SIGKILL: the next export of the same files removes them
            assert kind == signal.SIGKILL
            again = _export(tmp_path, "out")
            _, err = again.communicate(timeout=300)
            assert again.returncode in (0, 1), err  # 1: the example fails a check
            assert _temporaries(out) == []
            assert sorted(p.name for p in out.iterdir()) == sorted(reference)
            assert all(_same(reference[p.name], p.read_bytes()) for p in out.iterdir())
