"""``plumbrod check DESIGN.toml``: solve the design through its sweeps and check it."""

from __future__ import annotations

import argparse
import sys
from typing import Any

from plumbrod.outputs.cautions import CAUTION

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "check",
        help="solve a design through its sweeps and check every figure against its limit",
        description=(
            "Solve the linkage of a design file through the wheel travel and the body "
            "motions, and check route ratio, line of action, transmission angles, "
            "ride-height sensitivity, member forces, sprung leakage, buckling, tension and "
            "compliance against the design's limits. Exit 0 when nothing "
            "fails (warnings allowed), 1 when a check fails, 2 on bad input."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("design", help="design file (TOML); see `plumbrod new`")
    parser.add_argument(
        "--json",
        action="store_true",
        help="print the report as JSON (keys: design, checks, sweeps, ...)",
    )
    parser.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="also write the report to FILE (written whole, or not at all)",
    )
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.loading import load_design
    from plumbrod.outputs.atomic import check_target, write_atomic
    from plumbrod.outputs.report import as_json, as_text, verdict
    from plumbrod.verdict.findings import review

    if args.output:  # refuse a bad path before the work
        check_target(args.output, option="--output", inputs=[args.design])
    findings = review(load_design(args.design))
    text = as_json(findings) if args.json else as_text(findings)
    if args.output:
        write_atomic(args.output, text, option="--output", inputs=[args.design])
    sys.stdout.write(text)
    return 1 if verdict(findings.checks) == "fail" else 0
