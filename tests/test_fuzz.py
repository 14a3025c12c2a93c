"""Fuzz: mutated example designs through ``plumbrod check --json`` (seeded, in CI).

Every run must keep the command-line contract (RULES, README): exit 0, 1 or 2; exit 2
is one line and no JSON; no traceback; no NaN or Infinity in the JSON; exit 0 or 1
agrees with the JSON verdict.  ``tests/benchmarks/fuzz_many.py`` runs 10,000 the same
way and prints the counts.  The mutations are in ``fuzz_designs.py``; here the numbers
come from ``CI_POOL`` (see ``PAST_RANGES`` there).
"""

from __future__ import annotations

import random

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fuzz_designs import CI_POOL, judge, mutate, run_check, seed_texts

SEEDS = seed_texts()


def test_the_seeds_themselves_keep_the_contract() -> None:
    for text in SEEDS:
        outcome = run_check(text)
        assert outcome.problem == "", outcome.detail
        assert outcome.code in (0, 1)


def test_the_judge_catches_each_broken_rule() -> None:
    # the contract checker itself must fail each kind of broken run
    assert judge(3, "", "").problem == "bad exit"
    assert judge(2, "", "a\nb\n").problem == "bad exit"
    assert judge(2, "", "plumbrod: error: x\n").problem == ""
    assert judge(0, '{"verdict": "fail"}', "").problem == "bad exit"
    assert judge(1, '{"verdict": "pass"}', "").problem == "bad exit"
    assert judge(0, '{"verdict": "pass", "x": NaN}', "").problem == "nan"
    assert judge(0, '{"verdict": "warn", "x": Infinity}', "").problem == "nan"
    assert judge(1, "", "Traceback (most recent call last):\n").problem == "traceback"
    assert judge(0, '{"verdict": "pass"}', "x.py:1: RuntimeWarning: overflow\n").problem
    assert judge(1, "", "plumbrod: fail (dead-point): does not assemble\n").problem == ""


@settings(
    max_examples=200,
    derandomize=True,
    deadline=None,
    database=None,
    suppress_health_check=[HealthCheck.too_slow],
)
@given(seed=st.sampled_from(range(len(SEEDS))), rng=st.randoms(use_true_random=False))
def test_mutated_designs_keep_the_command_line_contract(seed: int, rng: random.Random) -> None:
    text = mutate(SEEDS[seed], rng, CI_POOL)
    outcome = run_check(text)
    assert outcome.problem == "", f"{outcome.problem}: {outcome.detail}\n--- design:\n{text}"
