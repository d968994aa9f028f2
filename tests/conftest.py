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


@pytest.fixture(scope="session", autouse=True)
def _compiled_kernels_before_any_test():
    """Compile infoscope's numba kernels once, in the main thread, before the tests run.

    Outside tests the kernels load on a background thread (a first view does not wait
    for a compile).  numba's compiler enters ``warnings.catch_warnings``, which swaps
    the process-wide warning filters: a compile finishing on that thread while a test
    sits inside ``pytest.warns`` restored the filters without the test's "always"
    entry, and the expected warning was raised as an error instead (a clean checkout
    has no numba cache, so the compile takes seconds and overlaps the next tests).
    Loading the kernels here keeps every test independent of that timing.
    """
    from infoscope.encode import order_stats
    from infoscope.engine import counting, permutation

    counting.numba_ready(wait=True)
    order_stats.kernels(wait=True)
    # the permutation kernels compile on their first call, which may be the widget's worker
    x = np.array([0, 1, 0, 1, 1, 0], dtype=np.int64)
    permutation.shuffle_counts([x], [x[::-1].copy()], [2], [0.0], [9], 2, [1], backend="numba")
    yield
