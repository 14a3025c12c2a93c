"""``plumbrod new FILE``: write a commented starter design."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "new",
        help="write a commented starter design file to edit",
        description=(
            "Write a commented starter design (a splitter hung from two front wheels, "
            "invented values) that passes `plumbrod check`; every key is explained in "
            "it. Its first line, '#:schema ./plumbrod-design.schema.json', points TOML "
            "editors that read JSON Schema to the schema written beside it (the output of "
            "`plumbrod schema`), so they complete and check keys as you type. Refuses to "
            "overwrite an existing file unless --force is given."
        ),
    )
    parser.add_argument("file", help="path of the design file to write (e.g. my_car.toml)")
    parser.add_argument("--force", action="store_true", help="overwrite FILE if it exists")
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.templates import STARTER, read_template
    from plumbrod.errors import UsageError

    target = Path(args.file)
    if target.is_dir():
        raise UsageError(args.file, "is a folder", "give a file name such as my_car.toml")
    if target.exists() and not args.force:
        raise UsageError(args.file, "already exists", "choose another name, or add --force")
    from plumbrod.design.json_schema import SCHEMA_FILE_NAME, SCHEMA_ID, schema_text
    from plumbrod.outputs.atomic import write_many

    directive = f"#:schema ./{SCHEMA_FILE_NAME}\n"
    schema = target.parent / SCHEMA_FILE_NAME
    files = {target: directive + read_template(STARTER)}
    if _ours_or_absent(schema, SCHEMA_ID):
        files[schema] = schema_text()
    write_many(files)
    print(f"wrote {target}: edit the hardpoints, then run  plumbrod check {target}")
    if schema in files:
        print(f"wrote {schema}: the JSON Schema its first line points editors to")
    else:
        print(f"kept {schema} (not written by plumbrod); `plumbrod schema -o FILE` writes one")
    return 0


def _ours_or_absent(path: Path, schema_id: str) -> bool:
    """Whether ``path`` is free, or a schema plumbrod wrote (safe to refresh)."""
    if not path.exists():
        return True
    if not path.is_file():
        return False
    try:
        return schema_id in path.read_text(encoding="utf-8")[:400]
    except (OSError, UnicodeDecodeError):
        return False
