"""Write files so that a reader never sees a partial, corrupt or overwritten one.

Every output goes to a temporary file in the target's own folder and is then renamed
over the target (atomic on POSIX file systems).  Several files form one
:class:`OutputSet`: every file is staged first, then all are renamed together, so a
command either leaves its whole set of files or none of them.

Rules every output follows (``check_target``):

- the target must be a regular file or a new path: a folder, a device node, a pipe or a
  socket is refused (as root, ``-o /dev/null`` would otherwise replace the device);
- the target must not be one of the command's input files (``check d.toml -o d.toml``);
- a file name is at most :data:`MAX_NAME_BYTES` bytes (UTF-8), so the temporary name fits.

Temporary files are named ``.<name>.plumbrod-tmp-<pid>-<random>``.  Each one is recorded
before it is created, so an error or Ctrl-C at any moment removes it; renames run with
SIGINT and SIGTERM held back, so an interrupt never leaves half a set.  After SIGKILL the
run's temporaries stay; the next run that writes the same target removes the stale ones
(pattern above, whose process is gone).

Usage (one file, or a set)::

    write_atomic(path, text, option="--output", inputs=[args.design])

    with OutputSet(option="--output-dir", inputs=[args.design]) as out:
        out.add(folder / "a.txt", text)                       # str (UTF-8) or bytes
        out.add_with(folder / "b.png", lambda tmp: fig.savefig(tmp, format="png"))
    out.written                                               # final paths, in order

A path that cannot be used raises :class:`~plumbrod.errors.OutputError` (exit 2).
"""

from __future__ import annotations

import contextlib
import errno
import os
import secrets
import signal
import stat
import threading
import time
from collections.abc import Callable, Iterable, Iterator, Mapping
from pathlib import Path
from types import TracebackType
from typing import TypeVar

from plumbrod.errors import OutputError

__all__ = [
    "MAX_NAME_BYTES",
    "TEMP_TAG",
    "OutputSet",
    "check_folder",
    "check_target",
    "remove_stale_temporaries",
    "write_atomic",
    "write_many",
    "write_with",
]

PathLike = str | os.PathLike[str]

MAX_NAME_BYTES = 200
"""Longest output file name (bytes, UTF-8); the temporary name adds about 40."""

TEMP_TAG = ".plumbrod-tmp-"
"""Marks a temporary file: ``.<name>.plumbrod-tmp-<pid>-<hex>``."""

STALE_AFTER_S = 24 * 3600.0
"""A temporary this old is stale even when its process id is in use again."""

_PathT = TypeVar("_PathT", bound=str | os.PathLike[str])


def _problem(exc: OSError) -> str:
    return f"cannot be written ({exc.strerror or exc})"


def check_folder(folder: PathLike, *, option: str = "") -> Path:
    """Refuse a folder path that exists as something other than a folder."""
    path = Path(folder)
    for part in (path, *path.parents):
        try:
            st = os.stat(part)
        except (FileNotFoundError, NotADirectoryError):
            continue
        except OSError as exc:
            raise OutputError(
                str(path), _problem(exc), "choose another folder", option=option
            ) from None
        if not stat.S_ISDIR(st.st_mode):
            raise OutputError(
                str(path),
                f"{str(part)!r} is a file, not a folder"
                if part != path
                else "is a file, not a folder",
                "give a folder path (it is created when missing)",
                option=option,
            )
        break
    return path


def check_target(path: PathLike, *, option: str = "", inputs: Iterable[PathLike] = ()) -> Path:
    """The path a file will be written to, after the checks above; raises OutputError.

    A symbolic link is followed, so the file it points to is replaced and the link stays.
    """
    given = Path(path)
    if str(path) == "":
        raise OutputError('""', "is not a file name", "give a file name", option=option)
    if given.name in ("", ".", "..") or str(path).endswith(os.sep):
        raise OutputError(str(path), "is a folder", "give a file name", option=option)
    name_bytes = len(given.name.encode("utf-8", "surrogateescape"))
    if name_bytes > MAX_NAME_BYTES:
        raise OutputError(
            given.name[:40] + "...",
            f"file name is {name_bytes} bytes long, over the {MAX_NAME_BYTES}-byte limit",
            "choose a shorter name",
            option=option,
        )
    target = Path(os.path.realpath(given)) if given.is_symlink() else given
    check_folder(target.parent, option=option)
    try:
        st = os.stat(target)
    except FileNotFoundError:
        return target
    except OSError as exc:
        raise OutputError(str(given), _problem(exc), "choose another path", option=option) from None
    if stat.S_ISDIR(st.st_mode):
        raise OutputError(str(given), "is a folder", "give a file name", option=option)
    if not stat.S_ISREG(st.st_mode):
        raise OutputError(
            str(given),
            "is not a regular file (a device, pipe or socket)",
            "give the path of a regular file or a new one",
            option=option,
        )
    for source in inputs:
        try:
            same = os.path.samefile(target, source)
        except OSError:
            same = False
        if same:
            raise OutputError(
                str(given),
                "is the input design; writing there would overwrite it",
                "give another file name",
                option=option,
            )
    return target


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except (OSError, OverflowError):
        return False
    return True


