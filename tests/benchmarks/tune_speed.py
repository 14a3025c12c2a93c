"""Benchmark: screening candidate designs for `plumbrod tune`, batched against one by one.

Run:  python tests/benchmarks/tune_speed.py [--batch N] [--single N] [--repeats N]

On the tune example (examples/tune_splitter.toml), a candidate is one setting of the
[tune] variables screened as the search screens it: the coarse travel sweep (33 poses)
and heave sweep (9 poses) solved, and every figure the targets need (route ratio, line
of action, transmission angles, heave sensitivity, statics for the reserves and the
leakage, rod mass).  Measured in one run, on one core (BLAS threads pinned to 1):

  * batched: ``Screening`` on N candidates at once (designs x poses batch, the
    suspension solved once per pose, the route block per candidate in closed form,
    :mod:`plumbrod.kinematics.route_block`);
  * one generation: the same on the batch the search really screens per generation of
    the tune example (population x variables candidates);
  * one by one: the same ``Screening`` called with one candidate at a time;
  * the existing API one by one (the baseline): per candidate, ``solve_poses`` of the
    same two coarse sweeps, ``sweep_figures`` and ``solve_statics`` (at every pose of
    the two sweeps, where the screening takes three per sweep).

Times are CPU time of this process (``time.process_time``), so a busy machine does not
inflate them; wall times are printed beside.  The last line is
``tune_candidates_per_s=<number>`` (batched, CPU time); ``generation_candidates_per_s``
is the rate at the search's own batch size.
"""

from __future__ import annotations

import os

os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("MKL_NUM_THREADS", "1")

import argparse
import statistics
import time
import tomllib
from pathlib import Path

import numpy as np

from plumbrod.design.loading import load_design
from plumbrod.design.tune_spec import read_tune
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.figures import sweep_figures
from plumbrod.kinematics.sweeps import run_sweep
from plumbrod.mechanics.statics import solve_statics
from plumbrod.revise.candidates import Screening

EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "tune_splitter.toml"


def measure(fn, repeats: int) -> tuple[float, float]:
    """Median CPU and wall seconds of ``fn``."""
    cpu, wall = [], []
    for _ in range(repeats):
        c0, w0 = time.process_time(), time.perf_counter()
        fn()
        cpu.append(time.process_time() - c0)
        wall.append(time.perf_counter() - w0)
    return statistics.median(cpu), statistics.median(wall)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--batch", type=int, default=512, help="candidates in the batch")
    parser.add_argument("--single", type=int, default=40, help="candidates one by one")
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()

    design = load_design(EXAMPLE)
    spec = read_tune(design, tomllib.loads(EXAMPLE.read_text()), build_linkage(design).point_names)
    screening = Screening(design, spec)
    bounds = np.array(spec.bounds)
    rng = np.random.default_rng(1)
    x = rng.uniform(bounds[:, 0], bounds[:, 1], size=(args.batch, bounds.shape[0]))
    screening(x[:8])  # warm caches

    cpu_b, wall_b = measure(lambda: screening(x), args.repeats)
    gen = spec.population * len(spec.variables)
    gen_calls = max(1, args.batch // gen)
    cpu_g, wall_g = measure(lambda: [screening(x[:gen]) for _ in range(gen_calls)], args.repeats)
    single = x[: args.single]
    cpu_1, wall_1 = measure(lambda: [screening(row[None]) for row in single], args.repeats)

    def existing_api() -> None:
        pts = screening.points(single)
        for one in pts:
            link = screening.link.with_points(one[None])
            for spec_ in (screening.travel, screening.heave):
                if spec_ is None:
                    continue
                result = run_sweep(link, spec_)
                sweep_figures(link, screening.routes, result)
                if screening.loads is not None:
                    solve_statics(
                        link, screening.routes, screening.members, screening.loads, result
                    )

    cpu_api, wall_api = measure(existing_api, args.repeats)
    batched = screening(x)
    ones = np.vstack([screening(row[None]).constraints for row in single])
    agree = float(np.abs(batched.constraints[: args.single] - ones).max())

    rate_b, rate_1 = args.batch / cpu_b, args.single / cpu_1
    rate_g = gen * gen_calls / cpu_g
    rate_api = args.single / cpu_api
    print(
        f"tune example: {len(spec.variables)} variables, screening "
        f"{screening.travel.size} travel + {screening.heave.size if screening.heave else 0} "
        "heave poses per candidate"
    )
    print(
        f"batched, {args.batch} candidates: {cpu_b:.3f} s CPU ({wall_b:.3f} s wall), "
        f"{rate_b:,.0f} candidates/s"
    )
    print(
        f"one generation ({gen} candidates) x {gen_calls}: {cpu_g:.3f} s CPU "
        f"({wall_g:.3f} s wall), {rate_g:,.0f} candidates/s"
    )
    print(
        f"one by one, {args.single} candidates: {cpu_1:.3f} s CPU ({wall_1:.3f} s wall), "
        f"{rate_1:,.0f} candidates/s"
    )
    print(
        f"existing API one by one, {args.single} candidates: {cpu_api:.3f} s CPU "
        f"({wall_api:.3f} s wall), {rate_api:,.0f} candidates/s"
    )
    print(f"largest difference of a constraint, batched vs one by one: {agree:.1e}")
    print(f"speedup_vs_one_by_one={rate_b / rate_1:.1f}")
    print(f"speedup_vs_existing_api={rate_b / rate_api:.1f}")
    print(f"generation_candidates_per_s={rate_g:.0f}")
    print(f"existing_api_candidates_per_s={rate_api:.0f}")
    print(f"one_by_one_candidates_per_s={rate_1:.0f}")
    print(f"tune_candidates_per_s={rate_b:.0f}")


if __name__ == "__main__":
    main()
