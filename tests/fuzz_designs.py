"""Mutated design files and one judged run of ``plumbrod check --json`` on each.

Used by ``test_fuzz.py`` (a few hundred designs, seeded, in CI) and by
``benchmarks/fuzz_many.py`` (10,000).  The seeds are the shipped examples with shorter
sweeps (fewer poses, same code paths) so that a run takes a fraction of a second; each
mutation edits the TOML text: a number replaced by an awkward one (zero, negative, huge,
tiny, NaN, infinity, a 400-digit integer, a unit slip), a line deleted or doubled, a
name swapped for another, an array shortened, the text cut short or a byte inserted.

A run is judged by the command-line contract (README, RULES): exit 0, 1 or 2; exit 2 is
exactly one line on stderr and no JSON; no traceback (an exception escaping ``main``);
no NaN or Infinity in the JSON; exit 0 or 1 agrees with the JSON verdict (exit 1 with
no JSON only for a linkage that does not assemble, one "fail" line).
"""

from __future__ import annotations

import contextlib
import io
import json
import random
import re
import tempfile
import traceback
import warnings
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = tuple(sorted((ROOT / "examples").glob("*.toml")))

NASTY = (
    "0",
    "0.0",
    "-0.0",
    "-1",
    "-1e3",
    "1e-300",
    "1e308",
    "-1e308",
    "1e200",
    "1e300",
    "1e154",
    "1e30",
    "1e9",
    "2147483648",
    "9223372036854775807",
    "1" + "0" * 400,
    "nan",
    "inf",
    "-inf",
    "0.22",
    "3",
    "1e-9",
    '"12"',
    "true",
    "[]",
)
"""Replacement values for a number (TOML literals)."""

PAST_RANGES = frozenset(
    ("1e308", "-1e308", "1e200", "1e300", "1e154", "9223372036854775807", "1" + "0" * 400)
)
"""Values that only the design file's numeric ranges (issue 13 §1, the schema table)
turn into one-line errors; the CI fuzz test leaves them out until those ranges are on
main, the 10,000-design run keeps them."""

CI_POOL = tuple(v for v in NASTY if v not in PAST_RANGES)

_NUMBER = re.compile(r"(?<![\w.\"'-])-?\d+(?:\.\d+)?(?:[eE][-+]?\d+)?(?![\w.\"'])")
_STRING = re.compile(r'"[^"\n]*"')

_TABLE_BODY = r"(?:(?!\n\[).)*?"  # within one table: up to the next header


def _steps(table: str, value: str) -> tuple[re.Pattern[str], str]:
    pattern = rf"(\[sweeps\.{table}\]{_TABLE_BODY}\bsteps\s*=\s*)(\[[^\]]*\]|\d+)"
    return re.compile(pattern, re.S), rf"\g<1>{value}"


_SHORT_SWEEPS = (
    _steps("travel", "11"),
    _steps("heave", "7"),
    _steps("roll", "7"),
    _steps("pitch", "7"),
    _steps("heave_roll", "[3, 3]"),
)


def seed_texts() -> list[str]:
    """The examples with shorter sweeps (the fuzz seeds)."""
    out = []
    for path in EXAMPLES:
        text = path.read_text(encoding="utf-8")
        for pattern, repl in _SHORT_SWEEPS:
            text = pattern.sub(repl, text, count=1)
        out.append(text)
    return out


def _numbers(text: str) -> list[tuple[int, int]]:
    """(start, end) of the number literals in values (outside comments and strings)."""
    found = []
    offset = 0
    for line in text.splitlines(keepends=True):
        code = line.split("#", 1)[0]
        start = code.index("=") + 1 if "=" in code else 0
        if not code.lstrip().startswith("["):  # not a table header
            for m in _NUMBER.finditer(code, start):
                if code[: m.start()].count('"') % 2 == 0:
                    found.append((offset + m.start(), offset + m.end()))
        offset += len(line)
    return found


def mutate(text: str, rng: random.Random, pool: tuple[str, ...] = NASTY) -> str:
    """One to three random edits of a design text (numbers drawn from ``pool``)."""
    for _ in range(rng.choice((1, 1, 2, 3))):
        text = _one_edit(text, rng, pool)
    return text


