"""Shared test setup.

Hypothesis runs derandomized (a fixed sequence of examples) so that CI is reproducible; set
HYPOTHESIS_PROFILE=explore locally to search with fresh random examples.
"""

from __future__ import annotations

import os

from hypothesis import HealthCheck, settings

settings.register_profile(
    "ci",
    derandomize=True,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow],
    print_blob=True,
)
settings.register_profile("explore", deadline=None, print_blob=True)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))
