"""Output files from the command line: never onto the input design, a device or a folder;
multi-file outputs all or nothing; no temporary left behind; a full disk or a closed
standard output is one line and exit 2 (issue 13 §2 and §3)."""

from __future__ import annotations

import hashlib
import os
import resource
import signal
import subprocess
import sys
from pathlib import Path

import pytest

from plumbrod.errors import OutputError
from plumbrod.outputs.atomic import (
    TEMP_TAG,
    OutputSet,
    check_target,
    remove_stale_temporaries,
    write_atomic,
)

ROOT = Path(__file__).resolve().parents[1]
SRC = ROOT / "src"
EXAMPLE = ROOT / "examples" / "hillclimb_splitter.toml"
PLANAR = ROOT / "examples" / "planar_undertray.toml"


def _env() -> dict[str, str]:
    return {
        **os.environ,
        "PYTHONPATH": os.pathsep.join(p for p in (str(SRC), os.environ.get("PYTHONPATH", "")) if p),
    }


def _run(*args: str, cwd: Path, **kw: object) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", *args],
        capture_output=True,
        text=True,
        check=False,
        cwd=cwd,
        env=_env(),
        **kw,  # type: ignore[arg-type]
    )


def _one_line_error(done: subprocess.CompletedProcess[str], *words: str) -> None:
    assert done.returncode == 2, (done.returncode, done.stderr)
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1, done.stderr
    assert "Traceback" not in done.stderr
    for word in words:
        assert word in lines[0], lines[0]


def _digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def _temporaries(folder: Path) -> list[str]:
    return [p.name for p in folder.rglob("*") if TEMP_TAG in p.name]


@pytest.fixture()
def design(tmp_path: Path) -> Path:
    path = tmp_path / "d.toml"
    path.write_bytes(PLANAR.read_bytes())
    return path


@pytest.mark.parametrize(
    "args, option",
    [
        (("check", "d.toml", "-o", "d.toml"), "--output"),
        (("check", "d.toml", "--json", "--output", "./d.toml"), "--output"),
        (("sweep", "d.toml", "--csv", "d.toml"), "--csv"),
        (("sweep", "d.toml", "--json", "d.toml"), "--json"),
        (("size", "d.toml", "-o", "d.toml"), "--output"),
    ],
)
def test_no_command_writes_onto_its_input_design(
    design: Path, args: tuple[str, ...], option: str
) -> None:
    before = _digest(design)
    done = _run(*args, cwd=design.parent)
    _one_line_error(done, option)
    assert _digest(design) == before


@pytest.mark.parametrize(
    "args, option, source",
    [
        (("tradeoff", "d.toml", "--csv", "d.toml"), "--csv", "hillclimb_splitter.toml"),
        (("tradeoff", "d.toml", "--json", "d.toml"), "--json", "hillclimb_splitter.toml"),
        (("tradeoff", "d.toml", "-o", "d.toml"), "--output", "hillclimb_splitter.toml"),
        (("tune", "d.toml", "-o", "d.toml"), "--output", "tune_splitter.toml"),
    ],
)
def test_tradeoff_and_tune_refuse_their_input_too(
    tmp_path: Path, args: tuple[str, ...], option: str, source: str
) -> None:
    design = tmp_path / "d.toml"
    design.write_bytes((ROOT / "examples" / source).read_bytes())
    done = _run(*args, cwd=tmp_path)
    _one_line_error(done, option)
    assert design.read_bytes() == (ROOT / "examples" / source).read_bytes()


def test_a_link_or_hard_link_to_the_input_is_the_input(design: Path) -> None:
    (design.parent / "soft.toml").symlink_to("d.toml")
    os.link(design, design.parent / "hard.toml")
    before = _digest(design)
    for name in ("soft.toml", "hard.toml"):
        _one_line_error(_run("check", "d.toml", "-o", name, cwd=design.parent), "input design")
    assert _digest(design) == before


@pytest.mark.parametrize("target", ["/dev/null", "/dev/zero"])
def test_a_device_node_is_refused_and_left_a_device(design: Path, target: str) -> None:
    done = _run("check", "d.toml", "-o", target, cwd=design.parent)
    _one_line_error(done, "--output", "not a regular file")
    assert Path(target).is_char_device()


