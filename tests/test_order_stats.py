"""The encoder's selection path gives the sorting path's numbers exactly.

References: ``numpy.sort`` (order statistics), ``numpy.unique`` (distinct counts),
``numpy.quantile`` (method "linear", the quantile edges); and the encoder's own
sorting path (``order_stats.MODE = "never"``), which the rest of the suite checks
against outside references, for every field of the encoded column.
"""
from __future__ import annotations

import warnings

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from infoscope.encode import encode_column, order_stats
from infoscope.encode.binning import quantile_ranks, lerp_quantiles


@pytest.fixture(scope="module")
def k():
    kernels = order_stats.kernels(wait=True)
    assert kernels is not None  # numba is a dependency: the compiled path must load
    return kernels


def _columns(rng, n):
    return {
        "normal": rng.normal(size=n),
        "lognormal": rng.lognormal(sigma=2.0, size=n),
        "rounded": np.round(rng.normal(size=n), 1),
        "whole": rng.integers(0, 10**6, n).astype(float),
        "row_number": np.arange(n, dtype=float),
        "signed_zeros": np.where(rng.random(n) < 0.3, -0.0, np.where(rng.random(n) < 0.5, 0.0, rng.normal(size=n))),
        "cauchy_missing": np.where(rng.random(n) < 0.1, np.nan, rng.standard_cauchy(n)),
        "some_inf": np.where(rng.random(n) < 0.01, np.inf, rng.normal(size=n)),
        "few_values_and_noise": np.r_[np.zeros(n - 40), np.arange(40.0)],
        "huge": rng.normal(size=n) * 1e300,
        "subnormal": rng.normal(size=n) * 1e-310,
        "one_outlier": np.r_[rng.normal(size=n - 1), 1e250],
        "crowded": 1.0 + rng.integers(0, 3000, n) * 2.0**-52,  # a few ulps apart: one bucket at first
    }


def test_order_statistics_equal_numpy_sort(k, rng):
    n = 120_000
    for name, x in _columns(rng, n).items():
        v = np.ascontiguousarray(x[np.isfinite(x)])
        ranks = np.unique(np.r_[0, v.size - 1, rng.integers(0, v.size, 50)])
        got = order_stats.order_statistics(k, v, ranks, v.min(), v.max())
        assert np.array_equal(got, np.sort(v)[ranks]), name  # -0.0 == 0.0 in the comparison
        summary = order_stats.float_summary(k, v)
        assert summary.n_distinct == np.unique(v).size, name
        assert summary.whole == bool(np.all(np.floor(v) == v)), name


@given(arrays(np.float64, st.integers(1, 400),
              elements=st.floats(allow_nan=False, allow_infinity=False, width=64)))
def test_selection_is_exact_on_any_finite_floats(v):
    k = order_stats.kernels(wait=True)
    v = np.ascontiguousarray(v)
    ranks = np.arange(v.size)
    assert np.array_equal(order_stats.order_statistics(k, v, ranks, v.min(), v.max()), np.sort(v))
    assert order_stats.float_summary(k, v).n_distinct == np.unique(v).size


def test_quantiles_from_order_statistics_equal_numpy_quantile(k, rng):
    v = rng.lognormal(size=100_003)
    probs = np.r_[np.linspace(0, 1, 17), [0.001, 0.999]]
    prev_i, next_i, gamma = quantile_ranks(v.size, probs)
    ranks = np.unique(np.r_[prev_i, next_i])
    stats = order_stats.order_statistics(k, v, ranks, v.min(), v.max())
    got = lerp_quantiles(stats[np.searchsorted(ranks, prev_i)], stats[np.searchsorted(ranks, next_i)], gamma)
    assert np.array_equal(got, np.quantile(v, probs))  # bit for bit


@pytest.mark.parametrize("bins", [16, 7, 200])
@pytest.mark.parametrize("strategy", ["quantile", "uniform"])
@pytest.mark.parametrize("missing", ["drop", "category"])
def test_selection_path_encodes_like_the_sorting_path(k, rng, bins, strategy, missing, monkeypatch):
    n = order_stats.MIN_ROWS + 1
    for name, x in _columns(rng, n).items():
        with warnings.catch_warnings(record=True) as sorting_warnings:
            warnings.simplefilter("always")
            monkeypatch.setattr(order_stats, "MODE", "never")
            a = encode_column(x, name=name, bins=bins, strategy=strategy, missing=missing, cache=False)
        with warnings.catch_warnings(record=True) as selection_warnings:
            warnings.simplefilter("always")
            monkeypatch.setattr(order_stats, "MODE", "always")
            b = encode_column(x, name=name, bins=bins, strategy=strategy, missing=missing, cache=False)
        assert np.array_equal(a.codes, b.codes), name
        assert (a.k, a.labels, a.flags, a.n_distinct, a.n_missing, a.kind) == \
            (b.k, b.labels, b.flags, b.n_distinct, b.n_missing, b.kind), name
        assert (a.edges is None and b.edges is None) or np.array_equal(a.edges, b.edges), name
        assert [str(w.message) for w in sorting_warnings] == [str(w.message) for w in selection_warnings], name


def test_small_columns_and_auto_mode_never_wait_for_the_kernels(monkeypatch):
    # below MIN_ROWS the sorting path runs (numba not needed); "never" always sorts
    monkeypatch.setattr(order_stats, "MODE", "never")
    assert order_stats.kernels() is None
    monkeypatch.setattr(order_stats, "MODE", "auto")
    col = encode_column(np.arange(100, dtype=float) / 3, name="x", bins=4, cache=False)
    assert col.k == 4
