"""Find hardpoints that meet the targets: global search, then local polish.

1. :func:`scipy.optimize.differential_evolution` over the box of the free variables,
   every generation screened as one batch (``vectorized=True``) by
   :class:`~plumbrod.revise.candidates.Screening`; the screening constraints go in as a
   :class:`~scipy.optimize.NonlinearConstraint` (feasible first, then the objective).
2. SLSQP from the best few distinct candidates, with the same constraints and
   central-difference gradients (each gradient one batch of 2n + 1 candidates).
3. The best screened candidates are written into the design and checked in full
   (every sweep at its own steps, clearance included); the best one that passes every
   check is the result.

Deterministic for a given seed.  ``KeyboardInterrupt`` stops the search and keeps the
best candidate seen so far (``TuneResult.interrupted``).
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from plumbrod.design.model import Design
from plumbrod.design.tune_spec import TuneSpec
from plumbrod.revise.candidates import Screen, Screening
from plumbrod.verdict.findings import Findings

__all__ = ["Final", "Progress", "TuneResult", "finalise", "tune"]

Array = NDArray[np.float64]


@dataclass(frozen=True)
class Progress:
    """One progress report: after a generation (or a polish step)."""

    stage: str
    generation: int
    generations: int
    best_objective: float
    worst_violation: float
    """The best candidate's worst constraint (<= 0 feasible)."""
    candidates_per_s: float
    seconds_left: float


@dataclass(frozen=True)
class TuneResult:
    """The search's answer and its ranking of finalists (best first)."""

    x: Array
    """The chosen variable values."""
    finalists: Array
    """(k, n) best distinct candidates, best first (the chosen one among them)."""
    objective: float
    violation: float
    generations: int
    evaluations: int
    seconds: float
    interrupted: bool

    @property
    def candidates_per_s(self) -> float:
        return self.evaluations / self.seconds if self.seconds > 0 else 0.0


class _Ledger:
    """Screens batches, caches the last one and keeps the best candidates seen."""

    def __init__(self, screening: Screening, keep: int = 32) -> None:
        self.screening = screening
        self.keep = keep
        self.x = np.zeros((0, len(screening.spec.variables)))
        self.score = np.zeros((0, 2))
        self._last: tuple[bytes, Screen] | None = None

    def __call__(self, x: Array) -> Screen:
        x = np.atleast_2d(x)
        key = x.tobytes()
        if self._last is not None and self._last[0] == key:
            return self._last[1]
        screen = self.screening(x)
        self._last = (key, screen)
        viol = np.maximum(screen.violation, 0.0)
        score = np.stack((viol, screen.objective), axis=1)
        allx = np.vstack((self.x, x))
        alls = np.vstack((self.score, score))
        order = np.lexsort((alls[:, 1], alls[:, 0]))
        self.x, self.score = allx[order[: self.keep]], alls[order[: self.keep]]
        return screen

    def best(self) -> tuple[Array, float, float]:
        return self.x[0].copy(), float(self.score[0, 1]), float(self.score[0, 0])

    def distinct(self, count: int, scale: Array) -> Array:
        out: list[Array] = []
        for x in self.x:
            if all(np.max(np.abs(x - y) / scale) > 1e-3 for y in out):
                out.append(x)
            if len(out) == count:
                break
        return np.array(out).reshape(-1, self.x.shape[1])


