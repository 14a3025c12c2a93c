"""Command line: ``plumbrod <verb>``.

Exit codes: 0 when every check passes (warnings allowed), 1 when a check fails, 2 on bad
input (design file or command-line values); when a sweep cannot be solved, the cause:
3 a dead point, 4 a rod that cannot reach, 5 a redundancy conflict, 6 a branch change.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from collections.abc import Sequence

from plumbrod import __version__
from plumbrod.cli import COMMAND_MODULES
from plumbrod.errors import ASSEMBLY_KINDS, AssemblyError, PlumbrodError
from plumbrod.outputs.cautions import CAUTION

__all__ = ["EXIT_ASSEMBLY", "EXIT_BAD_INPUT", "EXIT_FAIL", "EXIT_OK", "build_parser", "main"]

EXIT_OK = 0
EXIT_FAIL = 1
EXIT_BAD_INPUT = 2
EXIT_ASSEMBLY = {kind: 3 + i for i, kind in enumerate(ASSEMBLY_KINDS)}
"""A sweep that cannot be solved, by cause: 3 dead point, 4 a rod that cannot reach,
5 redundancy conflict (rods that would have to strain absurdly), 6 branch change."""


def build_parser() -> argparse.ArgumentParser:
    """The top-level parser with one sub-parser per available command module."""
    parser = argparse.ArgumentParser(
        prog="plumbrod",
        description=(
            "Route aero loads from a wing, splitter or undertray to the wheel uprights "
            "through rods and rockers; solve the linkage through the travel and check it."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"plumbrod {__version__}")
    subparsers = parser.add_subparsers(dest="verb", metavar="<verb>")
    for name in COMMAND_MODULES:
        try:
            module = importlib.import_module(f"plumbrod.cli.{name}")
        except ModuleNotFoundError as exc:
            if exc.name != f"plumbrod.cli.{name}":
                raise
            continue
        module.register(subparsers)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run one verb and return its exit code; errors become one line on stderr."""
    parser = build_parser()
    args = parser.parse_args(argv)
    handler = getattr(args, "handler", None)
    if handler is None:
        parser.print_help()
        return EXIT_BAD_INPUT
    try:
        return int(handler(args))
    except BrokenPipeError:
        # the reader (e.g. `| head`) went away: stop quietly, like other commands do
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return EXIT_OK
    except AssemblyError as exc:
        print(f"plumbrod: fail: {exc}", file=sys.stderr)
        return EXIT_ASSEMBLY.get(exc.kind, EXIT_FAIL)
    except PlumbrodError as exc:
        print(f"plumbrod: error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("plumbrod: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
