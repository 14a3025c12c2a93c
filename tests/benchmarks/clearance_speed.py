"""Speed of the clearance kernels on a synthetic scene (a script, not a test).

Invented scene, not a real car: a front axle of an invented car, both corners, with
12 rods (capsules) and 4 rocker plates moving on smooth pose tracks over 2000 poses
(wheel travel and body roll), against 8 keep-out zones (2 boxes, 2 chassis tubes, 2
prisms, 2 tyre envelopes that move with the wheels), plus every rod-rod pair.

Prints the median of repeated runs of ``least_separations`` over all pairs (process
CPU time, single-threaded, and wall time), the pair x pose count, how many pose pairs
were measured exactly, and last ``clearance_ms=<median CPU milliseconds>``.  CPU time
is the figure of record because the machine may be shared; on an idle machine the two
agree.

Run: ``PYTHONPATH=src /work/venv/bin/python tests/benchmarks/clearance_speed.py``
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # one core

import statistics  # noqa: E402
import time  # noqa: E402

import numpy as np  # noqa: E402

from plumbrod.clearance.distance import least_separations  # noqa: E402
from plumbrod.geometry.shapes import Box, Capsule, Cylinder, Plate, Prism  # noqa: E402

POSES = 2000
REPEATS = 7


def _rotation_about(axis: np.ndarray, angle_rad: np.ndarray) -> np.ndarray:
    """Rotation matrices (n, 3, 3) about a unit axis (Rodrigues)."""
    k = axis / np.linalg.norm(axis)
    kx = np.array([[0, -k[2], k[1]], [k[2], 0, -k[0]], [-k[1], k[0], 0]])
    s = np.sin(angle_rad)[:, None, None]
    c = np.cos(angle_rad)[:, None, None]
    return np.eye(3) + s * kx + (1 - c) * (kx @ kx)


def build_scene(n: int = POSES):
    """Moving solids (12 capsules, 4 plates) and 8 zones of an invented front axle."""
    tau = np.linspace(0.0, 1.0, n)
    travel = {+1: 35.0 * np.sin(2 * np.pi * tau), -1: 35.0 * np.sin(2 * np.pi * tau + 1.1)}
    rods: list[Capsule] = []
    plates: list[Plate] = []
    tyres: list[Cylinder] = []
    for side in (+1, -1):
        s = travel[side]
        lift = np.stack([np.zeros(n), np.zeros(n), s], axis=1)  # upright moves with the wheel
        wheel_c = np.array([0.0, side * 720.0, 300.0])
        tyres.append(
            Cylinder(
                wheel_c + np.array([0, -side * 110.0, 0]) + lift,
                wheel_c + np.array([0, side * 110.0, 0]) + lift,
                305.0,
            )
        )
        # two rockers turning about axes fixed to the chassis
        for k, (pivot, axis_dir) in enumerate(
            [
                (np.array([60.0, side * 230.0, 520.0]), np.array([1.0, 0.0, 0.0])),
                (np.array([-140.0, side * 200.0, 560.0]), np.array([1.0, 0.2 * side, 0.1])),
            ]
        ):
            angle = np.radians(0.6 * s + 3.0 * k)
            rot = _rotation_about(axis_dir, angle)
            outline = np.array(
                [
                    [0.0, 0, -25],
                    [0, side * 70, -20],
                    [0, side * 85, 40],
                    [0, side * 10, 55],
                    [0, -side * 20, 20],
                ]
            )
            if k == 1:
                outline = outline @ _rotation_about(axis_dir, np.array([0.3]))[0].T
            verts = pivot + np.einsum("nij,kj->nki", rot, outline)
            plates.append(Plate(verts, 6.0))
        # rods: pushrods from the uprights to the rockers, links to the element, guides
        rocker_pick = plates[-2].vertices[:, 2]
        rocker_pick2 = plates[-1].vertices[:, 1]
        upright = np.array([10.0, side * 560.0, 180.0]) + lift
        upright2 = np.array([-30.0, side * 540.0, 420.0]) + lift
        element = np.array([400.0, side * 150.0, 120.0]) + 0.4 * lift
        element2 = np.array([430.0, side * 230.0, 110.0]) + 0.4 * lift
        chassis = np.array([220.0, side * 60.0, 40.0])
        rods += [
            Capsule(upright, rocker_pick, 9.5),
            Capsule(upright2, rocker_pick2, 9.5),
            Capsule(plates[-2].vertices[:, 3], element, 8.0),
            Capsule(plates[-1].vertices[:, 3], element2, 8.0),
            Capsule(chassis, element + np.array([0.0, side * 50.0, -40.0]), 6.0),
            Capsule(
                np.array([150.0, side * 300.0, 100.0]),
                element2 + np.array([20.0, side * 30.0, 0.0]),
                6.0,
            ),
        ]
    zones = [
        Box([-150.0, 0.0, 250.0], [300.0, 110.0, 180.0]),  # driver cell side walls
        Box(
            [300.0, 0.0, 450.0],
            [60.0, 90.0, 40.0],
            _rotation_about(np.array([0.0, 1.0, 0.0]), np.array([0.3]))[0],
        ),  # damper tray
        Cylinder([-250.0, 300.0, 650.0], [250.0, 300.0, 650.0], 12.5),  # frame tubes
        Cylinder([-250.0, -300.0, 650.0], [250.0, -300.0, 650.0], 12.5),
        Prism(
            [(-250, 80), (250, 80), (250, 140), (120, 140), (60, 260), (-250, 260)],
            "front",
            -500.0,
            -350.0,
        ),  # bulkhead section, non-convex
        Prism(
            [(-600, 0), (-300, 0), (-300, 60), (-450, 60), (-450, 200), (-600, 200)],
            "side",
            -150.0,
            150.0,
        ),  # footwell, non-convex
        *tyres,
    ]
    return rods, plates, zones


def all_pairs(rods, plates, zones):
    moving = [*rods, *plates]
    pairs = [(m, z) for m in moving for z in zones]
    pairs += [(rods[i], rods[j]) for i in range(len(rods)) for j in range(i + 1, len(rods))]
    return pairs


def main() -> None:
    rods, plates, zones = build_scene()
    pairs = all_pairs(rods, plates, zones)
    least_separations(pairs)  # warm-up
    wall, cpu = [], []
    for _ in range(REPEATS):
        start, start_cpu = time.perf_counter(), time.process_time()
        result = least_separations(pairs)
        wall.append(time.perf_counter() - start)
        cpu.append(time.process_time() - start_cpu)
    evaluated = sum(r.poses_evaluated for r in result)
    closest = min(result, key=lambda r: r.distance_mm)
    print(f"pairs: {len(pairs)}  poses: {POSES}  pair x pose: {len(pairs) * POSES}")
    print(
        f"pose pairs measured exactly: {evaluated} "
        f"({100.0 * evaluated / (len(pairs) * POSES):.1f} %)"
    )
    print(
        f"least clearance in the scene: {closest.distance_mm:.3f} mm at pose {closest.pose_index}"
    )
    print(
        f"runs: {REPEATS}  CPU median {1e3 * statistics.median(cpu):.1f} ms "
        f"(min {1e3 * min(cpu):.1f})  wall median {1e3 * statistics.median(wall):.1f} ms "
        f"(min {1e3 * min(wall):.1f})  load average {os.getloadavg()[0]:.2f}"
    )
    print(f"clearance_ms={1e3 * statistics.median(cpu):.1f}")


if __name__ == "__main__":
    main()