def test_a_pipe_is_refused(design: Path) -> None:
    fifo = design.parent / "pipe"
    os.mkfifo(fifo)
    _one_line_error(_run("sweep", "d.toml", "--csv", "pipe", cwd=design.parent), "--csv")
    assert not fifo.is_file()


@pytest.mark.parametrize("target", [".", "sub", "sub/"])
def test_a_folder_as_output_file_is_refused(design: Path, target: str) -> None:
    (design.parent / "sub").mkdir()
    _one_line_error(_run("check", "d.toml", "-o", target, cwd=design.parent), "folder")


@pytest.mark.parametrize("verb", ["export", "plot"])
def test_an_output_dir_that_is_a_file_is_one_line(design: Path, verb: str) -> None:
    (design.parent / "afile").write_text("keep me")
    for folder in ("afile", "afile/deeper"):
        done = _run(verb, "d.toml", "--output-dir", folder, cwd=design.parent)
        _one_line_error(done, "--output-dir", "is a file, not a folder")
    assert (design.parent / "afile").read_text() == "keep me"


def test_demo_output_dir_that_is_a_file_is_one_line(tmp_path: Path) -> None:
    (tmp_path / "afile").write_text("")
    _one_line_error(_run("demo", "--output-dir", "afile", cwd=tmp_path), "--output-dir")


def test_an_over_long_output_name_is_one_line(design: Path) -> None:
    done = _run("check", "d.toml", "-o", "x" * 300 + ".txt", cwd=design.parent)
    _one_line_error(done, "--output", "200-byte limit")


def test_export_of_a_design_file_with_an_over_long_stem_is_one_line(design: Path) -> None:
    long = design.parent / ("y" * 240 + ".toml")
    long.write_bytes(design.read_bytes())
    done = _run("export", long.name, "--output-dir", "out", cwd=design.parent)
    _one_line_error(done, "--output-dir", "200-byte limit")
    assert not (design.parent / "out").exists() or not list((design.parent / "out").iterdir())


def test_new_with_an_empty_name_is_one_line(tmp_path: Path) -> None:
    _one_line_error(_run("new", "", cwd=tmp_path), "empty")
    _one_line_error(_run("new", "/dev/null", "--force", cwd=tmp_path), "not a regular file")
    assert Path("/dev/null").is_char_device()


def test_all_sweeps_disabled_is_one_line(tmp_path: Path) -> None:
    text = PLANAR.read_text()
    for name in ("travel", "heave", "roll", "pitch"):
        text = text.replace(f"[sweeps.{name}]\n", f"[sweeps.{name}]\nenabled = false\n")
    assert "[sweeps.heave_roll]" not in text
    if "[sweeps.travel]" not in text:
        text += "\n[sweeps.travel]\nenabled = false\n"
    (tmp_path / "none.toml").write_text(text)
    for verb in ("check", "sweep", "plot", "export"):
        done = _run(verb, "none.toml", cwd=tmp_path)
        _one_line_error(done, "none.toml", "sweeps", "disabled")


def test_no_numeric_warnings_before_the_message(tmp_path: Path) -> None:
    # a motion centre 1e300 mm away makes the solver's arithmetic overflow: the user sees
    # one line (the linkage does not assemble, or the value is out of range), no warnings
    source = ROOT / "examples" / "student_rear_wing.toml"
    text = source.read_text() + "\n[sweeps]\nmotion_centre_mm = [-775.0, 1e300, 0.0]\n"
    (tmp_path / "far.toml").write_text(text)
    done = _run("check", "far.toml", cwd=tmp_path)
    assert done.returncode in (1, 2), done.stderr
    assert "Warning" not in done.stderr and "Traceback" not in done.stderr
    assert len(done.stderr.strip().splitlines()) == 1, done.stderr


def test_standard_output_on_a_full_device_is_one_line(design: Path) -> None:
    with open("/dev/full", "w") as full:
        done = subprocess.run(
            [sys.executable, "-m", "plumbrod", "check", "d.toml"],
            stdout=full,
            stderr=subprocess.PIPE,
            text=True,
            cwd=design.parent,
            env=_env(),
            check=False,
        )
    _one_line_error(done, "standard output", "No space left")


