"""Everything a report shows about a design, computed once: the analysis, the checks
and the tables behind them (member reserves, masses, compliance)."""

from __future__ import annotations

from dataclasses import dataclass

from plumbrod.clearance.survey import ClearanceReport, clearance_report
from plumbrod.design.model import Design
from plumbrod.design.plausibility import unit_slips
from plumbrod.mechanics.analysis import Analysis, analyse
from plumbrod.mechanics.compliance import ComplianceReport, compliance_report
from plumbrod.mechanics.mass import MassReport, mass_report
from plumbrod.mechanics.springs import SpringLoads
from plumbrod.mechanics.structure import RodReserve, rod_reserves
from plumbrod.verdict.checks import CheckResult, evaluate_checks

__all__ = ["Findings", "review"]


@dataclass(frozen=True)
class Findings:
    """What every output is built from: the analysis (sweeps as numpy arrays), the
    checks, member reserves, masses, compliance, clearance and plausibility notes."""

    analysis: Analysis
    checks: list[CheckResult]
    reserves: dict[str, RodReserve]
    mass: MassReport
    compliance: ComplianceReport
    clearance: ClearanceReport
    plausibility: tuple[str, ...] = ()
    """Values that read like a unit slip (:func:`plumbrod.design.plausibility.unit_slips`)."""

    @property
    def verdict(self) -> str:
        """``fail`` if any check fails, else ``warn`` if any warns, else ``pass``."""
        statuses = {c.status for c in self.checks}
        return "fail" if "fail" in statuses else "warn" if "warn" in statuses else "pass"

    @property
    def springs(self) -> SpringLoads | None:
        """Spring-load changes per axle and corner, the bolted comparison, the floor and
        each element's shares (DESIGN §5a); None without a load case."""
        return self.analysis.springs

    def clearance_margin_mm(self, rod: str) -> float:
        """How much a rod's radius may grow before a clearance limit is reached (mm)."""
        return self.clearance.rod_margin_mm.get(rod, float("inf"))


def review(design: Design) -> Findings:
    """Analyse a design and evaluate every check."""
    analysis = analyse(design)
    reserves = rod_reserves(analysis)
    compliance = compliance_report(analysis)
    clearance = clearance_report(analysis)
    checks = evaluate_checks(analysis, reserves, compliance, clearance)
    return Findings(
        analysis,
        checks,
        reserves,
        mass_report(analysis),
        compliance,
        clearance,
        unit_slips(design),
    )
