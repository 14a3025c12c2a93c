"""The one-file review report: ``<design>-report.html``.

One self-contained HTML file (no script, no external file, no web font) that a teammate
or a scrutineer opens offline: the job in a sentence, the verdict table with worst
poses, what the springs see, the member and mass tables, every figure inline as SVG,
a preview of the drawing sheet (PNG inline), the cautions, the design file's SHA-256,
the tool version and the date.  One column; printing puts each section on a new page.
"""

from __future__ import annotations

import base64
import html
from pathlib import Path

from plumbrod import __version__
from plumbrod.outputs.cautions import CAUTION
from plumbrod.outputs.report import mass_rows, member_rows, verdict, verdict_line
from plumbrod.verdict.checks import CheckResult
from plumbrod.verdict.findings import Findings

__all__ = ["html_report"]

_STYLE = """
body { font-family: "DejaVu Sans", Arial, Helvetica, sans-serif; color: #111;
       background: #fff; max-width: 60rem; margin: 1.5rem auto; padding: 0 1rem;
       line-height: 1.4; }
h1 { font-size: 1.6rem; margin-bottom: 0.2rem; }
h2 { font-size: 1.25rem; border-bottom: 2px solid #444; padding-bottom: 0.2rem;
     margin-top: 2rem; }
table { border-collapse: collapse; width: 100%; font-size: 0.85rem; margin: 0.6rem 0; }
th, td { border: 1px solid #bbb; padding: 0.25rem 0.4rem; text-align: left;
         vertical-align: top; }
th { background: #eee; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
.pass { color: #1b5e20; font-weight: bold; }
.warn { color: #8a4b00; font-weight: bold; }
.fail { color: #b71c1c; font-weight: bold; }
.verdict { font-size: 1.2rem; padding: 0.5rem 0.8rem; border: 2px solid; display: inline-block; }
.caution { border-left: 6px solid #b71c1c; background: #fff4f4; padding: 0.6rem 0.9rem; }
figure { margin: 1rem 0; page-break-inside: avoid; break-inside: avoid; }
figure svg, figure img { width: 100%; height: auto; }
figcaption { font-size: 0.85rem; color: #333; }
.meta { font-size: 0.85rem; color: #333; }
@media print {
  body { max-width: none; margin: 0; }
  section { break-before: page; page-break-before: always; }
  section:first-of-type { break-before: auto; page-break-before: auto; }
}
"""

_FIGURE_CAPTIONS = {
    "route-ratio": "Route ratio: vertical motion of the element's pickup per unit wheel "
    "travel (1 = the element follows the wheel), with its allowed band.",
    "ride-height": "Ride-height sensitivity to body heave, roll and pitch, the routed "
    "element beside the same element bolted to the chassis.",
    "line-of-action": "Angle from vertical of the rods that take and deliver the load, "
    "over every sweep; the circle marks the largest angle.",
    "transmission": "Transmission angles at rod ends on rockers and wishbones; near 0° "
    "or 180° a rod locks its rocker.",
    "reserves": "Reserve factor of every rod through the travel for each load case, "
    "with the required reserves.",
    "clearance": "Least distance of the closest pairs through the travel, with their "
    "limits (negative = interference).",
    "spring-share": "Spring-load change of each axle as a share of the element's load "
    "through the travel: routed beside bolted, with the floor that statics forces on any "
    "route landing on the same axles.",
}


def _e(text: object) -> str:
    return html.escape(str(text), quote=True)


def _table(rows: list[tuple[str, ...]], numeric_from: int = 1) -> str:
    head = "".join(f"<th>{_e(c)}</th>" for c in rows[0])
    body = []
    for row in rows[1:]:
        cells = "".join(
            f'<td class="num">{_e(c)}</td>'
            if i >= numeric_from and c[:1] in "+-0123456789"
            else f"<td>{_e(c)}</td>"
            for i, c in enumerate(row)
        )
        body.append(f"<tr>{cells}</tr>")
    return f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody></table>"


def _value(check: CheckResult) -> str:
    if check.value is None:
        return "-"
    unit = f" {check.unit}" if check.unit and check.unit != "mm/mm" else ""
    return f"{check.value:.4g}{unit}"


def _limit(check: CheckResult) -> str:
    if check.limit is None:
        return "-"
    if isinstance(check.limit, tuple):
        return f"{check.limit[0]:g} to {check.limit[1]:g}"
    return f"{'≥' if check.at_least else '≤'} {check.limit:g}"


def _job_sentence(findings: Findings) -> str:
    d = findings.analysis.design
    elements = ", ".join(e.name for e in d.elements) or "no element"
    corners = ", ".join(c.name for c in d.corners)
    rockers = f" and {len(d.rockers)} rocker{'s' if len(d.rockers) != 1 else ''}"
    return (
        f"This design routes the load of {elements} to the uprights of {corners} through "
        f"{len(d.rods)} rod{'s' if len(d.rods) != 1 else ''}"
        f"{rockers if d.rockers else ''}, so that the load bypasses the springs."
    )


