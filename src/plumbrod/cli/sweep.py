"""``plumbrod sweep DESIGN.toml``: every solved pose as a table (CSV and/or JSON)."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from plumbrod.outputs.cautions import CAUTION

__all__ = ["register", "run"]

SWEEP_NAMES = ("travel", "heave", "roll", "pitch", "heave_roll")


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "sweep",
        help="write every solved pose (positions, ratios, angles, forces) as CSV or JSON",
        description=(
            "Solve a design through its sweeps and write one row per pose: driver "
            "values, wheel travel, route pickup positions, route ratio, ride height, "
            "line of action, transmission angles, and per load case every rod force, the "
            "force on each upright and the sprung leakage. Column names carry units. "
            "Without --csv or --json the CSV goes to exports/<design>-sweep.csv."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("design", help="design file (TOML)")
    parser.add_argument("--csv", metavar="FILE", help="write the table as CSV to FILE")
    parser.add_argument(
        "--json", metavar="FILE", help="write the table as JSON to FILE ('-' prints it)"
    )
    parser.add_argument(
        "--sweep",
        action="append",
        choices=SWEEP_NAMES,
        metavar="NAME",
        help="only this sweep (repeat for several): " + ", ".join(SWEEP_NAMES),
    )
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.loading import load_design
    from plumbrod.errors import UsageError
    from plumbrod.mechanics.analysis import analyse
    from plumbrod.outputs.atomic import OutputSet, check_target
    from plumbrod.outputs.table import pose_table, table_csv, table_json

    for option, value in (("--csv", args.csv), ("--json", args.json)):
        if value is not None and value != "-":  # refuse a bad path before the work
            check_target(value, option=option, inputs=[args.design])
    if args.csv is not None and args.csv == args.json:
        raise UsageError("--json", "is the same file as --csv", "give two different files")
    design = load_design(args.design)
    analysis = analyse(design)
    chosen = args.sweep or None
    if chosen:
        missing = [s for s in chosen if s not in analysis.sweeps]
        if missing:
            raise UsageError(
                "--sweep",
                f"the design has no '{missing[0]}' sweep",
                "use one of: " + ", ".join(analysis.sweeps),
            )
    columns, rows = pose_table(analysis, chosen)
    csv_path = args.csv
    if csv_path is None and args.json is None:
        csv_path = str(Path("exports") / f"{Path(args.design).stem}-sweep.csv")
    with OutputSet(inputs=[args.design]) as out:
        if csv_path:
            out.option = "--csv"
            out.add(csv_path, table_csv(columns, rows))
        if args.json and args.json != "-":
            out.option = "--json"
            out.add(args.json, table_json(analysis, columns, rows))
    notes = sys.stderr if args.json == "-" else sys.stdout  # keep printed JSON clean
    for path in out.written:
        print(f"wrote {path}: {len(rows)} poses x {len(columns)} columns", file=notes)
    if args.json == "-":
        sys.stdout.write(table_json(analysis, columns, rows))
    return 0
