"""Write files so that a reader never sees a partial or corrupt one.

Every output file is written to a temporary file in the same folder and then renamed
over the target, which is atomic on POSIX and Windows file systems.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path

__all__ = ["write_atomic", "write_with"]


def write_with(path: str | os.PathLike[str], writer: Callable[[Path], None]) -> Path:
    """Call ``writer(tmp_path)`` to fill a temporary file, then rename it to ``path``.

    The temporary file is removed if ``writer`` raises; the target is left untouched.
    Returns the final path.
    """
    target = Path(path)
    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    os.close(fd)
    tmp = Path(tmp_name)
    try:
        writer(tmp)
        os.replace(tmp, target)
    except BaseException:
        tmp.unlink(missing_ok=True)
        raise
    return target


def write_atomic(path: str | os.PathLike[str], data: str | bytes) -> Path:
    """Write text (UTF-8) or bytes to ``path`` atomically; returns the final path."""
    payload = data.encode("utf-8") if isinstance(data, str) else data
    return write_with(path, lambda tmp: tmp.write_bytes(payload))
