"""``plumbrod schema [-o FILE]``: the JSON Schema (draft 2020-12) of the design file.

Printed to stdout, or written whole to FILE.  A TOML editor that reads JSON Schema
uses it through a first line ``#:schema <path>`` in the design file (``plumbrod new``
writes both).
"""

from __future__ import annotations

import argparse
from typing import Any

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    """Add the ``schema`` parser and set ``handler=run``."""
    parser = subparsers.add_parser(
        "schema",
        help="print the JSON Schema of the design file (for TOML editors)",
        description=(
            "Print the JSON Schema (draft 2020-12) of the design file, generated from the "
            "same table the loader checks against, so that a TOML editor can complete and "
            "check keys as you type: put '#:schema <path of the schema>' on the first "
            "line of the design. `plumbrod check` stays the authority."
        ),
        epilog="Exit status: 0 written, 2 bad input (the output cannot be written).",
    )
    parser.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="write the schema to FILE (written whole, or not at all) instead of stdout",
    )
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    """Print or write the schema; refuses to write over a design file."""
    import sys
    from pathlib import Path

    from plumbrod.design.json_schema import schema_text
    from plumbrod.errors import UsageError
    from plumbrod.outputs.atomic import write_atomic

    text = schema_text()
    if not args.output or args.output == "-":
        sys.stdout.write(text)
        return 0
    target = Path(args.output)
    if target.suffix.lower() == ".toml" or _is_design(target):
        raise UsageError(
            "-o",
            f"'{args.output}' looks like a design file; the schema is JSON",
            f"give a .json name, e.g. -o {target.with_suffix('.schema.json').name}",
        )
    if target.exists() and not target.is_file():
        raise UsageError(
            "-o", f"'{args.output}' is not a regular file", "give the path of a .json file"
        )
    write_atomic(target, text)
    print(f"wrote {target}")
    return 0


def _is_design(path: Any) -> bool:
    """Whether ``path`` is an existing file that reads as a design (TOML with [design])."""
    import tomllib

    try:
        if not path.is_file():
            return False
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError):
        return False
    return isinstance(data.get("design"), dict)
