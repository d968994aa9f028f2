"""Bin edges: numpy's rules, equal width / frequency, Knuth's rule, bin assignment.

Every check names its outside reference beside it.
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp
from scipy.special import gammaln

from infoscope import DataQualityWarning, bin_edges, encode_column
from infoscope.encode.binning import (
    NUMPY_RULES,
    assign_bins,
    format_edges,
    interval_labels,
    knuth_bin_count,
    knuth_log_posterior,
    sorted_quantile,
)

# numpy's "stone" rule warns that its estimate "may be suboptimal"; that is numpy's message
pytestmark = pytest.mark.filterwarnings("ignore:The number of bins estimated:RuntimeWarning")


@pytest.fixture
def normal(rng):
    return rng.normal(size=2000)


# ---------------------------------------------------------------- numpy's rules


@pytest.mark.parametrize("rule", NUMPY_RULES)
def test_rules_equal_numpy_histogram_bin_edges_on_floats(rule, normal):
    # reference: numpy.histogram_bin_edges(x, bins=rule)
    np.testing.assert_array_equal(bin_edges(normal, bins=rule), np.histogram_bin_edges(normal, bins=rule))


@pytest.mark.parametrize("rule", NUMPY_RULES)
def test_rules_equal_numpy_on_integers_with_width_floor(rule, rng):
    # reference: numpy.histogram_bin_edges on integer dtype; numpy (>= 2.1) floors
    # the width at 1 on integer data (numpy docs, "histogram_bin_edges", Notes)
    x = rng.integers(0, 6, size=5_000)
    ours = bin_edges(x, bins=rule)
    np.testing.assert_array_equal(ours, np.histogram_bin_edges(x, bins=rule))
    assert np.diff(ours).min() >= 1.0


@pytest.mark.parametrize("rule", NUMPY_RULES)
def test_rules_leave_out_nan_and_inf(rule, normal):
    # reference: numpy.histogram_bin_edges on the finite values only
    dirty = np.concatenate([normal, [np.nan, np.inf, -np.inf, np.nan]])
    np.testing.assert_array_equal(bin_edges(dirty, bins=rule), np.histogram_bin_edges(normal, bins=rule))


@pytest.mark.parametrize("n", [1, 3, 16, 50])
def test_uniform_equals_numpy_equal_width(n, normal):
    # reference: numpy.histogram_bin_edges(x, bins=n) (equal width over the range)
    np.testing.assert_array_equal(bin_edges(normal, bins=n), np.histogram_bin_edges(normal, bins=n))


def test_nullable_series_uses_non_missing_values():
    # reference: numpy.histogram_bin_edges on the values without NA
    s = pd.Series([1, 5, None, 9, 2], dtype="Int64")
    np.testing.assert_array_equal(bin_edges(s, bins=4), np.histogram_bin_edges(np.array([1, 5, 9, 2]), bins=4))


def test_constant_sample_is_one_bin_like_numpy():
    # reference: numpy.histogram_bin_edges([v, v], bins=1) -> [v - 0.5, v + 0.5]
    for bins in (16, "fd", "knuth"):
        for strategy in ("uniform", "quantile"):
            got = bin_edges([3.0, 3.0, 3.0], bins=bins, strategy=strategy)
            np.testing.assert_array_equal(got, np.histogram_bin_edges([3.0, 3.0], bins=1))


# ---------------------------------------------------------------- quantiles


@pytest.mark.parametrize("n", [2, 4, 10, 16])
def test_quantile_edges_equal_numpy_quantile(n, normal):
    # reference: numpy.quantile(x, linspace(0, 1, n + 1)) (method "linear")
    expected = np.quantile(normal, np.linspace(0, 1, n + 1))
    np.testing.assert_array_equal(bin_edges(normal, bins=n, strategy="quantile"), expected)


def test_quantile_ties_merge_edges_with_a_warning():
    # reference: numpy.unique(numpy.quantile(...)): tied values give coinciding quantiles
    x = np.concatenate([np.zeros(80), np.arange(1.0, 21.0)])
    expected = np.unique(np.quantile(x, np.linspace(0, 1, 11)))
    assert expected.size == 4  # 0 (p = 0 .. 0.7), then 0.2, 10.1, 20
    with pytest.warns(DataQualityWarning, match=r"10 quantile bins .* 7 edge\(s\) coincide; 3 bin\(s\) remain"):
        got = bin_edges(x, bins=10, strategy="quantile")
    np.testing.assert_array_equal(got, expected)


@given(
    hnp.arrays(np.float64, st.integers(1, 60), elements=st.floats(-1e6, 1e6)),
    st.lists(st.floats(0, 1), min_size=1, max_size=20),
)
def test_sorted_quantile_is_numpy_quantile_bit_for_bit(x, probs):
    # reference: numpy.quantile (default method "linear")
    np.testing.assert_array_equal(sorted_quantile(np.sort(x), probs), np.quantile(x, probs))


def test_sorted_quantile_on_integers_equals_numpy(rng):
    # reference: numpy.quantile on int64 data (large values, as datetimes in ns)
    x = np.sort(rng.integers(1.6e18, 1.8e18, size=1001, dtype=np.int64))
    p = np.linspace(0, 1, 17)
    np.testing.assert_array_equal(sorted_quantile(x, p), np.quantile(x, p))


# ---------------------------------------------------------------- Knuth's rule


def _knuth_brute(x, m):
    """Knuth (2006, arXiv:physics/0605197) log posterior written out with numpy.histogram."""
    counts, _ = np.histogram(x, bins=m)
    n = x.size
    return n * np.log(m) + gammaln(m / 2) - m * gammaln(0.5) - gammaln(n + m / 2) + gammaln(counts + 0.5).sum()


def test_knuth_posterior_equals_formula_with_numpy_histogram(rng):
    # reference: Knuth 2006 posterior (formula above), counts from numpy.histogram(x, bins=M)
    x = np.concatenate([rng.normal(size=300), rng.exponential(size=200) * 3 + 5])
    ms = np.arange(1, 301)
    brute = np.array([_knuth_brute(x, m) for m in ms])
    np.testing.assert_allclose(knuth_log_posterior(x, ms), brute, rtol=1e-12, atol=1e-9)


@pytest.mark.parametrize("seed", range(6))
def test_knuth_count_is_the_global_maximum_by_brute_force(seed):
    # reference: exhaustive search of the Knuth (2006) posterior over M = 1..n
    rng = np.random.default_rng(seed)
    x = np.concatenate([rng.normal(size=60), rng.normal(6, 0.3, size=25)])
    brute = np.array([_knuth_brute(x, m) for m in range(1, x.size + 1)])
    assert knuth_bin_count(x) == int(np.argmax(brute)) + 1
    edges = bin_edges(x, bins="knuth")
    # edges are equal width over the data range, as numpy.linspace(min, max, M + 1)
    np.testing.assert_array_equal(edges, np.linspace(x.min(), x.max(), knuth_bin_count(x) + 1))


def test_knuth_known_count_on_a_seeded_sample():
    # reference: brute force above; this seed happens to have its optimum at 9 bins
    x = np.random.default_rng(0).normal(size=1000)
    brute = np.array([_knuth_brute(x, m) for m in range(1, 200)])
    assert knuth_bin_count(x) == int(np.argmax(brute)) + 1 == 9


def test_knuth_not_worse_than_astropy():
    # reference: astropy.stats.knuth_bin_width(x, return_bins=True) (a local optimiser
    # started at the Freedman-Diaconis count: it can stop at a local maximum); our
    # exhaustive optimum must score at least as high under the same posterior
    from astropy import stats as astropy_stats
    strictly_better = 0
    for seed in range(5):
        rng = np.random.default_rng(seed)
        x = np.concatenate([rng.normal(size=700), rng.normal(4, 0.5, size=300)])
        _, bins = astropy_stats.knuth_bin_width(x, return_bins=True)
        m_astropy = len(bins) - 1
        m_ours = knuth_bin_count(x)
        post = knuth_log_posterior(x, [m_ours, m_astropy])
        assert post[0] >= post[1] - 1e-9
        strictly_better += bool(post[0] > post[1] + 1e-9)
        # same posterior function as astropy's (its private _KnuthF is minus the posterior)
        knuth_f = getattr(astropy_stats.histogram, "_KnuthF", None)
        if knuth_f is not None:
            np.testing.assert_allclose(-knuth_f(x).eval(m_astropy), post[1], rtol=1e-10)
    # on these two-bump samples the local search stops early at least once (seen: 4 of 5)
    assert strictly_better >= 1


def test_knuth_respects_the_search_bound(rng):
    x = rng.normal(size=500)
    assert knuth_bin_count(x, max_bins=3) <= 3
    with pytest.raises(ValueError, match="max_bins"):
        knuth_bin_count(x, max_bins=0)


# ---------------------------------------------------------------- assignment


def test_assign_bins_matches_numpy_histogram_and_digitize(rng):
    # references: numpy.histogram(x, edges) counts; numpy.digitize(x, edges[1:-1], right=False)
    x = rng.normal(size=5000)
    for edges in (bin_edges(x, bins=16, strategy="quantile"), bin_edges(x, bins=40), bin_edges(x, bins="fd")):
        codes = assign_bins(x, edges)
        np.testing.assert_array_equal(codes, np.digitize(x, edges[1:-1], right=False))
        np.testing.assert_array_equal(np.bincount(codes, minlength=edges.size - 1), np.histogram(x, edges)[0])


def test_assign_bins_over_several_blocks_matches_numpy_digitize(rng):
    # reference: numpy.digitize(x, edges[1:-1]) and numpy.histogram counts, on more
    # values than one comparison block (2**16) and a length that is not a multiple of it
    x = rng.lognormal(size=200_003)
    x[::997] = 7.0  # ties on and near an edge
    edges = np.quantile(x, np.linspace(0, 1, 17))
    edges[9] = 7.0
    edges.sort()
    codes = assign_bins(x, edges)
    assert codes.dtype == np.uint8
    np.testing.assert_array_equal(codes, np.digitize(x, edges[1:-1], right=False))
    np.testing.assert_array_equal(np.bincount(codes, minlength=16), np.histogram(x, edges)[0])


def test_assign_bins_matches_pandas_cut_left_closed(rng):
    # reference: pandas.cut(x, edges, right=False, labels=False) (half-open [a, b)); pandas
    # leaves the maximum (== last edge) out, numpy.histogram closes the last bin
    x = np.round(rng.normal(size=2000), 1)
    edges = bin_edges(x, bins=8)
    codes = assign_bins(x, edges)
    ref = pd.cut(x, edges, right=False, labels=False)
    inside = x < edges[-1]
    np.testing.assert_array_equal(codes[inside], ref[inside].astype(int))
    assert np.all(codes[~inside] == edges.size - 2)


def test_values_on_edges_go_to_the_upper_bin():
    # reference: numpy.histogram convention ([a, b), last bin closed)
    edges = np.array([0.0, 1.0, 2.0, 3.0])
    np.testing.assert_array_equal(assign_bins(np.array([0.0, 1.0, 2.0, 3.0, 2.5]), edges), [0, 1, 2, 2, 2])


def test_labels_are_intervals_and_distinct():
    texts = format_edges([0.0, 0.123451, 0.123452, 1.0])
    assert len(set(texts)) == 4
    assert interval_labels(["0", "1", "2"]) == ("[0, 1)", "[1, 2]")


# ---------------------------------------------------------------- bad input


@pytest.mark.parametrize(
    ("kwargs", "error", "match"),
    [
        ({"bins": "nope"}, ValueError, r"bins='nope' is not a known rule"),
        ({"bins": 0}, ValueError, r"bins=0 is invalid"),
        ({"bins": 2.5}, TypeError, r"must be an integer"),
        ({"bins": True}, TypeError, r"got a bool"),
        ({"bins": [0.0, 0.0, 1.0]}, ValueError, r"increase strictly"),
        ({"bins": [0.0, np.inf]}, ValueError, r"finite"),
        ({"strategy": "width"}, ValueError, r"strategy='width' is not valid"),
    ],
)
def test_bad_options_name_the_parameter(kwargs, error, match):
    with pytest.raises(error, match=match):
        bin_edges([1.0, 2.0, 3.0], **kwargs)


def test_bad_values_are_clear_errors():
    with pytest.raises(ValueError, match="no finite values"):
        bin_edges([np.nan, np.inf])
    with pytest.raises(ValueError, match="one-dimensional"):
        bin_edges(np.zeros((3, 2)))
    with pytest.raises(TypeError, match="encode_column"):
        bin_edges(np.array(["2024-01-01"], dtype="datetime64[D]"))
    with pytest.raises(TypeError, match="must be numeric"):
        bin_edges(["a", "b"])


def test_input_is_not_modified(rng):
    x = rng.normal(size=200)
    x[::7] = np.nan
    before = x.copy()
    for bins in ("knuth", "fd", 8):
        bin_edges(x, bins=bins, strategy="quantile")
    np.testing.assert_array_equal(x, before)


# ---------------------------------------------------------------- runaway width rules


@pytest.mark.parametrize("outlier", [1e3, 1e5])
@pytest.mark.parametrize("rule", ["fd", "scott"])
def test_width_rule_bin_count_equals_numpys(rule, outlier):
    # reference: numpy.histogram_bin_edges(x, bins=rule) -- the count it builds
    from infoscope.encode.binning import _width_rule_bin_count

    x = np.r_[np.random.default_rng(3).normal(size=1000), outlier]
    for sample in (x, np.round(x * 3).astype(np.int64)):  # integer data: width floored at 1
        want = np.histogram_bin_edges(sample, bins=rule).size - 1
        assert _width_rule_bin_count(np.sort(sample), rule, float(sample.min()), float(sample.max())) == want


def test_a_far_outlier_does_not_make_fd_allocate_billions_of_bins():
    # numpy.histogram_bin_edges(x, bins="fd") on this sample asks for about 3.8e9
    # bins (a 28 GiB array, MemoryError); we use RULE_MAX_BINS equal-width bins and say so
    from infoscope.encode.binning import RULE_MAX_BINS

    x = np.r_[np.random.default_rng(4).normal(size=1000), 1e9]
    with pytest.warns(DataQualityWarning, match=r"rule 'fd' asks for [\d,]+ bins .*10,000 equal-width bins"):
        edges = bin_edges(x, bins="fd")
    np.testing.assert_array_equal(edges, np.linspace(x.min(), x.max(), RULE_MAX_BINS + 1))  # numpy.linspace
    with pytest.warns(DataQualityWarning, match=r"column 'v': rule 'fd' asks for"):
        col = encode_column(x, name="v", bins="fd", cache=False)
    assert col.k <= RULE_MAX_BINS


def test_ranges_beyond_the_float_range_and_huge_bin_counts_are_clear_errors():
    x = np.array([-1.7e308, 0.0, 1.7e308])
    with pytest.raises(ValueError, match="wider than the largest float"):
        bin_edges(x, bins=4)
    with pytest.raises(ValueError, match="wider than the largest float"):
        bin_edges(x, bins="fd")
    # quantiles need no differences: numpy.quantile works on this sample
    np.testing.assert_array_equal(bin_edges(x, bins=2, strategy="quantile"), np.quantile(x, [0, 0.5, 1]))
    with pytest.raises(ValueError, match="bins=1000000000 is too many bins"):
        bin_edges(np.arange(5.0), bins=10**9)


# ---------------------------------------------------------------- the "rows" rule


def test_rows_rule_keeps_about_ten_rows_per_cell_of_a_pair():
    # b = floor(sqrt(n / 10)) within [2, 16]: n / b^2 >= 10 whenever the clip does
    # not bind (twice the chi-square rule of thumb of 5 expected rows per cell,
    # Cochran 1954, common practice; why twice: see rows_bin_count)
    from infoscope.encode.binning import rows_bin_count

    for n in range(40, 2560):
        b = rows_bin_count(n)
        assert n / b ** 2 >= 10 and n / (b + 1) ** 2 < 10
    assert [rows_bin_count(n) for n in (0, 39, 100, 300, 1000, 2559, 2560, 10**7)] == [2, 2, 3, 5, 10, 15, 16, 16]
    with pytest.raises(ValueError, match="n_values"):
        rows_bin_count(-1)


def test_rows_rule_then_bins_by_the_strategy(normal):
    # with "rows" the count comes from the number of finite values, the edges from
    # the strategy: equal to numpy.quantile / numpy.histogram_bin_edges with that count
    x = np.concatenate([normal[:300], [np.nan] * 50])
    edges = bin_edges(x, bins="rows", strategy="quantile")
    np.testing.assert_allclose(edges, np.quantile(normal[:300], np.linspace(0, 1, 6)))
    np.testing.assert_allclose(bin_edges(x, bins="rows", strategy="uniform"),
                               np.histogram_bin_edges(normal[:300], bins=5))