def test_a_closed_standard_output_is_one_line(design: Path) -> None:
    done = subprocess.run(
        [sys.executable, "-m", "plumbrod", "check", "d.toml"],
        stdout=None,
        stderr=subprocess.PIPE,
        text=True,
        cwd=design.parent,
        env=_env(),
        check=False,
        preexec_fn=lambda: os.close(1),
    )
    _one_line_error(done, "standard output is closed")


def _small_file_limit() -> None:
    # a file-size limit makes every write past 4 kB fail as on a full disk (EFBIG)
    signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
    resource.setrlimit(resource.RLIMIT_FSIZE, (4096, 4096))


@pytest.mark.parametrize(
    "args", [("check", "d.toml", "--json", "-o", "r.json"), ("export", "d.toml", "--png")]
)
def test_a_full_disk_is_one_line_and_leaves_nothing(design: Path, args: tuple[str, ...]) -> None:
    done = _run(*args, cwd=design.parent, preexec_fn=_small_file_limit)
    _one_line_error(done, "cannot be written", "File too large")
    names = {p.name for p in design.parent.rglob("*")}
    assert names <= {"d.toml", "exports"}, names


def test_demo_is_all_or_nothing_when_one_file_fails(tmp_path: Path) -> None:
    # the JSON report's final name is a folder: the demo must leave none of its files
    out = tmp_path / "out"
    (out / "hillclimb_splitter-report.json").mkdir(parents=True)
    done = _run("demo", "--output-dir", "out", cwd=tmp_path)
    _one_line_error(done, "--output-dir", "is a folder")
    assert sorted(p.name for p in out.iterdir()) == ["hillclimb_splitter-report.json"]


def test_plot_is_all_or_nothing(design: Path) -> None:
    out = design.parent / "exports"
    (out / "d-route-ratio.png").mkdir(parents=True)  # a folder where a figure goes
    done = _run("plot", "d.toml", cwd=design.parent)
    _one_line_error(done, "--output-dir", "is a folder")
    assert sorted(p.name for p in out.iterdir()) == ["d-route-ratio.png"]


def test_sigint_during_export_leaves_no_temporary(design: Path) -> None:
    # Ctrl-C at several moments: before, while and after the files are staged.  A signal
    # that lands while Python itself is still starting (before plumbrod runs) ends the
    # process by SIGINT (-2): then nothing may have been written either.
    whole = _run("export", "d.toml", "--png", "--output-dir", "whole", cwd=design.parent)
    # every file written; exit 1 only because the example fails a check (its verdict)
    assert whole.returncode in (0, 1) and "verdict:" in whole.stdout, whole.stderr
    every = sorted(p.name for p in (design.parent / "whole").iterdir())
    for delay in (0.5, 1.5, 2.5, 3.5):
        out = design.parent / f"out{delay}"
        proc = subprocess.Popen(
            [sys.executable, "-m", "plumbrod", "export", "d.toml", "--png", "--output-dir", out],
            stdout=subprocess.DEVNULL,
            stderr=subprocess.PIPE,
            cwd=design.parent,
            env=_env(),
        )
        try:
            proc.wait(timeout=delay)
        except subprocess.TimeoutExpired:
            proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=120)
        assert proc.returncode in (0, 130, -signal.SIGINT), (proc.returncode, err)
        if proc.returncode == -signal.SIGINT:
            assert not out.exists() or list(out.iterdir()) == []
            continue
        assert b"Traceback" not in err, err
        if out.exists():
            assert _temporaries(out) == []
            names = sorted(p.name for p in out.iterdir())
            assert names in ([], every), names  # every file or none


# -- the atomic API itself -------------------------------------------------------------


def test_output_set_removes_temporaries_on_any_error(tmp_path: Path) -> None:
    with pytest.raises(KeyboardInterrupt), OutputSet() as out:
        out.add(tmp_path / "a.txt", "first")
        out.add_with(tmp_path / "b.txt", lambda tmp: tmp.write_text("half"))
        raise KeyboardInterrupt
    assert list(tmp_path.iterdir()) == []


