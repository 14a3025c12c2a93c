"""Command line: ``plumbrod <verb>``.

Exit codes: 0 when every check passes (warnings allowed), 1 when a check fails, 2 on bad
input (design file or command-line values); when a sweep cannot be solved, the cause:
3 a dead point, 4 a rod that cannot reach, 5 a redundancy conflict, 6 a branch change.
"""

from __future__ import annotations

import argparse
import importlib
import os
import signal
import sys
import threading
import warnings
from collections.abc import Sequence

from plumbrod import __version__
from plumbrod.cli import COMMAND_MODULES
from plumbrod.errors import AssemblyError, PlumbrodError
from plumbrod.outputs.cautions import CAUTION

__all__ = ["EXIT_BAD_INPUT", "EXIT_FAIL", "EXIT_OK", "build_parser", "main"]

EXIT_OK = 0
EXIT_FAIL = 1
EXIT_BAD_INPUT = 2
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


def _stop_on_sigterm(signum: int, frame: object) -> None:
    raise SystemExit(128 + signum)  # unwinds like Ctrl-C: temporaries are removed


def _silence_stdout() -> None:
    """Point the standard output at the null device so the exit flush cannot fail."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError, AttributeError):
        pass


def _interrupted(exc: BaseException) -> bool:
    """Whether a KeyboardInterrupt is the cause or context of ``exc``."""
    seen: set[int] = set()
    link: BaseException | None = exc
    while link is not None and id(link) not in seen:
        if isinstance(link, KeyboardInterrupt):
            return True
        seen.add(id(link))
        link = link.__cause__ or link.__context__
    return False


def main(argv: Sequence[str] | None = None) -> int:
    """Run one verb and return its exit code; errors become one line on stderr."""
    if sys.stdout is None:  # started with the standard output closed (`>&-`)
        print("plumbrod: error: the standard output is closed; run without '>&-'", file=sys.stderr)
        return EXIT_BAD_INPUT
    parser = build_parser()
    args = parser.parse_args(argv)
    handler = getattr(args, "handler", None)
    if handler is None:
        parser.print_help()
        return EXIT_BAD_INPUT
    previous = None
    if threading.current_thread() is threading.main_thread():
        previous = signal.signal(signal.SIGTERM, _stop_on_sigterm)
    try:
        with warnings.catch_warnings():
            # numeric warnings are not for the user: a figure that comes out NaN or
            # infinite is reported as one line (dumps_finite, FigureError) instead
            warnings.simplefilter("ignore", RuntimeWarning)
            code = int(handler(args))
        sys.stdout.flush()  # a full disk or /dev/full shows here, not at exit
        return code
    except BrokenPipeError:
        # the reader (e.g. `| head`) went away: stop quietly, like other commands do
        _silence_stdout()
        return EXIT_OK
    except AssemblyError as exc:
        # the design fails (exit 1, like a failed check); the tag names the cause
        print(f"plumbrod: fail ({exc.kind}): {exc}", file=sys.stderr)
        return EXIT_FAIL
    except PlumbrodError as exc:
        print(f"plumbrod: error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except OSError as exc:
        where = exc.filename if exc.filename is not None else "the standard output"
        print(
            f"plumbrod: error: {where} cannot be written ({exc.strerror or exc}); "
            "free some disk space or write elsewhere",
            file=sys.stderr,
        )
        if exc.filename is None:
            _silence_stdout()
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("plumbrod: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:
        if not _interrupted(exc):
            raise
        # Ctrl-C inside an import can come wrapped (e.g. a RuntimeError from __set_name__)
        print("plumbrod: interrupted", file=sys.stderr)
        return 130
    finally:
        if previous is not None:
            signal.signal(signal.SIGTERM, previous)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
