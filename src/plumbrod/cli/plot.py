"""``plumbrod plot DESIGN.toml``: PNG figures of the kinematics and the forces."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from plumbrod.outputs.cautions import CAUTION

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "plot",
        help="draw the figures (route ratio, ride height, angles, reserves, clearance) "
        "as PNG and SVG",
        description=(
            "Solve and check a design and draw its figures as PNG and SVG, one idea "
            "each: <design>-route-ratio, -ride-height (heave, roll, pitch beside the "
            "bolted element), -line-of-action (every sweep, worst pose marked), "
            "-transmission, -reserves (every rod's reserve factor per load case) and "
            "-clearance (the closest pairs). Each title starts with its check's status; "
            "the right side of a left/right pair is dashed. Prints the verdict line and "
            "exits 1 when a check fails, like `plumbrod check`."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("design", help="design file (TOML)")
    parser.add_argument(
        "--output-dir",
        metavar="DIR",
        default="exports",
        help="folder for the PNG and SVG files (default: exports)",
    )
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.loading import load_design
    from plumbrod.outputs.atomic import OutputSet, check_folder
    from plumbrod.outputs.plots import plot_findings
    from plumbrod.outputs.report import verdict, verdict_line
    from plumbrod.verdict.findings import review

    check_folder(args.output_dir, option="--output-dir")
    findings = review(load_design(args.design))
    with OutputSet(option="--output-dir", inputs=[args.design]) as out:
        plot_findings(findings, args.output_dir, Path(args.design).stem, into=out)
    for path in out.written:
        print(f"wrote {path}")
    print(verdict_line(findings.checks))
    return 1 if verdict(findings.checks) == "fail" else 0
