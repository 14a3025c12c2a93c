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
            "it. Refuses to overwrite an existing file unless --force is given."
        ),
    )
    parser.add_argument("file", help="path of the design file to write (e.g. my_car.toml)")
    parser.add_argument("--force", action="store_true", help="overwrite FILE if it exists")
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.templates import STARTER, read_template
    from plumbrod.errors import UsageError
    from plumbrod.outputs.atomic import write_atomic

    if not args.file.strip():
        raise UsageError("FILE", "is empty", "give a file name such as my_car.toml")
    target = Path(args.file)
    if target.is_dir():
        raise UsageError(args.file, "is a folder", "give a file name such as my_car.toml")
    if target.exists() and not args.force:
        raise UsageError(args.file, "already exists", "choose another name, or add --force")
    write_atomic(target, read_template(STARTER), option="FILE")
    print(f"wrote {target}: edit the hardpoints, then run  plumbrod check {target}")
    return 0