def tune(
    design: Design,
    spec: TuneSpec,
    *,
    seed: int | None = None,
    generations: int | None = None,
    report: Callable[[Progress], None] | None = None,
    screen_steps: int | None = None,
) -> TuneResult:
    """Search the variables of ``spec`` for the best design that meets the targets."""
    from scipy.optimize import NonlinearConstraint, differential_evolution

    screening = Screening(design, spec, screen_steps=screen_steps)
    ledger = _Ledger(screening)
    bounds = np.array(spec.bounds, dtype=float)
    scale = bounds[:, 1] - bounds[:, 0]
    n = bounds.shape[0]
    gens = generations if generations is not None else spec.generations
    seed = spec.seed if seed is None else seed
    start = time.perf_counter()
    state = {"generation": 0}
    interrupted = False

    def objective(xt: Array) -> Array:
        return ledger(np.asarray(xt).T).objective

    def constraints(xt: Array) -> Array:
        return ledger(np.asarray(xt).T).constraints.T

    def tick(stage: str, done: int, total: int) -> None:
        if report is None:
            return
        elapsed = time.perf_counter() - start
        _, obj, viol = ledger.best()
        rate = screening.evaluations / elapsed if elapsed > 0 else 0.0
        per = elapsed / max(done, 1)
        report(Progress(stage, done, total, obj, viol, rate, per * max(total - done, 0)))

    def callback(intermediate_result: object) -> None:
        state["generation"] += 1
        tick("search", state["generation"], gens)

    # the design as written is always a candidate (zero offsets, when inside the box)
    zero = np.clip(np.zeros(n), bounds[:, 0], bounds[:, 1])
    ledger(zero[None])
    try:
        differential_evolution(
            objective,
            bounds,
            constraints=(NonlinearConstraint(constraints, -np.inf, 0.0),),
            popsize=spec.population,
            maxiter=gens,
            seed=seed,
            vectorized=True,
            updating="deferred",
            polish=False,
            tol=1e-8,
            init="sobol" if _power_of_two(spec.population * n) else "latinhypercube",
            callback=callback,
        )
        starts = ledger.distinct(spec.polish, scale)
        for i, x0 in enumerate(starts):
            _polish(ledger, x0, bounds)
            tick("polish", i + 1, len(starts))
    except KeyboardInterrupt:
        interrupted = True
    x, obj, viol = ledger.best()
    elapsed = time.perf_counter() - start
    return TuneResult(
        x=x,
        finalists=ledger.distinct(8, scale),
        objective=obj,
        violation=viol,
        generations=state["generation"],
        evaluations=screening.evaluations,
        seconds=elapsed,
        interrupted=interrupted,
    )


def _power_of_two(count: int) -> bool:
    return count > 0 and count & (count - 1) == 0


def _polish(ledger: _Ledger, x0: Array, bounds: Array) -> None:
    """SLSQP from ``x0`` with central-difference gradients in one batch each."""
    from scipy.optimize import minimize

    n = x0.size
    scale = bounds[:, 1] - bounds[:, 0]
    h = 1e-6 * scale

    def batch(x: Array) -> tuple[Screen, Array]:
        xs = np.vstack((x, x + np.diag(h), x - np.diag(h)))
        return ledger(np.clip(xs, bounds[:, 0], bounds[:, 1])), xs

    def fun(x: Array) -> float:
        return float(batch(x)[0].objective[0])

    def grad(x: Array) -> Array:
        s = batch(x)[0].objective
        return (s[1 : n + 1] - s[n + 1 :]) / (2.0 * h)

    def cons(x: Array) -> Array:
        return -batch(x)[0].constraints[0]

    def cons_jac(x: Array) -> Array:
        c = batch(x)[0].constraints
        return -((c[1 : n + 1] - c[n + 1 :]) / (2.0 * h)[:, None]).T

    if not np.all(ledger(x0[None]).assembled):
        return
    minimize(
        fun,
        x0,
        jac=grad,
        bounds=[tuple(b) for b in bounds],
        constraints=({"type": "ineq", "fun": cons, "jac": cons_jac},),
        method="SLSQP",
        options={"maxiter": 60, "ftol": 1e-12},
    )


@dataclass(frozen=True)
class Final:
    """The finalist written out: its variables, the design text and its full check."""

    x: Array
    text: str
    findings: Findings
    passed: bool
    """Every check passes (or warns) and the clearance meets the tune's target."""


def finalise(text: str, design: Design, spec: TuneSpec, result: TuneResult, source: str) -> Final:
    """Write each finalist into ``text`` (best first), check it in full and return the
    first that passes (else the best).  ``source`` names the new file in messages.

    Raises ValueError naming a key that cannot be edited in place.
    """
    from plumbrod.design.loading import parse_design
    from plumbrod.revise.text_edit import move_points
    from plumbrod.verdict.findings import review

    screening = Screening(design, spec, screen_steps=3)
    file_points = [p for group in spec.groups.values() for p in group]
    for rocker in spec.pivots.values():
        file_points += [f"{rocker}.axis_a", f"{rocker}.axis_b"]
    best: Final | None = None
    for x in result.finalists:
        pts = screening.points(x[None])[0]
        moved = {p: _vec(pts[screening.link.point(p)]) for p in file_points}
        new_text = move_points(text, design, moved)
        findings = review(parse_design(new_text, source))
        passed = not any(c.status == "fail" for c in findings.checks)
        clearance = next(c for c in findings.checks if c.id == "clearance")
        if clearance.value is not None and clearance.value < spec.targets.clearance_mm:
            passed = False
        final = Final(x, new_text, findings, passed)
        if best is None or passed:
            best = final
        if passed or result.interrupted:
            break
    assert best is not None
    return best


def _vec(p: Array) -> tuple[float, float, float]:
    return (float(p[0]), float(p[1]), float(p[2]))
