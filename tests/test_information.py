"""Information measures on count tables, checked against outside references.

Each check names its reference beside it: scikit-learn (mutual_info_score,
normalized_mutual_info_score, adjusted_mutual_info_score, expected_mutual_information),
pyitlib (drv.*), scipy (chi2_contingency, false_discovery_control, stats.entropy),
closed forms and a hand-worked table.

Section and equation numbers of Cover & Thomas (2006), Elements of Information
Theory, 2nd ed., Wiley, are cited from memory.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.stats
from pyitlib import discrete_random_variable as drv
from sklearn import metrics
from sklearn.metrics.cluster._expected_mutual_info_fast import expected_mutual_information

from infoscope.estimators.information import (
    NORMALIZATIONS,
    GTestResult,
    adjusted_mutual_information_from_table,
    benjamini_hochberg,
    conditional_entropy_from_table,
    conditional_mutual_information_from_table,
    expected_mutual_information_from_table,
    g_test_from_table,
    g_test_from_tables,
    joint_entropy_from_counts,
    mutual_information_from_table,
    normalized_mutual_information_from_table,
    pointwise_mutual_information,
    variation_of_information_from_table,
)

LN2 = math.log(2)


def labels_of(table):
    """Expand a 2-D count table into two label vectors (one pair per counted row)."""
    t = np.asarray(table, dtype=np.int64)
    i, j = np.indices(t.shape)
    return np.repeat(i.ravel(), t.ravel()), np.repeat(j.ravel(), t.ravel())


def random_table(rng, r, c, n):
    """A table of n rows with some structure: a noisy diagonal."""
    x = rng.integers(0, r, n)
    y = np.where(rng.random(n) < 0.4, x % c, rng.integers(0, c, n))
    t = np.zeros((r, c), dtype=np.int64)
    np.add.at(t, (x, y), 1)
    return t


# ----------------------------------------------------------------- plug-in MI
@pytest.mark.parametrize("shape,n", [((2, 2), 30), ((3, 5), 200), ((8, 6), 1000), ((12, 3), 57)])
def test_plugin_mi_matches_sklearn_mutual_info_score(rng, shape, n):
    t = random_table(rng, *shape, n)
    # scikit-learn: metrics.mutual_info_score(None, None, contingency=T), plug-in, nats.
    expected = metrics.mutual_info_score(None, None, contingency=t)
    got = mutual_information_from_table(t, estimator="plugin", base="nats")
    assert got == pytest.approx(expected, rel=1e-12, abs=1e-15)
    assert mutual_information_from_table(t, estimator="plugin", base=2) == pytest.approx(expected / LN2, rel=1e-12, abs=1e-15)


def test_hand_worked_2x2_table():
    # Hand-worked: T = [[3, 1], [1, 3]], N = 8, both margins (1/2, 1/2).
    # p = 3/8, 1/8, 1/8, 3/8; p_i p_j = 1/4 everywhere.
    # I = 2 (3/8) log2(3/2) + 2 (1/8) log2(1/2) = 0.75 * 0.5849625 - 0.25 = 0.1887219 bits,
    # which is also 1 - H_b(1/4) = 1 - 0.8112781 (binary entropy of the off-diagonal share).
    got = mutual_information_from_table([[3, 1], [1, 3]], estimator="plugin", base=2)
    assert got == pytest.approx(0.75 * math.log2(1.5) - 0.25, rel=1e-12)
    assert got == pytest.approx(0.1887219, abs=1e-7)


def test_mi_of_independent_table_is_zero():
    # Closed form: a table that is exactly the outer product of its margins has I = 0.
    t = np.outer([1, 2, 3], [2, 5, 1, 4]) * 7
    assert mutual_information_from_table(t, estimator="plugin") == 0.0 or abs(
        mutual_information_from_table(t, estimator="plugin")
    ) < 1e-15


def test_mi_of_identical_variables_is_entropy():
    # Closed form: I(X; X) = H(X); H checked with scipy.stats.entropy(counts, base=2).
    counts = np.array([5, 1, 7, 3])
    got = mutual_information_from_table(np.diag(counts), estimator="plugin")
    assert got == pytest.approx(scipy.stats.entropy(counts, base=2), rel=1e-12)


def test_empty_rows_and_columns_do_not_change_plugin_mi(rng):
    # Closed form: empty cells contribute 0 log 0 = 0 (convention of Cover & Thomas 2006, sec. 2.1).
    t = random_table(rng, 3, 4, 100)
    padded = np.zeros((5, 6), dtype=np.int64)
    padded[1:4, 2:6] = t
    assert mutual_information_from_table(padded, estimator="plugin") == pytest.approx(
        mutual_information_from_table(t, estimator="plugin"), rel=1e-12
    )


def test_miller_madow_mi_is_plugin_plus_cell_count_correction(rng):
    # Miller (1955): H_MM = H_ML + (m - 1) / (2N) nats, m = non-empty cells.  Hence
    # I_MM = I_ML + ((m_x - 1) + (m_y - 1) - (m_xy - 1)) / (2N), which can be negative.
    t = np.array([[3, 1, 0], [1, 3, 2]])
    m_x, m_y, m_xy, n = 2, 3, 5, t.sum()
    plugin = metrics.mutual_info_score(None, None, contingency=t)  # scikit-learn, nats
    expected = plugin + ((m_x - 1) + (m_y - 1) - (m_xy - 1)) / (2 * n)
    got = mutual_information_from_table(t, estimator="miller_madow", base="nats")
    assert got == pytest.approx(expected, rel=1e-12)
    # an independent table: the correction makes the estimate negative and it is kept
    indep = np.ones((3, 3), dtype=int) * 4
    assert mutual_information_from_table(indep, estimator="miller_madow", base="nats") == pytest.approx(
        (2 + 2 - 8) / (2 * 36), rel=1e-12
    )


# ----------------------------------------------------------------- entropies
def test_joint_entropy_matches_scipy_entropy_of_flattened_counts(rng):
    t = rng.integers(0, 9, size=(3, 4, 2))
    # scipy.stats.entropy(counts, base=2) normalises the counts: plug-in entropy.
    assert joint_entropy_from_counts(t, estimator="plugin") == pytest.approx(
        scipy.stats.entropy(t.ravel(), base=2), rel=1e-12
    )


def test_conditional_entropy_matches_pyitlib(rng):
    t = random_table(rng, 4, 3, 300)
    x, y = labels_of(t)  # rows = X, columns = Y
    # pyitlib: drv.entropy_conditional(X, Y) = H(X | Y), plug-in ('ML'), bits.
    assert conditional_entropy_from_table(t, given_axis=1, estimator="plugin") == pytest.approx(
        drv.entropy_conditional(x, y), rel=1e-10
    )
    assert conditional_entropy_from_table(t, given_axis=0, estimator="plugin") == pytest.approx(
        drv.entropy_conditional(y, x), rel=1e-10
    )


def test_conditional_entropy_of_nd_table_is_chain_rule(rng):
    # Chain rule (Cover & Thomas 2006, eq. 2.14): H(X, Y | Z) = H(X, Y, Z) - H(Z).
    t = rng.integers(0, 6, size=(3, 2, 4))
    expected = scipy.stats.entropy(t.ravel(), base=2) - scipy.stats.entropy(t.sum(axis=(0, 1)), base=2)
    assert conditional_entropy_from_table(t, given_axis=2, estimator="plugin") == pytest.approx(expected, rel=1e-12)
    assert conditional_entropy_from_table(t, given_axis=(-1,), estimator="plugin") == pytest.approx(expected, rel=1e-12)


# ----------------------------------------------------------------- CMI
def test_cmi_matches_pyitlib_and_stratified_sklearn(rng):
    n = 600
    z = rng.integers(0, 3, n)
    x = (z + rng.integers(0, 2, n)) % 4
    y = np.where(rng.random(n) < 0.5, x, rng.integers(0, 4, n))
    t = np.zeros((4, 4, 3), dtype=np.int64)
    np.add.at(t, (x, y, z), 1)
    got = conditional_mutual_information_from_table(t, estimator="plugin", base=2)
    # pyitlib: drv.information_mutual_conditional(X, Y, Z), plug-in, bits.
    assert got == pytest.approx(drv.information_mutual_conditional(x, y, z), rel=1e-10)
    # Definition (Cover & Thomas 2006, sec. 2.5): sum_z p(z) I(X; Y | Z = z), with
    # each stratum's MI from sklearn.metrics.mutual_info_score (nats).
    strat = sum(
        (z == v).mean() * metrics.mutual_info_score(x[z == v], y[z == v]) for v in range(3)
    )
    assert got == pytest.approx(strat / LN2, rel=1e-10)


# ----------------------------------------------------------------- NMI
@pytest.mark.parametrize("method", ["min", "geometric", "arithmetic", "max"])
def test_nmi_matches_sklearn(rng, method):
    t = random_table(rng, 5, 4, 400)
    x, y = labels_of(t)
    # scikit-learn: normalized_mutual_info_score(x, y, average_method=method).
    expected = metrics.normalized_mutual_info_score(x, y, average_method=method)
    assert normalized_mutual_information_from_table(t, normalization=method) == pytest.approx(expected, rel=1e-10)


def test_nmi_joint_matches_pyitlib():
    t = np.array([[20, 5, 1], [3, 30, 4], [2, 2, 25], [6, 1, 1]])
    x, y = labels_of(t)
    # pyitlib: drv.information_mutual_normalised(X, Y, norm_factor='XY') = I / H(X, Y).
    expected = drv.information_mutual_normalised(x, y, norm_factor="XY")
    assert normalized_mutual_information_from_table(t, normalization="joint") == pytest.approx(expected, rel=1e-10)


@pytest.mark.parametrize("method", sorted(NORMALIZATIONS))
def test_nmi_of_a_constant_variable_is_undefined(method):
    # A constant variable has no entropy: its normalised MI is 0/0 for "min" and
    # "geometric" (Kvalseth 1987's forms) and undefined in meaning for the others.
    # scikit-learn's normalized_mutual_info_score returns 1.0 (both constant) and
    # 0.0 (one constant); we return NaN instead, on purpose (issue 10).
    assert math.isnan(normalized_mutual_information_from_table([[7]], normalization=method))
    assert math.isnan(normalized_mutual_information_from_table([[0, 0], [0, 7]], normalization=method))
    assert math.isnan(normalized_mutual_information_from_table([[3, 4]], normalization=method))
    assert math.isnan(normalized_mutual_information_from_table([[3, 4]], normalization=method,
                                                               estimator="miller_madow"))
    if method != "joint":
        assert metrics.normalized_mutual_info_score([0] * 7, [0, 0, 0, 1, 1, 1, 1], average_method=method) == 0.0


def test_nmi_unknown_normalization_lists_the_valid_ones():
    with pytest.raises(ValueError, match=r"normalization='sum'.*'min', 'geometric', 'arithmetic', 'max', 'joint'"):
        normalized_mutual_information_from_table([[1, 2], [3, 4]], normalization="sum")


# ----------------------------------------------------------------- EMI / AMI
@pytest.mark.parametrize("shape,n", [((2, 2), 4), ((3, 4), 50), ((7, 5), 400), ((6, 9), 5000)])
def test_expected_mi_matches_sklearn(rng, shape, n):
    t = random_table(rng, *shape, n)
    t = t[t.sum(axis=1) > 0][:, t.sum(axis=0) > 0]
    # scikit-learn: expected_mutual_information(contingency, n_samples), nats (exact sum).
    expected = expected_mutual_information(t.astype(np.int64), int(t.sum()))
    assert expected_mutual_information_from_table(t, base="nats") == pytest.approx(expected, rel=1e-9)


@pytest.mark.parametrize("method", ["min", "geometric", "arithmetic", "max"])
@pytest.mark.parametrize("shape,n", [((3, 3), 30), ((6, 4), 300), ((10, 12), 20000)])
def test_ami_matches_sklearn(rng, method, shape, n):
    t = random_table(rng, *shape, n)
    x, y = labels_of(t)
    # scikit-learn: adjusted_mutual_info_score(x, y, average_method=method).
    expected = metrics.adjusted_mutual_info_score(x, y, average_method=method)
    got = adjusted_mutual_information_from_table(t, normalization=method)
    assert got == pytest.approx(expected, rel=1e-8, abs=1e-12)


def test_ami_of_independent_labels_is_near_zero_and_can_be_negative(rng):
    # Vinh, Epps & Bailey (2010): AMI has expectation 0 under random labelling.
    vals = []
    for _ in range(30):
        x, y = rng.integers(0, 4, 60), rng.integers(0, 3, 60)
        t = np.zeros((4, 3), dtype=int)
        np.add.at(t, (x, y), 1)
        vals.append(adjusted_mutual_information_from_table(t))
        # scikit-learn: the same value from the labels
        assert vals[-1] == pytest.approx(metrics.adjusted_mutual_info_score(x, y), rel=1e-8, abs=1e-12)
    assert min(vals) < 0 < max(vals)
    assert abs(np.mean(vals)) < 0.02


def test_ami_of_a_constant_variable_is_undefined():
    # Departs from scikit-learn's adjusted_mutual_info_score (1.0 both constant, 0.0
    # one constant) on purpose: a variable without entropy has no share to adjust.
    assert math.isnan(adjusted_mutual_information_from_table([[5]]))
    assert math.isnan(adjusted_mutual_information_from_table([[2, 3]]))
    assert metrics.adjusted_mutual_info_score([0] * 5, [0, 0, 1, 1, 1]) == 0.0


def test_ami_rejects_joint_and_unknown_normalizations():
    with pytest.raises(ValueError, match=r"normalization='joint'.*'min', 'geometric', 'arithmetic', 'max'"):
        adjusted_mutual_information_from_table([[1, 2], [3, 4]], normalization="joint")


# ----------------------------------------------------------------- VI
def test_vi_matches_pyitlib(rng):
    t = random_table(rng, 5, 3, 250)
    x, y = labels_of(t)
    # pyitlib: drv.information_variation(X, Y) = H(X|Y) + H(Y|X), plug-in, bits.
    assert variation_of_information_from_table(t) == pytest.approx(drv.information_variation(x, y), rel=1e-10)
    assert variation_of_information_from_table(np.diag([3, 4, 5])) == 0.0


# ----------------------------------------------------------------- G-test
@pytest.mark.parametrize("shape,n", [((2, 2), 40), ((3, 4), 120), ((6, 5), 2000)])
def test_g_test_matches_scipy_log_likelihood_chi2_contingency(rng, shape, n):
    t = random_table(rng, *shape, n) + 1  # no empty rows or columns
    # scipy: chi2_contingency(T, correction=False, lambda_="log-likelihood") is the G-test.
    ref = scipy.stats.chi2_contingency(t, correction=False, lambda_="log-likelihood")
    res = g_test_from_table(t)
    assert isinstance(res, GTestResult)
    assert res.statistic == pytest.approx(ref.statistic, rel=1e-10)
    assert res.dof == ref.dof
    assert res.p_value == pytest.approx(ref.pvalue, rel=1e-8)
    # G = 2 N I (Kullback 1959): the same number from sklearn's plug-in MI in nats.
    assert res.statistic == pytest.approx(2 * t.sum() * metrics.mutual_info_score(None, None, contingency=t), rel=1e-10)


def test_g_test_counts_only_nonempty_rows_and_columns():
    t = np.array([[10, 3, 0], [0, 0, 0], [2, 9, 0], [4, 4, 0]])
    core = t[[0, 2, 3]][:, [0, 1]]
    # scipy: chi2_contingency on the table without its empty row and column.
    ref = scipy.stats.chi2_contingency(core, correction=False, lambda_="log-likelihood")
    res = g_test_from_table(t)
    assert res.dof == 2 == ref.dof
    assert res.statistic == pytest.approx(ref.statistic, rel=1e-10)
    assert res.p_value == pytest.approx(ref.pvalue, rel=1e-8)


def test_g_test_with_a_constant_variable_has_no_dof():
    # scipy.stats.chi2_contingency returns statistic 0 and p = 1 when dof == 0.
    res = g_test_from_table([[4, 6, 2]])
    assert res == GTestResult(0.0, 0, 1.0)


def test_g_test_from_tables_equals_one_at_a_time(rng):
    tables = [random_table(rng, 3, 3, 50) + 1 for _ in range(5)] + [random_table(rng, 2, 4, 80) + 1]
    tables.append(np.zeros((2, 2), dtype=int))  # no observations -> nan p-value, no error
    res = g_test_from_tables(tables)
    for i, t in enumerate(tables[:-1]):
        ref = scipy.stats.chi2_contingency(t, correction=False, lambda_="log-likelihood")
        assert res.statistic[i] == pytest.approx(ref.statistic, rel=1e-10)
        assert res.dof[i] == ref.dof
        assert res.p_value[i] == pytest.approx(ref.pvalue, rel=1e-8)
    assert res.statistic[-1] == 0 and res.dof[-1] == 0 and np.isnan(res.p_value[-1])
    stacked = g_test_from_tables(np.stack(tables[:5]))
    np.testing.assert_allclose(stacked.statistic, res.statistic[:5], rtol=1e-12)


# ----------------------------------------------------------------- BH
def test_benjamini_hochberg_matches_scipy(rng):
    p = np.concatenate([rng.random(40), rng.random(10) * 1e-3, [0.0, 1.0, 0.5, 0.5]])
    # scipy: stats.false_discovery_control(p, method="bh").
    np.testing.assert_allclose(benjamini_hochberg(p), scipy.stats.false_discovery_control(p, method="bh"), rtol=1e-12)


def test_benjamini_hochberg_leaves_nan_out_of_the_count():
    p = np.array([0.01, np.nan, 0.04, 0.03])
    q = benjamini_hochberg(p)
    assert np.isnan(q[1])
    # scipy on the three tests that were run
    np.testing.assert_allclose(q[[0, 2, 3]], scipy.stats.false_discovery_control(p[[0, 2, 3]]), rtol=1e-12)


def test_benjamini_hochberg_rejects_values_outside_unit_interval():
    with pytest.raises(ValueError, match="p_values must lie in"):
        benjamini_hochberg([0.2, 1.3])
    with pytest.raises(TypeError, match="p_values must be numeric"):
        benjamini_hochberg(["0.2", "x"])


# ----------------------------------------------------------------- PMI
def test_pointwise_mi_hand_worked_and_averages_to_mi():
    t = np.array([[2, 0, 0], [1, 1, 0]])
    pmi = pointwise_mutual_information(t, base=2)
    # Hand-worked: N = 4, rows (2, 2), columns (3, 1, 0).
    # cell (0,0): log2(2*4 / (2*3)) = log2(4/3); cell (1,0): log2(1*4/(2*3)) = log2(2/3);
    # cell (1,1): log2(1*4/(2*1)) = 1; cell (0,1): empty with non-empty margins -> -inf;
    # column 2 is empty -> nan (0/0).
    assert pmi[0, 0] == pytest.approx(math.log2(4 / 3))
    assert pmi[1, 0] == pytest.approx(math.log2(2 / 3))
    assert pmi[1, 1] == pytest.approx(1.0)
    assert pmi[0, 1] == -np.inf
    assert np.isnan(pmi[:, 2]).all()
    # Identity: sum over non-empty cells of p_ij pmi_ij is the plug-in MI (sklearn, nats).
    nz = t > 0
    avg = np.sum(t[nz] / t.sum() * pmi[nz])
    assert avg == pytest.approx(metrics.mutual_info_score(None, None, contingency=t) / LN2, rel=1e-12)


# ----------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    "func",
    [
        mutual_information_from_table,
        normalized_mutual_information_from_table,
        adjusted_mutual_information_from_table,
        variation_of_information_from_table,
        g_test_from_table,
        pointwise_mutual_information,
    ],
)
def test_table_functions_reject_bad_tables(func):
    with pytest.raises(ValueError, match="table must be a 2-D table"):
        func([1, 2, 3])
    with pytest.raises(ValueError, match="table contains negative values"):
        func([[1, -2], [3, 4]])
    with pytest.raises(ValueError, match="table contains non-integer values"):
        func([[1, 0.5], [3, 4]])
    with pytest.raises(ValueError, match="table has no observations"):
        func([[0, 0], [0, 0]])
    with pytest.raises(ValueError, match="NaN or infinite"):
        func([[1, np.nan], [3, 4]])


def test_cmi_requires_a_3d_table():
    with pytest.raises(ValueError, match="table3d must be a 3-D table"):
        conditional_mutual_information_from_table([[1, 2], [3, 4]])


def test_unknown_estimator_is_named():
    with pytest.raises(ValueError, match="estimator='nope' is not valid"):
        mutual_information_from_table([[1, 2], [3, 4]], estimator="nope")


def test_bad_given_axis_is_named():
    with pytest.raises(ValueError, match="given_axis=5 is invalid"):
        conditional_entropy_from_table([[1, 2], [3, 4]], given_axis=5)
    with pytest.raises(ValueError, match=r"given_axis=\(0, 1\) is invalid"):
        conditional_entropy_from_table([[1, 2], [3, 4]], given_axis=(0, 1))


@pytest.mark.parametrize("method", ["min", "geometric", "arithmetic", "max"])
@pytest.mark.parametrize("n", [3, 4, 7, 50])
def test_ami_of_an_id_like_side_is_zero_not_rounding_noise(rng, method, n):
    # An all-distinct column x: every relabelling gives the same table up to row
    # order, so I = E[I] exactly (Vinh, Epps & Bailey 2010, eq. for E[I] under the
    # permutation model) and AMI's numerator is 0.  With "min" the denominator is 0
    # too; scikit-learn's adjusted_mutual_info_score then returns rounding noise
    # (1.0, -1.0 or 0.98 for such inputs, checked with 1.9.1), so it is not the reference here.
    x = np.arange(n)
    y = np.r_[0, 1, rng.integers(0, 3, size=n - 2)]
    t = np.zeros((n, 3), dtype=int)
    np.add.at(t, (x, y), 1)
    assert adjusted_mutual_information_from_table(t, normalization=method) == 0.0
    assert adjusted_mutual_information_from_table(t.T, normalization=method) == 0.0
    # where the formula is not 0/0, scikit-learn agrees to rounding
    if method != "min":
        assert metrics.adjusted_mutual_info_score(x, y, average_method=method) == pytest.approx(0.0, abs=1e-12)
    # identical partitions (both sides all distinct): 1, scikit-learn's value
    assert adjusted_mutual_information_from_table(np.eye(n, dtype=int), normalization=method) == 1.0
    assert metrics.adjusted_mutual_info_score(x, x, average_method=method) == 1.0


def test_margin_pairs_sum_equals_the_sum_over_cells():
    # Definition: grouping the cells by their (row total, column total) leaves any sum
    # of a margin-only term unchanged; checked with the term a*b (sum = N^2 exactly)
    # and with scikit-learn's expected_mutual_information through both callers.
    from infoscope.estimators.information import margin_pairs
    from infoscope.estimators.intervals import chance_mi_nats

    rng = np.random.default_rng(3)
    t = rng.integers(0, 4, (7, 6)).astype(float)
    t[2] = 0.0  # an empty row is left out
    a, b, w = margin_pairs(t)
    rows, cols = t.sum(axis=1), t.sum(axis=0)
    cells = [(r, c) for r in rows if r > 0 for c in cols if c > 0]
    assert float(np.sum(w)) == len(cells)
    assert float(np.sum(w * a * b)) == pytest.approx(sum(r * c for r, c in cells), rel=1e-12)
    assert float(np.sum(w * np.log(a) * b**2)) == pytest.approx(sum(np.log(r) * c**2 for r, c in cells), rel=1e-12)
    with np.errstate(divide="ignore"):  # sklearn takes the log of the empty row's total
        ref = expected_mutual_information(t.astype(np.int64), int(t.sum()))  # every cell small: exact in both
    assert expected_mutual_information_from_table(t, base="nats") == pytest.approx(ref, rel=1e-9)
    assert chance_mi_nats(t) == pytest.approx(ref, rel=1e-9)
