"""``plumbrod tune DESIGN.toml``: move the hardpoints the ``[tune]`` table frees until
the design meets its targets, and write the tuned copy."""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from plumbrod.outputs.cautions import CAUTION

__all__ = ["register", "run"]


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "tune",
        help="search the free hardpoints of the [tune] table for a design that meets the targets",
        description=(
            "Move the points the design file's [tune] table frees, within their bounds, "
            "to meet every target (route ratio, line of action, transmission angles, "
            "ride-height sensitivity, buckling and tension reserves, the avoidable "
            "spring-load share; each defaults to its check's limit) while holding the route "
            "ratio flat and keeping the weighted objectives (rod mass, avoidable spring-load "
            "share) low: a global search (differential "
            "evolution) then a local polish (SLSQP). The best candidates are checked in "
            "full (clearance included); the best that passes is written to a new design "
            "file (the input is never overwritten; comments kept) with a before/after "
            "table. Ctrl-C stops the search and keeps the best design so far. Exit 0 when "
            "the tuned design passes every check, 1 when none of the candidates does (the "
            "best is still written), 2 on bad input, 130 when interrupted."
        ),
        epilog=CAUTION,
    )
    parser.add_argument("design", help="design file (TOML) with a [tune] table")
    parser.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="where to write the tuned design (default: <design>-tuned.toml next to the input)",
    )
    parser.add_argument(
        "--seed", type=int, metavar="N", help="random seed (default: [tune] seed, else 0)"
    )
    parser.add_argument(
        "--generations", type=int, metavar="N", help="search generations (default: [tune])"
    )
    parser.add_argument(
        "--progress",
        action="store_true",
        help="print a progress line per generation even when not on a terminal",
    )
    parser.set_defaults(handler=run)


def _free_name(path: Path) -> Path:
    candidate = path.with_name(f"{path.stem}-tuned{path.suffix}")
    n = 2
    while candidate.exists():
        candidate = path.with_name(f"{path.stem}-tuned-{n}{path.suffix}")
        n += 1
    return candidate


def _progress_printer(live: bool, plain: bool) -> Any:
    from plumbrod.revise.tuning import Progress

    def show(p: Progress) -> None:
        state = "feasible" if p.worst_violation <= 0 else f"violation {p.worst_violation:.3g}"
        line = (
            f"{p.stage} {p.generation}/{p.generations}  best {p.best_objective:.6g} ({state})"
            f"  {p.candidates_per_s:,.0f} candidates/s  {p.seconds_left:.0f} s left"
        )
        if live:
            sys.stderr.write("\r" + line.ljust(100)[:100])
        else:
            sys.stderr.write(line + "\n")
        sys.stderr.flush()

    return show if (live or plain) else None


def run(args: argparse.Namespace) -> int:
    import tomllib

    from plumbrod.design.loading import load_design
    from plumbrod.design.tune_spec import read_tune
    from plumbrod.errors import UsageError
    from plumbrod.kinematics.build import build_linkage
    from plumbrod.outputs.atomic import write_atomic
    from plumbrod.revise.tuning import finalise, tune
    from plumbrod.verdict.findings import review

    source = Path(args.design)
    design = load_design(source)
    text = source.read_text(encoding="utf-8")
    spec = read_tune(design, tomllib.loads(text), build_linkage(design).point_names)
    if args.generations is not None and args.generations < 1:
        raise UsageError("--generations", f"expected 1 or more, got {args.generations}", "")
    if args.seed is not None and args.seed < 0:
        raise UsageError("--seed", f"expected 0 or more, got {args.seed}", "")
    target = Path(args.output) if args.output else _free_name(source)
    if target.resolve() == source.resolve():
        raise UsageError("--output", "would overwrite the input design", "give another file name")
    before = review(design)
    live = sys.stderr.isatty()
    result = tune(
        design,
        spec,
        seed=args.seed if args.seed is not None else (spec.seed or 0),
        generations=args.generations,
        report=_progress_printer(live, args.progress),
    )
    if live:
        sys.stderr.write("\n")
    try:
        final = finalise(text, design, spec, result, str(target))
    except ValueError as exc:
        raise UsageError(args.design, str(exc), "write each point as a key = [..] line") from None
    x, new_text, after = final.x, final.text, final.findings
    write_atomic(target, new_text)
    _table(spec, x, before, after)
    print(
        f"search: {result.generations} generations, {result.evaluations:,} candidates screened "
        f"in {result.seconds:.1f} s ({result.candidates_per_s:,.0f}/s)"
        + (", interrupted: best so far kept" if result.interrupted else "")
    )
    print(f"wrote {target}")
    failing = [c.id for c in after.checks if c.status == "fail"]
    if failing:
        print("the tuned design still fails: " + ", ".join(failing) + " (see plumbrod check)")
    elif not final.passed:
        print(f"the tuned design's clearance is below the target {spec.targets.clearance_mm:g} mm")
    print(CAUTION)
    if result.interrupted:
        return 130
    return 0 if final.passed else 1


def _table(spec: Any, x: Any, before: Any, after: Any) -> None:
    rows: list[tuple[str, ...]] = [("variable", "from", "to", "bounds")]
    for var, value in zip(spec.variables, x, strict=True):
        rows.append((var.name, "0", f"{value:+.3f} mm", f"[{var.low:g}, {var.high:g}]"))
    _print(rows)
    print()
    rows = [("check", "before", "", "after", "", "limit")]
    for b, a in zip(before.checks, after.checks, strict=True):
        rows.append((b.id, b.status, _value(b), a.status, _value(a), _limit(a)))
    for name, span_b, span_a in _ratio_spans(before, after):
        rows.append((f"route ratio {name}", "", span_b, "", span_a, "min to max"))
    rows.append(
        (
            "mass (rods, rockers, elements)",
            "",
            f"{before.mass.total_kg:.3f} kg",
            "",
            f"{after.mass.total_kg:.3f} kg",
            "",
        )
    )
    _print(rows)


def _ratio_spans(before: Any, after: Any) -> list[tuple[str, str, str]]:
    def spans(findings: Any) -> dict[str, str]:
        travel = findings.analysis.figures.get("travel")
        if travel is None:
            return {}
        return {k: f"{v.min():.4f} to {v.max():.4f}" for k, v in travel.route_ratio.items()}

    b, a = spans(before), spans(after)
    return [(name, b[name], a.get(name, "-")) for name in b]


def _value(check: Any) -> str:
    return "-" if check.value is None else f"{check.value:.4g} {check.unit}".strip()


def _limit(check: Any) -> str:
    if check.limit is None:
        return "-"
    if isinstance(check.limit, tuple):
        return f"{check.limit[0]:g} to {check.limit[1]:g}"
    return (">= " if check.at_least else "<= ") + f"{check.limit:g}"


def _print(rows: Sequence[tuple[str, ...]]) -> None:
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    for r in rows:
        print("  ".join(r[i].ljust(widths[i]) for i in range(len(r))).rstrip())
