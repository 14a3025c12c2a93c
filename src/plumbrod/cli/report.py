"""``plumbrod report DESIGN.toml [-o FILE.html]``: the one-file review report."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import TYPE_CHECKING, Any

from plumbrod.outputs.cautions import CAUTION

if TYPE_CHECKING:  # pragma: no cover
    from ezdxf.document import Drawing

    from plumbrod.verdict.findings import Findings

__all__ = ["register", "report_html", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "report",
        help="write the one-file HTML review report (verdict, tables, figures, sheet)",
        description=(
            "Solve and check a design, then write one self-contained HTML file to open "
            "offline or print: the job in a sentence, every check with its worst pose, "
            "what the springs carry, the member and mass tables, every figure, a preview "
            "of the drawing sheet, the cautions, the design file's SHA-256, the tool "
            "version and the date. Prints the verdict line; exits 1 when a check fails, "
            "like `plumbrod check`."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("design", help="design file (TOML)")
    parser.add_argument(
        "-o",
        "--output",
        metavar="FILE.html",
        help="where to write the report (default: exports/<design>-report.html); "
        "written whole, or not at all",
    )
    parser.set_defaults(handler=run)


def report_html(
    findings: Findings, *, notes: tuple[str, ...] = (), sheet: Drawing | None = None
) -> str:
    """The HTML report of reviewed findings (figures, sheet preview, hash, date);
    ``sheet`` is the drawing sheet when it is already built."""
    from plumbrod.outputs.dxf_preview import preview_png
    from plumbrod.outputs.dxf_sheet import design_sha256, sheet_drawing, today
    from plumbrod.outputs.html_report import html_report
    from plumbrod.outputs.plots import figure_files

    svgs = figure_files(findings, "figure", formats=("svg",))
    figures = {name[len("figure-") : -len(".svg")]: data for name, data in svgs.items()}
    doc = sheet if sheet is not None else sheet_drawing(findings.analysis)
    return html_report(
        findings,
        figures_svg=figures,
        sheet_png=preview_png(doc, view="top", dpi=110, width_in=14.0),
        sha256=design_sha256(findings.analysis),
        date=today(),
        notes=notes,
    )


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.loading import load_design
    from plumbrod.outputs.atomic import write_atomic
    from plumbrod.outputs.dxf_plates import plate_parts
    from plumbrod.outputs.report import verdict, verdict_line
    from plumbrod.verdict.findings import review

    findings = review(load_design(args.design))
    target = Path(args.output or Path("exports") / f"{Path(args.design).stem}-report.html")
    notes = tuple(plate_parts(findings.analysis.design)[1])
    path = write_atomic(target, report_html(findings, notes=notes))
    print(f"wrote {path}")
    print(verdict_line(findings.checks))
    return 1 if verdict(findings.checks) == "fail" else 0
