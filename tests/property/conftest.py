"""Hypothesis settings for the property tests.

By default the search is derandomised (a fixed seed), so a test run gives the same result on
every machine and every CI run; a case the random search finds is kept as an ``@example``.
Set ``HYPOTHESIS_PROFILE=explore`` to search with fresh random data.
"""

from __future__ import annotations

import os

from hypothesis import settings

settings.register_profile("repeatable", derandomize=True)
settings.register_profile("explore", derandomize=False)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "repeatable"))