def _one_edit(text: str, rng: random.Random, pool: tuple[str, ...]) -> str:
    kind = rng.choices(
        ("number", "scale", "delete", "double", "name", "array", "cut", "byte"),
        weights=(10, 6, 3, 1, 2, 2, 1, 1),
    )[0]
    numbers = _numbers(text)
    lines = text.splitlines(keepends=True)
    if kind in ("number", "scale") and numbers:
        start, end = rng.choice(numbers)
        if kind == "number":
            new = rng.choice(pool)
        else:
            factor = rng.choice((-1.0, 0.001, 0.1, 0.5, 0.99, 1.01, 2.0, 10.0, 1000.0))
            new = repr(float(text[start:end]) * factor)
        return text[:start] + new + text[end:]
    if kind == "delete" and lines:
        i = rng.randrange(len(lines))
        return "".join(lines[:i] + lines[i + 1 :])
    if kind == "double" and lines:
        i = rng.randrange(len(lines))
        return "".join([*lines[: i + 1], lines[i], *lines[i + 1 :]])
    if kind == "name":
        strings = list(_STRING.finditer(text))
        if len(strings) >= 2:
            a, b = rng.sample(strings, 2)
            return text[: a.start()] + b.group() + text[a.end() :]
    if kind == "array":
        arrays = list(re.finditer(r"\[([^\[\]\n]*,[^\[\]\n]*)\]", text))
        if arrays:
            m = rng.choice(arrays)
            items = m.group(1).split(",")
            items = items[:-1] if rng.random() < 0.7 else [*items, items[-1]]
            return text[: m.start()] + "[" + ",".join(items) + "]" + text[m.end() :]
    if kind == "cut" and text:
        return text[: rng.randrange(len(text))]
    if kind == "byte" and text:
        i = rng.randrange(len(text))
        return text[:i] + rng.choice(("\x00", "\ufeff", "]", "=", '"', "\n[x]\n", "é")) + text[i:]
    return text


@dataclass
class Outcome:
    """What one run did, and which rule it broke (``problem``, "" when none)."""

    code: int | None
    stdout: str
    stderr: str
    problem: str = ""
    detail: str = ""


def _no_constant(name: str) -> float:
    raise ValueError(f"JSON holds {name}")


def run_check(text: str, folder: Path | None = None) -> Outcome:
    """Write ``text`` to a file and run ``plumbrod check FILE --json`` in this process."""
    from plumbrod.cli.main import main

    with contextlib.ExitStack() as stack:
        if folder is None:
            folder = Path(stack.enter_context(tempfile.TemporaryDirectory()))
        path = folder / "fuzz.toml"
        path.write_bytes(text.encode("utf-8", "surrogatepass"))
        out, err = io.StringIO(), io.StringIO()
        try:
            with (
                contextlib.redirect_stdout(out),
                contextlib.redirect_stderr(err),
                warnings.catch_warnings(),
            ):
                warnings.simplefilter("always")
                code: int | None = main(["check", str(path), "--json"])
        except SystemExit as exc:  # argparse
            code = exc.code if isinstance(exc.code, int) else 2
        except BaseException as exc:  # a traceback is what we count
            if isinstance(exc, KeyboardInterrupt):
                raise
            return Outcome(
                None, out.getvalue(), err.getvalue(), "traceback", traceback.format_exc()
            )
        return judge(code, out.getvalue(), err.getvalue())


def judge(code: int | None, stdout: str, stderr: str) -> Outcome:
    """Apply the command-line contract to one finished run."""
    o = Outcome(code, stdout, stderr)
    lines = stderr.strip().splitlines()
    if code not in (0, 1, 2):
        o.problem, o.detail = "bad exit", f"exit {code}"
        return o
    if "Traceback" in stderr or "Warning" in stderr:
        o.problem, o.detail = "traceback", stderr[-2000:]
        return o
    if code == 2:
        if len(lines) != 1 or stdout:
            o.problem, o.detail = "bad exit", f"exit 2 with {len(lines)} lines: {stderr[:500]}"
        return o
    if not stdout:
        if code == 1 and len(lines) == 1 and lines[0].startswith("plumbrod: fail ("):
            return o
        o.problem, o.detail = "bad exit", f"exit {code} without JSON: {stderr[:500]}"
        return o
    try:
        doc = json.loads(stdout, parse_constant=_no_constant)
    except ValueError as exc:
        o.problem, o.detail = ("nan" if "holds" in str(exc) else "bad json"), str(exc)
        return o
    verdict = doc.get("verdict")
    if (code == 1) != (verdict == "fail") or verdict not in ("pass", "warn", "fail"):
        o.problem, o.detail = "bad exit", f"exit {code} with verdict {verdict!r}"
    return o
