"""The functional API on samples, checked against scikit-learn, pyitlib, scipy and closed forms.
Section and equation numbers of Cover & Thomas (2006), Elements of Information
Theory, 2nd ed., Wiley, are cited from memory.
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
import scipy.stats
from pyitlib import discrete_random_variable as drv
from sklearn import metrics

import infoscope
from infoscope import DataQualityWarning, SmallSampleWarning
from infoscope import measures as m
from infoscope.estimators import continuous

LN2 = math.log(2)


@pytest.fixture
def labels(rng):
    """Two related label columns (strings and integers) of 500 rows."""
    x = rng.choice(["north", "south", "east", "west"], size=500, p=[0.4, 0.3, 0.2, 0.1])
    noise = rng.integers(0, 3, 500)
    y = np.where(rng.random(500) < 0.6, (x == "north").astype(int) + (x == "east") * 2, noise)
    return x, y


# ----------------------------------------------------------------- labels
def test_entropy_of_labels_matches_scipy(labels):
    x, _ = labels
    counts = np.unique(x, return_counts=True)[1]
    # scipy.stats.entropy(counts, base=2): plug-in entropy of the label counts.
    assert m.entropy(x, estimator="plugin") == pytest.approx(scipy.stats.entropy(counts, base=2), rel=1e-12)
    # Miller (1955): + (m - 1) / (2N) nats, m = 4 observed labels.
    expected = scipy.stats.entropy(counts) + 3 / (2 * 500)
    assert m.entropy(x, estimator="miller_madow", base="nats") == pytest.approx(expected, rel=1e-12)


def test_mutual_information_of_labels_matches_sklearn(labels):
    x, y = labels
    # scikit-learn: metrics.mutual_info_score(x, y), plug-in, nats.
    expected = metrics.mutual_info_score(x, y)
    assert m.mutual_information(x, y, estimator="plugin", base="nats") == pytest.approx(expected, rel=1e-12)
    assert infoscope.mutual_information(x, y, estimator="plugin") == pytest.approx(expected / LN2, rel=1e-12)


def test_mutual_information_of_a_column_with_itself_is_its_entropy(labels):
    x, _ = labels
    # Closed form: I(X; X) = H(X) (Cover & Thomas 2006, eq. 2.47, from memory).
    assert m.mutual_information(x, x, estimator="plugin") == pytest.approx(m.entropy(x, estimator="plugin"), rel=1e-12)


def test_joint_and_conditional_entropy_match_pyitlib(labels, rng):
    x, y = labels
    z = rng.integers(0, 2, 500)
    codes_x = pd.factorize(x)[0]
    # pyitlib: drv.entropy_joint(np.vstack(...)) and drv.entropy_conditional(Y, X), plug-in, bits.
    assert m.joint_entropy(x, y, z, estimator="plugin") == pytest.approx(
        drv.entropy_joint(np.vstack([codes_x, y, z])), rel=1e-10
    )
    assert m.conditional_entropy(y, given=x, estimator="plugin") == pytest.approx(
        drv.entropy_conditional(y, codes_x), rel=1e-10
    )


def test_conditional_mutual_information_matches_pyitlib(labels, rng):
    x, y = labels
    z = np.where(rng.random(500) < 0.5, y, rng.integers(0, 3, 500))
    codes_x = pd.factorize(x)[0]
    # pyitlib: drv.information_mutual_conditional(X, Y, Z), plug-in, bits.
    assert m.conditional_mutual_information(x, y, z, estimator="plugin") == pytest.approx(
        drv.information_mutual_conditional(codes_x, y, z), rel=1e-10
    )


@pytest.mark.parametrize("method", ["min", "geometric", "arithmetic", "max"])
def test_nmi_and_ami_match_sklearn(labels, method):
    x, y = labels
    # scikit-learn: normalized_mutual_info_score / adjusted_mutual_info_score(average_method=method).
    assert m.normalized_mutual_information(x, y, normalization=method) == pytest.approx(
        metrics.normalized_mutual_info_score(x, y, average_method=method), rel=1e-10
    )
    assert m.adjusted_mutual_information(x, y, normalization=method) == pytest.approx(
        metrics.adjusted_mutual_info_score(x, y, average_method=method), rel=1e-8
    )


def test_nmi_joint_and_vi_match_pyitlib(labels):
    x, y = labels
    codes_x = pd.factorize(x)[0]
    # pyitlib: information_mutual_normalised(norm_factor='XY') and information_variation.
    assert m.normalized_mutual_information(x, y, normalization="joint") == pytest.approx(
        drv.information_mutual_normalised(codes_x, y, norm_factor="XY"), rel=1e-10
    )
    assert m.variation_of_information(x, y) == pytest.approx(drv.information_variation(codes_x, y), rel=1e-10)


def test_g_test_matches_scipy_on_the_crosstab(labels):
    x, y = labels
    table = pd.crosstab(x, y).to_numpy()
    # scipy: chi2_contingency(crosstab, correction=False, lambda_="log-likelihood").
    ref = scipy.stats.chi2_contingency(table, correction=False, lambda_="log-likelihood")
    res = m.g_test(x, y)
    assert res.statistic == pytest.approx(ref.statistic, rel=1e-10)
    assert res.dof == ref.dof
    assert res.p_value == pytest.approx(ref.pvalue, rel=1e-8)


# ----------------------------------------------------------------- binning
def test_binned_entropy_matches_numpy_histogram(rng):
    x = rng.gamma(2.0, size=3000)
    # numpy.histogram(x, bins=10): ten equal-width bins over the range (numpy's edges),
    # then scipy.stats.entropy of the bin counts.
    counts, edges = np.histogram(x, bins=10)
    assert m.entropy(x, bins=10, strategy="uniform", estimator="plugin") == pytest.approx(
        scipy.stats.entropy(counts, base=2), rel=1e-12
    )
    # explicit edges are used as given
    assert m.entropy(x, bins=edges, estimator="plugin") == pytest.approx(scipy.stats.entropy(counts, base=2), rel=1e-12)


def test_binned_mutual_information_matches_sklearn_on_histogram2d(rng):
    x = rng.normal(size=4000)
    y = 0.8 * x + 0.6 * rng.normal(size=4000)
    # numpy.histogram2d on equal-width bins, then sklearn mutual_info_score(contingency=...).
    table = np.histogram2d(x, y, bins=[np.histogram_bin_edges(x, 8), np.histogram_bin_edges(y, 8)])[0]
    expected = metrics.mutual_info_score(None, None, contingency=table.astype(np.int64))
    got = m.mutual_information(x, y, bins=8, strategy="uniform", estimator="plugin", base="nats")
    assert got == pytest.approx(expected, rel=1e-12)
    # and below the Gaussian closed form -1/2 ln(1 - rho^2), rho = 0.8 (data processing:
    # binning cannot add information; Cover & Thomas 2006, sec. 2.8)
    assert got < -0.5 * math.log(1 - 0.8**2)


def test_quantile_bins_are_the_default_strategy(rng):
    x = rng.exponential(size=1000)
    # equal-frequency bins: 4 quantile bins of 1000 distinct values hold 250 each -> 2 bits
    assert m.entropy(x, bins=4, estimator="plugin") == pytest.approx(2.0, abs=1e-12)


def test_iris_features_binned_against_species_match_sklearn():
    # scikit-learn's bundled iris data (sklearn.datasets.load_iris, no download):
    # MI between the species and each feature cut into 5 equal-width bins (numpy's
    # histogram edges), compared with sklearn.metrics.mutual_info_score on those codes.
    from sklearn.datasets import load_iris

    data = load_iris()
    species = data.target
    for j, feature in enumerate(data.feature_names):
        x = data.data[:, j]
        edges = np.histogram_bin_edges(x, bins=5)
        codes = np.clip(np.searchsorted(edges, x, side="right") - 1, 0, 4)
        expected = metrics.mutual_info_score(species, codes)
        got = m.mutual_information(x, species, bins=5, strategy="uniform", estimator="plugin", base="nats")
        assert got == pytest.approx(expected, rel=1e-12), feature


def test_binned_column_with_missing_as_a_category(rng):
    x = rng.normal(size=400)
    x[::9] = np.nan
    y = rng.integers(0, 3, 400)
    edges = np.histogram_bin_edges(x[~np.isnan(x)], bins=4)
    codes = np.where(np.isnan(x), 99, np.clip(np.searchsorted(edges, x, side="right") - 1, 0, 3))
    # scikit-learn with the missing rows as a fifth label
    expected = metrics.mutual_info_score(codes, y)
    got = m.mutual_information(x, y, bins=4, strategy="uniform", missing="category", estimator="plugin", base="nats")
    assert got == pytest.approx(expected, rel=1e-12)


def test_relabelling_the_values_changes_nothing(labels):
    x, y = labels
    renamed = np.char.add("site-", x)
    # Invariance of every measure to a one-to-one relabelling (common practice; the
    # measures depend only on the partition of the rows).
    for func in (m.mutual_information, m.normalized_mutual_information, m.variation_of_information):
        assert func(renamed, y) == pytest.approx(func(x, y), rel=1e-12)


# ----------------------------------------------------------------- kNN dispatch
def test_ksg_dispatch_is_the_continuous_estimator_and_near_gaussian_closed_form(rng):
    n, rho = 2000, 0.6
    x = rng.normal(size=n)
    y = rho * x + math.sqrt(1 - rho**2) * rng.normal(size=n)
    got = m.mutual_information(x, y, estimator="ksg", base="nats")
    assert got == continuous.ksg_mutual_information(x, y, k=3, algorithm=1, base="nats", seed=0)
    # Closed form for a bivariate Gaussian: I = -1/2 ln(1 - rho^2) = 0.2231 nats
    # (Cover & Thomas 2006, Example 8.5.1, from memory); KSG is nearly unbiased for
    # Gaussians at this n (Kraskov et al. 2004), hence the 0.04-nat tolerance.
    assert got == pytest.approx(-0.5 * math.log(1 - rho**2), abs=0.04)
    got2 = m.mutual_information(x, y, estimator="ksg2", base="nats")
    assert got2 == continuous.ksg_mutual_information(x, y, k=3, algorithm=2, base="nats", seed=0)


def test_ksg_with_a_label_side_uses_the_mixed_estimator(rng):
    n = 1000
    cls = rng.choice(["low", "high"], size=n)
    x = np.where(cls == "high", 10.0, 0.0) + rng.normal(size=n)
    got = m.mutual_information(x, cls, estimator="ksg")
    # Classes separated by 10 standard deviations: I = H(class) = H_b(share of "high") (closed form).
    share = np.mean(cls == "high")
    hb = -(share * math.log2(share) + (1 - share) * math.log2(1 - share))
    assert got == pytest.approx(hb, abs=0.03)
    codes = pd.factorize(cls)[0]
    assert got == continuous.mixed_mutual_information(x, codes, k=3, base=2, seed=0)
    # the same with the sides swapped
    assert m.mutual_information(cls, x, estimator="ksg") == got


def test_integer_class_labels_reach_the_mixed_estimator_when_declared(rng):
    y = rng.integers(0, 3, 400)
    x = 4.0 * y + rng.normal(size=400)
    got = m.mutual_information(x, y, estimator="ksg", discrete="y")
    # the continuous module's Ross (2014) estimator on the same data
    assert got == continuous.mixed_mutual_information(x, pd.factorize(y)[0], k=3, base=2, seed=0)
    with pytest.raises(ValueError, match="discrete='z' is not valid"):
        m.mutual_information(x, y, estimator="ksg", discrete="z")


def test_ksg_drops_rows_with_missing_values(rng):
    x = rng.normal(size=300)
    y = x + rng.normal(size=300)
    x_missing = x.copy()
    x_missing[:10] = np.nan
    assert m.mutual_information(x_missing, y, estimator="ksg") == m.mutual_information(x[10:], y[10:], estimator="ksg")


# ----------------------------------------------------------------- missing values
def test_missing_drop_is_pairwise_complete(labels):
    x, y = labels
    xs = pd.Series(x, dtype=object)
    xs[:20] = None
    ys = pd.Series(y, dtype="Int64")
    ys[15:40] = pd.NA
    keep = xs.notna() & ys.notna()
    # scikit-learn on the complete rows only
    expected = metrics.mutual_info_score(xs[keep].astype(str), ys[keep].astype(int))
    assert m.mutual_information(xs, ys, estimator="plugin", base="nats") == pytest.approx(expected, rel=1e-12)


def test_missing_category_makes_missing_a_label(labels):
    x, y = labels
    xs = pd.Series(x, dtype=object)
    xs[::7] = np.nan
    # scikit-learn with missing written as its own label
    expected = metrics.mutual_info_score(xs.fillna("(missing)"), y)
    assert m.mutual_information(xs, y, estimator="plugin", base="nats", missing="category") == pytest.approx(
        expected, rel=1e-12
    )


def test_missing_error_names_the_column():
    s = pd.Series(["a", None, "b"], name="depot")
    with pytest.raises(ValueError, match=r"x \('depot'\) has 1 missing value\(s\) \(first at row 1\)"):
        m.mutual_information(s, [1, 2, 3], missing="error")


def test_infinite_values_are_missing_with_a_warning():
    x = np.tile([1.0, 2.0, np.inf, 1.0, 2.0, 1.0], 10)
    y = np.tile([0, 1, 1, 0, 1, 0], 10)
    with pytest.warns(DataQualityWarning, match="x has 10 infinite value"):
        got = m.mutual_information(x, y, estimator="plugin")
    finite = np.isfinite(x)
    assert got == pytest.approx(m.mutual_information(x[finite], y[finite], estimator="plugin"))


def test_empty_input_is_a_clear_error():
    with pytest.raises(ValueError, match="x and y are empty"):
        m.g_test([], [])


def test_all_rows_missing_is_a_clear_error():
    with pytest.raises(ValueError, match="no rows left: there is no row where x and y are all present"):
        m.mutual_information([None, "a"], [1.0, np.nan])


# ----------------------------------------------------------------- inputs
def test_input_is_not_modified(labels):
    x, y = labels
    xs = pd.Series(x, dtype=object)
    xs[:5] = None
    before_x, before_y = xs.copy(), y.copy()
    m.mutual_information(xs, y, missing="category")
    # y has 3 values for 4 quantile bins: one bin per value, nothing merged, no warning
    m.mutual_information(xs, y, bins=4)
    pd.testing.assert_series_equal(xs, before_x)
    np.testing.assert_array_equal(y, before_y)


def test_polars_series_are_accepted(labels):
    import polars as pl
    x, y = labels
    # scikit-learn on the same labels
    assert m.mutual_information(pl.Series(x), pl.Series(y), estimator="plugin", base="nats") == pytest.approx(
        metrics.mutual_info_score(x, y), rel=1e-12
    )


def test_mixed_type_labels_are_kept_apart():
    # 1 and "1" are different labels (a Python list is read as objects, not strings).
    assert m.entropy([1, "1", 1, "1"], estimator="plugin") == 1.0


def test_sparse_tables_warn_for_mi_cmi_and_g_test():
    # 8 rows over a 4 x 4 table: 0.5 rows per cell (common practice: at least 5).
    x, y = [0, 1, 2, 3] * 2, [0, 1, 2, 3, 1, 0, 3, 2]
    with pytest.warns(SmallSampleWarning, match="has 16 cells for 8 rows"):
        m.mutual_information(x, y)
    with pytest.warns(SmallSampleWarning, match="chi-square p-value is unreliable"):
        m.g_test(x, y)
    with pytest.warns(SmallSampleWarning, match="x, y and given"):
        m.conditional_mutual_information(x, y, [0, 1] * 4)


def test_continuous_looking_labels_warn(rng):
    with pytest.warns(DataQualityWarning, match="looks continuous .*pass bins="):
        m.entropy(rng.normal(size=100))


# ----------------------------------------------------------------- bad input
def test_mismatched_lengths():
    with pytest.raises(ValueError, match="x has 3, y has 4"):
        m.mutual_information([1, 2, 3], [1, 2, 3, 4])
    with pytest.raises(ValueError, match="x has 2, y has 2, given has 3"):
        m.conditional_mutual_information([1, 2], [1, 2], [1, 2, 3])


def test_bad_options_are_named():
    with pytest.raises(ValueError, match=r"missing='skip' is not valid; choose one of: 'drop', 'category', 'error'"):
        m.entropy([1, 2], missing="skip")
    with pytest.raises(ValueError, match=r"normalization='sum' is not valid; choose one of: 'min', 'geometric'"):
        m.normalized_mutual_information([1, 2], [1, 2], normalization="sum")
    with pytest.raises(ValueError, match="estimator='ksg' works on continuous samples"):
        m.entropy([1.0, 2.0], estimator="ksg")
    with pytest.raises(ValueError, match="bins= is not used by estimator='ksg'"):
        m.mutual_information([1.0, 2.0], [1.0, 2.0], estimator="ksg", bins=4)
    with pytest.raises(ValueError, match="both discrete"):
        m.mutual_information(["a", "b"], ["c", "d"], estimator="ksg")
    with pytest.raises(ValueError, match="strategy='equal' is not valid"):
        m.entropy([1.0, 2.0], bins=2, strategy="equal")


def test_non_1d_input_is_rejected():
    with pytest.raises(ValueError, match=r"x must be 1-D \(one value per row\), got shape \(2, 2\)"):
        m.mutual_information(np.ones((2, 2)), [1, 2])
    with pytest.raises(TypeError, match="values must be a 1-D sequence of values, got a single str"):
        m.entropy("abc")


def test_joint_table_size_is_guarded():
    ids = np.arange(10_000)
    with pytest.raises(ValueError, match="would have 1,000,000,000,000 cells"):
        m.joint_entropy(ids, ids, ids)
