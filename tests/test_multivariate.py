"""Measures beyond pairs and observation weights, checked against outside references.

References named beside each check: ``dit`` (dit.multivariate.coinformation,
dit.multivariate.total_correlation, dit.shannon.entropy), ``pyitlib``
(drv.information_co, drv.information_multi, drv.information_mutual_conditional,
drv.entropy), ``scipy.stats.entropy``, and closed forms worked out by hand for the
XOR and AND gates on two fair independent bits (derivations in the comments).
"""
from __future__ import annotations

import math

import dit
import numpy as np
import pytest
import scipy.stats
from dit.multivariate import coinformation, total_correlation
from pyitlib import discrete_random_variable as drv

import infoscope
from infoscope import SmallSampleWarning
from infoscope.estimators.multivariate import (
    WeightedEstimate,
    co_information_from_table,
    effective_sample_size,
    entropy_from_probabilities,
    entropy_of_weighted_table,
    surprisal,
    total_correlation_from_table,
)


def _table_of(*columns):
    cols = [np.asarray(c) for c in columns]
    shape = tuple(int(c.max()) + 1 for c in cols)
    t = np.zeros(shape, dtype=np.int64)
    np.add.at(t, tuple(cols), 1)
    return t


def _dit_distribution(table):
    """A dit Distribution of the cells of a count table (outcomes are digit strings)."""
    t = np.asarray(table, dtype=float)
    idx = np.argwhere(t > 0)
    outcomes = ["".join(str(int(v)) for v in row) for row in idx]
    probs = t[tuple(idx.T)] / t.sum()
    return dit.Distribution(outcomes, probs.tolist())


# ------------------------------------------------------------------ known distributions
def test_entropy_from_probabilities_matches_scipy(rng):
    for k in (2, 5, 40):
        p = rng.dirichlet(np.ones(k))
        # scipy.stats.entropy(p, base=2): the plug-in entropy of a probability vector
        assert entropy_from_probabilities(p) == pytest.approx(scipy.stats.entropy(p, base=2), rel=1e-12)
        assert entropy_from_probabilities(p, base="nats") == pytest.approx(scipy.stats.entropy(p), rel=1e-12)


def test_entropy_from_probabilities_of_joint_array():
    # a 2-D array is a joint distribution: four equal cells are 2 bits (closed form)
    assert entropy_from_probabilities(np.full((2, 2), 0.25)) == 2.0


def test_entropy_from_probabilities_refuses_non_distributions():
    with pytest.raises(ValueError, match="sums to"):
        entropy_from_probabilities([0.5, 0.4])
    with pytest.raises(ValueError, match=r"\[0, 1\]"):
        entropy_from_probabilities([1.5, -0.5])
    with pytest.raises(ValueError, match="NaN"):
        entropy_from_probabilities([np.nan, 1.0])
    with pytest.raises(TypeError, match="numeric"):
        entropy_from_probabilities(["a", "b"])


def test_surprisal_closed_form():
    # -log2 p: 1/8 -> 3 bits, 1 -> 0, 0 -> inf (closed form)
    assert surprisal(0.125) == 3.0
    np.testing.assert_array_equal(surprisal([1.0, 0.5, 0.0]), [0.0, 1.0, math.inf])
    assert surprisal(np.e ** -2, base="nats") == pytest.approx(2.0)
    with pytest.raises(ValueError, match=r"\[0, 1\]"):
        surprisal(1.2)


def test_mean_surprisal_is_entropy(rng):
    # H(p) = sum p * (-log p) (Shannon 1948; definition)
    p = rng.dirichlet(np.ones(7))
    assert float(np.sum(p * surprisal(p))) == pytest.approx(entropy_from_probabilities(p), rel=1e-12)


# ------------------------------------------------------------------ gates: closed forms
def _gate_table(fn, reps=1):
    x, y = np.meshgrid([0, 1], [0, 1], indexing="ij")
    x, y = np.repeat(x.ravel(), reps), np.repeat(y.ravel(), reps)
    return _table_of(x, y, fn(x, y))


def test_xor_co_information_is_minus_one_bit():
    # Z = X xor Y on fair independent bits: I(X;Y) = 0, I(X;Y|Z) = 1 bit -> -1 bit
    t = _gate_table(np.bitwise_xor)
    assert co_information_from_table(t, estimator="plugin") == pytest.approx(-1.0, abs=1e-12)
    # total correlation: 1 + 1 + 1 - 2 = 1 bit
    assert total_correlation_from_table(t, estimator="plugin") == pytest.approx(1.0, abs=1e-12)