def remove_stale_temporaries(target: PathLike, keep: Iterable[Path] = ()) -> list[Path]:
    """Remove temporaries of ``target`` left by a killed run; returns what was removed.

    A temporary is stale when its process is gone, when it carries this process's id but
    is not one of ``keep`` (an earlier process had the same id), or when it is older
    than :data:`STALE_AFTER_S`.
    """
    target = Path(target)
    prefix = f".{target.name}{TEMP_TAG}"
    folder = target.parent
    keep_names = {p.name for p in keep}
    removed: list[Path] = []
    try:
        names = os.listdir(folder if str(folder) else ".")
    except OSError:
        return removed
    now = time.time()
    for entry in names:
        if not entry.startswith(prefix) or entry in keep_names:
            continue
        pid_text = entry[len(prefix) :].split("-", 1)[0]
        if not pid_text.isdigit():
            continue
        pid = int(pid_text)
        stale_file = folder / entry
        try:
            old = now - stale_file.lstat().st_mtime > STALE_AFTER_S
        except OSError:
            continue
        if pid == os.getpid() or not _alive(pid) or old:
            with contextlib.suppress(OSError):
                stale_file.unlink()
                removed.append(stale_file)
    return removed


@contextlib.contextmanager
def _signals_held() -> Iterator[None]:
    """Hold SIGINT and SIGTERM back (main thread only) while files are renamed."""
    held = {signal.SIGINT, signal.SIGTERM}
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    old = signal.pthread_sigmask(signal.SIG_BLOCK, held)
    try:
        yield
    finally:
        signal.pthread_sigmask(signal.SIG_SETMASK, old)


class OutputSet:
    """A set of output files written all together or not at all (see the module text).

    Use it as a context manager: files are staged by :meth:`add` / :meth:`add_with` and
    renamed into place when the block ends without an error; on any error (Ctrl-C too)
    every temporary is removed and no target is touched.  ``option`` names the
    command-line option in messages; ``inputs`` are paths that must not be overwritten.
    """

    def __init__(self, *, option: str = "", inputs: Iterable[PathLike] = ()) -> None:
        self.option = option
        self.inputs = tuple(inputs)
        self._staged: list[tuple[Path, Path]] = []  # (temporary, target)
        self._temps: list[Path] = []
        self.written: list[Path] = []
        self._done = False

    def __enter__(self) -> OutputSet:
        return self

    def __exit__(
        self,
        kind: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        if kind is None:
            self.commit()
        else:
            self.discard()

    def add(self, path: PathLike, data: str | bytes) -> Path:
        """Stage text (UTF-8) or bytes for ``path``; returns the final path."""
        payload = data.encode("utf-8") if isinstance(data, str) else data

        def write(tmp: Path) -> None:
            with open(tmp, "wb") as fh:
                fh.write(payload)

        return self.add_with(path, write)

    def add_with(self, path: PathLike, writer: Callable[[Path], object]) -> Path:
        """Stage a file that ``writer(tmp_path)`` fills; returns the final path."""
        if self._done:
            raise RuntimeError("this OutputSet was already committed or discarded")
        target = check_target(path, option=self.option, inputs=self.inputs)
        if any(t == target for _, t in self._staged):
            raise OutputError(
                str(path), "is written twice", "give distinct names", option=self.option
            )
        try:
            target.parent.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise OutputError(
                str(target.parent),
                _problem(exc),
                "choose a folder you can write to",
                option=self.option,
            ) from None
        tmp = target.with_name(f".{target.name}{TEMP_TAG}{os.getpid()}-{secrets.token_hex(4)}")
        self._temps.append(tmp)  # recorded before it exists: an interrupt cannot leak it
        remove_stale_temporaries(target, keep=self._temps)
        try:
            fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
            os.close(fd)
            writer(tmp)
            with open(tmp, "rb+") as fh:
                os.fsync(fh.fileno())
        except OSError as exc:
            self.discard()
            fix = (
                "free some disk space"
                if exc.errno in (errno.ENOSPC, errno.EFBIG, errno.EDQUOT)
                else "check the disk and the folder's permissions"
            )
            raise OutputError(str(target), _problem(exc), fix, option=self.option) from None
        except BaseException:
            self.discard()
            raise
        self._staged.append((tmp, target))
        return target

    def commit(self) -> list[Path]:
        """Rename every staged file into place; returns the final paths."""
        if self._done:
            return self.written
        try:
            for _, target in self._staged:  # nothing changed on disk since staging?
                check_target(target, option=self.option, inputs=self.inputs)
        except BaseException:
            self.discard()
            raise
        with _signals_held():
            self._done = True
            try:
                for tmp, target in self._staged:
                    os.replace(tmp, target)
                    self.written.append(target)
            except OSError as exc:
                self._remove_temporaries()
                raise OutputError(
                    str(target), _problem(exc), "choose another path", option=self.option
                ) from None
        return self.written

    def discard(self) -> None:
        """Remove every temporary; no target is touched."""
        self._done = True
        self._remove_temporaries()

    def _remove_temporaries(self) -> None:
        for tmp in self._temps:
            with contextlib.suppress(OSError):
                tmp.unlink()


def write_with(
    path: PathLike,
    writer: Callable[[Path], object],
    *,
    option: str = "",
    inputs: Iterable[PathLike] = (),
) -> Path:
    """Call ``writer(tmp_path)`` to fill a temporary file, then rename it to ``path``."""
    with OutputSet(option=option, inputs=inputs) as out:
        target = out.add_with(path, writer)
    return target


def write_atomic(
    path: PathLike, data: str | bytes, *, option: str = "", inputs: Iterable[PathLike] = ()
) -> Path:
    """Write text (UTF-8) or bytes to ``path`` atomically; returns the final path."""
    with OutputSet(option=option, inputs=inputs) as out:
        target = out.add(path, data)
    return target


def write_many(
    files: Mapping[_PathT, str | bytes], *, option: str = "", inputs: Iterable[PathLike] = ()
) -> list[Path]:
    """Write several files all together or not at all; returns the final paths."""
    with OutputSet(option=option, inputs=inputs) as out:
        for path, data in files.items():
            out.add(path, data)
    return out.written