def _spring_sentence(findings: Findings) -> str:
    leak = next((c for c in findings.checks if c.id == "sprung-leakage"), None)
    if leak is None or leak.value is None:
        return (
            "No load case: what the springs carry is not computed (give [design] "
            "top_speed_kmh with element aero data, or [load_cases])."
        )
    return (
        f"At worst {leak.value:.1%} of an element's vertical load reaches the chassis, and "
        f"so the springs, instead of the uprights ({leak.where}); limit "
        f"{_limit(leak)}. {leak.detail}."
    )


def _svg_inline(svg: bytes) -> str:
    text = svg.decode("utf-8")
    return text[text.index("<svg") :]


def html_report(
    findings: Findings,
    *,
    figures_svg: dict[str, bytes],
    sheet_png: bytes | None,
    sha256: str,
    date: str,
    notes: tuple[str, ...] = (),
) -> str:
    """The report as HTML text.  ``figures_svg``: figure name -> SVG bytes (in order);
    ``sheet_png``: a preview of the drawing sheet or None; ``sha256``: the design
    file's hash ("" when there is none); ``notes``: extra lines (plates not drawn)."""
    analysis, checks = findings.analysis, findings.checks
    d = analysis.design
    v = verdict(checks)
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{_e(d.name)}: plumbrod review</title>",
        f"<style>{_STYLE}</style></head><body>",
        "<header>",
        f"<h1>{_e(d.name)}</h1>",
        f"<p>{_e(_job_sentence(findings))}</p>",
        f'<p class="verdict {v}">{_e(verdict_line(checks))}</p>',
        f'<p class="meta">design file {_e(Path(d.source).name)}; SHA-256 '
        f"<code>{_e(sha256 or 'not from a file')}</code>; plumbrod {_e(__version__)}; "
        f"{_e(date)}; units mm, N, kg, deg; axes ISO 8855 (x forward, y left, z up)</p>",
        f'<p class="caution">{_e(CAUTION)}</p>',
        "</header>",
        '<section id="checks"><h2>Checks</h2>',
        "<table><thead><tr><th>check</th><th>status</th><th>value</th><th>limit</th>"
        "<th>worst at</th></tr></thead><tbody>",
    ]
    for c in checks:
        parts.append(
            f'<tr id="check-{_e(c.id)}"><td><b>{_e(c.id)}</b><br>{_e(c.title)}</td>'
            f'<td class="{c.status}">{c.status.upper()}</td><td class="num">'
            f"{_e(_value(c))}</td><td>{_e(_limit(c))}</td><td>{_e(c.where)}"
            + (f"<br><small>{_e(c.detail)}</small>" if c.detail else "")
            + "</td></tr>"
        )
    parts += [
        "</tbody></table>",
        "<h3>What the springs carry</h3>",
        f"<p>{_e(_spring_sentence(findings))}</p>",
        "</section>",
    ]
    parts.append('<section id="members"><h2>Members and masses</h2>')
    if findings.reserves and analysis.statics:
        parts.append("<p>Rods, worst over every sweep and load case (force + tension).</p>")
        parts.append(_table(member_rows(findings), numeric_from=3))
    else:
        parts.append("<p>No load case: member forces and reserves are not computed.</p>")
    parts.append(
        f"<p>Route mass {findings.mass.total_kg:.2f} kg; added unsprung mass per corner:</p>"
    )
    parts.append(_table(mass_rows(findings)))
    parts.append("</section>")
    parts.append('<section id="figures"><h2>Figures</h2>')
    for name, svg in figures_svg.items():
        parts.append(
            f'<figure id="figure-{_e(name)}">{_svg_inline(svg)}'
            f"<figcaption>{_e(_FIGURE_CAPTIONS.get(name, name))}</figcaption></figure>"
        )
    parts.append("</section>")
    parts.append('<section id="sheet"><h2>Drawing sheet</h2>')
    if sheet_png is not None:
        data = base64.b64encode(sheet_png).decode("ascii")
        parts.append(
            f'<figure><img alt="drawing sheet of {_e(d.name)}" '
            f'src="data:image/png;base64,{data}"><figcaption>Preview of the drawing sheet '
            "(the DXF file <code>-sheet.dxf</code> is the drawing): views at the design "
            "pose with the swept envelope of every moving member, zones, tyres, tagged "
            "hardpoints and their table.</figcaption></figure>"
        )
    for note in notes:
        parts.append(f"<p>{_e(note)}</p>")
    parts += [
        "<p>Which file is for whom: <code>-sheet.dxf</code> for 2D CAD (bodywork layout, "
        "keep-out of the swept envelopes); <code>-route.dxf</code> for 3D CAD (the "
        "wireframe at the design pose); <code>-plate-*.dxf</code> for the laser or "
        "waterjet (cut layers only with <code>--cut-only</code>); this report for the "
        "review.</p>",
        "</section>",
        '<section id="cautions"><h2>Cautions</h2>',
        f'<p class="caution">{_e(CAUTION)}</p>',
        "<p>The drawings are layout geometry: fits, bearings, edge distances and the "
        "parts' strength need a qualified engineer's check and physical proof-load "
        "testing; the series' technical regulations decide whether the device is allowed "
        "at all.</p>",
        "</section>",
        "</body></html>",
    ]
    return "\n".join(parts) + "\n"
