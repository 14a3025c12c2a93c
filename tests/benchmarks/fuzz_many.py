"""Fuzz ``plumbrod check --json`` with many mutated designs and print the counts.

    python tests/benchmarks/fuzz_many.py                 # 10,000 designs, seed 2026
    python tests/benchmarks/fuzz_many.py -n 500 --seed 1 --workers 2

Each design is a shipped example (shorter sweeps) with one to three random edits (see
``tests/fuzz_designs.py``), run in-process in a pool of worker processes.  Counted:
exit codes, tracebacks (an exception escaping ``main``, or a Python warning or traceback
on stderr), NaN/Infinity in the JSON, bad exits (exit 2 not one line, exit code against
the JSON verdict), and runs over the time limit.  The most frequent failure signatures
are listed so they can be fixed; ``--show N`` prints N failing designs in full.
"""

from __future__ import annotations

import argparse
import collections
import multiprocessing
import random
import resource
import signal
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import fuzz_designs

TIME_LIMIT_S = 120
MEMORY_LIMIT_B = 3 * 1024**3


class _Timeout(Exception):
    pass


def _alarm(signum: int, frame: object) -> None:
    raise _Timeout


def _init() -> None:
    signal.signal(signal.SIGALRM, _alarm)
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT_B, MEMORY_LIMIT_B))


def _signature(detail: str) -> str:
    lines = [line for line in detail.strip().splitlines() if line.strip()]
    where = next((line.strip() for line in reversed(lines) if line.strip().startswith("File")), "")
    return f"{lines[-1][:120] if lines else '?'} @ {where[-110:]}"


def _one(job: tuple[int, str]) -> tuple[int, int | None, str, str, str]:
    index, text = job
    folder = Path(tempfile.mkdtemp(prefix="plumbrod-fuzz-"))
    signal.alarm(TIME_LIMIT_S)
    try:
        outcome = fuzz_designs.run_check(text, folder)
        code, problem, detail = outcome.code, outcome.problem, outcome.detail
    except _Timeout:
        code, problem, detail = None, "timeout", f"over {TIME_LIMIT_S} s"
    finally:
        signal.alarm(0)
        for f in folder.iterdir():
            f.unlink()
        folder.rmdir()
    return index, code, problem, detail, text if problem else ""


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("-n", type=int, default=10_000, help="designs to run (default 10000)")
    parser.add_argument("--seed", type=int, default=2026)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--show", type=int, default=0, help="print this many failing designs")
    args = parser.parse_args()

    rng = random.Random(args.seed)
    seeds = fuzz_designs.seed_texts()
    jobs = [(i, fuzz_designs.mutate(rng.choice(seeds), rng)) for i in range(args.n)]
    codes: collections.Counter[str] = collections.Counter()
    problems: collections.Counter[str] = collections.Counter()
    signatures: collections.Counter[str] = collections.Counter()
    failing: list[tuple[int, str, str, str]] = []
    start = time.perf_counter()
    with multiprocessing.Pool(args.workers, initializer=_init, maxtasksperchild=200) as pool:
        for done, (index, code, problem, detail, text) in enumerate(
            pool.imap_unordered(_one, jobs, chunksize=4), 1
        ):
            codes[str(code)] += 1
            if problem:
                problems[problem] += 1
                signatures[f"{problem}: {_signature(detail)}"] += 1
                failing.append((index, problem, detail, text))
            if done % 500 == 0:
                print(f"  {done} done, {time.perf_counter() - start:.0f} s", flush=True)
    elapsed = time.perf_counter() - start
    print(f"fuzz_many: {args.n} designs, seed {args.seed}, {elapsed:.0f} s")
    print("exit codes: " + ", ".join(f"{k}: {v}" for k, v in sorted(codes.items())))
    for name in ("traceback", "nan", "bad exit", "bad json", "timeout"):
        print(f"{name}: {problems.get(name, 0)}")
    for sig, count in signatures.most_common(25):
        print(f"  {count:5d}  {sig}")
    for index, problem, detail, text in failing[: args.show]:
        print(f"\n===== design {index}: {problem}\n{detail[-3000:]}\n----- design text\n{text}")
    return 0 if not problems else 1


if __name__ == "__main__":
    sys.exit(main())