def test_and_co_information_closed_form():
    # Z = X and Y: I(X;Y) = 0; I(X;Y|Z) = P(Z=0) [H(X|Z=0) - H(X|Y,Z=0)]
    #   = 3/4 [(log2 3 - 2/3) - 2/3] = (3/4) log2 3 - 1, so the co-information is
    #   1 - (3/4) log2 3 = -0.18872 bits (worked by hand).
    t = _gate_table(np.bitwise_and)
    expected = 1.0 - 0.75 * math.log2(3)
    assert co_information_from_table(t, estimator="plugin") == pytest.approx(expected, abs=1e-12)
    # total correlation = H(X) + H(Y) + H(Z) - H(X,Y,Z) = 1 + 1 + h(1/4) - 2 = h(1/4)
    h_quarter = -(0.25 * math.log2(0.25) + 0.75 * math.log2(0.75))
    assert total_correlation_from_table(t, estimator="plugin") == pytest.approx(h_quarter, abs=1e-12)


def test_three_copies_are_redundant():
    # three copies of a fair bit: co-information +1 bit, total correlation 2 bits
    t = _table_of([0, 1], [0, 1], [0, 1])
    assert co_information_from_table(t, estimator="plugin") == pytest.approx(1.0)
    assert total_correlation_from_table(t, estimator="plugin") == pytest.approx(2.0)


# ------------------------------------------------------------------ reference libraries
def _random_columns(rng, n, ks, couple=0.5):
    base = rng.integers(0, max(ks), n)
    return [np.where(rng.random(n) < couple, base % k, rng.integers(0, k, n)) for k in ks]


@pytest.mark.parametrize("ks", [(2, 2, 2), (3, 4, 2), (2, 3, 3, 2)])
def test_co_information_and_total_correlation_match_dit(rng, ks):
    cols = _random_columns(rng, 400, ks)
    t = _table_of(*cols)
    d = _dit_distribution(t)
    # dit.multivariate.coinformation / total_correlation on the empirical distribution (bits)
    assert co_information_from_table(t, estimator="plugin") == pytest.approx(coinformation(d), abs=1e-10)
    assert total_correlation_from_table(t, estimator="plugin") == pytest.approx(total_correlation(d), abs=1e-10)


@pytest.mark.parametrize("ks", [(2, 2, 2), (4, 3, 5)])
def test_sample_forms_match_pyitlib(rng, ks):
    x, y, z = _random_columns(rng, 500, ks)
    stacked = np.vstack([x, y, z])
    # pyitlib drv.information_co (co-information), drv.information_multi (total
    # correlation) and drv.information_mutual_conditional, plug-in ("ML") in bits
    assert infoscope.co_information(x, y, z, estimator="plugin") == pytest.approx(drv.information_co(stacked), abs=1e-10)
    assert infoscope.total_correlation(x, y, z, estimator="plugin") == pytest.approx(
        drv.information_multi(stacked), abs=1e-10)
    cmi = infoscope.conditional_mutual_information(x, y, z, estimator="plugin")
    assert cmi == pytest.approx(drv.information_mutual_conditional(x, y, z), abs=1e-10)
    # McGill's identity: co-information = I(X;Y) - I(X;Y|Z)
    mi = infoscope.mutual_information(x, y, estimator="plugin")
    assert infoscope.co_information(x, y, z, estimator="plugin") == pytest.approx(mi - cmi, abs=1e-12)


def test_co_information_of_two_is_mutual_information(rng):
    x, y = _random_columns(rng, 300, (3, 4))
    t = _table_of(x, y)
    for est in ("plugin", "miller_madow"):
        assert co_information_from_table(t, estimator=est) == pytest.approx(
            infoscope.mutual_information_from_table(t, estimator=est), abs=1e-12)


def test_bias_corrected_co_information_is_the_signed_sum_of_corrected_entropies(rng):
    x, y, z = _random_columns(rng, 200, (3, 3, 2))
    t = _table_of(x, y, z)
    h = lambda a: infoscope.entropy_from_counts(np.asarray(a).ravel(), estimator="miller_madow")  # noqa: E731
    expected = (h(t.sum((1, 2))) + h(t.sum((0, 2))) + h(t.sum((0, 1)))
                - h(t.sum(2)) - h(t.sum(1)) - h(t.sum(0)) + h(t))
    assert co_information_from_table(t) == pytest.approx(expected, abs=1e-12)


def test_multivariate_sample_forms_warn_when_sparse():
    x = list(range(10)) * 2
    with pytest.warns(SmallSampleWarning, match="joint table"):
        infoscope.total_correlation(x, x, x)


def test_total_correlation_needs_two_columns():
    with pytest.raises(ValueError, match="at least two"):
        infoscope.total_correlation([1, 2, 3])


# ------------------------------------------------------------------ weights
def test_kish_effective_sample_size_closed_forms():
    # Kish (1965): equal weights -> n; (sum w)^2 / sum w^2 in general
    assert effective_sample_size(np.full(50, 3.0)) == pytest.approx(50.0)
    assert effective_sample_size([1.0, 1.0, 2.0]) == pytest.approx(16.0 / 6.0)
    with pytest.raises(ValueError, match="negative"):
        effective_sample_size([1.0, -1.0])
    with pytest.raises(ValueError, match="all 0"):
        effective_sample_size([0.0, 0.0])


