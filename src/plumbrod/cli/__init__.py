"""Stage 9, command line: ``plumbrod <verb>``, one module per verb.

Imports: any earlier stage; nothing imports this package.

Each module exposes ``register(subparsers)``, which adds its parser and sets
``handler=run`` on it, and ``run(args) -> int`` returning the exit code.  Modules keep
their top-level imports light (argparse and the standard library); heavy imports go
inside ``run`` so that ``plumbrod --help`` and ``plumbrod check`` start fast.
"""

COMMAND_MODULES: tuple[str, ...] = (
    "check",
    "sweep",
    "plot",
    "column",
    "size",
    "tune",
    "export",
    "report",
    "tradeoff",
    "new",
    "schema",
    "demo",
)
"""Verbs in the order ``--help`` lists them; a module missing here is not offered."""
