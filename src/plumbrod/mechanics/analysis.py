"""The whole analysis of one design: location, routes, sweeps and their figures.

This is the one place that runs the pipeline in order::

    design file -> Design -> Linkage -> mobility -> routes -> sweeps -> figures
                                                         -> members, loads -> statics

Later stages (structure, clearance) read the :class:`Analysis` this returns.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import Design
from plumbrod.errors import LocationError
from plumbrod.kinematics.build import build_linkage
from plumbrod.kinematics.elastic import ElasticSetup, elastic_setup
from plumbrod.kinematics.figures import SweepFigures, sweep_figures
from plumbrod.kinematics.linkage import Linkage
from plumbrod.kinematics.mobility import Mobility, analyse_mobility
from plumbrod.kinematics.routes import RouteMap, find_routes
from plumbrod.kinematics.sweeps import SweepResult, run_sweeps
from plumbrod.mechanics.loads import AppliedLoads, applied_loads, design_load_cases
from plumbrod.mechanics.members import Member, resolve_members
from plumbrod.mechanics.redundancy import (
    Redundancy,
    fight_forces,
    redundancy_summary,
    rod_stiffness,
)
from plumbrod.mechanics.springs import SpringLoads, spring_loads
from plumbrod.mechanics.statics import Statics, solve_statics

__all__ = ["Analysis", "analyse"]

Array = NDArray[np.float64]


@dataclass(frozen=True)
class Analysis:
    """Everything the checks and reports need about one design."""

    design: Design
    link: Linkage
    mobility: Mobility
    routes: RouteMap
    sweeps: dict[str, SweepResult]
    figures: dict[str, SweepFigures]
    members: dict[str, Member]
    loads: AppliedLoads | None
    """None when the design has no load case (no aero data or top speed)."""
    statics: dict[str, Statics]
    springs: SpringLoads | None = None
    """Spring-load changes (DESIGN §5a); None without a load case."""
    elastic: ElasticSetup | None = None
    """The rods solved as springs k = EA/L when the design is located redundantly
    (DESIGN §4a); their fight forces are in ``rod_force_N``."""

    def rod_force_N(self, sweep: str) -> Array:
        """(B, K, nr) every link rod's force per load case in a sweep (+ tension): the
        load case's elastic or rigid statics plus the sweep's fight forces (DESIGN §4a).
        ``statics[sweep].rod_force_N`` is the loads' part alone."""
        st = self.statics[sweep]
        fight = fight_forces(self.link, self.sweeps[sweep])
        if fight is None:
            return st.rod_force_N
        return st.rod_force_N + fight.rod_force_N[:, None, :]

    @property
    def redundancy(self) -> Redundancy | None:
        """Fight forces and mismatch of a redundantly located design, else None."""
        return redundancy_summary(self.link, self.elastic, self.sweeps)


def locate(design: Design) -> tuple[Linkage, Mobility, RouteMap]:
    """Build the linkage and make sure every body is located and a route exists.

    Raises LocationError naming the free motion, or saying that no route reaches a
    corner.  Redundant members are allowed (see ``Mobility.redundant``).
    """
    link = build_linkage(design)
    mobility = analyse_mobility(link)
    if mobility.free_motions:
        first = mobility.free_motions[0]
        more = len(mobility.free_motions) - 1
        tail = f" (and {more} more free motion{'s' if more > 1 else ''})" if more else ""
        raise LocationError(
            first.split("'")[1], "free", f"{design.source}: not exactly located: {first}{tail}"
        )
    routes = find_routes(design)
    for element in design.elements:
        if not routes.for_element(element.name):
            raise LocationError(
                element.name,
                "free",
                f"{design.source}: element '{element.name}' has no route to "
                "a corner: every rod from it ends on the chassis; join one "
                "of its pickups to a rocker, wishbone or upright",
            )
    return link, mobility, routes


def analyse(design: Design) -> Analysis:
    """Locate, solve every sweep, compute the kinematic figures and the statics."""
    members = resolve_members(design)
    link, mobility, routes = locate(design)
    elastic = elastic_setup(link, rod_stiffness(link, members)) if mobility.redundant else None
    sweeps = run_sweeps(link, design.sweeps, elastic)
    figures = {name: sweep_figures(link, routes, res) for name, res in sweeps.items()}
    cases = design_load_cases(design)
    loads = applied_loads(design, link, members, routes, cases) if cases else None
    statics = (
        {}
        if loads is None
        else {
            name: solve_statics(link, routes, members, loads, res) for name, res in sweeps.items()
        }
    )
    springs = (
        None
        if loads is None or not statics
        else spring_loads(link, routes, members, loads, sweeps, statics)
    )
    return Analysis(
        design, link, mobility, routes, sweeps, figures, members, loads, statics, springs, elastic
    )