def test_integer_weights_equal_repeated_rows_for_the_plugin(rng):
    # a row of weight 3 is, for the plug-in estimate, the same as three copies of it
    x = rng.integers(0, 4, 200)
    y = (x + rng.integers(0, 2, 200)) % 4
    w = rng.integers(1, 4, 200)
    rx, ry = np.repeat(x, w), np.repeat(y, w)
    h = infoscope.entropy(x, weights=w, estimator="plugin")
    # scipy.stats.entropy of the repeated sample's counts
    assert float(h) == pytest.approx(scipy.stats.entropy(np.bincount(rx), base=2), rel=1e-12)
    mi = infoscope.mutual_information(x, y, weights=w, estimator="plugin")
    # pyitlib drv.information_mutual on the repeated rows (plug-in, bits)
    assert float(mi) == pytest.approx(drv.information_mutual(rx, ry), abs=1e-12)


def test_weighted_miller_madow_corrects_at_the_effective_sample_size(rng):
    x = rng.integers(0, 5, 300)
    w = rng.lognormal(0.0, 1.0, 300)
    h = infoscope.entropy(x, weights=w, base="nats")
    n_eff = w.sum() ** 2 / (w ** 2).sum()                       # Kish (1965)
    p = np.bincount(x, weights=w) / w.sum()
    expected = scipy.stats.entropy(p) + (np.count_nonzero(p) - 1) / (2 * n_eff)   # Miller (1955)
    assert isinstance(h, WeightedEstimate) and isinstance(h, float)
    assert h.n == 300 and h.n_effective == pytest.approx(n_eff)
    assert float(h) == pytest.approx(expected, rel=1e-12)
    assert "n_effective" in repr(h)


def test_weighted_mi_corrects_each_entropy_at_n_effective(rng):
    x = rng.integers(0, 3, 400)
    y = np.where(rng.random(400) < 0.5, x, rng.integers(0, 3, 400))
    w = rng.uniform(0.2, 5.0, 400)
    mi = infoscope.mutual_information(x, y, weights=w, base="nats")
    n_eff = w.sum() ** 2 / (w ** 2).sum()
    joint = np.zeros((3, 3))
    np.add.at(joint, (x, y), w)
    h = lambda c: scipy.stats.entropy(c.ravel()) + (np.count_nonzero(c) - 1) / (2 * n_eff)  # noqa: E731
    assert float(mi) == pytest.approx(h(joint.sum(1)) + h(joint.sum(0)) - h(joint), rel=1e-10)
    assert mi.n_effective == pytest.approx(n_eff)


def test_weighted_rows_with_missing_values_are_left_out():
    x = [0, 1, None, 1, 0, 1] * 10
    w = [1.0, 2.0, 100.0, 2.0, 1.0, 2.0] * 10
    h = infoscope.entropy(x, weights=w, estimator="plugin")
    assert h.n == 50
    p = np.array([2.0, 6.0]) / 8.0
    assert float(h) == pytest.approx(scipy.stats.entropy(p, base=2))


def test_bad_weights_are_named():
    with pytest.raises(ValueError, match="weights has 2 values for 3 rows"):
        infoscope.entropy([1, 2, 3], weights=[1.0, 2.0])
    with pytest.raises(ValueError, match="weights has 1 NaN"):
        infoscope.entropy([1, 2, 3], weights=[1.0, np.nan, 1.0])
    with pytest.raises(ValueError, match="does not accept weights"):
        infoscope.entropy([1, 2, 3], weights=[1.0, 1.0, 1.0], estimator="chao_shen")
    with pytest.raises(ValueError, match="weights= is not supported"):
        infoscope.mutual_information([1.0, 2.0], [1.0, 2.0], weights=[1, 1], estimator="ksg")


def test_weights_are_not_modified():
    w = np.array([1.0, 2.0, 3.0, 4.0] * 5)
    before = w.copy()
    infoscope.entropy([0, 1, 0, 1] * 5, weights=w)
    np.testing.assert_array_equal(w, before)


def test_entropy_of_weighted_table_refuses_integer_only_estimators():
    with pytest.raises(ValueError, match="estimator"):
        entropy_of_weighted_table([1.5, 2.5], 3.0, estimator="grassberger")


@pytest.mark.parametrize("module_name", ["infoscope.estimators.multivariate", "infoscope.measures.entropies",
                                         "infoscope.measures.information"])
def test_docstring_examples_run(module_name):
    import doctest
    import importlib

    result = doctest.testmod(importlib.import_module(module_name), optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0