def test_an_interrupt_right_after_the_temporary_is_created_leaks_nothing(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # Ctrl-C between creating the temporary file and anything after it: the temporary
    # was recorded before it existed, so the set still removes it
    real_open = os.open

    def open_then_interrupt(path: str, flags: int, mode: int = 0o777) -> int:
        fd = real_open(path, flags, mode)
        os.close(fd)
        raise KeyboardInterrupt

    monkeypatch.setattr(os, "open", open_then_interrupt)
    with pytest.raises(KeyboardInterrupt), OutputSet() as out:
        out.add(tmp_path / "a.txt", "x")
    monkeypatch.undo()
    assert list(tmp_path.iterdir()) == []


def test_output_set_writer_error_leaves_nothing(tmp_path: Path) -> None:
    def broken(tmp: Path) -> None:
        tmp.write_text("partial")
        raise ValueError("drawing failed")

    (tmp_path / "a.txt").write_text("old")
    with pytest.raises(ValueError), OutputSet() as out:
        out.add(tmp_path / "a.txt", "new")
        out.add_with(tmp_path / "b.txt", broken)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.txt"]
    assert (tmp_path / "a.txt").read_text() == "old"


def test_output_set_renames_everything_together(tmp_path: Path) -> None:
    with OutputSet() as out:
        out.add(tmp_path / "a.txt", "A")
        out.add(tmp_path / "sub" / "b.bin", b"B")
        assert not (tmp_path / "a.txt").exists()  # nothing final before the block ends
    assert out.written == [tmp_path / "a.txt", tmp_path / "sub" / "b.bin"]
    assert (tmp_path / "a.txt").read_text() == "A"
    assert (tmp_path / "sub" / "b.bin").read_bytes() == b"B"
    assert _temporaries(tmp_path) == []


def test_written_files_follow_the_umask(tmp_path: Path) -> None:
    old = os.umask(0o027)
    try:
        write_atomic(tmp_path / "a.txt", "x")
    finally:
        os.umask(old)
    assert (tmp_path / "a.txt").stat().st_mode & 0o777 == 0o640


def test_stale_temporaries_of_a_dead_process_are_removed(tmp_path: Path) -> None:
    dead = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True
    )
    pid = int(dead.stdout)
    stale = tmp_path / f".a.txt{TEMP_TAG}{pid}-0badf00d"
    other = tmp_path / f".b.txt{TEMP_TAG}{pid}-0badf00d"  # another target: not this run's
    alive = tmp_path / f".a.txt{TEMP_TAG}{os.getppid()}-12345678"  # a live process's
    for p in (stale, other, alive):
        p.write_text("left by SIGKILL")
    write_atomic(tmp_path / "a.txt", "new")
    assert not stale.exists()
    assert other.exists() and alive.exists()
    assert remove_stale_temporaries(tmp_path / "b.txt") == [other]


def test_check_target_names_the_option(tmp_path: Path) -> None:
    with pytest.raises(OutputError, match=r"^--csv /dev/null: is not a regular file"):
        check_target("/dev/null", option="--csv")
    source = tmp_path / "d.toml"
    source.write_text("")
    with pytest.raises(OutputError, match="input design"):
        check_target(tmp_path / "." / "d.toml", option="-o", inputs=[source])
    assert check_target(tmp_path / "new.txt") == tmp_path / "new.txt"


def test_a_symlink_target_is_followed_and_kept(tmp_path: Path) -> None:
    (tmp_path / "real.txt").write_text("old")
    (tmp_path / "link.txt").symlink_to("real.txt")
    write_atomic(tmp_path / "link.txt", "new")
    assert (tmp_path / "link.txt").is_symlink()
    assert (tmp_path / "real.txt").read_text() == "new"


def test_example_design_is_untouched_by_a_normal_run(tmp_path: Path) -> None:
    design = tmp_path / "e.toml"
    design.write_bytes(EXAMPLE.read_bytes())
    done = _run("check", "e.toml", "-o", "report.txt", cwd=tmp_path)
    assert done.returncode in (0, 1), done.stderr
    assert (tmp_path / "report.txt").read_text() == done.stdout
    assert design.read_bytes() == EXAMPLE.read_bytes()
