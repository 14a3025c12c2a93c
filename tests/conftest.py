"""Shared test set-up.

Hypothesis runs derandomized (the same examples on every machine and every run, no
example database), so a CI run is reproducible and a failure seen once is seen again.
Set ``HYPOTHESIS_PROFILE=explore`` to draw fresh random examples while developing.
"""

from __future__ import annotations

import os

from hypothesis import settings

settings.register_profile("repeatable", derandomize=True, database=None)
settings.register_profile("explore", derandomize=False)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "repeatable"))
