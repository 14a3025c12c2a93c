"""Benchmark: plumbrod's batched solver against solving each pose with scipy's fsolve.

Run:  python tests/benchmarks/sweep_speed.py [--repeats N]

Measures, in one run and on one core (BLAS threads pinned to 1):
  * the bundled example's 201-pose wheel-travel sweep and its 41 x 41 heave-roll grid,
    solved by plumbrod (batched Newton with analytic Jacobian, continuation);
  * a baseline that solves every pose separately with scipy.optimize.fsolve, started from
    the design pose, to the same residual tolerance (checked afterwards);
  * the clearance of the bundled example over every pose of every sweep;
  * `plumbrod check` on the bundled example, wall time including start-up.
Prints medians and ratios; the last line is ``speedup_vs_fsolve=<number>`` (201-pose
sweep, baseline median / plumbrod median).
"""

from __future__ import annotations

import os

os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("MKL_NUM_THREADS", "1")

import argparse
import statistics
import subprocess
import sys
import time
import warnings
from pathlib import Path

import numpy as np
from scipy.optimize import fsolve

from plumbrod.clearance.survey import clearance_report
from plumbrod.design.loading import parse_design
from plumbrod.design.templates import BUNDLED_EXAMPLE, read_template
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.drives import BodyDrive, TravelDrive
from plumbrod.kinematics.frames import Pose, rotation_vector_matrix
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.solver import RESIDUAL_TOL_MM, evaluate, solve_poses
from plumbrod.mechanics.analysis import analyse


def timed(fn, repeats: int) -> tuple[float, object]:
    times = []
    out = None
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), out


def fsolve_each(link: Linkage, drive: TravelDrive | BodyDrive) -> float:
    """Solve every pose alone with fsolve from the design pose; return the worst residual."""
    base = link.design_pose(1)
    nj, nf = link.n_joint, link.n_free
    worst = 0.0
    for params in drive.parameters:
        one = drive.with_parameters(params[None])

        def pose_of(q: np.ndarray) -> Pose:
            free = q[nj:].reshape(nf, 6)
            return Pose(
                q[None, :nj],
                rotation_vector_matrix(free[:, 3:6])[None],
                base.centre + free[None, :, 0:3],
            )

        def residual(q: np.ndarray, one: TravelDrive | BodyDrive = one) -> np.ndarray:
            return evaluate(link, one, pose_of(q))[1][0]

        with warnings.catch_warnings():  # "not making good progress" near the optimum
            warnings.simplefilter("ignore", RuntimeWarning)
            q = fsolve(residual, np.zeros(nj + 6 * nf), xtol=1e-12)
        worst = max(worst, float(np.abs(residual(q)).max()))
    return worst


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=15)
    args = parser.parse_args()

    design = parse_design(read_template(BUNDLED_EXAMPLE), BUNDLED_EXAMPLE)
    link = build_linkage(design)
    nc = len(link.corner_names)
    travel = np.linspace(-40.0, 40.0, 201)
    sweep = TravelDrive(np.repeat(travel[:, None], nc, axis=1))
    h, r = np.meshgrid(
        np.linspace(-25.0, 25.0, 41), np.radians(np.linspace(-1.5, 1.5, 41)), indexing="ij"
    )
    grid = BodyDrive(np.stack((h.ravel(), r.ravel(), np.zeros(h.size)), axis=1))

    solve_poses(link, sweep)  # warm caches
    t_sweep, solved = timed(lambda: solve_poses(link, sweep), args.repeats)
    t_grid, solved_grid = timed(lambda: solve_poses(link, grid), max(3, args.repeats // 3))
    res_sweep = float(solved.residual_max_mm.max())
    res_grid = float(solved_grid.residual_max_mm.max())

    analysis = analyse(design)
    clearance_report(analysis)  # warm caches
    t_clear, report = timed(lambda: clearance_report(analysis), max(3, args.repeats // 2))

    t_base_sweep, worst_sweep = timed(lambda: fsolve_each(link, sweep), 3)
    t_base_grid, worst_grid = timed(lambda: fsolve_each(link, grid), 1)

    cli = [
        sys.executable,
        "-m",
        "plumbrod",
        "check",
        str(Path(__file__).resolve().parents[2] / "examples" / BUNDLED_EXAMPLE),
    ]
    t_check, _ = timed(lambda: subprocess.run(cli, capture_output=True, check=False), 5)

    print(
        f"201-pose travel sweep: plumbrod median {t_sweep * 1e3:.2f} ms "
        f"(largest residual {res_sweep:.1e} mm, tolerance {RESIDUAL_TOL_MM:.0e} mm)"
    )
    print(
        f"201-pose travel sweep: fsolve each pose median {t_base_sweep * 1e3:.1f} ms "
        f"(largest residual {worst_sweep:.1e} mm)"
    )
    print(
        f"41 x 41 heave-roll grid: plumbrod median {t_grid * 1e3:.1f} ms "
        f"(largest residual {res_grid:.1e} mm)"
    )
    print(
        f"41 x 41 heave-roll grid: fsolve each pose {t_base_grid * 1e3:.0f} ms "
        f"(largest residual {worst_grid:.1e} mm)"
    )
    print(f"grid speedup vs fsolve: {t_base_grid / t_grid:.1f}")
    exact = sum(p.exact for p in report.pairs)
    print(
        f"clearance of the bundled example: median {t_clear * 1e3:.1f} ms for "
        f"{len(report.pairs)} pairs ({exact} measured exactly, the rest bounded as far) "
        f"over {report.poses} poses"
    )
    print(f"plumbrod check on the bundled example, wall time median: {t_check:.3f} s")
    print(f"speedup_vs_fsolve={t_base_sweep / t_sweep:.1f}")


if __name__ == "__main__":
    main()
