"""``plumbrod demo``: check the bundled example and write its report and sweep table."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from plumbrod.outputs.cautions import CAUTION

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "demo",
        help="check the bundled example and write its report and tables to exports/",
        description=(
            "Run the whole job on the bundled example (an invented hillclimb car's front "
            "splitter hung from its lower wishbones through two rockers): check it, print "
            "the report, and write the design, the text and JSON reports, the sweep "
            "table, the PNG figures and the DXF drawing into the output folder."
        ),
        epilog=CAUTION,
    )
    parser.add_argument(
        "--output-dir",
        metavar="DIR",
        default="exports",
        help="folder for the files (default: exports)",
    )
    parser.set_defaults(handler=run)


def run(args: argparse.Namespace) -> int:
    from plumbrod.cli.export import export_files
    from plumbrod.design.loading import parse_design
    from plumbrod.design.templates import BUNDLED_EXAMPLE, read_template
    from plumbrod.mechanics.analysis import Analysis
    from plumbrod.outputs.atomic import OutputSet, check_folder
    from plumbrod.outputs.plots import plot_findings
    from plumbrod.outputs.report import as_json, as_text, verdict
    from plumbrod.outputs.table import pose_table, table_csv
    from plumbrod.verdict.findings import review

    out = check_folder(args.output_dir, option="--output-dir")
    stem = Path(BUNDLED_EXAMPLE).stem
    text = read_template(BUNDLED_EXAMPLE)
    design_path = out / BUNDLED_EXAMPLE
    findings = review(parse_design(text, str(design_path)))
    analysis: Analysis = findings.analysis
    report = as_text(findings)
    sys.stdout.write(report)
    with OutputSet(option="--output-dir") as files:  # all seven files, or none
        files.add(design_path, text)
        files.add(out / f"{stem}-report.txt", report)
        files.add(out / f"{stem}-report.json", as_json(findings))
        files.add(out / f"{stem}-sweep.csv", table_csv(*pose_table(analysis)))
        plot_findings(findings, out, stem, into=files)
        export_files(analysis, out, stem=stem, into=files)
    written = files.written
    print("")
    for path in written:
        print(f"wrote {path}")
    if analysis.design.tradeoff is not None:
        from plumbrod.verdict.tradeoff import study_tradeoff

        print("")
        print("ride study (plumbrod tradeoff, an idealised linear quarter car):")
        for axle in study_tradeoff(analysis, findings.mass).axles.values():
            print(f"  {axle.sentence}")
    print("")
    print("next:")
    print(f"  edit a copy of {design_path} (or start fresh: plumbrod new my_car.toml)")
    print(f"  plumbrod check {design_path} --json     the same report as JSON")
    print(f"  plumbrod sweep {design_path}            every pose as a CSV table")
    print(f"  plumbrod plot {design_path}             the figures again, for your own designs")
    print(f"  plumbrod export {design_path} --png     DXF sheet, 3D wireframe, plate cut files")
    print(f"  plumbrod report {design_path}           the one-file HTML review report")
    print(f"  plumbrod size {design_path}             lighter tubes that keep the reserves")
    print(f"  plumbrod tradeoff {design_path}         bolted against routed on rough roads")
    print("  plumbrod column --od 16 --wall 1 --length 400 --material 4130-N --load -2000")
    print("  the other examples: examples/ in the source tree (see examples/README.md)")
    return 1 if verdict(findings.checks) == "fail" else 0
