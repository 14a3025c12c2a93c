"""Write files so that a reader never sees a partial or corrupt one.

Every output file is written to a temporary file in the same folder and then renamed
over the target, which is atomic on POSIX and Windows file systems.  Several files are
written in two phases (every temporary file first, then every rename), so a failure
leaves none of them.  A path that cannot be written raises :class:`OutputError`.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable, Mapping
from pathlib import Path
from typing import TypeVar

from plumbrod.errors import OutputError

__all__ = ["write_atomic", "write_many", "write_with"]

_PathT = TypeVar("_PathT", bound=str | os.PathLike[str])


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def _prepare(target: Path, writer: Callable[[Path], object]) -> Path:
    """Fill a temporary file next to ``target``; returns its path."""
    try:
        if target.is_dir():
            raise OutputError(str(target), "is a folder", "give a file name")
        target.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
        os.close(fd)
    except OutputError:
        raise
    except OSError as exc:
        raise OutputError(
            str(target),
            f"cannot be written ({exc.strerror or exc})",
            "choose a path in a folder you can write to",
        ) from None
    tmp = Path(tmp_name)
    try:
        writer(tmp)
        os.chmod(tmp, 0o666 & ~_umask())
    except BaseException as exc:
        tmp.unlink(missing_ok=True)
        if isinstance(exc, OSError):
            raise OutputError(
                str(target),
                f"cannot be written ({exc.strerror or exc})",
                "check the disk and the folder's permissions",
            ) from None
        raise
    return tmp


def write_with(path: str | os.PathLike[str], writer: Callable[[Path], object]) -> Path:
    """Call ``writer(tmp_path)`` to fill a temporary file, then rename it to ``path``.

    The temporary file is removed if ``writer`` raises; the target is left untouched.
    Returns the final path.
    """
    target = Path(path)
    tmp = _prepare(target, writer)
    try:
        os.replace(tmp, target)
    except OSError as exc:
        tmp.unlink(missing_ok=True)
        raise OutputError(
            str(target), f"cannot be written ({exc.strerror or exc})", "choose another path"
        ) from None
    return target


def _bytes_writer(payload: bytes) -> Callable[[Path], object]:
    """A writer that fills its temporary file with ``payload``."""
    return lambda tmp: tmp.write_bytes(payload)


def write_atomic(path: str | os.PathLike[str], data: str | bytes) -> Path:
    """Write text (UTF-8) or bytes to ``path`` atomically; returns the final path."""
    payload = data.encode("utf-8") if isinstance(data, str) else data
    return write_with(path, lambda tmp: tmp.write_bytes(payload))


def write_many(files: Mapping[_PathT, str | bytes]) -> list[Path]:
    """Write several files: all temporary files first, then all renames.

    If any file cannot be prepared, none is written.  Returns the final paths.
    """
    staged: list[tuple[Path, Path]] = []
    try:
        for path, data in files.items():
            payload = data.encode("utf-8") if isinstance(data, str) else data
            target = Path(path)
            staged.append((_prepare(target, _bytes_writer(payload)), target))
    except BaseException:
        for tmp, _ in staged:
            tmp.unlink(missing_ok=True)
        raise
    for tmp, target in staged:
        os.replace(tmp, target)
    return [target for _, target in staged]
