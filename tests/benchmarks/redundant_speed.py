"""Benchmark: a redundant sweep (elastic solution) against the same design's rigid sweep.

Run:  python tests/benchmarks/redundant_speed.py [--repeats N]

The redundant design is examples/prototype_undertray_four_hangers.toml (invented): a
floor on four hangers, one more than it needs.  Its sweeps are solved elastically
(kinematics/elastic.py).  The baseline, measured in the same run on one core: the same
design with its removable rod taken out (the exactly located floor on three hangers
that the mobility analysis names), solved by the rigid solver over the same poses.
Prints each sweep's medians and the ratio; the target (DESIGN §5 of issue 10) is a
ratio of at most 3.  The last line is ``redundant_vs_rigid=<worst ratio>``.
"""

from __future__ import annotations

import os

os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("MKL_NUM_THREADS", "1")

import argparse
import statistics
import time
from dataclasses import replace
from pathlib import Path

import numpy as np

from plumbrod.design.loading import parse_design
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.drives import BodyDrive
from plumbrod.kinematics.elastic import elastic_setup
from plumbrod.kinematics.sweeps import SweepSpec, run_sweep, sweep_specs
from plumbrod.mechanics.members import resolve_members
from plumbrod.mechanics.redundancy import rod_stiffness

ROOT = Path(__file__).resolve().parents[2]
DESIGN = ROOT / "examples" / "prototype_undertray_four_hangers.toml"


def timed(fn, repeats: int) -> float:  # type: ignore[no-untyped-def]
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    args = parser.parse_args()

    text = DESIGN.read_text()
    design = parse_design(text, str(DESIGN))
    link = build_linkage(design)
    springs = elastic_setup(link, rod_stiffness(link, resolve_members(design)))
    assert springs is not None, "the four-hanger floor should be redundant"
    removed = springs.removed_names(link)
    # the exactly located baseline: the same design without the removable rod
    exact = replace(design, rods=tuple(r for r in design.rods if r.name != removed[0]))
    exact_link = build_linkage(exact)
    assert elastic_setup(exact_link, rod_stiffness(exact_link, resolve_members(exact))) is None
    specs = {s.name: s for s in sweep_specs(link, design.sweeps)}
    grid = np.stack(np.meshgrid(np.linspace(-25, 25, 21), np.radians(np.linspace(-2, 2, 21))), -1)
    params = np.zeros((grid[..., 0].size, 3))
    params[:, 0], params[:, 1] = grid[..., 0].ravel(), grid[..., 1].ravel()
    specs["heave_roll"] = SweepSpec("heave_roll", BodyDrive(params, (-1350.0, 0.0, 0.0)), {})
    print(f"design: {DESIGN.name}; springs {', '.join(springs.names(link))}")
    print(f"baseline: the same floor without rod '{removed[0]}' (exactly located), rigid solver")
    print(f"{'sweep':<12}{'poses':>7}{'rigid s':>11}{'elastic s':>11}{'ratio':>8}")
    worst = 0.0
    total_r = total_e = 0.0
    for name, spec in specs.items():
        rigid = timed(lambda spec=spec: run_sweep(exact_link, spec), args.repeats)
        elastic = timed(lambda spec=spec: run_sweep(link, spec, springs), args.repeats)
        ratio = elastic / rigid
        worst = max(worst, ratio)
        total_r += rigid
        total_e += elastic
        print(f"{name:<12}{spec.size:>7}{rigid:>11.4f}{elastic:>11.4f}{ratio:>8.2f}")
    print(f"{'all':<12}{'':>7}{total_r:>11.4f}{total_e:>11.4f}{total_e / total_r:>8.2f}")
    print(f"redundant_vs_rigid={worst:.2f}")


if __name__ == "__main__":
    main()
