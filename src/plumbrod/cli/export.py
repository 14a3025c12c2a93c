"""``plumbrod export DESIGN.toml``: DXF files for CAD and for cutting the rocker plates."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import TYPE_CHECKING, Any

from plumbrod.outputs.cautions import CAUTION

if TYPE_CHECKING:  # pragma: no cover
    from plumbrod.mechanics.analysis import Analysis
    from plumbrod.outputs.atomic import OutputSet
    from plumbrod.verdict.findings import Findings

__all__ = ["export_files", "register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "export",
        help="write DXF files: a 2D drawing sheet, a 3D wireframe and each rocker plate's "
        "cut profile",
        description=(
            "Solve the design, then write <name>-sheet.dxf (for 2D CAD: side, front, top "
            "and isometric views with the swept envelope of every moving member, zones, "
            "tyres, tagged hardpoints, a hardpoint table and a title block), "
            "<name>-route.dxf (for 3D CAD: the design pose as a 3D "
            "wireframe in mm: rods, rocker axes, wishbones, tyres, zones, labelled "
            "hardpoints) and one <name>-plate-<rocker>.dxf per rocker with plate data "
            "(the flat cut profile 1:1 in mm: one closed outer polyline with true arcs "
            "and the holes as circles on cut layers; marks and notes on NOCUT_ layers; a "
            "torsion rocker gets a note instead). Files are "
            "written whole or not at all. Prints the verdict line and exits 1 when a "
            "check fails, like `plumbrod check`."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("design", help="design file (TOML); see `plumbrod new`")
    parser.add_argument(
        "--output-dir",
        metavar="DIR",
        default="exports",
        help="folder for the files (default: exports)",
    )
    parser.add_argument(
        "--dxf-version",
        choices=("R2010", "R2000"),
        default="R2010",
        help="DXF version (default R2010; R2000 for older cutting software)",
    )
    parser.add_argument(
        "--cut-only",
        action="store_true",
        help="plate files hold the cut layers only (outer profile and holes), for "
        "cutting software that cuts every line it reads",
    )
    parser.add_argument(
        "--png",
        action="store_true",
        help="also write a PNG preview of each DXF file (3D designs seen "
        "isometric, planar designs in their own view)",
    )
    parser.set_defaults(handler=run)


def export_files(
    analysis: Analysis,
    folder: str | Path,
    *,
    dxf_version: str = "R2010",
    png: bool = False,
    stem: str | None = None,
    cut_only: bool = False,
    notes: list[str] | None = None,
    report: Findings | None = None,
    into: OutputSet | None = None,
) -> list[Path]:
    """Write the DXF files of a solved design (and PNG previews when ``png``) into
    ``folder``, all together or not at all; returns the paths.  ``notes`` (when given)
    receives one line per plate not written and why; with ``report`` (the reviewed
    findings) ``<stem>-report.html`` joins the same set.  With ``into`` the files join
    that :class:`~plumbrod.outputs.atomic.OutputSet` and the caller commits it
    (``plumbrod demo`` does, with the bundled example)."""
    from plumbrod.outputs.atomic import OutputSet
    from plumbrod.outputs.dxf_export import drawing_set, dxf_bytes

    if into is None:
        with OutputSet(option="--output-dir") as own:
            export_files(
                analysis,
                folder,
                dxf_version=dxf_version,
                png=png,
                stem=stem,
                cut_only=cut_only,
                notes=notes,
                report=report,
                into=own,
            )
        return own.written
    found = drawing_set(analysis, dxf_version=dxf_version, stem=stem, cut_only=cut_only)
    drawings = found.drawings
    if notes is not None:
        notes.extend(found.notes)
    out = Path(folder)
    paths = [into.add(out / name, dxf_bytes(doc)) for name, doc in drawings.items()]
    if png:
        from plumbrod.outputs.dxf_preview import preview_png, route_view

        for name, doc in drawings.items():
            view = route_view(analysis.design) if name.endswith("-route.dxf") else "top"
            paths.append(into.add((out / name).with_suffix(".png"), preview_png(doc, view=view)))
    if report is not None:
        from plumbrod.cli.report import report_html

        sheet = next(doc for name, doc in drawings.items() if name.endswith("-sheet.dxf"))
        base = next(name for name in drawings if name.endswith("-route.dxf"))[: -len("-route.dxf")]
        html = report_html(report, notes=found.notes, sheet=sheet)
        paths.append(into.add(out / f"{base}-report.html", html))
    return paths


def run(args: argparse.Namespace) -> int:
    from plumbrod.design.loading import load_design
    from plumbrod.outputs.atomic import OutputSet, check_folder
    from plumbrod.outputs.report import verdict, verdict_line
    from plumbrod.verdict.findings import review

    check_folder(args.output_dir, option="--output-dir")
    findings = review(load_design(args.design))
    stem = Path(args.design).stem
    notes: list[str] = []
    with OutputSet(option="--output-dir", inputs=[args.design]) as out:
        export_files(
            findings.analysis,
            args.output_dir,
            dxf_version=args.dxf_version,
            png=args.png,
            stem=stem,
            cut_only=args.cut_only,
            notes=notes,
            report=findings,
            into=out,
        )
    written = out.written
    for path in written:
        sys.stdout.write(f"wrote {path}\n")
    for note in notes:
        sys.stdout.write(f"{note}\n")
    plates = sum(1 for p in written if "-plate-" in p.name and p.suffix == ".dxf")
    sys.stdout.write(
        f"units: mm; {plates} plate profile{'s' if plates != 1 else ''} (cut layers: "
        "CUT_PROFILE, CUT_HOLES). Check fits, webs and strength with a qualified engineer "
        "before cutting.\n"
    )
    sys.stdout.write(verdict_line(findings.checks) + "\n")
    return 1 if verdict(findings.checks) == "fail" else 0
