"""``plumbrod tradeoff DESIGN.toml``: is routing the load worth it on a rough road?

Per axle, a quarter car with the element bolted to the chassis beside the same car with
it routed to the uprights, on ISO 8608 roads at every speed up to top speed: the wheel
rate each needs, the element's height, tyre-load variation, body acceleration, travel.
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path
from typing import Any

from plumbrod.outputs.cautions import CAUTION, RIDE_CAUTION

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "tradeoff",
        help="ride study: bolted against routed, per axle, on ISO 8608 random roads",
        description=(
            "Compare the element bolted to the chassis with the element routed to the "
            "uprights: per axle, a linear quarter car at every speed up to top speed on "
            "the ISO 8608 road classes of the design's [tradeoff] table. Prints the wheel "
            "rate each case needs to keep the body within the ride-height budget, the "
            "element's height change, the tyre-load variation and its chance of "
            "unloading, body acceleration and suspension travel, and a verdict per axle. "
            "Idealised: linear, straight line, one road class at a time. Exit 0 when the "
            "study ran, 2 on bad input."
        ),
        epilog=f"{RIDE_CAUTION} {CAUTION}",
    )
    parser.add_argument("design", help="design file (TOML) with a [tradeoff] table")
    parser.add_argument(
        "--json",
        metavar="FILE",
        help="write the study as JSON to FILE ('-' prints it instead of the text)",
    )
    parser.add_argument("--csv", metavar="FILE", help="write one row per road class and speed")
    parser.add_argument(
        "--plots",
        metavar="DIR",
        help="write the figures against speed (one PNG per axle) into DIR",
    )
    parser.add_argument(
        "--trace",
        action="store_true",
        help="with --plots: also a synthesised road and the tyre load over it at top speed",
    )
    parser.add_argument("-o", "--output", metavar="FILE", help="also write the text report to FILE")
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.loading import load_design
    from plumbrod.errors import UsageError
    from plumbrod.mechanics.analysis import analyse
    from plumbrod.mechanics.mass import mass_report
    from plumbrod.outputs.atomic import write_many
    from plumbrod.outputs.tradeoff_report import study_csv, study_json, study_text
    from plumbrod.verdict.tradeoff import study_tradeoff

    if args.trace and not args.plots:
        raise UsageError("--trace", "needs --plots DIR", "add --plots DIR to say where")
    design = load_design(args.design)
    analysis = analyse(design)
    study = study_tradeoff(analysis, mass_report(analysis))
    text = study_text(study)
    files: dict[str | os.PathLike[str], str | bytes] = {}
    if args.json and args.json != "-":
        files[args.json] = study_json(study)
    if args.csv:
        files[args.csv] = study_csv(study)
    if args.output:
        files[args.output] = text
    written = [str(p) for p in write_many(files)] if files else []
    if args.plots:
        from plumbrod.outputs.tradeoff_plots import plot_study, plot_trace

        stem = Path(args.design).stem
        written += [str(p) for p in plot_study(study, args.plots, stem)]
        if args.trace:
            written += [str(p) for p in plot_trace(study, args.plots, stem)]
    if args.json == "-":
        sys.stdout.write(study_json(study))
        out = sys.stderr
    else:
        sys.stdout.write(text)
        out = sys.stdout
    for path in written:
        print(f"wrote {path}", file=out)
    return 0
