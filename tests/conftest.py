"""Shared pytest configuration."""
from __future__ import annotations

import os

import numpy as np
import pytest

# Hypothesis: a fixed, CI-friendly profile (deterministic, bounded time).
try:
    from hypothesis import HealthCheck, settings

    settings.register_profile(
        "infoscope", max_examples=60, deadline=None, derandomize=True,
        suppress_health_check=[HealthCheck.too_slow],
    )
    settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "infoscope"))
except ImportError:  # pragma: no cover
    pass


@pytest.fixture
def rng():
    """A seeded generator so that every simulation is reproducible."""
    return np.random.default_rng(20261202)
