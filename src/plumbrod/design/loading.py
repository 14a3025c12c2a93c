"""Read a design file (TOML) into a validated :class:`~plumbrod.design.model.Design`.

Every problem becomes one :class:`~plumbrod.errors.DesignFileError` naming the file,
the key path, what is wrong and how to fix it.  Nothing here solves anything.  This
module reads the bytes and the TOML; :mod:`plumbrod.design.builder` builds the design
section by section with the typed-value reader of :mod:`plumbrod.design.reader`.

The format is documented in ``examples/README.md``; ``plumbrod new`` writes a
commented starter.
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

from plumbrod.design.build_members import ELEMENT_KINDS
from plumbrod.design.builder import build_design
from plumbrod.design.model import Design
from plumbrod.errors import DesignFileError

__all__ = ["ELEMENT_KINDS", "load_design", "parse_design"]


def load_design(path: str | Path) -> Design:
    """Read and validate a design file; raises DesignFileError on any problem."""
    shown = str(path)
    file = Path(path)
    if not file.exists():
        raise DesignFileError(
            shown, "", "no such file", "check the path, or write a starter with `plumbrod new FILE`"
        )
    if file.is_dir():
        raise DesignFileError(
            shown,
            "",
            "this is a folder, not a design file",
            "give the path of a .toml file inside it",
        )
    try:
        raw = file.read_bytes()
    except OSError as exc:
        raise DesignFileError(
            shown, "", f"cannot be read ({exc.strerror})", "check the file's permissions"
        ) from None
    if not raw.strip():
        raise DesignFileError(
            shown, "", "the file is empty", "write a starter design with `plumbrod new FILE`"
        )
    encoding = _unicode_signature(raw)
    if encoding:
        raise DesignFileError(
            shown,
            "",
            f"the file is saved as {encoding}",
            "save it as UTF-8 without a byte-order mark (in most editors: Save with "
            "encoding, UTF-8)",
        )
    if b"\x00" in raw:
        raise DesignFileError(
            shown,
            "",
            "this is a binary file, not a TOML design file",
            "give the path of a text .toml file",
        )
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise DesignFileError(
            shown,
            "",
            f"not UTF-8 text (bad byte at offset {exc.start})",
            "save the file as UTF-8 text",
        ) from None
    return parse_design(text, shown)


def _unicode_signature(raw: bytes) -> str:
    """The encoding a byte-order mark (or the zero bytes of UTF-16 text) shows, or ""."""
    if raw.startswith(b"\xef\xbb\xbf"):
        return "UTF-8 with a byte-order mark"
    if raw.startswith((b"\xff\xfe\x00\x00", b"\x00\x00\xfe\xff")):
        return "UTF-32"
    if raw.startswith((b"\xff\xfe", b"\xfe\xff")):
        return "UTF-16"
    head = raw[:200]
    if len(head) >= 4 and head[1::2].count(0) > len(head) // 4 and 0 not in head[0::2]:
        return "UTF-16 (little-endian, no byte-order mark)"
    if len(head) >= 4 and head[0::2].count(0) > len(head) // 4 and 0 not in head[1::2]:
        return "UTF-16 (big-endian, no byte-order mark)"
    return ""


_TOML_POSITION = re.compile(r"^(?P<what>.*?)\s*\(at line (?P<line>\d+), column (?P<col>\d+)\)")


def parse_design(text: str, source: str = "<design>") -> Design:
    """Validate the TOML text of a design; ``source`` names it in messages."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        if message.endswith("(at end of document)"):
            lines = text.splitlines() or [""]
            message = (
                f"{message[: -len('(at end of document)')].rstrip()} (at line "
                f"{len(lines)}, column {len(lines[-1]) + 1})"
            )
        match = _TOML_POSITION.match(message)
        if match:
            what = match["what"].rstrip(".") or "invalid TOML"
            raise DesignFileError(
                source,
                f"line {match['line']}, column {match['col']}",
                f"invalid TOML: {what[0].lower()}{what[1:]}",
                "check the quotes, brackets, commas and '=' there; a key may appear once",
            ) from None
        raise DesignFileError(
            source, "", f"invalid TOML: {message}", "check the file's syntax"
        ) from None
    return build_design(data, source)
