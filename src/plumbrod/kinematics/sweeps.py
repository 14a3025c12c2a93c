"""The sweeps of a design: which poses to solve, solved in batches.

``travel``: every wheel moves together relative to the body.  ``heave``, ``roll``,
``pitch``: the body moves with every wheel on the ground.  ``heave_roll``: the grid of
heave and roll.  Each result holds the solved poses and the tangent dq/d(parameter) at
every pose, from which the figures take their derivatives.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import Sweeps
from plumbrod.kinematics.drives import BodyDrive, Drive, TravelDrive
from plumbrod.kinematics.elastic import ElasticSetup, ElasticSolution
from plumbrod.kinematics.elastic_newton import solve_elastic
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.solver import Solved, solve_poses, tangent

__all__ = ["SWEEP_ORDER", "SweepResult", "SweepSpec", "run_sweep", "run_sweeps", "sweep_specs"]

Array = NDArray[np.float64]
SWEEP_ORDER = ("travel", "heave", "roll", "pitch", "heave_roll")


@dataclass(frozen=True)
class SweepSpec:
    """What one sweep solves: its name, drive and the driver values to show (units)."""

    name: str
    drive: Drive
    values: dict[str, Array]
    """Driver values per pose for reports: ``travel_mm``, ``heave_mm``, ``roll_deg``..."""

    @property
    def is_travel(self) -> bool:
        return isinstance(self.drive, TravelDrive)

    @property
    def size(self) -> int:
        return int(self.drive.parameters.shape[0])

    def describe(self, index: int) -> str:
        """The driver values of pose ``index`` as text with units."""
        return describe_values({k: float(v[index]) for k, v in self.values.items()})


def describe_values(values: dict[str, float]) -> str:
    parts = []
    for key, value in values.items():
        name, unit = key.rsplit("_", 1)
        sign = f"{value:+.2f}"
        parts.append(f"{name} {sign} {'°' if unit == 'deg' else unit}".replace(" °", "°"))
    return ", ".join(parts)


@dataclass(frozen=True)
class SweepResult:
    """A solved sweep with its tangents (B, nq, npar)."""

    spec: SweepSpec
    solved: Solved
    tangent: Array
    elastic: ElasticSolution | None = None
    """For a redundantly located design: the springs' stretch and fight forces."""

    @property
    def name(self) -> str:
        return self.spec.name


def sweep_specs(link: Linkage, sweeps: Sweeps) -> list[SweepSpec]:
    """The sweeps a design asks for, in :data:`SWEEP_ORDER`."""
    nc = len(link.corner_names)
    centre = sweeps.motion_centre_mm
    specs: list[SweepSpec] = []
    if sweeps.travel_mm is not None:
        s = np.linspace(*sweeps.travel_mm, sweeps.travel_steps)
        specs.append(
            SweepSpec("travel", TravelDrive(np.repeat(s[:, None], nc, axis=1)), {"travel_mm": s})
        )
    for name, rng, steps, column in (
        ("heave", sweeps.heave_mm, sweeps.heave_steps, 0),
        ("roll", sweeps.roll_deg, sweeps.roll_steps, 1),
        ("pitch", sweeps.pitch_deg, sweeps.pitch_steps, 2),
    ):
        if rng is None:
            continue
        v = np.linspace(*rng, steps)
        params = np.zeros((steps, 3))
        params[:, column] = v if column == 0 else np.radians(v)
        unit = "mm" if column == 0 else "deg"
        specs.append(SweepSpec(name, BodyDrive(params, centre), {f"{name}_{unit}": v}))
    grid_h, grid_r = sweeps.grid_heave_mm, sweeps.grid_roll_deg
    if sweeps.heave_roll_steps is not None and grid_h and grid_r:
        h = np.linspace(*grid_h, sweeps.heave_roll_steps[0])
        r = np.linspace(*grid_r, sweeps.heave_roll_steps[1])
        hh, rr = np.meshgrid(h, r, indexing="ij")
        params = np.zeros((hh.size, 3))
        params[:, 0] = hh.ravel()
        params[:, 1] = np.radians(rr.ravel())
        specs.append(
            SweepSpec(
                "heave_roll",
                BodyDrive(params, centre),
                {"heave_mm": hh.ravel(), "roll_deg": rr.ravel()},
            )
        )
    return specs


def run_sweep(link: Linkage, spec: SweepSpec, springs: ElasticSetup | None = None) -> SweepResult:
    """Solve one sweep; raises AssemblyError where the linkage does not assemble.

    With ``springs`` (a redundantly located design, :func:`elastic_setup`) every pose is
    the elastic minimum; without, the rigid solution.
    """

    def describe(p: Array) -> str:
        return _describe_parameters(spec, p)

    if springs is not None:
        solved, elastic = solve_elastic(
            link, spec.drive, springs, sweep_name=spec.name, describe=describe
        )
        return SweepResult(spec, solved, elastic.tangent, elastic)
    solved = solve_poses(link, spec.drive, sweep_name=spec.name, describe=describe)
    tan = tangent(link, spec.drive, solved.kin, solved.jacobian)
    return SweepResult(spec, solved, tan)


def _describe_parameters(spec: SweepSpec, params: Array) -> str:
    if spec.is_travel:
        return describe_values({"travel_mm": float(params[0])})
    values = {
        "heave_mm": float(params[0]),
        "roll_deg": float(np.degrees(params[1])),
        "pitch_deg": float(np.degrees(params[2])),
    }
    return describe_values({k: v for k, v in values.items() if v != 0.0} or values)


def run_sweeps(
    link: Linkage, sweeps: Sweeps, springs: ElasticSetup | None = None
) -> dict[str, SweepResult]:
    """Solve every sweep the design asks for (elastically with ``springs``)."""
    return {spec.name: run_sweep(link, spec, springs) for spec in sweep_specs(link, sweeps)}
